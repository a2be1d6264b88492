/* Check suite for the run output (src/output): a run file written and read back on 1 and 2 ranks
   (shapes, names, units, values, scenario, provenance), an independent raw-HDF5 read of the
   stored layout, a failed run leaving nothing behind, and files the reader must refuse.
   The scenario is invented (a fictional slow ridge segment); the fields are analytic, so the
   same expected values hold whatever the rank count: that is the rank-independence check. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include <hdf5.h>
#include <petscdmda.h>
#include <crustforge/output.h>
#include <crustforge/units.h>
#include "cf_test.h"


/* Invented scenario: 48 km x 24 km at 2 km gives the 24 x 12 test grid. */
static const char *scenario_options[] = {"-grid_width", "48", "-grid_depth", "24", "-grid_spacing", "2", "-ridge_full_spreading_rate", "25", "-mantle_potential_temperature", "1380",
                                         "-mantle_water", "125", "-hydrothermal_nusselt", "4", "-katz2003_mcpx", "0.15", "-output_dir", "cf-output-test", NULL};

/* Output units: degC and mm/yr are UDUNITS spellings (CF conventions, from memory); the
   conversions are those of crustforge/units.h. */
static const CFFieldInfo temperature_info = {"temperature", "mantle temperature", "degC", "K", 1.0, -CF_KELVIN_OFFSET};
static const CFFieldInfo velocity_info    = {"velocity_x", "horizontal mantle velocity away from the axis", "mm/yr", "m/s", 1.0e3 * CF_SECONDS_PER_YEAR, 0.0};

static char tmpdir[PETSC_MAX_PATH_LEN - 64]; /* scratch directory of this suite, not model state; room left for a file name */

static void MakeTmp(void)
{
  PetscMPIInt rank;
  const char *base = getenv("TMPDIR");

  MPI_Comm_rank(PETSC_COMM_WORLD, &rank);
  if (!rank) {
    snprintf(tmpdir, sizeof(tmpdir), "%s/cf_test_output_XXXXXX", base && base[0] ? base : "/tmp");
    if (!mkdtemp(tmpdir)) tmpdir[0] = 0;
  }
  MPI_Bcast(tmpdir, sizeof(tmpdir), MPI_CHAR, 0, PETSC_COMM_WORLD);
  ck_assert_msg(tmpdir[0], "cannot create a scratch directory");
}

static void TmpPath(const char *name, char *path) { snprintf(path, PETSC_MAX_PATH_LEN, "%s/%s", tmpdir, name); }

static PetscBool Exists(const char *name)
{
  char        path[PETSC_MAX_PATH_LEN];
  struct stat st;
  TmpPath(name, path);
  return (PetscBool)!stat(path, &st);
}

static void RemoveTmp(void)
{
  static const char *names[] = {"run.h5", "run.xdmf", "run.h5.tmp", "run.xdmf.tmp", "failed.h5", "failed.xdmf", "failed.h5.tmp", "failed.xdmf.tmp", "text.h5", "truncated.h5", "foreign.h5", "incomplete.h5", "flipped.h5", "header.h5"};
  PetscMPIInt        rank;

  MPI_Barrier(PETSC_COMM_WORLD);
  MPI_Comm_rank(PETSC_COMM_WORLD, &rank);
  if (!rank) {
    char path[PETSC_MAX_PATH_LEN];
    for (size_t i = 0; i < sizeof(names) / sizeof(names[0]); i++) {
      TmpPath(names[i], path);
      (void)unlink(path);
    }
    (void)rmdir(tmpdir);
  }
}

/* The scenario above, read from a database of its own so that tests do not share options. */
static PetscErrorCode LoadScenario(CFConfig *cfg)
{
  PetscOptions opt;

  PetscFunctionBeginUser;
  PetscCall(PetscOptionsCreate(&opt));
  for (int i = 0; scenario_options[i]; i += 2) PetscCall(PetscOptionsSetValue(opt, scenario_options[i], scenario_options[i + 1]));
  PetscCall(PetscOptionsPush(opt));
  PetscCall(CFConfigSetFromOptions(PETSC_COMM_WORLD, cfg));
  PetscCall(PetscOptionsPop());
  PetscCall(PetscOptionsDestroy(&opt));
  PetscFunctionReturn(0);
}

