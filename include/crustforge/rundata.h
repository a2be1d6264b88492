/* A finished run as the post-processor sees it: the scenario, the grid and the cell fields in
   SI, gathered in natural order ([j * nx + i], j down from the surface, i out from the axis) on
   rank 0 of the communicator.  The solver fills one at the end of every run from its vectors and
   crustforge-post fills one from a run file; both pass the fields through the same stored
   representation, so the two give bit-identical summaries. */
#ifndef CRUSTFORGE_RUNDATA_H
#define CRUSTFORGE_RUNDATA_H

#include <petscdmda.h>
#include <crustforge/config.h>
#include <crustforge/output.h>

/* The fields of a run, in the order they are written. */
typedef enum {
  CF_FIELD_TEMPERATURE,
  CF_FIELD_DEPLETION,
  CF_FIELD_MELT_FRACTION_EQ,
  CF_FIELD_MELTING_RATE,
  CF_FIELD_VELOCITY_X,
  CF_FIELD_VELOCITY_UP,
  CF_FIELD_PRESSURE,
  CF_FIELD_CONDUCTIVITY,
  CF_FIELD_STREAM_FUNCTION,
  CF_NFIELDS
} CFFieldId;

/* Name, long_name, units and the SI conversion of each field (src/app/fields.c). */
PETSC_EXTERN const CFFieldInfo CFRunFields[CF_NFIELDS];

typedef struct {
  CFConfig   cfg;
  PetscInt   nx, nz;
  PetscReal  dx, dz;                 /* m */
  PetscReal *field[CF_NFIELDS];      /* SI, natural order; NULL except on rank 0 */
  PetscInt   nonlinear_iterations, linear_iterations;
  PetscReal  residual_norm, solve_seconds;
  /* private: the gather of gather_dm's vectors to rank 0, made for the first field and reused */
  DM         gather_dm;
  Vec        gather_natural, gather_zero;
  VecScatter gather;
} CFRunData;

/* Allocate the arrays on rank 0 for cfg's grid. */
PETSC_EXTERN PetscErrorCode CFRunDataCreate(MPI_Comm comm, const CFConfig *cfg, CFRunData *data);
PETSC_EXTERN PetscErrorCode CFRunDataDestroy(CFRunData *data);
/* Gather a global Vec of a dof-1 DMDA into field id, through the stored representation
   (SI -> stored units -> SI exactly as the run file and its reader do). Collective. */
PETSC_EXTERN PetscErrorCode CFRunDataSetField(MPI_Comm comm, CFRunData *data, CFFieldId id, DM da, Vec v);
/* The same for a Vec read by CFRunReaderReadField, which has been through the stored
   representation already: gathered unchanged. Collective. */
PETSC_EXTERN PetscErrorCode CFRunDataSetReadField(MPI_Comm comm, CFRunData *data, CFFieldId id, DM da, Vec v);
/* A saved run: open the run file at path, rebuild its scenario (the stored keys, then the
   command line argc/argv as given to main, so that its values win), read every field of
   CFRunFields and the solver's figures (root attributes nonlinear_iterations,
   linear_iterations, residual_norm, solve_seconds; -1 or NaN where absent).  The fields are
   bit-identical to the CFRunData the solver built for the same run. Collective. */
PETSC_EXTERN PetscErrorCode CFRunDataLoad(MPI_Comm comm, const char path[], int argc, char **argv, CFRunData *data);

#endif
