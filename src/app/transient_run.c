/* The transient run: from a scenario (or a checkpoint) to crust_vs_time.csv,
   crust_vs_distance.csv, run.h5 of the final state, snapshots/ and checkpoints/ in output.dir.
   Checkpoints every checkpoint.every_steps steps, every checkpoint.every_minutes of wall time,
   at time.max_steps, at the end, and on SIGINT/SIGTERM (then exit status 4). */
#include <errno.h>
#include <signal.h>
#include <sys/stat.h>
#include <crustforge/app.h>
#include <crustforge/transient.h>
#include <crustforge/figures.h>
#include <crustforge/units.h>
#include "../transient/transient_impl.h"

/* crust_history.png on rank 0, when figures are wanted and the PNG driver is there. */
static PetscErrorCode CrustFigure(CFTransient tr, const CFConfig *cfg)
{
  PetscMPIInt rank;
  PetscBool   ok = PETSC_FALSE;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(PETSC_COMM_WORLD, &rank));
  if (rank || !cfg->output_figures) PetscFunctionReturn(0);
  PetscCall(CFFiguresAvailable(&ok));
  if (ok) {
    CFCrustSeries cs;
    PetscCall(CFTransientCrustSeries(tr, &cs));
    if (cs.n > 0) PetscCall(CFFigureCrustHistory(cfg, &cs, cfg->output_dir));
    PetscCall(CFCrustSeriesDestroy(&cs));
  }
  PetscFunctionReturn(0);
}

static PetscErrorCode MakeDir(MPI_Comm comm, const char path[])
{
  PetscMPIInt rank;
  int         bad = 0;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  if (!rank) bad = mkdir(path, 0777) && errno != EEXIST;
  PetscCallMPI(MPI_Bcast(&bad, 1, MPI_INT, 0, comm));
  PetscCheck(!bad, comm, PETSC_ERR_FILE_WRITE, "cannot create directory '%s'", path);
  PetscFunctionReturn(0);
}

static PetscErrorCode Checkpoint(CFTransient tr, const CFConfig *cfg, const char dir[], char path[])
{
  PetscInt step;

  PetscFunctionBeginUser;
  PetscCall(CFTransientGetTime(tr, NULL, &step, NULL));
  PetscCall(PetscSNPrintf(path, PETSC_MAX_PATH_LEN, "%s/checkpoint_%08d.h5", dir, (int)step));
  PetscCall(CFTransientCheckpointWrite(tr, path));
  PetscCall(CFCheckpointRotate(tr->comm, dir, (PetscInt)cfg->checkpoint_keep));
  PetscFunctionReturn(0);
}

static PetscErrorCode Snapshot(CFTransient tr, const char dir[])
{
  PetscInt step;
  char     path[PETSC_MAX_PATH_LEN];

  PetscFunctionBeginUser;
  PetscCall(CFTransientGetTime(tr, NULL, &step, NULL));
  PetscCall(PetscSNPrintf(path, sizeof(path), "%s/snapshot_%08d.h5", dir, (int)step));
  PetscCall(CFTransientWriteRunFile(tr, path));
  PetscCall(CFTransientWriteSeries(tr, dir));
  PetscFunctionReturn(0);
}

static PetscReal LastThickness(CFTransient tr)
{
  PetscInt         n;
  const PetscReal *melt, *U;
  (void)CFTransientGetCrustRecord(tr, &n, NULL, NULL, &melt, &U);
  return n ? melt[n - 1] / (tr->cfg.crust_density * U[n - 1]) : 0.0;
}

