/* Errors as the user sees them: one line naming the cause, and an exit status. */
#include <crustforge/app.h>

int CFExitStatus(PetscErrorCode ierr)
{
  switch (ierr) {
  case 0: return CF_EXIT_OK;
  case PETSC_ERR_USER_INPUT:
  case PETSC_ERR_FILE_OPEN:
  case PETSC_ERR_FILE_READ:
  case PETSC_ERR_FILE_UNEXPECTED:
  case PETSC_ERR_FILE_WRITE: return CF_EXIT_INPUT;
  case PETSC_ERR_NOT_CONVERGED: return CF_EXIT_NOT_CONVERGED;
  case PETSC_ERR_FP: return CF_EXIT_NOT_CONVERGED; /* NaN or Inf in a residual or field: the solve failed */
  case PETSC_ERR_SIG: return CF_EXIT_INTERRUPTED; /* a transient run stopped after its checkpoint */
  default: return CF_EXIT_INTERNAL;
  }
}

void CFReportError(const char prog[], PetscErrorCode ierr)
{
  const char *text     = NULL;
  char       *specific = NULL;

  if (PetscErrorMessage(ierr, &text, &specific)) text = "unknown error";
  if (specific && specific[0]) fprintf(stderr, "%s: %s\n", prog, specific);
  else fprintf(stderr, "%s: %s\n", prog, text ? text : "unknown error");
  fflush(stderr);
}
