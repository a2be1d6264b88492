/* The steady coupled temperature-depletion solver: object life cycle, residual and Newton solve. */
#include <math.h>
#include <crustforge/units.h>
#include "steady_impl.h"

PetscErrorCode CFSteadyEquilibriumMelt(CFSteady s, const DMDALocalInfo *info, const CFCellState *const *x)
{
  const PetscInt n = info->xm * info->ym;
  PetscInt       m = 0;

  PetscFunctionBeginUser;
  /* row_P and row_solidus follow the solver's own layout (filled at creation) */
  PetscCheck(info->xs == s->owned.xs && info->ys == s->owned.ys && info->xm == s->owned.xm && info->ym == s->owned.ym, PETSC_COMM_SELF, PETSC_ERR_PLIB, "equilibrium melt: grid layout differs from the solver's");
  /* Only cells near or above the solidus go to the model, gathered to the front of the work
     arrays: most of the grid is colder, and there F = dF/dT = 0 (melting.h).  Otherwise the
     model's cost lands on whichever ranks hold the cold mantle as much as on the melting
     region's (measured in DEVELOPERS.md).  A NaN goes to the model, which refuses it. */
  for (PetscInt j = info->ys; j < info->ys + info->ym; j++) {
    const PetscReal P = s->row_P[j - info->ys], cold = s->row_solidus[j - info->ys] - CF_SOLIDUS_MARGIN;
    for (PetscInt i = info->xs; i < info->xs + info->xm; i++)
      if (!(x[j][i].T < cold)) {
        s->work_P[m]   = P;
        s->work_T[m++] = x[j][i].T;
      }
  }
  PetscCall(CFMeltingModelMeltFractionArray(s->melting, m, s->work_P, s->work_T, s->work_F, s->work_dF));
  /* spread back to one entry per owned cell, from the last: entry k never moves down */
  for (PetscInt j = info->ys + info->ym - 1, c = n - 1, k = m - 1; j >= info->ys; j--) {
    const PetscReal cold = s->row_solidus[j - info->ys] - CF_SOLIDUS_MARGIN;
    for (PetscInt i = info->xs + info->xm - 1; i >= info->xs; i--, c--) {
      const PetscBool model = (PetscBool)!(x[j][i].T < cold);
      s->work_F[c]          = model ? s->work_F[k] : 0.0;
      s->work_dF[c]         = model ? s->work_dF[k--] : 0.0;
    }
  }
  PetscFunctionReturn(0);
}

/* Conductivity of every owned cell and of the neighbours across its faces. */
void CFSteadyConductivityPatch(CFSteady s, const DMDALocalInfo *info, const CFCellState *const *x, PetscBool with_derivative)
{
  const PetscReal dx = s->rc.dx, dz = s->rc.dz;
  const PetscInt  i0 = PetscMax(info->xs - 1, 0), i1 = PetscMin(info->xs + info->xm + 1, info->mx);
  const PetscInt  j0 = PetscMax(info->ys - 1, 0), j1 = PetscMin(info->ys + info->ym + 1, info->my);

  for (PetscInt j = j0; j < j1; j++) {
    const PetscBool owned_row = (PetscBool)(j >= info->ys && j < info->ys + info->ym);
    for (PetscInt i = i0; i < i1; i++) {
      const PetscBool owned_col = (PetscBool)(i >= info->xs && i < info->xs + info->xm);
      if (!owned_row && !owned_col) continue; /* star stencil: corner ghosts are never used */
      KCELL(info, s->kcell, i, j) = CFConductivity(&s->rc, (i + 0.5) * dx, (j + 0.5) * dz, x[j][i].T);
      if (with_derivative) KCELL(info, s->dkcell, i, j) = CFConductivityDerivative(&s->rc, (i + 0.5) * dx, (j + 0.5) * dz, x[j][i].T);
    }
  }
}

/* A NaN or Inf in the state or the residual stops the solve, naming the first such cell (on the
   lowest rank that has one) and the field, instead of surfacing iterations later as a diverged
   Newton step.  The residual itself returns normally (raising inside PETSc's DMDA wrapper would
   leave its work vectors behind): it records the message and flags a domain error, which ends
   SNESSolve, and CFSteadySolve raises it.  Collective, like the residual: one reduction. */
