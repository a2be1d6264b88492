/* Check suite for the corner flow (src/flow) against the isoviscous wedge solution of Batchelor
   (1967), An Introduction to Fluid Dynamics, as used for ridges by Reid & Jackson (1981):
     psi = (2 U0 / pi) z atan(x / z),  u = (2 U0 / pi)(atan(x / z) - x z / r^2),
     w_up = (2 U0 / pi) z^2 / r^2,  axial upwelling 2 U0 / pi = 0.63662 U0
   (REFERENCES.md, corner flow, seen in a textbook statement).  The reference formulas are
   written out here independently of the module's source. */
#include <math.h>
#include <crustforge/flow.h>
#include <crustforge/units.h>
#include "cf_test.h"
#include "cf_scenario.h"

/* An intermediate ridge, 60 mm/yr full rate (invented scenario). */
static CFFlow NewFlow(PetscReal full_rate_mm_yr)
{
  CFConfig cfg;
  CFFlow   flow = NULL;

  ck_assert_int_eq(CFConfigSetDefaults(&cfg), 0);
  cfg.full_spreading_rate_mm_yr = full_rate_mm_yr;
  CFScenarioFinish(&cfg);
  ck_assert_int_eq(CFFlowCreate(&cfg, &flow), 0);
  return flow;
}

/* Corner psi of an nx x nz grid of cells dx x dz, psi[J * (nx + 1) + I]. */
static PetscReal *NewCornerPsi(CFFlow flow, PetscInt nx, PetscInt nz, PetscReal dx, PetscReal dz)
{
  PetscReal *psi = NULL;
  ck_assert_int_eq(PetscMalloc1((nx + 1) * (nz + 1), &psi), 0);
  ck_assert_int_eq(CFFlowCornerStreamFunction(flow, dx, dz, 0, nx + 1, 0, nz + 1, psi), 0);
  return psi;
}

/* Every cell's net volume outflow from its four face fluxes (corner-psi differences) is zero to
   round-off: the discrete flow is divergence-free (DESIGN 2.1 and 5.1; Batchelor 1967: psi
   defines an incompressible flow).  Cells 2.5 km x 2 km, not square, on purpose. */
START_TEST(test_flow_discrete_divergence)
{
  const PetscInt  nx = 160, nz = 100;
  const PetscReal dx = 2500.0, dz = 2000.0;
  CFFlow          flow = NewFlow(60.0);
  PetscReal      *psi  = NewCornerPsi(flow, nx, nz, dx, dz), qmax = 0.0, netmax = 0.0;

  for (PetscInt j = 0; j < nz; j++)
    for (PetscInt i = 0; i < nx; i++) {
      const PetscReal qL = psi[(j + 1) * (nx + 1) + i] - psi[j * (nx + 1) + i];             /* +x through x = i dx */
      const PetscReal qR = psi[(j + 1) * (nx + 1) + i + 1] - psi[j * (nx + 1) + i + 1];     /* +x through x = (i+1) dx */
      const PetscReal qT = psi[j * (nx + 1) + i + 1] - psi[j * (nx + 1) + i];               /* upward through z = j dz */
      const PetscReal qB = psi[(j + 1) * (nx + 1) + i + 1] - psi[(j + 1) * (nx + 1) + i];   /* upward through z = (j+1) dz */
      qmax   = PetscMax(qmax, PetscMax(PetscMax(PetscAbsReal(qL), PetscAbsReal(qR)), PetscMax(PetscAbsReal(qT), PetscAbsReal(qB))));
      netmax = PetscMax(netmax, PetscAbsReal(qR - qL + qT - qB));
    }
  printf("flow: largest face flux %.4e m2/s, largest net cell outflow %.3e (relative %.2e)\n", (double)qmax, (double)netmax, (double)(netmax / qmax));
  ck_assert_msg(qmax > 0.0, "no flow");
  ck_assert_msg(netmax <= 1e-13 * qmax, "net cell outflow %g is not round-off next to face flux %g", (double)netmax, (double)qmax);
  ck_assert_int_eq(PetscFree(psi), 0);
  ck_assert_int_eq(CFFlowDestroy(&flow), 0);
}
END_TEST

