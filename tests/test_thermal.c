/* Check suite for the steady temperature solver (src/thermal) in verification cases whose answers
   are known outside the code: a manufactured solution (observed order of accuracy), a sharp
   front (no new extrema), half-space cooling (Turcotte & Schubert, Geodynamics, 4.15-4.16) and
   the adiabat (DESIGN 2.2).  Serial; the rank-count check is test_thermal_ranks.c.
   Every scenario is invented (a fictional ridge segment). */
#include <math.h>
#include <crustforge/flow.h>
#include <crustforge/steady.h>
#include <crustforge/units.h>
#include "cf_test.h"
#include "cf_scenario.h"

/* Thermal-only scenario: defaults, then the given box, spacing and rate; no adiabat, no melting
   or latent heat, no hydrothermal cooling (each test switches back on what it needs). */
static void ThermalConfig(CFConfig *cfg, PetscReal width, PetscReal depth, PetscReal spacing, PetscReal full_rate_mm_yr)
{
  CK_PETSC(CFConfigSetDefaults(cfg));
  cfg->width                     = width;
  cfg->depth                     = depth;
  cfg->spacing                   = spacing;
  cfg->full_spreading_rate_mm_yr = full_rate_mm_yr;
  cfg->nusselt                   = 1.0;
  CFScenarioNoAdiabat(cfg);
  CK_PETSC(CFScenarioNoMelting(cfg));
  CFScenarioFinish(cfg);
}

/* Solve cfg with optional conductivity and source hooks and optional extra PETSc options (NULL
   terminated name/value pairs, set only while the solver reads them); T on rank 0. */
static void Run(const CFConfig *cfg, CFPointFunction k, void *kctx, CFPointFunction src, void *sctx, const char *const *opts, Vec *T, CFSolveReport *rep)
{
  CFSteady s = NULL;

  for (const char *const *o = opts; o && o[0]; o += 2) CK_PETSC(PetscOptionsSetValue(NULL, o[0], o[1]));
  CK_PETSC(CFSteadyCreate(PETSC_COMM_WORLD, cfg, &s));
  for (const char *const *o = opts; o && o[0]; o += 2) CK_PETSC(PetscOptionsClearValue(NULL, o[0]));
  CK_PETSC(CFSteadySetConductivityFunction(s, k, kctx));
  CK_PETSC(CFSteadySetHeatSource(s, src, sctx));
  CK_PETSC(CFScenarioSolve(s, rep));
  CK_PETSC(CFScenarioGatherTemperature(s, T));
  CK_PETSC(CFSteadyDestroy(&s));
}

/* ---------- a. manufactured solution ---------- */

/* T = Ts + (Tb - Ts) z/D + A cos(pi x/L) sin(pi z/D) meets every boundary condition of the
   solver (T = Ts on top, Tb at the bottom, dT/dx = 0 at the axis and the far side); with
   A pi < Tb - Ts it is monotone in both directions, so the limiter never meets an interior
   extremum.  k = k0 (1 + 0.3 (x/L)^2 + 0.2 z/D), smooth. */
typedef struct {
  PetscReal L, D, Ts, Tb, A, k0, rho_cp;
  CFFlow    flow;
} MMS;

static PetscReal MMSTemperature(const MMS *m, PetscReal x, PetscReal z) { return m->Ts + (m->Tb - m->Ts) * z / m->D + m->A * cos(PETSC_PI * x / m->L) * sin(PETSC_PI * z / m->D); }

static PetscReal MMSConductivity(PetscReal x, PetscReal z, PetscReal T, void *ctx)
{
  const MMS *m = (const MMS *)ctx;
  (void)T;
  return m->k0 * (1.0 + 0.3 * (x / m->L) * (x / m->L) + 0.2 * z / m->D);
}

/* S = rho cp v.grad T - div(k grad T), by hand (z down, w_down = -w_up; div v = 0). */
static PetscReal MMSSource(PetscReal x, PetscReal z, PetscReal T, void *ctx)
{
  const MMS      *m  = (const MMS *)ctx;
  const PetscReal ax = PETSC_PI / m->L, az = PETSC_PI / m->D, cx = cos(ax * x), sx = sin(ax * x), cz = cos(az * z), sz = sin(az * z);
  const PetscReal Tx = -m->A * ax * sx * sz, Tz = (m->Tb - m->Ts) / m->D + m->A * az * cx * cz;
  const PetscReal lapT = -m->A * (ax * ax + az * az) * cx * sz;
  const PetscReal k = MMSConductivity(x, z, T, ctx), kx = m->k0 * 0.6 * x / (m->L * m->L), kz = m->k0 * 0.2 / m->D;
  PetscReal       u, w_up;

  CFFlowVelocity(m->flow, x, z, &u, &w_up);
  return m->rho_cp * (u * Tx - w_up * Tz) - (kx * Tx + kz * Tz + k * lapT);
}

