/* Private to the steady solver: the object and the pieces the residual is built from. */
#ifndef CRUSTFORGE_STEADY_IMPL_H
#define CRUSTFORGE_STEADY_IMPL_H

#include <assert.h>
#include <crustforge/steady.h>

/* Corner stream function over a rank's ghosted patch; face fluxes are its differences. */
typedef struct {
  PetscReal *psi;
  PetscInt   I0, J0, nI, nJ;
} CFCornerPsi;

#define CF_PSI(c, a, b) ((c)->psi[((b) - (c)->J0) * (c)->nI + ((a) - (c)->I0)])
/* Volume fluxes (m2/s) of cell (i, j): through the face at x = I dx (+x), and through the face
   at z = J dz (upward, -z). */
#define CF_QX(c, a, j) (CF_PSI(c, a, (j) + 1) - CF_PSI(c, a, j))
#define CF_QZ(c, i, b) (CF_PSI(c, (i) + 1, b) - CF_PSI(c, i, b))

/* Cell (i, j) of an array over a rank's ghosted patch (the conductivity kcell). */
#define KCELL(info, kc, i, j) ((kc)[((j) - (info)->gys) * (info)->gxm + ((i) - (info)->gxs)])

/* Face conductivity between two cells. */
static inline PetscReal CFHarmonicMean(PetscReal a, PetscReal b) { return 2.0 * a * b / (a + b); }

/* One assembled Jacobian row being built around its cell (i0, j0).  Values accumulate by slot,
   one for each column a row can have: the temperatures of the width-2 star and the depletions of
   the five-point star, numbered in the grid's row-major order (z, then x, then field) as the
   matrix stores them, so adding is an index and no search, and CFJacRowPack lists the slots
   added to, in order, as DMDA stencils (col, v, n): a first assembly then appends instead of
   shifting every entry of the row. */
#define CF_JAC_SLOTS 14
_Static_assert(CF_JAC_SLOTS <= 16, "a row's slots are recorded in 16 bits (CFSteadySetRow)");
typedef struct {
  PetscInt    i0, j0;
  PetscScalar s[CF_JAC_SLOTS];
  PetscInt    used; /* bit k: slot k was added to */
  MatStencil  col[CF_JAC_SLOTS];
  PetscScalar v[CF_JAC_SLOTS];
  PetscInt    n;
} CFJacRow;

/* slot -> offset (dj, di) and field, and [dj + 2][di + 2][field] -> slot (-1: none) */
static const PetscInt    CFJacSlotDJ[CF_JAC_SLOTS] = {-2, -1, -1, 0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 2};
static const PetscInt    CFJacSlotDI[CF_JAC_SLOTS] = {0, 0, 0, -2, -1, -1, 0, 0, 1, 1, 2, 0, 0, 0};
static const PetscInt    CFJacSlotC[CF_JAC_SLOTS]  = {0, 0, 1, 0, 0, 1, 0, 1, 0, 1, 0, 0, 1, 0};
static const signed char CFJacSlotOf[5][5][2]      = {
  {{-1, -1}, {-1, -1}, {0, -1}, {-1, -1}, {-1, -1}},
  {{-1, -1}, {-1, -1}, {1, 2}, {-1, -1}, {-1, -1}},
  {{3, -1}, {4, 5}, {6, 7}, {8, 9}, {10, -1}},
  {{-1, -1}, {-1, -1}, {11, 12}, {-1, -1}, {-1, -1}},
  {{-1, -1}, {-1, -1}, {13, -1}, {-1, -1}, {-1, -1}},
};

static inline void CFJacRowInit(CFJacRow *r, PetscInt i, PetscInt j)
{
  r->i0   = i;
  r->j0   = j;
  r->used = 0;
  r->n    = 0;
  for (PetscInt k = 0; k < CF_JAC_SLOTS; k++) r->s[k] = 0.0;
}

static inline void CFJacRowAdd(CFJacRow *r, PetscInt i, PetscInt j, PetscInt c, PetscScalar v)
{
  const PetscInt k = CFJacSlotOf[j - r->j0 + 2][i - r->i0 + 2][c];
  assert(k >= 0); /* a column outside the stencil is a bug in the caller */
  r->s[k] += v;
  r->used |= (PetscInt)1 << k;
}