/* Boundary values of the wedge solution (Batchelor 1967; REFERENCES.md): the plate moves at U0
   (u -> U0, w -> 0 as z -> 0 at x > 0); the axis is a symmetry plane (u = 0) where the mantle
   rises at 2 U0 / pi = 0.63662 U0 (the value REFERENCES.md states); psi = 0 on both, so neither
   boundary carries a volume flux; and the pattern scales with U0 (DESIGN 2.1). */
START_TEST(test_flow_boundary_values)
{
  CFFlow          flow = NewFlow(60.0);
  const PetscReal U0   = CFFlowHalfRate(flow);
  const PetscReal xs[] = {1.0, 1.0e3, 37.0e3, 400.0e3}, zs[] = {1.0, 1.0e3, 25.0e3, 200.0e3};
  PetscReal       u, w;

  cf_assert_close(U0, CFHalfRateFromFullMmPerYr(60.0), 1e-15);
  for (size_t k = 0; k < sizeof(xs) / sizeof(xs[0]); k++) {
    CFFlowVelocity(flow, xs[k], 0.0, &u, &w); /* on the surface itself */
    cf_assert_close(u, U0, 1e-14);
    cf_assert_near(w, 0.0, 1e-14 * U0);
    CFFlowVelocity(flow, xs[k], 1e-7 * xs[k], &u, &w); /* the limit z -> 0 */
    cf_assert_close(u, U0, 1e-6);
    cf_assert_near(w, 0.0, 1e-6 * U0);
    cf_assert_near(CFFlowStreamFunction(flow, xs[k], 0.0), 0.0, 0.0);
  }
  for (size_t k = 0; k < sizeof(zs) / sizeof(zs[0]); k++) {
    CFFlowVelocity(flow, 0.0, zs[k], &u, &w);
    cf_assert_near(u, 0.0, 0.0);
    cf_assert_close(w / U0, 0.63662, 1e-5);
    cf_assert_close(w, 2.0 * U0 / PETSC_PI, 1e-14);
    cf_assert_near(CFFlowStreamFunction(flow, 0.0, zs[k]), 0.0, 0.0);
  }
  /* the same pattern, scaled */
  ck_assert_int_eq(CFFlowSetHalfRate(flow, 3.0 * U0), 0);
  CFFlowVelocity(flow, 37.0e3, 25.0e3, &u, &w);
  {
    const PetscReal c = 2.0 * 3.0 * U0 / PETSC_PI, x = 37.0e3, z = 25.0e3, r2 = x * x + z * z;
    cf_assert_close(u, c * (atan(x / z) - x * z / r2), 1e-13);
    cf_assert_close(w, c * z * z / r2, 1e-13);
  }
  ck_assert_int_eq(CFFlowDestroy(&flow), 0);
}
END_TEST

/* The velocity is the derivative of the stream function, u = dpsi/dz, w_up = dpsi/dx
   (Batchelor 1967), checked by centred differences with step h = 1e-4 r (truncation about
   (h/r)^2 = 1e-8 of U0), and against the published velocity formulas. */
START_TEST(test_flow_velocity_from_psi)
{
  CFFlow          flow = NewFlow(60.0);
  const PetscReal U0 = CFFlowHalfRate(flow), c = 2.0 * U0 / PETSC_PI;
  const PetscReal pts[][2] = {{1.0e3, 90.0e3}, {5.0e3, 5.0e3}, {30.0e3, 20.0e3}, {120.0e3, 3.0e3}, {300.0e3, 150.0e3}, {2.0e3, 180.0e3}};

  for (size_t k = 0; k < sizeof(pts) / sizeof(pts[0]); k++) {
    const PetscReal x = pts[k][0], z = pts[k][1], r2 = x * x + z * z, h = 1e-4 * PetscSqrtReal(r2);
    const PetscReal dpsi_dz = (CFFlowStreamFunction(flow, x, z + h) - CFFlowStreamFunction(flow, x, z - h)) / (2.0 * h);
    const PetscReal dpsi_dx = (CFFlowStreamFunction(flow, x + h, z) - CFFlowStreamFunction(flow, x - h, z)) / (2.0 * h);
    PetscReal       u, w;
    CFFlowVelocity(flow, x, z, &u, &w);
    cf_assert_near(u, dpsi_dz, 1e-7 * U0);
    cf_assert_near(w, dpsi_dx, 1e-7 * U0);
    cf_assert_close(u, c * (atan(x / z) - x * z / r2), 1e-13);
    cf_assert_close(w, c * z * z / r2, 1e-13);
    cf_assert_close(CFFlowStreamFunction(flow, x, z), c * z * atan(x / z), 1e-13);
  }
  ck_assert_int_eq(CFFlowDestroy(&flow), 0);
}
END_TEST

