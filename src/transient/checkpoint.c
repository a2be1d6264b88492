/* Checkpoints: the full state of a transient run in one HDF5 file, written under a temporary
   name, flushed to disk and renamed, so that a crash mid-write never destroys the last good one.
   Layout: dataset /state (temperature and depletion, natural order, VecView of the DMDA vector,
   exact), dataset /crust_record (per step: end time, step, melt production, plate speed), and
   root attributes format, format_version, time_s, step, next_step_s, fingerprint, scenario
   (the resolved keys, one "-option<TAB>value" a line), scenario_file, and the 1-norms of both
   datasets.  The file carries the integrity header of crustforge/integrity.h in its HDF5 user
   block, checked before HDF5 opens it: a damaged or truncated checkpoint is refused, never
   parsed. */
#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <hdf5.h>
#include <petscviewerhdf5.h>
#include <crustforge/integrity.h>
#include "transient_impl.h"

#define CF_CHECKPOINT_FORMAT  "crustforge-checkpoint"
#define CF_CHECKPOINT_VERSION 1

static PetscErrorCode ScenarioText(const CFConfig *cfg, char **text)
{
  PetscInt       n;
  CFConfigEntry *e;
  size_t         len = 1, used = 0;

  PetscFunctionBeginUser;
  PetscCall(CFConfigGetEntries(cfg, &n, &e));
  for (PetscInt k = 0; k < n; k++) len += strlen(e[k].option) + strlen(e[k].value) + 2;
  PetscCall(PetscMalloc1(len, text));
  (*text)[0] = 0;
  for (PetscInt k = 0; k < n; k++) used += (size_t)snprintf(*text + used, len - used, "%s\t%s\n", e[k].option, e[k].value);
  PetscCall(PetscFree(e));
  PetscFunctionReturn(0);
}

/* The resolved parameters as the exact bytes of the CFConfig, hex: the keys' text (15
   significant digits) does not give back derived values bit for bit, and exact restart needs
   them exactly (measured: a 1-ulp change of the derived adiabatic gradient showed in step 1). */
static PetscErrorCode ConfigToHex(const CFConfig *cfg, char **hex)
{
  const unsigned char *b = (const unsigned char *)cfg;

  PetscFunctionBeginUser;
  PetscCall(PetscMalloc1(2 * sizeof(*cfg) + 1, hex));
  for (size_t k = 0; k < sizeof(*cfg); k++) snprintf(*hex + 2 * k, 3, "%02x", b[k]);
  PetscFunctionReturn(0);
}

static PetscBool HexToConfig(const char *hex, CFConfig *cfg)
{
  unsigned char *b = (unsigned char *)cfg;
  if (strlen(hex) != 2 * sizeof(*cfg)) return PETSC_FALSE;
  for (size_t k = 0; k < sizeof(*cfg); k++) {
    unsigned int v;
    if (sscanf(hex + 2 * k, "%2x", &v) != 1) return PETSC_FALSE;
    b[k] = (unsigned char)v;
  }
  return PETSC_TRUE;
}

/* The fields of the keys a resumed run may change (CFConfigKeyMayChange), from the new values. */
static void TakeChangeable(CFConfig *cfg, const CFConfig *now)
{
  cfg->time_end_myr             = now->time_end_myr;
  cfg->time_max_steps           = now->time_max_steps;
  cfg->checkpoint_every_steps   = now->checkpoint_every_steps;
  cfg->checkpoint_every_minutes = now->checkpoint_every_minutes;
  cfg->checkpoint_keep          = now->checkpoint_keep;
  cfg->snapshot_every_steps     = now->snapshot_every_steps;
  cfg->output_overwrite         = now->output_overwrite;
  cfg->extraction_focusing_width  = now->extraction_focusing_width;
  cfg->extraction_min_depletion   = now->extraction_min_depletion;
  cfg->extraction_lid_temperature = now->extraction_lid_temperature;
  cfg->melt_lens_isotherm       = now->melt_lens_isotherm;
  cfg->lithosphere_isotherm     = now->lithosphere_isotherm;
  cfg->ridge_depth              = now->ridge_depth;
  cfg->pt_path_start_x          = now->pt_path_start_x;
  memcpy(cfg->output_dir, now->output_dir, sizeof(cfg->output_dir));
}

