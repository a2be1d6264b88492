/* Reference curves for the heat-flow and seafloor-depth figures: half-space cooling with the
   run's parameters and two published empirical fits against plate age. */
#include <crustforge/figures.h>
#include <crustforge/units.h>

void CFCoolingParamsFromConfig(const CFConfig *cfg, CFCoolingParams *cp)
{
  cp->conductivity           = cfg->conductivity;
  cp->diffusivity            = cfg->conductivity / (cfg->mantle_density * cfg->heat_capacity);
  cp->temperature_difference = cfg->potential_temperature - cfg->surface_temperature;
  cp->expansivity            = cfg->thermal_expansivity;
  cp->mantle_density         = cfg->mantle_density;
  cp->water_density          = cfg->water_density;
}

/* Surface heat flow of a cooling half-space (Turcotte & Schubert, Geodynamics, 2nd ed., sections 4.15-4.16). */
PetscReal CFHalfSpaceHeatFlow(const CFCoolingParams *cp, PetscReal t)
{
  if (!(t > 0)) return NAN;
  return cp->conductivity * cp->temperature_difference / PetscSqrtReal(PETSC_PI * cp->diffusivity * t);
}

/* Isostatic subsidence of a cooling half-space under water (Turcotte & Schubert, Geodynamics,
   2nd ed., section 4.17). */
PetscReal CFHalfSpaceSubsidence(const CFCoolingParams *cp, PetscReal t)
{
  if (!(t > 0)) return NAN;
  return 2.0 * cp->mantle_density * cp->expansivity * cp->temperature_difference / (cp->mantle_density - cp->water_density) * PetscSqrtReal(cp->diffusivity * t / PETSC_PI);
}

/* Fits of the form q = c t^-1/2 and d = crest + c t^1/2 (t in Myr) over their published age
   ranges; the end of a range is taken as inside it. */
typedef struct {
  const char *name;
  PetscReal   q_coeff_mW_m2, q_age_max_myr;           /* q = c t^-1/2, t <= max */
  PetscReal   d_crest_m, d_coeff_m, d_age_max_myr;    /* d = crest + c t^1/2, t <= max */
} CFFit;

static const CFFit Fits[CF_NFITS] = {
  /* Parsons & Sclater (1977), JGR 82, 803, abstract (seen): d = 2500 + 350 t^1/2 m for 0-70 Myr;
     q = 11.3 t^-1/2 ucal cm-2 s-1 (about 473 t^-1/2 mW m-2) for 0-120 Myr. */
  [CF_FIT_PARSONS_SCLATER_1977] = {"Parsons & Sclater (1977)", 473.0, 120.0, 2500.0, 350.0, 70.0},
  /* Stein & Stein (1992), Nature 359, 123 (GDH1): q = 510 t^-1/2 mW m-2 for t <= 55 Myr (seen, in
     Fowler, The Solid Earth, eq. 7.58a); d = 2600 + 365 t^1/2 m for t < 20 Myr (from memory). */
  [CF_FIT_STEIN_STEIN_1992] = {"Stein & Stein (1992)", 510.0, 55.0, 2600.0, 365.0, 20.0},
};

const char *CFEmpiricalFitName(CFEmpiricalFit fit) { return (fit >= 0 && fit < CF_NFITS) ? Fits[fit].name : "unknown fit"; }

PetscReal CFEmpiricalHeatFlow(CFEmpiricalFit fit, PetscReal t)
{
  const PetscReal t_myr = CFSToMyr(t);

  if (fit < 0 || fit >= CF_NFITS || !(t_myr > 0) || t_myr > Fits[fit].q_age_max_myr) return NAN;
  return Fits[fit].q_coeff_mW_m2 * 1.0e-3 / PetscSqrtReal(t_myr); /* mW m-2 -> W m-2 */
}

PetscReal CFEmpiricalDepth(CFEmpiricalFit fit, PetscReal t)
{
  const PetscReal t_myr = CFSToMyr(t);

  if (fit < 0 || fit >= CF_NFITS || !(t_myr > 0) || t_myr > Fits[fit].d_age_max_myr) return NAN;
  return Fits[fit].d_crest_m + Fits[fit].d_coeff_m * PetscSqrtReal(t_myr);
}
