/* Observables along the plate against age t = x / U0, one value per column (DESIGN 2.5):
   - surface heat flow q = k dT/dz at z = 0, from the quadratic through the surface value and
     the two top cell centres: dT/dz = (9 T0 - T1 - 8 Ts) / (3 dz) + O(dz^2) (derived, Taylor
     series), k the effective conductivity of the top cell;
   - seafloor depth by local isostasy against the axis column, each column's thermal contraction
     d(x) = d_axis + rho_m alpha / (rho_m - rho_w) * integral_0^D (T_axis - T) dz over the whole
     domain depth (the isostatic balance of Turcotte & Schubert, Geodynamics, eq. 4-205, from
     memory), midpoint rule;
   - lithosphere thickness, the depth of the lithosphere isotherm (first crossing from the top). */
#include <math.h>
#include "post_impl.h"

static void ProfilesOnRoot(const CFRunData *run, const CFPostSettings *set, CFProfiles *prof)
{
  const CFConfig  *c = &run->cfg;
  const PetscInt   nx = run->nx, nz = run->nz;
  const PetscReal *T = run->field[CF_FIELD_TEMPERATURE], *k = run->field[CF_FIELD_CONDUCTIVITY];
  const PetscReal  contraction = c->mantle_density * c->thermal_expansivity / (c->mantle_density - c->water_density);

  for (PetscInt i = 0; i < nx; i++) {
    PetscReal deficit = 0.0;
    for (PetscInt j = 0; j < nz; j++) deficit += T[j * nx] - T[j * nx + i];
    prof->x[i]                     = (i + 0.5) * run->dx;
    prof->age[i]                   = prof->x[i] / c->half_rate;
    prof->heat_flow[i]             = k[i] * (9.0 * T[i] - T[nx + i] - 8.0 * c->surface_temperature) / (3.0 * run->dz);
    prof->seafloor_depth[i]        = set->ridge_depth + contraction * deficit * run->dz;
    prof->lithosphere_thickness[i] = CFPostIsothermDepth(T + i, nx, nz, run->dz, c->surface_temperature, set->lithosphere_isotherm);
  }
}

PetscErrorCode CFPostProfiles(MPI_Comm comm, const CFRunData *run, const CFPostSettings *set, CFProfiles *prof)
{
  PetscMPIInt rank;
  PetscInt    n = run->nx;

  PetscFunctionBeginUser;
  PetscCall(PetscMemzero(prof, sizeof(*prof)));
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  PetscCheck(run->nz >= 2, comm, PETSC_ERR_ARG_SIZ, "profiles need at least two cells down, the grid has %" PetscInt_FMT, run->nz);
  /* one block holds the five arrays; prof->x owns it */
  PetscCall(PetscMalloc1(5 * n, &prof->x));
  prof->n                     = n;
  prof->age                   = prof->x + n;
  prof->heat_flow             = prof->x + 2 * n;
  prof->seafloor_depth        = prof->x + 3 * n;
  prof->lithosphere_thickness = prof->x + 4 * n;
  if (!rank) ProfilesOnRoot(run, set, prof);
  PetscCallMPI(MPI_Bcast(prof->x, (PetscMPIInt)(5 * n), MPIU_REAL, 0, comm));
  PetscFunctionReturn(0);
}

PetscErrorCode CFPostProfilesDestroy(CFProfiles *prof)
{
  PetscFunctionBeginUser;
  PetscCall(PetscFree(prof->x));
  PetscCall(PetscMemzero(prof, sizeof(*prof)));
  PetscFunctionReturn(0);
}
