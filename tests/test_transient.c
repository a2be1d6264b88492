/* Check suite for transient runs (src/transient): exact restart, the approach to the steady
   solver's answer, half-space cooling with the order of the time integration, and the response of
   the crust to a step in spreading rate.  Every scenario is an invented ridge segment (fictional).
   The restart case also runs on 2 ranks (CK_RUN_CASE=restart, tests/CMakeLists.txt). */
#include <math.h>
#include <string.h>
#include <crustforge/transient.h>
#include <crustforge/units.h>
#include "cf_test.h"
#include "cf_scenario.h"


/* A small melting ridge: 100 km by 80 km at 10 km, katz2003, dry. */
static void RidgeConfig(CFConfig *cfg, PetscReal end_myr, PetscReal step_myr, const char *method)
{
  CK_PETSC(CFConfigSetDefaults(cfg));
  cfg->width   = CFKmToM(100.0);
  cfg->depth   = CFKmToM(80.0);
  cfg->spacing = CFKmToM(10.0);
  cfg->nusselt = 1.0;
  CFScenarioFinish(cfg);
  cfg->time_end_myr  = end_myr;
  cfg->time_step_myr = step_myr;
  CK_PETSC(PetscStrncpy(cfg->time_method, method, sizeof(cfg->time_method)));
}

static void Run(CFTransient tr)
{
  while (!CFTransientFinished(tr)) CK_PETSC(CFTransientStep(tr));
}

static PetscReal LastThickness(CFTransient tr, const CFConfig *cfg)
{
  PetscInt         n;
  const PetscReal *melt, *U;
  CK_PETSC(CFTransientGetCrustRecord(tr, &n, NULL, NULL, &melt, &U));
  return melt[n - 1] / (cfg->crust_density * U[n - 1]);
}

/* ---------- 1. exact restart (DESIGN 4: a restarted run continues bit for bit) ---------- */
static void RestartCase(const char *method)
{
  CFConfig         cfg;
  CFTransient      a, b;
  CFSteady         sa, sb;
  Vec              Xa, Xb;
  PetscInt         na, nb, sa_step;
  const PetscReal *ta, *ma, *tb, *mb;
  PetscReal        diff;
  const char      *path = "test_transient_restart.h5";

  RidgeConfig(&cfg, 1.0, 0.025, method); /* 40 steps */
  cfg.history_full_spreading_rate.n = 4;  /* the rate halves over the run */
  cfg.history_full_spreading_rate.v[0] = 0.0, cfg.history_full_spreading_rate.v[1] = 60.0;
  cfg.history_full_spreading_rate.v[2] = 1.0, cfg.history_full_spreading_rate.v[3] = 30.0;
  /* a ridge starting up: the initial state is set, not solved for, so both runs start from the
     same bits also on several ranks */
  CK_PETSC(PetscStrncpy(cfg.time_start, "startup", sizeof(cfg.time_start)));
  CK_PETSC(CFTransientCreate(PETSC_COMM_WORLD, &cfg, &a));
  CK_PETSC(CFTransientSetInitialState(a));
  Run(a);
  CK_PETSC(CFTransientCreate(PETSC_COMM_WORLD, &cfg, &b));
  CK_PETSC(CFTransientSetInitialState(b));
  for (int k = 0; k < 20; k++) CK_PETSC(CFTransientStep(b));
  CK_PETSC(CFTransientCheckpointWrite(b, path));
  CK_PETSC(CFTransientDestroy(&b));
  CK_PETSC(CFTransientCreate(PETSC_COMM_WORLD, &cfg, &b));
  CK_PETSC(CFTransientCheckpointLoad(b, path));
  CK_PETSC(CFTransientGetTime(b, NULL, &sa_step, NULL));
  ck_assert_int_eq(sa_step, 20);
  Run(b);
  CK_PETSC(CFTransientGetSteady(a, &sa));
  CK_PETSC(CFTransientGetSteady(b, &sb));
  CK_PETSC(CFSteadyGetSolution(sa, &Xa));
  CK_PETSC(CFSteadyGetSolution(sb, &Xb));
  CK_PETSC(VecAXPY(Xb, -1.0, Xa));
  CK_PETSC(VecNorm(Xb, NORM_INFINITY, &diff));
  ck_assert_msg(diff == 0.0, "%s: restarted state differs by %g", method, (double)diff);
  CK_PETSC(CFTransientGetCrustRecord(a, &na, &ta, NULL, &ma, NULL));
  CK_PETSC(CFTransientGetCrustRecord(b, &nb, &tb, NULL, &mb, NULL));
  ck_assert_int_eq(na, 40);
  ck_assert_int_eq(nb, 40);
  ck_assert_msg(!memcmp(ta, tb, 40 * sizeof(PetscReal)) && !memcmp(ma, mb, 40 * sizeof(PetscReal)), "%s: crust records differ", method);
  CK_PETSC(PetscPrintf(PETSC_COMM_WORLD, "restart (%s): 40 steps straight = 20 + checkpoint + 20, bit for bit; crust %.4f km\n", method, (double)CFMToKm(LastThickness(a, &cfg))));
  CK_PETSC(CFTransientDestroy(&a));
  CK_PETSC(CFTransientDestroy(&b));
}

