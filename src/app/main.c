/* crustforge: steady and transient thermal and melt structure beneath a spreading ridge. */
#include <signal.h>
#include <stdlib.h>
#include <string.h>
#include <crustforge/app.h>
#include <crustforge/config.h>
#include <crustforge/transient.h>
#include "crustforge_version.h"

static const char help[] = "crustforge: 2-D thermal and melt model of the mantle beneath a spreading ridge.\n"
                           "Usage: crustforge run SCENARIO.yaml [-section_key value ...] [PETSc options]\n"
                           "       crustforge resume CHECKPOINT.h5 [-section_key value ...]\n"
                           "       crustforge sweep SWEEP.yaml [-section_key value ...]\n"
                           "       crustforge check SCENARIO.yaml [-section_key value ...]\n"
                           "       crustforge --help | --version\n\n";

static void Usage(FILE *fp)
{
  fputs(help, fp);
  fputs("Commands:\n"
        "  run SCENARIO.yaml      solve the steady state (or, with time.end > 0, integrate in time)\n"
        "                         and write the run to output.dir\n"
        "  resume CHECKPOINT.h5   continue a transient run from a checkpoint\n"
        "  check SCENARIO.yaml    load and validate the scenario, print it, exit 0; no solve\n"
        "  sweep SWEEP.yaml       solve a grid of cases (rate x temperature x water): a scenario plus\n"
        "                         sweep: {section: {key: [a, b, ...] or {from, to, count | step}},\n"
        "                         ranks_per_case, continuation, run_files}; writes sweep.csv and\n"
        "                         figures to output.dir; a rerun resumes (see include/crustforge/sweep.h)\n"
        "Any scenario key may be given on the command line as -section_key value; it overrides the\n"
        "file.  PETSc's own options (-snes_*, -ksp_*, -pc_*, -log_view) work as usual.\n"
        "OpenMP threads per MPI rank: OMP_NUM_THREADS if set, else the processors a rank may use\n"
        "divided among the ranks on its node (at least one); the first line of a run says which.\n"
        "Exit status: 0 success, 2 bad input or refused request, 3 solver did not converge,\n"
        "4 interrupted after a checkpoint, 1 anything else.\n\n",
        fp);
}

/* Raised here, not in main: PETSc aborts MPI (exit 95, no message) for an error raised in main. */
static PetscErrorCode NotAvailable(const char cmd[])
{
  PetscFunctionBeginUser;
  SETERRQ(PETSC_COMM_WORLD, PETSC_ERR_USER_INPUT, "%s: not available yet", cmd);
}

static PetscErrorCode Run(int argc, char **argv)
{
  CFConfig cfg;

  PetscFunctionBeginUser;
  PetscCheck(argc >= 3 && argv[2][0] != '-', PETSC_COMM_WORLD, PETSC_ERR_USER_INPUT, "run: no scenario file given (usage: crustforge run SCENARIO.yaml [-key value ...])");
  PetscCall(CFConfigLoad(PETSC_COMM_WORLD, argv[2], argc, argv, &cfg));
  if (cfg.time_end_myr > 0) PetscCall(CFRunTransient(PETSC_COMM_WORLD, &cfg));
  else PetscCall(CFRunSteady(PETSC_COMM_WORLD, &cfg));
  PetscFunctionReturn(0);
}

static PetscErrorCode Check(int argc, char **argv)
{
  CFConfig cfg;

  PetscFunctionBeginUser;
  PetscCheck(argc >= 3 && argv[2][0] != '-', PETSC_COMM_WORLD, PETSC_ERR_USER_INPUT, "check: no scenario file given (usage: crustforge check SCENARIO.yaml [-key value ...])");
  PetscCall(CFConfigLoad(PETSC_COMM_WORLD, argv[2], argc, argv, &cfg));
  PetscCall(CFConfigView(&cfg, PETSC_VIEWER_STDOUT_WORLD));
  PetscCall(PetscPrintf(PETSC_COMM_WORLD, "check: scenario %s is valid\n", argv[2]));
  PetscFunctionReturn(0);
}

static PetscErrorCode Sweep(int argc, char **argv)
{
  PetscFunctionBeginUser;
  PetscCheck(argc >= 3 && argv[2][0] != '-', PETSC_COMM_WORLD, PETSC_ERR_USER_INPUT, "sweep: no sweep file given (usage: crustforge sweep SWEEP.yaml [-key value ...])");
  PetscCall(CFRunSweep(PETSC_COMM_WORLD, argv[2], argc, argv));
  PetscFunctionReturn(0);
}

/* Only time.end, time.max_steps, checkpoint.*, snapshots.*, output.* and post-processing keys may
   be given: the checkpoint's fingerprint refuses anything that changes the physics. */