/* The crust record as a Vec held on rank 0 (4 values a step). */
static PetscErrorCode RecordVec(CFTransient tr, PetscInt n, Vec *R)
{
  PetscMPIInt rank;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(tr->comm, &rank));
  PetscCall(VecCreateMPI(tr->comm, rank ? 0 : 4 * n, 4 * n, R));
  PetscCall(PetscObjectSetName((PetscObject)*R, "crust_record"));
  PetscFunctionReturn(0);
}

PetscErrorCode CFTransientCheckpointWrite(CFTransient tr, const char path[])
{
  PetscViewer  v;
  Vec          R;
  char         tmp[PETSC_MAX_PATH_LEN], fp[17], *text, msg[2 * PETSC_MAX_PATH_LEN + 128] = "";
  PetscReal    t, dt, norms[2] = {0, 0};
  PetscInt     step, n = tr->rec.n, fmtv = CF_CHECKPOINT_VERSION;
  PetscMPIInt  rank;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(tr->comm, &rank));
  PetscCall(CFTransientGetTime(tr, &t, &step, &dt));
  PetscCall(PetscSNPrintf(tmp, sizeof(tmp), "%s.tmp", path));
  PetscCall(RecordVec(tr, n, &R));
  if (!rank && n) {
    PetscScalar *a;
    PetscCall(VecGetArray(R, &a));
    for (PetscInt k = 0; k < n; k++) a[4 * k] = tr->rec.t[k], a[4 * k + 1] = tr->rec.dt[k], a[4 * k + 2] = tr->rec.melt[k], a[4 * k + 3] = tr->rec.U[k];
    PetscCall(VecRestoreArray(R, &a));
  }
  PetscCall(VecNorm(tr->s->X, NORM_1, &norms[0]));
  if (n) PetscCall(VecNorm(R, NORM_1, &norms[1]));
  PetscCall(CFConfigFingerprint(&tr->cfg, fp));
  PetscCall(ScenarioText(&tr->cfg, &text));

  /* created with its user block on rank 0 (the viewer offers no file-creation properties) */
  if (!rank) (void)CFIntegrityCreateFile(tmp, msg, sizeof(msg));
  PetscCallMPI(MPI_Bcast(msg, sizeof(msg), MPI_CHAR, 0, tr->comm));
  PetscCheck(!msg[0], tr->comm, PETSC_ERR_FILE_OPEN, "checkpoint '%s': %s", path, msg);
  PetscCall(PetscViewerHDF5Open(tr->comm, tmp, FILE_MODE_APPEND, &v));
  PetscCall(VecView(tr->s->X, v));
  if (n) PetscCall(VecView(R, v));
  PetscCall(PetscViewerHDF5WriteAttribute(v, "/", "format", PETSC_STRING, CF_CHECKPOINT_FORMAT));
  PetscCall(PetscViewerHDF5WriteAttribute(v, "/", "format_version", PETSC_INT, &fmtv));
  PetscCall(PetscViewerHDF5WriteAttribute(v, "/", "time_s", PETSC_REAL, &t));
  PetscCall(PetscViewerHDF5WriteAttribute(v, "/", "step", PETSC_INT, &step));
  PetscCall(PetscViewerHDF5WriteAttribute(v, "/", "next_step_s", PETSC_REAL, &dt));
  PetscCall(PetscViewerHDF5WriteAttribute(v, "/", "crust_steps", PETSC_INT, &n));
  PetscCall(PetscViewerHDF5WriteAttribute(v, "/", "state_norm1", PETSC_REAL, &norms[0]));
  PetscCall(PetscViewerHDF5WriteAttribute(v, "/", "crust_record_norm1", PETSC_REAL, &norms[1]));
  PetscCall(PetscViewerHDF5WriteAttribute(v, "/", "fingerprint", PETSC_STRING, fp));
  PetscCall(PetscViewerHDF5WriteAttribute(v, "/", "scenario", PETSC_STRING, text));
  PetscCall(PetscViewerHDF5WriteAttribute(v, "/", "scenario_file", PETSC_STRING, tr->cfg.scenario[0] ? tr->cfg.scenario : "(none)"));
  {
    char *hex;
    PetscCall(ConfigToHex(&tr->cfg, &hex));
    PetscCall(PetscViewerHDF5WriteAttribute(v, "/", "config_binary", PETSC_STRING, hex));
    PetscCall(PetscFree(hex));
  }
  PetscCall(PetscViewerDestroy(&v)); /* closes and flushes the file */
  PetscCall(PetscFree(text));
  PetscCall(VecDestroy(&R));
  if (!rank) {
    char dir[PETSC_MAX_PATH_LEN], *slash;
    PetscCall(PetscStrncpy(dir, path, sizeof(dir)));
    slash = strrchr(dir, '/');
    if (slash) *slash = 0;
    else PetscCall(PetscStrncpy(dir, ".", sizeof(dir)));
    if (!CFIntegritySeal(tmp, CF_FILE_CHECKPOINT, msg, sizeof(msg)) && (CFFileSync(tmp) || rename(tmp, path) || CFFileSync(dir)))
      snprintf(msg, sizeof(msg), "checkpoint '%s': cannot flush and rename the temporary file: %s", path, strerror(errno));
  }
  PetscCallMPI(MPI_Bcast(msg, sizeof(msg), MPI_CHAR, 0, tr->comm));
  PetscCheck(!msg[0], tr->comm, PETSC_ERR_FILE_WRITE, "%s", msg);
  PetscFunctionReturn(0);
}