static PetscErrorCode CheckFinite(CFSteady s, const DMDALocalInfo *info, CFCellState **x, CFCellState **f)
{
  char        msg[256] = "";
  PetscMPIInt rank, size, mine, first;

  PetscFunctionBeginUser;
  /* The fields first: a bad value spreads into its neighbours' residuals through the stencil. */
  for (int pass = 0; pass < 2 && !msg[0]; pass++)
    for (PetscInt j = info->ys; j < info->ys + info->ym && !msg[0]; j++)
      for (PetscInt i = info->xs; i < info->xs + info->xm && !msg[0]; i++) {
        const char *what = NULL;
        PetscReal   v    = 0;
        if (pass == 0 && !isfinite(x[j][i].T)) what = "temperature", v = x[j][i].T;
        else if (pass == 0 && !isfinite(x[j][i].F)) what = "depletion", v = x[j][i].F;
        else if (pass == 1 && !isfinite(f[j][i].T)) what = "residual of the temperature equation", v = f[j][i].T;
        else if (pass == 1 && !isfinite(f[j][i].F)) what = "residual of the depletion equation", v = f[j][i].F;
        if (what) snprintf(msg, sizeof(msg), "steady solve: %s is %s at cell (i, j) = (%d, %d), x = %g km, z = %g km", what, isnan(v) ? "NaN" : (v > 0 ? "+Inf" : "-Inf"), (int)i, (int)j, (double)CFMToKm((i + 0.5) * s->rc.dx), (double)CFMToKm((j + 0.5) * s->rc.dz));
      }
  PetscCallMPI(MPI_Comm_rank(s->comm, &rank));
  PetscCallMPI(MPI_Comm_size(s->comm, &size));
  mine = msg[0] ? rank : size;
  PetscCallMPI(MPI_Allreduce(&mine, &first, 1, MPI_INT, MPI_MIN, s->comm));
  if (first == size) PetscFunctionReturn(0);
  PetscCallMPI(MPI_Bcast(msg, sizeof(msg), MPI_CHAR, first, s->comm));
  if (!s->nonfinite[0]) PetscCall(PetscStrncpy(s->nonfinite, msg, sizeof(s->nonfinite)));
  PetscCall(SNESSetFunctionDomainError(s->snes));
  PetscFunctionReturn(0);
}

/* Raise the first non-finite value a residual evaluation met. */
static PetscErrorCode RaiseNonFinite(CFSteady s)
{
  PetscFunctionBeginUser;
  PetscCheck(!s->nonfinite[0], s->comm, PETSC_ERR_FP, "%s", s->nonfinite);
  PetscFunctionReturn(0);
}

static PetscErrorCode FormFunctionLocal(DMDALocalInfo *info, CFCellState **x, CFCellState **f, void *ptr)
{
  CFSteady s = (CFSteady)ptr;
  PetscInt n = 0;

  PetscFunctionBeginUser;
  CFSteadyConductivityPatch(s, info, (const CFCellState *const *)x, PETSC_FALSE);
  PetscCall(CFSteadyEquilibriumMelt(s, info, (const CFCellState *const *)x));
  for (PetscInt j = info->ys; j < info->ys + info->ym; j++)
    for (PetscInt i = info->xs; i < info->xs + info->xm; i++, n++) {
      PetscReal F_up, GV = CFDepletionMeltingRate(&s->rc, (const CFCellState *const *)x, i, j, &F_up);
      f[j][i].T = CFEnergyResidualCell(&s->rc, info, (const CFCellState *const *)x, s->kcell, i, j, GV);
      f[j][i].F = (x[j][i].F - PetscMax(s->work_F[n], F_up)) * s->rc.depletion_scale;
    }
  PetscCall(CheckFinite(s, info, x, f));
  PetscCall(PetscLogFlops(200.0 * info->xm * info->ym));
  PetscFunctionReturn(0);
}

