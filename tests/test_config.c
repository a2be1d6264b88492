/* Check suite for the scenario loader (src/config): defaults, YAML nesting, command-line
   precedence, unit conversions, grid cell counts, the entries round trip and validation.
   The options database persists within the process, so every test starts from an empty one. */
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <crustforge/config.h>
#include "cf_test.h"

/* A PETSc call inside a Check test body (which returns void, so PetscCall cannot be used). */

static char tmpdir[PETSC_MAX_PATH_LEN]; /* scratch directory of this suite, not model state */
static char scenario[PETSC_MAX_PATH_LEN + 16];

static void MakeTmp(void)
{
  const char *base = getenv("TMPDIR");
  snprintf(tmpdir, sizeof(tmpdir), "%s/cf_test_config_XXXXXX", base && base[0] ? base : "/tmp");
  ck_assert_ptr_nonnull(mkdtemp(tmpdir));
  snprintf(scenario, sizeof(scenario), "%s/s.yaml", tmpdir);
}

static void RemoveTmp(void)
{
  (void)unlink(scenario);
  (void)rmdir(tmpdir);
}

static void ClearOptions(void) { ck_assert_int_eq(PetscOptionsClear(NULL), 0); }

static PetscErrorCode WriteScenario(const char *text)
{
  FILE *fp;

  PetscFunctionBeginUser;
  fp = fopen(scenario, "w");
  PetscCheck(fp, PETSC_COMM_SELF, PETSC_ERR_FILE_OPEN, "cannot write %s", scenario);
  fputs(text, fp);
  fclose(fp);
  PetscFunctionReturn(0);
}

/* Load text as a scenario with argv {"test_config", "run", scenario, extra...}, as main passes it. */
static PetscErrorCode LoadText(const char *text, int nextra, const char *extra[], CFConfig *cfg)
{
  char *argv[16];
  int   argc = 0;

  PetscFunctionBeginUser;
  PetscCheck(nextra <= 12, PETSC_COMM_SELF, PETSC_ERR_ARG_OUTOFRANGE, "too many arguments");
  PetscCall(WriteScenario(text));
  argv[argc++] = (char *)"test_config";
  argv[argc++] = (char *)"run";
  argv[argc++] = scenario;
  for (int i = 0; i < nextra; i++) argv[argc++] = (char *)extra[i];
  argv[argc] = NULL;
  PetscCall(CFConfigLoad(PETSC_COMM_WORLD, scenario, argc, argv, cfg));
  PetscFunctionReturn(0);
}

/* Set option, value pairs (a NULL-terminated list) in the options database. */
static PetscErrorCode SetOptions(const char *pairs[])
{
  PetscFunctionBeginUser;
  for (int i = 0; pairs[i]; i += 2) PetscCall(PetscOptionsSetValue(NULL, pairs[i], pairs[i + 1]));
  PetscFunctionReturn(0);
}

/* The one-line message PETSc recorded for the error err. */
static const char *Message(PetscErrorCode err)
{
  const char *text     = NULL;
  char       *specific = NULL;

  if (PetscErrorMessage(err, &text, &specific)) return "";
  return specific && specific[0] ? specific : (text ? text : "");
}

/* Calls expected to fail, with PETSc's traceback silenced; *err gets their error code. */
static PetscErrorCode FromOptionsQuiet(PetscErrorCode *err)
{
  CFConfig cfg;

  PetscFunctionBeginUser;
  PetscCall(PetscPushErrorHandler(PetscReturnErrorHandler, NULL));
  *err = CFConfigSetFromOptions(PETSC_COMM_WORLD, &cfg);
  PetscCall(PetscPopErrorHandler());
  PetscFunctionReturn(0);
}

/* Load path as the scenario; text, when given, is written to the suite's scenario file first. */
static PetscErrorCode LoadQuiet(const char *path, const char *text, PetscErrorCode *err)
{
  CFConfig cfg;
  char    *argv[] = {(char *)"test_config", NULL};

  PetscFunctionBeginUser;
  if (text) PetscCall(WriteScenario(text));
  PetscCall(PetscPushErrorHandler(PetscReturnErrorHandler, NULL));
  *err = CFConfigLoad(PETSC_COMM_WORLD, path, 1, argv, &cfg);
  PetscCall(PetscPopErrorHandler());
  PetscFunctionReturn(0);
}

