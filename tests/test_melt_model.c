/* Check suite: the whole melting model (temperature, depletion and melting rate solved together)
   against melt conservation, the crust of normal ridges, and its trends with spreading rate,
   potential temperature, water and the MPI rank count.  Each test names the source of what it
   expects.  The scenarios are invented ridge segments.

   Domain: 320 km wide and 160 km deep instead of the default 400 x 200 km, so that every solve
   takes seconds.  At 2 km spacing the crust moves by less than 0.4 % against the default domain
   (measured: dry 1350 C 5.8482 vs 5.8482 km, 1300 C 3.0363 vs 3.0363, 1400 C 9.7278 vs 9.7406,
   200 ppm water 7.0626 vs 7.0829, 10 mm/yr 0.3423 vs 0.3410).  Narrower is not enough: at 200 km
   the hot (1400 C) and wet cases lose 3 % of their crust, because their melting regions, deeper
   than the dry 1350 C one, reach beyond 200 km from the axis.  160 km leaves the deepest onset
   (about 103 km, wet) well inside and halves to the 8 km grid of the grid sequence. */
#include <crustforge/melting.h>
#include <crustforge/steady.h>
#include <crustforge/units.h>
#include "cf_test.h"
#include "cf_scenario.h"
#include "../src/thermal/steady_impl.h" /* CFDepletionSweep: the solver's exact upstream sweep */

typedef struct {
  PetscReal rate_mm_yr, Tp_C, water_ppm, spacing_km;
  PetscBool tight; /* Newton to 1e-10 K, for comparisons finer than the default tolerance */
} MeltCase;

typedef struct {
  PetscReal     H_melting, H_side;   /* m, crust from the melting rate and from the side flux */
  PetscReal     onset, crossing, dz; /* m: deepest axis cell with F_d > 0, adiabat meets solidus */
  PetscReal     sweep_diff;          /* largest |F_d(Newton) - F_d(sweep of Newton's T)| */
  PetscReal     sweep_bound;         /* what the final residual allows for it */
  PetscReal     gamma_min, gamma_max, gamma_roundoff; /* kg m-3 s-1 */
  PetscReal     seconds;             /* initial guess (grid sequence) and Newton */
  CFSolveReport report;
} MeltResult;

/* The scenario of a case: every default except the domain, grid, rate, Tp and water. */
static PetscErrorCode CaseConfig(const MeltCase *mc, CFConfig *cfg)
{
  PetscFunctionBeginUser;
  PetscCall(CFConfigSetDefaults(cfg));
  cfg->width                     = CFKmToM(320.0);
  cfg->depth                     = CFKmToM(160.0);
  cfg->spacing                   = CFKmToM(mc->spacing_km);
  cfg->full_spreading_rate_mm_yr = mc->rate_mm_yr;
  cfg->potential_temperature     = CFCelsiusToKelvin(mc->Tp_C);
  cfg->water_ppm                 = mc->water_ppm;
  CFScenarioFinish(cfg);
  PetscFunctionReturn(0);
}

/* Depth where the inflow adiabat T = Tp + Gamma_ad z meets the model's solidus at P = rho g z,
   by bisection (the adiabat starts above the solidus at the surface and ends below it). */
static PetscErrorCode AdiabatSolidusDepth(CFMeltingModel m, const CFConfig *cfg, PetscReal *z)
{
  PetscReal lo = 0.0, hi = cfg->depth, Ts;

  PetscFunctionBeginUser;
  PetscCall(CFMeltingModelSolidus(m, 0.0, &Ts));
  PetscCheck(cfg->potential_temperature > Ts, PETSC_COMM_SELF, PETSC_ERR_USER_INPUT, "the adiabat is below the solidus at the surface: it never melts");
  PetscCall(CFMeltingModelSolidus(m, cfg->mantle_density * cfg->gravity * hi, &Ts));
  PetscCheck(cfg->potential_temperature + cfg->adiabatic_gradient * hi < Ts, PETSC_COMM_SELF, PETSC_ERR_USER_INPUT, "the adiabat is above the solidus at the bottom (%g km): no crossing in the domain", (double)CFMToKm(hi));
  for (int it = 0; it < 60; it++) {
    const PetscReal mid = 0.5 * (lo + hi);
    PetscCall(CFMeltingModelSolidus(m, cfg->mantle_density * cfg->gravity * mid, &Ts));
    if (cfg->potential_temperature + cfg->adiabatic_gradient * mid > Ts) lo = mid;
    else hi = mid;
  }
  *z = 0.5 * (lo + hi);
  PetscFunctionReturn(0);
}

