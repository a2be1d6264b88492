/* Melting model "katz2003": Katz, Spiegelman & Langmuir (2003), G-cubed 4(9) 1073,
   doi:10.1029/2002GC000433.  Anhydrous lherzolite melting with clinopyroxene exhaustion, and
   the hydrous solidus depression with water partitioning and saturation.
   Inside this file the paper's units: P in GPa, T in C, water in wt%.

   Anhydrous:  Ts  = A1 + A2 P + A3 P^2  (solidus)
               Tlz = B1 + B2 P + B3 P^2  (lherzolite liquidus)
               Tl  = C1 + C2 P + C3 P^2  (liquidus)
               F   = ((T - Ts) / (Tlz - Ts))^beta1                          below cpx exhaustion
               Fc  = Mcpx / (r0 + r1 P),  Tc = Fc^(1/beta1) (Tlz - Ts) + Ts
               F   = Fc + (1 - Fc) ((T - Tc) / (Tl - Tc))^beta2               above it
   Hydrous:    all three curves lowered by dT = K X^gamma (eq. 16), X the water in the melt,
               X = X_bulk / (D + F (1 - D)) (batch), at most X_sat = chi1 P^lambda + chi2 P.
   So F_hydrous(P, T) = F_dry(P, T + dT(X(F))): implicit in F, solved with Brent's method. */
#include <math.h>
#include <crustforge/melting.h>
#include <crustforge/units.h>
#include "brent.h"

enum { A1, A2, A3, B1, B2, B3, C1, C2, C3, R0, R1, BETA1, BETA2, MCPX, WATER_K, WATER_GAMMA, WATER_D, CHI1, CHI2, LAMBDA, NPARAMS };

/* Published values: Katz, Spiegelman & Langmuir (2003), Table 2 (from memory; A2 and A3 agree
   with Hirschmann 2000, G-cubed 1, seen).  Ranges keep the curves usable: with r1 >= 0 and
   mcpx <= 0.4 < 0.45 <= r0, clinopyroxene runs out at Fc < 1. */