static PetscErrorCode Integrate(CFTransient tr, const CFConfig *cfg, PetscBool resumed)
{
  MPI_Comm    comm = tr->comm;
  char        ckdir[PETSC_MAX_PATH_LEN], snapdir[PETSC_MAX_PATH_LEN], ckpath[PETSC_MAX_PATH_LEN] = "", path[PETSC_MAX_PATH_LEN];
  const PetscInt every = (PetscInt)cfg->checkpoint_every_steps, snap = (PetscInt)cfg->snapshot_every_steps, max_steps = (PetscInt)cfg->time_max_steps;
  double      wall_ck = MPI_Wtime(), wall0 = MPI_Wtime();
  int         signo = 0;
  PetscBool   limited = PETSC_FALSE, written = PETSC_FALSE;
  CFProgress  prog;
  PetscReal   t, dt;
  PetscInt    step, step0;
  PetscErrorCode ierr = 0;

  PetscFunctionBeginUser;
  PetscCall(PetscSNPrintf(ckdir, sizeof(ckdir), "%s/checkpoints", cfg->output_dir));
  PetscCall(PetscSNPrintf(snapdir, sizeof(snapdir), "%s/snapshots", cfg->output_dir));
  PetscCall(MakeDir(comm, cfg->output_dir));
  PetscCall(MakeDir(comm, ckdir));
  if (snap > 0) PetscCall(MakeDir(comm, snapdir));
  PetscCall(CFTransientGetTime(tr, &t, &step0, &dt));
  if (snap > 0 && !resumed) PetscCall(Snapshot(tr, snapdir));
  PetscCall(CFSignalsInstall());
  CFProgressBegin(&prog, comm, t);
  /* the loop's errors come out after the handlers are restored */
  while (!ierr && !CFTransientFinished(tr)) {
    PetscBool ck;
    PetscCall(CFTransientGetTime(tr, NULL, &step, NULL));
    if (max_steps > 0 && step >= max_steps) {
      limited = PETSC_TRUE;
      break;
    }
    ierr = CFTransientStep(tr);
    if (ierr) break;
    PetscCall(CFTransientGetTime(tr, &t, &step, &dt));
    PetscCall(CFSignalsPending(comm, &signo));
    {
      int by_clock = cfg->checkpoint_every_minutes > 0 && MPI_Wtime() - wall_ck >= 60.0 * cfg->checkpoint_every_minutes;
      PetscCallMPI(MPI_Bcast(&by_clock, 1, MPI_INT, 0, comm)); /* rank 0's clock decides for all */
      ck = (PetscBool)(signo || by_clock || (every > 0 && step % every == 0) || CFTransientFinished(tr) || (max_steps > 0 && step >= max_steps));
    }
    written = PETSC_FALSE;
    if (ck) {
      PetscCall(Checkpoint(tr, cfg, ckdir, ckpath));
      wall_ck = MPI_Wtime();
      written = PETSC_TRUE;
    }
    if (snap > 0 && step % snap == 0) PetscCall(Snapshot(tr, snapdir));
    CFProgressUpdate(&prog, comm, t, CFMyrToS(cfg->time_end_myr), step, dt, LastThickness(tr), (PetscBool)(ck || CFTransientFinished(tr)));
    if (signo) break;
  }
  CFProgressEnd(&prog, comm);
  PetscCall(CFSignalsRestore());
  PetscCall(ierr);
  if (limited && !written) PetscCall(Checkpoint(tr, cfg, ckdir, ckpath));
  PetscCall(CFTransientWriteCrustCSV(tr, cfg->output_dir));
  PetscCall(CrustFigure(tr, cfg));
  PetscCall(CFTransientGetTime(tr, &t, &step, NULL));
  PetscCall(PetscPrintf(comm, "transient: %d steps (%d this run) to t = %.6g Myr in %.1f s; crustal thickness now %.4f km\n", (int)step, (int)(step - step0), (double)CFSToMyr(t), MPI_Wtime() - wall0, (double)CFMToKm(LastThickness(tr))));
  PetscCall(PetscPrintf(comm, "wrote %s/crust_vs_time.csv and crust_vs_distance.csv\n", cfg->output_dir));
  if (ckpath[0]) PetscCall(PetscPrintf(comm, "last checkpoint: %s\n", ckpath));
  PetscCheck(!signo, comm, PETSC_ERR_SIG, "interrupted by %s at step %d (t = %.6g Myr): checkpoint %s written; continue with: crustforge resume %s", signo == SIGINT ? "SIGINT" : "SIGTERM", (int)step, (double)CFSToMyr(t), ckpath, ckpath);
  if (CFTransientFinished(tr)) {
    PetscCall(PetscSNPrintf(path, sizeof(path), "%s/run.h5", cfg->output_dir));
    PetscCall(CFTransientWriteRunFile(tr, path));
    PetscCall(PetscPrintf(comm, "wrote %s/run.h5 and run.xdmf (final state)\n", cfg->output_dir));
  } else PetscCall(PetscPrintf(comm, "stopped at time.max_steps = %d; continue with: crustforge resume %s -time_max_steps 0\n", (int)max_steps, ckpath));
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunTransient(MPI_Comm comm, const CFConfig *cfg)
{
  CFTransient    tr;
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  PetscCall(CFConfigView(cfg, PETSC_VIEWER_STDOUT_(comm)));
  PetscCall(CFHeapReserve(comm, cfg));
  PetscCall(CFTransientCreate(comm, cfg, &tr)); /* checks the time and history keys */
  PetscCall(CFOutputDirPrepare(comm, cfg));
  PetscCall(CFTransientSetInitialState(tr));
  PetscCall(PetscPrintf(comm, "transient: %s start, method %s, %s steps of %.6g Myr, to %.6g Myr\n", cfg->time_start, cfg->time_method, cfg->time_adaptive ? "adaptive" : "fixed", (double)cfg->time_step_myr, (double)cfg->time_end_myr));
  /* an interrupted or failed run still frees the integrator and the lock before reporting */
  ierr = Integrate(tr, cfg, PETSC_FALSE);
  PetscCall(CFOutputDirRelease(comm, cfg));
  PetscCall(CFTransientDestroy(&tr));
  PetscCall(ierr);
  PetscFunctionReturn(0);
}

PetscErrorCode CFResumeTransient(MPI_Comm comm, const char checkpoint[], int argc, char **argv)
{
  CFConfig       cfg;
  CFTransient    tr;
  PetscReal      t;
  PetscInt       step;
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  PetscCall(CFCheckpointReadConfig(comm, checkpoint, argc, argv, 3, &cfg));
  PetscCall(CFHeapReserve(comm, &cfg));
  PetscCall(CFTransientCreate(comm, &cfg, &tr));
  PetscCall(CFTransientCheckpointLoad(tr, checkpoint));
  PetscCall(CFTransientGetTime(tr, &t, &step, NULL));
  PetscCall(PetscPrintf(comm, "resuming %s at step %d, t = %.6g Myr, to %.6g Myr\n", checkpoint, (int)step, (double)CFSToMyr(t), (double)cfg.time_end_myr));
  ierr = Integrate(tr, &cfg, PETSC_TRUE);
  PetscCall(CFTransientDestroy(&tr));
  PetscCall(ierr);
  PetscFunctionReturn(0);
}
