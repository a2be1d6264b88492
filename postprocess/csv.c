/* The post-processor's tables: summary.csv (one row), profiles.csv (one row per column) and
   pt_paths.csv (one row per path point).  Comma-separated, one header line, numbers in the units
   their column names state, written with 15 significant digits (enough to re-read a figure to
   round-off); NaN is written "nan".  One rank writes DIR/NAME.tmp and renames it to DIR/NAME
   when complete, so an interrupted write never leaves a partial table under the real name. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>
#include <crustforge/units.h>
#include "post_impl.h"

typedef void (*CsvBody)(FILE *fp, const void *ctx);

static void Real(FILE *fp, PetscReal v, const char *end)
{
  if (isnan(v)) fputs("nan", fp);
  else if (isinf(v)) fputs(v > 0 ? "inf" : "-inf", fp);
  else fprintf(fp, "%.15g", (double)v);
  fputs(end, fp);
}

/* DIR/NAME and its temporary name DIR/NAME.tmp. */
static void TablePaths(const char dir[], const char name[], char path[PETSC_MAX_PATH_LEN], char tmp[PETSC_MAX_PATH_LEN + 8])
{
  snprintf(path, PETSC_MAX_PATH_LEN, "%s/%s", dir, name);
  snprintf(tmp, PETSC_MAX_PATH_LEN + 8, "%s.tmp", path);
}

/* One rank: write DIR/NAME.tmp; "" in msg on success, else a one-line reason. */
static void WriteTemp(const char dir[], const char name[], CsvBody body, const void *ctx, char msg[], size_t len)
{
  char  path[PETSC_MAX_PATH_LEN], tmp[PETSC_MAX_PATH_LEN + 8];
  FILE *fp;
  int   bad;

  msg[0] = 0;
  TablePaths(dir, name, path, tmp);
  if (!(fp = fopen(tmp, "w"))) {
    snprintf(msg, len, "cannot write '%s': %s", tmp, strerror(errno));
    return;
  }
  body(fp, ctx);
  bad = ferror(fp);
  if (fclose(fp) || bad) snprintf(msg, len, "writing '%s' failed: %s", tmp, strerror(errno));
}

/* DIR/NAME.tmp renamed to DIR/NAME when keep, else removed; a failed rename into msg. */
static void Publish(const char dir[], const char name[], PetscBool keep, char msg[], size_t len)
{
  char path[PETSC_MAX_PATH_LEN], tmp[PETSC_MAX_PATH_LEN + 8];

  TablePaths(dir, name, path, tmp);
  if (keep && !rename(tmp, path)) return;
  if (keep) snprintf(msg, len, "cannot rename '%s' to '%s': %s", tmp, path, strerror(errno));
  (void)unlink(tmp);
}

/* ---- summary.csv: other tools (sweeps, figures) rely on these column names ---------------- */
typedef struct {
  const CFRunData      *run;
  const CFPostSettings *set;
  const CFSummary      *sum;
} SummaryCtx;

typedef struct {
  const char *name;
  PetscReal   value;
} SummaryColumn;

#define CF_SUMMARY_NCOLUMNS 19

/* The one list of summary.csv's columns, for the header and the rows alike. */
static void SummaryColumns(const CFRunData *run, const CFPostSettings *e, const CFSummary *m, SummaryColumn col[CF_SUMMARY_NCOLUMNS])
{
  const CFConfig     *c = &run->cfg;
  const SummaryColumn all[CF_SUMMARY_NCOLUMNS] = {
    {"full_spreading_rate_mm_yr", c->full_spreading_rate_mm_yr},
    {"potential_temperature_C", CFKelvinToCelsius(c->potential_temperature)},
    {"water_ppm", c->water_ppm},
    {"crustal_thickness_km", CFMToKm(m->crustal_thickness)},
    {"crustal_thickness_side_flux_km", CFMToKm(m->crustal_thickness_side_flux)},
    {"melt_onset_depth_km", CFMToKm(m->melt_onset_depth)},
    {"max_depletion", m->max_depletion},
    {"mean_melt_fraction", m->mean_melt_fraction},
    {"mean_melting_pressure_GPa", CFPaToGPa(m->mean_melting_pressure)},
    {"melt_lens_depth_km", CFMToKm(m->melt_lens_depth)},
    {"nonlinear_iterations", run->nonlinear_iterations >= 0 ? (PetscReal)run->nonlinear_iterations : NAN},
    {"solve_seconds", run->solve_seconds},
    {"regime_mean_melt_fraction", m->regime_mean_melt_fraction},
    {"melt_flux_kg_m_s", m->melt_flux},
    {"melting_region_width_km", CFMToKm(m->melting_region_width)},
    {"melting_region_area_km2", m->melting_region_area * 1.0e-6},
    {"focusing_width_km", CFMToKm(e->focusing_width)},
    {"min_depletion", e->min_depletion},
    {"lid_temperature_C", e->lid_temperature > 0.0 ? CFKelvinToCelsius(e->lid_temperature) : 0.0},
  };
  memcpy(col, all, sizeof(all));
}

void CFPostSummaryCSVHeader(FILE *fp, const char end[])
{
  static const CFRunData      run;
  static const CFPostSettings set;
  static const CFSummary      sum;
  SummaryColumn               col[CF_SUMMARY_NCOLUMNS];

  SummaryColumns(&run, &set, &sum, col);
  for (size_t k = 0; k < CF_SUMMARY_NCOLUMNS; k++) fprintf(fp, "%s%s", col[k].name, k + 1 < CF_SUMMARY_NCOLUMNS ? "," : end);
}

