/* Check suite for the melting models (src/melting): katz2003 against Katz, Spiegelman &
   Langmuir (2003), G-cubed 4(9) 1073, and linear against hand-worked numbers.
   The expected values, and the published formulas used as references, are written out here
   independently of the model's source. */
#include <math.h>
#include <string.h>
#include <strings.h>
#include <ctype.h>
#include <omp.h>
#include <crustforge/config.h>
#include <crustforge/melting.h>
#include <crustforge/units.h>
#include "cf_test.h"

/* Katz, Spiegelman & Langmuir (2003) Table 2 (from memory, as in REFERENCES.md; A2, A3 agree
   with Hirschmann 2000, seen).  P in GPa, T in C, water in wt%. */
static const struct {
  double A1, A2, A3, B1, B2, B3, C1, C2, C3, r0, r1, beta1, beta2, Mcpx, K, gamma, D, chi1, chi2, lambda;
} KSL = {1085.7, 132.9, -5.1, 1475.0, 80.0, -3.2, 1780.0, 45.0, -2.0, 0.50, 0.08, 1.50, 1.50, 0.17, 43.0, 0.75, 0.01, 12.0, 1.0, 0.6};

/* ---------- references from the published formulas (Katz et al. 2003) ---------- */

static double RefQuad(double c0, double c1, double c2, double P) { return c0 + P * (c1 + P * c2); }
static double RefTs(double P) { return RefQuad(KSL.A1, KSL.A2, KSL.A3, P); }
static double RefTlz(double P) { return RefQuad(KSL.B1, KSL.B2, KSL.B3, P); }
static double RefTl(double P) { return RefQuad(KSL.C1, KSL.C2, KSL.C3, P); }
static double RefFc(double P) { return KSL.Mcpx / (KSL.r0 + KSL.r1 * P); }
static double RefTc(double P) { return pow(RefFc(P), 1.0 / KSL.beta1) * (RefTlz(P) - RefTs(P)) + RefTs(P); }

/* Anhydrous F (Katz et al. 2003, cpx and opx branches). */
static double RefDryF(double P, double T)
{
  const double Ts = RefTs(P), Tlz = RefTlz(P), Tl = RefTl(P), Fc = RefFc(P), Tc = RefTc(P);
  if (T <= Ts) return 0.0;
  if (T < Tc) return pow((T - Ts) / (Tlz - Ts), KSL.beta1);
  if (T < Tl) return PetscMin(1.0, Fc + (1.0 - Fc) * pow((T - Tc) / (Tl - Tc), KSL.beta2));
  return 1.0;
}

/* Water in the melt (wt%): batch partitioning, capped at saturation (Katz et al. 2003). */
static double RefMeltWater(double P, double bulk_wt, double F)
{
  const double X = bulk_wt / (KSL.D + F * (1.0 - KSL.D)), Xsat = KSL.chi1 * pow(P, KSL.lambda) + KSL.chi2 * P;
  return PetscMin(X, Xsat);
}

/* Residual of the hydrous equation F = F_dry(P, T + K X(F)^gamma) (Katz et al. 2003, eq. 16). */
static double RefHydrousResidual(double P, double T, double bulk_wt, double F) { return F - RefDryF(P, T + KSL.K * pow(RefMeltWater(P, bulk_wt, F), KSL.gamma)); }

/* ---------- helpers ---------- */

static CFMeltingModel NewModel(const char *name, double water_ppm)
{
  const CFMeltingType *t = CFMeltingTypeFind(name);
  CFConfig             cfg;
  CFMeltingModel       m = NULL;

  ck_assert_ptr_nonnull(t);
  ck_assert_int_eq(CFConfigSetDefaults(&cfg), 0);
  ck_assert_int_eq(PetscStrncpy(cfg.melting_model, name, sizeof(cfg.melting_model)), 0);
  cfg.melting_nparams = t->nparams;
  for (PetscInt i = 0; i < t->nparams; i++) cfg.melting_params[i] = t->params[i].value;
  cfg.water_ppm = water_ppm;
  ck_assert_int_eq(CFMeltingModelCreate(&cfg, &m), 0);
  return m;
}

