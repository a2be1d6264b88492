/* Cell-level pieces of the post-processor: corner-flow face fluxes, the melting test, isotherm
   depths in a column and bilinear sampling of the cell fields. */
#include <math.h>
#include <crustforge/flow.h>
#include "post_impl.h"

PetscErrorCode CFPostCornerPsi(const CFRunData *run, PetscReal **psi)
{
  CFFlow flow;

  PetscFunctionBeginUser;
  PetscCall(CFFlowCreate(&run->cfg, &flow));
  PetscCall(PetscMalloc1((run->nx + 1) * (run->nz + 1), psi));
  /* the solver's own evaluation (I dx, J dz), so fluxes match its fluxes bit for bit */
  PetscCall(CFFlowCornerStreamFunction(flow, run->dx, run->dz, 0, run->nx + 1, 0, run->nz + 1, *psi));
  PetscCall(CFFlowDestroy(&flow));
  PetscFunctionReturn(0);
}

void CFPostCellFluxes(const CFRunData *run, const PetscReal psi[], PetscInt i, PetscInt j, CFPostFaceFluxes *q)
{
  const PetscInt n = run->nx + 1;
#define PSI(I, J) psi[(J) * n + (I)]
  q->left   = PSI(i, j + 1) - PSI(i, j);
  q->right  = PSI(i + 1, j + 1) - PSI(i + 1, j);
  q->top    = PSI(i + 1, j) - PSI(i, j);
  q->bottom = PSI(i + 1, j + 1) - PSI(i, j + 1);
#undef PSI
}

PetscErrorCode CFPostMeltingCells(const CFRunData *run, const PetscReal psi[], PetscBool melting[])
{
  const PetscReal V = run->dx * run->dz, rho = run->cfg.mantle_density;

  PetscFunctionBeginUser;
  for (PetscInt j = 0; j < run->nz; j++)
    for (PetscInt i = 0; i < run->nx; i++) {
      const PetscReal  G = CF_POST_AT(run, CF_FIELD_MELTING_RATE, i, j), F = CF_POST_AT(run, CF_FIELD_DEPLETION, i, j);
      CFPostFaceFluxes q;
      PetscReal        out;

      CFPostCellFluxes(run, psi, i, j, &q);
      out                      = PetscMax(q.right, 0.0) + PetscMax(-q.left, 0.0) + PetscMax(q.top, 0.0) + PetscMax(-q.bottom, 0.0);
      melting[j * run->nx + i] = (PetscBool)(G > 0.0 && G * V > CF_POST_MELTING_TOL * rho * out * F);
    }
  PetscFunctionReturn(0);
}

PetscReal CFPostIsothermDepth(const PetscReal T[], PetscInt stride, PetscInt nz, PetscReal dz, PetscReal T_surface, PetscReal T_iso)
{
  PetscReal z_prev = 0.0, T_prev = T_surface;

  if (T_surface >= T_iso) return 0.0;
  for (PetscInt j = 0; j < nz; j++) {
    const PetscReal z = (j + 0.5) * dz, Tj = T[j * stride];
    if (Tj >= T_iso) return z_prev + (z - z_prev) * (T_iso - T_prev) / (Tj - T_prev);
    z_prev = z;
    T_prev = Tj;
  }
  return NAN;
}

/* Index of the lower of the two cell centres around s (in cells, centres at k + 0.5), clamped,
   and the weight of the upper one. */
static void Bracket(PetscReal s, PetscInt n, PetscInt *k, PetscReal *w)
{
  PetscReal c = s - 0.5;

  if (n == 1 || c <= 0.0) { *k = 0; *w = 0.0; return; }
  if (c >= n - 1) { *k = n - 2; *w = 1.0; return; }
  *k = (PetscInt)PetscFloorReal(c);
  if (*k > n - 2) *k = n - 2;
  *w = c - *k;
}

PetscReal CFPostSample(const CFRunData *run, const PetscReal f[], PetscReal x, PetscReal z)
{
  PetscInt  i, j, i1, j1;
  PetscReal wx, wz;

  Bracket(x / run->dx, run->nx, &i, &wx);
  Bracket(z / run->dz, run->nz, &j, &wz);
  i1 = PetscMin(i + 1, run->nx - 1);
  j1 = PetscMin(j + 1, run->nz - 1);
  return (1 - wz) * ((1 - wx) * f[j * run->nx + i] + wx * f[j * run->nx + i1]) + wz * ((1 - wx) * f[j1 * run->nx + i] + wx * f[j1 * run->nx + i1]);
}

PetscErrorCode CFPostShareError(MPI_Comm comm, PetscErrorCode ierr)
{
  PetscMPIInt rank;
  int         root = (int)ierr;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  PetscCallMPI(MPI_Bcast(&root, 1, MPI_INT, 0, comm));
  if (!root) PetscFunctionReturn(0);
  if (!rank) PetscCall(ierr);
  SETERRQ(PETSC_COMM_SELF, (PetscErrorCode)root, "post-processing failed on rank 0");
}
