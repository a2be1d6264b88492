/* The preconditioner of the coupled Newton step (a PCSHELL): the depletion is eliminated first.
   Its linearised rows are the identity minus upstream transport (or minus dF_eq/dT where the
   cell melts), lower triangular in upstream order, so one sweep bottom-up and axis-outward
   solves them exactly (on each rank; across ranks the upstream values are dropped).  What is
   left is a Schur complement in temperature alone, approximated by the five-point, first-order
   heat equation in which latent heat enters the heat capacity of melting cells,
     S = P_TT - P_TF diag(P_FF)^-1 P_FT,
   a scalar advection-diffusion operator that gets one V-cycle of algebraic multigrid (hypre
   BoomerAMG, options prefix -steady_temperature_).  Then the depletion again from the new
   temperature.  Measured in DEVELOPERS.md. */
#include "steady_impl.h"

struct _p_CFSchur {
  Mat        S;            /* the Schur complement approximation */
  PC         amg;
  Vec        b, t;         /* right side and solution of the temperature step */
  PetscInt   xm, ym, n;    /* owned block */
  PetscBool  reuse;        /* keep the multigrid hierarchy while the Krylov solver stays fast */
  PetscBool  built;
  PetscInt   its_built;    /* Krylov iterations of the first solve with the hierarchy, -1 unknown */
  PetscReal *fw, *tf, *ft; /* per owned cell: depletion row on F (5 slots), energy row on F (5 slots), depletion row on T */
  unsigned short *pattern; /* slots of each row of S at its first assembly (CFSteadySetRow) */
};

/* Slot of neighbour (ci, cj) of cell (i, j): the cell, left, right, above, below. */
static inline PetscInt Slot(PetscInt i, PetscInt j, PetscInt ci, PetscInt cj) { return ci < i ? 1 : ci > i ? 2 : cj < j ? 3 : cj > j ? 4 : 0; }

/* Owned index of slot k of owned cell n at (li, lj) within the block, or -1 off the block. */
static inline PetscInt Neighbour(const CFSchur c, PetscInt n, PetscInt li, PetscInt lj, PetscInt k)
{
  switch (k) {
  case 0: return n;
  case 1: return li > 0 ? n - 1 : -1;
  case 2: return li + 1 < c->xm ? n + 1 : -1;
  case 3: return lj > 0 ? n - c->xm : -1;
  default: return lj + 1 < c->ym ? n + c->xm : -1;
  }
}

PetscErrorCode CFSchurCreate(CFSteady s, CFSchur *out)
{
  CFSchur c;

  PetscFunctionBeginUser;
  PetscCall(PetscNew(&c));
  c->xm  = s->owned.xm;
  c->ym  = s->owned.ym;
  c->n   = s->nowned;
  PetscCall(PetscMalloc4(5 * c->n, &c->fw, 5 * c->n, &c->tf, c->n, &c->ft, c->n, &c->pattern));
  { /* the five-point star, exactly; every assembly inserts all of it */
    const DMDALocalInfo *o = &s->owned;
    PetscInt            *d, *f, n = 0;
    PetscCall(PetscMalloc2(c->n, &d, c->n, &f));
    for (PetscInt j = o->ys; j < o->ys + o->ym; j++)
      for (PetscInt i = o->xs; i < o->xs + o->xm; i++, n++) {
        d[n] = 1 + (i > o->xs) + (i + 1 < o->xs + o->xm) + (j > o->ys) + (j + 1 < o->ys + o->ym);
        f[n] = (i == o->xs && i > 0) + (i + 1 == o->xs + o->xm && i + 1 < o->mx) + (j == o->ys && j > 0) + (j + 1 == o->ys + o->ym && j + 1 < o->my);
      }
    PetscCall(CFSteadyCreateMatrix(s->da1, d, f, &c->S)); /* the solver's scalar layout */
    PetscCall(PetscFree2(d, f));
  }
  PetscCall(DMCreateGlobalVector(s->da1, &c->b));
  PetscCall(VecDuplicate(c->b, &c->t));
  PetscCall(PCCreate(s->comm, &c->amg));
  PetscCall(PCSetType(c->amg, PCHYPRE));
  PetscCall(PCSetOptionsPrefix(c->amg, "steady_temperature_"));
  PetscCall(PCSetFromOptions(c->amg));
  c->reuse = PETSC_TRUE;
  PetscOptionsBegin(s->comm, "steady_", "Steady coupled solver", "crustforge");
  PetscCall(PetscOptionsBool("-amg_reuse", "keep the BoomerAMG hierarchy of the temperature step across Newton steps until the Krylov solver needs twice the iterations it did with it fresh", NULL, c->reuse, &c->reuse, NULL));
  PetscOptionsEnd();
  *out = c;
  PetscFunctionReturn(0);
}

