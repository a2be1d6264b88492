/* The transient coupled problem on the steady solver's grid, integrated by PETSc's TS.
   Residual of each cell (F(t, X, Xdot) = 0, DMDATSSetIFunctionLocal):
     energy:    [rho cp V dT/dt + (steady cell balance, latent heat T dS Gamma V)] / energy_scale
     depletion: min(Gamma V / (rho (V / (theta dt) + sum_out(q))), F - F_eq(P, T)) * depletion_scale,
                Gamma V / rho = V dF/dt + sum_out(q) F - sum_in(q F_upstream)
   The depletion condition is a complementarity: either the solid does not melt (Gamma = 0,
   F >= F_eq) or it is at equilibrium (F = F_eq, Gamma >= 0).  With dF/dt = 0 it is the steady
   F = max(F_eq, F_up), so a steady state is a fixed point of every step.  Both methods are
   implicit one-step methods (stable at any Courant number), so the state after a step is X, t and
   the next dt alone: that is what makes restart exact. */
#include <math.h>
#include <string.h>
#include <crustforge/units.h>
#include "transient_impl.h"

#define CF_SDIRK2 "cf_sdirk2"

/* Two-stage, stiffly accurate, L-stable SDIRK of order 2 (Alexander 1977, SIAM J. Numer. Anal.
   14, 1006), gamma = 1 - 1/sqrt(2); embedded first-order completion b^ = (1, 0) for the error
   estimate (derived: sum b^ = 1, sum b^ c = gamma != 1/2).  The explicit part is unused (the
   method runs fully implicit) but must be a valid tableau. */
static PetscErrorCode RegisterSDIRK2(void)
{
  static PetscBool done = PETSC_FALSE; /* registration is per process, not model state */
  const PetscReal  g    = 1.0 - 1.0 / PetscSqrtReal(2.0);
  const PetscReal  At[4] = {g, 0.0, 1.0 - g, g}, bt[2] = {1.0 - g, g}, ct[2] = {g, 1.0};
  const PetscReal  A[4] = {0.0, 0.0, 1.0, 0.0}, b[2] = {0.5, 0.5}, c[2] = {0.0, 1.0};
  const PetscReal  be[2] = {1.0, 0.0};

  PetscFunctionBeginUser;
  if (done) PetscFunctionReturn(0);
  PetscCall(TSARKIMEXRegister(CF_SDIRK2, 2, 2, At, bt, ct, A, b, c, be, be, 1, bt, b));
  done = PETSC_TRUE;
  PetscFunctionReturn(0);
}

PetscErrorCode CFTransientSetParameters(CFTransient tr, PetscReal t)
{
  CFResidualCtx  *rc = &tr->s->rc;
  const PetscReal U  = CFHistoryValue(&tr->rate, t), f = U / tr->U_ref;
  const PetscInt  n  = rc->corners.nI * rc->corners.nJ;

  PetscFunctionBeginUser;
  PetscCall(CFFlowSetHalfRate(tr->s->flow, U));
  for (PetscInt k = 0; k < n; k++) rc->corners.psi[k] = tr->psi_ref[k] * f;
  rc->T_bottom = CFHistoryValue(&tr->temperature, t) + rc->adiabatic_gradient * tr->cfg.depth;
  PetscFunctionReturn(0);
}

/* Sum of the outflow volume fluxes of cell (i, j) (m2/s). */
static PetscReal OutFlux(const CFCornerPsi *c, PetscInt i, PetscInt j)
{
  const PetscReal qL = CF_QX(c, i, j), qR = CF_QX(c, i + 1, j), qT = CF_QZ(c, i, j), qB = CF_QZ(c, i, j + 1);
  return PetscMax(-qL, 0.0) + PetscMax(qR, 0.0) + PetscMax(-qB, 0.0) + PetscMax(qT, 0.0);
}