static void FreeModel(CFMeltingModel *m) { ck_assert_int_eq(CFMeltingModelDestroy(m), 0); }

/* F and dF/dT at P (GPa), T (C). */
static double MeltF(CFMeltingModel m, double P_GPa, double T_C, double *dFdT)
{
  PetscReal F, d;
  ck_assert_int_eq(CFMeltingModelMeltFraction(m, CFGPaToPa(P_GPa), CFCelsiusToKelvin(T_C), &F, &d), 0);
  if (dFdT) *dFdT = d;
  return F;
}

static double SolidusC(CFMeltingModel m, double P_GPa)
{
  PetscReal T;
  ck_assert_int_eq(CFMeltingModelSolidus(m, CFGPaToPa(P_GPa), &T), 0);
  return CFKelvinToCelsius(T);
}

static double LiquidusC(CFMeltingModel m, double P_GPa)
{
  PetscReal T;
  ck_assert_int_eq(CFMeltingModelLiquidus(m, CFGPaToPa(P_GPa), &T), 0);
  return CFKelvinToCelsius(T);
}

/* ---------- katz2003, anhydrous ---------- */

/* The parameter table holds Katz et al. (2003) Table 2 (from memory), keys are option-safe
   (lower case, unique ignoring case since PETSc options are), and each default is in its range. */
START_TEST(test_katz_parameter_table)
{
  const CFMeltingType *t                  = CFMeltingTypeFind("katz2003");
  const char          *keys[]             = {"a1", "a2", "a3", "b1", "b2", "b3", "c1", "c2", "c3", "r0", "r1", "beta1", "beta2", "mcpx", "water_k", "water_gamma", "water_partition", "saturation_chi1", "saturation_chi2", "saturation_lambda"};
  const double         values[]           = {KSL.A1, KSL.A2, KSL.A3, KSL.B1, KSL.B2, KSL.B3, KSL.C1, KSL.C2, KSL.C3, KSL.r0, KSL.r1, KSL.beta1, KSL.beta2, KSL.Mcpx, KSL.K, KSL.gamma, KSL.D, KSL.chi1, KSL.chi2, KSL.lambda};
  const PetscInt       n                  = (PetscInt)(sizeof(keys) / sizeof(keys[0]));

  ck_assert_ptr_nonnull(t);
  ck_assert_str_eq(t->name, "katz2003");
  ck_assert_int_eq(t->nparams, n);
  ck_assert_int_le(t->nparams, CF_MELTING_MAX_PARAMS);
  for (PetscInt i = 0; i < n; i++) {
    const CFMeltingParamInfo *pi = &t->params[i];
    ck_assert_str_eq(pi->key, keys[i]);
    ck_assert_msg(pi->value == values[i], "%s = %g, Table 2 gives %g", pi->key, (double)pi->value, values[i]);
    ck_assert_msg(pi->lo <= pi->value && pi->value <= pi->hi, "%s default outside its range", pi->key);
    ck_assert_msg(pi->help && strstr(pi->help, "Katz"), "%s: help does not name its source", pi->key);
    ck_assert_ptr_nonnull(pi->unit);
    for (const char *s = pi->key; *s; s++) ck_assert_msg(islower((unsigned char)*s) || isdigit((unsigned char)*s) || *s == '_', "key %s is not option-safe", pi->key);
    for (PetscInt j = 0; j < i; j++) ck_assert_msg(strcasecmp(pi->key, t->params[j].key), "keys %s and %s clash", pi->key, t->params[j].key);
  }
}
END_TEST

/* Solidus, lherzolite liquidus and liquidus at 0, 1, 2 GPa: Katz et al. (2003) Table 2
   polynomials; the numbers are the derived table of REFERENCES.md.  Tlz is not an interface
   function: it is recovered from F below cpx exhaustion, F = ((T - Ts)/(Tlz - Ts))^beta1. */