/* Method of manufactured solutions (Roache 2002, J. Fluids Eng. 124, 4; Salari & Knupp 2000,
   Sandia report SAND2000-1444; from memory): the corner flow at 60 mm/yr through a 100 x 50 km
   box, variable conductivity, the source of MMSSource; the cell-centre error in the L2 norm on
   16x8 ... 128x64 cells (cell Peclet number U0 dx / kappa0 5.9 down to 0.74) must fall at an
   observed order >= 1.8 between successive grids, the second-order design accuracy (DESIGN 2.2,
   5.2). */
START_TEST(test_thermal_manufactured_order)
{
  const PetscInt    ns[] = {16, 32, 64, 128};
  const char *const opts[] = {"-snes_rtol", "1e-10", NULL}; /* solver error far below the discretization error */
  PetscReal         err[4];

  for (int g = 0; g < 4; g++) {
    CFConfig      cfg;
    CFSolveReport rep;
    MMS           m;
    Vec           T;
    PetscScalar  *t;
    PetscReal     sum = 0.0;

    ThermalConfig(&cfg, 100.0e3, 50.0e3, 100.0e3 / ns[g], 60.0);
    cfg.surface_temperature   = CFCelsiusToKelvin(0.0);
    cfg.potential_temperature = CFCelsiusToKelvin(1300.0); /* with the adiabat off, the bottom value */
    m = (MMS){cfg.width, cfg.depth, cfg.surface_temperature, cfg.potential_temperature, 300.0, cfg.conductivity, cfg.mantle_density * cfg.heat_capacity, NULL};
    CK_PETSC(CFFlowCreate(&cfg, &m.flow));
    Run(&cfg, MMSConductivity, &m, MMSSource, &m, opts, &T, &rep);
    CK_PETSC(VecGetArray(T, &t));
    for (PetscInt j = 0; j < cfg.nz; j++)
      for (PetscInt i = 0; i < cfg.nx; i++) {
        const PetscReal e = PetscRealPart(t[j * cfg.nx + i]) - MMSTemperature(&m, (i + 0.5) * cfg.dx, (j + 0.5) * cfg.dz);
        sum += e * e;
      }
    CK_PETSC(VecRestoreArray(T, &t));
    CK_PETSC(VecDestroy(&T));
    CK_PETSC(CFFlowDestroy(&m.flow));
    err[g] = PetscSqrtReal(sum / (cfg.nx * cfg.nz));
    printf("thermal MMS: %3d x %3d cells, Peclet %.2f, L2 error %.4e K%s", (int)cfg.nx, (int)cfg.nz, (double)(cfg.half_rate * cfg.dx * m.rho_cp / m.k0), (double)err[g], g ? "" : "\n");
    if (g) printf(", order %.3f\n", (double)log2(err[g - 1] / err[g]));
    printf("             Newton %d, linear %d, residual %.1e K, %.2f s\n", (int)rep.nonlinear_iterations, (int)rep.linear_iterations, (double)rep.final_residual, (double)rep.seconds);
  }
  for (int g = 1; g < 4; g++) ck_assert_msg(log2(err[g - 1] / err[g]) >= 1.8, "observed order %g between grids %d and %d is below 1.8 (errors %g, %g K)", (double)log2(err[g - 1] / err[g]), g - 1, g, (double)err[g - 1], (double)err[g]);
}
END_TEST

/* ---------- b. sharp front ---------- */

/* Pure advection (k = 1e-6 W/m/K: cell Peclet number about 1e4 x 1e3) with a cooling box:
   inside 10 km < x < 40 km, 25 km < z < 45 km the source S = -lambda rho cp (T - Ts) relaxes the
   mantle towards the surface value (lambda t of order 100 for material crossing the box), so the
   streamlines through the box carry a cold band to the far side, bounded above and below by
   fronts a small fraction of a cell wide.  The source only pulls T towards Ts, inside
   [Ts, Tb]: the exact solution stays within the boundary values. */