/* The 13-point finite-difference biharmonic at spacing h (second order), as the sum of its three
   parts h^4 (f_xxxx + 2 f_xxzz + f_zzzz): 20 f0 - 8 (edge neighbours) + 2 (diagonal) + (distance
   2h).  *scale gets |f_xxxx| + 2 |f_xxzz| + |f_zzzz|, the size of what must cancel. */
typedef PetscReal (*Field2)(void *ctx, PetscReal x, PetscReal z);

static PetscReal Biharmonic13(Field2 f, void *ctx, PetscReal x, PetscReal z, PetscReal h, PetscReal *scale)
{
  const PetscReal f0 = f(ctx, x, z), h4 = h * h * h * h;
  const PetscReal ex = f(ctx, x + h, z) + f(ctx, x - h, z), ez = f(ctx, x, z + h) + f(ctx, x, z - h);
  const PetscReal fx = f(ctx, x + 2 * h, z) + f(ctx, x - 2 * h, z), fz = f(ctx, x, z + 2 * h) + f(ctx, x, z - 2 * h);
  const PetscReal dg = f(ctx, x + h, z + h) + f(ctx, x + h, z - h) + f(ctx, x - h, z + h) + f(ctx, x - h, z - h);
  const PetscReal dxxxx = (fx - 4.0 * ex + 6.0 * f0) / h4, dzzzz = (fz - 4.0 * ez + 6.0 * f0) / h4, dxxzz = (dg - 2.0 * (ex + ez) + 4.0 * f0) / h4;

  *scale = PetscAbsReal(dxxxx) + 2.0 * PetscAbsReal(dxxzz) + PetscAbsReal(dzzzz);
  return (20.0 * f0 - 8.0 * (ex + ez) + 2.0 * dg + fx + fz) / h4;
}

static PetscReal PsiField(void *ctx, PetscReal x, PetscReal z) { return CFFlowStreamFunction((CFFlow)ctx, x, z); }
/* r^3 has lap^2 (r^3) = 9 / r in the plane (lap r^n = n^2 r^(n-2); derived): a non-zero
   control that the stencil and its order are right. */
static PetscReal CubeField(void *ctx, PetscReal x, PetscReal z)
{
  const PetscReal r = PetscSqrtReal(x * x + z * z);
  (void)ctx;
  return r * r * r;
}

/* psi is biharmonic: the isoviscous Stokes equations make lap^2 psi = 0 (Batchelor 1967).
   What is checked: over the 100 points x, z = 10, 20, ..., 100 km (10-140 km from the corner;
   each stencil stays inside x, z > 0, where psi is smooth), at h = 2, 1 and 0.5 km, the largest
   discrete biharmonic relative to the size of its three parts,
   max |lap^2_h psi| / (|psi_xxxx| + 2 |psi_xxzz| + |psi_zzzz|)_h, is small (the parts cancel:
   < 5e-2 at h = 2 km, < 5e-3 at 0.5 km) and falls at an observed order >= 1.8 (the stencil's
   truncation error is O(h^2); measured on the scale psi / h^4 of single stencil terms it would
   be O(h^6)).  The largest over many points, because at a single point the h^2 coefficient can
   vanish.  The control r^3 must give 9/r with the same order. */
