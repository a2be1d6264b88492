/* The heap of a run on transparent huge pages.  Every page of the fields, matrices and multigrid
   levels is touched first by a page fault, and on a virtual machine a fault costs of the order
   of 10 us: at 1 km about 39 000 of them, a sixth of a steady run.  So before the solver
   allocates, the heap is extended once by the run's expected peak and that range is advised
   for 2 MB pages (madvise MADV_HUGEPAGE), then handed back to malloc, which carves later
   blocks out of it; it is never trimmed, so memory freed by a coarse grid is reused by the next.
   Virtual until touched: the resident size does not grow.  Measured in DEVELOPERS.md. */
#include <crustforge/app.h>

#if defined(__linux__) && defined(__GLIBC__) && !defined(__SANITIZE_ADDRESS__)
  #include <malloc.h>
  #include <stdint.h>
  #include <sys/mman.h>

static void Reserve(size_t bytes)
{
  const uintptr_t huge = (uintptr_t)2 << 20;
  void           *p;

  /* blocks below 32 MB from the heap rather than from mappings of their own (glibc's maximum),
     and the heap never trimmed (-1), or freeing the reservation would hand it straight back */
  (void)mallopt(M_MMAP_THRESHOLD, 32 << 20);
  (void)mallopt(M_TRIM_THRESHOLD, -1);
  /* with mappings off, one block of the reserved size extends the heap itself */
  (void)mallopt(M_MMAP_MAX, 0);
  p = malloc(bytes);
  (void)mallopt(M_MMAP_MAX, 65536); /* glibc's default */
  if (!p) return;
  {
    const uintptr_t a = ((uintptr_t)p + huge - 1) & ~(huge - 1), b = ((uintptr_t)p + bytes) & ~(huge - 1);
    if (b > a) (void)madvise((void *)a, b - a, MADV_HUGEPAGE); /* a kernel without them refuses: fine */
  }
  free(p);
}
#else
static void Reserve(size_t bytes) { (void)bytes; }
#endif

PetscErrorCode CFHeapReserve(MPI_Comm comm, const CFConfig *cfg)
{
  PetscMPIInt size;
  double      bytes;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_size(comm, &size));
  /* this rank's share of the run's peak, with room to spare (a reservation costs no memory
     until touched; one the system refuses is skipped) */
  bytes = 1.25 * CFConfigPeakMemory(cfg) / size;
  Reserve((size_t)bytes);
  PetscFunctionReturn(0);
}
