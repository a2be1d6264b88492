/* OpenMP threads per rank.  The melting model and hypre's BoomerAMG (Debian builds it with
   OpenMP) both run OpenMP regions, and an OpenMP runtime left to itself starts one thread per
   processor in every rank: `mpiexec -n 2` on a 2-core machine then runs 4 threads on 2 cores,
   and a waiting thread's spinning slows the other rank (measured in DEVELOPERS.md).  So unless
   the user sets OMP_NUM_THREADS, each rank takes its share of the processors it may run on,
   divided among the ranks of its node, and at least one.  A user's OMP_NUM_THREADS always wins. */
#include <stdlib.h>
#include <omp.h>
#include <crustforge/app.h>

PetscErrorCode CFThreadsDefault(MPI_Comm comm, PetscInt *nthreads)
{
  const char *env = getenv("OMP_NUM_THREADS");
  MPI_Comm    node;
  PetscMPIInt on_node;

  PetscFunctionBeginUser;
  /* collective whatever the environment says, so that no rank waits on another */
  PetscCallMPI(MPI_Comm_split_type(comm, MPI_COMM_TYPE_SHARED, 0, MPI_INFO_NULL, &node));
  PetscCallMPI(MPI_Comm_size(node, &on_node));
  PetscCallMPI(MPI_Comm_free(&node));
  if (!env || !env[0]) omp_set_num_threads(PetscMax(1, omp_get_num_procs() / on_node));
  *nthreads = omp_get_max_threads();
  PetscFunctionReturn(0);
}
