/* Grid sequencing: the initial guess on a fine grid is the converged solution of the same problem
   on a grid twice as coarse (recursively), interpolated, so Newton on the fine grid starts inside
   its region of fast convergence.  Measured in DEVELOPERS.md. */
#include <crustforge/units.h>
#include "steady_impl.h"

/* How many times the grid of cfg can be halved while the coarse grid stays useful. */
static PetscInt CoarseLevels(const CFConfig *cfg, PetscReal max_spacing)
{
  PetscInt  levels = 0, nx = cfg->nx, nz = cfg->nz;
  PetscReal h      = PetscMax(cfg->dx, cfg->dz);

  while (nx % 2 == 0 && nz % 2 == 0 && nx / 2 >= 16 && nz / 2 >= 8 && 2.0 * h <= max_spacing) {
    nx /= 2;
    nz /= 2;
    h *= 2.0;
    levels++;
  }
  return levels;
}

/* Bilinear interpolation of the coarse temperature (natural order, all ranks) at (x, z): clamped
   at the axis and the far side (zero gradient there), and towards the boundary temperatures above
   the first and below the last row of cell centres. */
static PetscReal Interpolate(const PetscScalar *Tc, PetscInt ncx, PetscInt ncz, PetscReal dxc, PetscReal dzc, PetscReal Ts, PetscReal Tb, PetscReal x, PetscReal z)
{
  PetscReal fx = x / dxc - 0.5, fz = z / dzc - 0.5, tx, tz, top, bot;
  PetscInt  i0, j0;

  fx = PetscMin(PetscMax(fx, 0.0), (PetscReal)(ncx - 1));
  i0 = PetscMin((PetscInt)fx, ncx - 2);
  tx = fx - i0;
#define TC(i, j) PetscRealPart(Tc[2 * ((j) * ncx + (i))])
#define ROW(j)   ((1 - tx) * TC(i0, j) + tx * TC(i0 + 1, j))
  if (fz < 0.0) return Ts + (ROW(0) - Ts) * (z / (0.5 * dzc));
  if (fz > ncz - 1) return Tb + (ROW(ncz - 1) - Tb) * ((ncz * dzc - z) / (0.5 * dzc));
  j0  = PetscMin((PetscInt)fz, ncz - 2);
  tz  = fz - j0;
  top = ROW(j0);
  bot = ROW(j0 + 1);
#undef ROW
#undef TC
  return (1 - tz) * top + tz * bot;
}