static const CFMeltingParamInfo params[NPARAMS] = {
  {"a1", "C", 1085.7, 900.0, 1300.0, "dry solidus at zero pressure, A1 (Katz et al. 2003 Table 2, from memory)"},
  {"a2", "C/GPa", 132.9, 0.0, 300.0, "dry solidus, linear pressure coefficient A2 (Katz et al. 2003 Table 2, from memory; Hirschmann 2000: 132.899)"},
  {"a3", "C/GPa^2", -5.1, -30.0, 10.0, "dry solidus, quadratic pressure coefficient A3 (Katz et al. 2003 Table 2, from memory; Hirschmann 2000: -5.104)"},
  {"b1", "C", 1475.0, 1100.0, 1800.0, "lherzolite liquidus at zero pressure, B1 (Katz et al. 2003 Table 2, from memory)"},
  {"b2", "C/GPa", 80.0, 0.0, 300.0, "lherzolite liquidus, linear pressure coefficient B2 (Katz et al. 2003 Table 2, from memory)"},
  {"b3", "C/GPa^2", -3.2, -30.0, 10.0, "lherzolite liquidus, quadratic pressure coefficient B3 (Katz et al. 2003 Table 2, from memory)"},
  {"c1", "C", 1780.0, 1400.0, 2200.0, "liquidus at zero pressure, C1 (Katz et al. 2003 Table 2, from memory)"},
  {"c2", "C/GPa", 45.0, 0.0, 300.0, "liquidus, linear pressure coefficient C2 (Katz et al. 2003 Table 2, from memory)"},
  {"c3", "C/GPa^2", -2.0, -30.0, 10.0, "liquidus, quadratic pressure coefficient C3 (Katz et al. 2003 Table 2, from memory)"},
  {"r0", "-", 0.50, 0.45, 1.5, "cpx reaction coefficient at zero pressure, r0 (Katz et al. 2003 Table 2, from memory)"},
  {"r1", "1/GPa", 0.08, 0.0, 0.3, "cpx reaction coefficient, pressure dependence r1 (Katz et al. 2003 Table 2, from memory)"},
  {"beta1", "-", 1.50, 1.0, 3.0, "melt fraction exponent before cpx exhaustion, beta1 (Katz et al. 2003 Table 2, from memory)"},
  {"beta2", "-", 1.50, 1.0, 3.0, "melt fraction exponent after cpx exhaustion, beta2 (Katz et al. 2003 Table 2, from memory)"},
  {"mcpx", "-", 0.17, 0.05, 0.4, "mass fraction of cpx in the source, Mcpx (Katz et al. 2003 Table 2, from memory; the least sure value)"},
  {"water_k", "C/wt%^gamma", 43.0, 0.0, 100.0, "solidus depression by dissolved water, K in dT = K X^gamma (Katz et al. 2003 eq. 16, Table 2, from memory)"},
  {"water_gamma", "-", 0.75, 0.3, 1.0, "exponent gamma of the solidus depression (Katz et al. 2003 Table 2, from memory)"},
  {"water_partition", "-", 0.01, 0.001, 0.1, "bulk partition coefficient of water, solid over melt, D_H2O (Katz et al. 2003 Table 2, from memory)"},
  {"saturation_chi1", "wt%/GPa^lambda", 12.0, 0.0, 30.0, "water saturation of the melt, chi1 in X_sat = chi1 P^lambda + chi2 P (Katz et al. 2003 Table 2, from memory)"},
  {"saturation_chi2", "wt%/GPa", 1.0, 0.0, 10.0, "water saturation of the melt, chi2 (Katz et al. 2003 Table 2, from memory)"},
  {"saturation_lambda", "-", 0.6, 0.3, 1.0, "water saturation of the melt, exponent lambda (Katz et al. 2003 Table 2, from memory)"},
};

/* Hydrous F to 1e-12 (KATZ_F_TOLERANCE): g(F) - F = -F_dry(T + dT(X(F))) never decreases with
   F (the slope of g is >= 1), so |g(F)| <= tol bounds the error in F by tol.  The root finder
   stops at a tenth of it, leaving room for round-off when g is evaluated elsewhere.  The bracket
   tolerance is only a floor near round-off; the cap on evaluations guards against a bug (Brent
   needs 4-20 here). */
#define KATZ_F_TOLERANCE       1.0e-12
#define KATZ_RESIDUAL_STOP     (0.1 * KATZ_F_TOLERANCE)
#define KATZ_BRACKET_TOLERANCE 1.0e-15
#define KATZ_MAX_EVALUATIONS   500

/* The anhydrous curves at one pressure (C). */
typedef struct {
  PetscReal Ts, Tlz, Tl; /* solidus, lherzolite liquidus, liquidus */
  PetscReal Fc, Tc;      /* melt fraction and temperature at cpx exhaustion */
} DryCurves;

/* Water at one pressure (wt%) and the depression law. */
typedef struct {
  PetscReal bulk, sat; /* bulk water; what the melt can hold */
  PetscReal D, K, gamma;
} Water;

static PetscReal Quadratic(PetscReal c0, PetscReal c1, PetscReal c2, PetscReal P_GPa) { return c0 + P_GPa * (c1 + P_GPa * c2); }

/* Non-zero when the parameters put the curves out of order at this pressure. */
static int DryCurvesAt(const PetscReal p[], PetscReal P_GPa, DryCurves *c)
{
  c->Ts  = Quadratic(p[A1], p[A2], p[A3], P_GPa);
  c->Tlz = Quadratic(p[B1], p[B2], p[B3], P_GPa);
  c->Tl  = Quadratic(p[C1], p[C2], p[C3], P_GPa);
  c->Fc  = p[MCPX] / (p[R0] + p[R1] * P_GPa);
  c->Tc  = pow(c->Fc, 1.0 / p[BETA1]) * (c->Tlz - c->Ts) + c->Ts;
  return (c->Tlz > c->Ts && c->Fc > 0.0 && c->Fc < 1.0 && c->Tl > c->Tc) ? 0 : 1;
}

