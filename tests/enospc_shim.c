/* LD_PRELOAD shim for tests/enospc.sh: a disk that is full after CF_ENOSPC_BYTES bytes, for the
   files under the directory CF_ENOSPC_DIR, where mounting a tiny tmpfs is not allowed.
   Writes (write, pwrite, pwritev and their 64-bit names) to such files succeed until that many
   bytes have been written since the last truncation of one of them, then are cut short and fail
   with ENOSPC, as on a full disk; truncating gives the space back.  fallocate fails with ENOSPC
   beyond the limit, and statvfs on the directory reports the room left.  With
   CF_ENOSPC_NO_FALLOCATE=1 fallocate fails with EOPNOTSUPP and statvfs is left alone: the disk
   then fills only while HDF5 writes, as when another program fills it meanwhile.  Test code,
   single-threaded use; stdio's own writes inside the C library are not seen. */
#define _GNU_SOURCE
#include <dlfcn.h>
#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/statvfs.h>
#include <sys/types.h>
#include <sys/uio.h>
#include <unistd.h>

static unsigned long long used; /* bytes written since the last truncation */

static const char *Dir(void) { return getenv("CF_ENOSPC_DIR"); }
static unsigned long long Limit(void) { return strtoull(getenv("CF_ENOSPC_BYTES") ? getenv("CF_ENOSPC_BYTES") : "0", NULL, 10); }
static int NoFallocate(void) { return getenv("CF_ENOSPC_NO_FALLOCATE") && !strcmp(getenv("CF_ENOSPC_NO_FALLOCATE"), "1"); }

static int PathIsOurs(const char *path)
{
  const char *dir = Dir();
  size_t      n   = dir ? strlen(dir) : 0;
  return n && path && !strncmp(path, dir, n) && (path[n] == '/' || path[n] == 0);
}

static int FdIsOurs(int fd)
{
  char    link[64], path[PATH_MAX];
  ssize_t n;
  snprintf(link, sizeof(link), "/proc/self/fd/%d", fd);
  if ((n = readlink(link, path, sizeof(path) - 1)) < 0) return 0;
  path[n] = 0;
  return PathIsOurs(path);
}

/* How many of count bytes may be written to fd: all, or what is left before the disk is full. */
static size_t Allowed(int fd, size_t count)
{
  unsigned long long limit = Limit();
  if (!FdIsOurs(fd)) return count;
  if (used >= limit) return 0;
  return limit - used < count ? (size_t)(limit - used) : count;
}

#define REAL(name) ((__typeof__(&name))dlsym(RTLD_NEXT, #name))

ssize_t write(int fd, const void *buf, size_t count)
{
  size_t  ok = Allowed(fd, count);
  ssize_t r;
  if (count && !ok) return errno = ENOSPC, -1;
  if ((r = REAL(write)(fd, buf, ok)) > 0 && FdIsOurs(fd)) used += (unsigned long long)r;
  return r;
}

ssize_t pwrite(int fd, const void *buf, size_t count, off_t offset)
{
  size_t  ok = Allowed(fd, count);
  ssize_t r;
  if (count && !ok) return errno = ENOSPC, -1;
  if ((r = REAL(pwrite)(fd, buf, ok, offset)) > 0 && FdIsOurs(fd)) used += (unsigned long long)r;
  return r;
}

ssize_t pwrite64(int fd, const void *buf, size_t count, off_t offset) { return pwrite(fd, buf, count, offset); }

/* The vector forms write the first buffers that fit, one at a time. */
static ssize_t Vector(int fd, const struct iovec *iov, int n, off_t offset, int positioned)
{
  ssize_t total = 0;
  for (int k = 0; k < n; k++) {
    ssize_t r = positioned ? pwrite(fd, iov[k].iov_base, iov[k].iov_len, offset + total) : write(fd, iov[k].iov_base, iov[k].iov_len);
    if (r < 0) return total ? total : -1;
    total += r;
    if ((size_t)r < iov[k].iov_len) break;
  }
  return total;
}

ssize_t writev(int fd, const struct iovec *iov, int n) { return FdIsOurs(fd) ? Vector(fd, iov, n, 0, 0) : REAL(writev)(fd, iov, n); }
ssize_t pwritev(int fd, const struct iovec *iov, int n, off_t offset) { return FdIsOurs(fd) ? Vector(fd, iov, n, offset, 1) : REAL(pwritev)(fd, iov, n, offset); }
ssize_t pwritev64(int fd, const struct iovec *iov, int n, off_t offset) { return pwritev(fd, iov, n, offset); }

int fallocate(int fd, int mode, off_t offset, off_t len)
{
  if (FdIsOurs(fd)) {
    if (NoFallocate()) return errno = EOPNOTSUPP, -1;
    if ((unsigned long long)(offset + len) > Limit()) return errno = ENOSPC, -1;
  }
  return REAL(fallocate)(fd, mode, offset, len);
}
int fallocate64(int fd, int mode, off_t offset, off_t len) { return fallocate(fd, mode, offset, len); }

int truncate(const char *path, off_t length)
{
  if (PathIsOurs(path) && !length) used = 0;
  return REAL(truncate)(path, length);
}

int ftruncate(int fd, off_t length)
{
  if (!length && FdIsOurs(fd)) used = 0;
  return REAL(ftruncate)(fd, length);
}

int statvfs(const char *path, struct statvfs *buf)
{
  int rc = REAL(statvfs)(path, buf);
  if (!rc && PathIsOurs(path) && !NoFallocate() && buf->f_frsize) {
    unsigned long long left = Limit() > used ? Limit() - used : 0;
    buf->f_bavail = buf->f_bfree = left / buf->f_frsize;
  }
  return rc;
}
