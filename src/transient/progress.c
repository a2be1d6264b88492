/* The progress line of a transient run on stderr, rank 0: on a terminal a bar redrawn in place
   with the estimated finish; otherwise (a log file) a plain line at most every 10 s of wall time. */
#include <unistd.h>
#include <crustforge/units.h>
#include "transient_impl.h"

void CFProgressBegin(CFProgress *p, MPI_Comm comm, PetscReal t0)
{
  PetscMPIInt rank = 0;
  MPI_Comm_rank(comm, &rank);
  p->tty   = (PetscBool)(!rank && isatty(STDERR_FILENO));
  p->wall0 = MPI_Wtime();
  p->last  = -1e30;
  p->t0    = t0;
}

void CFProgressUpdate(CFProgress *p, MPI_Comm comm, PetscReal t, PetscReal t_end, PetscInt step, PetscReal dt, PetscReal H, PetscBool force)
{
  PetscMPIInt rank = 0;
  double      now = MPI_Wtime(), frac = (t - p->t0) / PetscMax(t_end - p->t0, 1e-300), eta;

  MPI_Comm_rank(comm, &rank);
  if (rank) return;
  if (!force && now - p->last < (p->tty ? 0.2 : 10.0)) return;
  p->last = now;
  eta     = frac > 0 ? (now - p->wall0) * (1.0 - frac) / frac : 0.0;
  if (p->tty) {
    char bar[31];
    int  fill = (int)(30 * frac + 0.5);
    for (int k = 0; k < 30; k++) bar[k] = k < fill ? '#' : '.';
    bar[30] = 0;
    fprintf(stderr, "\r[%s] %5.1f%% t %.4g/%.4g Myr step %d dt %.3g Myr crust %.3f km, finish in %.0f s  ", bar, 100.0 * frac, (double)CFSToMyr(t), (double)CFSToMyr(t_end), (int)step, (double)CFSToMyr(dt), (double)CFMToKm(H), eta);
  } else fprintf(stderr, "step %d t %.6g Myr of %.6g (%.1f%%) dt %.3g Myr crust %.4f km, %.1f s elapsed, about %.0f s to go\n", (int)step, (double)CFSToMyr(t), (double)CFSToMyr(t_end), 100.0 * frac, (double)CFSToMyr(dt), (double)CFMToKm(H), now - p->wall0, eta);
  fflush(stderr);
}

void CFProgressEnd(CFProgress *p, MPI_Comm comm)
{
  PetscMPIInt rank = 0;
  MPI_Comm_rank(comm, &rank);
  if (!rank && p->tty) fprintf(stderr, "\n");
}