START_TEST(restart_beuler) { RestartCase("beuler"); }
END_TEST

START_TEST(restart_sdirk2) { RestartCase("sdirk2"); }
END_TEST

/* ---------- 3. a long transient at constant parameters reaches the steady state ---------- */
/* Steady state of the energy and depletion equations (DESIGN 2.2, 2.4) is the fixed point of the
   transient ones: relative temperature difference below 1e-4 and crust within 0.5 % (the issue's
   acceptance values). */
START_TEST(long_transient_reaches_steady)
{
  CFConfig      cfg;
  CFTransient   tr;
  CFSteady      s, st;
  CFSolveReport rep;
  Vec           Xt, Xs, T1, T2;
  PetscReal     H, Hs, dT, Tmax;
  DM            da1;

  RidgeConfig(&cfg, 200.0, 4.0, "beuler");
  CK_PETSC(PetscStrncpy(cfg.time_start, "startup", sizeof(cfg.time_start)));
  CK_PETSC(CFTransientCreate(PETSC_COMM_WORLD, &cfg, &tr));
  CK_PETSC(CFTransientSetInitialState(tr));
  Run(tr);
  CK_PETSC(CFSteadyCreate(PETSC_COMM_WORLD, &cfg, &s));
  CK_PETSC(CFScenarioSolve(s, &rep));
  CK_PETSC(CFSteadyCrustalThickness(s, &H, &Hs));
  CK_PETSC(CFTransientGetSteady(tr, &st));
  CK_PETSC(CFSteadyGetSolution(st, &Xt));
  CK_PETSC(CFSteadyGetSolution(s, &Xs));
  CK_PETSC(CFSteadyGetScalarDM(s, &da1));
  CK_PETSC(DMCreateGlobalVector(da1, &T1));
  CK_PETSC(DMCreateGlobalVector(da1, &T2));
  CK_PETSC(VecStrideGather(Xt, 0, T1, INSERT_VALUES));
  CK_PETSC(VecStrideGather(Xs, 0, T2, INSERT_VALUES));
  CK_PETSC(VecNorm(T2, NORM_INFINITY, &Tmax));
  CK_PETSC(VecAXPY(T1, -1.0, T2));
  CK_PETSC(VecNorm(T1, NORM_INFINITY, &dT));
  CK_PETSC(PetscPrintf(PETSC_COMM_WORLD, "long transient (50 backward Euler steps of 4 Myr from a start-up state): max |T - T_steady| / max T = %.2e, crust %.4f km vs steady %.4f km (%.3f %%)\n", (double)(dT / Tmax), (double)CFMToKm(LastThickness(tr, &cfg)), (double)CFMToKm(H), (double)(100.0 * PetscAbsReal(LastThickness(tr, &cfg) - H) / H)));
  ck_assert_msg(dT / Tmax < 1e-4, "temperature differs from the steady solution by %g relative", (double)(dT / Tmax));
  cf_assert_close(LastThickness(tr, &cfg), H, 0.005);
  CK_PETSC(VecDestroy(&T1));
  CK_PETSC(VecDestroy(&T2));
  CK_PETSC(CFSteadyDestroy(&s));
  CK_PETSC(CFTransientDestroy(&tr));
}
END_TEST

/* ---------- 4. half-space cooling and the order of the time integration ---------- */
/* T(z, t) = Ts + (Tm - Ts) erf(z / (2 sqrt(kappa t))) (Turcotte & Schubert, Geodynamics, 2nd ed.,
   eq. 4.113).  The run starts from the profile at age t0 = 1 Myr (time.lid_thickness =
   2 sqrt(kappa t0), derived), flow effectively off (1e-6 mm/yr), no melting, no adiabat, and is
   compared with the profile at age t0 + 4 Myr.  Order: the differences between runs with steps
   dt, dt/2, dt/4 fall by 2^p (p = 1 backward Euler, p = 2 SDIRK2; Hairer & Wanner, Solving ODEs
   II, IV.6). */
