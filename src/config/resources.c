/* Refusing a grid the machine cannot hold, before anything is allocated: the steady solver's
   measured peak memory per cell times the cells, against the physical memory of the nodes the
   run spans. */
#include <unistd.h>
#include <crustforge/units.h>
#include "resources.h"

/* Peak resident memory of a whole steady run (solve, output, tables; figures off), one rank,
   measured with /usr/bin/time -v (tests/bench/steady.sh) on the default 400 x 200 km grid:
   spacing 8 km (1 250 cells) 50 MB, 2 km (20 000) 73 MB, 1 km (80 000) 147 MB, 0.5 km (320 000)
   442 MB, 0.25 km (1 280 000) 1.63 GB, i.e. about 48 MB to start plus 1.25 kB per added cell.
   The figure taken is 1.4 kB per cell plus 60 MB (measured, rounded up). */
#define CF_BYTES_PER_CELL 1400.0
#define CF_BYTES_FIXED    60.0e6

double CFConfigPeakMemory(const CFConfig *cfg) { return CF_BYTES_FIXED + CF_BYTES_PER_CELL * (double)cfg->nx * (double)cfg->nz; }

PetscErrorCode CFConfigCheckMemory(MPI_Comm comm, const CFConfig *cfg)
{
  MPI_Comm    node;
  PetscMPIInt noderank;
  double      cells = (double)cfg->nx * (double)cfg->nz, need, have = 0, mine = 0;
  long        pages = sysconf(_SC_PHYS_PAGES), page = sysconf(_SC_PAGE_SIZE);
  char        sp[32];

  PetscFunctionBeginUser;
  /* One leader per node adds that node's memory. */
  PetscCallMPI(MPI_Comm_split_type(comm, MPI_COMM_TYPE_SHARED, 0, MPI_INFO_NULL, &node));
  PetscCallMPI(MPI_Comm_rank(node, &noderank));
  PetscCallMPI(MPI_Comm_free(&node));
  if (!noderank && pages > 0 && page > 0) mine = (double)pages * (double)page;
  PetscCallMPI(MPI_Allreduce(&mine, &have, 1, MPI_DOUBLE, MPI_SUM, comm));
  if (have <= 0) PetscFunctionReturn(0); /* unknown: do not guess */
  need = CFConfigPeakMemory(cfg);
  snprintf(sp, sizeof(sp), "%g", (double)CFMToKm(cfg->spacing));
  PetscCheck(need <= have, comm, PETSC_ERR_USER_INPUT, "grid.spacing: %s km needs about %.4g GB (%.4g million cells), this machine has %.3g GB", sp, need / 1e9, cells / 1e6, have / 1e9);
  PetscFunctionReturn(0);
}
