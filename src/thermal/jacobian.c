/* The steady Jacobian.  The operator is the exact derivative of the residual: the limited
   advection (energy.c), diffusion with the temperature-dependent conductivity, latent heat and
   the active depletion branch; -steady_jacobian split or coloring takes coloured finite
   differences of the residual instead.  The preconditioner (schur.c) is built from a five-point
   approximation: first-order upwind advection and the conductivity frozen (measured in
   DEVELOPERS.md); -steady_jacobian picard assembles that approximation, without the coupling,
   as the operator itself. */
#include "steady_impl.h"

/* First-order upwind advection of cell (i, j), signs as in energy.c. */
static void UpwindAdvection(const CFResidualCtx *rc, PetscInt i, PetscInt j, CFJacRow *r)
{
  const CFCornerPsi *c   = &rc->corners;
  const PetscReal    rcp = rc->rho * rc->cp;
  const PetscReal    qL = CF_QX(c, i, j), qR = CF_QX(c, i + 1, j), qT = CF_QZ(c, i, j), qB = CF_QZ(c, i, j + 1);

  if (i > 0) {
    if (qL >= 0.0) CFJacRowAdd(r, i - 1, j, 0, -rcp * qL);
    else CFJacRowAdd(r, i, j, 0, -rcp * qL);
  }
  if (i + 1 == rc->nx || qR >= 0.0) CFJacRowAdd(r, i, j, 0, rcp * qR);
  else CFJacRowAdd(r, i + 1, j, 0, rcp * qR);
  if (j > 0) {
    if (qT >= 0.0) CFJacRowAdd(r, i, j, 0, rcp * qT);
    else CFJacRowAdd(r, i, j - 1, 0, rcp * qT);
  }
  if (j + 1 < rc->nz) {
    if (qB >= 0.0) CFJacRowAdd(r, i, j + 1, 0, -rcp * qB);
    else CFJacRowAdd(r, i, j, 0, -rcp * qB);
  }
}

/* The conductive term -c H(kP, kQ) (TQ - TP) of neighbour Q = (iq, jq); dk (NULL: conductivity
   frozen) adds the derivative through the harmonic mean. */
static void DiffusionFace(const DMDALocalInfo *info, const CFCellState *const *x, const PetscReal *kcell, const PetscReal *dk, PetscInt i, PetscInt j, PetscInt iq, PetscInt jq, PetscReal c, CFJacRow *r)
{
  const PetscReal kP = KCELL(info, kcell, i, j), kQ = KCELL(info, kcell, iq, jq), H = CFHarmonicMean(kP, kQ);
  PetscReal       dP = c * H, dQ = -c * H;

  if (dk) {
    const PetscReal dT = x[jq][iq].T - x[j][i].T, s2 = (kP + kQ) * (kP + kQ);
    dP -= c * dT * 2.0 * kQ * kQ / s2 * KCELL(info, dk, i, j);
    dQ -= c * dT * 2.0 * kP * kP / s2 * KCELL(info, dk, iq, jq);
  }
  CFJacRowAdd(r, i, j, 0, dP);
  CFJacRowAdd(r, iq, jq, 0, dQ);
}

static void Diffusion(const CFResidualCtx *rc, const DMDALocalInfo *info, const CFCellState *const *x, const PetscReal *kcell, const PetscReal *dk, PetscInt i, PetscInt j, CFJacRow *r)
{
  const PetscReal cx = rc->dz / rc->dx, cz = rc->dx / rc->dz, kP = KCELL(info, kcell, i, j), dkP = dk ? KCELL(info, dk, i, j) : 0.0, TP = x[j][i].T;

  if (i > 0) DiffusionFace(info, x, kcell, dk, i, j, i - 1, j, cx, r);
  if (i + 1 < rc->nx) DiffusionFace(info, x, kcell, dk, i, j, i + 1, j, cx, r);
  if (j > 0) DiffusionFace(info, x, kcell, dk, i, j, i, j - 1, cz, r);
  else CFJacRowAdd(r, i, j, 0, 2.0 * cz * (kP + dkP * (TP - rc->T_surface))); /* half cell to the surface */
  if (j + 1 < rc->nz) DiffusionFace(info, x, kcell, dk, i, j, i, j + 1, cz, r);
  else CFJacRowAdd(r, i, j, 0, 2.0 * cz * (kP - dkP * (rc->T_bottom - TP)));
}