/* err must be want, with a one-line message containing text. */
static void CheckError(PetscErrorCode err, PetscErrorCode want, const char *text)
{
  const char *msg = Message(err);

  ck_assert_int_eq(err, want);
  ck_assert_msg(strstr(msg, text) != NULL, "message '%s' does not name '%s'", msg, text);
  ck_assert_msg(strchr(msg, '\n') == NULL, "message '%s' is not one line", msg);
}

/* Setting pairs must make CFConfigSetFromOptions fail as bad input naming want. */
static void CheckRejected(const char *pairs[], const char *want)
{
  PetscErrorCode err;

  ClearOptions();
  CK_PETSC(SetOptions(pairs));
  CK_PETSC(FromOptionsQuiet(&err));
  CheckError(err, PETSC_ERR_USER_INPUT, want);
}

static const CFConfigEntry *FindEntry(PetscInt n, const CFConfigEntry *e, const char *key)
{
  for (PetscInt i = 0; i < n; i++)
    if (!strcmp(e[i].key, key)) return &e[i];
  return NULL;
}

/* Documented defaults; each value's source is the one keys.c names beside the key. */
START_TEST(test_defaults)
{
  CFConfig cfg;

  CK_PETSC(CFConfigSetFromOptions(PETSC_COMM_WORLD, &cfg));
  cf_assert_close(cfg.full_spreading_rate_mm_yr, 60.0, 1e-15); /* intermediate ridge: common practice, no source */
  cf_assert_close(cfg.potential_temperature, 1350.0 + 273.15, 1e-15); /* Herzberg, Condie & Korenaga 2010, EPSL 292 */
  cf_assert_near(cfg.water_ppm, 0.0, 0.0);                         /* dry by default: project default, no published source */
  cf_assert_close(cfg.mantle_density, 3300.0, 1e-15);              /* Wangen 2010; Turcotte & Schubert */
  cf_assert_close(cfg.heat_capacity, 1000.0, 1e-15);               /* Katz, Spiegelman & Langmuir 2003, Table 2 */
  cf_assert_close(cfg.conductivity, 3.3, 1e-15);                   /* Wangen 2010 (via kappa, below) */
  cf_assert_close(cfg.thermal_expansivity, 3.0e-5, 1e-15);         /* Wangen 2010 */
  /* kappa = k / (rho cp) = 3.3 / (3300 * 1000) = 1e-6 m2/s, the diffusivity of Wangen 2010 (derived) */
  cf_assert_close(cfg.conductivity / (cfg.mantle_density * cfg.heat_capacity), 1.0e-6, 1e-12);
  ck_assert(!cfg.adiabatic_gradient_set);
  cf_assert_close(cfg.crust_density, 2900.0, 1e-15);               /* common practice, no source */
  cf_assert_close(cfg.water_density, 1030.0, 1e-15);               /* seawater: common practice, no source */
  cf_assert_close(cfg.surface_temperature, 273.15, 1e-15);         /* 0 C seafloor: common practice, no source */
  cf_assert_close(cfg.gravity, 9.81, 1e-15);                       /* standard value */
  cf_assert_close(cfg.width, 400.0e3, 1e-15);                      /* project default (DESIGN.md section 2), no published source */
  cf_assert_close(cfg.depth, 200.0e3, 1e-15);                      /* project default (DESIGN.md section 2), no published source */
  cf_assert_close(cfg.spacing, 1.0e3, 1e-15);                      /* project default (inputs/default.yaml), no published source */
  cf_assert_close(cfg.nusselt, 8.0, 1e-15);                        /* Phipps Morgan & Chen 1993, from memory */
  cf_assert_close(cfg.hydrothermal_temperature_cutoff, 600.0 + 273.15, 1e-15); /* same, from memory */
  cf_assert_close(cfg.hydrothermal_depth_cutoff, 6.0e3, 1e-15);    /* same, from memory */
  cf_assert_close(cfg.hydrothermal_temperature_width, 100.0, 1e-15); /* common practice, no source */
  cf_assert_close(cfg.hydrothermal_depth_width, 1.0e3, 1e-15);     /* common practice, no source */
  ck_assert_str_eq(cfg.melting_model, "katz2003");                 /* Katz, Spiegelman & Langmuir 2003 */
  cf_assert_close(cfg.entropy_of_fusion, 300.0, 1e-15);            /* Katz, Spiegelman & Langmuir 2003, Table 2 */
  ck_assert_str_eq(cfg.output_dir, "crustforge-output");
  ck_assert(!cfg.output_overwrite);
}
END_TEST

