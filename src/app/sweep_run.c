/* crustforge sweep: every case of a sweep a full steady solve, the world's ranks split into groups
   of sweep.ranks_per_case that take the cases in turn (case c to group c mod groups, a fixed
   order), each case started from the nearest case its group has solved (continuation) or, for a
   group's first case, from the grid-sequenced cold start.  Finished cases are recorded as they
   finish and skipped on a rerun; a case whose solve does not converge is recorded as failed and
   the sweep goes on. */
#include <string.h>
#include <unistd.h>
#include <crustforge/app.h>
#include <crustforge/figures.h>
#include <crustforge/sweep.h>
#include <crustforge/units.h>

/* Newton iterations spent, by how the cases started (summed over the groups at the end). */
typedef struct {
  PetscInt cold_cases, cold_its, cold_coarse_its, warm_cases, warm_its, failed;
} SweepStats;

/* The solved case of this group nearest to c on the grid of values, or -1. */
static PetscInt Nearest(const CFSweep *sw, PetscInt c, Vec states[])
{
  PetscInt best = -1, dbest = PETSC_MAX_INT;
  for (PetscInt k = 0; k < sw->ncases; k++) {
    PetscInt d;
    if (!states[k] || (d = CFSweepCaseDistance(sw, c, k)) >= dbest) continue;
    best  = k;
    dbest = d;
  }
  return best;
}

static PetscErrorCode SolveCase(MPI_Comm group, PetscInt g, const CFSweep *sw, PetscInt c, Vec states[], SweepStats *st)
{
  CFConfig       cfg = sw->cases[c];
  CFSteady       s;
  CFSolveReport  rep;
  CFSummary      sum;
  PetscInt       from = sw->continuation ? Nearest(sw, c, states) : -1, levels = 0, coarse = 0;
  PetscErrorCode ierr;
  PetscMPIInt    grank;
  char           row[CF_SWEEP_ROW_LEN], label[CF_SWEEP_ROW_LEN], start[64], reason[1024] = "";

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(group, &grank));
  if (sw->run_files) {
    PetscCall(PetscSNPrintf(cfg.output_dir, sizeof(cfg.output_dir), "%s/case-%04d", sw->base.output_dir, (int)(c + 1)));
    cfg.output_overwrite = PETSC_TRUE; /* the sweep's own directory: a case re-solved after a kill replaces its files */
  }
  PetscCall(CFSteadyCreate(group, &cfg, &s));
  if (from >= 0) PetscCall(CFSteadyCopySolution(s, states[from]));
  else PetscCall(CFSteadySequenceInitialGuess(s, &levels, &coarse));
  ierr = CFSteadySolve(s, &rep);
  if (ierr == PETSC_ERR_NOT_CONVERGED) {
    const char *text;
    char       *specific = NULL;
    PetscCall(PetscErrorMessage(ierr, &text, &specific));
    PetscCall(PetscStrncpy(reason, specific && specific[0] ? specific : text, sizeof(reason)));
    st->failed++;
  } else PetscCall(ierr);
  if (!reason[0]) {
    Vec X;
    if (sw->run_files) PetscCall(CFOutputDirPrepare(group, &cfg));
    PetscCall(CFRunSteadyResults(group, s, &rep, sw->run_files, &sum));
    if (sw->run_files) PetscCall(CFOutputDirRelease(group, &cfg));
    PetscCall(CFSteadyGetSolution(s, &X));
    PetscCall(VecDuplicate(X, &states[c]));
    PetscCall(VecCopy(X, states[c]));
  }
  if (from >= 0) {
    st->warm_cases++;
    st->warm_its += rep.nonlinear_iterations;
    PetscCall(PetscSNPrintf(start, sizeof(start), "from case %d", (int)(from + 1)));
  } else {
    st->cold_cases++;
    st->cold_its += rep.nonlinear_iterations;
    st->cold_coarse_its += coarse;
    PetscCall(PetscSNPrintf(start, sizeof(start), "cold start, +%d on %d coarser grids", (int)coarse, (int)levels));
  }
  CFSweepRow(sw, c, rep.nonlinear_iterations, rep.seconds, reason[0] ? NULL : &sum, reason[0] ? reason : NULL, row, sizeof(row));
  ierr = 0;
  if (!grank) ierr = CFSweepRecordWrite(sw, c, row);
  PetscCallMPI(MPI_Bcast(&ierr, 1, MPI_INT, 0, group));
  PetscCheck(!ierr, group, PETSC_ERR_FILE_WRITE, "sweep: the record of case %d could not be written", (int)(c + 1));
  CFSweepCaseLabel(sw, c, label, sizeof(label));
  if (reason[0]) PetscCall(PetscPrintf(group, "case %d/%d [group %d] %s: FAILED after %d Newton iterations (%s): %s\n", (int)(c + 1), (int)sw->ncases, (int)g, label, (int)rep.nonlinear_iterations, start, reason));
  else PetscCall(PetscPrintf(group, "case %d/%d [group %d] %s: crust %.4f km, %d Newton iterations (%s), %.2f s\n", (int)(c + 1), (int)sw->ncases, (int)g, label, (double)CFMToKm(sum.crustal_thickness), (int)rep.nonlinear_iterations, start, (double)rep.seconds));
  PetscCall(CFSteadyDestroy(&s));
  PetscFunctionReturn(0);
}

