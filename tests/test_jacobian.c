/* Check suite: the analytic Jacobian of the steady residual (src/thermal/jacobian.c) against
   finite differences of the same residual, the definition of the derivative, computed by PETSc's
   general-purpose coloured differencing (MatFDColoring, forward differences with PETSc's default
   step, error of order 1e-8 relative).  Differences are only meaningful away from the kinks of
   the residual (the limiter at a local extremum, max() at a tie, the solidus), which a converged
   field has wherever the temperature is nearly uniform; so the state is a smooth field of our
   own, strictly monotone in both directions, hot enough to melt below the axis, with the
   hydrothermal switch moved into it, and the depletion that goes with it (the upstream sweep).
   Measured 2.7e-10; the tolerance 1e-7 is common practice, no source.  On 1 rank and on 4 (a
   2 x 2 layout, so rows span ranks in both directions). */
#include <crustforge/steady.h>
#include "../src/thermal/steady_impl.h"
#include "cf_test.h"
#include <math.h>
#include "cf_scenario.h"

/* ||J_analytic - J_fd||_F / ||J_fd||_F at the solver's current state. */
static PetscReal JacobianMismatch(CFSteady s)
{
  Mat       Jfd;
  PetscReal diff, ref;

  CK_PETSC(CFSteadyNewtonSetUp(s)); /* a solve makes the matrices, and releases them after */
  CK_PETSC(SNESSetSolution(s->snes, s->X)); /* the coloured differences compare against it */
  CK_PETSC(SNESSetUp(s->snes));
  {
    Vec f; /* the differences take F(X) from the SNES's own residual vector */
    CK_PETSC(SNESGetFunction(s->snes, &f, NULL, NULL));
    CK_PETSC(SNESComputeFunction(s->snes, s->X, f));
  }
  { /* a first assembly at another state forms the pattern, and the one compared below then
       fills in its values alone (CFSteadySetRow): an entry it missed keeps a wrong value */
    Vec X0;
    CK_PETSC(VecDuplicate(s->X, &X0));
    CK_PETSC(VecCopy(s->X, X0));
    CK_PETSC(VecScale(s->X, 0.5));
    CK_PETSC(CFSteadyFormJacobian(s->snes, s->X, s->A, s->P, s));
    CK_PETSC(VecCopy(X0, s->X));
    CK_PETSC(VecDestroy(&X0));
  }
  CK_PETSC(CFSteadyFormJacobian(s->snes, s->X, s->A, s->P, s));
  CK_PETSC(MatDuplicate(s->A, MAT_DO_NOT_COPY_VALUES, &Jfd));
  CK_PETSC(SNESComputeJacobianDefaultColor(s->snes, s->X, Jfd, Jfd, NULL));
  CK_PETSC(MatNorm(Jfd, NORM_FROBENIUS, &ref));
  CK_PETSC(MatAXPY(Jfd, -1.0, s->A, SAME_NONZERO_PATTERN));
  CK_PETSC(MatNorm(Jfd, NORM_FROBENIUS, &diff));
  CK_PETSC(MatDestroy(&Jfd));
  CK_PETSC(CFSteadyNewtonRelease(s));
  return diff / ref;
}

static void DefaultLike(CFConfig *cfg)
{
  CK_PETSC(CFConfigSetDefaults(cfg));
  cfg->spacing = 8.0e3; /* 50 x 25 cells of the default 400 x 200 km invented ridge segment */
  CFScenarioFinish(cfg);
}

/* T = T_ad(z) - 100 K x / W - 300 K exp(-z / 20 km): increasing with depth, decreasing away from
   the axis, above the katz2003 solidus between about 50 and 75 km. */
static void SmoothState(CFSteady s)
{
  const CFConfig *c = &s->cfg;
  DMDALocalInfo   info;
  CFCellState   **x;

  CK_PETSC(DMDAGetLocalInfo(s->da, &info));
  CK_PETSC(DMDAVecGetArray(s->da, s->X, &x));
  for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
    for (PetscInt i = info.xs; i < info.xs + info.xm; i++) {
      const PetscReal xc = (i + 0.5) * c->dx, z = (j + 0.5) * c->dz;
      x[j][i].T = c->potential_temperature + c->adiabatic_gradient * z - 100.0 * xc / c->width - 300.0 * exp(-z / 20.0e3);
      x[j][i].F = 0.0;
    }
  CK_PETSC(DMDAVecRestoreArray(s->da, s->X, &x));
  CK_PETSC(CFDepletionSweep(s, s->X));
}

START_TEST(analytic_matches_differences)
{
  CFConfig  cfg;
  CFSteady  s;
  PetscReal e, Fmax;

  DefaultLike(&cfg);
  /* hydrothermal cooling switched inside the field, so that dk/dT matters (SI: K, m) */
  cfg.hydrothermal_temperature_cutoff = 1450.0;
  cfg.hydrothermal_temperature_width  = 50.0;
  cfg.hydrothermal_depth_cutoff       = 40.0e3;
  CK_PETSC(CFSteadyCreate(PETSC_COMM_WORLD, &cfg, &s));
  SmoothState(s);
  CK_PETSC(VecStrideMax(s->X, 1, NULL, &Fmax));
  ck_assert_msg(Fmax > 0.01, "the test state does not melt (max depletion %g)", (double)Fmax);
  e = JacobianMismatch(s);
  ck_assert_msg(e < 1e-7, "analytic and finite-difference Jacobians differ by %g (Frobenius, relative)", (double)e);
  CK_PETSC(CFSteadyDestroy(&s));
}
END_TEST

/* Newton with the exact Jacobian converges quadratically once close: the last steps square the
   residual (Dennis & Schnabel 1996, Numerical Methods for Unconstrained Optimization and
   Nonlinear Equations, Theorem 5.2.1), so the default case needs few iterations. */
START_TEST(newton_is_quadratic)
{
  CFConfig      cfg;
  CFSteady      s;
  CFSolveReport rep;

  DefaultLike(&cfg);
  CK_PETSC(CFSteadyCreate(PETSC_COMM_WORLD, &cfg, &s));
  CK_PETSC(CFSteadySetInitialGuess(s));
  CK_PETSC(CFSteadySolve(s, &rep));
  ck_assert_msg(rep.nonlinear_iterations <= 8, "Newton took %d iterations from the cooling-plate guess", (int)rep.nonlinear_iterations);
  CK_PETSC(CFSteadyDestroy(&s));
}
END_TEST

static Suite *make_suite(void)
{
  Suite *s = suite_create("jacobian");
  cf_add_case(s, "differences", analytic_matches_differences);
  cf_add_case(s, "quadratic", newton_is_quadratic);
  return s;
}

CF_TEST_MAIN(make_suite)
