/* The steady Jacobian: the operator by coloured finite differences of the full residual, and for
   the preconditioner an assembled approximation: first-order upwind advection, diffusion with the
   conductivity frozen, the latent-heat coupling, and the depletion branch that is active.  It has
   the five-point stencil, so its sparse LU is far cheaper than that of the second-order
   operator (measured in DEVELOPERS.md). */
#include "steady_impl.h"

typedef struct {
  MatStencil  col[10];
  PetscScalar v[10];
  PetscInt    n;
} Row;

static void Add(Row *r, PetscInt i, PetscInt j, PetscInt c, PetscScalar v)
{
  for (PetscInt k = 0; k < r->n; k++)
    if (r->col[k].i == i && r->col[k].j == j && r->col[k].c == c) {
      r->v[k] += v;
      return;
    }
  r->col[r->n].i = i;
  r->col[r->n].j = j;
  r->col[r->n].k = 0;
  r->col[r->n].c = c;
  r->v[r->n++]   = v;
}

/* Energy row of cell (i, j): d(residual)/d(T, F) of the neighbours, before scaling. */
static void EnergyRow(const CFResidualCtx *rc, const DMDALocalInfo *info, const CFCellState *const *x, const PetscReal *kcell, PetscInt i, PetscInt j, PetscBool decoupled, Row *r)
{
  const CFCornerPsi *c = &rc->corners;
  const PetscReal    rcp = rc->rho * rc->cp, dx = rc->dx, dz = rc->dz, kP = KCELL(info, kcell, i, j);
  const PetscReal    qL = CF_QX(c, i, j), qR = CF_QX(c, i + 1, j), qT = CF_QZ(c, i, j), qB = CF_QZ(c, i, j + 1);
  const PetscInt     nx = rc->nx, nz = rc->nz;
  PetscReal          F_up, GV;

  /* first-order upwind advection, signs as in energy.c */
  if (i > 0) {
    if (qL >= 0.0) Add(r, i - 1, j, 0, -rcp * qL);
    else Add(r, i, j, 0, -rcp * qL);
  }
  if (i + 1 == nx || qR >= 0.0) Add(r, i, j, 0, rcp * qR);
  else Add(r, i + 1, j, 0, rcp * qR);
  if (j > 0) {
    if (qT >= 0.0) Add(r, i, j, 0, rcp * qT);
    else Add(r, i, j - 1, 0, rcp * qT);
  }
  if (j + 1 < nz) {
    if (qB >= 0.0) Add(r, i, j + 1, 0, -rcp * qB);
    else Add(r, i, j, 0, -rcp * qB);
  }
  /* diffusion, conductivity frozen */
  if (i > 0) {
    const PetscReal a = CFHarmonicMean(KCELL(info, kcell, i - 1, j), kP) * dz / dx;
    Add(r, i, j, 0, a);
    Add(r, i - 1, j, 0, -a);
  }
  if (i + 1 < nx) {
    const PetscReal a = CFHarmonicMean(kP, KCELL(info, kcell, i + 1, j)) * dz / dx;
    Add(r, i, j, 0, a);
    Add(r, i + 1, j, 0, -a);
  }
  if (j > 0) {
    const PetscReal a = CFHarmonicMean(KCELL(info, kcell, i, j - 1), kP) * dx / dz;
    Add(r, i, j, 0, a);
    Add(r, i, j - 1, 0, -a);
  } else Add(r, i, j, 0, 2.0 * kP * dx / dz);
  if (j + 1 < nz) {
    const PetscReal a = CFHarmonicMean(kP, KCELL(info, kcell, i, j + 1)) * dx / dz;
    Add(r, i, j, 0, a);
    Add(r, i, j + 1, 0, -a);
  } else Add(r, i, j, 0, 2.0 * kP * dx / dz);
  /* latent heat T dS Gamma V, Gamma V = rho (out_q F_P - in_q F_upstream) */
  if (rc->entropy_of_fusion > 0.0 && !decoupled) {
    const PetscReal TdS = x[j][i].T * rc->entropy_of_fusion * rc->rho;
    PetscReal       out_q = 0.0;
    GV = CFDepletionMeltingRate(rc, x, i, j, &F_up);
    Add(r, i, j, 0, rc->entropy_of_fusion * GV);
    if (qL > 0.0) { if (i > 0) Add(r, i - 1, j, 1, -TdS * qL); } else out_q -= qL;
    if (qR < 0.0) { if (i + 1 < nx) Add(r, i + 1, j, 1, TdS * qR); } else out_q += qR;
    if (qB > 0.0) { if (j + 1 < nz) Add(r, i, j + 1, 1, -TdS * qB); } else out_q -= qB;
    if (qT < 0.0) { if (j > 0) Add(r, i, j - 1, 1, TdS * qT); } else out_q += qT;
    Add(r, i, j, 1, TdS * out_q);
  }
  for (PetscInt k = 0; k < r->n; k++) r->v[k] /= rc->energy_scale;
}