/* Nested YAML maps join with '_' (PETSc manual, PetscOptionsInsertFileYAML); block and flow styles. */
START_TEST(test_yaml_nesting)
{
  CFConfig             cfg;
  PetscInt             n;
  CFConfigEntry       *e;
  const CFConfigEntry *slope;

  CK_PETSC(LoadText("# a fictional ridge segment\n"
                    "mantle:\n  potential_temperature: 1400\n  water: 100   # ppm\n"
                    "ridge: {full_spreading_rate: 20}\n"
                    "grid:\n  spacing: 2\n"
                    "melting:\n  model: linear\n"
                    "linear:\n  solidus_slope: 120\n",
                    0, NULL, &cfg));
  cf_assert_close(cfg.potential_temperature, 1400.0 + 273.15, 1e-15);
  cf_assert_close(cfg.water_ppm, 100.0, 1e-15);
  cf_assert_close(cfg.full_spreading_rate_mm_yr, 20.0, 1e-15);
  cf_assert_close(cfg.spacing, 2.0e3, 1e-15);
  ck_assert_str_eq(cfg.melting_model, "linear");
  ck_assert_str_eq(cfg.scenario, scenario);
  CK_PETSC(CFConfigGetEntries(&cfg, &n, &e));
  slope = FindEntry(n, e, "linear.solidus_slope");
  ck_assert_ptr_nonnull(slope);
  cf_assert_close(slope->real_value, 120.0, 1e-15);
  CK_PETSC(PetscFree(e));
}
END_TEST

/* The command line beats the file, also when it was inserted before the file, as PetscInitialize
   does (project contract: DESIGN.md section 4, "any key can be overridden on the command line"). */
START_TEST(test_command_line_wins)
{
  CFConfig    cfg;
  const char *extra[] = {"-mantle_potential_temperature", "1300", "-grid_spacing", "4"};
  const char *file    = "mantle:\n  potential_temperature: 1400\n  water: 50\ngrid:\n  spacing: 2\n";

  CK_PETSC(LoadText(file, 4, extra, &cfg));
  cf_assert_close(cfg.potential_temperature, 1300.0 + 273.15, 1e-15);
  cf_assert_close(cfg.spacing, 4.0e3, 1e-15);
  cf_assert_close(cfg.water_ppm, 50.0, 1e-15); /* set only in the file: kept */

  ClearOptions();
  CK_PETSC(PetscOptionsInsertArgs(NULL, 4, (char **)extra)); /* as PetscInitialize inserts argv */
  CK_PETSC(LoadText(file, 4, extra, &cfg));
  cf_assert_close(cfg.potential_temperature, 1300.0 + 273.15, 1e-15);
  cf_assert_close(cfg.spacing, 4.0e3, 1e-15);
}
END_TEST