START_TEST(test_katz_curves)
{
  const double   P[]   = {0.0, 1.0, 2.0};
  const double   Ts[]  = {1085.7, 1213.5, 1331.1}; /* derived */
  const double   Tlz[] = {1475.0, 1551.8, 1622.2}; /* derived */
  const double   Tl[]  = {1780.0, 1823.0, 1862.0}; /* derived */
  CFMeltingModel m     = NewModel("katz2003", 0.0);

  for (int i = 0; i < 3; i++) {
    const double ts = SolidusC(m, P[i]), T = ts + 50.0, F = MeltF(m, P[i], T, NULL);
    cf_assert_near(ts, Ts[i], 1e-9);
    cf_assert_near(LiquidusC(m, P[i]), Tl[i], 1e-9);
    cf_assert_near(ts + (T - ts) / pow(F, 1.0 / KSL.beta1), Tlz[i], 1e-9);
  }
  FreeModel(&m);
}
END_TEST

/* Clinopyroxene exhaustion: F_cpx_out = Mcpx/(r0 + r1 P) and T_cpx_out (derived values,
   REFERENCES.md: 0.3400/1275.34, 0.2931/1362.77, 0.2576/1448.95 C).  F is continuous there, and
   dF/dT drops to 0 just above it (beta2 > 1; derived from the Katz et al. 2003 formula). */
START_TEST(test_katz_cpx_exhaustion)
{
  const double   P[] = {0.0, 1.0, 2.0}, Fc[] = {0.3400, 0.2931, 0.2576}, Tc[] = {1275.34, 1362.77, 1448.95};
  CFMeltingModel m   = NewModel("katz2003", 0.0);

  for (int i = 0; i < 3; i++) {
    const double fc = RefFc(P[i]), tc = RefTc(P[i]), dT = 1e-7;
    double       dlo, dhi;
    cf_assert_near(fc, Fc[i], 5e-5);
    cf_assert_near(tc, Tc[i], 5e-3);
    cf_assert_near(MeltF(m, P[i], tc, NULL), fc, 1e-12);
    cf_assert_near(MeltF(m, P[i], tc - dT, &dlo), fc, 1e-9);
    cf_assert_near(MeltF(m, P[i], tc + dT, &dhi), fc, 1e-9);
    ck_assert_msg(dlo > 1e-3 && dhi < 1e-5, "dF/dT %g below and %g above cpx exhaustion", dlo, dhi);
    /* the printed T_cpx_out gives the printed F_cpx_out */
    cf_assert_near(MeltF(m, P[i], Tc[i], NULL), Fc[i], 5e-5);
  }
  FreeModel(&m);
}
END_TEST

/* F at the (P, T) points of REFERENCES.md (derived from the Katz et al. 2003 formulas), to the
   printed digits: two on the cpx branch, two on the opx branch. */
START_TEST(test_katz_melt_fraction_points)
{
  CFMeltingModel m = NewModel("katz2003", 0.0);

  cf_assert_near(MeltF(m, 1.0, 1250.0, NULL), 0.03544, 5e-6);
  cf_assert_near(MeltF(m, 1.0, 1300.0, NULL), 0.12929, 5e-6);
  cf_assert_near(MeltF(m, 1.0, 1400.0, NULL), 0.30937, 5e-6);
  cf_assert_near(MeltF(m, 2.0, 1400.0, NULL), 0.11515, 5e-6);
  FreeModel(&m);
}
END_TEST

/* F = 0 at and below the solidus, F = 1 at and above the liquidus, dF/dT = 0 outside
   (definition of solidus and liquidus, Katz et al. 2003); P < 0 is taken as P = 0. */