static PetscErrorCode IFunctionLocal(DMDALocalInfo *info, PetscReal t, CFCellState **x, CFCellState **xdot, CFCellState **f, void *ptr)
{
  CFTransient          tr = (CFTransient)ptr;
  CFSteady             s  = tr->s;
  const CFResidualCtx *rc = &s->rc;
  const PetscReal      V  = rc->dx * rc->dz, rcpV = rc->rho * rc->cp * V / rc->energy_scale;
  PetscInt             n  = 0;
  PetscReal            dt;

  PetscFunctionBeginUser;
  /* the stage's dXdot/dX = 1/(theta dt) scales the melting rate like the solid's own F, so the
     two arguments of min() are in the same units; with dt -> infinity this is the steady row */
  PetscCall(TSGetTimeStep(tr->ts, &dt));
  dt *= tr->theta;
  PetscCall(CFTransientSetParameters(tr, t));
  CFSteadyConductivityPatch(s, info, (const CFCellState *const *)x, PETSC_FALSE);
  PetscCall(CFSteadyEquilibriumMelt(s, info, (const CFCellState *const *)x));
  for (PetscInt j = info->ys; j < info->ys + info->ym; j++)
    for (PetscInt i = info->xs; i < info->xs + info->xm; i++, n++) {
      PetscReal F_up, GV = CFDepletionMeltingRate(rc, (const CFCellState *const *)x, i, j, &F_up) + rc->rho * V * xdot[j][i].F;
      f[j][i].T = CFEnergyResidualCell(rc, info, (const CFCellState *const *)x, s->kcell, i, j, GV) + rcpV * xdot[j][i].T;
      f[j][i].F = PetscMin(GV / (rc->rho * (V / dt + OutFlux(&rc->corners, i, j))), x[j][i].F - s->work_F[n]) * rc->depletion_scale;
    }
  PetscCall(PetscLogFlops(220.0 * info->xm * info->ym));
  PetscFunctionReturn(0);
}

PetscErrorCode CFTransientMeltProduction(CFTransient tr, Vec Xold, Vec X, PetscReal dt, PetscReal *melt)
{
  CFSteady      s = tr->s;
  DMDALocalInfo info;
  Vec           Xl;
  CFCellState **x, **xo;
  PetscReal     local = 0.0;
  const PetscReal V = s->rc.dx * s->rc.dz;

  PetscFunctionBeginUser;
  PetscCall(DMDAGetLocalInfo(s->da, &info));
  PetscCall(DMGetLocalVector(s->da, &Xl));
  PetscCall(DMGlobalToLocal(s->da, X, INSERT_VALUES, Xl));
  PetscCall(DMDAVecGetArrayRead(s->da, Xl, &x));
  PetscCall(DMDAVecGetArrayRead(s->da, Xold, &xo));
  for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
    for (PetscInt i = info.xs; i < info.xs + info.xm; i++) {
      PetscReal F_up;
      local += CFDepletionMeltingRate(&s->rc, (const CFCellState *const *)x, i, j, &F_up) + s->rc.rho * V * (x[j][i].F - xo[j][i].F) / dt;
    }
  PetscCall(DMDAVecRestoreArrayRead(s->da, Xold, &xo));
  PetscCall(DMDAVecRestoreArrayRead(s->da, Xl, &x));
  PetscCall(DMRestoreLocalVector(s->da, &Xl));
  PetscCall(MPIU_Allreduce(&local, melt, 1, MPIU_REAL, MPIU_SUM, tr->comm));
  PetscFunctionReturn(0);
}

/* The stage Jacobian dF/dX + shift dF/dXdot by coloured finite differences of
   G(W) = F(t, W, Xdot + shift (W - X)), with a colouring of our own whose base value F(X) is
   always computed afresh: the step's Jacobian then depends on the step's input alone, which exact
   restart needs (PETSc's TSComputeIJacobianDefaultColor gave results that differed by an ulp
   after a restart: measured). */
typedef struct {
  TS        ts;
  PetscReal t, shift;
  Vec       X, Xdot, Wdot;
} StageCtx;

static PetscErrorCode StageFunction(void *unused, Vec W, Vec G, void *ptr)
{
  StageCtx *c = (StageCtx *)ptr;

  PetscFunctionBeginUser;
  (void)unused;
  PetscCall(VecWAXPY(c->Wdot, -1.0, c->X, W));
  PetscCall(VecAYPX(c->Wdot, c->shift, c->Xdot));
  PetscCall(TSComputeIFunction(c->ts, c->t, W, c->Wdot, G, PETSC_FALSE));
  PetscFunctionReturn(0);
}

