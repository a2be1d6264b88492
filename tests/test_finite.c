/* Numerical faults: a NaN or Inf in the state stops the steady solve at once with PETSC_ERR_FP
   and one line naming the field and the cell (index and position), and the program maps it to
   exit status 3.  Cell centres are at ((i + 1/2) dx, (j + 1/2) dz) (the grid's definition,
   include/crustforge/config.h); IEEE 754 (2008) makes NaN and Inf propagate through the residual. */
#include <math.h>
#include <string.h>
#include <crustforge/app.h>
#include <crustforge/steady.h>
#include "cf_test.h"


/* A 10 x 10 grid of 20 km cells, linear melting: a solve of a fraction of a second. */
static PetscErrorCode TinyConfig(CFConfig *cfg)
{
  PetscFunctionBeginUser;
  PetscCall(PetscOptionsClear(NULL));
  PetscCall(PetscOptionsSetValue(NULL, "-grid_width", "200"));
  PetscCall(PetscOptionsSetValue(NULL, "-grid_depth", "200"));
  PetscCall(PetscOptionsSetValue(NULL, "-grid_spacing", "20"));
  PetscCall(PetscOptionsSetValue(NULL, "-melting_model", "linear"));
  PetscCall(CFConfigSetFromOptions(PETSC_COMM_WORLD, cfg));
  PetscFunctionReturn(0);
}

/* Put value into field (0 temperature, 1 depletion) of cell (i, j), solve; the error, quietly. */
static PetscErrorCode SolveWithBadCell(PetscInt i, PetscInt j, PetscInt field, PetscReal value, PetscErrorCode *err)
{
  CFConfig      cfg;
  CFSteady      s;
  CFSolveReport rep;
  DM            da;
  Vec           X;
  PetscScalar ***x;
  PetscInt      xs, ys, xm, ym;

  PetscFunctionBeginUser;
  PetscCall(TinyConfig(&cfg));
  PetscCall(CFSteadyCreate(PETSC_COMM_WORLD, &cfg, &s));
  PetscCall(CFSteadySetInitialGuess(s));
  PetscCall(CFSteadyGetDM(s, &da));
  PetscCall(CFSteadyGetSolution(s, &X));
  PetscCall(DMDAGetCorners(da, &xs, &ys, NULL, &xm, &ym, NULL));
  PetscCall(DMDAVecGetArrayDOF(da, X, &x));
  if (i >= xs && i < xs + xm && j >= ys && j < ys + ym) x[j][i][field] = value;
  PetscCall(DMDAVecRestoreArrayDOF(da, X, &x));
  PetscCall(PetscPushErrorHandler(PetscReturnErrorHandler, NULL));
  *err = CFSteadySolve(s, &rep);
  PetscCall(PetscPopErrorHandler());
  PetscCall(CFSteadyDestroy(&s));
  PetscFunctionReturn(0);
}

static void CheckFault(PetscErrorCode err, const char *want)
{
  const char *text = NULL;
  char       *msg  = NULL;

  (void)PetscErrorMessage(err, &text, &msg);
  ck_assert_int_eq(err, PETSC_ERR_FP);
  ck_assert_msg(msg && strstr(msg, want), "message '%s' does not say '%s'", msg ? msg : "", want);
  ck_assert_msg(!strchr(msg, '\n'), "message '%s' is not one line", msg);
  ck_assert_int_eq(CFExitStatus(err), CF_EXIT_NOT_CONVERGED);
}

START_TEST(test_nan_temperature)
{
  PetscErrorCode err;
  /* cell (3, 2) of 20 km cells: centre x = 3.5 * 20 = 70 km, z = 2.5 * 20 = 50 km (derived) */
  CK_PETSC(SolveWithBadCell(3, 2, 0, NAN, &err));
  CheckFault(err, "temperature is NaN at cell (i, j) = (3, 2), x = 70 km, z = 50 km");
}
END_TEST

START_TEST(test_inf_depletion)
{
  PetscErrorCode err;
  /* cell (9, 7): x = 9.5 * 20 = 190 km, z = 7.5 * 20 = 150 km (derived) */
  CK_PETSC(SolveWithBadCell(9, 7, 1, INFINITY, &err));
  CheckFault(err, "depletion is +Inf at cell (i, j) = (9, 7), x = 190 km, z = 150 km");
}
END_TEST

static Suite *FiniteSuite(void)
{
  Suite *s  = suite_create("finite");
  TCase *tc = tcase_create("faults");

  tcase_add_test(tc, test_nan_temperature);
  tcase_add_test(tc, test_inf_depletion);
  suite_add_tcase(s, tc);
  return s;
}

CF_TEST_MAIN(FiniteSuite)