typedef struct {
  PetscReal Ts, lambda_rho_cp;
} Front;

static PetscReal FrontConductivity(PetscReal x, PetscReal z, PetscReal T, void *ctx)
{
  (void)x;
  (void)z;
  (void)T;
  (void)ctx;
  return 1.0e-6;
}

static PetscReal FrontSource(PetscReal x, PetscReal z, PetscReal T, void *ctx)
{
  const Front *f = (const Front *)ctx;
  if (x < 10.0e3 || x > 40.0e3 || z < 25.0e3 || z > 45.0e3) return 0.0;
  return -f->lambda_rho_cp * (T - f->Ts);
}

/* No new extrema (DESIGN 2.2, 5.2): by the maximum principle of advection-diffusion with a
   relaxing source (e.g. Hundsdorfer & Verwer 2003, Numerical Solution of Time-Dependent
   Advection-Diffusion-Reaction Equations, Springer; from memory) every cell temperature must lie
   within [Ts, Tb], the boundary values, to 1e-10 K, although two fronts cross the domain; and
   the column at x = 80 km, which crosses the band once, must fall monotonically to one minimum
   and rise monotonically after it (to 1e-10 K), with no wiggle at either front.  The case is
   checked to have its fronts: that column holds the cold band (T < Ts + 10 %) and at most 3 cells
   per front in the 10-90 % range (a limited scheme resolves a discontinuity in a few cells:
   LeVeque 2002, Finite Volume Methods for Hyperbolic Problems, ch. 6, from memory).  The exact
   coloured Jacobian is factored (-steady_jacobian coloring) because the stiff source is not in
   the default preconditioner. */
START_TEST(test_thermal_front_bounded)
{
  const char *const opts[] = {"-steady_jacobian", "coloring", "-snes_rtol", "1e-14", "-snes_atol", "1e-12", NULL};
  CFConfig          cfg;
  CFSolveReport     rep;
  Front             f;
  Vec               T;
  PetscScalar      *t;
  PetscReal         Tmin = PETSC_MAX_REAL, Tmax = -PETSC_MAX_REAL, dT, wiggle = 0.0;
  PetscInt          ncold = 0, nfront = 0, i80, jmin = 0;

  ThermalConfig(&cfg, 100.0e3, 50.0e3, 2.0e3, 150.0);
  f   = (Front){cfg.surface_temperature, 1.0e-12 * cfg.mantle_density * cfg.heat_capacity};
  dT  = cfg.potential_temperature - cfg.surface_temperature;
  i80 = (PetscInt)(80.0e3 / cfg.dx);
  Run(&cfg, FrontConductivity, NULL, FrontSource, &f, opts, &T, &rep);
  CK_PETSC(VecGetArray(T, &t));
  for (PetscInt j = 0; j < cfg.nz; j++)
    for (PetscInt i = 0; i < cfg.nx; i++) {
      const PetscReal v = PetscRealPart(t[j * cfg.nx + i]);
      Tmin = PetscMin(Tmin, v);
      Tmax = PetscMax(Tmax, v);
    }
  for (PetscInt j = 0; j < cfg.nz; j++) {
    const PetscReal v = PetscRealPart(t[j * cfg.nx + i80]);
    if (v < PetscRealPart(t[jmin * cfg.nx + i80])) jmin = j;
    if (v < cfg.surface_temperature + 0.1 * dT) ncold++;
    else if (v < cfg.potential_temperature - 0.1 * dT) nfront++;
  }
  for (PetscInt j = 0; j + 1 < cfg.nz; j++) { /* a rise above the minimum or a fall below it */
    const PetscReal step = PetscRealPart(t[(j + 1) * cfg.nx + i80] - t[j * cfg.nx + i80]);
    wiggle = PetscMax(wiggle, j < jmin ? step : -step);
  }
  CK_PETSC(VecRestoreArray(T, &t));
  CK_PETSC(VecDestroy(&T));
  printf("thermal front: T in [%.12f, %.12f] K, boundary values [%.2f, %.2f] K; at x = 80 km %d cold cells, %d front cells, largest wiggle %.2e K; Newton %d, %.2f s\n", (double)Tmin, (double)Tmax, (double)cfg.surface_temperature, (double)cfg.potential_temperature, (int)ncold, (int)nfront, (double)wiggle, (int)rep.nonlinear_iterations, (double)rep.seconds);
  ck_assert_msg(ncold > 0, "no cold band at x = 80 km: the case has no front");
  ck_assert_msg(nfront <= 6, "the fronts at x = 80 km are smeared over %d cells", (int)nfront);
  ck_assert_msg(Tmin >= cfg.surface_temperature - 1e-10, "undershoot: %.15g K below the surface value %.15g K", (double)Tmin, (double)cfg.surface_temperature);
  ck_assert_msg(Tmax <= cfg.potential_temperature + 1e-10, "overshoot: %.15g K above the bottom value %.15g K", (double)Tmax, (double)cfg.potential_temperature);
  ck_assert_msg(wiggle <= 1e-10, "the column at x = 80 km wiggles by %g K at a front", (double)wiggle);
}
END_TEST