/* Latent heat T dS Gamma V, Gamma V = rho (out_q F_P - in_q F_upstream). */
static void LatentHeat(const CFResidualCtx *rc, const CFCellState *const *x, PetscInt i, PetscInt j, CFJacRow *r)
{
  const CFCornerPsi *c   = &rc->corners;
  const PetscReal    qL = CF_QX(c, i, j), qR = CF_QX(c, i + 1, j), qT = CF_QZ(c, i, j), qB = CF_QZ(c, i, j + 1);
  const PetscReal    TdS = x[j][i].T * rc->entropy_of_fusion * rc->rho;
  PetscReal          out_q = 0.0, F_up, GV;

  if (rc->entropy_of_fusion <= 0.0) return;
  GV = CFDepletionMeltingRate(rc, x, i, j, &F_up);
  CFJacRowAdd(r, i, j, 0, rc->entropy_of_fusion * GV);
  if (qL > 0.0) { if (i > 0) CFJacRowAdd(r, i - 1, j, 1, -TdS * qL); } else out_q -= qL;
  if (qR < 0.0) { if (i + 1 < rc->nx) CFJacRowAdd(r, i + 1, j, 1, TdS * qR); } else out_q += qR;
  if (qB > 0.0) { if (j + 1 < rc->nz) CFJacRowAdd(r, i, j + 1, 1, -TdS * qB); } else out_q -= qB;
  if (qT < 0.0) { if (j > 0) CFJacRowAdd(r, i, j - 1, 1, TdS * qT); } else out_q += qT;
  CFJacRowAdd(r, i, j, 1, TdS * out_q);
}

/* Energy row of cell (i, j), scaled as the residual: exact, or the five-point approximation. */
static void EnergyRow(const CFSteady s, const DMDALocalInfo *info, const CFCellState *const *x, PetscInt i, PetscInt j, PetscBool exact, CFJacRow *r)
{
  const CFResidualCtx *rc = &s->rc;

  if (exact) CFEnergyAdvectionJacobian(rc, x, i, j, r);
  else UpwindAdvection(rc, i, j, r);
  Diffusion(rc, info, x, s->kcell, exact ? s->dkcell : NULL, i, j, r);
  if (exact || s->jacobian != CF_JACOBIAN_PICARD) LatentHeat(rc, x, i, j, r);
  if (exact && rc->source) { /* a verification hook: central difference in T */
    const PetscReal h = 1e-3, xc = (i + 0.5) * rc->dx, zc = (j + 0.5) * rc->dz, T = x[j][i].T;
    CFJacRowAdd(r, i, j, 0, -(rc->source(xc, zc, T + h, rc->sctx) - rc->source(xc, zc, T - h, rc->sctx)) / (2.0 * h) * rc->dx * rc->dz);
  }
  for (PetscInt k = 0; k < CF_JAC_SLOTS; k++) r->s[k] /= rc->energy_scale;
}

/* Depletion row: F_P - max(F_eq(T_P), F_up(F of the upstream neighbours)); exact on its branch. */
void CFSteadyDepletionRow(const CFResidualCtx *rc, const CFCellState *const *x, PetscInt i, PetscInt j, PetscReal Feq, PetscReal dFeq, PetscBool decoupled, CFJacRow *r)
{
  const CFCornerPsi *c = &rc->corners;
  const PetscReal    s = rc->depletion_scale;
  const PetscReal    qL = CF_QX(c, i, j), qR = CF_QX(c, i + 1, j), qT = CF_QZ(c, i, j), qB = CF_QZ(c, i, j + 1);
  PetscReal          F_up, in_q;

  CFJacRowAdd(r, i, j, 1, s);
  (void)CFDepletionMeltingRate(rc, x, i, j, &F_up);
  /* both branches always enter the pattern (one with zeros), so the nonzero structure and its
     symbolic factorization stay fixed as cells start or stop melting */
  {
    const PetscBool eq = (PetscBool)(Feq > F_up); /* a tie (fertile: both 0) takes the transport branch, as a forward difference does */
    in_q               = PetscMax(qL, 0.0) + PetscMax(-qR, 0.0) + PetscMax(qB, 0.0) + PetscMax(-qT, 0.0);
    CFJacRowAdd(r, i, j, 0, (eq && !decoupled) ? -s * dFeq : 0.0);
    if (in_q <= 0.0) return;
    if (i > 0) CFJacRowAdd(r, i - 1, j, 1, (!eq && qL > 0.0) ? -s * qL / in_q : 0.0);
    if (i + 1 < rc->nx) CFJacRowAdd(r, i + 1, j, 1, (!eq && qR < 0.0) ? s * qR / in_q : 0.0);
    if (j + 1 < rc->nz) CFJacRowAdd(r, i, j + 1, 1, (!eq && qB > 0.0) ? -s * qB / in_q : 0.0);
    if (j > 0) CFJacRowAdd(r, i, j - 1, 1, (!eq && qT < 0.0) ? s * qT / in_q : 0.0);
  }
}