START_TEST(test_katz_limits)
{
  const double   P[] = {0.0, 0.5, 1.0, 3.0, 6.0};
  CFMeltingModel m   = NewModel("katz2003", 0.0);
  double         d;

  for (int i = 0; i < 5; i++) {
    const double ts = RefTs(P[i]), tl = RefTl(P[i]);
    ck_assert(MeltF(m, P[i], ts - 300.0, &d) == 0.0 && d == 0.0);
    ck_assert(MeltF(m, P[i], ts - 1e-6, &d) == 0.0 && d == 0.0);
    ck_assert(MeltF(m, P[i], ts + 1e-3, NULL) > 0.0);
    ck_assert(MeltF(m, P[i], tl - 1e-3, NULL) < 1.0);
    ck_assert(MeltF(m, P[i], tl + 1e-6, &d) == 1.0 && d == 0.0);
    ck_assert(MeltF(m, P[i], tl + 500.0, &d) == 1.0 && d == 0.0);
  }
  ck_assert(MeltF(m, -0.1, 1300.0, NULL) == MeltF(m, 0.0, 1300.0, NULL));
  cf_assert_near(SolidusC(m, -0.1), KSL.A1, 1e-9);
  FreeModel(&m);
}
END_TEST

/* F never decreases with T (a melting law, Katz et al. 2003): 0.05 C steps through the whole
   interval at several pressures, dry and with 200 ppm water. */
START_TEST(test_katz_monotone)
{
  const double P[] = {0.0, 0.3, 1.0, 2.0, 3.5, 5.0}, water[] = {0.0, 200.0};

  for (int w = 0; w < 2; w++) {
    CFMeltingModel m = NewModel("katz2003", water[w]);
    for (int i = 0; i < 6; i++) {
      const double T0 = SolidusC(m, P[i]) - 20.0, T1 = LiquidusC(m, P[i]) + 20.0;
      double       Fprev = -1.0;
      for (double T = T0; T <= T1; T += 0.05) {
        const double F = MeltF(m, P[i], T, NULL);
        ck_assert_msg(F >= Fprev && F >= 0.0 && F <= 1.0, "F = %.17g after %.17g at P %g GPa, T %g C, water %g ppm", F, Fprev, P[i], T, water[w]);
        Fprev = F;
      }
      ck_assert(Fprev == 1.0);
    }
    FreeModel(&m);
  }
}
END_TEST

/* dF/dT against a centred difference (h = 0.01 K) away from the kinks: dry, and hydrous where
   dF/dT comes from implicit differentiation (derived from Katz et al. 2003).  Points where the
   two one-sided differences disagree straddle a kink (cpx exhaustion, saturation) and are
   skipped; they must be few. */
START_TEST(test_katz_derivative)
{
  const double P[] = {0.5, 1.0, 2.0, 3.0}, water[] = {0.0, 100.0, 1000.0}, h = 1e-2;
  int          checked = 0, skipped = 0;

  for (int w = 0; w < 3; w++) {
    CFMeltingModel m = NewModel("katz2003", water[w]);
    for (int i = 0; i < 4; i++) {
      const double T0 = SolidusC(m, P[i]) + 5.0, T1 = LiquidusC(m, P[i]) - 5.0;
      for (double T = T0; T <= T1; T += 7.0) {
        double       d;
        const double F = MeltF(m, P[i], T, &d), Fm = MeltF(m, P[i], T - h, NULL), Fp = MeltF(m, P[i], T + h, NULL);
        const double left = (F - Fm) / h, right = (Fp - F) / h, centred = (Fp - Fm) / (2.0 * h);
        if (PetscAbsReal(left - right) > 1e-3 * PetscAbsReal(centred) + 1e-9) {
          skipped++;
          continue;
        }
        ck_assert_msg(PetscAbsReal(d - centred) <= 1e-5 * PetscAbsReal(centred) + 1e-9, "dF/dT = %.12g, centred difference %.12g at P %g GPa, T %g C, water %g ppm", d, centred, P[i], T, water[w]);
        checked++;
      }
    }
    FreeModel(&m);
  }
  ck_assert_msg(checked > 500 && skipped <= checked / 20, "%d points checked, %d skipped", checked, skipped);
}
END_TEST

