/* What a run file holds besides its fields: the grid coordinates, the provenance of the run and
   every resolved scenario key.  Attribute writes are collective, so every rank passes the same
   values (the date is taken on rank 0 and broadcast). */
#include <string.h>
#include <time.h>
#include <crustforge/units.h>
#include "crustforge_version.h"
#include "output_impl.h"

static const char *const reserved[] = {CF_ATTR_FORMAT, CF_ATTR_FORMAT_VERSION, CF_ATTR_VERSION, CF_ATTR_REVISION, CF_ATTR_PETSC, CF_ATTR_HDF5, CF_ATTR_RANKS, CF_ATTR_CREATED, CF_ATTR_SCENARIO_FILE};

PetscBool CFRunAttributeReserved_Private(const char name[])
{
  for (size_t i = 0; i < sizeof(reserved) / sizeof(reserved[0]); i++)
    if (!strcmp(name, reserved[i])) return PETSC_TRUE;
  return PETSC_FALSE;
}

/* A 1-D coordinate dataset of the n cell centres (i + 0.5) h, in km. */
static PetscErrorCode WriteCoordinate(CFRunFile f, const char name[], PetscInt n, PetscReal h, const char long_name[], const char axis[], const char positive[])
{
  Vec          c;
  PetscInt     lo, hi;
  PetscScalar *a;
  char         path[CF_NAME_LEN + 1];

  PetscFunctionBeginUser;
  PetscCall(VecCreateMPI(f->comm, PETSC_DECIDE, n, &c));
  PetscCall(VecGetOwnershipRange(c, &lo, &hi));
  PetscCall(VecGetArray(c, &a));
  for (PetscInt i = lo; i < hi; i++) a[i - lo] = CFMToKm((i + 0.5) * h);
  PetscCall(VecRestoreArray(c, &a));
  PetscCall(PetscObjectSetName((PetscObject)c, name));
  PetscCall(VecView(c, f->viewer));
  PetscCall(VecDestroy(&c));
  PetscCall(PetscSNPrintf(path, sizeof(path), "/%s", name));
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, path, "units", PETSC_STRING, "km"));
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, path, "long_name", PETSC_STRING, long_name));
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, path, "axis", PETSC_STRING, axis));
  if (positive) PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, path, "positive", PETSC_STRING, positive));
  PetscFunctionReturn(0);
}

static PetscErrorCode WriteProvenance(CFRunFile f, const CFConfig *cfg)
{
  PetscInt    major, minor, sub, ranks;
  unsigned    hmajor, hminor, hrelease;
  PetscMPIInt rank, size;
  char        text[64], date[32] = "";

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(f->comm, &rank));
  PetscCallMPI(MPI_Comm_size(f->comm, &size));
  if (!rank) {
    time_t    now = time(NULL);
    struct tm utc;
    if (!gmtime_r(&now, &utc) || !strftime(date, sizeof(date), "%Y-%m-%dT%H:%M:%SZ", &utc)) PetscCall(PetscStrncpy(date, "unknown", sizeof(date)));
  }
  PetscCallMPI(MPI_Bcast(date, sizeof(date), MPI_CHAR, 0, f->comm));
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, "/", CF_ATTR_VERSION, PETSC_STRING, CRUSTFORGE_VERSION));
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, "/", CF_ATTR_REVISION, PETSC_STRING, CRUSTFORGE_REVISION));
  PetscCall(PetscGetVersionNumber(&major, &minor, &sub, NULL));
  PetscCall(PetscSNPrintf(text, sizeof(text), "%" PetscInt_FMT ".%" PetscInt_FMT ".%" PetscInt_FMT, major, minor, sub));
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, "/", CF_ATTR_PETSC, PETSC_STRING, text));
  PetscCheck(H5get_libversion(&hmajor, &hminor, &hrelease) >= 0, f->comm, PETSC_ERR_LIB, "HDF5 does not report its version");
  PetscCall(PetscSNPrintf(text, sizeof(text), "%u.%u.%u", hmajor, hminor, hrelease));
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, "/", CF_ATTR_HDF5, PETSC_STRING, text));
  ranks = size;
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, "/", CF_ATTR_RANKS, PETSC_INT, &ranks));
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, "/", CF_ATTR_CREATED, PETSC_STRING, date));
  if (cfg->scenario[0]) PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, "/", CF_ATTR_SCENARIO_FILE, PETSC_STRING, cfg->scenario));
  PetscFunctionReturn(0);
}

/* One attribute per key in /scenario: a number in the user's unit for real keys, the text
   otherwise; the unit, where there is one, under the same name in /scenario/units. */
static PetscErrorCode WriteScenario(CFRunFile f, const CFConfig *cfg)
{
  PetscInt       n;
  CFConfigEntry *e;

  PetscFunctionBeginUser;
  PetscCall(PetscViewerHDF5WriteGroup(f->viewer, CF_GROUP_SCENARIO));
  PetscCall(CFConfigGetEntries(cfg, &n, &e));
  for (PetscInt i = 0; i < n; i++) {
    if (e[i].is_real) PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, CF_GROUP_SCENARIO, e[i].key, PETSC_REAL, &e[i].real_value));
    else PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, CF_GROUP_SCENARIO, e[i].key, PETSC_STRING, e[i].value));
    if (e[i].unit && e[i].unit[0]) PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, CF_GROUP_SCENARIO_UNITS, e[i].key, PETSC_STRING, e[i].unit));
  }
  PetscCall(PetscFree(e));
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunFileWriteHeader_Private(CFRunFile f, const CFConfig *cfg)
{
  PetscFunctionBeginUser;
  PetscCall(WriteCoordinate(f, "x", f->nx, cfg->dx, "distance from the ridge axis (cell centres)", "X", NULL));
  PetscCall(WriteCoordinate(f, "z", f->nz, cfg->dz, "depth below the seafloor (cell centres)", "Z", "down"));
  PetscCall(WriteProvenance(f, cfg));
  PetscCall(WriteScenario(f, cfg));
  PetscFunctionReturn(0);
}