static PetscErrorCode CreateGrid(const CFConfig *cfg, DM *da)
{
  PetscFunctionBeginUser;
  PetscCall(DMDACreate2d(PETSC_COMM_WORLD, DM_BOUNDARY_NONE, DM_BOUNDARY_NONE, DMDA_STENCIL_STAR, cfg->nx, cfg->nz, PETSC_DECIDE, PETSC_DECIDE, 1, 1, NULL, NULL, da));
  PetscCall(DMSetUp(*da));
  PetscFunctionReturn(0);
}

/* Half-space cooling temperature (K) at plate age t = x / U0 (Turcotte & Schubert, Geodynamics,
   2nd ed., sections 4.15-4.17): T = Ts + (Tp - Ts) erf(z / (2 sqrt(kappa t))). */
static PetscReal HalfSpaceT(const CFConfig *cfg, PetscReal x, PetscReal z)
{
  PetscReal kappa = cfg->conductivity / (cfg->mantle_density * cfg->heat_capacity), t = x / cfg->half_rate;
  return cfg->surface_temperature + (cfg->potential_temperature - cfg->surface_temperature) * erf(z / (2.0 * PetscSqrtReal(kappa * t)));
}

/* Corner-flow horizontal velocity (m/s): u = (2 U0 / pi) (atan(x/z) - x z / r^2) (Batchelor 1967;
   Reid & Jackson 1981; DESIGN 2.1). */
static PetscReal CornerU(const CFConfig *cfg, PetscReal x, PetscReal z) { return 2.0 * cfg->half_rate / PETSC_PI * (atan(x / z) - x * z / (x * x + z * z)); }

static PetscReal Analytic(const CFConfig *cfg, const char *field, PetscInt i, PetscInt j)
{
  PetscReal x = (i + 0.5) * cfg->dx, z = (j + 0.5) * cfg->dz;
  return !strcmp(field, "temperature") ? HalfSpaceT(cfg, x, z) : CornerU(cfg, x, z);
}

static PetscErrorCode FillAnalytic(DM da, const CFConfig *cfg, const char *field, Vec v)
{
  PetscScalar **a;
  DMDALocalInfo info;

  PetscFunctionBeginUser;
  PetscCall(DMDAGetLocalInfo(da, &info));
  PetscCall(DMDAVecGetArray(da, v, &a));
  for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
    for (PetscInt i = info.xs; i < info.xs + info.xm; i++) a[j][i] = Analytic(cfg, field, i, j);
  PetscCall(DMDAVecRestoreArray(da, v, &a));
  PetscFunctionReturn(0);
}

/* The largest relative difference between v and the analytic field. */
static PetscErrorCode MaxRelError(DM da, const CFConfig *cfg, const char *field, Vec v, PetscReal *err)
{
  PetscScalar **a;
  DMDALocalInfo info;
  PetscReal     e = 0;

  PetscFunctionBeginUser;
  PetscCall(DMDAGetLocalInfo(da, &info));
  PetscCall(DMDAVecGetArray(da, v, &a));
  for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
    for (PetscInt i = info.xs; i < info.xs + info.xm; i++) {
      PetscReal ex = Analytic(cfg, field, i, j);
      e            = PetscMax(e, PetscAbsReal(a[j][i] - ex) / PetscMax(PetscAbsReal(ex), 1e-300));
    }
  PetscCall(DMDAVecRestoreArray(da, v, &a));
  PetscCallMPI(MPI_Allreduce(&e, err, 1, MPIU_REAL, MPIU_MAX, PETSC_COMM_WORLD));
  PetscFunctionReturn(0);
}