/* A parameter set whose lherzolite liquidus lies below the solidus has no melting law: the
   model says so (non-zero, NaN) instead of guessing (Katz et al. 2003 need Ts < Tlz < Tl). */
START_TEST(test_katz_bad_parameters)
{
  const CFMeltingType *t = CFMeltingTypeFind("katz2003");
  PetscReal            p[CF_MELTING_MAX_PARAMS], F = 0.0, d = 0.0;

  for (PetscInt i = 0; i < t->nparams; i++) p[i] = t->params[i].value;
  for (PetscInt i = 0; i < t->nparams; i++)
    if (!strcmp(t->params[i].key, "b1")) p[i] = 1100.0; /* at 1 GPa Tlz = 1176.8 C < Ts = 1213.5 C */
  ck_assert_int_ne(t->melt_fraction(p, CFGPaToPa(1.0), CFCelsiusToKelvin(1300.0), 0.0, &F, &d), 0);
  ck_assert(isnan(F) && isnan(d));
}
END_TEST

/* ---------- katz2003, hydrous ---------- */

/* Eq. 16 of Katz et al. (2003), dT = K X^gamma with K = 43 C: 1 wt% water in the melt lowers
   the solidus by 43 C.  100 ppm bulk = 0.01 wt% gives X = 0.01/D = 1 wt% in the first melt
   (D = 0.01, REFERENCES.md, derived), so the hydrous solidus is 43 C below the dry one where
   the melt is far from saturation.  The liquidus (all water in the melt, X = 0.01 wt%) drops by
   K 0.01^gamma = 1.3598 C (derived). */
START_TEST(test_hydrous_depression)
{
  const double   P[] = {0.5, 1.0, 2.0, 3.0};
  CFMeltingModel dry = NewModel("katz2003", 0.0), wet = NewModel("katz2003", 100.0);

  cf_assert_near(CFPpmToWtPercent(100.0) / KSL.D, 1.0, 1e-14);
  for (int i = 0; i < 4; i++) {
    cf_assert_near(SolidusC(dry, P[i]) - SolidusC(wet, P[i]), 43.0, 1e-9);
    cf_assert_near(LiquidusC(dry, P[i]) - LiquidusC(wet, P[i]), 43.0 * pow(0.01, 0.75), 1e-9);
    /* melting starts at the hydrous solidus and reaches F = 1 at the hydrous liquidus */
    ck_assert(MeltF(wet, P[i], SolidusC(wet, P[i]) - 1e-6, NULL) == 0.0);
    ck_assert(MeltF(wet, P[i], SolidusC(wet, P[i]) + 1e-3, NULL) > 0.0);
    ck_assert(MeltF(wet, P[i], SolidusC(dry, P[i]), NULL) > 0.0);
    ck_assert(MeltF(wet, P[i], LiquidusC(wet, P[i]) - 1e-3, NULL) < 1.0);
    ck_assert(MeltF(wet, P[i], LiquidusC(wet, P[i]) + 1e-9, NULL) == 1.0);
    /* water only adds melt (Katz et al. 2003, the depression is positive) */
    ck_assert(MeltF(wet, P[i], 1400.0, NULL) >= MeltF(dry, P[i], 1400.0, NULL));
  }
  FreeModel(&dry);
  FreeModel(&wet);
}
END_TEST

/* Saturation cap (Katz et al. 2003, X_sat = chi1 P^lambda + chi2 P): at 0.1 GPa the melt holds
   at most 12 0.1^0.6 + 0.1 = 3.1143 wt% (derived), less than the 20 wt% that 2000 ppm bulk
   would put in the first melt, so the depression is K X_sat^gamma = 100.806 C (derived), and
   while X(F) > X_sat (F < 0.0548 here) F is the dry F at T + K X_sat^gamma. */