/* Lists the slots of mask (a bit per slot) in order, zeros included. */
static inline void CFJacRowPackMask(CFJacRow *r, PetscInt mask)
{
  r->n = 0;
  for (PetscInt k = 0; k < CF_JAC_SLOTS; k++)
    if (mask >> k & 1) {
      r->col[r->n].i = r->i0 + CFJacSlotDI[k];
      r->col[r->n].j = r->j0 + CFJacSlotDJ[k];
      r->col[r->n].k = 0;
      r->col[r->n].c = CFJacSlotC[k];
      r->v[r->n++]   = r->s[k];
    }
}

static inline void CFJacRowPack(CFJacRow *r) { CFJacRowPackMask(r, r->used); }

/* What the cell residuals need, in SI. */
typedef struct {
  PetscInt        nx, nz;
  PetscReal       dx, dz;
  PetscReal       rho, cp, rho_crust;
  PetscReal       adiabatic_gradient;       /* K/m */
  PetscReal       entropy_of_fusion;        /* J kg-1 K-1 */
  PetscReal       T_surface, T_bottom;      /* K */
  PetscReal       gravity;
  PetscReal       energy_scale;             /* W/m per K: residuals are reported in K */
  PetscReal       depletion_scale;          /* K per unit melt fraction */
  const CFConfig *cfg;
  CFCornerPsi     corners;
  CFPointFunction kfun, source;
  void           *kctx, *sctx;
} CFResidualCtx;

/* The kinds of -steady_jacobian, in the order of their names in steady.c. */
typedef enum {
  CF_JACOBIAN_ANALYTIC, /* the analytic Jacobian, preconditioned by schur.c */
  CF_JACOBIAN_SPLIT,    /* coloured differences as the operator, the same preconditioner */
  CF_JACOBIAN_COLORING, /* coloured differences factored directly */
  CF_JACOBIAN_PICARD    /* the first-order approximation without coupling: outer iterations */
} CFSteadyJacobian;

/* The preconditioner of the coupled Newton step (schur.c). */
typedef struct _p_CFSchur *CFSchur;

struct _p_CFSteady {
  MPI_Comm       comm;
  CFConfig       cfg;
  DM             da, da1; /* dof 2 (T, F) and dof 1 with the same layout */
  SNES           snes;
  Vec            X;
  PetscBool      plate_guess; /* X is CFSteadySetInitialGuess's, unchanged (anything that writes X clears it) */
  Mat            A, P; /* Jacobian; P: its first-order approximation, for picard only */
  CFSchur        schur;
  char           nonfinite[256]; /* the first NaN or Inf a residual met, "" if none */
  CFSteadyJacobian jacobian; /* -steady_jacobian: what the Newton operator and its preconditioner are */
  CFFlow         flow;
  CFMeltingModel melting;
  CFResidualCtx  rc;
  /* per-owned-cell work for the threaded melting model */
  PetscInt       nowned;
  DMDALocalInfo  owned; /* the layout work_* follow */
  PetscReal     *work_P, *work_T, *work_F, *work_dF;
  PetscReal     *row_P, *row_solidus; /* pressure and solidus (K) of each owned row of cells */
  PetscReal     *kcell, *dkcell; /* conductivity and its temperature derivative over the ghosted patch */
  const PetscInt *gpoint;        /* global number of every cell of the ghosted patch (the DMDA's block map) */
  unsigned short *pattern;       /* slots of each row of A (or P) at its first assembly (CFSteadySetRow) */
};

/* Effective conductivity at a cell centre (hydrothermal enhancement included), and its
   derivative in T. */
PetscReal CFConductivity(const CFResidualCtx *rc, PetscReal x, PetscReal z, PetscReal T);
PetscReal CFConductivityDerivative(const CFResidualCtx *rc, PetscReal x, PetscReal z, PetscReal T);
/* Lithostatic pressure (Pa) at depth z. */
static inline PetscReal CFPressure(const CFResidualCtx *rc, PetscReal z) { return rc->rho * rc->gravity * z; }

/* Energy residual of owned cell (i, j), scaled to K.  kcell covers the ghosted patch
   (indexing as CF_PSI without the corner row); Gamma_V is the melting rate times cell volume. */
PetscReal CFEnergyResidualCell(const CFResidualCtx *rc, const DMDALocalInfo *info, const CFCellState *const *x, const PetscReal *kcell, PetscInt i, PetscInt j, PetscReal Gamma_V);
/* Exact derivatives of the cell's limited advection (the first term of CFEnergyResidualCell,
   before scaling) with respect to the temperatures it reads, added to r. */