START_TEST(test_flow_psi_biharmonic)
{
  CFFlow    flow = NewFlow(60.0);
  PetscReal e[3] = {0.0, 0.0, 0.0}, ec[3] = {0.0, 0.0, 0.0};

  for (int m = 0; m < 3; m++) {
    const PetscReal h = 2.0e3 / (1 << m);
    for (int a = 1; a <= 10; a++)
      for (int b = 1; b <= 10; b++) {
        const PetscReal x = 10.0e3 * a, z = 10.0e3 * b, r = PetscSqrtReal(x * x + z * z);
        PetscReal       scale, d = Biharmonic13(PsiField, flow, x, z, h, &scale);
        e[m]  = PetscMax(e[m], PetscAbsReal(d) / scale);
        d     = Biharmonic13(CubeField, NULL, x, z, h, &scale);
        ec[m] = PetscMax(ec[m], PetscAbsReal(d - 9.0 / r) * r / 9.0);
      }
  }
  printf("flow: biharmonic, h = 2, 1, 0.5 km: max |lap2 psi| relative to its parts %.3e %.3e %.3e (orders %.2f %.2f); r^3 control max rel. error %.2e %.2e %.2e (orders %.2f %.2f)\n", (double)e[0], (double)e[1], (double)e[2], (double)log2(e[0] / e[1]), (double)log2(e[1] / e[2]), (double)ec[0], (double)ec[1], (double)ec[2], (double)log2(ec[0] / ec[1]), (double)log2(ec[1] / ec[2]));
  ck_assert_msg(e[0] < 5e-2 && e[2] < 5e-3, "lap2 psi is not small next to its parts: %g at h = 2 km, %g at 0.5 km", (double)e[0], (double)e[2]);
  for (int m = 0; m < 2; m++) {
    ck_assert_msg(log2(e[m] / e[m + 1]) >= 1.8, "lap2 psi does not fall as h^2: %g then %g", (double)e[m], (double)e[m + 1]);
    ck_assert_msg(log2(ec[m] / ec[m + 1]) >= 1.8, "the stencil is not second order on r^3: %g then %g", (double)ec[m], (double)ec[m + 1]);
  }
  ck_assert_int_eq(CFFlowDestroy(&flow), 0);
}
END_TEST

/* Corner flow is everywhere upward and outward (DESIGN 2.1; w_up = (2U0/pi) z^2/r^2 >= 0 and
   u >= 0 for x, z >= 0, Batchelor 1967): every face flux of a grid is >= 0 in +x and upward,
   strictly positive inside, exactly zero through the axis and the surface. */
START_TEST(test_flow_upward_outward)
{
  const PetscInt  nx = 200, nz = 100;
  const PetscReal dx = 2000.0, dz = 2000.0;
  CFFlow          flow = NewFlow(20.0);
  PetscReal      *psi  = NewCornerPsi(flow, nx, nz, dx, dz);

  for (PetscInt j = 0; j < nz; j++)
    for (PetscInt a = 0; a <= nx; a++) {
      const PetscReal q = psi[(j + 1) * (nx + 1) + a] - psi[j * (nx + 1) + a];
      if (a == 0) ck_assert_msg(q == 0.0, "flux %g through the axis", (double)q);
      else ck_assert_msg(q > 0.0, "x-face (%d, %d) flux %g is not outward", (int)a, (int)j, (double)q);
    }
  for (PetscInt b = 0; b <= nz; b++)
    for (PetscInt i = 0; i < nx; i++) {
      const PetscReal q = psi[b * (nx + 1) + i + 1] - psi[b * (nx + 1) + i];
      if (b == 0) ck_assert_msg(q == 0.0, "flux %g through the surface", (double)q);
      else ck_assert_msg(q > 0.0, "z-face (%d, %d) flux %g is not upward", (int)i, (int)b, (double)q);
    }
  ck_assert_int_eq(PetscFree(psi), 0);
  ck_assert_int_eq(CFFlowDestroy(&flow), 0);
}
END_TEST

static Suite *FlowSuite(void)
{
  Suite *s  = suite_create("flow");
  TCase *tc = tcase_create("corner");
  tcase_add_test(tc, test_flow_discrete_divergence);
  tcase_add_test(tc, test_flow_boundary_values);
  tcase_add_test(tc, test_flow_velocity_from_psi);
  tcase_add_test(tc, test_flow_psi_biharmonic);
  tcase_add_test(tc, test_flow_upward_outward);
  suite_add_tcase(s, tc);
  return s;
}

CF_TEST_MAIN(FlowSuite)