PetscErrorCode CFSchurDestroy(CFSchur *pc)
{
  CFSchur c = *pc;

  PetscFunctionBeginUser;
  if (!c) PetscFunctionReturn(0);
  PetscCall(PCDestroy(&c->amg));
  PetscCall(VecDestroy(&c->b));
  PetscCall(VecDestroy(&c->t));
  PetscCall(MatDestroy(&c->S));
  PetscCall(PetscFree4(c->fw, c->tf, c->ft, c->pattern));
  PetscCall(PetscFree(*pc));
  PetscFunctionReturn(0);
}

/* Building the hierarchy costs as much as several V-cycles, and the operator changes little
   between Newton steps (the melting region moves by a cell or so): rebuild only for a new solve,
   or once the Krylov solver needs twice the iterations it did with a fresh one (measured in
   DEVELOPERS.md). */
static PetscErrorCode NeedsRebuild(CFSteady s, PetscBool *rebuild)
{
  CFSchur  c   = s->schur;
  PetscInt its = 0;
  KSP      ksp;

  PetscFunctionBeginUser;
  PetscCall(SNESGetKSP(s->snes, &ksp));
  if (c->built) PetscCall(KSPGetIterationNumber(ksp, &its));
  if (c->built && c->its_built < 0) c->its_built = its;
  *rebuild = (PetscBool)(!c->reuse || !c->built || its > 2 * PetscMax(c->its_built, 5));
  PetscFunctionReturn(0);
}

PetscErrorCode CFSchurAssemble(CFSteady s, const DMDALocalInfo *info, const CFCellState *const *x)
{
  CFSchur       c = s->schur;
  PetscInt      n = 0;
  PetscBool     rebuild = PETSC_TRUE, formed;
  PetscLogEvent event;

  PetscFunctionBeginUser;
  PetscCall(PetscLogEventRegister("CFSchurRows", 0, &event)); /* an existing name returns its event */
  PetscCall(PetscLogEventBegin(event, 0, 0, 0, 0));
  PetscCall(NeedsRebuild(s, &rebuild));
  PetscCall(MatAssembled(c->S, &formed));
  /* the depletion rows first: the temperature rows need their neighbours' */
  for (PetscInt j = info->ys; j < info->ys + info->ym; j++)
    for (PetscInt i = info->xs; i < info->xs + info->xm; i++, n++) {
      CFJacRow r;
      CFJacRowInit(&r, i, j);
      CFSteadyDepletionRow(&s->rc, x, i, j, s->work_F[n], s->work_dF[n], PETSC_FALSE, &r);
      CFJacRowPack(&r);
      for (PetscInt k = 0; k < 5; k++) c->fw[5 * n + k] = 0.0;
      c->ft[n] = 0.0;
      for (PetscInt e = 0; e < r.n; e++) {
        if (r.col[e].c == 1) c->fw[5 * n + Slot(i, j, r.col[e].i, r.col[e].j)] = r.v[e];
        else c->ft[n] = r.v[e];
      }
    }
  /* the coupling of the energy rows to the depletion always (the sweeps use it); S itself
     only for a new hierarchy, since a kept one goes on with the copy hypre took at its set-up */
  n = 0; /* every row inserts its whole pattern: no zeroing needed */
  for (PetscInt j = info->ys; j < info->ys + info->ym; j++)
    for (PetscInt i = info->xs; i < info->xs + info->xm; i++, n++) {
      CFJacRow r, t;
      CFJacRowInit(&r, i, j);
      CFJacRowInit(&t, i, j);
      CFSteadyApproximateEnergyRow(s, info, x, i, j, &r);
      CFJacRowPack(&r);
      for (PetscInt k = 0; k < 5; k++) c->tf[5 * n + k] = 0.0;
      for (PetscInt e = 0; e < r.n; e++) {
        const PetscInt k = Slot(i, j, r.col[e].i, r.col[e].j);
        if (r.col[e].c == 0) {
          if (rebuild) CFJacRowAdd(&t, r.col[e].i, r.col[e].j, 0, r.v[e]);
        } else {
          /* dF_m = -(ft_m / fw_m) dT_m where m melts: folded into the temperature column */
          const PetscInt m = Neighbour(c, n, i - info->xs, j - info->ys, k);
          c->tf[5 * n + k] = r.v[e];
          if (rebuild && m >= 0) CFJacRowAdd(&t, r.col[e].i, r.col[e].j, 0, -r.v[e] * c->ft[m] / c->fw[5 * m]);
        }
      }
      if (rebuild) PetscCall(CFSteadySetRow(s, c->S, formed, 1, 0, c->pattern, &t));
    }
  PetscCall(PetscLogEventEnd(event, 0, 0, 0, 0));
  if (!rebuild) PetscFunctionReturn(0);
  PetscCall(MatAssemblyBegin(c->S, MAT_FINAL_ASSEMBLY));
  PetscCall(MatAssemblyEnd(c->S, MAT_FINAL_ASSEMBLY));
  PetscCall(PCSetReusePreconditioner(c->amg, PETSC_FALSE));
  PetscCall(PCSetOperators(c->amg, c->S, c->S));
  PetscCall(PCSetUp(c->amg));
  PetscCall(PCSetReusePreconditioner(c->amg, c->reuse));
  c->built     = PETSC_TRUE;
  c->its_built = -1;
  PetscFunctionReturn(0);
}

