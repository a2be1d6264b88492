/* Melting model "linear": F rises linearly in T from a linear solidus to a linear liquidus.
   Not a petrological model: a verification case whose answers can be worked by hand.
   Water is ignored.  Coefficients are round numbers near a dry peridotite solidus
   (common practice, no source). */
#include <crustforge/melting.h>
#include <crustforge/units.h>

enum { SOLIDUS_SURFACE, SOLIDUS_SLOPE, LIQUIDUS_SURFACE, LIQUIDUS_SLOPE, NPARAMS };

static const CFMeltingParamInfo params[NPARAMS] = {
  {"solidus_surface", "C", 1100.0, 500.0, 2000.0, "solidus at zero pressure (verification value, no source)"},
  {"solidus_slope", "C/GPa", 130.0, 0.0, 500.0, "solidus pressure slope (verification value, no source)"},
  {"liquidus_surface", "C", 1500.0, 500.0, 2500.0, "liquidus at zero pressure (verification value, no source)"},
  {"liquidus_slope", "C/GPa", 130.0, 0.0, 500.0, "liquidus pressure slope (verification value, no source)"},
};

static PetscReal Solidus(const PetscReal p[], PetscReal P, PetscReal water_ppm)
{
  (void)water_ppm;
  return CFCelsiusToKelvin(p[SOLIDUS_SURFACE] + p[SOLIDUS_SLOPE] * CFPaToGPa(P));
}

static PetscReal Liquidus(const PetscReal p[], PetscReal P, PetscReal water_ppm)
{
  (void)water_ppm;
  return CFCelsiusToKelvin(p[LIQUIDUS_SURFACE] + p[LIQUIDUS_SLOPE] * CFPaToGPa(P));
}

static int MeltFraction(const PetscReal p[], PetscReal P, PetscReal T, PetscReal water_ppm, PetscReal *F, PetscReal *dFdT)
{
  const PetscReal Ts = Solidus(p, P, water_ppm), Tl = Liquidus(p, P, water_ppm);

  if (!(Tl > Ts)) { /* a liquidus at or below the solidus has no melting interval */
    *F = NAN;
    if (dFdT) *dFdT = NAN;
    return 1;
  }
  if (T <= Ts) { *F = 0.0; if (dFdT) *dFdT = 0.0; }
  else if (T >= Tl) { *F = 1.0; if (dFdT) *dFdT = 0.0; }
  else { *F = (T - Ts) / (Tl - Ts); if (dFdT) *dFdT = 1.0 / (Tl - Ts); }
  return 0;
}

const CFMeltingType CFMeltingLinear = {"linear", "F linear in T between a linear solidus and liquidus (verification)", NPARAMS, params, Solidus, Liquidus, MeltFraction};