/* User units to SI, worked by hand (derived), with the Julian year 3.15576e7 s (IAU). */
START_TEST(test_unit_conversions)
{
  CFConfig    cfg;
  const char *set[] = {"-mantle_adiabatic_gradient", "0.3", "-hydrothermal_temperature_width", "40", NULL};

  CK_PETSC(CFConfigSetFromOptions(PETSC_COMM_WORLD, &cfg));
  /* 60 mm/yr full rate -> each plate 30 mm/yr = 0.03 m / 3.15576e7 s = 9.50643e-10 m/s (derived) */
  cf_assert_close(cfg.half_rate, 0.03 / 3.15576e7, 1e-14);
  cf_assert_close(cfg.half_rate, 9.50643e-10, 1e-6);
  /* km -> m: 400 km = 4.0e5 m, 200 km = 2.0e5 m, 6 km = 6.0e3 m (definition of the km) */
  cf_assert_close(cfg.width, 4.0e5, 1e-15);
  cf_assert_close(cfg.depth, 2.0e5, 1e-15);
  cf_assert_close(cfg.hydrothermal_depth_cutoff, 6.0e3, 1e-15);
  /* C -> K: 1350 + 273.15 = 1623.15 K (SI definition of the Celsius scale) */
  cf_assert_close(cfg.potential_temperature, 1623.15, 1e-15);
  /* Adiabatic gradient alpha g Tp / cp with Tp in K (Turcotte & Schubert, Geodynamics):
     3e-5 * 9.81 * 1623.15 / 1000 = 4.77693e-4 K/m = 0.4777 K/km (derived) */
  cf_assert_close(cfg.adiabatic_gradient, 3.0e-5 * 9.81 * 1623.15 / 1000.0, 1e-14);
  cf_assert_close(cfg.adiabatic_gradient * 1.0e3, 0.4777, 1e-4);

  /* A gradient given in K/km is stored in K/m and marked as set; a temperature width is an
     interval, so it takes no 273.15 offset (SI definition of the Celsius scale). */
  ClearOptions();
  CK_PETSC(SetOptions(set));
  CK_PETSC(CFConfigSetFromOptions(PETSC_COMM_WORLD, &cfg));
  ck_assert(cfg.adiabatic_gradient_set);
  cf_assert_close(cfg.adiabatic_gradient, 3.0e-4, 1e-15);
  cf_assert_close(cfg.hydrothermal_temperature_width, 40.0, 1e-15);
}
END_TEST

/* Cell counts: width / spacing, rounded up to whole cells so no cell is coarser than asked, then
   the cells resized to fill the domain exactly (derived by hand). */
START_TEST(test_grid_cells)
{
  CFConfig    cfg;
  const char *uneven[] = {"-grid_spacing", "3", NULL};
  const char *decimal[] = {"-grid_depth", "210", "-grid_spacing", "0.7", NULL};

  CK_PETSC(CFConfigSetFromOptions(PETSC_COMM_WORLD, &cfg));
  ck_assert_int_eq(cfg.nx, 400); /* 400 km / 1 km */
  ck_assert_int_eq(cfg.nz, 200); /* 200 km / 1 km */
  cf_assert_close(cfg.dx, 1.0e3, 1e-15);
  cf_assert_close(cfg.dz, 1.0e3, 1e-15);

  ClearOptions();
  CK_PETSC(SetOptions(uneven));
  CK_PETSC(CFConfigSetFromOptions(PETSC_COMM_WORLD, &cfg));
  ck_assert_int_eq(cfg.nx, 134); /* 400 / 3 = 133.3 -> 134 cells of 2.98507 km */
  ck_assert_int_eq(cfg.nz, 67);  /* 200 / 3 = 66.7 -> 67 cells of 2.98507 km */
  cf_assert_close(cfg.dx, 400.0e3 / 134, 1e-14);
  cf_assert_close(cfg.dz, 200.0e3 / 67, 1e-14);
  cf_assert_close(cfg.dx * cfg.nx, cfg.width, 1e-14);
  ck_assert(cfg.dx <= cfg.spacing && cfg.dz <= cfg.spacing);

  /* 210 / 0.7 = 300 exactly in decimal, but not in binary: must not round up to 301 */
  ClearOptions();
  CK_PETSC(SetOptions(decimal));
  CK_PETSC(CFConfigSetFromOptions(PETSC_COMM_WORLD, &cfg));
  ck_assert_int_eq(cfg.nz, 300);
  cf_assert_close(cfg.dz, 700.0, 1e-12);
}
END_TEST

/* Entries -> options -> CFConfigSetFromOptions gives the same scenario back (project contract:
   the entries are the provenance that re-reading a run relies on). */