static PetscErrorCode IJacobian(TS ts, PetscReal t, Vec X, Vec Xdot, PetscReal shift, Mat J, Mat P, void *ptr)
{
  CFTransient tr = (CFTransient)ptr;
  StageCtx    c  = {ts, t, shift, X, Xdot, NULL};

  PetscFunctionBeginUser;
  (void)J;
  if (!tr->color) {
    ISColoring iscoloring;
    PetscCall(DMCreateColoring(tr->da, IS_COLORING_GLOBAL, &iscoloring));
    PetscCall(MatFDColoringCreate(P, iscoloring, &tr->color));
    PetscCall(MatFDColoringSetFunction(tr->color, (PetscErrorCode(*)(void))(void (*)(void))StageFunction, NULL));
    PetscCall(MatFDColoringSetFromOptions(tr->color));
    PetscCall(MatFDColoringSetUp(P, iscoloring, tr->color));
    PetscCall(ISColoringDestroy(&iscoloring));
  }
  PetscCall(VecDuplicate(X, &c.Wdot));
  PetscCall(MatFDColoringSetFunction(tr->color, (PetscErrorCode(*)(void))(void (*)(void))StageFunction, &c));
  PetscCall(MatFDColoringApply(P, tr->color, X, &c));
  PetscCall(VecDestroy(&c.Wdot));
  PetscFunctionReturn(0);
}

/* Created only after any steady solve: the TS's SNES takes over the residual of the DM. */
PetscErrorCode CFTransientSetUpTS(CFTransient tr)
{
  const CFConfig *cfg = &tr->cfg;
  SNES            snes;
  KSP             ksp;
  PC              pc;
  TSAdapt         adapt;
  Vec             atol;
  PetscBool       sdirk2 = (PetscBool)!strcmp(cfg->time_method, "sdirk2");

  PetscFunctionBeginUser;
  if (tr->ts) PetscFunctionReturn(0);
  PetscCheck(sdirk2 || !strcmp(cfg->time_method, "beuler"), tr->comm, PETSC_ERR_USER_INPUT, "time.method: '%s' is not a method (available: beuler, sdirk2)", cfg->time_method);
  PetscCheck(sdirk2 || !cfg->time_adaptive, tr->comm, PETSC_ERR_USER_INPUT, "time.adaptive: needs time.method sdirk2 (backward Euler has no embedded error estimate)");
  PetscCall(TSCreate(tr->comm, &tr->ts));
  /* a DM of its own with the same layout: the steady solver's DM keeps its SNES residual, which
     would otherwise answer some of the TS's function evaluations (measured: line searches failed) */
  PetscCall(DMDACreateCompatibleDMDA(tr->s->da, 2, &tr->da));
  PetscCall(TSSetDM(tr->ts, tr->da));
  PetscCall(TSSetProblemType(tr->ts, TS_NONLINEAR));
  PetscCall(DMDATSSetIFunctionLocal(tr->da, INSERT_VALUES, (DMDATSIFunctionLocal)IFunctionLocal, tr));
  /* the Jacobian by coloured finite differences (the DM supplies the colouring), factored by LU */
  PetscCall(DMCreateMatrix(tr->da, &tr->J));
  PetscCall(TSSetIJacobian(tr->ts, tr->J, tr->J, IJacobian, tr));
  tr->theta = sdirk2 ? 1.0 - 1.0 / PetscSqrtReal(2.0) : 1.0; /* diagonal of the implicit tableau */
  if (sdirk2) {
    PetscCall(RegisterSDIRK2());
    PetscCall(TSSetType(tr->ts, TSARKIMEX));
    PetscCall(TSARKIMEXSetType(tr->ts, CF_SDIRK2));
    PetscCall(TSARKIMEXSetFullyImplicit(tr->ts, PETSC_TRUE));
  } else PetscCall(TSSetType(tr->ts, TSBEULER));
  PetscCall(TSSetTime(tr->ts, 0.0));
  PetscCall(TSSetTimeStep(tr->ts, CFMyrToS(cfg->time_step_myr)));
  PetscCall(TSSetMaxTime(tr->ts, tr->t_end));
  PetscCall(TSSetExactFinalTime(tr->ts, TS_EXACTFINALTIME_MATCHSTEP));
  PetscCall(TSGetAdapt(tr->ts, &adapt));
  if (cfg->time_adaptive) {
    /* local error in the max norm: tolerance K on temperature, the same fraction of the
       adiabat-surface difference on depletion */
    PetscScalar *a;
    PetscInt     n;
    PetscCall(TSAdaptSetType(adapt, TSADAPTBASIC));
    PetscCall(DMCreateGlobalVector(tr->s->da, &atol));
    PetscCall(VecGetLocalSize(atol, &n));
    PetscCall(VecGetArray(atol, &a));
    for (PetscInt k = 0; k < n; k += 2) {
      a[k]     = cfg->time_tolerance;
      a[k + 1] = cfg->time_tolerance / tr->s->rc.depletion_scale;
    }
    PetscCall(VecRestoreArray(atol, &a));
    PetscCall(TSSetTolerances(tr->ts, PETSC_DECIDE, atol, 0.0, NULL));
    PetscCall(VecDestroy(&atol));
    PetscCall(TSAdaptSetStepLimits(adapt, CFMyrToS(1e-6), tr->t_end));
  } else PetscCall(TSAdaptSetType(adapt, TSADAPTNONE));
  PetscCall(TSGetSNES(tr->ts, &snes));
  /* scaled residuals are in K: 1e-7 K over the grid is far below any time-discretization error */
  PetscCall(SNESSetTolerances(snes, 1e-7, 1e-9, 0.0, 30, PETSC_DEFAULT));
  PetscCall(SNESGetKSP(snes, &ksp));
  PetscCall(KSPSetType(ksp, KSPPREONLY));
  PetscCall(KSPGetPC(ksp, &pc));
  PetscCall(PCSetType(pc, PCLU));
  PetscCall(PCFactorSetMatSolverType(pc, MATSOLVERMUMPS));
  PetscCall(TSSetMaxSNESFailures(tr->ts, -1));
  PetscCall(TSSetOptionsPrefix(tr->ts, "transient_"));
  PetscCall(TSSetFromOptions(tr->ts));
  PetscCall(TSSetSolution(tr->ts, tr->s->X));
  PetscCall(TSSetUp(tr->ts));
  PetscFunctionReturn(0);
}