/* Centre depth of the deepest axis cell (i = 0) with F_d > 0, on every rank; -1 if none. */
static PetscErrorCode AxisOnsetDepth(CFSteady s, Vec F, PetscReal *z)
{
  DM                 da1;
  DMDALocalInfo      info;
  const PetscScalar **f;
  PetscInt           jlocal = -1, jmax;

  PetscFunctionBeginUser;
  PetscCall(CFSteadyGetScalarDM(s, &da1));
  PetscCall(DMDAGetLocalInfo(da1, &info));
  PetscCall(DMDAVecGetArrayRead(da1, F, &f));
  if (info.xs == 0)
    for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
      if (PetscRealPart(f[j][0]) > 0.0) jlocal = PetscMax(jlocal, j);
  PetscCall(DMDAVecRestoreArrayRead(da1, F, &f));
  PetscCall(MPIU_Allreduce(&jlocal, &jmax, 1, MPIU_INT, MPI_MAX, PetscObjectComm((PetscObject)da1)));
  *z = jmax < 0 ? -1.0 : (jmax + 0.5) * CFSteadyGetConfig(s)->dz;
  PetscFunctionReturn(0);
}

/* Largest difference between Newton's depletion and CFDepletionSweep of Newton's temperature. */
static PetscErrorCode SweepDifference(CFSteady s, PetscReal *diff)
{
  Vec X, Y;

  PetscFunctionBeginUser;
  PetscCall(CFSteadyGetSolution(s, &X));
  PetscCall(VecDuplicate(X, &Y));
  PetscCall(VecCopy(X, Y));
  PetscCall(CFDepletionSweep(s, Y));
  PetscCall(VecAXPY(Y, -1.0, X));
  PetscCall(VecStrideNorm(Y, 1, NORM_INFINITY, diff));
  PetscCall(VecDestroy(&Y));
  PetscFunctionReturn(0);
}