/* ---------- c. half-space cooling ---------- */

/* Half-space cooling (Turcotte & Schubert, Geodynamics, 2nd ed., sections 4.15-4.16; seen in
   Wangen 2010, eqs. 7.157-7.161; REFERENCES.md): with the adiabat, latent heat and hydrothermal
   cooling off, 100 mm/yr full rate, Tm = 1350 C, 1000 x 150 km on a 2.5 km grid, surface heat
   flow at plate ages t = x / U0 of 2-20 Myr within 3 % of k (Tm - T0) / sqrt(pi kappa t), from
   the top three cells (CFScenarioSurfaceHeatFlow, third order), and the
   temperature profiles at 5 and 10 Myr within 2 % of (Tm - T0) of
   T0 + (Tm - T0) erf(z / (2 sqrt(kappa t))).  katz2003 depletes passively; with no latent heat
   it cannot change T. */
START_TEST(test_thermal_half_space)
{
  const PetscReal ages_myr[] = {2.0, 3.0, 5.0, 7.0, 10.0, 14.0, 20.0}, profile_myr[] = {5.0, 10.0};
  CFConfig        cfg;
  CFSolveReport   rep;
  Vec             T;
  PetscScalar    *t;
  PetscReal       kappa, dT, worst_q = 0.0, worst_T = 0.0;

  ThermalConfig(&cfg, 1000.0e3, 150.0e3, 2.5e3, 100.0);
  {
    const CFMeltingType *mt = CFMeltingTypeFind("katz2003");
    ck_assert_ptr_nonnull(mt);
    CK_PETSC(PetscStrncpy(cfg.melting_model, "katz2003", sizeof(cfg.melting_model)));
    cfg.melting_nparams = mt->nparams;
    for (PetscInt p = 0; p < mt->nparams; p++) cfg.melting_params[p] = mt->params[p].value;
  }
  kappa = cfg.conductivity / (cfg.mantle_density * cfg.heat_capacity);
  dT    = cfg.potential_temperature - cfg.surface_temperature;
  Run(&cfg, NULL, NULL, NULL, NULL, NULL, &T, &rep);
  CK_PETSC(VecGetArray(T, &t));
  for (size_t a = 0; a < sizeof(ages_myr) / sizeof(ages_myr[0]); a++) {
    const PetscInt  i   = PetscMin(cfg.nx - 1, (PetscInt)PetscFloorReal(cfg.half_rate * CFMyrToS(ages_myr[a]) / cfg.dx));
    const PetscReal age = (i + 0.5) * cfg.dx / cfg.half_rate, q = CFScenarioSurfaceHeatFlow(&cfg, t, i);
    const PetscReal qref = cfg.conductivity * dT / PetscSqrtReal(PETSC_PI * kappa * age), dev = q / qref - 1.0;
    printf("thermal half-space: age %6.3f Myr  q %.2f mW/m2  half-space %.2f mW/m2  deviation %+.2f %%\n", (double)CFSToMyr(age), (double)(1e3 * q), (double)(1e3 * qref), (double)(100.0 * dev));
    worst_q = PetscMax(worst_q, PetscAbsReal(dev));
  }
  for (size_t a = 0; a < sizeof(profile_myr) / sizeof(profile_myr[0]); a++) {
    const PetscInt  i   = (PetscInt)PetscFloorReal(cfg.half_rate * CFMyrToS(profile_myr[a]) / cfg.dx);
    const PetscReal age = (i + 0.5) * cfg.dx / cfg.half_rate;
    PetscReal       dev = 0.0;
    for (PetscInt j = 0; j < cfg.nz; j++) {
      const PetscReal z = (j + 0.5) * cfg.dz, Tref = cfg.surface_temperature + dT * erf(z / (2.0 * PetscSqrtReal(kappa * age)));
      dev = PetscMax(dev, PetscAbsReal(PetscRealPart(t[j * cfg.nx + i]) - Tref) / dT);
    }
    printf("thermal half-space: profile at %6.3f Myr, largest deviation %.3f %% of Tm - T0\n", (double)CFSToMyr(age), (double)(100.0 * dev));
    worst_T = PetscMax(worst_T, dev);
  }
  CK_PETSC(VecRestoreArray(T, &t));
  CK_PETSC(VecDestroy(&T));
  printf("thermal half-space: %d x %d cells, Newton %d, linear %d, %.2f s\n", (int)cfg.nx, (int)cfg.nz, (int)rep.nonlinear_iterations, (int)rep.linear_iterations, (double)rep.seconds);
  ck_assert_msg(worst_q <= 0.03, "surface heat flow deviates %.2f %% from half-space cooling (3 %% allowed)", (double)(100.0 * worst_q));
  ck_assert_msg(worst_T <= 0.02, "temperature profile deviates %.2f %% of Tm - T0 from the error function (2 %% allowed)", (double)(100.0 * worst_T));
}
END_TEST

