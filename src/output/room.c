/* Disk room for the run-file writer: the file-size limit and the free space checked, and the
   space reserved, before HDF5 writes (HDF5 1.10 cannot close a file whose writes failed, and
   its own clean-up at MPI_Finalize then crashes), the reservation released after the close,
   and the cause named when a write fails all the same. */
#define _GNU_SOURCE /* fallocate */
#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/statvfs.h>
#include <unistd.h>
#include "output_impl.h"

/* Rank 0: room on the disk for need bytes of the file.  Once the temporary file exists the room
   is reserved (fallocate, keeping the file's size), so a full disk is met here, before HDF5
   writes, and not by HDF5's own writes, after which its file cannot be closed cleanly; where
   the file system cannot reserve, or before the file exists, its free space is compared.
   Returns 0, or -1 with a message. */
static int ReserveRoom(CFRunFile f, double need, char msg[], size_t len)
{
  struct statvfs vfs;
  struct stat    st;
  double         have = 0, room;
  int            fd = open(f->tmp_path, O_WRONLY), err = 0;

  if (fd >= 0) {
    if (!fstat(fd, &st)) have = (double)st.st_size;
    err = fallocate(fd, FALLOC_FL_KEEP_SIZE, 0, (off_t)need) ? errno : 0;
    (void)close(fd);
    if (!err) {
      f->reserved = PETSC_TRUE;
      return 0;
    }
    if (err == ENOSPC || err == EDQUOT) {
      snprintf(msg, len, "run file '%s': %s: cannot reserve the %.0f KB it needs in '%s'", f->path, strerror(err), need / 1024, f->dir);
      return -1;
    }
  }
  if (statvfs(f->dir, &vfs)) return 0; /* HDF5 will say what is wrong with the directory */
  room = (double)(geteuid() ? vfs.f_bavail : vfs.f_bfree) * (double)vfs.f_frsize;
  if (room >= need - have) return 0;
  snprintf(msg, len, "run file '%s': %s: '%s' has %.0f KB free, the file needs about %.0f KB", f->path, strerror(ENOSPC), f->dir, room / 1024, (need - have) / 1024);
  return -1;
}

/* Release what ReserveRoom reserved beyond the end of the closed file: growing it by one byte
   and shrinking it back frees every block past its end.  Returns 0, or -1 with errno. */
int CFRunFileReleaseRoom_Private(const char path[])
{
  struct stat st;
  int         fd = open(path, O_WRONLY), rc;
  if (fd < 0) return -1;
  rc = fstat(fd, &st) || ftruncate(fd, st.st_size + 1) || ftruncate(fd, st.st_size) ? -1 : 0;
  return close(fd) || rc ? -1 : 0;
}

/* Refuse, before HDF5 tries, a write that would pass the file-size limit (ulimit -f) or find the
   disk full: HDF5 1.10 cannot close a file whose writes failed with EFBIG or ENOSPC (its close at
   MPI_Finalize then crashes), so both are checked against a generous estimate of the file's size
   after writing nfields fields: the measured header and metadata (about 50 KB) rounded up to
   128 KB, and the data. */
PetscErrorCode CFRunFileCheckRoom_Private(CFRunFile f, PetscInt nfields)
{
  struct rlimit lim;
  double        need = 128.0 * 1024 + 1.05 * 8.0 * ((double)nfields * f->nx * f->nz + f->nx + f->nz);
  PetscMPIInt   rank;
  char          msg[2 * PETSC_MAX_PATH_LEN + 200] = "";

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(f->comm, &rank));
  if (!rank && !getrlimit(RLIMIT_FSIZE, &lim) && lim.rlim_cur != RLIM_INFINITY && need > (double)lim.rlim_cur)
    snprintf(msg, sizeof(msg), "run file '%s': %s: the file-size limit (ulimit -f) is %.0f KB, the file needs about %.0f KB", f->path, strerror(EFBIG), (double)lim.rlim_cur / 1024, need / 1024);
  else if (!rank) (void)ReserveRoom(f, need, msg, sizeof(msg));
  PetscCallMPI(MPI_Bcast(msg, sizeof(msg), MPI_CHAR, 0, f->comm));
  PetscCheck(!msg[0], f->comm, PETSC_ERR_FILE_WRITE, "%s", msg);
  PetscFunctionReturn(0);
}

/* Why a write through HDF5 failed, for the one-line message: the errno the failing call left if
   it names a cause, else a full file system (less room left than one more field needs), else
   HDF5's own failure. */
void CFRunFileWriteCause_Private(CFRunFile f, int err, char cause[], size_t len)
{
  struct statvfs vfs;
  double         room = 0, field = 8.0 * (double)f->nx * (double)f->nz + 65536.0;

  if (err == ENOSPC || err == EDQUOT || err == EFBIG || err == EIO || err == EROFS) snprintf(cause, len, "%s", strerror(err));
  else if (!statvfs(f->dir, &vfs) && (room = (double)(geteuid() ? vfs.f_bavail : vfs.f_bfree) * (double)vfs.f_frsize) < field)
    snprintf(cause, len, "%s (%.0f KB left in '%s')", strerror(ENOSPC), room / 1024, f->dir);
  else snprintf(cause, len, "HDF5 reported a write error");
}

