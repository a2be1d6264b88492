/* The command-line program's pieces: exit statuses, error reports, the output directory and
   the run driver. */
#ifndef CRUSTFORGE_APP_H
#define CRUSTFORGE_APP_H

#include <crustforge/config.h>

/* Exit statuses of every crustforge program. */
enum {
  CF_EXIT_OK            = 0,
  CF_EXIT_INTERNAL      = 1, /* a bug or a resource failure */
  CF_EXIT_INPUT         = 2, /* bad scenario, bad file, refused request */
  CF_EXIT_NOT_CONVERGED = 3, /* a solver did not converge */
  CF_EXIT_INTERRUPTED   = 4  /* stopped by a signal after writing a checkpoint */
};

/* The exit status for a PETSc error code. */
PETSC_EXTERN int CFExitStatus(PetscErrorCode ierr);
/* Print the error behind ierr as one line "prog: message" on stderr (rank 0, or any rank that
   alone failed). */
PETSC_EXTERN void CFReportError(const char prog[], PetscErrorCode ierr);

/* Create cfg->output_dir (and parents).  Refuses a directory that already holds files unless
   output.overwrite is set, and a path that is not a directory. Collective. */
PETSC_EXTERN PetscErrorCode CFOutputDirPrepare(MPI_Comm comm, const CFConfig *cfg);

/* The whole steady run: solve, write, post-process, summarise. */
PETSC_EXTERN PetscErrorCode CFRunSteady(MPI_Comm comm, const CFConfig *cfg);

#endif