PetscErrorCode CFSchurReset(CFSchur c)
{
  PetscFunctionBeginUser;
  if (c) c->built = PETSC_FALSE;
  PetscFunctionReturn(0);
}

/* y_F from fw y_F = rhs (rhs_n = r_F[n] - ft_n t_n), in upstream order: rows bottom-up, each from
   the axis outward; every neighbour value read is either already final or (downstream) carries a
   zero coefficient. */
static void Sweep(const CFSchur c, const PetscScalar *r, const PetscScalar *t, PetscScalar *z)
{
  const PetscInt xm = c->xm, ym = c->ym;

  for (PetscInt n = 0; n < c->n; n++) z[2 * n + 1] = 0.0;
  for (PetscInt lj = ym - 1; lj >= 0; lj--)
    for (PetscInt li = 0; li < xm; li++) {
      const PetscInt   n   = lj * xm + li;
      const PetscReal *w   = &c->fw[5 * n];
      PetscScalar      acc = r[2 * n + 1] - (t ? c->ft[n] * t[n] : 0.0);
      if (li > 0) acc -= w[1] * z[2 * (n - 1) + 1];
      if (li + 1 < xm) acc -= w[2] * z[2 * (n + 1) + 1];
      if (lj > 0) acc -= w[3] * z[2 * (n - xm) + 1];
      if (lj + 1 < ym) acc -= w[4] * z[2 * (n + xm) + 1];
      z[2 * n + 1] = acc / w[0];
    }
}

PetscErrorCode CFSchurApply(PC pc, Vec r, Vec z)
{
  CFSchur            c;
  const PetscScalar *rr, *tt;
  PetscScalar       *zz, *bb;

  PetscFunctionBeginUser;
  PetscCall(PCShellGetContext(pc, &c));
  PetscCall(VecGetArrayRead(r, &rr));
  PetscCall(VecGetArray(z, &zz));
  /* depletion with no temperature change, then the temperature's right side without it */
  Sweep(c, rr, NULL, zz);
  PetscCall(VecGetArray(c->b, &bb));
  for (PetscInt lj = 0, n = 0; lj < c->ym; lj++)
    for (PetscInt li = 0; li < c->xm; li++, n++) {
      const PetscReal *w   = &c->tf[5 * n];
      PetscScalar      acc = rr[2 * n] - w[0] * zz[2 * n + 1];
      if (li > 0) acc -= w[1] * zz[2 * (n - 1) + 1];
      if (li + 1 < c->xm) acc -= w[2] * zz[2 * (n + 1) + 1];
      if (lj > 0) acc -= w[3] * zz[2 * (n - c->xm) + 1];
      if (lj + 1 < c->ym) acc -= w[4] * zz[2 * (n + c->xm) + 1];
      bb[n] = acc;
    }
  PetscCall(VecRestoreArray(c->b, &bb));
  PetscCall(PCApply(c->amg, c->b, c->t));
  PetscCall(VecGetArrayRead(c->t, &tt));
  for (PetscInt n = 0; n < c->n; n++) zz[2 * n] = tt[n];
  Sweep(c, rr, tt, zz);
  PetscCall(VecRestoreArrayRead(c->t, &tt));
  PetscCall(VecRestoreArray(z, &zz));
  PetscCall(VecRestoreArrayRead(r, &rr));
  PetscFunctionReturn(0);
}