void CFSteadyApproximateEnergyRow(const CFSteady s, const DMDALocalInfo *info, const CFCellState *const *x, PetscInt i, PetscInt j, CFJacRow *r) { EnergyRow(s, info, x, i, j, PETSC_FALSE, r); }

PetscErrorCode CFSteadySetRow(CFSteady s, Mat M, PetscBool formed, PetscInt dof, PetscInt c, unsigned short pattern[], CFJacRow *r)
{
  const DMDALocalInfo *o    = &s->owned;
  const PetscInt       row  = ((r->j0 - o->ys) * o->xm + (r->i0 - o->xs)) * dof + c;
  const PetscInt       grow = s->gpoint[(r->j0 - o->gys) * o->gxm + (r->i0 - o->gxs)] * dof + c;
  PetscInt             g[CF_JAC_SLOTS];

  PetscFunctionBeginUser;
  if (!formed) pattern[row] = (unsigned short)r->used;
  PetscCheck(!(r->used & ~(PetscInt)pattern[row]), PETSC_COMM_SELF, PETSC_ERR_PLIB, "Jacobian row of cell (%" PetscInt_FMT ", %" PetscInt_FMT ") has an entry its first assembly did not", r->i0, r->j0);
  CFJacRowPackMask(r, pattern[row]);
  /* the slots follow the global columns within a rank's block; a row that reaches another
     rank's cells is sorted (insertion sort) */
  if (formed && (r->i0 - 2 >= o->xs || o->xs == 0) && (r->i0 + 2 < o->xs + o->xm || o->xs + o->xm == o->mx) && (r->j0 - 2 >= o->ys || o->ys == 0) && (r->j0 + 2 < o->ys + o->ym || o->ys + o->ym == o->my)) {
    PetscCall(MatSetValuesRow(M, grow, r->v));
    PetscFunctionReturn(0);
  }
  for (PetscInt e = 0; e < r->n; e++) {
    const PetscInt    ge = s->gpoint[(r->col[e].j - o->gys) * o->gxm + (r->col[e].i - o->gxs)] * dof + r->col[e].c;
    const PetscScalar ve = r->v[e];
    PetscInt          k  = e;
    for (; k > 0 && g[k - 1] > ge; k--) {
      g[k]    = g[k - 1];
      r->v[k] = r->v[k - 1];
    }
    g[k]    = ge;
    r->v[k] = ve;
  }
  if (formed) PetscCall(MatSetValuesRow(M, grow, r->v));
  else PetscCall(MatSetValues(M, 1, &grow, r->n, g, r->v, INSERT_VALUES));
  PetscFunctionReturn(0);
}

