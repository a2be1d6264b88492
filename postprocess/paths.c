/* P-T paths: mantle parcels followed from the bottom of the domain along the streamlines of the
   corner flow (the analytic velocity of crustforge/flow.h, integrated with the Dormand-Prince
   5(4) pair, adaptive), until they leave through the far side or rise to the shallowest cell
   centre (z = dz / 2: above it the fields are not resolved).  Temperature and depletion are
   sampled from the cell fields by bilinear interpolation, P = rho_m g z. */
#include <math.h>
#include <crustforge/flow.h>
#include "post_impl.h"

/* Position error allowed per step, as a fraction of the domain depth (common practice, no source). */
#define CF_PATH_TOL 1.0e-11
/* At most this fraction of a cell per step, so that the sampled fields are resolved. */
#define CF_PATH_MAX_CELL_FRACTION 0.5
#define CF_PATH_MAX_STEPS 1000000

typedef struct {
  PetscInt   n, cap;
  PetscReal *x, *z, *t;
} Track;

static PetscErrorCode TrackPush(Track *tr, PetscReal x, PetscReal z, PetscReal t)
{
  PetscFunctionBeginUser;
  if (tr->n == tr->cap) {
    tr->cap = tr->cap ? 2 * tr->cap : 256;
    PetscCall(PetscRealloc(tr->cap * sizeof(PetscReal), &tr->x));
    PetscCall(PetscRealloc(tr->cap * sizeof(PetscReal), &tr->z));
    PetscCall(PetscRealloc(tr->cap * sizeof(PetscReal), &tr->t));
  }
  tr->x[tr->n] = x;
  tr->z[tr->n] = z;
  tr->t[tr->n] = t;
  tr->n++;
  PetscFunctionReturn(0);
}

/* dy/dt for y = (x, z), z down. */
static void Rate(CFFlow flow, const PetscReal y[2], PetscReal k[2])
{
  PetscReal u, w_up;
  CFFlowVelocity(flow, y[0], y[1], &u, &w_up);
  k[0] = u;
  k[1] = -w_up;
}

/* One Dormand-Prince step of size h (Dormand & Prince 1980, J. Comp. Appl. Math. 6, 19, from
   memory): the fifth-order result and the largest component of the difference from the fourth. */
static void DormandPrinceStep(CFFlow flow, const PetscReal y[2], PetscReal h, PetscReal y5[2], PetscReal *err)
{
  static const PetscReal a[7][6] = {
    {0},
    {1.0 / 5},
    {3.0 / 40, 9.0 / 40},
    {44.0 / 45, -56.0 / 15, 32.0 / 9},
    {19372.0 / 6561, -25360.0 / 2187, 64448.0 / 6561, -212.0 / 729},
    {9017.0 / 3168, -355.0 / 33, 46732.0 / 5247, 49.0 / 176, -5103.0 / 18656},
    {35.0 / 384, 0, 500.0 / 1113, 125.0 / 192, -2187.0 / 6784, 11.0 / 84},
  };
  static const PetscReal b5[7] = {35.0 / 384, 0, 500.0 / 1113, 125.0 / 192, -2187.0 / 6784, 11.0 / 84, 0};
  static const PetscReal b4[7] = {5179.0 / 57600, 0, 7571.0 / 16695, 393.0 / 640, -92097.0 / 339200, 187.0 / 2100, 1.0 / 40};
  PetscReal              k[7][2];

  *err = 0.0;
  for (PetscInt s = 0; s < 7; s++) {
    PetscReal ys[2] = {y[0], y[1]};
    for (PetscInt r = 0; r < s; r++)
      for (PetscInt c = 0; c < 2; c++) ys[c] += h * a[s][r] * k[r][c];
    Rate(flow, ys, k[s]);
  }
  for (PetscInt c = 0; c < 2; c++) {
    PetscReal d = 0.0;
    y5[c]       = y[c];
    for (PetscInt s = 0; s < 7; s++) {
      y5[c] += h * b5[s] * k[s][c];
      d += h * (b5[s] - b4[s]) * k[s][c];
    }
    *err = PetscMax(*err, PetscAbsReal(d));
  }
}

/* The parcel entering at (x0, bottom) until it leaves; steps that would cross the far side or
   the top are shortened once by linear estimate to end close to the boundary. */