START_TEST(test_entries_round_trip)
{
  CFConfig       a, b;
  PetscInt       na, nb;
  CFConfigEntry *ea, *eb;
  const char    *set[] = {"-mantle_potential_temperature", "1420", "-mantle_water", "150", "-ridge_full_spreading_rate", "25.5", "-grid_spacing", "2.5", "-grid_width", "333",
                          "-melting_model", "linear", "-linear_solidus_slope", "120", "-output_dir", "round-trip-output", "-output_overwrite", "yes", "-surface_temperature", "2.5", NULL};

  CK_PETSC(SetOptions(set));
  CK_PETSC(CFConfigSetFromOptions(PETSC_COMM_WORLD, &a));
  CK_PETSC(CFConfigGetEntries(&a, &na, &ea));
  ClearOptions();
  for (PetscInt i = 0; i < na; i++) {
    char want[sizeof(ea[i].key) + 1];
    snprintf(want, sizeof(want), "-%s", ea[i].key);
    for (char *p = want; *p; p++)
      if (*p == '.') *p = '_';
    ck_assert_str_eq(ea[i].option, want); /* -section_key for section.key */
    CK_PETSC(PetscOptionsSetValue(NULL, ea[i].option, ea[i].value));
  }
  CK_PETSC(CFConfigSetFromOptions(PETSC_COMM_WORLD, &b));
  CK_PETSC(CFConfigGetEntries(&b, &nb, &eb));
  ck_assert_int_eq(na, nb);
  for (PetscInt i = 0; i < na; i++) {
    ck_assert_str_eq(ea[i].key, eb[i].key);
    ck_assert_str_eq(ea[i].value, eb[i].value);
    ck_assert_int_eq(ea[i].is_real, eb[i].is_real);
    if (ea[i].is_real) cf_assert_close(eb[i].real_value, ea[i].real_value, 1e-14);
  }
  cf_assert_close(b.potential_temperature, a.potential_temperature, 1e-15);
  cf_assert_close(b.half_rate, a.half_rate, 1e-15);
  cf_assert_close(b.adiabatic_gradient, a.adiabatic_gradient, 1e-14); /* now given, no longer derived */
  cf_assert_close(b.surface_temperature, a.surface_temperature, 1e-15);
  ck_assert_int_eq(b.nx, a.nx);
  ck_assert_int_eq(b.nz, a.nz);
  ck_assert_int_eq(b.melting_nparams, a.melting_nparams);
  for (PetscInt p = 0; p < a.melting_nparams; p++) cf_assert_close(b.melting_params[p], a.melting_params[p], 1e-15);
  ck_assert_str_eq(b.melting_model, "linear");
  ck_assert_str_eq(b.output_dir, "round-trip-output");
  ck_assert(b.output_overwrite);
  CK_PETSC(PetscFree(ea));
  CK_PETSC(PetscFree(eb));
}
END_TEST

/* The shipped default scenario validates and states the contract values (inputs/default.yaml;
   the same values as the key table's defaults, test_defaults). */
START_TEST(test_default_scenario_file)
{
  CFConfig    cfg;
  char        path[PETSC_MAX_PATH_LEN], *slash;
  char       *argv[] = {(char *)"test_config", NULL};

  /* this file is SOURCE/tests/test_config.c (CMake compiles it by its absolute path) */
  snprintf(path, sizeof(path), "%s", __FILE__);
  slash = strrchr(path, '/');
  ck_assert_ptr_nonnull(slash);
  snprintf(slash, sizeof(path) - (size_t)(slash - path), "/../inputs/default.yaml");
  CK_PETSC(CFConfigLoad(PETSC_COMM_WORLD, path, 1, argv, &cfg));
  cf_assert_close(cfg.full_spreading_rate_mm_yr, 60.0, 1e-15);
  cf_assert_close(cfg.potential_temperature, 1623.15, 1e-15);
  cf_assert_near(cfg.water_ppm, 0.0, 0.0);
  ck_assert_int_eq(cfg.nx, 400);
  ck_assert_int_eq(cfg.nz, 200);
  ck_assert_str_eq(cfg.melting_model, "katz2003");
}
END_TEST

/* Ranges are inclusive where --help says "to" (project contract, src/config/keys.c). */
START_TEST(test_range_bounds_accepted)
{
  CFConfig    cfg;
  const char *lo[] = {"-mantle_potential_temperature", "1000", "-mantle_water", "0", "-ridge_full_spreading_rate", "300", "-grid_width", "8", NULL};
  const char *hi[] = {"-mantle_potential_temperature", "1800", "-mantle_water", "5000", NULL};

  CK_PETSC(SetOptions(lo));
  CK_PETSC(CFConfigSetFromOptions(PETSC_COMM_WORLD, &cfg));
  ck_assert_int_eq(cfg.nx, 8); /* the smallest grid allowed: 8 cells */
  ClearOptions();
  CK_PETSC(SetOptions(hi));
  CK_PETSC(CFConfigSetFromOptions(PETSC_COMM_WORLD, &cfg));
  cf_assert_close(cfg.water_ppm, 5000.0, 1e-15);
}
END_TEST

