/* Check suite for the figures (postprocess/figures*.c): every figure written from analytic
   fields, without the solver, and checked as a PNG by an independent reader here (signature,
   chunk CRCs, IHDR size, IDAT inflated with zlib and unfiltered; PNG specification, ISO/IEC
   15948:2004 / W3C 2003) for content: many distinct colours and a good share of drawn pixels.
   Also: the reference curves against published and derived numbers, NaN values in the inputs,
   a directory that cannot be written, and the caller's PLplot stream left current.
   The scenario is invented (a fictional intermediate-rate ridge segment). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <dirent.h>
#include <sys/stat.h>
#include <unistd.h>
#include <zlib.h>
#include <plplot.h>
#include <crustforge/figures.h>
#include <crustforge/units.h>
#include "cf_test.h"


#if defined(__SANITIZE_ADDRESS__)
/* LeakSanitizer, on top of the suite's suppression file: fontconfig (under pango and PLplot's
   cairo driver) keeps its font caches for the life of the process.  Measured: with Open MPI's
   leaks suppressed, every leak record left was allocated in libfontconfig, none in crustforge. */
const char *__lsan_default_suppressions(void);
const char *__lsan_default_suppressions(void) { return "leak:libfontconfig.so\n"; }
/* full stacks, so that a leak inside fontconfig is named as such and not as an unknown module */
const char *__asan_default_options(void);
const char *__asan_default_options(void) { return "fast_unwind_on_malloc=0"; }
#endif

static const char *figure_names[] = {"temperature.png", "depletion.png", "melting_rate.png", "pt_paths.png", "heat_flow.png", "seafloor_depth.png"};
#define NFIGURES ((int)(sizeof(figure_names) / sizeof(figure_names[0])))

/* ---------- an independent PNG reader (8-bit grey, RGB, grey+alpha or RGBA, no interlace) ---------- */

typedef struct {
  unsigned width, height, channels;
  long     file_size;
  unsigned distinct;      /* distinct pixel values */
  double   drawn_fraction;/* pixels that differ from the top-left (background) pixel */
} PngInfo;

static unsigned Be32(const unsigned char *p) { return (unsigned)p[0] << 24 | (unsigned)p[1] << 16 | (unsigned)p[2] << 8 | p[3]; }

static int CmpU32(const void *a, const void *b)
{
  const uint32_t x = *(const uint32_t *)a, y = *(const uint32_t *)b;
  return x < y ? -1 : x > y;
}

static int Paeth(int a, int b, int c)
{
  const int p = a + b - c, pa = abs(p - a), pb = abs(p - b), pc = abs(p - c);
  return pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
}

