/* A sweep's progress on stderr, world rank 0: on a terminal a bar redrawn in place with the cases
   done and the estimated finish; otherwise (a log file) a plain line whenever a case finishes.
   The count is of the records (record.c), so the cases of every group and of earlier runs show. */
#include <unistd.h>
#include <crustforge/sweep.h>

void CFSweepProgressBegin(CFSweepProgress *p, const CFSweep *sw)
{
  PetscMPIInt rank = 0;
  PetscInt    failed;

  MPI_Comm_rank(PETSC_COMM_WORLD, &rank);
  p->tty   = (PetscBool)(!rank && isatty(STDERR_FILENO));
  p->wall0 = MPI_Wtime();
  p->last  = -1e30;
  CFSweepRecordCount(sw, &p->done0, &failed);
  p->shown = -1;
}

void CFSweepProgressUpdate(CFSweepProgress *p, const CFSweep *sw, PetscBool force)
{
  PetscMPIInt rank = 0;
  PetscInt    done, failed;
  double      now = MPI_Wtime(), eta = -1, frac;

  MPI_Comm_rank(PETSC_COMM_WORLD, &rank);
  if (rank || (!force && p->tty && now - p->last < 0.2)) return; /* a log gets every change */
  p->last = now;
  CFSweepRecordCount(sw, &done, &failed);
  if (done == p->shown && !force) return;
  p->shown = done;
  frac     = sw->ncases ? (double)done / sw->ncases : 1.0;
  if (done > p->done0) eta = (now - p->wall0) / (done - p->done0) * (sw->ncases - done);
  if (p->tty) {
    char bar[31];
    int  fill = (int)(30 * frac + 0.5);
    for (int k = 0; k < 30; k++) bar[k] = k < fill ? '#' : '.';
    bar[30] = 0;
    if (eta >= 0) fprintf(stderr, "\r[%s] %d/%d cases (%d failed), finish in %.0f s  ", bar, (int)done, (int)sw->ncases, (int)failed, eta);
    else fprintf(stderr, "\r[%s] %d/%d cases (%d failed)  ", bar, (int)done, (int)sw->ncases, (int)failed);
  } else if (eta >= 0) fprintf(stderr, "sweep: %d of %d cases done (%d failed), %.1f s elapsed, about %.0f s to go\n", (int)done, (int)sw->ncases, (int)failed, now - p->wall0, eta);
  else fprintf(stderr, "sweep: %d of %d cases done (%d failed)\n", (int)done, (int)sw->ncases, (int)failed);
  fflush(stderr);
}

void CFSweepProgressEnd(CFSweepProgress *p)
{
  if (p->tty) fprintf(stderr, "\n");
}
