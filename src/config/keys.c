/* The scenario key table: every key a scenario may set, with its unit, default, allowed range
   and the source of the default.  Loading, validation, --help and the parameter printout are all
   driven from this one table (src/config/config.c). */
#include <stddef.h>
#include "keys.h"

#define F(field) offsetof(CFConfig, field), sizeof(((CFConfig *)0)->field)
#define NOSET    ((size_t)-1)

const CFKey CFKeys[] = {
  {"ridge", "full_spreading_rate", "mm/yr", CF_KEY_REAL, CF_CONV_NONE, "60", 0, 300, PETSC_TRUE, PETSC_FALSE, F(full_spreading_rate_mm_yr), NOSET,
   "full spreading rate, both plates together (default: an intermediate ridge, common practice, no source)"},

  {"mantle", "potential_temperature", "C", CF_KEY_REAL, CF_CONV_CELSIUS, "1350", 1000, 1800, PETSC_FALSE, PETSC_FALSE, F(potential_temperature), NOSET,
   "mantle potential temperature (Herzberg, Condie & Korenaga 2010, EPSL 292)"},
  {"mantle", "water", "ppm", CF_KEY_REAL, CF_CONV_NONE, "0", 0, 5000, PETSC_FALSE, PETSC_FALSE, F(water_ppm), NOSET,
   "bulk water in the mantle, H2O by weight (dry by default; MORB source is of order 50-200 ppm)"},
  {"mantle", "density", "kg/m3", CF_KEY_REAL, CF_CONV_NONE, "3300", 2500, 4500, PETSC_FALSE, PETSC_FALSE, F(mantle_density), NOSET,
   "mantle density (Turcotte & Schubert, Geodynamics; Wangen 2010)"},
  {"mantle", "heat_capacity", "J/kg/K", CF_KEY_REAL, CF_CONV_NONE, "1000", 500, 2000, PETSC_FALSE, PETSC_FALSE, F(heat_capacity), NOSET,
   "specific heat capacity (Katz, Spiegelman & Langmuir 2003, Table 2)"},
  {"mantle", "conductivity", "W/m/K", CF_KEY_REAL, CF_CONV_NONE, "3.3", 0.5, 20, PETSC_FALSE, PETSC_FALSE, F(conductivity), NOSET,
   "thermal conductivity; with the defaults kappa = 1e-6 m2/s (Wangen 2010)"},
  {"mantle", "thermal_expansivity", "1/K", CF_KEY_REAL, CF_CONV_NONE, "3e-5", 0, 1e-4, PETSC_FALSE, PETSC_FALSE, F(thermal_expansivity), NOSET,
   "volumetric thermal expansivity (Wangen 2010; Turcotte & Schubert)"},
  {"mantle", "adiabatic_gradient", "K/km", CF_KEY_REAL, CF_CONV_PER_KM, "derived", 0, 2, PETSC_FALSE, PETSC_FALSE, F(adiabatic_gradient), offsetof(CFConfig, adiabatic_gradient_set),
   "adiabatic temperature gradient; default alpha g Tp / cp with Tp in K (Turcotte & Schubert, adiabatic compression)"},

  {"crust", "density", "kg/m3", CF_KEY_REAL, CF_CONV_NONE, "2900", 2000, 3300, PETSC_FALSE, PETSC_FALSE, F(crust_density), NOSET,
   "density of the igneous crust (common practice, no source)"},
  {"ocean", "water_density", "kg/m3", CF_KEY_REAL, CF_CONV_NONE, "1030", 900, 1100, PETSC_FALSE, PETSC_FALSE, F(water_density), NOSET,
   "seawater density for isostasy (common practice, no source)"},

  {"surface", "temperature", "C", CF_KEY_REAL, CF_CONV_CELSIUS, "0", -10, 50, PETSC_FALSE, PETSC_FALSE, F(surface_temperature), NOSET,
   "seafloor temperature (common practice, no source)"},
  {"constants", "gravity", "m/s2", CF_KEY_REAL, CF_CONV_NONE, "9.81", 1, 30, PETSC_FALSE, PETSC_FALSE, F(gravity), NOSET,
   "gravitational acceleration (standard value)"},

  {"grid", "width", "km", CF_KEY_REAL, CF_CONV_KM, "400", 0, 10000, PETSC_TRUE, PETSC_FALSE, F(width), NOSET,
   "distance from the ridge axis to the far side of the domain"},
  {"grid", "depth", "km", CF_KEY_REAL, CF_CONV_KM, "200", 0, 2000, PETSC_TRUE, PETSC_FALSE, F(depth), NOSET,
   "depth of the domain below the seafloor"},
  {"grid", "spacing", "km", CF_KEY_REAL, CF_CONV_KM, "1", 0, 100, PETSC_TRUE, PETSC_FALSE, F(spacing), NOSET,
   "cell size in both directions (rounded so that a whole number of cells fits)"},

  {"hydrothermal", "nusselt", "1", CF_KEY_REAL, CF_CONV_NONE, "8", 1, 100, PETSC_FALSE, PETSC_FALSE, F(nusselt), NOSET,
   "conductivity factor where seawater circulates; 1 turns hydrothermal cooling off (Phipps Morgan & Chen 1993, JGR 98, from memory)"},
  {"hydrothermal", "temperature_cutoff", "C", CF_KEY_REAL, CF_CONV_CELSIUS, "600", 100, 1200, PETSC_FALSE, PETSC_FALSE, F(hydrothermal_temperature_cutoff), NOSET,
   "temperature above which circulation stops (Phipps Morgan & Chen 1993, from memory)"},
  {"hydrothermal", "depth_cutoff", "km", CF_KEY_REAL, CF_CONV_KM, "6", 0, 50, PETSC_TRUE, PETSC_FALSE, F(hydrothermal_depth_cutoff), NOSET,
   "depth below which circulation stops (a few km: Phipps Morgan & Chen 1993, from memory)"},
  {"hydrothermal", "temperature_width", "C", CF_KEY_REAL, CF_CONV_NONE, "100", 0, 500, PETSC_TRUE, PETSC_FALSE, F(hydrothermal_temperature_width), NOSET,
   "width of the smooth switch in temperature, so that Newton converges (common practice, no source)"},
  {"hydrothermal", "depth_width", "km", CF_KEY_REAL, CF_CONV_KM, "1", 0, 20, PETSC_TRUE, PETSC_FALSE, F(hydrothermal_depth_width), NOSET,
   "width of the smooth switch in depth (common practice, no source)"},

  {"melting", "model", "", CF_KEY_STRING, CF_CONV_NONE, "katz2003", 0, 0, PETSC_FALSE, PETSC_FALSE, F(melting_model), NOSET,
   "melting model: katz2003 (Katz, Spiegelman & Langmuir 2003) or linear (verification)"},
  {"melting", "entropy_of_fusion", "J/kg/K", CF_KEY_REAL, CF_CONV_NONE, "300", 0, 1000, PETSC_FALSE, PETSC_FALSE, F(entropy_of_fusion), NOSET,
   "entropy of fusion; latent heat is T dS; 0 turns latent heat off (Katz, Spiegelman & Langmuir 2003, Table 2)"},

  /* Transient runs: a scenario with time.end > 0 is integrated in time (src/transient). */
  {"time", "end", "Myr", CF_KEY_REAL, CF_CONV_NONE, "0", 0, 1000, PETSC_FALSE, PETSC_FALSE, F(time_end_myr), NOSET,
   "model time at which a transient run ends; 0 makes the run steady"},
  {"time", "step", "Myr", CF_KEY_REAL, CF_CONV_NONE, "0.05", 0, 100, PETSC_TRUE, PETSC_FALSE, F(time_step_myr), NOSET,
   "time step (the first step when time.adaptive); the implicit methods are stable at any Courant number (common practice, no source)"},
  {"time", "method", "", CF_KEY_STRING, CF_CONV_NONE, "sdirk2", 0, 0, PETSC_FALSE, PETSC_FALSE, F(time_method), NOSET,
   "beuler (backward Euler, first order) or sdirk2 (two-stage L-stable second order, Alexander 1977, SIAM J. Numer. Anal. 14)"},
  {"time", "adaptive", "", CF_KEY_BOOL, CF_CONV_NONE, "false", 0, 0, PETSC_FALSE, PETSC_FALSE, F(time_adaptive), NOSET,
   "adapt the step to keep the embedded local error estimate below time.tolerance (sdirk2 only)"},
  {"time", "tolerance", "K", CF_KEY_REAL, CF_CONV_NONE, "1", 0, 1000, PETSC_TRUE, PETSC_FALSE, F(time_tolerance), NOSET,
   "adaptive steps: largest local error per step in temperature (depletion: the same fraction of the mantle-surface temperature difference) (common practice, no source)"},
  {"time", "start", "", CF_KEY_STRING, CF_CONV_NONE, "steady", 0, 0, PETSC_FALSE, PETSC_FALSE, F(time_start), NOSET,
   "initial state: steady (the steady solution of the parameters at time 0) or startup (a uniform adiabat under a thin cold lid: a ridge starting up)"},
  {"time", "lid_thickness", "km", CF_KEY_REAL, CF_CONV_KM, "5", 0, 100, PETSC_TRUE, PETSC_FALSE, F(time_lid_thickness), NOSET,
   "startup: thickness of the cold lid, T = Ts + (T_adiabat - Ts) erf(z / lid_thickness) (common practice, no source)"},
  {"time", "max_steps", "1", CF_KEY_REAL, CF_CONV_NONE, "0", 0, 1e9, PETSC_FALSE, PETSC_FALSE, F(time_max_steps), NOSET,
   "stop after this many steps from time 0, writing a checkpoint to resume from; 0: no limit"},
  {"history", "full_spreading_rate", "Myr, mm/yr", CF_KEY_REAL_LIST, CF_CONV_NONE, "", 0, 1000, PETSC_FALSE, PETSC_FALSE, F(history_full_spreading_rate), NOSET,
   "full spreading rate against time, pairs t0, v0, t1, v1, ... (Myr, mm/yr), linear between, constant beyond; empty: ridge.full_spreading_rate throughout"},
  {"history", "potential_temperature", "Myr, C", CF_KEY_REAL_LIST, CF_CONV_NONE, "", 0, 1800, PETSC_FALSE, PETSC_FALSE, F(history_potential_temperature), NOSET,
   "mantle potential temperature against time, pairs t0, T0, t1, T1, ... (Myr, C), linear between, constant beyond; empty: mantle.potential_temperature throughout"},
  {"checkpoint", "every_steps", "1", CF_KEY_REAL, CF_CONV_NONE, "50", 0, 1e9, PETSC_FALSE, PETSC_FALSE, F(checkpoint_every_steps), NOSET,
   "write a checkpoint every this many steps; 0: never by step count"},
  {"checkpoint", "every_minutes", "min", CF_KEY_REAL, CF_CONV_NONE, "30", 0, 1e6, PETSC_FALSE, PETSC_FALSE, F(checkpoint_every_minutes), NOSET,
   "write a checkpoint every this many minutes of wall time; 0: never by the clock"},
  {"checkpoint", "keep", "1", CF_KEY_REAL, CF_CONV_NONE, "2", 1, 1000, PETSC_FALSE, PETSC_FALSE, F(checkpoint_keep), NOSET,
   "how many of the latest checkpoints to keep"},
  {"snapshots", "every_steps", "1", CF_KEY_REAL, CF_CONV_NONE, "0", 0, 1e9, PETSC_FALSE, PETSC_FALSE, F(snapshot_every_steps), NOSET,
   "write the fields every this many steps into the HDF5 time series (snapshots/, with an XDMF time collection); 0: none"},

  {"output", "dir", "", CF_KEY_STRING, CF_CONV_NONE, "crustforge-output", 0, 0, PETSC_FALSE, PETSC_FALSE, F(output_dir), NOSET,
   "directory for the run's files; created, never overwritten unless output.overwrite"},
  {"output", "overwrite", "", CF_KEY_BOOL, CF_CONV_NONE, "false", 0, 0, PETSC_FALSE, PETSC_FALSE, F(output_overwrite), NOSET,
   "allow writing into an output.dir that already holds files"},
  {"output", "figures", "", CF_KEY_BOOL, CF_CONV_NONE, "true", 0, 0, PETSC_FALSE, PETSC_FALSE, F(output_figures), NOSET,
   "write the PNG figures of the run (needs PLplot's pngcairo driver; skipped with a note when it is missing)"},

  /* Post-processor settings (postprocess/): re-analysing a saved run with other values of these
     needs no new solve (crustforge-post). */
  {"extraction", "focusing_width", "km", CF_KEY_REAL, CF_CONV_KM, "0", 0, 10000, PETSC_FALSE, PETSC_FALSE, F(extraction_focusing_width), NOSET,
   "melt made farther than this from the axis is not delivered to the crust; 0 delivers all melt (default: all melt reaches the axis, common practice, no source)"},
  {"extraction", "min_depletion", "1", CF_KEY_REAL, CF_CONV_NONE, "0", 0, 1, PETSC_FALSE, PETSC_FALSE, F(extraction_min_depletion), NOSET,
   "melt made where the depletion of the residue is below this stays in the residue; 0 delivers all (common practice, no source)"},
  {"extraction", "lid_temperature", "C", CF_KEY_REAL, CF_CONV_CELSIUS, "0", 0, 1800, PETSC_FALSE, PETSC_FALSE, F(extraction_lid_temperature), NOSET,
   "melt made where the mantle is colder than this freezes in the lid; 0 turns the lid off (default; common practice, no source)"},

  {"observables", "melt_lens_isotherm", "C", CF_KEY_REAL, CF_CONV_CELSIUS, "1200", 100, 1800, PETSC_FALSE, PETSC_FALSE, F(melt_lens_isotherm), NOSET,
   "isotherm whose shallowest depth at the axis is reported as the melt-lens depth; 1150-1200 C, meaningful with hydrothermal cooling on (common practice, no source)"},
  {"observables", "lithosphere_isotherm", "C", CF_KEY_REAL, CF_CONV_CELSIUS, "1100", 100, 1800, PETSC_FALSE, PETSC_FALSE, F(lithosphere_isotherm), NOSET,
   "isotherm whose depth is reported as the lithosphere thickness (common practice, no source)"},
  {"observables", "ridge_depth", "km", CF_KEY_REAL, CF_CONV_KM, "2.5", 0, 10, PETSC_FALSE, PETSC_FALSE, F(ridge_depth), NOSET,
   "seafloor depth at the axis, the reference of the isostatic depth profile (2500 m at zero age: Parsons & Sclater 1977, JGR 82)"},

  {"pt_paths", "start_x", "km", CF_KEY_REAL_LIST, CF_CONV_KM, "2,10,20,40,60", 0, 10000, PETSC_FALSE, PETSC_FALSE, F(pt_path_start_x), NOSET,
   "distances from the axis where the parcels of the P-T paths enter at the bottom, a list of at most 16, empty for none; values at or beyond grid.width are skipped (common practice, no source)"},
};

const size_t CFKeyCount = sizeof(CFKeys) / sizeof(CFKeys[0]);