/* Is path a complete checkpoint?  Rank 0 checks its integrity header first (a truncated or
   damaged file is refused before HDF5 parses it), then opens it with HDF5 directly, quietly. */
static PetscErrorCode Probe(MPI_Comm comm, const char path[])
{
  PetscMPIInt rank;
  int         code = 0;
  char        msg[PETSC_MAX_PATH_LEN + 256] = "";

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  if (!rank) {
    H5E_auto2_t func;
    void       *data;
    H5Eget_auto2(H5E_DEFAULT, &func, &data);
    H5Eset_auto2(H5E_DEFAULT, NULL, NULL);
    if (access(path, R_OK)) {
      code = PETSC_ERR_FILE_OPEN;
      snprintf(msg, sizeof(msg), "checkpoint '%s' cannot be read: %s", path, "missing or not readable");
    } else if (!(code = CFIntegrityVerify(path, CF_FILE_CHECKPOINT, msg, sizeof(msg)))) {
      hid_t f = H5Fopen(path, H5F_ACC_RDONLY, H5P_DEFAULT);
      code    = PETSC_ERR_FILE_UNEXPECTED;
      if (f < 0) snprintf(msg, sizeof(msg), "checkpoint '%s' is damaged (HDF5 cannot open it)", path);
      else {
        if (H5Aexists(f, "format") <= 0 || H5Aexists(f, "fingerprint") <= 0 || H5Aexists(f, "scenario") <= 0 || H5Aexists(f, "config_binary") <= 0 || H5Lexists(f, "state", H5P_DEFAULT) <= 0) snprintf(msg, sizeof(msg), "checkpoint '%s' is not a crustforge checkpoint (or was never completed)", path);
        else code = 0;
        H5Fclose(f);
      }
    }
    H5Eset_auto2(H5E_DEFAULT, func, data);
  }
  PetscCallMPI(MPI_Bcast(&code, 1, MPI_INT, 0, comm));
  PetscCallMPI(MPI_Bcast(msg, sizeof(msg), MPI_CHAR, 0, comm));
  PetscCheck(!code, comm, code, "%s", msg);
  PetscFunctionReturn(0);
}

static PetscErrorCode ReadString(PetscViewer v, const char path[], const char name[], char **value)
{
  PetscFunctionBeginUser;
  PetscCall(PetscViewerHDF5ReadAttribute(v, "/", name, PETSC_STRING, NULL, value));
  (void)path;
  PetscFunctionReturn(0);
}

/* The first key (other than those that may change) whose value differs between the checkpoint's
   scenario text and cfg. */
static PetscErrorCode FirstDifference(const char *text, const CFConfig *cfg, char msg[], size_t len)
{
  PetscInt       n;
  CFConfigEntry *e;

  PetscFunctionBeginUser;
  msg[0] = 0;
  PetscCall(CFConfigGetEntries(cfg, &n, &e));
  for (PetscInt k = 0; k < n && !msg[0]; k++) {
    char        want[PETSC_MAX_PATH_LEN + 2];
    const char *line = NULL;
    if (CFConfigKeyMayChange(e[k].key)) continue;
    snprintf(want, sizeof(want), "%s\t", e[k].option);
    for (const char *p = text; p && *p; p = strchr(p, '\n') ? strchr(p, '\n') + 1 : NULL)
      if (!strncmp(p, want, strlen(want))) { line = p + strlen(want); break; }
    if (!line) snprintf(msg, len, "%s is not in the checkpoint", e[k].key);
    else {
      size_t l = strcspn(line, "\n");
      if (l != strlen(e[k].value) || strncmp(line, e[k].value, l)) snprintf(msg, len, "%s is %s here but %.*s in the checkpoint", e[k].key, e[k].value[0] ? e[k].value : "(empty)", (int)l, line);
    }
  }
  PetscCall(PetscFree(e));
  PetscFunctionReturn(0);
}

