/* SIGTERM and SIGINT outside a transient run (which installs its own, checkpointing handlers):
   say so on stderr in one line and drop the output directory's lock, then die of the signal as
   usual.  Files being written keep their .tmp names, which no reader accepts as complete. */
#include <signal.h>
#include <string.h>
#include <unistd.h>
#include <crustforge/app.h>

static void Stop(int signo)
{
  static const char term[] = "crustforge: stopped by SIGTERM; the run did not finish (files being written are left as *.tmp, incomplete)\n";
  static const char intr[] = "crustforge: stopped by SIGINT; the run did not finish (files being written are left as *.tmp, incomplete)\n";
  const char       *m      = signo == SIGINT ? intr : term;

  if (write(STDERR_FILENO, m, strlen(m)) < 0) { /* nothing more to do in a handler */ }
  CFOutputDirUnlockAllFromSignal();
  signal(signo, SIG_DFL);
  raise(signo);
}

PetscErrorCode CFStopHandlersInstall(void)
{
  struct sigaction sa;

  PetscFunctionBeginUser;
  memset(&sa, 0, sizeof(sa));
  sa.sa_handler = Stop;
  sigemptyset(&sa.sa_mask);
  PetscCheck(!sigaction(SIGINT, &sa, NULL) && !sigaction(SIGTERM, &sa, NULL), PETSC_COMM_SELF, PETSC_ERR_SYS, "cannot install the SIGINT/SIGTERM handlers");
  PetscFunctionReturn(0);
}