/* A run file with both fields and three run figures; success decides how it is closed. */
static PetscErrorCode WriteRun(const CFConfig *cfg, DM da, const char *name, PetscBool success)
{
  CFRunFile file;
  Vec       v;
  char      path[PETSC_MAX_PATH_LEN];

  PetscFunctionBeginUser;
  TmpPath(name, path);
  PetscCall(DMCreateGlobalVector(da, &v));
  PetscCall(CFRunFileCreate(PETSC_COMM_WORLD, cfg, da, path, &file));
  PetscCall(FillAnalytic(da, cfg, "temperature", v));
  PetscCall(CFRunFileWriteField(file, &temperature_info, v));
  PetscCall(FillAnalytic(da, cfg, "velocity_x", v));
  PetscCall(CFRunFileWriteField(file, &velocity_info, v));
  PetscCall(CFRunFileSetAttributeInt(file, "nonlinear_iterations", 7));
  PetscCall(CFRunFileSetAttributeReal(file, "residual_norm", 3.25e-11));
  PetscCall(CFRunFileSetAttributeReal(file, "solve_seconds", 0.5));
  PetscCall(CFRunFileClose(&file, success));
  PetscCall(VecDestroy(&v));
  PetscFunctionReturn(0);
}

/* Written on this many ranks, read back through the reader: grid, field records, values after
   the scale/offset round trip (expected: the analytic fields, derived; 1e-12 relative is round-off
   headroom, common practice, no source), run figures and provenance. */
START_TEST(test_round_trip)
{
  CFConfig             cfg;
  DM                   da;
  Vec                  v;
  CFRunReader          r;
  const CFFieldRecord *fields;
  PetscInt             nx, nz, n, iters, ranks;
  PetscReal            err, res;
  PetscMPIInt          size;
  char                 path[PETSC_MAX_PATH_LEN], text[256];
  unsigned             hmaj, hmin, hrel;

  MakeTmp();
  CK_PETSC(LoadScenario(&cfg));
  ck_assert_int_eq(cfg.nx, 24);
  ck_assert_int_eq(cfg.nz, 12);
  CK_PETSC(CreateGrid(&cfg, &da));
  CK_PETSC(WriteRun(&cfg, da, "run.h5", PETSC_TRUE));
  ck_assert(Exists("run.h5") && Exists("run.xdmf"));
  ck_assert(!Exists("run.h5.tmp") && !Exists("run.xdmf.tmp"));

  TmpPath("run.h5", path);
  CK_PETSC(CFRunReaderOpen(PETSC_COMM_WORLD, path, &r));
  CK_PETSC(CFRunReaderGetGrid(r, &nx, &nz));
  ck_assert_int_eq(nx, 24);
  ck_assert_int_eq(nz, 12);
  CK_PETSC(CFRunReaderGetFields(r, &n, &fields));
  ck_assert_int_eq(n, 2); /* sorted by name */
  ck_assert_str_eq(fields[0].name, "temperature");
  ck_assert_str_eq(fields[0].units, "degC");
  ck_assert_str_eq(fields[0].si_units, "K");
  ck_assert_str_eq(fields[0].long_name, "mantle temperature");
  ck_assert_str_eq(fields[1].name, "velocity_x");
  ck_assert_str_eq(fields[1].units, "mm/yr");
  cf_assert_close(fields[1].scale, 1.0e3 * CF_SECONDS_PER_YEAR, 1e-15);

  CK_PETSC(DMCreateGlobalVector(da, &v));
  CK_PETSC(CFRunReaderReadField(r, "temperature", v));
  CK_PETSC(MaxRelError(da, &cfg, "temperature", v, &err));
  ck_assert_msg(err <= 1e-12, "temperature round trip: max relative error %g", (double)err);
  CK_PETSC(CFRunReaderReadField(r, "velocity_x", v));
  CK_PETSC(MaxRelError(da, &cfg, "velocity_x", v, &err));
  ck_assert_msg(err <= 1e-12, "velocity round trip: max relative error %g", (double)err);
  CK_PETSC(VecDestroy(&v));

  CK_PETSC(CFRunReaderGetAttributeInt(r, "nonlinear_iterations", &iters));
  ck_assert_int_eq(iters, 7);
  CK_PETSC(CFRunReaderGetAttributeReal(r, "residual_norm", &res));
  ck_assert(res == 3.25e-11);
  /* Provenance: the format marker, versions as the libraries report them, rank count, an ISO
     8601 UTC date (ISO 8601, YYYY-MM-DDThh:mm:ssZ). */
  CK_PETSC(CFRunReaderGetAttributeString(r, "format", text, sizeof(text)));
  ck_assert_str_eq(text, CF_RUN_FORMAT);
  CK_PETSC(CFRunReaderGetAttributeString(r, "crustforge_version", text, sizeof(text)));
  ck_assert(strlen(text) > 0);
  CK_PETSC(CFRunReaderGetAttributeString(r, "crustforge_revision", text, sizeof(text)));
  ck_assert(strlen(text) > 0);
  CK_PETSC(CFRunReaderGetAttributeString(r, "petsc_version", text, sizeof(text)));
  ck_assert_msg(!strncmp(text, "3.", 2), "petsc_version %s", text);
  CK_PETSC(CFRunReaderGetAttributeString(r, "hdf5_version", text, sizeof(text)));
  ck_assert(H5get_libversion(&hmaj, &hmin, &hrel) >= 0);
  {
    char expect[64];
    snprintf(expect, sizeof(expect), "%u.%u.%u", hmaj, hmin, hrel);
    ck_assert_str_eq(text, expect);
  }
  CK_PETSC(CFRunReaderGetAttributeInt(r, "mpi_ranks", &ranks));
  MPI_Comm_size(PETSC_COMM_WORLD, &size);
  ck_assert_int_eq(ranks, size);
  CK_PETSC(CFRunReaderGetAttributeString(r, "created", text, sizeof(text)));
  ck_assert_msg(strlen(text) == 20 && text[4] == '-' && text[7] == '-' && text[10] == 'T' && text[13] == ':' && text[16] == ':' && text[19] == 'Z', "created '%s' is not ISO 8601 UTC", text);
  CK_PETSC(CFRunReaderDestroy(&r));
  CK_PETSC(DMDestroy(&da));
  RemoveTmp();
}
END_TEST