START_TEST(test_hydrous_saturation)
{
  const double   P = 0.1, Xsat = KSL.chi1 * pow(P, KSL.lambda) + KSL.chi2 * P, dTsat = KSL.K * pow(Xsat, KSL.gamma);
  CFMeltingModel dry = NewModel("katz2003", 0.0), wet = NewModel("katz2003", 2000.0);
  const double   Ts_wet = SolidusC(wet, P);

  cf_assert_near(Xsat, 3.1143, 5e-5);
  cf_assert_near(dTsat, 100.806, 5e-4);
  cf_assert_near(SolidusC(dry, P) - Ts_wet, dTsat, 1e-9);
  for (double T = Ts_wet + 1.0; T < Ts_wet + 20.0; T += 3.0) {
    const double F = MeltF(wet, P, T, NULL);
    ck_assert(F > 0.0 && F < 0.05);
    cf_assert_near(F, RefDryF(P, T + dTsat), 1e-12);
  }
  /* at P = 0 nothing dissolves: any water gives the dry answer exactly */
  ck_assert(SolidusC(wet, 0.0) == SolidusC(dry, 0.0));
  ck_assert(MeltF(wet, 0.0, 1200.0, NULL) == MeltF(dry, 0.0, 1200.0, NULL));
  FreeModel(&dry);
  FreeModel(&wet);
}
END_TEST

/* Water 0 is the anhydrous law exactly, not a root-finder approximation of it: bit for bit
   equal to the Katz et al. (2003) formula evaluated in the same order.  A trace of water
   (1e-9 ppm, X = 1e-11 wt% in the first melt) adds at most dT0 * max dF/dT, with
   dT0 = K X^gamma = 2.4e-7 C and dF/dT < 0.01 per K for Table 2 (derived). */
START_TEST(test_hydrous_zero_water_exact)
{
  CFMeltingModel dry = NewModel("katz2003", 0.0), trace = NewModel("katz2003", 1e-9);
  const double   dT0 = KSL.K * pow(CFPpmToWtPercent(1e-9) / KSL.D, KSL.gamma);

  for (double P = 0.0; P <= 6.0; P += 0.25) {
    for (double T = 1000.0; T <= 2000.0; T += 2.5) {
      const double F   = MeltF(dry, P, T, NULL);
      const double ref = RefDryF(CFPaToGPa(CFGPaToPa(P)), CFKelvinToCelsius(CFCelsiusToKelvin(T)));
      ck_assert_msg(F == ref, "F = %.17g, formula %.17g at P %g GPa, T %g C", F, ref, P, T);
      const double Ftrace = MeltF(trace, P, T, NULL);
      ck_assert_msg(Ftrace >= F - 1e-12 && Ftrace <= F + 0.01 * dT0 + 1e-12, "trace water: F = %.17g, dry %.17g at P %g GPa, T %g C", Ftrace, F, P, T);
    }
  }
  FreeModel(&dry);
  FreeModel(&trace);
}
END_TEST

/* Pressure where the solidus meets an adiabat T = 1350 C + 12.4 C/GPa * P (0.4 K/km at
   30.3 km/GPa: common practice, no source), by bisection. */
