/* The post-processor: melt extraction, crustal thickness, pooled-melt statistics and the
   observables compared with data (DESIGN 2.5).  It works on a CFRunData (fields gathered on
   rank 0), so the solver's end-of-run summary and crustforge-post on a saved run are the same
   computation.  Computations run on rank 0; results are broadcast to every rank. */
#ifndef CRUSTFORGE_POSTPROCESS_H
#define CRUSTFORGE_POSTPROCESS_H

#include <crustforge/rundata.h>
#include <crustforge/melting.h>

#define CF_MAX_PATHS 16

/* Extraction and observable settings, SI, from the scenario's keys (CFPostSettingsFromConfig). */
typedef struct {
  PetscReal focusing_width;       /* m: melt made farther from the axis is not delivered; <= 0: all delivered */
  PetscReal min_depletion;        /* melt made where F_d is below this stays in the residue */
  PetscReal lid_temperature;      /* K: melt made where T is below this freezes in the lid; <= 0: none */
  PetscReal melt_lens_isotherm;   /* K */
  PetscReal lithosphere_isotherm; /* K */
  PetscReal ridge_depth;          /* m: seafloor depth at the axis (isostasy reference) */
  PetscInt  npaths;
  PetscReal path_start_x[CF_MAX_PATHS]; /* m: distance from the axis where each parcel enters at the bottom */
} CFPostSettings;

typedef struct {
  PetscReal crustal_thickness;           /* m, from the delivered melt */
  PetscReal crustal_thickness_side_flux; /* m, from the far-side depletion flux (all melt) */
  PetscReal melt_onset_depth;            /* m, where the axis column crosses the solidus */
  PetscReal max_depletion;
  PetscReal mean_melt_fraction;          /* melting-rate-weighted mean F_d of the delivered melt */
  PetscReal mean_melting_pressure;       /* Pa, melting-rate weighted */
  PetscReal regime_mean_melt_fraction;   /* Plank & Langmuir 1992: melt flux / mantle flux into the melting region */
  PetscReal melt_flux;                   /* kg m-1 s-1 delivered, per unit ridge length, half domain */
  PetscReal melting_region_width;        /* m, greatest distance from the axis with melting */
  PetscReal melting_region_area;         /* m2, half domain */
  PetscReal melt_lens_depth;             /* m, NaN where the isotherm does not cross the axis column */
} CFSummary;

/* Observables against plate age along the surface, one entry per column. */
typedef struct {
  PetscInt   n;
  PetscReal *x, *age;              /* m, s (age = x / U0) */
  PetscReal *heat_flow;            /* W m-2 */
  PetscReal *seafloor_depth;       /* m, isostatic, ridge_depth at the axis */
  PetscReal *lithosphere_thickness;/* m, depth of lithosphere_isotherm, NaN where absent */
} CFProfiles;

/* Parcels followed along streamlines from the bottom, with what they carry. */
typedef struct {
  PetscInt   npaths;
  PetscInt   npoints[CF_MAX_PATHS];
  PetscReal *x[CF_MAX_PATHS], *z[CF_MAX_PATHS], *time[CF_MAX_PATHS]; /* m, m, s since entry */
  PetscReal *P[CF_MAX_PATHS], *T[CF_MAX_PATHS], *F[CF_MAX_PATHS];    /* Pa, K, depletion */
} CFPTPaths;

PETSC_EXTERN PetscErrorCode CFPostSettingsFromConfig(const CFConfig *cfg, CFPostSettings *set);
PETSC_EXTERN PetscErrorCode CFPostSummary(MPI_Comm comm, const CFRunData *run, const CFPostSettings *set, CFSummary *sum);
PETSC_EXTERN PetscErrorCode CFPostProfiles(MPI_Comm comm, const CFRunData *run, const CFPostSettings *set, CFProfiles *prof);
PETSC_EXTERN PetscErrorCode CFPostProfilesDestroy(CFProfiles *prof);
PETSC_EXTERN PetscErrorCode CFPostPTPaths(MPI_Comm comm, const CFRunData *run, const CFPostSettings *set, CFPTPaths *paths);
PETSC_EXTERN PetscErrorCode CFPostPTPathsDestroy(CFPTPaths *paths);

/* Everything a run leaves in its directory: prints the summary, writes summary.csv, profiles.csv,
   pt_paths.csv and (when figures is true) the PNG figures. Files are written under temporary
   names and renamed. Collective. */
PETSC_EXTERN PetscErrorCode CFPostRun(MPI_Comm comm, const CFRunData *run, const CFPostSettings *set, const char dir[], PetscBool figures);

/* summary.csv's columns for tables of many runs (a sweep): the header names and one row of
   values (15 significant digits, "nan"), each followed by end ("\n", or "," before more columns).
   For a run without a summary (a failed solve) pass a CFSummary of NaNs. Any process. */
PETSC_EXTERN void CFPostSummaryCSVHeader(FILE *fp, const char end[]);
PETSC_EXTERN void CFPostSummaryCSVRow(FILE *fp, const CFRunData *run, const CFPostSettings *set, const CFSummary *sum, const char end[]);

#endif