/* Depletion row: F_P - max(F_eq(T_P), F_up(F of the upstream neighbours)). */
static void DepletionRow(const CFResidualCtx *rc, const CFCellState *const *x, PetscInt i, PetscInt j, PetscReal Feq, PetscReal dFeq, PetscBool decoupled, Row *r)
{
  const CFCornerPsi *c = &rc->corners;
  const PetscReal    s = rc->depletion_scale;
  const PetscReal    qL = CF_QX(c, i, j), qR = CF_QX(c, i + 1, j), qT = CF_QZ(c, i, j), qB = CF_QZ(c, i, j + 1);
  PetscReal          F_up, in_q;

  Add(r, i, j, 1, s);
  (void)CFDepletionMeltingRate(rc, x, i, j, &F_up);
  /* both branches always enter the pattern (one with zeros), so the nonzero structure and its
     symbolic factorization stay fixed as cells start or stop melting */
  {
    const PetscBool eq = (PetscBool)(Feq >= F_up);
    in_q               = PetscMax(qL, 0.0) + PetscMax(-qR, 0.0) + PetscMax(qB, 0.0) + PetscMax(-qT, 0.0);
    Add(r, i, j, 0, (eq && !decoupled) ? -s * dFeq : 0.0);
    if (in_q <= 0.0) return;
    if (i > 0) Add(r, i - 1, j, 1, (!eq && qL > 0.0) ? -s * qL / in_q : 0.0);
    if (i + 1 < rc->nx) Add(r, i + 1, j, 1, (!eq && qR < 0.0) ? s * qR / in_q : 0.0);
    if (j + 1 < rc->nz) Add(r, i, j + 1, 1, (!eq && qB > 0.0) ? -s * qB / in_q : 0.0);
    if (j > 0) Add(r, i, j - 1, 1, (!eq && qT < 0.0) ? s * qT / in_q : 0.0);
  }
}

PetscErrorCode CFSteadyFormJacobian(SNES snes, Vec X, Mat J, Mat P, void *ptr)
{
  CFSteady      s = (CFSteady)ptr;
  DM            da;
  DMDALocalInfo info;
  Vec           Xl;
  CFCellState **x;
  PetscInt      n = 0;

  PetscFunctionBeginUser;
  PetscCall(SNESGetDM(snes, &da));
  PetscCall(DMDAGetLocalInfo(da, &info));
  PetscCall(DMGetLocalVector(da, &Xl));
  PetscCall(DMGlobalToLocal(da, X, INSERT_VALUES, Xl));
  PetscCall(DMDAVecGetArrayRead(da, Xl, &x));
  CFSteadyConductivityPatch(s, &info, (const CFCellState *const *)x);
  PetscCall(CFSteadyEquilibriumMelt(s, &info, (const CFCellState *const *)x));
  PetscCall(MatZeroEntries(P));
  for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
    for (PetscInt i = info.xs; i < info.xs + info.xm; i++, n++) {
      MatStencil row;
      Row        r = {.n = 0};
      row.i = i;
      row.j = j;
      row.k = 0;
      row.c = 0;
      EnergyRow(&s->rc, &info, (const CFCellState *const *)x, s->kcell, i, j, s->decoupled, &r);
      PetscCall(MatSetValuesStencil(P, 1, &row, r.n, r.col, r.v, INSERT_VALUES));
      r.n   = 0;
      row.c = 1;
      DepletionRow(&s->rc, (const CFCellState *const *)x, i, j, s->work_F[n], s->work_dF[n], s->decoupled, &r);
      PetscCall(MatSetValuesStencil(P, 1, &row, r.n, r.col, r.v, INSERT_VALUES));
    }
  PetscCall(DMDAVecRestoreArrayRead(da, Xl, &x));
  PetscCall(DMRestoreLocalVector(da, &Xl));
  PetscCall(MatAssemblyBegin(P, MAT_FINAL_ASSEMBLY));
  PetscCall(MatAssemblyEnd(P, MAT_FINAL_ASSEMBLY));
  /* the operator: coloured finite differences of the full residual (the DM supplies the colouring) */
  if (J != P) PetscCall(SNESComputeJacobianDefaultColor(snes, X, J, J, NULL));
  PetscFunctionReturn(0);
}