static void Cooling(const char *method, PetscReal step_myr, Vec *T)
{
  CFConfig        cfg;
  CFTransient     tr;
  CFSteady        s;
  Vec             X;
  DM              da1;
  const PetscReal kappa = 1e-6;

  CK_PETSC(CFConfigSetDefaults(&cfg));
  cfg.width                     = CFKmToM(20.0);
  cfg.depth                     = CFKmToM(100.0);
  cfg.spacing                   = CFKmToM(2.5);
  cfg.full_spreading_rate_mm_yr = 1e-6;
  cfg.nusselt                   = 1.0;
  cfg.conductivity              = kappa * cfg.mantle_density * cfg.heat_capacity;
  CFScenarioNoAdiabat(&cfg);
  CK_PETSC(CFScenarioNoMelting(&cfg));
  CFScenarioFinish(&cfg);
  cfg.time_end_myr       = 4.0;
  cfg.time_step_myr      = step_myr;
  cfg.time_lid_thickness = 2.0 * PetscSqrtReal(kappa * CFMyrToS(1.0));
  CK_PETSC(PetscStrncpy(cfg.time_method, method, sizeof(cfg.time_method)));
  CK_PETSC(PetscStrncpy(cfg.time_start, "startup", sizeof(cfg.time_start)));
  CK_PETSC(CFTransientCreate(PETSC_COMM_WORLD, &cfg, &tr));
  CK_PETSC(CFTransientSetInitialState(tr));
  Run(tr);
  CK_PETSC(CFTransientGetSteady(tr, &s));
  CK_PETSC(CFSteadyGetSolution(s, &X));
  CK_PETSC(CFSteadyGetScalarDM(s, &da1));
  CK_PETSC(DMCreateGlobalVector(da1, T));
  CK_PETSC(VecStrideGather(X, 0, *T, INSERT_VALUES));
  CK_PETSC(CFTransientDestroy(&tr));
}

static void CoolingCase(const char *method, PetscReal p_expected)
{
  Vec       T[3], E;
  PetscReal d01, d12, err, scale = 1350.0;
  const PetscReal kappa = 1e-6, age = CFMyrToS(5.0), dz = 2.5e3;

  for (int k = 0; k < 3; k++) Cooling(method, 1.0 / (1 << k), &T[k]);
  CK_PETSC(VecDuplicate(T[0], &E));
  CK_PETSC(VecWAXPY(E, -1.0, T[1], T[0]));
  CK_PETSC(VecNorm(E, NORM_INFINITY, &d01));
  CK_PETSC(VecWAXPY(E, -1.0, T[2], T[1]));
  CK_PETSC(VecNorm(E, NORM_INFINITY, &d12));
  { /* finest run against the half-space profile, column 0 (all columns are alike) */
    DM            da;
    DMDALocalInfo info;
    PetscScalar **t;
    PetscReal     local = 0.0;
    CK_PETSC(VecGetDM(T[2], &da));
    CK_PETSC(DMDAGetLocalInfo(da, &info));
    CK_PETSC(DMDAVecGetArrayRead(da, T[2], &t));
    for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
      for (PetscInt i = info.xs; i < info.xs + info.xm; i++) {
        const PetscReal z = (j + 0.5) * dz, Tref = CFCelsiusToKelvin(0.0) + scale * erf(z / (2.0 * PetscSqrtReal(kappa * age)));
        local = PetscMax(local, PetscAbsReal(PetscRealPart(t[j][i]) - Tref));
      }
    CK_PETSC(DMDAVecRestoreArrayRead(da, T[2], &t));
    ck_assert_int_eq(MPI_Allreduce(&local, &err, 1, MPIU_REAL, MPIU_MAX, PETSC_COMM_WORLD), MPI_SUCCESS);
  }
  CK_PETSC(PetscPrintf(PETSC_COMM_WORLD, "half-space cooling (%s): max |T - erf profile| = %.3f K at age 5 Myr (dt 0.25 Myr, dz 2.5 km); step differences %.4g K, %.4g K: observed order %.2f\n", method, (double)err, (double)d01, (double)d12, (double)PetscLog2Real(d01 / d12)));
  ck_assert_msg(err < 0.01 * scale, "%s: %g K from the half-space profile (more than 1 %% of Tm - Ts)", method, (double)err);
  cf_assert_near(PetscLog2Real(d01 / d12), p_expected, 0.3);
  for (int k = 0; k < 3; k++) CK_PETSC(VecDestroy(&T[k]));
  CK_PETSC(VecDestroy(&E));
}

START_TEST(cooling_beuler) { CoolingCase("beuler", 1.0); }
END_TEST

START_TEST(cooling_sdirk2) { CoolingCase("sdirk2", 2.0); }
END_TEST

/* ---------- 5. a step in spreading rate ---------- */
/* Slower spreading cools the mantle under the axis more and thins the crust (Reid & Jackson 1981;
   Bown & White 1994): the test asserts the direction and prints the time the crust takes to make
   63 % of its change, beside the time upwelling mantle takes to cross the melting region
   (depth of the solidus at the axis over the axial upwelling 2 U0 / pi, DESIGN 2.1). */