PetscErrorCode CFSteadyInterpolateFrom(CFSteady fine, CFSteady coarse)
{
  Vec           nat, all;
  VecScatter    sc;
  const PetscScalar *Tc;
  DMDALocalInfo info;
  CFCellState **x;
  const CFConfig *cc = &coarse->cfg, *cf = &fine->cfg;

  PetscFunctionBeginUser;
  /* the coarse grid is small: every rank takes all of it */
  PetscCall(DMDACreateNaturalVector(coarse->da, &nat));
  PetscCall(DMDAGlobalToNaturalBegin(coarse->da, coarse->X, INSERT_VALUES, nat));
  PetscCall(DMDAGlobalToNaturalEnd(coarse->da, coarse->X, INSERT_VALUES, nat));
  PetscCall(VecScatterCreateToAll(nat, &sc, &all));
  PetscCall(VecScatterBegin(sc, nat, all, INSERT_VALUES, SCATTER_FORWARD));
  PetscCall(VecScatterEnd(sc, nat, all, INSERT_VALUES, SCATTER_FORWARD));
  PetscCall(VecGetArrayRead(all, &Tc));
  PetscCall(DMDAGetLocalInfo(fine->da, &info));
  PetscCall(DMDAVecGetArray(fine->da, fine->X, &x));
  for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
    for (PetscInt i = info.xs; i < info.xs + info.xm; i++) {
      x[j][i].T = Interpolate(Tc, cc->nx, cc->nz, cc->dx, cc->dz, fine->rc.T_surface, fine->rc.T_bottom, (i + 0.5) * cf->dx, (j + 0.5) * cf->dz);
      x[j][i].F = 0.0;
    }
  PetscCall(DMDAVecRestoreArray(fine->da, fine->X, &x));
  fine->plate_guess = PETSC_FALSE;
  PetscCall(VecRestoreArrayRead(all, &Tc));
  PetscCall(VecScatterDestroy(&sc));
  PetscCall(VecDestroy(&all));
  PetscCall(VecDestroy(&nat));
  /* the depletion that goes with the interpolated temperature */
  PetscCall(CFDepletionSweep(fine, fine->X));
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadySequenceInitialGuess(CFSteady s, PetscInt *levels_used, PetscInt *coarse_iterations)
{
  const PetscReal kappa = s->cfg.conductivity / (s->cfg.mantle_density * s->cfg.heat_capacity);
  PetscReal       max_spacing_km = 8.0;
  PetscBool       set;
  PetscInt        levels;

  PetscFunctionBeginUser;
  PetscOptionsBegin(s->comm, "steady_", "Steady coupled solver", "crustforge");
  PetscCall(PetscOptionsReal("-coarsest_spacing", "coarsest grid spacing of the grid sequence that builds the initial guess (km); 0 turns sequencing off; default 8 km, finer for fast spreading (cell Peclet number at most 16)", NULL, max_spacing_km, &max_spacing_km, &set));
  PetscOptionsEnd();
  /* A coarsest cell of Peclet number U0 h / kappa above 16 makes Newton from the cooling-plate
     guess crawl (150 mm/yr, 8 km: Pe 19, 42-134 Newton steps on the coarse grids against 8-21
     from 4 km; 120 mm/yr, Pe 15: the same either way; measured in DEVELOPERS.md). */
  while (!set && max_spacing_km > 1.0 && s->cfg.half_rate * CFKmToM(max_spacing_km) / kappa > 16.0) max_spacing_km /= 2.0;
  levels       = CoarseLevels(&s->cfg, CFKmToM(max_spacing_km));
  *levels_used = levels;
  *coarse_iterations = 0;
  if (!levels || s->rc.kfun || s->rc.source) { /* verification hooks have no coarse twin */
    *levels_used = 0;
    PetscCall(CFSteadySetInitialGuess(s));
    PetscFunctionReturn(0);
  }
  {
    CFConfig      cc = s->cfg;
    CFSteady      coarse;
    CFSolveReport rep;
    PetscInt      lv, its;

    cc.nx /= 2;
    cc.nz /= 2;
    cc.dx *= 2.0;
    cc.dz *= 2.0;
    cc.spacing *= 2.0;
    PetscCall(CFSteadyCreate(s->comm, &cc, &coarse));
    /* a coarse solution only starts the next grid, whose own discretization differs from it by
       kelvins: a residual 1e-3 of its start (millikelvins in the root mean square) is plenty;
       1e-5 cost a Newton step per coarse grid and saved none on the fine one (DEVELOPERS.md) */
    PetscCall(SNESSetTolerances(coarse->snes, PETSC_DEFAULT, 1e-3, PETSC_DEFAULT, PETSC_DEFAULT, PETSC_DEFAULT));
    PetscCall(CFSteadySequenceInitialGuess(coarse, &lv, &its));
    PetscCall(CFSteadySolve(coarse, &rep));
    *coarse_iterations = its + rep.nonlinear_iterations;
    PetscCall(CFSteadyInterpolateFrom(s, coarse));
    PetscCall(CFSteadyDestroy(&coarse));
  }
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyCopySolution(CFSteady s, Vec X)
{
  PetscInt n, m;

  PetscFunctionBeginUser;
  PetscCall(VecGetLocalSize(X, &n));
  PetscCall(VecGetLocalSize(s->X, &m));
  PetscCheck(n == m, PETSC_COMM_SELF, PETSC_ERR_ARG_SIZ, "continuation: the solution to start from has %" PetscInt_FMT " local values, this grid %" PetscInt_FMT, n, m);
  PetscCall(VecCopy(X, s->X));
  s->plate_guess = PETSC_FALSE;
  /* the depletion follows from the temperature for this case's melting parameters */
  PetscCall(VecStrideSet(s->X, 1, 0.0));
  PetscCall(CFDepletionSweep(s, s->X));
  PetscFunctionReturn(0);
}