void CFPostSummaryCSVRow(FILE *fp, const CFRunData *run, const CFPostSettings *set, const CFSummary *sum, const char end[])
{
  SummaryColumn col[CF_SUMMARY_NCOLUMNS];

  SummaryColumns(run, set, sum, col);
  for (size_t k = 0; k < CF_SUMMARY_NCOLUMNS; k++) Real(fp, col[k].value, k + 1 < CF_SUMMARY_NCOLUMNS ? "," : end);
}

static void SummaryBody(FILE *fp, const void *ptr)
{
  const SummaryCtx *s = (const SummaryCtx *)ptr;

  CFPostSummaryCSVHeader(fp, "\n");
  CFPostSummaryCSVRow(fp, s->run, s->set, s->sum, "\n");
}

/* ---- profiles.csv ------------------------------------------------------------------------- */
static void ProfilesBody(FILE *fp, const void *ptr)
{
  const CFProfiles *p = (const CFProfiles *)ptr;

  fputs("distance_km,age_Myr,heat_flow_mW_m2,seafloor_depth_km,lithosphere_thickness_km\n", fp);
  for (PetscInt i = 0; i < p->n; i++) {
    Real(fp, CFMToKm(p->x[i]), ",");
    Real(fp, CFSToMyr(p->age[i]), ",");
    Real(fp, p->heat_flow[i] * 1.0e3, ",");
    Real(fp, CFMToKm(p->seafloor_depth[i]), ",");
    Real(fp, CFMToKm(p->lithosphere_thickness[i]), "\n");
  }
}

/* ---- pt_paths.csv: paths numbered from 1 in the order of pt_paths.start_x ----------------- */
static void PathsBody(FILE *fp, const void *ptr)
{
  const CFPTPaths *p = (const CFPTPaths *)ptr;

  fputs("path,x_km,z_km,time_Myr,pressure_GPa,temperature_C,depletion\n", fp);
  for (PetscInt q = 0; q < p->npaths; q++)
    for (PetscInt k = 0; k < p->npoints[q]; k++) {
      fprintf(fp, "%" PetscInt_FMT ",", q + 1);
      Real(fp, CFMToKm(p->x[q][k]), ",");
      Real(fp, CFMToKm(p->z[q][k]), ",");
      Real(fp, CFSToMyr(p->time[q][k]), ",");
      Real(fp, CFPaToGPa(p->P[q][k]), ",");
      Real(fp, CFKelvinToCelsius(p->T[q][k]), ",");
      Real(fp, p->F[q][k], "\n");
    }
}

/* Every rank learns the outcome of rank 0's tables (msg[0]) and of the last rank's (msg[1]). */
static PetscErrorCode ShareOutcome(MPI_Comm comm, PetscMPIInt size, char msg[2][2 * PETSC_MAX_PATH_LEN + 128])
{
  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Bcast(msg[0], sizeof(msg[0]), MPI_CHAR, 0, comm));
  PetscCallMPI(MPI_Bcast(msg[1], sizeof(msg[1]), MPI_CHAR, size - 1, comm));
  PetscFunctionReturn(0);
}

/* Rank 0 writes summary.csv and profiles.csv while the last rank writes pt_paths.csv, the
   longest of the three (every rank holds the paths).  Only when all three are complete do they
   take their real names, so a failure leaves the directory's earlier tables as they were. */
PetscErrorCode CFPostWriteTables(MPI_Comm comm, const char dir[], const CFRunData *run, const CFPostSettings *set, const CFSummary *sum, const CFProfiles *prof, const CFPTPaths *paths)
{
  const SummaryCtx ctx = {run, set, sum};
  PetscMPIInt      rank, size;
  PetscBool        ok;
  char             msg[2][2 * PETSC_MAX_PATH_LEN + 128] = {"", ""};

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  PetscCallMPI(MPI_Comm_size(comm, &size));
  if (!rank) {
    WriteTemp(dir, "summary.csv", SummaryBody, &ctx, msg[0], sizeof(msg[0]));
    if (!msg[0][0]) WriteTemp(dir, "profiles.csv", ProfilesBody, prof, msg[0], sizeof(msg[0]));
  }
  if (rank == size - 1) WriteTemp(dir, "pt_paths.csv", PathsBody, paths, msg[1], sizeof(msg[1]));
  PetscCall(ShareOutcome(comm, size, msg));
  ok = (PetscBool)(!msg[0][0] && !msg[1][0]);
  if (!rank) {
    Publish(dir, "summary.csv", ok, msg[0], sizeof(msg[0]));
    Publish(dir, "profiles.csv", ok, msg[0], sizeof(msg[0]));
  }
  if (rank == size - 1) Publish(dir, "pt_paths.csv", ok, msg[1], sizeof(msg[1]));
  if (ok) PetscCall(ShareOutcome(comm, size, msg)); /* a rename's failure */
  PetscCheck(!msg[0][0], comm, PETSC_ERR_FILE_WRITE, "%s", msg[0]);
  PetscCheck(!msg[1][0], comm, PETSC_ERR_FILE_WRITE, "%s", msg[1]);
  PetscFunctionReturn(0);
}