/* Bad values fail with PETSC_ERR_USER_INPUT and one line naming the key (DESIGN.md section 4). */
START_TEST(test_validation)
{
  const char *tp[]      = {"-mantle_potential_temperature", "900", NULL};
  const char *water[]   = {"-mantle_water", "5001", NULL};
  const char *rate[]    = {"-ridge_full_spreading_rate", "0", NULL};
  const char *word[]    = {"-ridge_full_spreading_rate", "fast", NULL};
  const char *nan[]     = {"-mantle_water", "nan", NULL};
  const char *coarse[]  = {"-grid_spacing", "30", NULL};
  const char *narrow[]  = {"-grid_width", "7", NULL};
  const char *model[]   = {"-melting_model", "nonesuch", NULL};
  const char *other[]   = {"-melting_model", "katz2003", "-linear_solidus_slope", "100", NULL};
  const char *typo[]    = {"-mantle_potentail_temperature", "1300", NULL};
  const char *boolean[] = {"-output_overwrite", "maybe", NULL};
  const char *section[] = {"-grid", "3", NULL};

  /* whole numbers print as "900 C", not PETSc's "900. C" */
  CheckRejected(tp, "mantle.potential_temperature: 900 C is outside the allowed range (1000 to 1800 C)");
  CheckRejected(water, "mantle.water: 5001 ppm");
  CheckRejected(rate, "ridge.full_spreading_rate");
  CheckRejected(word, "ridge.full_spreading_rate: 'fast' is not a finite number");
  CheckRejected(nan, "mantle.water");
  CheckRejected(coarse, "grid.spacing: 30 km gives 7 cells down grid.depth 200 km");
  CheckRejected(narrow, "grid.width 7 km");
  CheckRejected(model, "melting.model: 'nonesuch'");
  CheckRejected(other, "linear.solidus_slope");
  CheckRejected(typo, "mantle.potentail_temperature");
  CheckRejected(boolean, "output.overwrite");
  CheckRejected(section, "grid: a section");
}
END_TEST

/* Files that cannot be scenarios fail as input errors naming the file (DESIGN.md section 4). */
START_TEST(test_load_failures)
{
  PetscErrorCode err;
  char           missing[PETSC_MAX_PATH_LEN + 32];

  snprintf(missing, sizeof(missing), "%s/no-such-scenario.yaml", tmpdir);
  CK_PETSC(LoadQuiet(missing, NULL, &err));
  CheckError(err, PETSC_ERR_FILE_OPEN, "no-such-scenario.yaml");
  CK_PETSC(LoadQuiet(tmpdir, NULL, &err));
  CheckError(err, PETSC_ERR_FILE_OPEN, "is a directory");
  CK_PETSC(LoadQuiet(scenario, "mantle: {potential_temperature: 1400\n", &err)); /* unbalanced */
  CheckError(err, PETSC_ERR_USER_INPUT, "s.yaml' is not a valid scenario");
  CK_PETSC(LoadQuiet(scenario, "# only a comment\n\n", &err));
  CheckError(err, PETSC_ERR_FILE_UNEXPECTED, "holds no keys");
}
END_TEST

static Suite *ConfigSuite(void)
{
  Suite *s  = suite_create("config");
  TCase *tc = tcase_create("loader");

  tcase_add_unchecked_fixture(tc, MakeTmp, RemoveTmp);
  tcase_add_checked_fixture(tc, ClearOptions, ClearOptions);
  tcase_add_test(tc, test_defaults);
  tcase_add_test(tc, test_yaml_nesting);
  tcase_add_test(tc, test_command_line_wins);
  tcase_add_test(tc, test_unit_conversions);
  tcase_add_test(tc, test_grid_cells);
  tcase_add_test(tc, test_entries_round_trip);
  tcase_add_test(tc, test_default_scenario_file);
  tcase_add_test(tc, test_range_bounds_accepted);
  tcase_add_test(tc, test_validation);
  tcase_add_test(tc, test_load_failures);
  suite_add_tcase(s, tc);
  return s;
}

CF_TEST_MAIN(ConfigSuite)
