/* The record of a sweep's finished cases, so that a rerun skips them: output.dir/progress/ holds
   base.txt (what the sweep is: base scenario and swept values) and one file per finished case,
   case-NNNN.csv (its label and its sweep.csv row), written to a temporary name, fsync'd and
   renamed, so a killed sweep loses only the cases it was solving. */
#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include <crustforge/app.h>
#include <crustforge/sweep.h>

static void RecordDir(const CFSweep *sw, char path[], size_t len) { (void)snprintf(path, len, "%s/progress", sw->base.output_dir); }

static void CasePath(const CFSweep *sw, PetscInt c, char path[], size_t len) { (void)snprintf(path, len, "%s/progress/case-%04d.csv", sw->base.output_dir, (int)(c + 1)); }

/* Write text to path through path.tmp, fsync'd, renamed; "" in msg on success. */
static void WriteDurably(const char path[], const char text[], char msg[], size_t len)
{
  char    tmp[CF_SWEEP_PATH_LEN + 8];
  size_t  n = strlen(text);
  int     fd;
  ssize_t w;

  msg[0] = 0;
  (void)snprintf(tmp, sizeof(tmp), "%s.tmp", path);
  fd = open(tmp, O_WRONLY | O_CREAT | O_TRUNC, 0666);
  if (fd < 0) {
    (void)snprintf(msg, len, "cannot write '%s': %s", tmp, strerror(errno));
    return;
  }
  w = write(fd, text, n);
  if (w != (ssize_t)n || fsync(fd)) (void)snprintf(msg, len, "writing '%s' failed: %s", tmp, strerror(errno));
  if (close(fd) && !msg[0]) (void)snprintf(msg, len, "writing '%s' failed: %s", tmp, strerror(errno));
  if (!msg[0] && rename(tmp, path)) (void)snprintf(msg, len, "cannot rename '%s' to '%s': %s", tmp, path, strerror(errno));
  if (msg[0]) (void)unlink(tmp);
}

/* What the sweep is, as text: the base scenario's keys (output.* and the swept keys aside), then
   every swept key with its values.  A rerun must find the same text to resume. */
static PetscErrorCode Fingerprint(const CFSweep *sw, char **text)
{
  PetscInt       n;
  CFConfigEntry *e;
  size_t         len = 4096, used = 0;
  char          *t;

#define ADD(...) \
  do { \
    int w_ = snprintf(t + used, len - used, __VA_ARGS__); \
    used += w_ > 0 ? (size_t)w_ : 0; \
    if (used >= len) used = len - 1; \
  } while (0)
  PetscFunctionBeginUser;
  PetscCall(CFConfigGetEntries(&sw->base, &n, &e));
  len += (size_t)n * 160;
  for (PetscInt k = 0; k < sw->naxes; k++) len += (size_t)sw->axis[k].n * 32 + 128;
  PetscCall(PetscMalloc1(len, &t));
  t[0] = 0;
  ADD("crustforge sweep record\n");
  for (PetscInt i = 0; i < n; i++) {
    PetscBool swept = PETSC_FALSE;
    for (PetscInt k = 0; k < sw->naxes; k++) swept = (PetscBool)(swept || !strcmp(sw->axis[k].key, e[i].key));
    if (swept || !strncmp(e[i].key, "output.", 7)) continue;
    ADD("%s = %s\n", e[i].key, e[i].value);
  }
  for (PetscInt k = 0; k < sw->naxes; k++) {
    ADD("sweep %s =", sw->axis[k].key);
    for (PetscInt m = 0; m < sw->axis[k].n; m++) ADD(" %.15g", (double)sw->axis[k].v[m]);
    ADD("\n");
  }
#undef ADD
  PetscCall(PetscFree(e));
  *text = t;
  PetscFunctionReturn(0);
}

/* Rank 0: the text of a small file, or NULL when it is absent. */
static char *Slurp(const char path[])
{
  FILE *fp = fopen(path, "rb");
  long  n;
  char *t;

  if (!fp) return NULL;
  if (fseek(fp, 0, SEEK_END) || (n = ftell(fp)) < 0 || fseek(fp, 0, SEEK_SET) || !(t = (char *)malloc((size_t)n + 1))) {
    fclose(fp);
    return NULL;
  }
  t[fread(t, 1, (size_t)n, fp)] = 0;
  fclose(fp);
  return t;
}

