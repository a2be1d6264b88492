/* The run's output directory: created on demand, never silently reused. */
#include <dirent.h>
#include <errno.h>
#include <string.h>
#include <sys/stat.h>
#include <crustforge/app.h>

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
    if (strcmp(e->d_name, ".") && strcmp(e->d_name, "..")) n++;
  closedir(d);
  return n > 0;
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
      else if (!cfg->output_overwrite && HoldsFiles(cfg->output_dir)) snprintf(msg, sizeof(msg), "output.dir: '%s' already holds files (set output.overwrite true, or choose another directory)", cfg->output_dir);
    } else if (MakeDirs(cfg->output_dir)) snprintf(msg, sizeof(msg), "output.dir: cannot create '%s': %s", cfg->output_dir, strerror(errno));
  }
  PetscCallMPI(MPI_Bcast(msg, sizeof(msg), MPI_CHAR, 0, comm));
  PetscCheck(!msg[0], comm, PETSC_ERR_FILE_WRITE, "%s", msg);
  PetscFunctionReturn(0);
}
