/* Depletion of the solid and the melting rate (DESIGN 2.4).  Melting is irreversible: the solid
   carries its extent of melting F_d with it and melts further only where the equilibrium melt
   fraction exceeds what arrives from upstream:
     F_up = sum_in(q F_upstream) / sum_in(q),  F_d = max(F_eq, F_up),
     Gamma V = rho (sum_out(q) F_d - sum_in(q F_upstream)) >= 0.
   Fertile mantle (F = 0) enters through the bottom. */
#include "../thermal/steady_impl.h"

PetscReal CFDepletionMeltingRate(const CFResidualCtx *rc, const CFCellState *const *x, PetscInt i, PetscInt j, PetscReal *F_up)
{
  const CFCornerPsi *c  = &rc->corners;
  const PetscReal    qL = CF_QX(c, i, j), qR = CF_QX(c, i + 1, j), qT = CF_QZ(c, i, j), qB = CF_QZ(c, i, j + 1);
  PetscReal          in_q = 0.0, in_qF = 0.0, out_q = 0.0;

  /* The signs give the upstream side of each face; a neighbour outside the domain is fertile. */
  if (qL > 0.0) { in_q += qL; in_qF += qL * (i > 0 ? x[j][i - 1].F : 0.0); } else out_q -= qL;
  if (qR < 0.0) { in_q -= qR; in_qF -= qR * (i + 1 < rc->nx ? x[j][i + 1].F : 0.0); } else out_q += qR;
  if (qB > 0.0) { in_q += qB; in_qF += qB * (j + 1 < rc->nz ? x[j + 1][i].F : 0.0); } else out_q -= qB;
  if (qT < 0.0) { in_q -= qT; in_qF -= qT * (j > 0 ? x[j - 1][i].F : 0.0); } else out_q += qT;
  *F_up = in_q > 0.0 ? in_qF / in_q : 0.0;
  return rc->rho * (out_q * x[j][i].F - in_qF);
}

PetscErrorCode CFDepletionSweep(CFSteady s, Vec X)
{
  DM            da = s->da;
  DMDALocalInfo info;
  Vec           Xl;
  CFCellState **x;
  PetscMPIInt   changed;
  PetscInt      sweeps = 0;
  PetscLogEvent event;

  PetscFunctionBeginUser;
  PetscCall(PetscLogEventRegister("CFDepletionSweep", 0, &event)); /* an existing name returns its event */
  PetscCall(PetscLogEventBegin(event, 0, 0, 0, 0));
  PetscCall(DMDAGetLocalInfo(da, &info));
  PetscCall(DMGetLocalVector(da, &Xl));
  PetscCall(DMGlobalToLocal(da, X, INSERT_VALUES, Xl));
  PetscCall(DMDAVecGetArrayRead(da, Xl, &x));
  PetscCall(CFSteadyEquilibriumMelt(s, &info, (const CFCellState *const *)x));
  PetscCall(DMDAVecRestoreArrayRead(da, Xl, &x));
  /* Within a rank one pass in upstream order (bottom to top, axis outward) is exact; across ranks
     the pass repeats with fresh ghosts until no value changes, at most px + pz times. */
  do {
    PetscMPIInt local = 0;
    PetscCall(DMGlobalToLocal(da, X, INSERT_VALUES, Xl));
    PetscCall(DMDAVecGetArray(da, Xl, &x));
    for (PetscInt j = info.ys + info.ym - 1; j >= info.ys; j--)
      for (PetscInt i = info.xs; i < info.xs + info.xm; i++) {
        PetscReal F_up, Fnew;
        (void)CFDepletionMeltingRate(&s->rc, (const CFCellState *const *)x, i, j, &F_up);
        Fnew = PetscMax(s->work_F[(j - info.ys) * info.xm + (i - info.xs)], F_up);
        if (Fnew != x[j][i].F) local = 1;
        x[j][i].F = Fnew;
      }
    PetscCall(DMDAVecRestoreArray(da, Xl, &x));
    PetscCall(DMLocalToGlobal(da, Xl, INSERT_VALUES, X));
    PetscCall(MPIU_Allreduce(&local, &changed, 1, MPI_INT, MPI_MAX, s->comm));
    sweeps++;
    PetscCheck(sweeps <= info.mx + info.my + 2, s->comm, PETSC_ERR_PLIB, "depletion sweep did not settle after %" PetscInt_FMT " passes: the flow has a cycle", sweeps);
  } while (changed);
  PetscCall(DMRestoreLocalVector(da, &Xl));
  PetscCall(PetscLogEventEnd(event, 0, 0, 0, 0));
  PetscFunctionReturn(0);
}
