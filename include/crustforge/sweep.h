/* Sweeps: a base scenario and lists or ranges of values for any numeric scenario key; the cases
   are their Cartesian product, each a full steady solve summarised in one row of sweep.csv.

   A sweep file is a scenario (every key allowed, forming the base) plus a section

     sweep:
       ranks_per_case: 1          # MPI ranks that solve one case together (must divide the ranks)
       continuation: false        # true: start each case from the nearest case its group has solved
       run_files: false           # also write each case's run.h5, tables and figures (case-NNNN/)
       ridge:  {full_spreading_rate: [5, 10, 20, 60]}                  # a list
       mantle: {potential_temperature: {from: 1300, to: 1400, step: 50}, # a range: count or step
                water: {from: 50, to: 400, count: 4, scale: log}}        # scale linear (default) or log

   Values are in the key's own unit, each validated against its allowed range before any case runs.
   Case numbers run over the product in the order of the key table (crustforge --help), the first
   swept key fastest. */
#ifndef CRUSTFORGE_SWEEP_H
#define CRUSTFORGE_SWEEP_H

#include <crustforge/config.h>
#include <crustforge/postprocess.h>

#define CF_SWEEP_MAX_AXES   8
#define CF_SWEEP_MAX_VALUES 256
#define CF_SWEEP_MAX_CASES  100000
#define CF_SWEEP_ROW_LEN    4096
#define CF_SWEEP_PATH_LEN   (PETSC_MAX_PATH_LEN + 64) /* output.dir and a file name under it */

typedef struct {
  char      key[2 * CF_NAME_LEN];        /* "ridge.full_spreading_rate" */
  char      option[2 * CF_NAME_LEN + 1]; /* "-ridge_full_spreading_rate" */
  char      unit[32];
  PetscInt  n;
  PetscReal v[CF_SWEEP_MAX_VALUES];      /* in the key's unit */
} CFSweepAxis;

typedef struct {
  char        file[PETSC_MAX_PATH_LEN];
  CFConfig    base;
  PetscInt    naxes;
  CFSweepAxis axis[CF_SWEEP_MAX_AXES];
  PetscInt    ranks_per_case;
  PetscBool   continuation, run_files;
  PetscInt    ncases;
  CFConfig   *cases; /* validated scenario of every case, on every rank */
} CFSweep;

/* Read the sweep file (and the command line argc/argv, which wins), build and validate every case.
   An unknown sweep key or a value outside its key's range: PETSC_ERR_USER_INPUT naming the key and
   the value, before anything is written. Collective. */
PETSC_EXTERN PetscErrorCode CFSweepLoad(MPI_Comm comm, const char file[], int argc, char **argv, CFSweep *sw);
PETSC_EXTERN PetscErrorCode CFSweepDestroy(CFSweep *sw);
/* The cases of the axes: each case's values set in the options database over the base and read
   by the config module (so every value meets its key's range check), the database restored. */
PETSC_EXTERN PetscErrorCode CFSweepCasesCreate(MPI_Comm comm, CFSweep *sw);
/* Index of case c along axis a. */
PETSC_EXTERN PetscInt       CFSweepCaseIndex(const CFSweep *sw, PetscInt c, PetscInt a);
/* Distance of two cases on the grid of values (steps along each axis, summed); PETSC_MAX_INT when
   their grids differ in size, so that one cannot start from the other. */
PETSC_EXTERN PetscInt       CFSweepCaseDistance(const CFSweep *sw, PetscInt a, PetscInt b);
/* "ridge.full_spreading_rate=5 mantle.potential_temperature=1300" */
PETSC_EXTERN void           CFSweepCaseLabel(const CFSweep *sw, PetscInt c, char text[], size_t len);

/* ---- the record of finished cases (record.c): one small file per case, written atomically --- */
/* Create output.dir, or accept it when it holds the record of this same sweep (a resume); refuse
   a directory of another sweep or run (unless output.overwrite, for files other than a record).
   Collective; *resumed tells whether a record was there. */
PETSC_EXTERN PetscErrorCode CFSweepRecordPrepare(MPI_Comm comm, const CFSweep *sw, PetscBool *resumed);
/* The row recorded for case c ("" when the case has not finished); refuses a record of another case. */
PETSC_EXTERN PetscErrorCode CFSweepRecordRead(const CFSweep *sw, PetscInt c, char row[], size_t len);
/* Record case c's row: written to a temporary file, fsync'd and renamed. One process. */
PETSC_EXTERN PetscErrorCode CFSweepRecordWrite(const CFSweep *sw, PetscInt c, const char row[]);
/* How many cases have a record (ok, failed) now. */
PETSC_EXTERN void           CFSweepRecordCount(const CFSweep *sw, PetscInt *done, PetscInt *failed);

/* ---- the table and the figures (table.c, figure.c) ---------------------------------------- */
/* A case's sweep.csv row: case number, the summary.csv columns, the swept keys that summary.csv
   lacks, status ("ok", "failed") and the reason of a failure. sum NULL: a failed case. */
PETSC_EXTERN void           CFSweepRow(const CFSweep *sw, PetscInt c, PetscInt nonlinear_iterations, PetscReal seconds, const CFSummary *sum, const char reason[], char row[], size_t len);
/* sweep.csv from the records, then the figures (when output.figures). Rank 0 only. */
PETSC_EXTERN PetscErrorCode CFSweepWriteTable(const CFSweep *sw);
PETSC_EXTERN PetscErrorCode CFSweepFigures(const CFSweep *sw);

/* ---- progress on stderr (progress.c): a bar with the finish estimate on a terminal ---------- */
typedef struct {
  PetscBool tty;
  double    wall0, last;
  PetscInt  done0, shown;
} CFSweepProgress;
PETSC_EXTERN void CFSweepProgressBegin(CFSweepProgress *p, const CFSweep *sw);
PETSC_EXTERN void CFSweepProgressUpdate(CFSweepProgress *p, const CFSweep *sw, PetscBool force);
PETSC_EXTERN void CFSweepProgressEnd(CFSweepProgress *p);

#endif
