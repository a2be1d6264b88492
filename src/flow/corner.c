/* Isoviscous corner flow under rigid plates of zero thickness (Batchelor 1967, wedge flows;
   for ridges Reid & Jackson 1981, Spiegelman & McKenzie 1987). */
#include <math.h>
#include <crustforge/flow.h>

struct _p_CFFlow {
  PetscReal half_rate; /* U0, m/s */
};

PetscErrorCode CFFlowCreate(const CFConfig *cfg, CFFlow *flow)
{
  PetscFunctionBeginUser;
  PetscCall(PetscNew(flow));
  (*flow)->half_rate = cfg->half_rate;
  PetscFunctionReturn(0);
}

PetscErrorCode CFFlowDestroy(CFFlow *flow)
{
  PetscFunctionBeginUser;
  PetscCall(PetscFree(*flow));
  PetscFunctionReturn(0);
}

PetscErrorCode CFFlowSetHalfRate(CFFlow flow, PetscReal half_rate)
{
  PetscFunctionBeginUser;
  PetscCheck(half_rate > 0 && PetscIsNormalReal(half_rate), PETSC_COMM_SELF, PETSC_ERR_USER_INPUT, "plate speed %g m/s is not positive", (double)half_rate);
  flow->half_rate = half_rate;
  PetscFunctionReturn(0);
}

PetscReal CFFlowHalfRate(CFFlow flow) { return flow->half_rate; }

/* atan2 keeps the surface (z = 0, psi = 0) and the axis (x = 0, psi = 0) exact. */
PetscReal CFFlowStreamFunction(CFFlow flow, PetscReal x, PetscReal z) { return 2.0 * flow->half_rate / PETSC_PI * z * atan2(x, z); }

void CFFlowVelocity(CFFlow flow, PetscReal x, PetscReal z, PetscReal *u, PetscReal *w_up)
{
  const PetscReal c = 2.0 * flow->half_rate / PETSC_PI, r2 = x * x + z * z;

  if (r2 == 0.0) { /* the corner itself: the plate moves, the axis does not; take the limit along the axis */
    *u    = 0.0;
    *w_up = c;
    return;
  }
  *u    = c * (atan2(x, z) - x * z / r2);
  *w_up = c * z * z / r2;
}

PetscErrorCode CFFlowCornerStreamFunction(CFFlow flow, PetscReal dx, PetscReal dz, PetscInt I0, PetscInt nI, PetscInt J0, PetscInt nJ, PetscReal psi[])
{
  PetscFunctionBeginUser;
  for (PetscInt b = 0; b < nJ; b++)
    for (PetscInt a = 0; a < nI; a++) psi[b * nI + a] = CFFlowStreamFunction(flow, (I0 + a) * dx, (J0 + b) * dz);
  PetscFunctionReturn(0);
}

PetscErrorCode CFFlowCellFields(CFFlow flow, DM da, PetscReal dx, PetscReal dz, Vec u, Vec w_up, Vec psi)
{
  DMDALocalInfo info;
  PetscScalar **au = NULL, **aw = NULL, **ap = NULL;

  PetscFunctionBeginUser;
  PetscCall(DMDAGetLocalInfo(da, &info));
  if (u) PetscCall(DMDAVecGetArray(da, u, &au));
  if (w_up) PetscCall(DMDAVecGetArray(da, w_up, &aw));
  if (psi) PetscCall(DMDAVecGetArray(da, psi, &ap));
  for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
    for (PetscInt i = info.xs; i < info.xs + info.xm; i++) {
      const PetscReal x = (i + 0.5) * dx, z = (j + 0.5) * dz;
      PetscReal       vu, vw;
      CFFlowVelocity(flow, x, z, &vu, &vw);
      if (au) au[j][i] = vu;
      if (aw) aw[j][i] = vw;
      if (ap) ap[j][i] = CFFlowStreamFunction(flow, x, z);
    }
  if (u) PetscCall(DMDAVecRestoreArray(da, u, &au));
  if (w_up) PetscCall(DMDAVecRestoreArray(da, w_up, &aw));
  if (psi) PetscCall(DMDAVecRestoreArray(da, psi, &ap));
  PetscFunctionReturn(0);
}
