/* libFuzzer target: the run-file reader (CFRunReaderOpen and everything it offers) on arbitrary
   bytes written to a temporary file.  Every input must be read or refused as a bad file
   (PETSC_ERR_FILE_*) without a crash, HDF5's own crashes included: the integrity header
   (src/output/integrity.c) must keep damaged files from HDF5.  Seeds: a small run file with its
   header (tests/fuzz/seeds_reader; scripts/fuzz.sh says how it was made). */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <unistd.h>
#include <petscdmda.h>
#include <crustforge/output.h>

static char path[64];

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
  int fd;
  (void)argc;
  (void)argv;
  if (PetscInitializeNoArguments()) abort();
  PetscPopSignalHandler();
  PetscPushErrorHandler(PetscReturnErrorHandler, NULL);
  snprintf(path, sizeof(path), "/tmp/cf_fuzz_reader_XXXXXX");
  if ((fd = mkstemp(path)) < 0) abort();
  close(fd);
  return 0;
}

static int Known(PetscErrorCode e) { return e == PETSC_ERR_FILE_OPEN || e == PETSC_ERR_FILE_UNEXPECTED || e == PETSC_ERR_FILE_READ; }

/* Everything a reader offers, on an opened file; errors of the file's own content are allowed. */
static PetscErrorCode Exercise(CFRunReader r)
{
  PetscInt             nx, nz, nf, ne;
  const CFFieldRecord *fields;
  const CFConfigEntry *entries;
  PetscReal            v;
  PetscOptions         opts;

  PetscFunctionBeginUser;
  PetscCall(CFRunReaderGetGrid(r, &nx, &nz));
  PetscCall(CFRunReaderGetFields(r, &nf, &fields));
  PetscCall(CFRunReaderGetScenario(r, &ne, &entries));
  PetscCall(PetscOptionsCreate(&opts));
  PetscCall(CFRunReaderInsertScenario(r, opts));
  PetscCall(PetscOptionsDestroy(&opts));
  (void)CFRunReaderGetAttributeReal(r, "residual_norm", &v);
  if (nx >= 1 && nz >= 1 && (double)nx * nz <= 1e5) {
    DM  da;
    Vec x;
    PetscCall(DMDACreate2d(PETSC_COMM_WORLD, DM_BOUNDARY_NONE, DM_BOUNDARY_NONE, DMDA_STENCIL_STAR, nx, nz, PETSC_DECIDE, PETSC_DECIDE, 1, 1, NULL, NULL, &da));
    PetscCall(DMSetUp(da));
    PetscCall(DMCreateGlobalVector(da, &x));
    for (PetscInt f = 0; f < nf; f++) (void)CFRunReaderReadField(r, fields[f].name, x);
    PetscCall(VecDestroy(&x));
    PetscCall(DMDestroy(&da));
  }
  PetscFunctionReturn(0);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
  FILE          *fp = fopen(path, "wb");
  CFRunReader    r  = NULL;
  PetscErrorCode ierr;

  if (!fp) abort();
  if (size && fwrite(data, 1, size, fp) != size) abort();
  fclose(fp);
  ierr = CFRunReaderOpen(PETSC_COMM_WORLD, path, &r);
  if (ierr && !Known(ierr)) {
    fprintf(stderr, "CFRunReaderOpen: error code %d for a file input\n", (int)ierr);
    abort();
  }
  if (!ierr) {
    (void)Exercise(r);
    if (CFRunReaderDestroy(&r)) abort();
  }
  return 0;
}