static double SolidusAdiabatCrossing(CFMeltingModel m)
{
  double lo = 0.0, hi = 8.0; /* adiabat above the solidus at lo, below at hi */
  for (int it = 0; it < 60; it++) {
    const double mid = 0.5 * (lo + hi);
    if (1350.0 + 12.4 * mid > SolidusC(m, mid)) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/* More water starts melting deeper (Katz et al. 2003: the hydrous solidus lies below the dry
   one by K X^gamma): the crossing pressure grows with water; on the adiabat F is 0 just below
   (deeper than) the crossing and positive just above it. */
START_TEST(test_hydrous_melting_starts_deeper)
{
  const double water[] = {0.0, 50.0, 100.0, 200.0, 400.0};
  double       Pprev   = 0.0;

  for (int w = 0; w < 5; w++) {
    CFMeltingModel m = NewModel("katz2003", water[w]);
    const double   P = SolidusAdiabatCrossing(m);
    ck_assert_msg(P > Pprev + 0.1, "melting starts at %g GPa with %g ppm, at %g GPa with less", P, water[w], Pprev);
    ck_assert(MeltF(m, P + 0.01, 1350.0 + 12.4 * (P + 0.01), NULL) == 0.0);
    ck_assert(MeltF(m, P - 0.01, 1350.0 + 12.4 * (P - 0.01), NULL) > 0.0);
    Pprev = P;
    FreeModel(&m);
  }
}
END_TEST

/* The hydrous F solves the implicit Katz et al. (2003) equation F = F_dry(P, T + K X(F)^gamma)
   (eq. 16 with batch partitioning and saturation): residual below 1e-12 on a (P, T, water) grid,
   computed with the reference formulas of this file. */
START_TEST(test_hydrous_residual)
{
  const double P[] = {0.02, 0.1, 0.5, 1.0, 2.0, 3.0, 4.5, 6.0}, water[] = {1.0, 10.0, 100.0, 300.0, 1000.0, 5000.0};

  for (int w = 0; w < 6; w++) {
    CFMeltingModel m = NewModel("katz2003", water[w]);
    for (int i = 0; i < 8; i++) {
      for (double T = 900.0; T <= 2000.0; T += 3.7) {
        const double F = MeltF(m, P[i], T, NULL), g = RefHydrousResidual(P[i], CFKelvinToCelsius(CFCelsiusToKelvin(T)), CFPpmToWtPercent(water[w]), F);
        ck_assert_msg(PetscAbsReal(g) < 1e-12, "|g(F)| = %g at P %g GPa, T %g C, water %g ppm (F = %.15g)", g, P[i], T, water[w], F);
      }
    }
    FreeModel(&m);
  }
}
END_TEST

/* ---------- linear ---------- */

/* The verification model with its defaults, solidus 1100 + 130 P and liquidus 1500 + 130 P C
   (values by hand): at 1 GPa the solidus is 1230 C, the liquidus 1630 C, and at 1330 C
   F = (1330 - 1230)/400 = 0.25 with dF/dT = 1/400 per K; F = 0 below, 1 above. */
START_TEST(test_linear_by_hand)
{
  CFMeltingModel m = NewModel("linear", 100.0); /* water is ignored */
  double         d;

  cf_assert_near(SolidusC(m, 1.0), 1230.0, 1e-9);
  cf_assert_near(LiquidusC(m, 1.0), 1630.0, 1e-9);
  cf_assert_near(MeltF(m, 1.0, 1330.0, &d), 0.25, 1e-12);
  cf_assert_near(d, 1.0 / 400.0, 1e-15);
  cf_assert_near(MeltF(m, 2.0, 1460.0, NULL), 0.25, 1e-12); /* (1460 - 1360)/400 */
  cf_assert_near(MeltF(m, 0.0, 1400.0, NULL), 0.75, 1e-12); /* (1400 - 1100)/400 */
  ck_assert(MeltF(m, 1.0, 1229.0, &d) == 0.0 && d == 0.0);
  ck_assert(MeltF(m, 1.0, 1631.0, &d) == 1.0 && d == 0.0);
  FreeModel(&m);
}
END_TEST

/* ---------- array evaluation ---------- */

/* CFMeltingModelMeltFractionArray is the pointwise function applied per point, so 1 and 2
   OpenMP threads give identical bits (each point is independent: common practice, no source). */
START_TEST(test_array_threads)
{
  enum { N = 4000 };
  static PetscReal P[N], T[N], F1[N], D1[N], F2[N], D2[N];
  const int        saved = omp_get_max_threads();
  CFMeltingModel   m     = NewModel("katz2003", 150.0);

  for (int i = 0; i < N; i++) { /* a quasi-random spread over the melting region */
    P[i] = CFGPaToPa(6.0 * fmod(0.6180339887 * i, 1.0));
    T[i] = CFCelsiusToKelvin(1000.0 + 900.0 * fmod(0.4142135624 * i, 1.0));
  }
  omp_set_num_threads(1);
  ck_assert_int_eq(CFMeltingModelMeltFractionArray(m, N, P, T, F1, D1), 0);
  omp_set_num_threads(2);
  ck_assert_int_eq(CFMeltingModelMeltFractionArray(m, N, P, T, F2, D2), 0);
  omp_set_num_threads(saved);
  ck_assert(!memcmp(F1, F2, sizeof(F1)) && !memcmp(D1, D2, sizeof(D1)));
  for (int i = 0; i < N; i++) {
    PetscReal F, d;
    ck_assert_int_eq(CFMeltingModelMeltFraction(m, P[i], T[i], &F, &d), 0);
    ck_assert(F == F1[i] && d == D1[i]);
  }
  ck_assert_int_eq(CFMeltingModelMeltFractionArray(m, N, P, T, F2, NULL), 0); /* dF/dT optional */
  ck_assert(!memcmp(F1, F2, sizeof(F1)));
  FreeModel(&m);
}
END_TEST

/* Below its solidus every registered model gives exactly F = 0 and dF/dT = 0 (the definition of
   the solidus, Katz et al. 2003), down to CF_SOLIDUS_MARGIN under it: the steady solver skips
   colder cells on that contract.  Dry and wet, 0-8 GPa, with the models' defaults. */
START_TEST(test_cold_is_exactly_zero)
{
  const double water[] = {0.0, 300.0};

  for (PetscInt t = 0; t < CFMeltingTypeCount(); t++)
    for (int w = 0; w < 2; w++) {
      CFMeltingModel m = NewModel(CFMeltingTypeGet(t)->name, water[w]);
      for (int k = 0; k <= 40; k++) {
        const double P = 0.2 * k, Ts = SolidusC(m, P);
        double       d = 1.0;
        ck_assert_msg(MeltF(m, P, Ts - CF_SOLIDUS_MARGIN, &d) == 0.0 && d == 0.0, "%s, %g ppm: melt just below the solidus at %g GPa", CFMeltingTypeGet(t)->name, water[w], P);
        ck_assert(MeltF(m, P, Ts - 200.0, &d) == 0.0 && d == 0.0);
      }
      FreeModel(&m);
    }
}
END_TEST

static Suite *MeltingSuite(void)
{
  Suite *s     = suite_create("melting");
  TCase *katz  = tcase_create("katz2003");
  TCase *water = tcase_create("katz2003 hydrous");
  TCase *lin   = tcase_create("linear");
  TCase *arr   = tcase_create("array");

  tcase_add_test(katz, test_katz_parameter_table);
  tcase_add_test(katz, test_katz_curves);
  tcase_add_test(katz, test_katz_cpx_exhaustion);
  tcase_add_test(katz, test_katz_melt_fraction_points);
  tcase_add_test(katz, test_katz_limits);
  tcase_add_test(katz, test_katz_monotone);
  tcase_add_test(katz, test_katz_derivative);
  tcase_add_test(katz, test_katz_bad_parameters);
  tcase_add_test(water, test_hydrous_depression);
  tcase_add_test(water, test_hydrous_saturation);
  tcase_add_test(water, test_hydrous_zero_water_exact);
  tcase_add_test(water, test_hydrous_melting_starts_deeper);
  tcase_add_test(water, test_hydrous_residual);
  tcase_add_test(lin, test_linear_by_hand);
  tcase_add_test(arr, test_array_threads);
  tcase_add_test(arr, test_cold_is_exactly_zero);
  suite_add_tcase(s, katz);
  suite_add_tcase(s, water);
  suite_add_tcase(s, lin);
  suite_add_tcase(s, arr);
  return s;
}

CF_TEST_MAIN(MeltingSuite)