static PetscErrorCode Resume(int argc, char **argv)
{
  PetscFunctionBeginUser;
  PetscCheck(argc >= 3 && argv[2][0] != '-', PETSC_COMM_WORLD, PETSC_ERR_USER_INPUT, "resume: no checkpoint given (usage: crustforge resume CHECKPOINT.h5 [-key value ...])");
  PetscCall(CFResumeTransient(PETSC_COMM_WORLD, argv[2], argc, argv));
  PetscFunctionReturn(0);
}

/* The processes and threads a solving command runs on, set and said first. */
static PetscErrorCode Parallel(void)
{
  PetscMPIInt size;
  PetscInt    nt;

  PetscFunctionBeginUser;
  PetscCall(CFThreadsDefault(PETSC_COMM_WORLD, &nt));
  PetscCallMPI(MPI_Comm_size(PETSC_COMM_WORLD, &size));
  PetscCall(PetscPrintf(PETSC_COMM_WORLD, "parallel: %d MPI rank%s x %d OpenMP thread%s%s\n", (int)size, size > 1 ? "s" : "", (int)nt, nt > 1 ? "s" : "", size > 1 ? " each" : ""));
  PetscFunctionReturn(0);
}

int main(int argc, char **argv)
{
  PetscErrorCode ierr;
  const char    *cmd = argc > 1 ? argv[1] : "";
  int            status;
  PetscBool      traceback = PETSC_FALSE;

  if (!strcmp(cmd, "--help") || !strcmp(cmd, "-h") || !strcmp(cmd, "help")) {
    Usage(stdout);
    CFConfigPrintKeys(stdout);
    return CF_EXIT_OK;
  }
  if (!strcmp(cmd, "--version")) {
    printf("crustforge %s (revision %s)\n", CRUSTFORGE_VERSION, CRUSTFORGE_REVISION);
    return CF_EXIT_OK;
  }
  if (strcmp(cmd, "run") && strcmp(cmd, "resume") && strcmp(cmd, "sweep") && strcmp(cmd, "check")) {
    Usage(stderr);
    fprintf(stderr, "crustforge: %s%s%s\n", cmd[0] ? "unknown command '" : "no command given", cmd, cmd[0] ? "'" : "");
    return CF_EXIT_INPUT;
  }

  /* A file-size limit (ulimit -f) then makes write() fail with EFBIG, reported, instead of
     killing the run without a word. */
  signal(SIGXFSZ, SIG_IGN);
  /* Started without mpiexec, an Open MPI process is a singleton that launches a helper daemon,
     about 0.4 s of a serial run here, needed only to spawn processes, which crustforge never
     does: unless the user says otherwise, an isolated singleton talking only to itself. */
  if (!getenv("OMPI_COMM_WORLD_SIZE") && !getenv("PMIX_RANK")) {
    setenv("OMPI_MCA_ess_singleton_isolated", "1", 0);
    setenv("OMPI_MCA_pml", "ob1", 0);
    setenv("OMPI_MCA_btl", "self", 0);
  } else {
    /* Launched with every rank on this node (a workstation run): shared memory is the only
       transport needed, and probing UCX and the network for others took 0.2 s of start-up
       here.  Runs across nodes, and any choice of the user's, are left alone. */
    const char *local = getenv("OMPI_COMM_WORLD_LOCAL_SIZE"), *all = getenv("OMPI_COMM_WORLD_SIZE");
    if (local && all && !strcmp(local, all)) {
      setenv("OMPI_MCA_pml", "ob1", 0);
      setenv("OMPI_MCA_btl", "self,vader", 0);
    }
  }
  ierr = PetscInitialize(&argc, &argv, NULL, help);
  if (ierr) return CF_EXIT_INTERNAL;
  if (CFStopHandlersInstall()) return CF_EXIT_INTERNAL; /* after PETSc's own */
  /* One line per error unless a developer asks for PETSc's traceback. */
  if (PetscOptionsGetBool(NULL, NULL, "-debug_traceback", &traceback, NULL)) traceback = PETSC_FALSE;
  if (!traceback) PetscPushErrorHandler(PetscReturnErrorHandler, NULL);

  if (!strcmp(cmd, "check")) ierr = Check(argc, argv);
  else if (!(ierr = Parallel())) {
    if (!strcmp(cmd, "run")) ierr = Run(argc, argv);
    else if (!strcmp(cmd, "resume")) ierr = Resume(argc, argv);
    else if (!strcmp(cmd, "sweep")) ierr = Sweep(argc, argv);
    else ierr = NotAvailable(cmd);
  }
  status = CFExitStatus(ierr);
  if (ierr) {
    PetscMPIInt rank = 0;
    MPI_Comm_rank(PETSC_COMM_WORLD, &rank);
    if (!rank) CFReportError("crustforge", ierr);
  }
  if (!traceback) PetscPopErrorHandler();
  PetscFinalize();
  return status;
}
