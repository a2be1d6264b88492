/* CFRunData: a run's fields gathered on rank 0 in natural order. */
#include <crustforge/rundata.h>
#include <crustforge/units.h>

PetscErrorCode CFRunDataCreate(MPI_Comm comm, const CFConfig *cfg, CFRunData *d)
{
  PetscMPIInt rank;

  PetscFunctionBeginUser;
  PetscCall(PetscMemzero(d, sizeof(*d)));
  d->cfg = *cfg;
  d->nx  = cfg->nx;
  d->nz  = cfg->nz;
  d->dx  = cfg->dx;
  d->dz  = cfg->dz;
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  if (!rank)
    for (PetscInt f = 0; f < CF_NFIELDS; f++) PetscCall(PetscCalloc1(d->nx * d->nz, &d->field[f]));
  PetscFunctionReturn(0);
}

static PetscErrorCode GatherDestroy(CFRunData *d)
{
  PetscFunctionBeginUser;
  PetscCall(VecScatterDestroy(&d->gather));
  PetscCall(VecDestroy(&d->gather_zero));
  PetscCall(VecDestroy(&d->gather_natural));
  d->gather_dm = NULL;
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunDataDestroy(CFRunData *d)
{
  PetscFunctionBeginUser;
  for (PetscInt f = 0; f < CF_NFIELDS; f++) PetscCall(PetscFree(d->field[f]));
  PetscCall(GatherDestroy(d));
  PetscFunctionReturn(0);
}

/* Natural order on rank 0, values unchanged. */
static PetscErrorCode Gather(MPI_Comm comm, CFRunData *d, CFFieldId id, DM da, Vec v, PetscBool round_trip)
{
  const CFFieldInfo *info = &CFRunFields[id];
  Vec                nat, zero;
  VecScatter         sc;
  PetscMPIInt        rank;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  if (d->gather_dm != da) { /* one scatter for all the fields: building it cost more than using it */
    PetscCall(GatherDestroy(d));
    PetscCall(DMDACreateNaturalVector(da, &d->gather_natural));
    PetscCall(VecScatterCreateToZero(d->gather_natural, &d->gather, &d->gather_zero));
    d->gather_dm = da;
  }
  nat  = d->gather_natural;
  zero = d->gather_zero;
  sc   = d->gather;
  PetscCall(DMDAGlobalToNaturalBegin(da, v, INSERT_VALUES, nat));
  PetscCall(DMDAGlobalToNaturalEnd(da, v, INSERT_VALUES, nat));
  if (round_trip) {
    /* the stored representation and back, with the same operations as the run file and its reader */
    PetscCall(VecScale(nat, info->scale));
    PetscCall(VecShift(nat, info->offset));
    PetscCall(VecShift(nat, -info->offset));
    PetscCall(VecScale(nat, 1.0 / info->scale));
  }
  PetscCall(VecScatterBegin(sc, nat, zero, INSERT_VALUES, SCATTER_FORWARD));
  PetscCall(VecScatterEnd(sc, nat, zero, INSERT_VALUES, SCATTER_FORWARD));
  if (!rank) {
    const PetscScalar *a;
    PetscCall(VecGetArrayRead(zero, &a));
    PetscCall(PetscArraycpy(d->field[id], a, d->nx * d->nz));
    PetscCall(VecRestoreArrayRead(zero, &a));
  }
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunDataSetField(MPI_Comm comm, CFRunData *d, CFFieldId id, DM da, Vec v)
{
  PetscFunctionBeginUser;
  PetscCall(Gather(comm, d, id, da, v, PETSC_TRUE));
  PetscFunctionReturn(0);
}

/* The round trip is not idempotent for a pure scale (velocities, pressure: (v a) / a can move
   by an ulp each time), so a field read from a file, which has made it once, is not sent again. */
PetscErrorCode CFRunDataSetReadField(MPI_Comm comm, CFRunData *d, CFFieldId id, DM da, Vec v)
{
  PetscFunctionBeginUser;
  PetscCall(Gather(comm, d, id, da, v, PETSC_FALSE));
  PetscFunctionReturn(0);
}