START_TEST(rate_step)
{
  CFConfig         cfg;
  CFTransient      tr;
  PetscInt         n;
  const PetscReal *t, *melt, *U;
  PetscReal        H0, H1, t63 = -1.0, crossing;

  RidgeConfig(&cfg, 8.0, 0.25, "sdirk2");
  cfg.history_full_spreading_rate.n = 6;
  cfg.history_full_spreading_rate.v[0] = 0.0, cfg.history_full_spreading_rate.v[1] = 60.0;
  cfg.history_full_spreading_rate.v[2] = 1.0, cfg.history_full_spreading_rate.v[3] = 60.0;
  cfg.history_full_spreading_rate.v[4] = 1.01, cfg.history_full_spreading_rate.v[5] = 30.0;
  CK_PETSC(CFTransientCreate(PETSC_COMM_WORLD, &cfg, &tr));
  CK_PETSC(CFTransientSetInitialState(tr));
  Run(tr);
  CK_PETSC(CFTransientGetCrustRecord(tr, &n, &t, NULL, &melt, &U));
  H0 = melt[3] / (cfg.crust_density * U[3]);         /* before the step (t = 1 Myr) */
  H1 = melt[n - 1] / (cfg.crust_density * U[n - 1]); /* 7 Myr after */
  for (PetscInt k = 4; k < n && t63 < 0; k++)
    if (PetscAbsReal(melt[k] / (cfg.crust_density * U[k]) - H0) >= 0.63 * PetscAbsReal(H1 - H0)) t63 = t[k] - CFMyrToS(1.0);
  crossing = 60e3 / (2.0 * CFHalfRateFromFullMmPerYr(30.0) / PETSC_PI); /* melting from about 60 km (derived from the run's solidus depth, rounded) */
  CK_PETSC(PetscPrintf(PETSC_COMM_WORLD, "rate step 60 -> 30 mm/yr at 1 Myr: crust %.3f km -> %.3f km; 63 %% of the change after %.2f Myr; mantle crosses a 60 km melting column in %.2f Myr\n", (double)CFMToKm(H0), (double)CFMToKm(H1), (double)CFSToMyr(t63), (double)CFSToMyr(crossing)));
  ck_assert_msg(H1 < H0, "crust did not thin after the rate halved (%g -> %g km)", (double)CFMToKm(H0), (double)CFMToKm(H1));
  ck_assert_msg(t63 > 0, "the crust never made 63 %% of its change");
  CK_PETSC(CFTransientDestroy(&tr));
}
END_TEST

/* ---------- checkpoint refusals ---------- */
START_TEST(checkpoint_refusals)
{
  CFConfig       cfg, back;
  CFTransient    tr;
  PetscErrorCode ierr;
  const char    *path = "test_transient_refuse.h5";
  char          *argv[] = {(char *)"prog", (char *)"-mantle_potential_temperature", (char *)"1400"};

  RidgeConfig(&cfg, 0.1, 0.05, "beuler");
  CK_PETSC(CFTransientCreate(PETSC_COMM_WORLD, &cfg, &tr));
  CK_PETSC(CFTransientSetInitialState(tr));
  CK_PETSC(CFTransientStep(tr));
  CK_PETSC(CFTransientCheckpointWrite(tr, path));
  CK_PETSC(CFTransientDestroy(&tr));
  CK_PETSC(PetscPushErrorHandler(PetscReturnErrorHandler, NULL));
  ierr = CFCheckpointReadConfig(PETSC_COMM_WORLD, path, 3, argv, 1, &back); /* physics changed */
  CK_PETSC(PetscOptionsClear(NULL));
  ck_assert_int_eq(ierr, PETSC_ERR_USER_INPUT);
  ierr = CFCheckpointReadConfig(PETSC_COMM_WORLD, "no_such_checkpoint.h5", 1, argv, 1, &back);
  ck_assert_int_eq(ierr, PETSC_ERR_FILE_OPEN);
  CK_PETSC(PetscPopErrorHandler());
  CK_PETSC(PetscOptionsClear(NULL));
}
END_TEST

static Suite *TransientSuite(void)
{
  Suite *s = suite_create("transient");
  TCase *r = tcase_create("restart"), *v = tcase_create("verification");

  tcase_set_timeout(r, 300);
  tcase_set_timeout(v, 300);
  tcase_add_test(r, restart_beuler);
  tcase_add_test(r, restart_sdirk2);
  tcase_add_test(r, checkpoint_refusals);
  tcase_add_test(v, cooling_beuler);
  tcase_add_test(v, cooling_sdirk2);
  tcase_add_test(v, long_transient_reaches_steady);
  tcase_add_test(v, rate_step);
  suite_add_tcase(s, r);
  suite_add_tcase(s, v);
  return s;
}

CF_TEST_MAIN(TransientSuite)
