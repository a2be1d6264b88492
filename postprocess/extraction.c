/* Melt extraction and what the delivered melt adds up to (DESIGN 2.5): the crust from the
   melting rate and from the far-side depletion flux, the pooled-melt means, the melt flux and
   the mean melt fraction of the melting regime (Plank & Langmuir 1992, JGR 97).
   A melting cell's melt is delivered where the cell centre is within extraction.focusing_width
   of the axis (when set), its depletion is at least extraction.min_depletion, and it is at
   least as hot as extraction.lid_temperature (when set). */
#include <math.h>
#include "post_impl.h"

static PetscBool Delivered(const CFRunData *run, const CFPostSettings *set, PetscInt i, PetscInt j)
{
  if (set->focusing_width > 0.0 && (i + 0.5) * run->dx > set->focusing_width) return PETSC_FALSE;
  if (CF_POST_AT(run, CF_FIELD_DEPLETION, i, j) < set->min_depletion) return PETSC_FALSE;
  if (set->lid_temperature > 0.0 && CF_POST_AT(run, CF_FIELD_TEMPERATURE, i, j) < set->lid_temperature) return PETSC_FALSE;
  return PETSC_TRUE;
}

/* Volume flux of fertile mantle into the melting region through the faces of melting cell (i, j):
   inflow across faces whose upstream cell does not melt or lies outside the domain. */
static PetscReal InflowFromOutside(const CFRunData *run, const PetscReal psi[], const PetscBool melting[], PetscInt i, PetscInt j)
{
  const PetscInt   nx = run->nx, nz = run->nz;
  CFPostFaceFluxes q;
  PetscReal        in = 0.0;

  CFPostCellFluxes(run, psi, i, j, &q);
  if (q.left > 0.0 && (i == 0 || !melting[j * nx + i - 1])) in += q.left;
  if (q.right < 0.0 && (i == nx - 1 || !melting[j * nx + i + 1])) in -= q.right;
  if (q.bottom > 0.0 && (j == nz - 1 || !melting[(j + 1) * nx + i])) in += q.bottom;
  if (q.top < 0.0 && (j == 0 || !melting[(j - 1) * nx + i])) in -= q.top;
  return in;
}

PetscErrorCode CFPostExtraction(const CFRunData *run, const CFPostSettings *set, const PetscReal psi[], const PetscBool melting[], CFSummary *sum)
{
  const PetscInt  nx = run->nx, nz = run->nz;
  const PetscReal dA = run->dx * run->dz, rho_m = run->cfg.mantle_density, denom = run->cfg.crust_density * run->cfg.half_rate;
  PetscReal       G = 0.0, GF = 0.0, GP = 0.0, side = 0.0, inflow = 0.0;

  PetscFunctionBeginUser;
  for (PetscInt j = 0; j < nz; j++)
    for (PetscInt i = 0; i < nx; i++) {
      PetscReal g;
      if (!melting[j * nx + i]) continue;
      inflow += InflowFromOutside(run, psi, melting, i, j);
      if (!Delivered(run, set, i, j)) continue;
      g = CF_POST_AT(run, CF_FIELD_MELTING_RATE, i, j);
      G += g;
      GF += g * CF_POST_AT(run, CF_FIELD_DEPLETION, i, j);
      GP += g * CF_POST_AT(run, CF_FIELD_PRESSURE, i, j);
    }
  /* mass balance: the residue leaving through the far side carries all the melt it gave up */
  for (PetscInt j = 0; j < nz; j++) {
    CFPostFaceFluxes q;
    CFPostCellFluxes(run, psi, nx - 1, j, &q);
    if (q.right > 0.0) side += rho_m * q.right * CF_POST_AT(run, CF_FIELD_DEPLETION, nx - 1, j);
  }
  sum->melt_flux                   = G * dA;
  sum->crustal_thickness           = sum->melt_flux / denom;
  sum->crustal_thickness_side_flux = side / denom;
  sum->mean_melt_fraction          = G > 0.0 ? GF / G : NAN;
  sum->mean_melting_pressure       = G > 0.0 ? GP / G : NAN;
  sum->regime_mean_melt_fraction   = inflow > 0.0 ? sum->melt_flux / (rho_m * inflow) : NAN;
  PetscFunctionReturn(0);
}
