/* The fields of a run file: names after the CF conventions where one fits, units as UDUNITS
   spells them, and the conversion from SI (stored = scale * SI + offset). */
#include <crustforge/rundata.h>
#include <crustforge/units.h>

#define MM_PER_YR_PER_M_PER_S (1.0e3 * CF_SECONDS_PER_YEAR)

const CFFieldInfo CFRunFields[CF_NFIELDS] = {
  [CF_FIELD_TEMPERATURE]       = {"temperature", "temperature", "degC", "K", 1.0, -CF_KELVIN_OFFSET},
  [CF_FIELD_DEPLETION]         = {"depletion", "depletion of the solid (extent of melting, melt fraction extracted)", "1", "1", 1.0, 0.0},
  [CF_FIELD_MELT_FRACTION_EQ]  = {"equilibrium_melt_fraction", "equilibrium melt fraction of the melting model", "1", "1", 1.0, 0.0},
  [CF_FIELD_MELTING_RATE]      = {"melting_rate", "melting rate (mass of melt made per unit volume and time)", "kg m-3 s-1", "kg m-3 s-1", 1.0, 0.0},
  [CF_FIELD_VELOCITY_X]        = {"velocity_x", "mantle velocity away from the ridge axis", "mm/yr", "m/s", MM_PER_YR_PER_M_PER_S, 0.0},
  [CF_FIELD_VELOCITY_UP]       = {"upward_velocity", "upward mantle velocity", "mm/yr", "m/s", MM_PER_YR_PER_M_PER_S, 0.0},
  [CF_FIELD_PRESSURE]          = {"pressure", "lithostatic pressure", "GPa", "Pa", 1.0e-9, 0.0},
  [CF_FIELD_CONDUCTIVITY]      = {"thermal_conductivity", "effective thermal conductivity (hydrothermal cooling included)", "W m-1 K-1", "W m-1 K-1", 1.0, 0.0},
  [CF_FIELD_STREAM_FUNCTION]   = {"stream_function", "mantle flow stream function (volume flux per unit ridge length)", "m2 s-1", "m2 s-1", 1.0, 0.0},
};