/* Solve a case on comm from the grid-sequenced initial guess and measure it; prints one line. */
static PetscErrorCode SolveCase(MPI_Comm comm, const MeltCase *mc, MeltResult *r)
{
  const char *const tight[] = {"-snes_rtol", "1e-13", "-snes_atol", "1e-10", "-ksp_rtol", "1e-12", NULL};
  CFConfig          cfg;
  CFSteady          s;
  CFMeltingModel    m;
  DM                da1;
  Vec               F, Gamma;
  PetscInt          levels, coarse_its;
  PetscReal         t0, Fmax;

  PetscFunctionBeginUser;
  PetscCall(PetscMemzero(r, sizeof(*r)));
  PetscCall(CaseConfig(mc, &cfg));
  t0 = MPI_Wtime();
  if (mc->tight)
    for (const char *const *o = tight; o[0]; o += 2) PetscCall(PetscOptionsSetValue(NULL, o[0], o[1]));
  PetscCall(CFSteadyCreate(comm, &cfg, &s)); /* reads the SNES options; the coarse grids keep the defaults */
  if (mc->tight)
    for (const char *const *o = tight; o[0]; o += 2) PetscCall(PetscOptionsClearValue(NULL, o[0]));
  PetscCall(CFSteadySequenceInitialGuess(s, &levels, &coarse_its));
  PetscCall(CFSteadySolve(s, &r->report));
  r->seconds = MPI_Wtime() - t0;

  PetscCall(CFSteadyCrustalThickness(s, &r->H_melting, &r->H_side));
  PetscCall(CFSteadyGetScalarDM(s, &da1));
  PetscCall(DMCreateGlobalVector(da1, &F));
  PetscCall(DMCreateGlobalVector(da1, &Gamma));
  PetscCall(CFSteadyGetFields(s, NULL, F, NULL, Gamma, NULL));
  PetscCall(VecMin(Gamma, NULL, &r->gamma_min));
  PetscCall(VecMax(Gamma, NULL, &r->gamma_max));
  PetscCall(VecMax(F, NULL, &Fmax));
  PetscCall(AxisOnsetDepth(s, F, &r->onset));
  PetscCall(CFSteadyGetMeltingModel(s, &m));
  PetscCall(AdiabatSolidusDepth(m, &cfg, &r->crossing));
  PetscCall(SweepDifference(s, &r->sweep_diff));
  r->dz = cfg.dz;
  /* Bound (derived): a depletion row of the residual is (F_d - max(F_eq, F_up)) times
     T_bottom - T_surface, and max() and the flux-weighted mean F_up do not amplify differences,
     so along an upstream path of at most nx + nz cells the depletion can differ from the exact
     sweep by at most that many row residuals. */
  r->sweep_bound = (cfg.nx + cfg.nz) * r->report.final_residual / (cfg.potential_temperature + cfg.adiabatic_gradient * cfg.depth - cfg.surface_temperature) + 1e-14;
  /* Round-off of Gamma V = rho (sum_out q F_d - sum_in q F_up) (derived): a few terms, each at
     most rho U0 h F_max (face fluxes are at most U0 times the face length), over the volume. */
  r->gamma_roundoff = 100.0 * PETSC_MACHINE_EPSILON * cfg.mantle_density * cfg.half_rate * (cfg.dx + cfg.dz) * Fmax / (cfg.dx * cfg.dz);
  PetscCall(VecDestroy(&Gamma));
  PetscCall(VecDestroy(&F));
  PetscCall(CFSteadyDestroy(&s));

  PetscCall(PetscPrintf(comm, "melt model: %5.1f mm/yr Tp %4.0f C water %3.0f ppm, %g km (%d x %d cells): crust %.6f km (melting) %.6f km (side flux); onset %.1f km, adiabat meets solidus %.2f km; Newton %d (+%d on %d coarse grids), residual %.1e K; %.2f s\n",
                        (double)mc->rate_mm_yr, (double)mc->Tp_C, (double)mc->water_ppm, (double)mc->spacing_km, (int)cfg.nx, (int)cfg.nz, (double)CFMToKm(r->H_melting), (double)CFMToKm(r->H_side), (double)CFMToKm(r->onset), (double)CFMToKm(r->crossing),
                        (int)r->report.nonlinear_iterations, (int)coarse_its, (int)levels, (double)r->report.final_residual, (double)r->seconds));
  PetscFunctionReturn(0);
}

static MeltResult Solve(PetscReal rate_mm_yr, PetscReal Tp_C, PetscReal water_ppm, PetscReal spacing_km)
{
  const MeltCase mc = {rate_mm_yr, Tp_C, water_ppm, spacing_km, PETSC_FALSE};
  MeltResult     r;

  CK_PETSC(SolveCase(PETSC_COMM_WORLD, &mc, &r));
  return r;
}

/* ---------- 4. melt conservation ---------- */

/* The face fluxes are differences of the stream function at cell corners, so the discrete flow is
   divergence-free and the melt made inside the domain equals the depletion carried out through the
   far side (DESIGN 2.1, 2.5, 5.3; mass balance, derived): both crusts agree to 1e-10 relative.
   The depletion of the converged state is the exact upstream sweep F_d = max(F_eq, F_up) of its
   temperature (DESIGN 2.4) within the bound its final residual allows, and melting is
   irreversible: Gamma >= 0 everywhere up to round-off.  4 km spacing: these are identities of
   the discrete equations, true at any spacing. */
START_TEST(test_melt_conservation)
{
  const MeltResult r = Solve(60.0, 1350.0, 0.0, 4.0);

  CK_PETSC(PetscPrintf(PETSC_COMM_WORLD, "melt conservation: |H_melting - H_side| / H_side = %.2e; max |F_d - sweep| = %.2e (bound %.2e); Gamma in [%.3e, %.3e] kg/m3/s (round-off %.1e)\n", (double)(PetscAbsReal(r.H_melting - r.H_side) / r.H_side), (double)r.sweep_diff, (double)r.sweep_bound, (double)r.gamma_min, (double)r.gamma_max, (double)r.gamma_roundoff));
  ck_assert_msg(r.H_side > 1.0e3, "only %g m of crust: the check would compare nothing", (double)r.H_side);
  cf_assert_close(r.H_melting, r.H_side, 1e-10);
  ck_assert_msg(r.sweep_diff <= r.sweep_bound, "Newton's depletion differs from the upstream sweep of its temperature by %g (bound %g from the final residual %g K)", (double)r.sweep_diff, (double)r.sweep_bound, (double)r.report.final_residual);
  ck_assert_msg(r.gamma_min >= -r.gamma_roundoff, "melting rate %g kg/m3/s is negative beyond round-off (%g)", (double)r.gamma_min, (double)r.gamma_roundoff);
}
END_TEST