/* Rank 0's part of test_layout_raw, as a message ("" when all is well) that every rank then
   asserts on: a failing assertion on one rank alone would leave the others waiting. */
static void CheckLayoutRaw(const CFConfig *cfg, char msg[], size_t len)
{
  char    path[PETSC_MAX_PATH_LEN];
  hid_t   f, d, s;
  hsize_t dims[2] = {0, 0};
  double  T[12][24], x[24], z[12];
  int     ok = 1;

  TmpPath("run.h5", path);
  if ((f = H5Fopen(path, H5F_ACC_RDONLY, H5P_DEFAULT)) < 0) { snprintf(msg, len, "cannot open %.400s", path); return; }
  d = H5Dopen2(f, "temperature", H5P_DEFAULT);
  s = H5Dget_space(d);
  ok = H5Sget_simple_extent_ndims(s) == 2 && H5Sget_simple_extent_dims(s, dims, NULL) == 2 && dims[0] == 12 && dims[1] == 24;
  ok = ok && H5Dread(d, H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, T) >= 0;
  H5Sclose(s);
  H5Dclose(d);
  d  = H5Dopen2(f, "x", H5P_DEFAULT);
  ok = ok && H5Dread(d, H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, x) >= 0;
  H5Dclose(d);
  d  = H5Dopen2(f, "z", H5P_DEFAULT);
  ok = ok && H5Dread(d, H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, z) >= 0;
  H5Dclose(d);
  H5Fclose(f);
  if (!ok) { snprintf(msg, len, "temperature is not a readable [12][24] dataset (dims %d x %d), or x, z are missing", (int)dims[0], (int)dims[1]); return; }
  /* cell centres (i + 1/2) 2 km */
  if (PetscAbsReal(x[0] - 1.0) > 1e-15 || PetscAbsReal(x[23] - 47.0) > 1e-13 || PetscAbsReal(z[11] - 23.0) > 1e-13) { snprintf(msg, len, "coordinates x0 %g x23 %g z11 %g km, expected 1, 47, 23", x[0], x[23], z[11]); return; }
  for (int j = 0; j < 12; j++)
    for (int i = 0; i < 24; i++) {
      PetscReal ex = CFKelvinToCelsius(Analytic(cfg, "temperature", i, j));
      if (PetscAbsReal(T[j][i] - ex) > 1e-14 * PetscAbsReal(ex)) { snprintf(msg, len, "temperature[%d][%d] = %.15g degC, expected %.15g", j, i, T[j][i], (double)ex); return; }
    }
}