/* Anhydrous F at T_C and dF/dT (1/C); one-sided (from above) at the kinks. */
static PetscReal DryMeltFraction(const PetscReal p[], const DryCurves *c, PetscReal T_C, PetscReal *dFdT)
{
  if (T_C <= c->Ts) {
    *dFdT = 0.0;
    return 0.0;
  }
  if (T_C < c->Tc) {
    const PetscReal w = c->Tlz - c->Ts, x = (T_C - c->Ts) / w, F = pow(x, p[BETA1]);
    *dFdT = p[BETA1] * F / (x * w); /* x > 0 here: x^(beta-1) = x^beta / x, one power instead of two */
    return F;
  }
  if (T_C < c->Tl) {
    const PetscReal w = c->Tl - c->Tc, x = (T_C - c->Tc) / w, Fx = pow(x, p[BETA2]);
    *dFdT = (1.0 - c->Fc) * p[BETA2] * (x > 0.0 ? Fx / x : pow(x, p[BETA2] - 1.0)) / w;
    return PetscMin(1.0, c->Fc + (1.0 - c->Fc) * Fx);
  }
  *dFdT = 0.0;
  return 1.0;
}

static void WaterAt(const PetscReal p[], PetscReal P_GPa, PetscReal water_ppm, Water *w)
{
  w->bulk  = CFPpmToWtPercent(water_ppm);
  w->sat   = w->bulk > 0.0 ? p[CHI1] * pow(P_GPa, p[LAMBDA]) + p[CHI2] * P_GPa : 0.0; /* dry: the melt holds no water whatever its capacity */
  w->D     = p[WATER_D];
  w->K     = p[WATER_K];
  w->gamma = p[WATER_GAMMA];
}

/* Water in the melt at melt fraction F (batch, capped at saturation) and dX/dF. */
static PetscReal MeltWater(const Water *w, PetscReal F, PetscReal *dXdF)
{
  const PetscReal denom = w->D + F * (1.0 - w->D), X = w->bulk / denom;

  if (X >= w->sat) { /* saturated: the excess is a free fluid and lowers nothing further */
    *dXdF = 0.0;
    return w->sat;
  }
  *dXdF = -X * (1.0 - w->D) / denom;
  return X;
}

/* Depression of the curves dT = K X^gamma (C) and d(dT)/dX. */
static PetscReal Depression(const Water *w, PetscReal X, PetscReal *ddTdX)
{
  PetscReal dT;

  if (!(X > 0.0)) {
    *ddTdX = 0.0;
    return 0.0;
  }
  dT     = w->K * pow(X, w->gamma);
  *ddTdX = w->gamma * dT / X;
  return dT;
}

/* Depression at melt fraction F and its derivative d(dT)/dF. */
static PetscReal DepressionAt(const Water *w, PetscReal F, PetscReal *ddTdF)
{
  PetscReal dXdF, ddTdX;
  const PetscReal dT = Depression(w, MeltWater(w, F, &dXdF), &ddTdX);

  *ddTdF = ddTdX * dXdF;
  return dT;
}

typedef struct {
  const PetscReal *p;
  const DryCurves *c;
  const Water     *w;
  PetscReal        T_C;
} HydrousCtx;

/* g(F) = F - F_dry(T + dT(X(F))): increasing in F, g(0) <= 0 <= g(1), so one root in [0, 1]. */
static PetscReal HydrousResidual(PetscReal F, void *ctx)
{
  const HydrousCtx *h = (const HydrousCtx *)ctx;
  PetscReal         ddTdF, dFdT;

  return F - DryMeltFraction(h->p, h->c, h->T_C + DepressionAt(h->w, F, &ddTdF), &dFdT);
}