PetscErrorCode CFTransientCreate(MPI_Comm comm, const CFConfig *cfg, CFTransient *out)
{
  CFTransient tr;
  PetscInt    n;

  PetscFunctionBeginUser;
  PetscCheck(cfg->time_end_myr > 0, comm, PETSC_ERR_USER_INPUT, "time.end: a transient run needs time.end > 0 Myr");
  PetscCall(PetscNew(&tr));
  tr->comm  = comm;
  tr->cfg   = *cfg;
  tr->t_end = CFMyrToS(cfg->time_end_myr);
  PetscCall(CFHistoryFromList(comm, "history.full_spreading_rate", &cfg->history_full_spreading_rate, cfg->half_rate, 0.0, 300.0, PETSC_TRUE, CFHalfRateFromFullMmPerYr, &tr->rate));
  PetscCall(CFHistoryFromList(comm, "history.potential_temperature", &cfg->history_potential_temperature, cfg->potential_temperature, 1000.0, 1800.0, PETSC_FALSE, CFCelsiusToKelvin, &tr->temperature));
  /* the steady object is built with the time-0 parameters, so its steady solve is the steady
     state of the initial parameters */
  tr->cfg.half_rate             = CFHistoryValue(&tr->rate, 0.0);
  tr->cfg.potential_temperature = CFHistoryValue(&tr->temperature, 0.0);
  PetscCall(CFSteadyCreate(comm, &tr->cfg, &tr->s));
  tr->U_ref = tr->cfg.half_rate;
  n         = tr->s->rc.corners.nI * tr->s->rc.corners.nJ;
  PetscCall(PetscMalloc1(n, &tr->psi_ref));
  PetscCall(PetscArraycpy(tr->psi_ref, tr->s->rc.corners.psi, n));
  PetscCall(VecDuplicate(tr->s->X, &tr->Xprev));
  /* check the time keys now, before any solve */
  PetscCheck(!strcmp(cfg->time_method, "sdirk2") || !strcmp(cfg->time_method, "beuler"), comm, PETSC_ERR_USER_INPUT, "time.method: '%s' is not a method (available: beuler, sdirk2)", cfg->time_method);
  PetscCheck(!strcmp(cfg->time_start, "steady") || !strcmp(cfg->time_start, "startup"), comm, PETSC_ERR_USER_INPUT, "time.start: '%s' is not a start (available: steady, startup; a checkpoint is continued with crustforge resume)", cfg->time_start);
  *out = tr;
  PetscFunctionReturn(0);
}

PetscErrorCode CFTransientDestroy(CFTransient *ptr)
{
  CFTransient tr = *ptr;

  PetscFunctionBeginUser;
  if (!tr) PetscFunctionReturn(0);
  PetscCall(TSDestroy(&tr->ts));
  PetscCall(MatFDColoringDestroy(&tr->color));
  PetscCall(MatDestroy(&tr->J));
  PetscCall(DMDestroy(&tr->da));
  PetscCall(VecDestroy(&tr->Xprev));
  PetscCall(PetscFree(tr->psi_ref));
  PetscCall(CFCrustRecordDestroy(&tr->rec));
  PetscCall(CFSteadyDestroy(&tr->s));
  PetscCall(PetscFree(*ptr));
  PetscFunctionReturn(0);
}