/* The stored layout read with plain serial HDF5 on rank 0, not through PETSc: dataset shape
   [nz][nx] in natural order (x fastest) and values in the output unit, coordinates in km at the
   cell centres (expected values derived from the analytic fields and x_i = (i + 1/2) dx). */
START_TEST(test_layout_raw)
{
  CFConfig    cfg;
  DM          da;
  PetscMPIInt rank;
  char        msg[512] = "";

  MakeTmp();
  CK_PETSC(LoadScenario(&cfg));
  CK_PETSC(CreateGrid(&cfg, &da));
  CK_PETSC(WriteRun(&cfg, da, "run.h5", PETSC_TRUE));
  MPI_Comm_rank(PETSC_COMM_WORLD, &rank);
  if (!rank) CheckLayoutRaw(&cfg, msg, sizeof(msg));
  MPI_Bcast(msg, sizeof(msg), MPI_CHAR, 0, PETSC_COMM_WORLD);
  CK_PETSC(DMDestroy(&da));
  RemoveTmp();
  ck_assert_msg(!msg[0], "%s", msg);
}
END_TEST

/* The scenario stored as attributes, put back into an options database, rebuilds the same
   CFConfig (expected: the values loaded above; relative 1e-12 allows the unit conversions'
   round-off, common practice, no source). */
START_TEST(test_scenario_round_trip)
{
  CFConfig             cfg, back;
  DM                   da;
  CFRunReader          r;
  PetscOptions         opt;
  const CFConfigEntry *e;
  PetscInt             n;
  PetscBool            found = PETSC_FALSE;
  char                 path[PETSC_MAX_PATH_LEN];

  MakeTmp();
  CK_PETSC(LoadScenario(&cfg));
  CK_PETSC(CreateGrid(&cfg, &da));
  CK_PETSC(WriteRun(&cfg, da, "run.h5", PETSC_TRUE));
  TmpPath("run.h5", path);
  CK_PETSC(CFRunReaderOpen(PETSC_COMM_WORLD, path, &r));
  CK_PETSC(CFRunReaderGetScenario(r, &n, &e));
  ck_assert_int_gt(n, 20);
  for (PetscInt i = 0; i < n; i++)
    if (!strcmp(e[i].key, "mantle.potential_temperature")) {
      found = PETSC_TRUE;
      ck_assert_str_eq(e[i].option, "-mantle_potential_temperature");
      ck_assert_str_eq(e[i].unit, "C");
      ck_assert(e[i].is_real && e[i].real_value == 1380.0);
    }
  ck_assert(found);
  CK_PETSC(PetscOptionsCreate(&opt));
  CK_PETSC(CFRunReaderInsertScenario(r, opt));
  CK_PETSC(PetscOptionsPush(opt));
  CK_PETSC(CFConfigSetFromOptions(PETSC_COMM_WORLD, &back));
  CK_PETSC(PetscOptionsPop());
  CK_PETSC(PetscOptionsDestroy(&opt));
  CK_PETSC(CFRunReaderDestroy(&r));

  cf_assert_close(back.full_spreading_rate_mm_yr, 25.0, 1e-12);
  cf_assert_close(back.half_rate, cfg.half_rate, 1e-12);
  cf_assert_close(back.potential_temperature, cfg.potential_temperature, 1e-12);
  cf_assert_close(back.water_ppm, 125.0, 1e-12);
  cf_assert_close(back.adiabatic_gradient, cfg.adiabatic_gradient, 1e-12);
  cf_assert_close(back.nusselt, 4.0, 1e-12);
  cf_assert_close(back.hydrothermal_depth_cutoff, cfg.hydrothermal_depth_cutoff, 1e-12);
  ck_assert_int_eq(back.nx, cfg.nx);
  ck_assert_int_eq(back.nz, cfg.nz);
  ck_assert_str_eq(back.melting_model, cfg.melting_model);
  ck_assert_int_eq(back.melting_nparams, cfg.melting_nparams);
  for (PetscInt p = 0; p < cfg.melting_nparams; p++) cf_assert_close(back.melting_params[p], cfg.melting_params[p], 1e-12);
  ck_assert_str_eq(back.output_dir, "cf-output-test");
  ck_assert_int_eq(back.output_overwrite, cfg.output_overwrite);
  CK_PETSC(DMDestroy(&da));
  RemoveTmp();
}
END_TEST