/* The rows of every owned cell into M: exact, or the five-point approximation. */
static PetscErrorCode Assemble(CFSteady s, const DMDALocalInfo *info, const CFCellState *const *x, PetscBool exact, Mat M)
{
  PetscInt      n = 0;
  PetscBool     formed;
  PetscLogEvent event;

  PetscFunctionBeginUser;
  PetscCall(PetscLogEventRegister("CFJacobianRows", 0, &event)); /* an existing name returns its event */
  PetscCall(PetscLogEventBegin(event, 0, 0, 0, 0));
  /* every row inserts its whole pattern (zeros included), so the matrix needs no zeroing */
  PetscCall(MatAssembled(M, &formed));
  for (PetscInt j = info->ys; j < info->ys + info->ym; j++)
    for (PetscInt i = info->xs; i < info->xs + info->xm; i++, n++) {
      CFJacRow r;
      CFJacRowInit(&r, i, j);
      EnergyRow(s, info, x, i, j, exact, &r);
      PetscCall(CFSteadySetRow(s, M, formed, 2, 0, s->pattern, &r));
      CFJacRowInit(&r, i, j);
      CFSteadyDepletionRow(&s->rc, x, i, j, s->work_F[n], s->work_dF[n], (PetscBool)(s->jacobian == CF_JACOBIAN_PICARD && !exact), &r);
      PetscCall(CFSteadySetRow(s, M, formed, 2, 1, s->pattern, &r));
    }
  PetscCall(PetscLogEventEnd(event, 0, 0, 0, 0));
  PetscCall(MatAssemblyBegin(M, MAT_FINAL_ASSEMBLY));
  PetscCall(MatAssemblyEnd(M, MAT_FINAL_ASSEMBLY));
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyFormJacobian(SNES snes, Vec X, Mat J, Mat P, void *ptr)
{
  CFSteady      s = (CFSteady)ptr;
  DM            da;
  DMDALocalInfo info;
  Vec           Xl;
  CFCellState **x;

  PetscFunctionBeginUser;
  PetscCall(SNESGetDM(snes, &da));
  PetscCall(DMDAGetLocalInfo(da, &info));
  PetscCall(DMGetLocalVector(da, &Xl));
  PetscCall(DMGlobalToLocal(da, X, INSERT_VALUES, Xl));
  PetscCall(DMDAVecGetArrayRead(da, Xl, &x));
  CFSteadyConductivityPatch(s, &info, (const CFCellState *const *)x, (PetscBool)(s->jacobian == CF_JACOBIAN_ANALYTIC));
  PetscCall(CFSteadyEquilibriumMelt(s, &info, (const CFCellState *const *)x));
  if (s->jacobian == CF_JACOBIAN_PICARD) PetscCall(Assemble(s, &info, (const CFCellState *const *)x, PETSC_FALSE, P));
  else {
    PetscCall(CFSchurAssemble(s, &info, (const CFCellState *const *)x));
    if (s->jacobian == CF_JACOBIAN_ANALYTIC) PetscCall(Assemble(s, &info, (const CFCellState *const *)x, PETSC_TRUE, J));
  }
  PetscCall(DMDAVecRestoreArrayRead(da, Xl, &x));
  PetscCall(DMRestoreLocalVector(da, &Xl));
  /* or coloured finite differences of the full residual (the DM supplies the colouring) */
  if (s->jacobian == CF_JACOBIAN_SPLIT) PetscCall(SNESComputeJacobianDefaultColor(snes, X, J, J, NULL));
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyCreateMatrix(DM da, const PetscInt d[], const PetscInt o[], Mat *M)
{
  PetscInt               mx, my, dof, xm, ym, gxs, gys, gxm, gym;
  ISLocalToGlobalMapping map;

  PetscFunctionBeginUser;
  PetscCall(DMDAGetInfo(da, NULL, &mx, &my, NULL, NULL, NULL, NULL, &dof, NULL, NULL, NULL, NULL, NULL));
  PetscCall(DMDAGetCorners(da, NULL, NULL, NULL, &xm, &ym, NULL));
  PetscCall(DMDAGetGhostCorners(da, &gxs, &gys, NULL, &gxm, &gym, NULL));
  PetscCall(MatCreate(PetscObjectComm((PetscObject)da), M));
  PetscCall(MatSetSizes(*M, xm * ym * dof, xm * ym * dof, mx * my * dof, mx * my * dof));
  PetscCall(MatSetBlockSize(*M, dof)); /* as the DMDA's map; the counts stay per point row */
  PetscCall(MatSetType(*M, MATAIJ));
  PetscCall(MatSeqAIJSetPreallocation(*M, 0, d));
  PetscCall(MatMPIAIJSetPreallocation(*M, 0, d, 0, o));
  PetscCall(DMGetLocalToGlobalMapping(da, &map));
  PetscCall(MatSetLocalToGlobalMapping(*M, map, map));
  {
    const PetscInt dims[2] = {gxm, gym}, starts[2] = {gxs, gys};
    PetscCall(MatSetStencil(*M, 2, dims, starts, dof));
  }
  PetscFunctionReturn(0);
}

/* The analytic Jacobian's matrix, preallocated exactly: a temperature row couples the
   temperatures of the width-2 star (limited advection) and the depletions of the five-point star
   (latent heat); a depletion row its five-point depletions and its own temperature.  The DMDA's
   own preallocation couples both fields over the width-2 star, 18 per row against 10 on
   average, and its DMCreateMatrix took 0.11 s at 1 km even with preallocation skipped
   (measured in DEVELOPERS.md). */
static PetscErrorCode CreateAnalyticJacobian(CFSteady s, Mat *A)
{
  const DMDALocalInfo *o = &s->owned;
  PetscInt            *d, *f, r = 0;

  PetscFunctionBeginUser;
  PetscCall(PetscMalloc2(2 * s->nowned, &d, 2 * s->nowned, &f));
  for (PetscInt j = o->ys; j < o->ys + o->ym; j++)
    for (PetscInt i = o->xs; i < o->xs + o->xm; i++, r += 2) {
      static const PetscInt di[9] = {0, -1, 1, 0, 0, -2, 2, 0, 0}, dj[9] = {0, 0, 0, -1, 1, 0, 0, -2, 2};
      d[r] = f[r] = d[r + 1] = f[r + 1] = 0;
      for (PetscInt k = 0; k < 9; k++) {
        const PetscInt  ci = i + di[k], cj = j + dj[k];
        const PetscBool in = (PetscBool)(ci >= 0 && ci < o->mx && cj >= 0 && cj < o->my);
        const PetscBool own = (PetscBool)(ci >= o->xs && ci < o->xs + o->xm && cj >= o->ys && cj < o->ys + o->ym);
        if (!in) continue;
        /* temperature row: its temperature over all nine, its depletion over the first five;
           depletion row: the depletion over the first five */
        (own ? d : f)[r] += (k < 5) ? 2 : 1;
        if (k < 5) (own ? d : f)[r + 1] += 1;
      }
      d[r + 1] += 1; /* the depletion row's own temperature */
    }
  PetscCall(CFSteadyCreateMatrix(s->da, d, f, A));
  PetscCall(PetscFree2(d, f));
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyNewtonSetUp(CFSteady s)
{
  KSP ksp;
  PC  pc;

  PetscFunctionBeginUser;
  if (s->jacobian == CF_JACOBIAN_COLORING) PetscFunctionReturn(0); /* the SNES builds its own from the DM */
  PetscCall(PetscMalloc1(2 * s->nowned, &s->pattern));
  if (s->jacobian == CF_JACOBIAN_PICARD) { /* preallocated as the analytic Jacobian, whose pattern holds its own */
    PetscCall(CreateAnalyticJacobian(s, &s->P));
    PetscCall(SNESSetJacobian(s->snes, s->P, s->P, CFSteadyFormJacobian, s));
    PetscFunctionReturn(0);
  }
  /* the analytic Jacobian inserts its whole pattern every time (zeros included), so the pattern
     forms at the first assembly; the coloured differences need it in place before */
  if (s->jacobian == CF_JACOBIAN_ANALYTIC) PetscCall(CreateAnalyticJacobian(s, &s->A));
  else PetscCall(DMCreateMatrix(s->da, &s->A));
  PetscCall(SNESSetJacobian(s->snes, s->A, s->A, CFSteadyFormJacobian, s));
  PetscCall(CFSchurCreate(s, &s->schur));
  PetscCall(SNESGetKSP(s->snes, &ksp));
  PetscCall(KSPGetPC(ksp, &pc));
  PetscCall(PCShellSetContext(pc, s->schur));
  PetscFunctionReturn(0);
}

PetscErrorCode CFSteadyNewtonRelease(CFSteady s)
{
  PetscFunctionBeginUser;
  /* the SNES drops its references to the matrices and its (Krylov) work vectors */
  PetscCall(SNESReset(s->snes));
  PetscCall(MatDestroy(&s->A));
  PetscCall(MatDestroy(&s->P));
  PetscCall(PetscFree(s->pattern));
  PetscCall(CFSchurDestroy(&s->schur));
  PetscFunctionReturn(0);
}
