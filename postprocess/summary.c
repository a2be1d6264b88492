/* The run's summary figures (DESIGN 2.5): delivered melt (extraction.c), the geometry of the
   melting region, the depth where the axis column crosses the solidus, the deepest depletion
   and the melt-lens depth.  The melting region is every cell that melts, whatever the
   extraction settings. */
#include <math.h>
#include <crustforge/melting.h>
#include "post_impl.h"

/* Deepest depth where the axis column is at or above the solidus of the scenario's melting
   model, interpolated linearly in T - T_solidus between that cell centre and the one below.
   A column above the solidus in its deepest cell starts melting at or below the bottom of the
   domain: the domain depth is returned (a lower bound).  NaN where the column never melts. */
static PetscErrorCode OnsetDepth(const CFRunData *run, PetscReal *depth)
{
  CFMeltingModel model;
  PetscReal      below = NAN;

  PetscFunctionBeginUser;
  *depth = NAN;
  PetscCall(CFMeltingModelCreate(&run->cfg, &model));
  for (PetscInt j = run->nz - 1; j >= 0; j--) {
    PetscReal Ts, excess;
    PetscCall(CFMeltingModelSolidus(model, CF_POST_AT(run, CF_FIELD_PRESSURE, 0, j), &Ts));
    excess = CF_POST_AT(run, CF_FIELD_TEMPERATURE, 0, j) - Ts;
    if (excess >= 0.0) {
      *depth = j == run->nz - 1 ? run->nz * run->dz : (j + 0.5 + excess / (excess - below)) * run->dz;
      break;
    }
    below = excess;
  }
  PetscCall(CFMeltingModelDestroy(&model));
  PetscFunctionReturn(0);
}

static PetscErrorCode SummaryOnRoot(const CFRunData *run, const CFPostSettings *set, CFSummary *sum)
{
  const PetscInt nx = run->nx, nz = run->nz;
  PetscReal     *psi;
  PetscBool     *melting;
  PetscInt       ncells = 0, imax = -1;

  PetscFunctionBeginUser;
  PetscCall(CFPostCornerPsi(run, &psi));
  PetscCall(PetscMalloc1(nx * nz, &melting));
  PetscCall(CFPostMeltingCells(run, psi, melting));
  PetscCall(CFPostExtraction(run, set, psi, melting, sum));
  sum->max_depletion = 0.0;
  for (PetscInt j = 0; j < nz; j++)
    for (PetscInt i = 0; i < nx; i++) {
      sum->max_depletion = PetscMax(sum->max_depletion, CF_POST_AT(run, CF_FIELD_DEPLETION, i, j));
      if (!melting[j * nx + i]) continue;
      ncells++;
      imax = PetscMax(imax, i);
    }
  sum->melting_region_width = (imax + 1) * run->dx; /* outer edge of the farthest melting cell */
  sum->melting_region_area  = ncells * run->dx * run->dz;
  PetscCall(OnsetDepth(run, &sum->melt_onset_depth));
  sum->melt_lens_depth = CFPostIsothermDepth(run->field[CF_FIELD_TEMPERATURE], nx, nz, run->dz, run->cfg.surface_temperature, set->melt_lens_isotherm);
  PetscCall(PetscFree(melting));
  PetscCall(PetscFree(psi));
  PetscFunctionReturn(0);
}

PetscErrorCode CFPostSummary(MPI_Comm comm, const CFRunData *run, const CFPostSettings *set, CFSummary *sum)
{
  PetscMPIInt    rank;
  PetscErrorCode ierr = 0;

  PetscFunctionBeginUser;
  PetscCall(PetscMemzero(sum, sizeof(*sum)));
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  if (!rank) ierr = SummaryOnRoot(run, set, sum);
  PetscCall(CFPostShareError(comm, ierr));
  PetscCallMPI(MPI_Bcast(sum, sizeof(*sum), MPI_BYTE, 0, comm));
  PetscFunctionReturn(0);
}