/* ---------- 5. the dry whole model ---------- */

/* Dry mantle, Tp 1350 C, 60 mm/yr, every other default (katz2003, latent heat, adiabat,
   hydrothermal cooling):
   - crust between 5 and 11 km: normal oceanic crust is 7.1 +/- 0.8 km seismically, extreme limits
     5.0-8.5 km (White, McKenzie & O'Nions 1992, JGR 97, abstract); an isentropic column with the
     Katz et al. (2003) Table 2 coefficients and no lithosphere gives about 10 km (derived: 9.7 km
     integrating this model's katz2003, latent heat and adiabat up the axis without conduction),
     an upper bound since conductive cooling only takes melt away.
   - melting starts at the axis within two cells of where the model's own inflow adiabat
     T = Tp + Gamma_ad z meets the katz2003 solidus (derived: the upwelling column stays on the
     adiabat until it melts; the onset cell's centre is within half a cell of the crossing, and
     the 2 cells allow for conductive cooling at the axis).
   Spacing 2 km, the closest to the default 1 km that runs in seconds here (7 s, other jobs on
   both cores): 1 km on this domain took 45 s (6 s grid sequence, 39 s Newton) and gives 0.9 %
   more crust (5.901 vs 5.848 km), onset 76.5 vs 77.0 km, crossing 77.5 km. */
START_TEST(test_melt_normal_crust)
{
  const MeltResult r = Solve(60.0, 1350.0, 0.0, 2.0);

  CK_PETSC(PetscPrintf(PETSC_COMM_WORLD, "melt normal crust: %.3f km (5-11 km expected); onset %.1f km, adiabat meets solidus at %.2f km, %.1f cells apart\n", (double)CFMToKm(r.H_melting), (double)CFMToKm(r.onset), (double)CFMToKm(r.crossing), (double)(PetscAbsReal(r.onset - r.crossing) / r.dz)));
  ck_assert_msg(r.H_melting >= 5.0e3 && r.H_melting <= 11.0e3, "crust %.3f km is outside 5-11 km", (double)CFMToKm(r.H_melting));
  ck_assert_msg(r.onset > 0.0, "no melting at the axis");
  ck_assert_msg(PetscAbsReal(r.onset - r.crossing) <= 2.0 * r.dz, "melting starts at %.2f km at the axis, the adiabat meets the solidus at %.2f km: %.1f cells apart (2 allowed)", (double)CFMToKm(r.onset), (double)CFMToKm(r.crossing), (double)(PetscAbsReal(r.onset - r.crossing) / r.dz));
}
END_TEST

/* Crust at 10 mm/yr is less than 0.75 times crust at 60 mm/yr: melt thickness decreases abruptly
   below about 20 mm/yr full rate, from conductive cooling of the upwelling mantle (White,
   Minshull, Bickle & Robinson 2001, J. Petrology 42; Bown & White 1994, EPSL 121, from memory);
   the factor 0.75 marks "abrupt" (common practice, no source).  4 km spacing: a trend; against
   2 km, 4 km changes the crust by 2.6 % at 60 mm/yr (5.696 vs 5.848 km) and 5.6 % at 10 mm/yr
   (0.323 vs 0.342 km), where the trend is 94 %. */
START_TEST(test_melt_slow_spreading)
{
  const MeltResult slow = Solve(10.0, 1350.0, 0.0, 4.0), normal = Solve(60.0, 1350.0, 0.0, 4.0);

  CK_PETSC(PetscPrintf(PETSC_COMM_WORLD, "melt slow spreading: crust %.3f km at 10 mm/yr, %.3f km at 60 mm/yr, ratio %.3f (below 0.75 expected); axis onset %.1f vs %.1f km\n", (double)CFMToKm(slow.H_melting), (double)CFMToKm(normal.H_melting), (double)(slow.H_melting / normal.H_melting), (double)CFMToKm(slow.onset), (double)CFMToKm(normal.onset)));
  ck_assert_msg(normal.H_melting > 1.0e3, "only %g m of crust at 60 mm/yr", (double)normal.H_melting);
  ck_assert_msg(slow.H_melting < 0.75 * normal.H_melting, "crust at 10 mm/yr (%.3f km) is not below 0.75 times that at 60 mm/yr (%.3f km)", (double)CFMToKm(slow.H_melting), (double)CFMToKm(normal.H_melting));
}
END_TEST