/* ---------- d. adiabat ---------- */

/* The adiabat (DESIGN 2.2): the term rho cp Gamma_ad w_down makes pure advection keep
   T = Tp + Gamma_ad z.  At 150 mm/yr with the smallest allowed conductivity (0.5 W/m/K) and no
   latent heat, the axial column well below the thermal boundary layer (depths 30-100 km; the layer
   is about kappa / w = 0.1 km thick there, inside the top 4 km cell) must follow Tp + Gamma_ad z,
   with the default gradient alpha g Tp / cp (Turcotte & Schubert, adiabatic compression), within
   1e-3 K.  (The unresolved layer disturbs the cells below it by a signal that alternates in sign
   and shrinks about fivefold per cell downward: 1e-3 K at 22 km, 4e-5 K at 30 km.) */
START_TEST(test_thermal_adiabat)
{
  const char *const opts[] = {"-snes_rtol", "1e-10", NULL}; /* solver error far below the tolerance */
  CFConfig          cfg;
  CFSolveReport     rep;
  Vec               T;
  PetscScalar      *t;
  PetscReal         dev = 0.0;

  ThermalConfig(&cfg, 200.0e3, 100.0e3, 4.0e3, 150.0);
  cfg.conductivity           = 0.5;
  cfg.adiabatic_gradient_set = PETSC_FALSE;
  CFScenarioFinish(&cfg);
  Run(&cfg, NULL, NULL, NULL, NULL, opts, &T, &rep);
  CK_PETSC(VecGetArray(T, &t));
  for (PetscInt j = 0; j < cfg.nz; j++) {
    const PetscReal z = (j + 0.5) * cfg.dz;
    if (z < 30.0e3) continue;
    dev = PetscMax(dev, PetscAbsReal(PetscRealPart(t[j * cfg.nx]) - (cfg.potential_temperature + cfg.adiabatic_gradient * z)));
  }
  CK_PETSC(VecRestoreArray(T, &t));
  CK_PETSC(VecDestroy(&T));
  printf("thermal adiabat: gradient %.4f K/km, axial deviation below 30 km %.3e K; Newton %d, %.2f s\n", (double)(1e3 * cfg.adiabatic_gradient), (double)dev, (int)rep.nonlinear_iterations, (double)rep.seconds);
  ck_assert_msg(cfg.adiabatic_gradient > 4e-4, "the derived adiabatic gradient %g K/m is not switched on", (double)cfg.adiabatic_gradient);
  ck_assert_msg(dev <= 1e-3, "the axial temperature departs %g K from the adiabat", (double)dev);
}
END_TEST

static Suite *ThermalSuite(void)
{
  Suite *s = suite_create("thermal");
  cf_add_case(s, "manufactured", test_thermal_manufactured_order);
  cf_add_case(s, "front", test_thermal_front_bounded);
  cf_add_case(s, "half_space", test_thermal_half_space);
  cf_add_case(s, "adiabat", test_thermal_adiabat);
  return s;
}

CF_TEST_MAIN(ThermalSuite)
