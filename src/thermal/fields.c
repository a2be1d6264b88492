/* Fields and integrals derived from the steady solution: for output and the summary. */
#include "steady_impl.h"

PetscErrorCode CFSteadyGetFields(CFSteady s, Vec T, Vec F, Vec Feq, Vec Gamma, Vec k)
{
  DMDALocalInfo info;
  Vec           Xl;
  CFCellState **x;
  PetscScalar **aT = NULL, **aF = NULL, **aE = NULL, **aG = NULL, **aK = NULL;
  PetscInt      n = 0;
  const PetscReal V = s->rc.dx * s->rc.dz;

  PetscFunctionBeginUser;
  PetscCall(DMDAGetLocalInfo(s->da, &info));
  PetscCall(DMGetLocalVector(s->da, &Xl));
  PetscCall(DMGlobalToLocal(s->da, s->X, INSERT_VALUES, Xl));
  PetscCall(DMDAVecGetArrayRead(s->da, Xl, &x));
  PetscCall(CFSteadyEquilibriumMelt(s, &info, (const CFCellState *const *)x));
  if (T) PetscCall(DMDAVecGetArray(s->da1, T, &aT));
  if (F) PetscCall(DMDAVecGetArray(s->da1, F, &aF));
  if (Feq) PetscCall(DMDAVecGetArray(s->da1, Feq, &aE));
  if (Gamma) PetscCall(DMDAVecGetArray(s->da1, Gamma, &aG));
  if (k) PetscCall(DMDAVecGetArray(s->da1, k, &aK));
  for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
    for (PetscInt i = info.xs; i < info.xs + info.xm; i++, n++) {
      PetscReal F_up;
      if (aT) aT[j][i] = x[j][i].T;
      if (aF) aF[j][i] = x[j][i].F;
      if (aE) aE[j][i] = s->work_F[n];
      if (aG) aG[j][i] = CFDepletionMeltingRate(&s->rc, (const CFCellState *const *)x, i, j, &F_up) / V;
      if (aK) aK[j][i] = CFConductivity(&s->rc, (i + 0.5) * s->rc.dx, (j + 0.5) * s->rc.dz, x[j][i].T);
    }
  if (T) PetscCall(DMDAVecRestoreArray(s->da1, T, &aT));
  if (F) PetscCall(DMDAVecRestoreArray(s->da1, F, &aF));
  if (Feq) PetscCall(DMDAVecRestoreArray(s->da1, Feq, &aE));
  if (Gamma) PetscCall(DMDAVecRestoreArray(s->da1, Gamma, &aG));
  if (k) PetscCall(DMDAVecRestoreArray(s->da1, k, &aK));
  PetscCall(DMDAVecRestoreArrayRead(s->da, Xl, &x));
  PetscCall(DMRestoreLocalVector(s->da, &Xl));
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyCrustalThickness(CFSteady s, PetscReal *H_melting, PetscReal *H_side)
{
  DMDALocalInfo info;
  Vec           Xl;
  CFCellState **x;
  PetscReal     local[2] = {0.0, 0.0}, global[2];
  const PetscReal denom = s->rc.rho_crust * CFFlowHalfRate(s->flow);

  PetscFunctionBeginUser;
  PetscCall(DMDAGetLocalInfo(s->da, &info));
  PetscCall(DMGetLocalVector(s->da, &Xl));
  PetscCall(DMGlobalToLocal(s->da, s->X, INSERT_VALUES, Xl));
  PetscCall(DMDAVecGetArrayRead(s->da, Xl, &x));
  for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
    for (PetscInt i = info.xs; i < info.xs + info.xm; i++) {
      PetscReal F_up;
      local[0] += CFDepletionMeltingRate(&s->rc, (const CFCellState *const *)x, i, j, &F_up);
      /* depleted mantle leaving through the far side carries the melt it gave up */
      if (i == info.mx - 1) {
        const PetscReal q = CF_QX(&s->rc.corners, i + 1, j);
        if (q > 0.0) local[1] += s->rc.rho * q * x[j][i].F;
      }
    }
  PetscCall(DMDAVecRestoreArrayRead(s->da, Xl, &x));
  PetscCall(DMRestoreLocalVector(s->da, &Xl));
  PetscCall(MPIU_Allreduce(local, global, 2, MPIU_REAL, MPIU_SUM, s->comm));
  *H_melting = global[0] / denom;
  *H_side    = global[1] / denom;
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyGetPressure(CFSteady s, Vec P)
{
  DMDALocalInfo info;
  PetscScalar **a;

  PetscFunctionBeginUser;
  PetscCall(DMDAGetLocalInfo(s->da1, &info));
  PetscCall(DMDAVecGetArray(s->da1, P, &a));
  for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
    for (PetscInt i = info.xs; i < info.xs + info.xm; i++) a[j][i] = CFPressure(&s->rc, (j + 0.5) * s->rc.dz);
  PetscCall(DMDAVecRestoreArray(s->da1, P, &a));
  PetscFunctionReturn(0);
}