PetscErrorCode CFTransientSetInitialState(CFTransient tr)
{
  const CFConfig *c = &tr->cfg;

  PetscFunctionBeginUser;
  PetscCall(CFTransientSetParameters(tr, 0.0));
  if (!strcmp(c->time_start, "steady")) {
    PetscInt      levels, its;
    CFSolveReport rep;
    PetscCall(CFSteadySequenceInitialGuess(tr->s, &levels, &its));
    PetscCall(CFSteadySolve(tr->s, &rep));
  } else { /* startup */
    DMDALocalInfo info;
    CFCellState **x;
    PetscCall(DMDAGetLocalInfo(tr->s->da, &info));
    PetscCall(DMDAVecGetArray(tr->s->da, tr->s->X, &x));
    for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
      for (PetscInt i = info.xs; i < info.xs + info.xm; i++) {
        const PetscReal z = (j + 0.5) * c->dz, Tad = c->potential_temperature + c->adiabatic_gradient * z;
        x[j][i].T = c->surface_temperature + (Tad - c->surface_temperature) * erf(z / c->time_lid_thickness);
        x[j][i].F = 0.0;
      }
    PetscCall(DMDAVecRestoreArray(tr->s->da, tr->s->X, &x));
    PetscCall(CFDepletionSweep(tr->s, tr->s->X)); /* the solid starts in equilibrium: no crust yet */
  }
  PetscCall(CFTransientSetUpTS(tr));
  PetscFunctionReturn(0);
}

PetscBool CFTransientFinished(CFTransient tr)
{
  PetscReal t = 0.0;
  if (tr->ts) (void)TSGetTime(tr->ts, &t);
  return (PetscBool)(t >= tr->t_end * (1.0 - 1e-12));
}

PetscErrorCode CFTransientStep(CFTransient tr)
{
  PetscReal          t0, t1, dt, melt;
  TSConvergedReason  reason;

  PetscFunctionBeginUser;
  PetscCheck(tr->ts, tr->comm, PETSC_ERR_ORDER, "CFTransientSetInitialState or CFTransientCheckpointLoad first");
  PetscCall(TSGetTime(tr->ts, &t0));
  PetscCall(TSGetTimeStep(tr->ts, &dt));
  /* the last step ends at time.end exactly (a step within a part in 1e9 of it is stretched) */
  if (t0 + dt * (1.0 + 1e-9) >= tr->t_end) PetscCall(TSSetTimeStep(tr->ts, tr->t_end - t0));
  PetscCall(VecCopy(tr->s->X, tr->Xprev));
  PetscCall(TSStep(tr->ts));
  PetscCall(TSGetConvergedReason(tr->ts, &reason));
  PetscCheck(reason >= 0, tr->comm, PETSC_ERR_NOT_CONVERGED, "time step from %.6g Myr did not converge: %s", (double)CFSToMyr(t0), TSConvergedReasons[reason]);
  PetscCall(TSGetTime(tr->ts, &t1));
  PetscCall(CFTransientSetParameters(tr, t1));
  PetscCall(CFTransientMeltProduction(tr, tr->Xprev, tr->s->X, t1 - t0, &melt));
  PetscCall(CFCrustRecordAppend(&tr->rec, t1, t1 - t0, melt, CFHistoryIntegral(&tr->rate, t0, t1) / (t1 - t0)));
  PetscFunctionReturn(0);
}

PetscErrorCode CFTransientGetTime(CFTransient tr, PetscReal *t, PetscInt *step, PetscReal *dt_next)
{
  PetscFunctionBeginUser;
  PetscCheck(tr->ts, tr->comm, PETSC_ERR_ORDER, "CFTransientSetInitialState or CFTransientCheckpointLoad first");
  if (t) PetscCall(TSGetTime(tr->ts, t));
  if (step) PetscCall(TSGetStepNumber(tr->ts, step));
  if (dt_next) PetscCall(TSGetTimeStep(tr->ts, dt_next));
  PetscFunctionReturn(0);
}

PetscErrorCode CFTransientGetSteady(CFTransient tr, CFSteady *s)
{
  PetscFunctionBeginUser;
  *s = tr->s;
  PetscFunctionReturn(0);
}

PetscErrorCode CFTransientHistories(CFTransient tr, PetscReal t, PetscReal *U, PetscReal *Tp)
{
  PetscFunctionBeginUser;
  if (U) *U = CFHistoryValue(&tr->rate, t);
  if (Tp) *Tp = CFHistoryValue(&tr->temperature, t);
  PetscFunctionReturn(0);
}