/* Rank 0 alone: the table from the records, and the figures. */
static PetscErrorCode Finish(MPI_Comm comm, const CFSweep *sw)
{
  PetscMPIInt    rank;
  PetscErrorCode ierr = 0;
  int            figs = 0;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  if (!rank) {
    ierr = CFSweepWriteTable(sw);
    if (!ierr && sw->base.output_figures) {
      PetscBool avail = PETSC_FALSE;
      ierr = CFFiguresAvailable(&avail);
      if (!ierr && avail) ierr = CFSweepFigures(sw);
      figs = avail ? 1 : -1;
    }
  }
  PetscCallMPI(MPI_Bcast(&ierr, 1, MPI_INT, 0, comm));
  PetscCallMPI(MPI_Bcast(&figs, 1, MPI_INT, 0, comm));
  PetscCheck(!ierr, comm, ierr, "sweep: writing sweep.csv or its figures failed (see the message above)");
  PetscCall(PetscPrintf(comm, "wrote %s/sweep.csv%s\n", sw->base.output_dir, figs > 0 ? ", sweep_crust.png and sweep_depths.png" : ""));
  if (figs < 0) PetscCall(PetscPrintf(comm, "figures skipped: PLplot's pngcairo device is not installed\n"));
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunSweep(MPI_Comm comm, const char file[], int argc, char **argv)
{
  CFSweep         sw;
  CFSweepProgress prog;
  SweepStats      st = {0}, tot;
  PetscMPIInt     size, rank, grank;
  MPI_Comm        group;
  MPI_Request     req;
  PetscBool       resumed;
  PetscInt        ngroups, g;
  Vec            *states;
  int             flag = 0;

  PetscFunctionBeginUser;
  PetscCall(CFSweepLoad(comm, file, argc, argv, &sw));
  PetscCallMPI(MPI_Comm_size(comm, &size));
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  PetscCheck(size % sw.ranks_per_case == 0, comm, PETSC_ERR_USER_INPUT, "sweep.ranks_per_case: %d does not divide the %d MPI ranks", (int)sw.ranks_per_case, (int)size);
  ngroups = size / sw.ranks_per_case;
  g       = rank / sw.ranks_per_case;
  PetscCall(CFSweepRecordPrepare(comm, &sw, &resumed));
  PetscCallMPI(MPI_Comm_split(comm, (PetscMPIInt)g, rank, &group));
  PetscCallMPI(MPI_Comm_rank(group, &grank));
  { /* the heap for the largest grid among the cases */
    PetscInt big = 0;
    for (PetscInt c = 1; c < sw.ncases; c++)
      if (CFConfigPeakMemory(&sw.cases[c]) > CFConfigPeakMemory(&sw.cases[big])) big = c;
    PetscCall(CFHeapReserve(group, sw.ncases ? &sw.cases[big] : &sw.base));
  }
  PetscCall(PetscPrintf(comm, "sweep %s: %d cases, %d group%s of %d rank%s, %s\n", file, (int)sw.ncases, (int)ngroups, ngroups > 1 ? "s" : "", (int)sw.ranks_per_case, sw.ranks_per_case > 1 ? "s" : "", resumed ? "resuming from the record in output.dir" : "a new record in output.dir"));
  for (PetscInt k = 0; k < sw.naxes; k++) { /* C's %g: PETSc's writes 10 as "10." */
    char line[256];
    (void)snprintf(line, sizeof(line), "  %s: %d values, %g to %g %s\n", sw.axis[k].key, (int)sw.axis[k].n, (double)sw.axis[k].v[0], (double)sw.axis[k].v[sw.axis[k].n - 1], sw.axis[k].unit);
    PetscCall(PetscPrintf(comm, "%s", line));
  }
  CFSweepProgressBegin(&prog, &sw);
  PetscCall(PetscCalloc1(sw.ncases, &states));
  for (PetscInt c = g; c < sw.ncases; c += ngroups) {
    char row[CF_SWEEP_ROW_LEN] = "";
    int  done;
    if (!grank) PetscCall(CFSweepRecordRead(&sw, c, row, sizeof(row)));
    done = row[0] != 0;
    PetscCallMPI(MPI_Bcast(&done, 1, MPI_INT, 0, group));
    if (done) {
      PetscCall(PetscPrintf(group, "case %d/%d [group %d]: done in an earlier run, skipped\n", (int)(c + 1), (int)sw.ncases, (int)g));
    } else PetscCall(SolveCase(group, g, &sw, c, states, &st));
    CFSweepProgressUpdate(&prog, &sw, PETSC_FALSE);
  }
  /* rank 0 keeps the progress up to date while the other groups finish */
  PetscCallMPI(MPI_Ibarrier(comm, &req));
  while (!flag) {
    PetscCallMPI(MPI_Test(&req, &flag, MPI_STATUS_IGNORE));
    if (!flag) {
      CFSweepProgressUpdate(&prog, &sw, PETSC_FALSE);
      (void)usleep(100000);
    }
  }
  CFSweepProgressUpdate(&prog, &sw, PETSC_TRUE);
  CFSweepProgressEnd(&prog);
  for (PetscInt c = 0; c < sw.ncases; c++) PetscCall(VecDestroy(&states[c]));
  PetscCall(PetscFree(states));
  PetscCallMPI(MPI_Comm_free(&group));

  /* each group's root holds its counts: sum them over the groups */
  if (grank) (void)memset(&st, 0, sizeof(st));
  PetscCallMPI(MPI_Allreduce(&st, &tot, sizeof(st) / sizeof(PetscInt), MPIU_INT, MPI_SUM, comm));
  if (tot.cold_cases) PetscCall(PetscPrintf(comm, "cold starts: %d cases, %.2f Newton iterations per case on the fine grid (+%.2f on coarser grids)\n", (int)tot.cold_cases, (double)tot.cold_its / tot.cold_cases, (double)tot.cold_coarse_its / tot.cold_cases));
  if (tot.warm_cases) PetscCall(PetscPrintf(comm, "continuation: %d cases, %.2f Newton iterations per case\n", (int)tot.warm_cases, (double)tot.warm_its / tot.warm_cases));
  PetscCall(Finish(comm, &sw));
  {
    PetscInt done, failed = 0;
    if (!rank) CFSweepRecordCount(&sw, &done, &failed);
    PetscCallMPI(MPI_Bcast(&failed, 1, MPIU_INT, 0, comm));
    PetscCall(CFSweepDestroy(&sw));
    PetscCheck(!failed, comm, PETSC_ERR_NOT_CONVERGED, "sweep: %d of the cases did not converge (status failed in sweep.csv)", (int)failed);
  }
  PetscFunctionReturn(0);
}