static int Fail(PetscReal *F, PetscReal *dFdT)
{
  *F = NAN;
  if (dFdT) *dFdT = NAN;
  return 1;
}

static PetscReal PressureGPa(PetscReal P) { return CFPaToGPa(PetscMax(P, 0.0)); } /* no tension: P < 0 is P = 0 */

/* The hydrous solidus (the first melt takes X_bulk / D) or liquidus (the last solid gives all its
   water to the melt): the dry curve lowered by the depression at F = 0 or F = 1. */
static PetscReal HydrousCurve(const PetscReal p[], PetscReal P, PetscReal water_ppm, PetscBool liquidus)
{
  const PetscReal P_GPa = PressureGPa(P);
  DryCurves       c;
  Water           w;
  PetscReal       ddTdF;

  (void)DryCurvesAt(p, P_GPa, &c);
  WaterAt(p, P_GPa, water_ppm, &w);
  return CFCelsiusToKelvin((liquidus ? c.Tl : c.Ts) - DepressionAt(&w, liquidus ? 1.0 : 0.0, &ddTdF));
}

static PetscReal Solidus(const PetscReal p[], PetscReal P, PetscReal water_ppm) { return HydrousCurve(p, P, water_ppm, PETSC_FALSE); }
static PetscReal Liquidus(const PetscReal p[], PetscReal P, PetscReal water_ppm) { return HydrousCurve(p, P, water_ppm, PETSC_TRUE); }

static int MeltFraction(const PetscReal p[], PetscReal P, PetscReal T, PetscReal water_ppm, PetscReal *F, PetscReal *dFdT)
{
  const PetscReal P_GPa = PressureGPa(P), T_C = CFKelvinToCelsius(T);
  DryCurves       c;
  Water           w;
  HydrousCtx      h = {p, &c, &w, T_C};
  PetscReal       ddTdF, dFdT_dry, g0, g1, root;

  if (DryCurvesAt(p, P_GPa, &c) || !isfinite(T_C) || !(water_ppm >= 0.0) || !isfinite(water_ppm)) return Fail(F, dFdT);
  WaterAt(p, P_GPa, water_ppm, &w);
  if (DepressionAt(&w, 0.0, &ddTdF) == 0.0) { /* dry, or no water dissolves (P = 0): the anhydrous answer itself */
    *F = DryMeltFraction(p, &c, T_C, &dFdT_dry);
    if (dFdT) *dFdT = dFdT_dry;
    return 0;
  }
  g0 = HydrousResidual(0.0, &h);
  g1 = HydrousResidual(1.0, &h);
  if (g0 == 0.0 || g1 == 0.0) { /* at or below the hydrous solidus, at or above the hydrous liquidus */
    *F = (g0 == 0.0) ? 0.0 : 1.0;
    if (dFdT) *dFdT = 0.0;
    return 0;
  }
  if (CFBrentFindRootBracketed(HydrousResidual, &h, 0.0, g0, 1.0, g1, KATZ_BRACKET_TOLERANCE, KATZ_RESIDUAL_STOP, KATZ_MAX_EVALUATIONS, &root, NULL)) return Fail(F, dFdT);
  *F = PetscMin(1.0, PetscMax(0.0, root));
  if (dFdT) { /* implicit differentiation of F = F_dry(T + dT(F)) */
    const PetscReal dT = DepressionAt(&w, *F, &ddTdF);
    (void)DryMeltFraction(p, &c, T_C + dT, &dFdT_dry);
    *dFdT = dFdT_dry / (1.0 - dFdT_dry * ddTdF);
  }
  return 0;
}

const CFMeltingType CFMeltingKatz2003 = {"katz2003", "Katz, Spiegelman & Langmuir (2003): lherzolite melting with cpx exhaustion and hydrous solidus depression", NPARAMS, params, Solidus, Liquidus, MeltFraction};