static PetscErrorCode Follow(const CFRunData *run, CFFlow flow, PetscReal x0, Track *tr)
{
  const PetscReal W = run->nx * run->dx, D = run->nz * run->dz, z_top = 0.5 * run->dz;
  const PetscReal atol = CF_PATH_TOL * D, max_step = CF_PATH_MAX_CELL_FRACTION * PetscMin(run->dx, run->dz);
  PetscReal       y[2] = {x0, D}, t = 0.0, h = PETSC_MAX_REAL;
  PetscBool       shortened = PETSC_FALSE;

  PetscFunctionBeginUser;
  PetscCall(TrackPush(tr, y[0], y[1], t));
  for (PetscInt steps = 0; y[0] < W && y[1] > z_top; steps++) {
    PetscReal v[2], y5[2], err, f = 1.0;

    PetscCheck(steps < CF_PATH_MAX_STEPS, PETSC_COMM_SELF, PETSC_ERR_PLIB, "P-T path from x = %g km: no exit after %d steps", (double)(x0 * 1e-3), CF_PATH_MAX_STEPS);
    Rate(flow, y, v);
    h = PetscMin(h, max_step / PetscSqrtReal(v[0] * v[0] + v[1] * v[1]));
    DormandPrinceStep(flow, y, h, y5, &err);
    if (err > atol) {
      h *= PetscMax(0.2, 0.9 * PetscPowReal(atol / err, 0.2));
      continue;
    }
    if (y5[0] > W) f = PetscMin(f, (W - y[0]) / (y5[0] - y[0]));
    if (y5[1] < z_top) f = PetscMin(f, (y[1] - z_top) / (y[1] - y5[1]));
    if (f < 1.0 && !shortened) {
      h *= f * (1.0 + 1.0e-6); /* aim just past the boundary, so the next point ends the path */
      shortened = PETSC_TRUE;
      continue;
    }
    shortened = PETSC_FALSE;
    y[0]      = y5[0];
    y[1]      = y5[1];
    t += h;
    PetscCall(TrackPush(tr, y[0], y[1], t));
    h *= err > 0.0 ? PetscMin(5.0, PetscMax(0.2, 0.9 * PetscPowReal(atol / err, 0.2))) : 5.0;
  }
  PetscFunctionReturn(0);
}

/* Path p's six arrays of npoints[p] values, one block owned by paths->x[p]. */
static PetscErrorCode PathAllocate(CFPTPaths *paths, PetscInt p)
{
  const PetscInt n = paths->npoints[p];

  PetscFunctionBeginUser;
  PetscCall(PetscMalloc1(6 * n, &paths->x[p]));
  paths->z[p]    = paths->x[p] + n;
  paths->time[p] = paths->x[p] + 2 * n;
  paths->P[p]    = paths->x[p] + 3 * n;
  paths->T[p]    = paths->x[p] + 4 * n;
  paths->F[p]    = paths->x[p] + 5 * n;
  PetscFunctionReturn(0);
}

static PetscErrorCode PathsOnRoot(const CFRunData *run, const CFPostSettings *set, CFPTPaths *paths)
{
  const PetscReal rho_g = run->cfg.mantle_density * run->cfg.gravity;
  CFFlow          flow;

  PetscFunctionBeginUser;
  PetscCall(CFFlowCreate(&run->cfg, &flow));
  for (PetscInt p = 0; p < paths->npaths; p++) {
    Track          tr = {0, 0, NULL, NULL, NULL};
    PetscInt       n;
    PetscErrorCode ierr = Follow(run, flow, set->path_start_x[p], &tr);

    n = paths->npoints[p] = tr.n;
    if (!ierr) ierr = PathAllocate(paths, p);
    if (ierr) {
      PetscCall(PetscFree(tr.x));
      PetscCall(PetscFree(tr.z));
      PetscCall(PetscFree(tr.t));
      PetscCall(CFFlowDestroy(&flow));
      PetscCall(ierr);
    }
    for (PetscInt k = 0; k < n; k++) {
      paths->x[p][k]    = tr.x[k];
      paths->z[p][k]    = tr.z[k];
      paths->time[p][k] = tr.t[k];
      paths->P[p][k]    = rho_g * tr.z[k];
      paths->T[p][k]    = CFPostSample(run, run->field[CF_FIELD_TEMPERATURE], tr.x[k], tr.z[k]);
      paths->F[p][k]    = CFPostSample(run, run->field[CF_FIELD_DEPLETION], tr.x[k], tr.z[k]);
    }
    PetscCall(PetscFree(tr.x));
    PetscCall(PetscFree(tr.z));
    PetscCall(PetscFree(tr.t));
  }
  PetscCall(CFFlowDestroy(&flow));
  PetscFunctionReturn(0);
}

PetscErrorCode CFPostPTPaths(MPI_Comm comm, const CFRunData *run, const CFPostSettings *set, CFPTPaths *paths)
{
  PetscMPIInt    rank;
  PetscErrorCode ierr = 0;

  PetscFunctionBeginUser;
  PetscCall(PetscMemzero(paths, sizeof(*paths)));
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  paths->npaths = PetscMin(set->npaths, CF_MAX_PATHS);
  if (!rank) ierr = PathsOnRoot(run, set, paths);
  PetscCall(CFPostShareError(comm, ierr));
  PetscCallMPI(MPI_Bcast(paths->npoints, CF_MAX_PATHS, MPIU_INT, 0, comm));
  for (PetscInt p = 0; p < paths->npaths; p++) {
    if (rank) PetscCall(PathAllocate(paths, p));
    PetscCallMPI(MPI_Bcast(paths->x[p], (PetscMPIInt)(6 * paths->npoints[p]), MPIU_REAL, 0, comm));
  }
  PetscFunctionReturn(0);
}

PetscErrorCode CFPostPTPathsDestroy(CFPTPaths *paths)
{
  PetscFunctionBeginUser;
  for (PetscInt p = 0; p < CF_MAX_PATHS; p++) PetscCall(PetscFree(paths->x[p]));
  PetscCall(PetscMemzero(paths, sizeof(*paths)));
  PetscFunctionReturn(0);
}
