/* A saved run as the post-processor sees it: the run file's scenario rebuilt through the key
   table (so it validates exactly as a scenario file does), then every field and the solver's
   figures. */
#include <math.h>
#include <crustforge/rundata.h>

/* A root attribute that a run file may lack (older writers): NaN, or -1 for counts. */
static PetscErrorCode OptionalReal(CFRunReader r, const char name[], PetscReal *v)
{
  PetscBool has;

  PetscFunctionBeginUser;
  *v = NAN;
  PetscCall(CFRunReaderHasAttribute(r, name, &has));
  if (has) PetscCall(CFRunReaderGetAttributeReal(r, name, v));
  PetscFunctionReturn(0);
}

static PetscErrorCode OptionalInt(CFRunReader r, const char name[], PetscInt *v)
{
  PetscBool has;

  PetscFunctionBeginUser;
  *v = -1;
  PetscCall(CFRunReaderHasAttribute(r, name, &has));
  if (has) PetscCall(CFRunReaderGetAttributeInt(r, name, v));
  PetscFunctionReturn(0);
}

static PetscErrorCode ReadFields(MPI_Comm comm, CFRunReader r, CFRunData *data)
{
  DM  da;
  Vec v;

  PetscFunctionBeginUser;
  PetscCall(DMDACreate2d(comm, DM_BOUNDARY_NONE, DM_BOUNDARY_NONE, DMDA_STENCIL_STAR, data->nx, data->nz, PETSC_DECIDE, PETSC_DECIDE, 1, 1, NULL, NULL, &da));
  PetscCall(DMSetUp(da));
  PetscCall(DMCreateGlobalVector(da, &v));
  for (PetscInt f = 0; f < CF_NFIELDS; f++) {
    PetscCall(CFRunReaderReadField(r, CFRunFields[f].name, v));
    PetscCall(CFRunDataSetReadField(comm, data, (CFFieldId)f, da, v));
  }
  PetscCall(VecDestroy(&v));
  PetscCall(DMDestroy(&da));
  PetscFunctionReturn(0);
}

/* Everything after opening, so that the reader is destroyed whatever fails. */
static PetscErrorCode LoadFromReader(MPI_Comm comm, CFRunReader r, const char path[], int argc, char **argv, CFRunData *data)
{
  CFConfig  cfg;
  PetscInt  nx, nz;
  PetscBool has;

  PetscFunctionBeginUser;
  PetscCall(CFRunReaderInsertScenario(r, NULL));
  /* PetscInitialize put the command line in first; again now, so that it wins over the file */
  if (argc > 1) PetscCall(PetscOptionsInsertArgs(NULL, argc - 1, argv + 1));
  PetscCall(CFConfigSetFromOptions(comm, &cfg));
  PetscCall(CFRunReaderHasAttribute(r, "scenario_file", &has));
  if (has) PetscCall(CFRunReaderGetAttributeString(r, "scenario_file", cfg.scenario, sizeof(cfg.scenario)));
  PetscCall(CFRunReaderGetGrid(r, &nx, &nz));
  PetscCheck(nx == cfg.nx && nz == cfg.nz, comm, PETSC_ERR_FILE_UNEXPECTED, "run file '%s': its fields are %" PetscInt_FMT " x %" PetscInt_FMT " cells, its scenario gives %" PetscInt_FMT " x %" PetscInt_FMT, path, nx, nz, cfg.nx, cfg.nz);
  PetscCall(CFRunDataCreate(comm, &cfg, data));
  PetscCall(ReadFields(comm, r, data));
  PetscCall(OptionalInt(r, "nonlinear_iterations", &data->nonlinear_iterations));
  PetscCall(OptionalInt(r, "linear_iterations", &data->linear_iterations));
  PetscCall(OptionalReal(r, "residual_norm", &data->residual_norm));
  PetscCall(OptionalReal(r, "solve_seconds", &data->solve_seconds));
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunDataLoad(MPI_Comm comm, const char path[], int argc, char **argv, CFRunData *data)
{
  CFRunReader    r;
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  PetscCall(PetscMemzero(data, sizeof(*data)));
  PetscCall(CFRunReaderOpen(comm, path, &r));
  ierr = LoadFromReader(comm, r, path, argc, argv, data);
  PetscCall(CFRunReaderDestroy(&r));
  if (ierr) PetscCall(CFRunDataDestroy(data));
  PetscCall(ierr);
  PetscFunctionReturn(0);
}