PetscErrorCode CFSweepRecordPrepare(MPI_Comm comm, const CFSweep *sw, PetscBool *resumed)
{
  PetscMPIInt rank;
  char        dir[CF_SWEEP_PATH_LEN], base[CF_SWEEP_PATH_LEN + 16], msg[3 * CF_SWEEP_PATH_LEN] = "", *fp, *old = NULL;
  int         had = 0;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  PetscCall(Fingerprint(sw, &fp));
  RecordDir(sw, dir, sizeof(dir));
  (void)snprintf(base, sizeof(base), "%s/base.txt", dir);
  if (!rank && (old = Slurp(base))) {
    had = 1;
    if (strcmp(old, fp)) (void)snprintf(msg, sizeof(msg), "output.dir: '%s' holds the record of a different sweep (another base scenario or other swept values); choose another output.dir or delete it", sw->base.output_dir);
    free(old);
  }
  PetscCallMPI(MPI_Bcast(&had, 1, MPI_INT, 0, comm));
  PetscCallMPI(MPI_Bcast(msg, sizeof(msg), MPI_CHAR, 0, comm));
  if (msg[0]) PetscCall(PetscFree(fp));
  PetscCheck(!msg[0], comm, PETSC_ERR_USER_INPUT, "%s", msg);
  if (had) { /* a resume: only the lock, so that two sweeps never share a record */
    CFConfig own         = sw->base;
    own.output_overwrite = PETSC_TRUE;
    PetscCall(CFOutputDirPrepare(comm, &own));
  } else {
    PetscCall(CFOutputDirPrepare(comm, &sw->base));
    if (!rank) {
      if (mkdir(dir, 0777) && errno != EEXIST) (void)snprintf(msg, sizeof(msg), "cannot create '%s': %s", dir, strerror(errno));
      else WriteDurably(base, fp, msg, sizeof(msg));
    }
    PetscCallMPI(MPI_Bcast(msg, sizeof(msg), MPI_CHAR, 0, comm));
  }
  PetscCall(PetscFree(fp));
  PetscCheck(!msg[0], comm, PETSC_ERR_FILE_WRITE, "%s", msg);
  *resumed = (PetscBool)had;
  PetscFunctionReturn(0);
}

PetscErrorCode CFSweepRecordRead(const CFSweep *sw, PetscInt c, char row[], size_t len)
{
  char  path[CF_SWEEP_PATH_LEN], label[CF_SWEEP_ROW_LEN], head[CF_SWEEP_ROW_LEN + 32], *t, *nl;
  int   ok;

  PetscFunctionBeginUser;
  row[0] = 0;
  CasePath(sw, c, path, sizeof(path));
  if (!(t = Slurp(path))) PetscFunctionReturn(0);
  CFSweepCaseLabel(sw, c, label, sizeof(label));
  (void)snprintf(head, sizeof(head), "# case %d: %s\n", (int)(c + 1), label);
  ok = !strncmp(t, head, strlen(head)) && (nl = strchr(t + strlen(head), '\n'));
  if (ok) (void)snprintf(row, len, "%.*s", (int)(nl - (t + strlen(head))), t + strlen(head));
  free(t);
  PetscCheck(ok, PETSC_COMM_SELF, PETSC_ERR_FILE_UNEXPECTED, "sweep record '%s' is not the record of case %d (%s)", path, (int)(c + 1), label);
  PetscFunctionReturn(0);
}

PetscErrorCode CFSweepRecordWrite(const CFSweep *sw, PetscInt c, const char row[])
{
  char path[CF_SWEEP_PATH_LEN], label[CF_SWEEP_ROW_LEN], *text, msg[3 * CF_SWEEP_PATH_LEN];
  size_t n = strlen(row) + sizeof(label) + 64;

  PetscFunctionBeginUser;
  CasePath(sw, c, path, sizeof(path));
  CFSweepCaseLabel(sw, c, label, sizeof(label));
  PetscCall(PetscMalloc1(n, &text));
  (void)snprintf(text, n, "# case %d: %s\n%s\n", (int)(c + 1), label, row);
  WriteDurably(path, text, msg, sizeof(msg));
  PetscCall(PetscFree(text));
  PetscCheck(!msg[0], PETSC_COMM_SELF, PETSC_ERR_FILE_WRITE, "%s", msg);
  PetscFunctionReturn(0);
}

void CFSweepRecordCount(const CFSweep *sw, PetscInt *done, PetscInt *failed)
{
  char           dir[CF_SWEEP_PATH_LEN];
  DIR           *d;
  struct dirent *e;

  *done = *failed = 0;
  RecordDir(sw, dir, sizeof(dir));
  if (!(d = opendir(dir))) return;
  while ((e = readdir(d))) {
    size_t n = strlen(e->d_name);
    char   path[2 * CF_SWEEP_PATH_LEN], *t;
    if (strncmp(e->d_name, "case-", 5) || n < 4 || strcmp(e->d_name + n - 4, ".csv")) continue;
    (*done)++;
    (void)snprintf(path, sizeof(path), "%s/%s", dir, e->d_name);
    if ((t = Slurp(path))) {
      if (strstr(t, ",failed,")) (*failed)++;
      free(t);
    }
  }
  closedir(d);
}
