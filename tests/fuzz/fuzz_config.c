/* libFuzzer target: the scenario loader and validator (CFConfigLoad) on arbitrary bytes.
   Each input is written to a temporary file, loaded into a cleared options database, and must
   either load or fail as bad input (exit status 2's error classes) without a crash, a leak or
   undefined behaviour.  Built and run by scripts/fuzz.sh. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <crustforge/config.h>

static char path[64];

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
  int fd;
  (void)argc;
  (void)argv;
  if (PetscInitializeNoArguments()) abort();
  PetscPopSignalHandler(); /* libFuzzer reports crashes itself */
  PetscPushErrorHandler(PetscReturnErrorHandler, NULL);
  snprintf(path, sizeof(path), "/tmp/cf_fuzz_config_XXXXXX");
  if ((fd = mkstemp(path)) < 0) abort();
  close(fd);
  return 0;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
  FILE          *fp = fopen(path, "wb");
  CFConfig       cfg;
  char          *argv[] = {(char *)"crustforge", NULL};
  PetscErrorCode ierr;

  if (!fp) abort();
  if (size && fwrite(data, 1, size, fp) != size) abort();
  fclose(fp);
  if (PetscOptionsClear(NULL)) abort();
  ierr = CFConfigLoad(PETSC_COMM_WORLD, path, 1, argv, &cfg);
  switch (ierr) {
  case 0: /* accepted: the derived grid must be usable */
    if (cfg.nx < 8 || cfg.nz < 8 || !(cfg.dx > 0) || !(cfg.dz > 0)) abort();
    break;
  case PETSC_ERR_USER_INPUT:
  case PETSC_ERR_FILE_OPEN:
  case PETSC_ERR_FILE_READ:
  case PETSC_ERR_FILE_UNEXPECTED: break;
  default: /* anything else would be exit status 1: a bug for any input */
    fprintf(stderr, "CFConfigLoad: error code %d for a scenario input\n", (int)ierr);
    abort();
  }
  return 0;
}