/* Read path into info; returns NULL on success or what is wrong. */
static const char *ReadPng(const char *path, PngInfo *info)
{
  static const unsigned char sig[8] = {0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n'};
  FILE          *fp = fopen(path, "rb");
  unsigned char *buf = NULL, *idat = NULL, *raw = NULL;
  uint32_t      *pix = NULL;
  size_t         nidat = 0, stride;
  uLongf         nraw;
  const char    *err = NULL;
  int            seen_ihdr = 0, seen_iend = 0;

  memset(info, 0, sizeof(*info));
  if (!fp) return "cannot open";
  fseek(fp, 0, SEEK_END);
  info->file_size = ftell(fp);
  rewind(fp);
  buf  = malloc((size_t)info->file_size);
  idat = malloc((size_t)info->file_size);
  if (!buf || !idat || fread(buf, 1, (size_t)info->file_size, fp) != (size_t)info->file_size) err = "cannot read";
  fclose(fp);
  if (!err && (info->file_size < 8 || memcmp(buf, sig, 8))) err = "no PNG signature";
  for (long off = 8; !err && !seen_iend;) {
    unsigned len;
    if (off + 12 > info->file_size) { err = "truncated chunk"; break; }
    len = Be32(buf + off);
    if (off + 12 + (long)len > info->file_size) { err = "chunk runs past the end"; break; }
    if (crc32(0L, buf + off + 4, len + 4) != Be32(buf + off + 8 + len)) { err = "bad chunk CRC"; break; }
    if (!memcmp(buf + off + 4, "IHDR", 4)) {
      const unsigned char *h = buf + off + 8;
      static const unsigned channels[7] = {1, 0, 3, 0, 2, 0, 4};
      info->width  = Be32(h);
      info->height = Be32(h + 4);
      if (h[8] != 8 || h[9] > 6 || !channels[h[9]] || h[12] != 0) err = "not 8-bit non-interlaced grey/RGB(A)";
      else info->channels = channels[h[9]];
      seen_ihdr = 1;
    } else if (!memcmp(buf + off + 4, "IDAT", 4)) {
      memcpy(idat + nidat, buf + off + 8, len);
      nidat += len;
    } else if (!memcmp(buf + off + 4, "IEND", 4)) seen_iend = 1;
    off += 12 + (long)len;
  }
  if (!err && (!seen_ihdr || !seen_iend || !nidat)) err = "IHDR, IDAT or IEND missing";
  if (!err) {
    stride = (size_t)info->width * info->channels;
    nraw   = (uLongf)((stride + 1) * info->height);
    raw    = malloc(nraw);
    if (!raw || uncompress(raw, &nraw, idat, (uLong)nidat) != Z_OK || nraw != (stride + 1) * info->height) err = "IDAT does not inflate to the image size";
  }
  if (!err) { /* undo the row filters in place, then pack each pixel into 32 bits */
    const unsigned bpp = info->channels;
    size_t         npix = (size_t)info->width * info->height, drawn = 0, distinct = 0;
    pix = malloc(npix * sizeof(*pix));
    for (unsigned y = 0; y < info->height && !err; y++) {
      unsigned char *row = raw + y * (stride + 1) + 1, *up = y ? raw + (y - 1) * (stride + 1) + 1 : NULL;
      const int      filter = row[-1];
      for (size_t i = 0; i < stride; i++) {
        const int a = i >= bpp ? row[i - bpp] : 0, b = up ? up[i] : 0, c = (up && i >= bpp) ? up[i - bpp] : 0;
        switch (filter) {
        case 0: break;
        case 1: row[i] = (unsigned char)(row[i] + a); break;
        case 2: row[i] = (unsigned char)(row[i] + b); break;
        case 3: row[i] = (unsigned char)(row[i] + (a + b) / 2); break;
        case 4: row[i] = (unsigned char)(row[i] + Paeth(a, b, c)); break;
        default: err = "unknown row filter";
        }
      }
      for (unsigned x = 0; x < info->width; x++) {
        uint32_t v = 0;
        for (unsigned k = 0; k < bpp; k++) v = v << 8 | row[x * bpp + k];
        pix[(size_t)y * info->width + x] = v;
      }
    }
    for (size_t k = 0; k < npix; k++) drawn += pix[k] != pix[0];
    info->drawn_fraction = (double)drawn / (double)npix;
    qsort(pix, npix, sizeof(*pix), CmpU32);
    for (size_t k = 0; k < npix; k++) distinct += !k || pix[k] != pix[k - 1];
    info->distinct = (unsigned)distinct;
  }
  free(pix);
  free(raw);
  free(idat);
  free(buf);
  return err;
}

/* ---------- an invented scenario with analytic fields ---------- */

static char tmpdir[PETSC_MAX_PATH_LEN - 64]; /* scratch directory of this suite, not model state */

static void MakeTmp(void)
{
  const char *base = getenv("TMPDIR");
  snprintf(tmpdir, sizeof(tmpdir), "%s/cf_test_figures_XXXXXX", base && base[0] ? base : "/tmp");
  ck_assert_msg(mkdtemp(tmpdir) != NULL, "cannot create a scratch directory");
}

static void RemoveTmp(void)
{
  DIR           *d = opendir(tmpdir);
  struct dirent *e;
  char           path[sizeof(tmpdir) + sizeof(e->d_name) + 1];

  while (d && (e = readdir(d)))
    if (strcmp(e->d_name, ".") && strcmp(e->d_name, "..")) {
      snprintf(path, sizeof(path), "%s/%s", tmpdir, e->d_name);
      (void)unlink(path);
    }
  if (d) closedir(d);
  (void)rmdir(tmpdir);
}

static double Clamp01(double v) { return v < 0 ? 0 : v > 1 ? 1 : v; }

/* Half-space cooling temperature on the adiabat (Turcotte & Schubert, Geodynamics, 2nd ed.,
   section 4.15), plate age x / U0. */
static double HalfSpaceT(const CFConfig *cfg, double x, double z)
{
  const double kappa = cfg->conductivity / (cfg->mantle_density * cfg->heat_capacity), t = PetscMax(x, 100.0) / cfg->half_rate;
  return cfg->surface_temperature + (cfg->potential_temperature - cfg->surface_temperature) * erf(z / (2.0 * sqrt(kappa * t))) + cfg->adiabatic_gradient * z;
}

/* Corner flow stream function (Batchelor 1967; DESIGN 2.1): psi = (2 U0 / pi) z atan(x / z). */
static double CornerPsi(const CFConfig *cfg, double x, double z) { return 2.0 * cfg->half_rate / PETSC_PI * z * atan(x / z); }

/* A depleted layer above 75 km (invented, with F up to 0.22 near the surface). */
static double Depletion(double z) { return 0.22 * Clamp01((75.0e3 - z) / 60.0e3); }

/* The fictional segment: 60 mm/yr full rate, Tp 1350 C, 100 ppm water, 240 km x 180 km at 2 km. */
static void MakeScenario(CFConfig *cfg)
{
  CK_PETSC(CFConfigSetDefaults(cfg));
  cfg->full_spreading_rate_mm_yr = 60.0;
  cfg->half_rate                 = CFHalfRateFromFullMmPerYr(cfg->full_spreading_rate_mm_yr);
  cfg->potential_temperature     = CFCelsiusToKelvin(1350.0);
  cfg->water_ppm                 = 100.0;
  cfg->adiabatic_gradient        = cfg->thermal_expansivity * cfg->gravity * cfg->potential_temperature / cfg->heat_capacity;
  cfg->width                     = 240.0e3;
  cfg->depth                     = 180.0e3;
  cfg->spacing                   = 2.0e3;
  cfg->nx                        = 120;
  cfg->nz                        = 90;
  cfg->dx = cfg->dz = 2.0e3;
}

static void MakeRun(CFRunData *run)
{
  CFConfig cfg;

  MakeScenario(&cfg);
  CK_PETSC(CFRunDataCreate(PETSC_COMM_SELF, &cfg, run));
  for (PetscInt j = 0; j < run->nz; j++)
    for (PetscInt i = 0; i < run->nx; i++) {
      const double x = (i + 0.5) * run->dx, z = (j + 0.5) * run->dz, ex = x / 45.0e3, ez = (z - 50.0e3) / 30.0e3;
      const PetscInt k = j * run->nx + i;
      run->field[CF_FIELD_TEMPERATURE][k]     = HalfSpaceT(&cfg, x, z);
      run->field[CF_FIELD_DEPLETION][k]       = Depletion(z);
      run->field[CF_FIELD_MELTING_RATE][k]    = 7.0e-12 * PetscMax(0.0, 1.0 - ex * ex - ez * ez); /* kg m-3 s-1, invented */
      run->field[CF_FIELD_STREAM_FUNCTION][k] = CornerPsi(&cfg, x, z);
    }
  /* missing values must not break a figure */
  run->field[CF_FIELD_TEMPERATURE][10 * run->nx + 30] = NAN;
  run->field[CF_FIELD_DEPLETION][20 * run->nx + 5]    = NAN;
  run->field[CF_FIELD_MELTING_RATE][25 * run->nx + 3] = NAN;
}

static void MakeProfiles(const CFRunData *run, CFProfiles *prof)
{
  CFCoolingParams cp;

  CFCoolingParamsFromConfig(&run->cfg, &cp);
  prof->n = run->nx;
  CK_PETSC(PetscMalloc5(prof->n, &prof->x, prof->n, &prof->age, prof->n, &prof->heat_flow, prof->n, &prof->seafloor_depth, prof->n, &prof->lithosphere_thickness));
  for (PetscInt i = 0; i < prof->n; i++) {
    prof->x[i]                     = (i + 0.5) * run->dx;
    prof->age[i]                   = prof->x[i] / run->cfg.half_rate;
    prof->heat_flow[i]             = 0.9 * CFHalfSpaceHeatFlow(&cp, prof->age[i]); /* an invented model, below half-space */
    prof->seafloor_depth[i]        = run->cfg.ridge_depth + 0.95 * CFHalfSpaceSubsidence(&cp, prof->age[i]);
    prof->lithosphere_thickness[i] = NAN;
  }
  prof->heat_flow[7] = prof->seafloor_depth[40] = NAN;
}

static void DestroyProfiles(CFProfiles *prof) { CK_PETSC(PetscFree5(prof->x, prof->age, prof->heat_flow, prof->seafloor_depth, prof->lithosphere_thickness)); }

/* Parcels on corner-flow streamlines from the bottom (psi constant: x = z tan(c / z)). */
static void MakePaths(const CFRunData *run, CFPTPaths *paths)
{
  const double x0[] = {4.0e3, 30.0e3, 70.0e3}, zb = run->nz * run->dz, width = run->nx * run->dx;
  const int    np   = 120;

  memset(paths, 0, sizeof(*paths));
  paths->npaths = 3;
  for (int p = 0; p < paths->npaths; p++) {
    const double c = zb * atan(x0[p] / zb); /* psi * pi / (2 U0) */
    int          n = 0;
    CK_PETSC(PetscMalloc6(np, &paths->x[p], np, &paths->z[p], np, &paths->time[p], np, &paths->P[p], np, &paths->T[p], np, &paths->F[p]));
    for (int k = 0; k < np; k++) {
      const double z = zb - (zb - 1.02 * 2.0 * c / PETSC_PI) * k / (np - 1.0), x = z * tan(c / z);
      if (x > width || z < 1.0e3) break;
      paths->x[p][n]    = x;
      paths->z[p][n]    = z;
      paths->time[p][n] = 0.0; /* not drawn */
      paths->P[p][n]    = run->cfg.mantle_density * run->cfg.gravity * z;
      paths->T[p][n]    = HalfSpaceT(&run->cfg, x, z);
      paths->F[p][n]    = Depletion(z);
      n++;
    }
    paths->npoints[p] = n;
  }
  paths->T[1][5] = NAN;
}

static void DestroyPaths(CFPTPaths *paths)
{
  for (int p = 0; p < paths->npaths; p++) CK_PETSC(PetscFree6(paths->x[p], paths->z[p], paths->time[p], paths->P[p], paths->T[p], paths->F[p]));
}

/* ---------- tests ---------- */

/* The pngcairo device is installed (plplot-driver-cairo; BUILD-NOTES, common practice, no source). */
START_TEST(test_device_available)
{
  PetscBool ok = PETSC_FALSE;
  CK_PETSC(CFFiguresAvailable(&ok));
  ck_assert_msg(ok, "PLplot's pngcairo device is missing");
}
END_TEST

/* Half-space cooling at 1 Myr with k 3.3, Tm - T0 1300 K, kappa 1e-6, rho_m 3300, rho_w 1000,
   alpha 3e-5: q = 430.9 mW/m2 and w = 354.7 m (derived from Turcotte & Schubert's formulas,
   REFERENCES.md).  Parsons & Sclater (1977): d = 2500 + 350 t^1/2 (0-70 Myr), q = 473 t^-1/2
   mW/m2 (abstract, seen); Stein & Stein (1992): q = 510 t^-1/2 mW/m2 for t <= 55 Myr (seen, in
   Fowler), d = 2600 + 365 t^1/2 for t < 20 Myr (from memory). */
START_TEST(test_reference_curves)
{
  const CFCoolingParams cp = {3.3, 1.0e-6, 1300.0, 3.0e-5, 3300.0, 1000.0};
  CFConfig              cfg;
  CFCoolingParams       from_cfg;

  cf_assert_close(CFHalfSpaceHeatFlow(&cp, CFMyrToS(1.0)), 0.4309, 1.5e-4); /* 4 figures given */
  cf_assert_close(CFHalfSpaceSubsidence(&cp, CFMyrToS(1.0)), 354.7, 1.5e-4);
  cf_assert_close(CFEmpiricalDepth(CF_FIT_PARSONS_SCLATER_1977, CFMyrToS(4.0)), 3200.0, 1e-12);
  cf_assert_close(CFEmpiricalHeatFlow(CF_FIT_PARSONS_SCLATER_1977, CFMyrToS(4.0)), 0.2365, 1e-12);
  cf_assert_close(CFEmpiricalHeatFlow(CF_FIT_STEIN_STEIN_1992, CFMyrToS(25.0)), 0.102, 1e-12);
  cf_assert_close(CFEmpiricalDepth(CF_FIT_STEIN_STEIN_1992, CFMyrToS(16.0)), 4060.0, 1e-12);
  /* outside the fitted ranges, and at the axis, there is no value */
  ck_assert(isnan(CFEmpiricalDepth(CF_FIT_PARSONS_SCLATER_1977, CFMyrToS(80.0))));
  ck_assert(isnan(CFEmpiricalDepth(CF_FIT_STEIN_STEIN_1992, CFMyrToS(25.0))));
  ck_assert(isnan(CFEmpiricalHeatFlow(CF_FIT_STEIN_STEIN_1992, CFMyrToS(60.0))));
  ck_assert(isnan(CFHalfSpaceHeatFlow(&cp, 0.0)));
  /* kappa = k / (rho cp) from the scenario */
  MakeScenario(&cfg);
  CFCoolingParamsFromConfig(&cfg, &from_cfg);
  cf_assert_close(from_cfg.diffusivity, cfg.conductivity / (cfg.mantle_density * cfg.heat_capacity), 1e-15);
  cf_assert_close(from_cfg.temperature_difference, 1350.0, 1e-12);
}
END_TEST

/* Thresholds (common practice, no source): a blank 1200 x 800 image from this device is one
   colour and a few kB (measured); colour images hold hundreds of colours, line plots dozens
   from antialiasing alone. */
static void CheckFigure(const char *name, unsigned min_distinct, double min_drawn)
{
  char        path[PETSC_MAX_PATH_LEN];
  PngInfo     info;
  const char *err;

  snprintf(path, sizeof(path), "%s/%s", tmpdir, name);
  err = ReadPng(path, &info);
  ck_assert_msg(!err, "%s: %s", name, err);
  ck_assert_msg(info.width == CF_FIGURE_WIDTH_PX && info.height == CF_FIGURE_HEIGHT_PX, "%s is %ux%u", name, info.width, info.height);
  ck_assert_msg(info.file_size > 20000, "%s is only %ld bytes", name, info.file_size);
  ck_assert_msg(info.distinct >= min_distinct, "%s has %u colours", name, info.distinct);
  ck_assert_msg(info.drawn_fraction >= min_drawn, "%s: %.3f of the pixels drawn", name, info.drawn_fraction);
  printf("%-20s %ux%u, %ld bytes, %u colours, %.1f%% drawn\n", name, info.width, info.height, info.file_size, info.distinct, 100.0 * info.drawn_fraction);
}

/* Every figure, with NaN in fields, profiles and paths; nothing else left in the directory,
   and the caller's PLplot stream current again afterwards. */
START_TEST(test_write_all)
{
  CFRunData  run;
  CFProfiles prof;
  CFPTPaths  paths;
  PLINT      before, after;
  DIR       *d;
  int        nfiles = 0;

  MakeTmp();
  MakeRun(&run);
  MakeProfiles(&run, &prof);
  MakePaths(&run, &paths);
  plgstrm(&before);
  CK_PETSC(CFFiguresWriteAll(&run, &prof, &paths, tmpdir));
  plgstrm(&after);
  ck_assert_int_eq(before, after);
  for (int f = 0; f < NFIGURES; f++) CheckFigure(figure_names[f], f < 3 ? 200 : 30, f < 3 ? 0.5 : 0.03);
  d = opendir(tmpdir);
  ck_assert_ptr_nonnull(d);
  for (struct dirent *e; (e = readdir(d));) nfiles += e->d_name[0] != '.';
  closedir(d);
  ck_assert_int_eq(nfiles, NFIGURES);
  DestroyPaths(&paths);
  DestroyProfiles(&prof);
  CK_PETSC(CFRunDataDestroy(&run));
  if (!getenv("CF_KEEP_FIGURES")) RemoveTmp();
  else printf("figures kept in %s\n", tmpdir);
}
END_TEST

/* A window option: the axis region 100 km across and 80 km down still makes a full image. */
START_TEST(test_window)
{
  CFRunData            run;
  const CFFigureWindow w = {100.0e3, 80.0e3};

  MakeTmp();
  MakeRun(&run);
  CK_PETSC(CFFigureTemperature(&run, &w, tmpdir));
  CheckFigure("temperature.png", 200, 0.5);
  CK_PETSC(CFRunDataDestroy(&run));
  RemoveTmp();
}
END_TEST

/* A directory that does not exist: a PETSc file error with a one-line message, the process
   alive, no stream left open. */
START_TEST(test_unwritable_directory)
{
  CFRunData      run;
  CFProfiles     prof;
  CFPTPaths      paths;
  PLINT          before, after;
  PetscErrorCode err;
  const char    *text, *specific = NULL;
  char           dir[PETSC_MAX_PATH_LEN];

  MakeTmp();
  snprintf(dir, sizeof(dir), "%s/no/such/dir", tmpdir);
  MakeRun(&run);
  MakeProfiles(&run, &prof);
  MakePaths(&run, &paths);
  plgstrm(&before);
  CK_PETSC(PetscPushErrorHandler(PetscReturnErrorHandler, NULL));
  err = CFFiguresWriteAll(&run, &prof, &paths, dir);
  CK_PETSC(PetscPopErrorHandler());
  plgstrm(&after);
  ck_assert_int_eq(before, after);
  ck_assert_int_eq(err, PETSC_ERR_FILE_OPEN);
  ck_assert_int_eq(PetscErrorMessage(err, &text, (char **)&specific), 0);
  ck_assert_ptr_nonnull(specific);
  ck_assert_msg(strstr(specific, "cannot create") && !strchr(specific, '\n'), "message: %s", specific);
  DestroyPaths(&paths);
  DestroyProfiles(&prof);
  CK_PETSC(CFRunDataDestroy(&run));
  RemoveTmp();
}
END_TEST

/* Nothing to draw: a temperature field all NaN, no melting, a still mantle, no profile columns
   and no parcels.  Every figure is still a valid PNG of the stated size (frame, axes, curves of
   the references). */
START_TEST(test_nothing_to_draw)
{
  CFRunData  run;
  CFProfiles prof;
  CFPTPaths  paths;
  PngInfo    info;
  char       path[PETSC_MAX_PATH_LEN];

  MakeTmp();
  MakeRun(&run);
  for (PetscInt k = 0; k < run.nx * run.nz; k++) {
    run.field[CF_FIELD_TEMPERATURE][k]     = NAN;
    run.field[CF_FIELD_MELTING_RATE][k]    = 0.0;
    run.field[CF_FIELD_STREAM_FUNCTION][k] = 0.0;
  }
  memset(&prof, 0, sizeof(prof));
  memset(&paths, 0, sizeof(paths));
  CK_PETSC(CFFiguresWriteAll(&run, &prof, &paths, tmpdir));
  for (int f = 0; f < NFIGURES; f++) {
    const char *err;
    snprintf(path, sizeof(path), "%s/%s", tmpdir, figure_names[f]);
    err = ReadPng(path, &info);
    ck_assert_msg(!err, "%s: %s", figure_names[f], err);
    ck_assert_msg(info.width == CF_FIGURE_WIDTH_PX && info.height == CF_FIGURE_HEIGHT_PX, "%s is %ux%u", figure_names[f], info.width, info.height);
    ck_assert_msg(info.distinct > 2 && info.drawn_fraction > 0.005, "%s is blank", figure_names[f]);
  }
  CK_PETSC(CFRunDataDestroy(&run));
  if (!getenv("CF_KEEP_FIGURES")) RemoveTmp();
  else printf("figures kept in %s\n", tmpdir);
}
END_TEST

static Suite *FiguresSuite(void)
{
  Suite *s  = suite_create("figures");
  TCase *tc = tcase_create("figures");

  tcase_set_timeout(tc, 60);
  tcase_add_test(tc, test_device_available);
  tcase_add_test(tc, test_reference_curves);
  tcase_add_test(tc, test_write_all);
  tcase_add_test(tc, test_window);
  tcase_add_test(tc, test_unwritable_directory);
  tcase_add_test(tc, test_nothing_to_draw);
  suite_add_tcase(s, tc);
  return s;
}

CF_TEST_MAIN(FiguresSuite)
