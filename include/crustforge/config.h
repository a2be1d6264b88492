/* Scenario parameters: one struct, filled and validated in one place (src/config*.c).
   Values are SI inside (m, s, K, Pa, kg); a field in any other unit says so in its name.
   No other module reads the options database for model parameters. */
#ifndef CRUSTFORGE_CONFIG_H
#define CRUSTFORGE_CONFIG_H

#include <petscviewer.h>

#define CF_NAME_LEN            64
#define CF_MELTING_MAX_PARAMS  32
#define CF_REAL_LIST_MAX       16

/* A key holding a comma-separated list of reals (YAML [a, b, c]), SI. */
typedef struct {
  PetscInt  n;
  PetscReal v[CF_REAL_LIST_MAX];
} CFRealList;

typedef struct {
  char scenario[PETSC_MAX_PATH_LEN]; /* scenario file as given */

  /* ridge */
  PetscReal full_spreading_rate_mm_yr; /* both plates together */
  PetscReal half_rate;                 /* U0, plate speed, m/s (derived) */

  /* mantle */
  PetscReal potential_temperature; /* K */
  PetscReal water_ppm;             /* bulk H2O, ppm by weight */
  PetscReal mantle_density;        /* kg m-3 */
  PetscReal heat_capacity;         /* J kg-1 K-1 */
  PetscReal conductivity;          /* W m-1 K-1 */
  PetscReal thermal_expansivity;   /* K-1 */
  PetscReal adiabatic_gradient;    /* K m-1 */
  PetscBool adiabatic_gradient_set;/* false: derived as alpha g Tp / cp */

  /* crust and ocean */
  PetscReal crust_density;   /* kg m-3 */
  PetscReal water_density;   /* kg m-3, seawater, for isostasy */

  /* surface and constants */
  PetscReal surface_temperature; /* K */
  PetscReal gravity;             /* m s-2 */

  /* grid: half domain 0 <= x <= width, 0 <= z <= depth (z down) */
  PetscReal width, depth, spacing; /* m, as requested */
  PetscInt  nx, nz;                /* cells (derived) */
  PetscReal dx, dz;                /* m, actual cell size (derived) */

  /* hydrothermal cooling: k_eff = k (1 + (Nu - 1) S_T S_z), smooth switches S */
  PetscReal nusselt;
  PetscReal hydrothermal_temperature_cutoff; /* K */
  PetscReal hydrothermal_depth_cutoff;       /* m */
  PetscReal hydrothermal_temperature_width;  /* K, width of the smooth switch */
  PetscReal hydrothermal_depth_width;        /* m, width of the smooth switch */

  /* melting */
  char      melting_model[CF_NAME_LEN];
  PetscReal entropy_of_fusion;                    /* J kg-1 K-1; latent heat = T dS */
  PetscInt  melting_nparams;                      /* of the chosen model */
  PetscReal melting_params[CF_MELTING_MAX_PARAMS];/* in the model's own published units */

  /* extraction of melt to the crust (post-processor) */
  PetscReal extraction_focusing_width;  /* m; 0: all melt is delivered */
  PetscReal extraction_min_depletion;   /* melt made where F_d is below this is not delivered */
  PetscReal extraction_lid_temperature; /* K; 0 C (273.15 K) turns the lid off */

  /* observables (post-processor) */
  PetscReal melt_lens_isotherm;   /* K */
  PetscReal lithosphere_isotherm; /* K */
  PetscReal ridge_depth;          /* m, seafloor depth at the axis */

  /* P-T paths (post-processor) */
  CFRealList pt_path_start_x; /* m, distances from the axis where parcels enter at the bottom */

  /* transient runs (time.end_myr > 0); times in Myr as the user gives them */
  PetscReal  time_end_myr;          /* 0: a steady run */
  PetscReal  time_step_myr;         /* fixed step, or the first step when adaptive */
  char       time_method[CF_NAME_LEN];
  PetscBool  time_adaptive;
  PetscReal  time_tolerance;        /* K, local error per step when adaptive */
  char       time_start[CF_NAME_LEN];
  PetscReal  time_lid_thickness;    /* m, cold lid of the start-up state */
  PetscReal  time_max_steps;        /* stop (with a checkpoint) after this many steps; 0: none */
  CFRealList history_full_spreading_rate;   /* pairs: Myr, mm/yr */
  CFRealList history_potential_temperature; /* pairs: Myr, C */
  PetscReal  checkpoint_every_steps, checkpoint_every_minutes, checkpoint_keep;
  PetscReal  snapshot_every_steps;

  /* output */
  char      output_dir[PETSC_MAX_PATH_LEN];
  PetscBool output_overwrite;
  PetscBool output_figures;
} CFConfig;

/* Bytes a one-rank steady run of cfg's grid takes at its peak (measured; resources.c). */
PETSC_EXTERN double CFConfigPeakMemory(const CFConfig *cfg);

/* Insert SCENARIO (YAML) into the options database under the command line (argc/argv as given
   to main, so command-line values win), read and validate every key, and fill cfg.
   Bad input fails with PETSC_ERR_USER_INPUT and a one-line message naming the key. */
PETSC_EXTERN PetscErrorCode CFConfigLoad(MPI_Comm comm, const char scenario[], int argc, char **argv, CFConfig *cfg);
/* Fill cfg with the documented defaults only (no options read). */
PETSC_EXTERN PetscErrorCode CFConfigSetDefaults(CFConfig *cfg);
/* Read and validate all keys from the options database as it stands (no file inserted). */
PETSC_EXTERN PetscErrorCode CFConfigSetFromOptions(MPI_Comm comm, CFConfig *cfg);
/* Print every resolved parameter with its unit, in the trade's units. */
PETSC_EXTERN PetscErrorCode CFConfigView(const CFConfig *cfg, PetscViewer viewer);
/* One resolved key as text in the user's unit, for provenance attributes and re-reading. */
typedef struct {
  char        key[2 * CF_NAME_LEN];  /* "section.name" */
  char        option[2 * CF_NAME_LEN + 1]; /* "-section_name" */
  char        value[PETSC_MAX_PATH_LEN];
  const char *unit;                  /* "" when dimensionless or text */
  PetscBool   is_real;
  PetscReal   real_value;            /* in the user's unit, when is_real */
} CFConfigEntry;

/* Every key of the scenario (the table's keys, then the chosen melting model's parameters) with
   its resolved value.  Free with PetscFree(*entries). */
PETSC_EXTERN PetscErrorCode CFConfigGetEntries(const CFConfig *cfg, PetscInt *n, CFConfigEntry **entries);
/* The key table as text: sections, keys, units, defaults, ranges and sources (for --help). */
PETSC_EXTERN PetscErrorCode CFConfigPrintKeys(FILE *fp);

#endif