void CFEnergyAdvectionJacobian(const CFResidualCtx *rc, const CFCellState *const *x, PetscInt i, PetscInt j, CFJacRow *r);
/* Melting rate times cell volume (kg m-1 s-1, per unit ridge length) from the depletion of the
   cell and its upstream neighbours, and the upstream depletion F_up. */
PetscReal CFDepletionMeltingRate(const CFResidualCtx *rc, const CFCellState *const *x, PetscInt i, PetscInt j, PetscReal *F_up);
/* Depletion F_d of the cells in upstream order for the temperatures in X, exact (the same on any
   rank count): F_d = max(F_eq, F_up).  Repeats local sweeps with ghost updates until nothing changes. */
PetscErrorCode CFDepletionSweep(CFSteady s, Vec X);
/* Conductivity of the owned cells and their face neighbours into s->kcell (and, when
   with_derivative, its temperature derivative into s->dkcell). */
void CFSteadyConductivityPatch(CFSteady s, const DMDALocalInfo *info, const CFCellState *const *x, PetscBool with_derivative);
/* The Jacobian into J (analytic, or by coloured differences), its first-order five-point
   approximation into P (jacobian.c). */
PetscErrorCode CFSteadyFormJacobian(SNES snes, Vec X, Mat J, Mat P, void *ctx);
/* An AIJ matrix over the layout of da (dof-block rows in its order), preallocated with d and o
   entries per row in the diagonal and off-diagonal blocks, that takes MatSetValuesStencil and
   MatSetValuesLocal with da's ghosted indices; a first assembly forms its pattern (jacobian.c). */
PetscErrorCode CFSteadyCreateMatrix(DM da, const PetscInt d[], const PetscInt o[], Mat *M);
/* Row r (field c of its cell) into M, a matrix of CFSteadyCreateMatrix over dof fields per cell,
   by global indices in column order.  At the first assembly (formed false) it records the row's
   slots in pattern (one entry per row, in owned order); later it passes the values of those
   slots alone (zeros where one is unused now) to MatSetValuesRow, which skips PETSc's search for
   every column (jacobian.c).  A slot outside the recorded ones is an error, as a new nonzero was. */
PetscErrorCode CFSteadySetRow(CFSteady s, Mat M, PetscBool formed, PetscInt dof, PetscInt c, unsigned short pattern[], CFJacRow *r);
/* The Newton step's matrices and preconditioner, made for a solve and released after it, so
   that output and post-processing do not add to the solver's peak memory (jacobian.c). */
PetscErrorCode CFSteadyNewtonSetUp(CFSteady s);
PetscErrorCode CFSteadyNewtonRelease(CFSteady s);
/* The rows of the five-point approximation (jacobian.c), scaled as the residual. */
void CFSteadyApproximateEnergyRow(const CFSteady s, const DMDALocalInfo *info, const CFCellState *const *x, PetscInt i, PetscInt j, CFJacRow *r);
void CFSteadyDepletionRow(const CFResidualCtx *rc, const CFCellState *const *x, PetscInt i, PetscInt j, PetscReal Feq, PetscReal dFeq, PetscBool decoupled, CFJacRow *r);
/* The Schur-complement preconditioner: create, destroy, rebuild for the local state x (owned
   cells' equilibrium melt in s->work_F), and apply as a PCSHELL. */
PetscErrorCode CFSchurCreate(CFSteady s, CFSchur *c);
PetscErrorCode CFSchurDestroy(CFSchur *c);
PetscErrorCode CFSchurAssemble(CFSteady s, const DMDALocalInfo *info, const CFCellState *const *x);
PetscErrorCode CFSchurApply(PC pc, Vec r, Vec z);
/* A new solve: the next assembly rebuilds the multigrid hierarchy. */
PetscErrorCode CFSchurReset(CFSchur c);
/* Fill fine's solution by interpolating coarse's temperature, then the depletion sweep. */
PetscErrorCode CFSteadyInterpolateFrom(CFSteady fine, CFSteady coarse);
/* Equilibrium melt fraction of the owned cells for the temperatures of the local array x, into
   s->work_F (and s->work_dF). */
PetscErrorCode CFSteadyEquilibriumMelt(CFSteady s, const DMDALocalInfo *info, const CFCellState *const *x);

#endif
