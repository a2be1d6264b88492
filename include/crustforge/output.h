/* Run output: one self-describing HDF5 file per run (fields on the cell-centre grid, grid
   coordinates, scenario, provenance), an XDMF 3 sidecar so that ParaView and VisIt open it, and
   the reader the post-processor uses.  The layout is documented in the README ("Run file
   layout").  Everything here is collective on the communicator given at creation. */
#ifndef CRUSTFORGE_OUTPUT_H
#define CRUSTFORGE_OUTPUT_H

#include <petscdm.h>
#include <crustforge/config.h>

#define CF_RUN_FORMAT         "crustforge-run" /* value of the root attribute "format" */
#define CF_RUN_FORMAT_VERSION 1                /* root attribute "format_version" */
#define CF_LONG_NAME_LEN      256

/* How a field is stored: stored value = scale * SI value + offset, in the unit `units`.
   name is the dataset name and must be a C identifier ([A-Za-z_][A-Za-z0-9_]*); units and
   si_units are UDUNITS/CF spellings ("degC", "K", "mm/yr", "m/s", "1" for dimensionless).
   Conversions come from crustforge/units.h (K -> degC: scale 1, offset -CF_KELVIN_OFFSET). */
typedef struct {
  const char *name, *long_name, *units, *si_units;
  PetscReal   scale, offset;
} CFFieldInfo;

/* The same, as read back from a file (storage owned by the record). */
typedef struct {
  char      name[CF_NAME_LEN], long_name[CF_LONG_NAME_LEN], units[CF_NAME_LEN], si_units[CF_NAME_LEN];
  PetscReal scale, offset;
} CFFieldRecord;

/* ---- Writing ------------------------------------------------------------------------------ */
typedef struct _n_CFRunFile *CFRunFile;

/* Open <path>.tmp for writing and write the grid coordinates x and z (km, cell centres), the
   provenance attributes and every resolved scenario key (group /scenario).  da is the run's 2-D
   cell-centred DMDA (dof 1); its size must be cfg->nx by cfg->nz.  The file only gets its final
   name, and the marker attribute "format", in a successful CFRunFileClose(). */
PETSC_EXTERN PetscErrorCode CFRunFileCreate(MPI_Comm comm, const CFConfig *cfg, DM da, const char path[], CFRunFile *file);
/* Write v (SI, a global Vec of the run's DMDA) as dataset info->name, shape [nz][nx] in natural
   ordering whatever the rank count, with attributes units, long_name, si_units, si_scale,
   si_offset.  Each name at most once per file. */
PETSC_EXTERN PetscErrorCode CFRunFileWriteField(CFRunFile file, const CFFieldInfo *info, Vec v);
/* A root attribute for a figure of the run (nonlinear_iterations, residual_norm, solve_seconds,
   ...).  Every rank must pass the same value. */
PETSC_EXTERN PetscErrorCode CFRunFileSetAttributeReal(CFRunFile file, const char name[], PetscReal value);
PETSC_EXTERN PetscErrorCode CFRunFileSetAttributeInt(CFRunFile file, const char name[], PetscInt value);
/* success: mark, flush and close the file, write the XDMF sidecar (<path without .h5>.xdmf, which
   refers to the HDF5 file by its base name), then rename both into place (HDF5 first, so that a
   sidecar never points at a missing file).  !success: close and remove the temporary files, so a
   failed run leaves nothing that looks complete.  Either way *file is destroyed. */
PETSC_EXTERN PetscErrorCode CFRunFileClose(CFRunFile *file, PetscBool success);

/* ---- Reading ------------------------------------------------------------------------------ */
typedef struct _n_CFRunReader *CFRunReader;

/* Open a run file written by CFRunFileClose().  A missing or unreadable file fails with
   PETSC_ERR_FILE_OPEN; a file that is not HDF5, is damaged or truncated, is not a crustforge run,
   was never completed, or is of a newer format fails with PETSC_ERR_FILE_UNEXPECTED.  The
   message is one line naming the file and the cause. */
PETSC_EXTERN PetscErrorCode CFRunReaderOpen(MPI_Comm comm, const char path[], CFRunReader *reader);
PETSC_EXTERN PetscErrorCode CFRunReaderDestroy(CFRunReader *reader);
/* Grid cells across (x) and down (z). */
PETSC_EXTERN PetscErrorCode CFRunReaderGetGrid(CFRunReader reader, PetscInt *nx, PetscInt *nz);
/* The fields in the file, sorted by name; the array belongs to the reader. */
PETSC_EXTERN PetscErrorCode CFRunReaderGetFields(CFRunReader reader, PetscInt *n, const CFFieldRecord **fields);
/* Read field name into v (a global Vec of a DMDA of the file's grid, dof 1), converted to SI. */
PETSC_EXTERN PetscErrorCode CFRunReaderReadField(CFRunReader reader, const char name[], Vec v);
/* The scenario keys stored in the file, sorted by key, with .key, .option, .value (text in the
   user's unit), .unit, .is_real and .real_value filled.  The array belongs to the reader. */
PETSC_EXTERN PetscErrorCode CFRunReaderGetScenario(CFRunReader reader, PetscInt *n, const CFConfigEntry **entries);
/* Put every stored scenario key into options (NULL: the default database) as "-section_key
   value", replacing what was there.  Then CFConfigSetFromOptions() rebuilds the run's CFConfig;
   insert any overrides (e.g. the command line again, PetscOptionsInsertArgs) between the two. */
PETSC_EXTERN PetscErrorCode CFRunReaderInsertScenario(CFRunReader reader, PetscOptions options);
/* Root attributes (provenance and run figures); a missing attribute is PETSC_ERR_FILE_UNEXPECTED. */
PETSC_EXTERN PetscErrorCode CFRunReaderHasAttribute(CFRunReader reader, const char name[], PetscBool *has);
PETSC_EXTERN PetscErrorCode CFRunReaderGetAttributeReal(CFRunReader reader, const char name[], PetscReal *value);
PETSC_EXTERN PetscErrorCode CFRunReaderGetAttributeInt(CFRunReader reader, const char name[], PetscInt *value);
PETSC_EXTERN PetscErrorCode CFRunReaderGetAttributeString(CFRunReader reader, const char name[], char value[], size_t len);

#endif
