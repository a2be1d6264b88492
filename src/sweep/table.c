/* sweep.csv: one row per case, in case order, with summary.csv's own columns (written by the
   post-processor's row writer), the swept keys that summary.csv lacks, and the case's status. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>
#include <crustforge/sweep.h>
#include <crustforge/units.h>

/* Keys that summary.csv reports already (full_spreading_rate_mm_yr, potential_temperature_C,
   water_ppm). */
static PetscBool InSummary(const char key[])
{
  return (PetscBool)(!strcmp(key, "ridge.full_spreading_rate") || !strcmp(key, "mantle.potential_temperature") || !strcmp(key, "mantle.water"));
}

/* "mantle.conductivity" in "W/m/K" -> "mantle_conductivity_W_m_K" */
static void ExtraColumnName(const CFSweepAxis *ax, char name[], size_t len)
{
  size_t n = 0;
  for (const char *p = ax->key; *p && n + 1 < len; p++) name[n++] = *p == '.' ? '_' : *p;
  if (ax->unit[0] && n + 1 < len) name[n++] = '_';
  for (const char *p = ax->unit; *p && n + 1 < len; p++)
    if ((*p >= 'a' && *p <= 'z') || (*p >= 'A' && *p <= 'Z') || (*p >= '0' && *p <= '9')) name[n++] = *p;
    else if (n && name[n - 1] != '_') name[n++] = '_';
  while (n && name[n - 1] == '_') n--;
  name[n] = 0;
}

void CFSweepRow(const CFSweep *sw, PetscInt c, PetscInt nonlinear_iterations, PetscReal seconds, const CFSummary *sum, const char reason[], char row[], size_t len)
{
  CFRunData      run;
  CFPostSettings set;
  CFSummary      none;
  char          *buf = NULL;
  size_t         n   = 0;
  FILE          *fp;

  row[0] = 0;
  (void)memset(&run, 0, sizeof(run));
  run.cfg                  = sw->cases[c];
  run.nonlinear_iterations = nonlinear_iterations;
  run.solve_seconds        = seconds;
  if (CFPostSettingsFromConfig(&run.cfg, &set)) return;
  if (!sum) {
    PetscReal *v = (PetscReal *)&none;
    for (size_t k = 0; k < sizeof(none) / sizeof(PetscReal); k++) v[k] = NAN;
    sum = &none;
  }
  if (!(fp = open_memstream(&buf, &n))) return;
  fprintf(fp, "%d,", (int)(c + 1));
  CFPostSummaryCSVRow(fp, &run, &set, sum, ",");
  for (PetscInt k = 0; k < sw->naxes; k++)
    if (!InSummary(sw->axis[k].key)) fprintf(fp, "%.15g,", (double)sw->axis[k].v[CFSweepCaseIndex(sw, c, k)]);
  fputs(reason ? "failed," : "ok,", fp);
  /* a reason is one CSV field: no commas, quotes or line breaks */
  for (const char *p = reason ? reason : ""; *p; p++) fputc(*p == ',' ? ';' : *p == '"' ? '\'' : (*p == '\n' || *p == '\r') ? ' ' : *p, fp);
  fclose(fp);
  (void)snprintf(row, len, "%s", buf ? buf : "");
  free(buf);
}

static void Header(const CFSweep *sw, FILE *fp)
{
  fputs("case,", fp);
  CFPostSummaryCSVHeader(fp, ",");
  for (PetscInt k = 0; k < sw->naxes; k++)
    if (!InSummary(sw->axis[k].key)) {
      char name[2 * CF_NAME_LEN + 40];
      ExtraColumnName(&sw->axis[k], name, sizeof(name));
      fprintf(fp, "%s,", name);
    }
  fputs("status,reason\n", fp);
}

PetscErrorCode CFSweepWriteTable(const CFSweep *sw)
{
  char  path[CF_SWEEP_PATH_LEN], tmp[CF_SWEEP_PATH_LEN + 8], row[CF_SWEEP_ROW_LEN];
  FILE *fp;
  int   bad;

  PetscFunctionBeginUser;
  (void)snprintf(path, sizeof(path), "%s/sweep.csv", sw->base.output_dir);
  (void)snprintf(tmp, sizeof(tmp), "%s.tmp", path);
  fp = fopen(tmp, "w");
  PetscCheck(fp, PETSC_COMM_SELF, PETSC_ERR_FILE_WRITE, "cannot write '%s': %s", tmp, strerror(errno));
  Header(sw, fp);
  for (PetscInt c = 0; c < sw->ncases; c++) {
    PetscErrorCode ierr = CFSweepRecordRead(sw, c, row, sizeof(row));
    if (ierr) {
      fclose(fp);
      (void)unlink(tmp);
      PetscCall(ierr);
    }
    if (row[0]) fprintf(fp, "%s\n", row);
  }
  bad = ferror(fp);
  bad = fclose(fp) || bad;
  if (bad) (void)unlink(tmp);
  PetscCheck(!bad, PETSC_COMM_SELF, PETSC_ERR_FILE_WRITE, "writing '%s' failed: %s", tmp, strerror(errno));
  PetscCheck(!rename(tmp, path), PETSC_COMM_SELF, PETSC_ERR_FILE_WRITE, "cannot rename '%s' to '%s': %s", tmp, path, strerror(errno));
  PetscFunctionReturn(0);
}
