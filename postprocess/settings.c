/* The post-processor's settings from the scenario's extraction, observables and pt_paths keys. */
#include <crustforge/postprocess.h>
#include <crustforge/units.h>

_Static_assert(CF_MAX_PATHS >= CF_REAL_LIST_MAX, "every pt_paths.start_x value needs a path slot");

PetscErrorCode CFPostSettingsFromConfig(const CFConfig *cfg, CFPostSettings *set)
{
  const PetscReal width = cfg->nx * cfg->dx;

  PetscFunctionBeginUser;
  PetscCall(PetscMemzero(set, sizeof(*set)));
  set->focusing_width = cfg->extraction_focusing_width; /* 0: all melt delivered */
  set->min_depletion  = cfg->extraction_min_depletion;
  /* extraction.lid_temperature 0 C (the key's smallest value) turns the lid off */
  set->lid_temperature      = cfg->extraction_lid_temperature > CFCelsiusToKelvin(0.0) ? cfg->extraction_lid_temperature : 0.0;
  set->melt_lens_isotherm   = cfg->melt_lens_isotherm;
  set->lithosphere_isotherm = cfg->lithosphere_isotherm;
  set->ridge_depth          = cfg->ridge_depth;
  /* a parcel must enter through the bottom of the domain: starts at or beyond its width are skipped */
  for (PetscInt p = 0; p < cfg->pt_path_start_x.n; p++)
    if (cfg->pt_path_start_x.v[p] < width) set->path_start_x[set->npaths++] = cfg->pt_path_start_x.v[p];
  PetscFunctionReturn(0);
}
