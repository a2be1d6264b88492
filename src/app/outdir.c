/* The run's output directory: created on demand, never silently reused, and locked so that two
   runs pointed at it at once cannot interleave their files. */
#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>
#include <crustforge/app.h>

#define CF_LOCK_NAME ".lock"

/* The locks this process holds (rank 0 of each run).  The lock is a flock on output.dir/.lock,
   which holds the owner's PID for the message; the kernel drops a flock when its process dies,
   so the lock file of a killed run is stale and simply taken over.  Process bookkeeping, not
   model state: it must outlive the run for the exit handler. */
typedef struct HeldLock {
  struct HeldLock *next;
  int              fd;
  char             path[PETSC_MAX_PATH_LEN];
} HeldLock;
static HeldLock *held = NULL;

static int MakeDirs(const char *path)
{
  char   buf[PETSC_MAX_PATH_LEN];
  size_t n = strlen(path);

  if (n >= sizeof(buf)) { errno = ENAMETOOLONG; return -1; }
  memcpy(buf, path, n + 1);
  for (char *p = buf + 1; *p; p++) {
    if (*p != '/') continue;
    *p = 0;
    if (mkdir(buf, 0777) && errno != EEXIST) return -1;
    *p = '/';
  }
  if (mkdir(buf, 0777) && errno != EEXIST) return -1;
  return 0;
}

static int HoldsFiles(const char *path)
{
  DIR           *d = opendir(path);
  struct dirent *e;
  int            n = 0;
  if (!d) return 0;
  while ((e = readdir(d)))
    if (strcmp(e->d_name, ".") && strcmp(e->d_name, "..") && strcmp(e->d_name, CF_LOCK_NAME)) n++;
  closedir(d);
  return n > 0;
}

static void ReleaseNode(HeldLock *l)
{
  (void)unlink(l->path); /* before closing: a waiting run then finds no file, or a fresh one */
  (void)close(l->fd);
  free(l);
}

static void ReleaseAllAtExit(void)
{
  while (held) {
    HeldLock *l = held;
    held        = l->next;
    ReleaseNode(l);
  }
}

void CFOutputDirUnlockAllFromSignal(void)
{
  for (HeldLock *l = held; l; l = l->next) (void)unlink(l->path); /* async-signal-safe */
}

/* Take dir's lock; 0, or -1 with the cause in msg. */
static int Lock(const char *dir, char *msg, size_t len)
{
  static int registered = 0;
  char       path[PETSC_MAX_PATH_LEN], pid[32];
  HeldLock  *l;

  if (snprintf(path, sizeof(path), "%s/%s", dir, CF_LOCK_NAME) >= (int)sizeof(path)) {
    snprintf(msg, len, "output.dir: '%s': path too long", dir);
    return -1;
  }
  for (l = held; l; l = l->next)
    if (!strcmp(l->path, path)) return 0; /* already ours (a sweep's cases) */
  for (int attempt = 0; attempt < 10; attempt++) {
    struct stat a, b;
    int         fd = open(path, O_RDWR | O_CREAT | O_CLOEXEC, 0644);
    if (fd < 0) {
      snprintf(msg, len, "output.dir: cannot create the lock file '%s': %s", path, strerror(errno));
      return -1;
    }
    if (flock(fd, LOCK_EX | LOCK_NB)) {
      int     err = errno;
      ssize_t n   = err == EWOULDBLOCK ? read(fd, pid, sizeof(pid) - 1) : -1;
      pid[n > 0 ? n : 0]      = 0;
      pid[strcspn(pid, "\n")] = 0;
      errno                   = err;
      if (err == EWOULDBLOCK) snprintf(msg, len, "output.dir: '%s' is in use by another crustforge run (process %s; lock %s)", dir, pid[0] ? pid : "unknown", path);
      else snprintf(msg, len, "output.dir: cannot lock '%s': %s", path, strerror(errno));
      (void)close(fd);
      return -1;
    }
    /* The file may have been removed (and a new one made) by its owner between open and flock. */
    if (fstat(fd, &a) || stat(path, &b) || a.st_ino != b.st_ino || a.st_dev != b.st_dev) {
      (void)close(fd);
      continue;
    }
    snprintf(pid, sizeof(pid), "%ld\n", (long)getpid());
    if (ftruncate(fd, 0) || write(fd, pid, strlen(pid)) < 0) { /* the PID is for messages only */ }
    if (!(l = malloc(sizeof(*l)))) {
      (void)close(fd);
      snprintf(msg, len, "output.dir: out of memory");
      return -1;
    }
    l->fd = fd;
    memcpy(l->path, path, sizeof(path));
    l->next = held;
    held    = l;
    if (!registered) registered = !atexit(ReleaseAllAtExit);
    return 0;
  }
  snprintf(msg, len, "output.dir: the lock '%s' keeps changing hands", path);
  return -1;
}

static void Unlock(const char *dir)
{
  char path[PETSC_MAX_PATH_LEN];

  if (snprintf(path, sizeof(path), "%s/%s", dir, CF_LOCK_NAME) >= (int)sizeof(path)) return; /* never locked: Lock refuses such a path */
  for (HeldLock **p = &held; *p; p = &(*p)->next)
    if (!strcmp((*p)->path, path)) {
      HeldLock *l = *p;
      *p          = l->next;
      ReleaseNode(l);
      return;
    }
}

PetscErrorCode CFOutputDirPrepare(MPI_Comm comm, const CFConfig *cfg)
{
  PetscMPIInt rank;
  char        msg[PETSC_MAX_PATH_LEN + 256] = "";

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  if (!rank) {
    struct stat st;
    if (!stat(cfg->output_dir, &st)) {
      if (!S_ISDIR(st.st_mode)) snprintf(msg, sizeof(msg), "output.dir: '%s' exists and is not a directory", cfg->output_dir);
    } else if (MakeDirs(cfg->output_dir)) snprintf(msg, sizeof(msg), "output.dir: cannot create '%s': %s", cfg->output_dir, strerror(errno));
    if (!msg[0] && !Lock(cfg->output_dir, msg, sizeof(msg)) && !cfg->output_overwrite && HoldsFiles(cfg->output_dir)) {
      Unlock(cfg->output_dir);
      snprintf(msg, sizeof(msg), "output.dir: '%s' already holds files (set output.overwrite true, or choose another directory)", cfg->output_dir);
    }
  }
  PetscCallMPI(MPI_Bcast(msg, sizeof(msg), MPI_CHAR, 0, comm));
  PetscCheck(!msg[0], comm, PETSC_ERR_FILE_WRITE, "%s", msg);
  PetscFunctionReturn(0);
}

PetscErrorCode CFOutputDirRelease(MPI_Comm comm, const CFConfig *cfg)
{
  PetscMPIInt rank;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  if (!rank) Unlock(cfg->output_dir);
  PetscFunctionReturn(0);
}