PetscErrorCode CFCheckpointReadConfig(MPI_Comm comm, const char path[], int argc, char **argv, int first, CFConfig *cfg)
{
  PetscViewer v;
  char       *text, *fp_stored, *scenario, *hex, fp[17], diff[2 * PETSC_MAX_PATH_LEN];
  CFConfig    now, exact;
  PetscBool   same_build;

  PetscFunctionBeginUser;
  PetscCall(Probe(comm, path));
  PetscCall(PetscViewerHDF5Open(comm, path, FILE_MODE_READ, &v));
  PetscCall(ReadString(v, path, "scenario", &text));
  PetscCall(ReadString(v, path, "fingerprint", &fp_stored));
  PetscCall(ReadString(v, path, "scenario_file", &scenario));
  PetscCall(ReadString(v, path, "config_binary", &hex));
  PetscCall(PetscViewerDestroy(&v));
  /* the stored keys, then the command line over them */
  for (char *line = text; line && *line;) {
    char *nl = strchr(line, '\n'), *tab;
    if (nl) *nl = 0;
    tab = strchr(line, '\t');
    if (tab && tab[1]) {
      *tab = 0;
      PetscCall(PetscOptionsSetValue(NULL, line, tab + 1));
      *tab = '\t';
    }
    if (nl) *nl = '\n';
    line = nl ? nl + 1 : NULL;
  }
  if (argc > first) PetscCall(PetscOptionsInsertArgs(NULL, argc - first, argv + first));
  PetscCall(CFConfigSetFromOptions(comm, &now));
  PetscCall(PetscStrncpy(now.scenario, scenario, sizeof(now.scenario)));
  PetscCall(CFConfigFingerprint(&now, fp));
  if (strcmp(fp, fp_stored)) PetscCall(FirstDifference(text, &now, diff, sizeof(diff)));
  same_build = HexToConfig(hex, &exact);
  PetscCall(PetscFree(hex));
  PetscCheck(same_build, comm, PETSC_ERR_FILE_UNEXPECTED, "checkpoint '%s' was written by a different build of crustforge (its parameter record does not fit this one)", path);
  TakeChangeable(&exact, &now);
  *cfg = exact;
  PetscCall(PetscFree(text));
  PetscCall(PetscFree(scenario));
  {
    PetscBool same = (PetscBool)!strcmp(fp, fp_stored);
    PetscCall(PetscFree(fp_stored));
    PetscCheck(same, comm, PETSC_ERR_USER_INPUT, "resume: the physics differs from checkpoint '%s' (%s); only time.end, time.max_steps, checkpoint.*, snapshots.*, output.* and the post-processing keys may change", path, diff[0] ? diff : "fingerprint differs");
  }
  PetscFunctionReturn(0);
}