/* Crust increases with potential temperature, 1300 < 1350 < 1400 C: hotter mantle crosses its
   solidus deeper and melts more (McKenzie & Bickle 1988, J. Petrology 29, from memory); with the
   Katz et al. (2003) coefficients an isentropic column starts at 2.08 / 2.66 / 3.29 GPa and reaches
   F = 0.185 / 0.236 / 0.287 (derived).  Each onset is also within two cells of its adiabat's
   solidus crossing (as in test_melt_normal_crust).  4 km spacing: a trend (against 2 km, 4 km
   changes the crust by 4.3 % at most: 2.905 vs 3.036 km at 1300 C; the steps are 68 % or more). */
START_TEST(test_melt_potential_temperature)
{
  const PetscReal Tp_C[] = {1300.0, 1350.0, 1400.0};
  MeltResult      r[3];

  for (int k = 0; k < 3; k++) r[k] = Solve(60.0, Tp_C[k], 0.0, 4.0);
  CK_PETSC(PetscPrintf(PETSC_COMM_WORLD, "melt potential temperature: crust %.3f / %.3f / %.3f km, axis onset %.1f / %.1f / %.1f km at Tp 1300 / 1350 / 1400 C\n", (double)CFMToKm(r[0].H_melting), (double)CFMToKm(r[1].H_melting), (double)CFMToKm(r[2].H_melting), (double)CFMToKm(r[0].onset), (double)CFMToKm(r[1].onset), (double)CFMToKm(r[2].onset)));
  ck_assert_msg(r[0].H_melting > 0.0, "no crust at Tp 1300 C");
  for (int k = 0; k < 3; k++) ck_assert_msg(PetscAbsReal(r[k].onset - r[k].crossing) <= 2.0 * r[k].dz, "Tp %g C: melting starts at %.2f km at the axis, the adiabat meets the solidus at %.2f km", (double)Tp_C[k], (double)CFMToKm(r[k].onset), (double)CFMToKm(r[k].crossing));
  for (int k = 0; k < 2; k++) ck_assert_msg(r[k + 1].H_melting > r[k].H_melting, "crust at Tp %g C (%.3f km) is not thicker than at %g C (%.3f km)", (double)Tp_C[k + 1], (double)CFMToKm(r[k + 1].H_melting), (double)Tp_C[k], (double)CFMToKm(r[k].H_melting));
}
END_TEST

/* ---------- 6. water ---------- */

/* 200 ppm bulk water against dry at Tp 1350 C, 60 mm/yr: dissolved water lowers the solidus
   (dT = K X^gamma, Katz, Spiegelman & Langmuir 2003, eq. 16, from memory), so melting starts
   deeper and the column makes more melt (Katz et al. 2003, hydrous melting columns, from memory).
   The wet onset is also within two cells of where the adiabat meets the hydrous solidus of the
   model (derived, as in test_melt_normal_crust).  4 km spacing: a trend (wet crust 6.911 km at
   4 km vs 7.063 km at 2 km, dry 5.696 vs 5.848; the step is 21 %). */