/* An option's value unless the user gave one. */
static PetscErrorCode SetDefaultOption(const char name[], const char value[])
{
  PetscBool has;

  PetscFunctionBeginUser;
  PetscCall(PetscOptionsHasName(NULL, NULL, name, &has));
  if (!has) PetscCall(PetscOptionsSetValue(NULL, name, value));
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyCreate(MPI_Comm comm, const CFConfig *cfg, CFSteady *out)
{
  CFSteady      s;
  DMDALocalInfo info;
  KSP           ksp;
  PC            pc;

  PetscFunctionBeginUser;
  PetscCall(PetscNew(&s));
  s->comm = comm;
  s->cfg  = *cfg;
  PetscCall(DMDACreate2d(comm, DM_BOUNDARY_NONE, DM_BOUNDARY_NONE, DMDA_STENCIL_STAR, cfg->nx, cfg->nz, PETSC_DECIDE, PETSC_DECIDE, 2, 2, NULL, NULL, &s->da));
  PetscCall(DMSetFromOptions(s->da));
  PetscCall(DMSetUp(s->da));
  PetscCall(DMDASetFieldName(s->da, 0, "temperature"));
  PetscCall(DMDASetFieldName(s->da, 1, "depletion"));
  PetscCall(DMDASetUniformCoordinates(s->da, 0.5 * cfg->dx, cfg->width - 0.5 * cfg->dx, 0.5 * cfg->dz, cfg->depth - 0.5 * cfg->dz, 0, 0));
  PetscCall(DMDACreateCompatibleDMDA(s->da, 1, &s->da1));
  PetscCall(DMDASetUniformCoordinates(s->da1, 0.5 * cfg->dx, cfg->width - 0.5 * cfg->dx, 0.5 * cfg->dz, cfg->depth - 0.5 * cfg->dz, 0, 0));
  PetscCall(DMCreateGlobalVector(s->da, &s->X));
  PetscCall(PetscObjectSetName((PetscObject)s->X, "state"));

  PetscCall(CFFlowCreate(cfg, &s->flow));
  PetscCall(CFMeltingModelCreate(cfg, &s->melting));

  /* residual context, SI */
  s->rc.cfg                = &s->cfg;
  s->rc.nx                 = cfg->nx;
  s->rc.nz                 = cfg->nz;
  s->rc.dx                 = cfg->dx;
  s->rc.dz                 = cfg->dz;
  s->rc.rho                = cfg->mantle_density;
  s->rc.cp                 = cfg->heat_capacity;
  s->rc.rho_crust          = cfg->crust_density;
  s->rc.gravity            = cfg->gravity;
  s->rc.adiabatic_gradient = cfg->adiabatic_gradient;
  s->rc.entropy_of_fusion  = cfg->entropy_of_fusion;
  s->rc.T_surface          = cfg->surface_temperature;
  s->rc.T_bottom           = cfg->potential_temperature + cfg->adiabatic_gradient * cfg->depth;
  /* residuals in K: heat per unit length over rho cp times an advective-plus-diffusive flux */
  s->rc.energy_scale    = cfg->mantle_density * cfg->heat_capacity * (cfg->half_rate * cfg->dx + cfg->conductivity / (cfg->mantle_density * cfg->heat_capacity));
  s->rc.depletion_scale = s->rc.T_bottom - s->rc.T_surface;

  PetscCall(DMDAGetLocalInfo(s->da, &info));
  s->rc.corners.I0 = info.gxs;
  s->rc.corners.J0 = info.gys;
  s->rc.corners.nI = info.gxm + 1;
  s->rc.corners.nJ = info.gym + 1;
  PetscCall(PetscMalloc1(s->rc.corners.nI * s->rc.corners.nJ, &s->rc.corners.psi));
  PetscCall(CFFlowCornerStreamFunction(s->flow, cfg->dx, cfg->dz, info.gxs, info.gxm + 1, info.gys, info.gym + 1, s->rc.corners.psi));
  s->nowned = info.xm * info.ym;
  PetscCall(PetscMalloc4(s->nowned, &s->work_P, s->nowned, &s->work_T, s->nowned, &s->work_F, s->nowned, &s->work_dF));
  s->owned = info;
  PetscCall(PetscMalloc2(info.ym, &s->row_P, info.ym, &s->row_solidus));
  for (PetscInt j = info.ys; j < info.ys + info.ym; j++) {
    s->row_P[j - info.ys] = CFPressure(&s->rc, (j + 0.5) * cfg->dz);
    PetscCall(CFMeltingModelSolidus(s->melting, s->row_P[j - info.ys], &s->row_solidus[j - info.ys]));
  }
  PetscCall(PetscCalloc2(info.gxm * info.gym, &s->kcell, info.gxm * info.gym, &s->dkcell));
  {
    ISLocalToGlobalMapping map;
    PetscCall(DMGetLocalToGlobalMapping(s->da, &map));
    PetscCall(ISLocalToGlobalMappingGetBlockIndices(map, &s->gpoint));
  }

  /* Newton-Krylov: BiCGStab on the analytic Jacobian, preconditioned by an assembled first-order
     approximation (jacobian.c); -steady_jacobian split uses coloured finite differences as the
     operator, coloring factors those directly.  Measured in DEVELOPERS.md; -snes_*, -ksp_*,
     -pc_* override. */
  PetscCall(SNESCreate(comm, &s->snes));
  PetscCall(SNESSetDM(s->snes, s->da));
  PetscCall(DMDASNESSetFunctionLocal(s->da, INSERT_VALUES, (DMDASNESFunction)FormFunctionLocal, s));
  /* converged when the root-mean-square residual is 1e-6 K per unknown (a 2-norm that does not
     tighten as the grid is refined), or 1e-9 of the start */
  PetscCall(SNESSetTolerances(s->snes, 1e-6 * PetscSqrtReal(2.0 * cfg->nx * cfg->nz), 1e-9, 0.0, 50, PETSC_DEFAULT));
  {
    const char *const kinds[] = {"analytic", "split", "coloring", "picard", "CFSteadyJacobian", "", NULL};
    PetscEnum         kind    = 0;
    PetscOptionsBegin(comm, "steady_", "Steady coupled solver", "crustforge");
    PetscCall(PetscOptionsEnum("-jacobian", "analytic: the exact Jacobian as operator, BiCGStab preconditioned by eliminating the depletion and a BoomerAMG cycle on the temperature (schur.c); split: the same with coloured finite differences as operator; coloring: the coloured Jacobian factored directly; picard: outer iterations (temperature with the melting rate frozen, then depletion with the temperature frozen), for comparison", NULL, kinds, kind, &kind, NULL));
    PetscOptionsEnd();
    s->jacobian = (CFSteadyJacobian)kind;
  }
  PetscCall(SNESGetKSP(s->snes, &ksp));
  PetscCall(KSPGetPC(ksp, &pc));
  if (s->jacobian == CF_JACOBIAN_COLORING) {
    PetscCall(KSPSetType(ksp, KSPPREONLY));
    PetscCall(PCSetType(pc, PCLU));
    PetscCall(PCFactorSetMatSolverType(pc, MATSOLVERMUMPS));
  } else if (s->jacobian == CF_JACOBIAN_PICARD) {
    PetscMPIInt size;
    PetscCallMPI(MPI_Comm_size(comm, &size));
    PetscCall(KSPSetType(ksp, KSPPREONLY));
    if (size == 1) {
      PetscCall(PCSetType(pc, PCLU));
      PetscCall(PCFactorSetMatSolverType(pc, MATSOLVERMUMPS));
    } else {
      PetscCall(PCSetType(pc, PCASM));
      PetscCall(SetDefaultOption("-sub_pc_type", "lu"));
    }
  } else {
    /* BiCGStab: no basis to keep, so 11 % less memory than GMRES at 0.25 km and as many
       preconditioner applications or fewer (measured in DEVELOPERS.md).  Inexact Newton: each
       step solved to 1e-2 of its residual, which limits Newton no more than its nonlinearity
       does (a step reduces the residual about tenfold until the last), at half the iterations
       of a tight solve. */
    PetscCall(KSPSetType(ksp, KSPBCGS));
    PetscCall(KSPSetTolerances(ksp, 1e-2, PETSC_DEFAULT, PETSC_DEFAULT, 200));
    PetscCall(PCSetType(pc, PCSHELL));
    PetscCall(PCShellSetApply(pc, CFSchurApply));
    PetscCall(PCShellSetName(pc, "depletion eliminated upstream, Schur complement in temperature by BoomerAMG (schur.c)"));
  }
  PetscCall(SNESSetFromOptions(s->snes));
  *out = s;
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyDestroy(CFSteady *ps)
{
  CFSteady s = *ps;

  PetscFunctionBeginUser;
  if (!s) PetscFunctionReturn(0);
  PetscCall(SNESDestroy(&s->snes));
  PetscCall(CFSchurDestroy(&s->schur));
  if (s->gpoint) {
    ISLocalToGlobalMapping map;
    PetscCall(DMGetLocalToGlobalMapping(s->da, &map));
    PetscCall(ISLocalToGlobalMappingRestoreBlockIndices(map, &s->gpoint));
  }
  PetscCall(MatDestroy(&s->P));
  PetscCall(MatDestroy(&s->A));
  PetscCall(PetscFree(s->pattern));
  PetscCall(VecDestroy(&s->X));
  PetscCall(DMDestroy(&s->da1));
  PetscCall(DMDestroy(&s->da));
  PetscCall(CFFlowDestroy(&s->flow));
  PetscCall(CFMeltingModelDestroy(&s->melting));
  PetscCall(PetscFree(s->rc.corners.psi));
  PetscCall(PetscFree4(s->work_P, s->work_T, s->work_F, s->work_dF));
  PetscCall(PetscFree2(s->row_P, s->row_solidus));
  PetscCall(PetscFree2(s->kcell, s->dkcell));
  PetscCall(PetscFree(*ps));
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadySetConductivityFunction(CFSteady s, CFPointFunction k, void *ctx)
{
  PetscFunctionBeginUser;
  s->rc.kfun = k;
  s->rc.kctx = ctx;
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadySetHeatSource(CFSteady s, CFPointFunction q, void *ctx)
{
  PetscFunctionBeginUser;
  s->rc.source = q;
  s->rc.sctx   = ctx;
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadySetInitialGuess(CFSteady s)
{
  const CFConfig *c = &s->cfg;
  const PetscReal kappa = c->conductivity / (c->mantle_density * c->heat_capacity);
  DMDALocalInfo   info;
  CFCellState   **x;

  PetscFunctionBeginUser;
  PetscCall(DMDAGetLocalInfo(s->da, &info));
  PetscCall(DMDAVecGetArray(s->da, s->X, &x));
  for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
    for (PetscInt i = info.xs; i < info.xs + info.xm; i++) {
      /* half-space cooling of the adiabat at plate age x / U0, offset so the axis is not at age 0 */
      const PetscReal xc = (i + 0.5) * c->dx, z = (j + 0.5) * c->dz, age = (xc + 10.0 * c->dx) / c->half_rate;
      const PetscReal Tad = c->potential_temperature + c->adiabatic_gradient * z;
      x[j][i].T = c->surface_temperature + (Tad - c->surface_temperature) * erf(z / (2.0 * PetscSqrtReal(kappa * age)));
      x[j][i].F = 0.0;
    }
  PetscCall(DMDAVecRestoreArray(s->da, s->X, &x));
  PetscCall(CFDepletionSweep(s, s->X));
  s->plate_guess = PETSC_TRUE;
  PetscFunctionReturn(0);
}

/* One Newton solve from the current solution; the report says how it ended, nothing is raised. */
static PetscErrorCode SolveOnceWith(CFSteady s, Vec Fv, CFSolveReport *r)
{
  PetscFunctionBeginUser;
  PetscCall(CFSchurReset(s->schur));
  s->nonfinite[0] = 0;
  PetscCall(SNESComputeFunction(s->snes, s->X, Fv));
  PetscCall(RaiseNonFinite(s));
  PetscCall(VecNorm(Fv, NORM_2, &r->initial_residual));
  PetscCall(SNESSolve(s->snes, NULL, s->X));
  PetscCall(RaiseNonFinite(s));
  PetscCall(SNESGetConvergedReason(s->snes, &r->reason));
  PetscCall(SNESGetIterationNumber(s->snes, &r->nonlinear_iterations));
  PetscCall(SNESGetLinearSolveIterations(s->snes, &r->linear_iterations));
  PetscCall(SNESComputeFunction(s->snes, s->X, Fv));
  PetscCall(RaiseNonFinite(s));
  PetscCall(VecNorm(Fv, NORM_2, &r->final_residual));
  PetscFunctionReturn(0);
}

/* The residual work vector is freed on the error path too (a NaN stops the solve, CheckFinite). */
static PetscErrorCode SolveOnce(CFSteady s, CFSolveReport *r)
{
  Vec            Fv;
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  s->plate_guess = PETSC_FALSE; /* Newton moves X */
  PetscCall(VecDuplicate(s->X, &Fv));
  ierr = SolveOnceWith(s, Fv, r);
  PetscCall(VecDestroy(&Fv));
  PetscCall(ierr);
  PetscFunctionReturn(0);
}

static void Accumulate(CFSolveReport *total, const CFSolveReport *r)
{
  total->nonlinear_iterations += r->nonlinear_iterations;
  total->linear_iterations += r->linear_iterations;
  total->final_residual = r->final_residual;
  total->reason         = r->reason;
}

/* Newton from a poor guess can stall where hydrothermal cooling switches on.  The fallbacks, in
   order: a fresh cooling-plate guess (unless the solve started from one: Newton would repeat
   itself), then continuation in the Nusselt number from 1 (no hydrothermal cooling) to its
   value in four steps, each solve starting from the last. */
PetscErrorCode CFSteadySolve(CFSteady s, CFSolveReport *r)
{
  PetscReal     t0 = MPI_Wtime();
  PetscBool     fallback = PETSC_TRUE, from_plate = s->plate_guess;
  CFSolveReport once;

  PetscFunctionBeginUser;
  PetscCall(PetscMemzero(r, sizeof(*r)));
  PetscCall(PetscOptionsGetBool(NULL, NULL, "-steady_fallback", &fallback, NULL));
  PetscCall(CFSteadyNewtonSetUp(s));
  PetscCall(SolveOnce(s, &once));
  r->initial_residual = once.initial_residual;
  Accumulate(r, &once);
  if (r->reason <= 0 && fallback && !from_plate) {
    PetscCall(PetscPrintf(s->comm, "steady solve: Newton stopped (%s); retrying from a cooling-plate guess\n", SNESConvergedReasons[r->reason]));
    PetscCall(CFSteadySetInitialGuess(s));
    PetscCall(SolveOnce(s, &once));
    Accumulate(r, &once);
  }
  if (r->reason <= 0 && fallback && s->cfg.nusselt > 1.0) {
    const PetscReal nu = s->cfg.nusselt;
    PetscCall(PetscPrintf(s->comm, "steady solve: Newton stopped (%s); continuation in the hydrothermal Nusselt number\n", SNESConvergedReasons[r->reason]));
    PetscCall(CFSteadySetInitialGuess(s));
    for (PetscInt k = 0; k <= 4; k++) {
      s->cfg.nusselt = 1.0 + (nu - 1.0) * k / 4.0;
      PetscCall(SolveOnce(s, &once));
      Accumulate(r, &once);
      if (once.reason <= 0) break;
    }
    s->cfg.nusselt = nu;
  }
  /* Newton leaves the depletion within the tolerance of max(F_eq, F_up); the sweep makes it
     exactly that for the converged temperature, so cells that carry depletion without melting
     have no round-off melting rate (which post-processing would count as melting). */
  if (r->reason > 0) PetscCall(CFDepletionSweep(s, s->X));
  PetscCall(CFSteadyNewtonRelease(s));
  r->seconds = MPI_Wtime() - t0;
  PetscCheck(r->reason > 0, s->comm, PETSC_ERR_NOT_CONVERGED, "steady solve did not converge: %s after %" PetscInt_FMT " Newton iterations, residual %g K (from %g K)", SNESConvergedReasons[r->reason], r->nonlinear_iterations, (double)r->final_residual, (double)r->initial_residual);
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyGetDM(CFSteady s, DM *da)
{
  PetscFunctionBeginUser;
  *da = s->da;
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyGetScalarDM(CFSteady s, DM *da)
{
  PetscFunctionBeginUser;
  *da = s->da1;
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyGetSolution(CFSteady s, Vec *X)
{
  PetscFunctionBeginUser;
  s->plate_guess = PETSC_FALSE; /* the caller may write it */
  *X = s->X;
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyGetFlow(CFSteady s, CFFlow *flow)
{
  PetscFunctionBeginUser;
  *flow = s->flow;
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyGetMeltingModel(CFSteady s, CFMeltingModel *model)
{
  PetscFunctionBeginUser;
  *model = s->melting;
  PetscFunctionReturn(0);
}

const CFConfig *CFSteadyGetConfig(CFSteady s) { return &s->cfg; }
