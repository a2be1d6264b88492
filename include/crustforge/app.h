/* The command-line program's pieces: exit statuses, error reports, the output directory and
   the run driver. */
#ifndef CRUSTFORGE_APP_H
#define CRUSTFORGE_APP_H

#include <crustforge/config.h>
#include <crustforge/postprocess.h>
#include <crustforge/steady.h>

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

/* Extend the heap by this rank's share of the run's expected peak memory on transparent huge
   pages, before the solver allocates (heap.c). Collective. */
PETSC_EXTERN PetscErrorCode CFHeapReserve(MPI_Comm comm, const CFConfig *cfg);
/* Unless OMP_NUM_THREADS is set, give each rank its node's processors divided among the node's
   ranks as OpenMP threads (at least one); nthreads is the count in use (threads.c). Collective. */
PETSC_EXTERN PetscErrorCode CFThreadsDefault(MPI_Comm comm, PetscInt *nthreads);

/* Create cfg->output_dir (and parents).  Refuses a directory that already holds files unless
   output.overwrite is set, and a path that is not a directory. Collective. */
PETSC_EXTERN PetscErrorCode CFOutputDirPrepare(MPI_Comm comm, const CFConfig *cfg);
/* The lock: CFOutputDirPrepare takes output.dir/.lock (refusing a directory another live run
   holds; a killed run's lock is taken over); CFOutputDirRelease drops it (rank 0 of comm), and
   whatever is still held is dropped at exit.  The signal variant only unlinks (stop.c). */
PETSC_EXTERN PetscErrorCode CFOutputDirRelease(MPI_Comm comm, const CFConfig *cfg);
PETSC_EXTERN void           CFOutputDirUnlockAllFromSignal(void);
/* SIGTERM/SIGINT outside a transient run: a one-line message, the lock dropped, then the
   signal's default action (stop.c). */
PETSC_EXTERN PetscErrorCode CFStopHandlersInstall(void);

/* After a converged solve of s: the summary into sum (may be NULL) and, when write is true, the
   run file, tables and figures into the scenario's output.dir (the steady run's output; a sweep
   asks only for the summary of most cases).  Collective. */
PETSC_EXTERN PetscErrorCode CFRunSteadyResults(MPI_Comm comm, CFSteady s, const CFSolveReport *rep, PetscBool write, CFSummary *sum);
/* The whole steady run: solve, write, post-process, summarise. */
PETSC_EXTERN PetscErrorCode CFRunSteady(MPI_Comm comm, const CFConfig *cfg);
/* crustforge sweep SWEEP.yaml: a grid of steady cases over MPI groups (src/app/sweep_run.c). */
PETSC_EXTERN PetscErrorCode CFRunSweep(MPI_Comm comm, const char file[], int argc, char **argv);

#endif