START_TEST(test_melt_water)
{
  const MeltResult dry = Solve(60.0, 1350.0, 0.0, 4.0), wet = Solve(60.0, 1350.0, 200.0, 4.0);

  CK_PETSC(PetscPrintf(PETSC_COMM_WORLD, "melt water: onset %.1f km wet (hydrous solidus crossing %.2f km), %.1f km dry; crust %.3f km wet, %.3f km dry\n", (double)CFMToKm(wet.onset), (double)CFMToKm(wet.crossing), (double)CFMToKm(dry.onset), (double)CFMToKm(wet.H_melting), (double)CFMToKm(dry.H_melting)));
  ck_assert_msg(dry.onset > 0.0, "no melting at the axis in the dry case");
  ck_assert_msg(wet.onset > dry.onset, "the wet onset (%.2f km) is not deeper than the dry one (%.2f km)", (double)CFMToKm(wet.onset), (double)CFMToKm(dry.onset));
  ck_assert_msg(PetscAbsReal(wet.onset - wet.crossing) <= 2.0 * wet.dz, "wet: melting starts at %.2f km at the axis, the adiabat meets the hydrous solidus at %.2f km", (double)CFMToKm(wet.onset), (double)CFMToKm(wet.crossing));
  ck_assert_msg(wet.H_melting > dry.H_melting, "wet crust %.3f km is not thicker than dry crust %.3f km", (double)CFMToKm(wet.H_melting), (double)CFMToKm(dry.H_melting));
}
END_TEST

/* ---------- 7. MPI ranks ---------- */

/* Wait for a broadcast from rank 0 without spinning, so that rank 0, solving alone, keeps a core. */
static void WaitForRankZero(PetscReal *buf, int n, MPI_Comm comm)
{
  MPI_Request req;
  int         done = 0;

  CK_PETSC(MPI_Ibcast(buf, n, MPIU_REAL, 0, comm, &req));
  while (!done) {
    CK_PETSC(MPI_Test(&req, &done, MPI_STATUS_IGNORE));
    if (!done) CK_PETSC(PetscSleep(0.01));
  }
}

/* The same crust on all ranks of PETSC_COMM_WORLD as on rank 0 alone, to 1e-9 relative: results
   must not depend on the rank count (DESIGN 4 and 5.7; the expected value is the same problem on
   one rank, not a published number).  Run by ctest on 1 and 2 ranks.  Newton to 1e-10 K so that
   the tolerance does not decide the comparison; 4 km spacing (the decomposition, not the
   resolution, is under test). */
START_TEST(test_melt_ranks)
{
  const MeltCase mc = {60.0, 1350.0, 0.0, 4.0, PETSC_TRUE};
  MeltResult     serial, parallel;
  PetscReal      H1[2] = {0.0, 0.0};
  PetscMPIInt    rank, size;
  MPI_Comm       alone;

  CK_PETSC(MPI_Comm_rank(PETSC_COMM_WORLD, &rank));
  CK_PETSC(MPI_Comm_size(PETSC_COMM_WORLD, &size));
  CK_PETSC(MPI_Comm_split(PETSC_COMM_WORLD, rank ? MPI_UNDEFINED : 0, 0, &alone));
  if (!rank) {
    CK_PETSC(SolveCase(alone, &mc, &serial));
    H1[0] = serial.H_melting;
    H1[1] = serial.H_side;
    CK_PETSC(MPI_Comm_free(&alone));
  }
  WaitForRankZero(H1, 2, PETSC_COMM_WORLD);
  CK_PETSC(SolveCase(PETSC_COMM_WORLD, &mc, &parallel));
  CK_PETSC(PetscPrintf(PETSC_COMM_WORLD, "melt ranks: crust %.12e m on 1 rank, %.12e m on %d rank(s), rel. diff %.2e (melting), %.2e (side flux)\n", (double)H1[0], (double)parallel.H_melting, (int)size, (double)(PetscAbsReal(parallel.H_melting - H1[0]) / H1[0]), (double)(PetscAbsReal(parallel.H_side - H1[1]) / H1[1])));
  ck_assert_msg(H1[0] > 1.0e3, "only %g m of crust: the check would compare nothing", (double)H1[0]);
  cf_assert_close(parallel.H_melting, H1[0], 1e-9);
  cf_assert_close(parallel.H_side, H1[1], 1e-9);
}
END_TEST

static Suite *MeltModelSuite(void)
{
  Suite *s = suite_create("melt_model");
  cf_add_case(s, "conservation", test_melt_conservation);
  cf_add_case(s, "normal_crust", test_melt_normal_crust);
  cf_add_case(s, "slow_spreading", test_melt_slow_spreading);
  cf_add_case(s, "potential_temperature", test_melt_potential_temperature);
  cf_add_case(s, "water", test_melt_water);
  cf_add_case(s, "ranks", test_melt_ranks);
  return s;
}

CF_TEST_MAIN(MeltModelSuite)
