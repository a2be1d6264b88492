/* SIGINT and SIGTERM during a transient run: the handler only records the signal; the driver
   finishes the step, writes a checkpoint and exits with CF_EXIT_INTERRUPTED.  The flag is the
   one process-wide variable a signal handler can safely set; it holds no model state. */
#include <signal.h>
#include "transient_impl.h"

static volatile sig_atomic_t received = 0;
static struct sigaction      old_int, old_term;

static void Handler(int signo) { received = signo; }

PetscErrorCode CFSignalsInstall(void)
{
  struct sigaction sa;

  PetscFunctionBeginUser;
  received = 0;
  sa.sa_handler = Handler;
  sigemptyset(&sa.sa_mask);
  sa.sa_flags = SA_RESTART;
  PetscCheck(!sigaction(SIGINT, &sa, &old_int) && !sigaction(SIGTERM, &sa, &old_term), PETSC_COMM_SELF, PETSC_ERR_SYS, "cannot install the SIGINT/SIGTERM handlers");
  PetscFunctionReturn(0);
}

PetscErrorCode CFSignalsRestore(void)
{
  PetscFunctionBeginUser;
  (void)sigaction(SIGINT, &old_int, NULL);
  (void)sigaction(SIGTERM, &old_term, NULL);
  PetscFunctionReturn(0);
}

PetscErrorCode CFSignalsPending(MPI_Comm comm, int *signo)
{
  int local = (int)received;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Allreduce(&local, signo, 1, MPI_INT, MPI_MAX, comm));
  PetscFunctionReturn(0);
}