/* A run that fails (close with success false) leaves neither the files nor their temporaries
   (the module's contract: a failed run leaves nothing that looks complete). */
START_TEST(test_failed_close)
{
  CFConfig cfg;
  DM       da;

  MakeTmp();
  CK_PETSC(LoadScenario(&cfg));
  CK_PETSC(CreateGrid(&cfg, &da));
  CK_PETSC(WriteRun(&cfg, da, "failed.h5", PETSC_FALSE));
  MPI_Barrier(PETSC_COMM_WORLD);
  ck_assert(!Exists("failed.h5") && !Exists("failed.xdmf"));
  ck_assert(!Exists("failed.h5.tmp") && !Exists("failed.xdmf.tmp"));
  CK_PETSC(DMDestroy(&da));
  RemoveTmp();
}
END_TEST

/* Rank 0 writes a file: text, or the first len bytes of src.  Returns 0 on success. */
static int WriteBytes(const char *name, const char *text, const char *src, long len)
{
  char  path[PETSC_MAX_PATH_LEN], from[PETSC_MAX_PATH_LEN];
  FILE *out, *in = NULL;
  int   rc = 0;
  TmpPath(name, path);
  if (!(out = fopen(path, "wb"))) return -1;
  if (src) {
    TmpPath(src, from);
    if ((in = fopen(from, "rb"))) {
      for (long k = 0; k < len; k++) fputc(fgetc(in), out);
      fclose(in);
    } else rc = -1;
  } else fputs(text, out);
  return fclose(out) || rc ? -1 : 0;
}

static long FileSize(const char *name)
{
  char        path[PETSC_MAX_PATH_LEN];
  struct stat st;
  TmpPath(name, path);
  return stat(path, &st) ? -1 : (long)st.st_size;
}

/* An HDF5 file made by someone else (no marker), or one with provenance but without the marker
   that a successful close writes last (what a killed run leaves).  Returns 0 on success. */
static int WriteForeignHDF5(const char *name, PetscBool provenance)
{
  char  path[PETSC_MAX_PATH_LEN];
  hid_t f, s, a, t;
  int   rc = 0;
  TmpPath(name, path);
  if ((f = H5Fcreate(path, H5F_ACC_TRUNC, H5P_DEFAULT, H5P_DEFAULT)) < 0) return -1;
  if (provenance) {
    s  = H5Screate(H5S_SCALAR);
    t  = H5Tcopy(H5T_C_S1);
    rc = H5Tset_size(t, 6) < 0 || (a = H5Acreate2(f, "crustforge_version", t, s, H5P_DEFAULT, H5P_DEFAULT)) < 0 || H5Awrite(a, t, "0.1.0") < 0 || H5Aclose(a) < 0 ? -1 : 0;
    H5Tclose(t);
    H5Sclose(s);
  }
  return H5Fclose(f) < 0 || rc ? -1 : 0;
}

/* Expect CFRunReaderOpen to fail with code, naming the file and the cause in its message. */
static void ExpectRefused(const char *name, PetscErrorCode code, const char *cause)
{
  char           path[PETSC_MAX_PATH_LEN];
  CFRunReader    r = NULL;
  PetscErrorCode ierr;
  const char    *text     = NULL;
  char          *specific = NULL;

  TmpPath(name, path);
  CK_PETSC(PetscPushErrorHandler(PetscReturnErrorHandler, NULL));
  ierr = CFRunReaderOpen(PETSC_COMM_WORLD, path, &r);
  CK_PETSC(PetscPopErrorHandler());
  ck_assert_msg(ierr == code, "%s: error %d, expected %d", name, (int)ierr, (int)code);
  ck_assert_ptr_null(r);
  PetscErrorMessage(ierr, &text, &specific);
  ck_assert_msg(specific && strstr(specific, path) && !strchr(specific, '\n'), "%s: message '%s' does not name the file on one line", name, specific ? specific : "");
  ck_assert_msg(strstr(specific, cause), "%s: message '%s' does not say '%s'", name, specific, cause);
}