PetscErrorCode CFTransientCheckpointLoad(CFTransient tr, const char path[])
{
  PetscViewer v;
  Vec         R;
  PetscReal   t, dt, norms[2], got[2] = {0, 0};
  PetscInt    step, n, fmtv;
  PetscMPIInt rank;
  char       *format;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(tr->comm, &rank));
  PetscCall(Probe(tr->comm, path));
  PetscCall(CFTransientSetUpTS(tr));
  PetscCall(PetscViewerHDF5Open(tr->comm, path, FILE_MODE_READ, &v));
  PetscCall(ReadString(v, path, "format", &format));
  {
    PetscBool ok = (PetscBool)!strcmp(format, CF_CHECKPOINT_FORMAT);
    PetscCall(PetscFree(format));
    PetscCheck(ok, tr->comm, PETSC_ERR_FILE_UNEXPECTED, "checkpoint '%s' is not a crustforge checkpoint", path);
  }
  PetscCall(PetscViewerHDF5ReadAttribute(v, "/", "format_version", PETSC_INT, NULL, &fmtv));
  PetscCheck(fmtv <= CF_CHECKPOINT_VERSION, tr->comm, PETSC_ERR_FILE_UNEXPECTED, "checkpoint '%s' has format version %d, newer than this program reads (%d)", path, (int)fmtv, CF_CHECKPOINT_VERSION);
  PetscCall(PetscViewerHDF5ReadAttribute(v, "/", "time_s", PETSC_REAL, NULL, &t));
  PetscCall(PetscViewerHDF5ReadAttribute(v, "/", "step", PETSC_INT, NULL, &step));
  PetscCall(PetscViewerHDF5ReadAttribute(v, "/", "next_step_s", PETSC_REAL, NULL, &dt));
  PetscCall(PetscViewerHDF5ReadAttribute(v, "/", "crust_steps", PETSC_INT, NULL, &n));
  PetscCall(PetscViewerHDF5ReadAttribute(v, "/", "state_norm1", PETSC_REAL, NULL, &norms[0]));
  PetscCall(PetscViewerHDF5ReadAttribute(v, "/", "crust_record_norm1", PETSC_REAL, NULL, &norms[1]));
  PetscCall(VecLoad(tr->s->X, v));
  PetscCall(RecordVec(tr, n, &R));
  if (n) PetscCall(VecLoad(R, v));
  PetscCall(PetscViewerDestroy(&v));
  PetscCall(VecNorm(tr->s->X, NORM_1, &got[0]));
  if (n) PetscCall(VecNorm(R, NORM_1, &got[1]));
  for (int k = 0; k < 2; k++) PetscCheck(PetscAbsReal(got[k] - norms[k]) <= 1e-12 * norms[k] && !PetscIsInfOrNanReal(got[k]), tr->comm, PETSC_ERR_FILE_UNEXPECTED, "checkpoint '%s' is damaged: its %s does not match its stored norm", path, k ? "crust record" : "state");
  PetscCall(CFCrustRecordDestroy(&tr->rec));
  {
    PetscReal *all;
    PetscCall(PetscMalloc1(4 * n + 1, &all));
    if (!rank && n) {
      const PetscScalar *a;
      PetscCall(VecGetArrayRead(R, &a));
      for (PetscInt k = 0; k < 4 * n; k++) all[k] = PetscRealPart(a[k]);
      PetscCall(VecRestoreArrayRead(R, &a));
    }
    PetscCallMPI(MPI_Bcast(all, (PetscMPIInt)(4 * n), MPIU_REAL, 0, tr->comm));
    for (PetscInt k = 0; k < n; k++) PetscCall(CFCrustRecordAppend(&tr->rec, all[4 * k], all[4 * k + 1], all[4 * k + 2], all[4 * k + 3]));
    PetscCall(PetscFree(all));
  }
  PetscCall(VecDestroy(&R));
  PetscCall(TSSetTime(tr->ts, t));
  PetscCall(TSSetStepNumber(tr->ts, step));
  PetscCall(TSSetTimeStep(tr->ts, dt));
  PetscCall(CFTransientSetParameters(tr, t));
  PetscFunctionReturn(0);
}

static int CompareNames(const void *a, const void *b) { return strcmp(*(char *const *)a, *(char *const *)b); }

PetscErrorCode CFCheckpointRotate(MPI_Comm comm, const char dir[], PetscInt keep)
{
  PetscMPIInt rank;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  if (rank) PetscFunctionReturn(0);
  {
    DIR           *d = opendir(dir);
    struct dirent *de;
    char         **names = NULL;
    size_t         n = 0, cap = 0;
    if (!d) PetscFunctionReturn(0);
    while ((de = readdir(d))) {
      size_t l = strlen(de->d_name);
      if (strncmp(de->d_name, "checkpoint_", 11) || l < 15 || strcmp(de->d_name + l - 3, ".h5")) continue;
      if (n == cap) {
        cap = cap ? 2 * cap : 16;
        names = (char **)realloc(names, cap * sizeof(*names));
      }
      names[n++] = strdup(de->d_name);
    }
    closedir(d);
    if (n) qsort(names, n, sizeof(*names), CompareNames); /* zero-padded step numbers sort in time */
    for (size_t k = 0; k < n; k++) {
      if ((PetscInt)(n - k) > keep) {
        char path[PETSC_MAX_PATH_LEN];
        snprintf(path, sizeof(path), "%s/%s", dir, names[k]);
        (void)unlink(path);
      }
      free(names[k]);
    }
    free(names);
  }
  PetscFunctionReturn(0);
}