/* Rank 0: a copy of src with the byte at offset flipped (bitwise NOT).  Returns 0 on success. */
static int WriteFlipped(const char *name, const char *src, long offset)
{
  char  path[PETSC_MAX_PATH_LEN];
  FILE *fp;
  int   c;
  if (WriteBytes(name, NULL, src, FileSize(src))) return -1;
  TmpPath(name, path);
  if (!(fp = fopen(path, "r+b"))) return -1;
  c = fseek(fp, offset, SEEK_SET) ? EOF : fgetc(fp);
  if (c == EOF || fseek(fp, offset, SEEK_SET) || fputc(~c & 0xff, fp) == EOF) c = EOF;
  return fclose(fp) || c == EOF ? -1 : 0;
}

/* Files the reader must refuse with the right PETSc error class and cause (the module's
   contract; the integrity header's causes are those of crustforge/integrity.h). */
START_TEST(test_refused_files)
{
  CFConfig    cfg;
  DM          da;
  PetscMPIInt rank;
  int         made = 0;

  MakeTmp();
  CK_PETSC(LoadScenario(&cfg));
  CK_PETSC(CreateGrid(&cfg, &da));
  CK_PETSC(WriteRun(&cfg, da, "run.h5", PETSC_TRUE));
  MPI_Comm_rank(PETSC_COMM_WORLD, &rank);
  if (!rank) {
    made = !WriteBytes("text.h5", "temperature,depth\n1350,10\n", NULL, 0) && !WriteBytes("truncated.h5", NULL, "run.h5", FileSize("run.h5") / 2);
    made = made && !WriteForeignHDF5("foreign.h5", PETSC_FALSE) && !WriteForeignHDF5("incomplete.h5", PETSC_TRUE);
    made = made && !WriteFlipped("flipped.h5", "run.h5", FileSize("run.h5") / 2) && !WriteFlipped("header.h5", "run.h5", 24);
  }
  MPI_Bcast(&made, 1, MPI_INT, 0, PETSC_COMM_WORLD);
  ck_assert_msg(made, "cannot write the test files");
  ExpectRefused("missing.h5", PETSC_ERR_FILE_OPEN, "No such file");
  ExpectRefused("text.h5", PETSC_ERR_FILE_UNEXPECTED, "is not a crustforge run file (not an HDF5 file)");
  ExpectRefused("truncated.h5", PETSC_ERR_FILE_UNEXPECTED, "is truncated: ");
  ExpectRefused("foreign.h5", PETSC_ERR_FILE_UNEXPECTED, "is not a crustforge run file (HDF5 without a crustforge header)");
  ExpectRefused("incomplete.h5", PETSC_ERR_FILE_UNEXPECTED, "is not a crustforge run file");
  ExpectRefused("flipped.h5", PETSC_ERR_FILE_UNEXPECTED, "is damaged: checksum mismatch");
  ExpectRefused("header.h5", PETSC_ERR_FILE_UNEXPECTED, "is damaged: header checksum mismatch");
  ExpectRefused("", PETSC_ERR_FILE_OPEN, "is a directory"); /* the scratch directory itself */
  CK_PETSC(DMDestroy(&da));
  RemoveTmp();
}
END_TEST

static Suite *OutputSuite(void)
{
  Suite *s  = suite_create("output");
  TCase *tc = tcase_create("run_file");
  tcase_set_timeout(tc, 60);
  tcase_add_test(tc, test_round_trip);
  tcase_add_test(tc, test_layout_raw);
  tcase_add_test(tc, test_scenario_round_trip);
  tcase_add_test(tc, test_failed_close);
  tcase_add_test(tc, test_refused_files);
  suite_add_tcase(s, tc);
  return s;
}

CF_TEST_MAIN(OutputSuite)
