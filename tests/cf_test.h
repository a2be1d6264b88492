/* Shared scaffolding for the Check suites: PETSc is initialised once in main, tests run in the
   same process (no fork: forking after MPI_Init is not portable). */
#ifndef CF_TEST_H
#define CF_TEST_H

#include <check.h>
#include <petscsys.h>

/* Relative closeness for assertions that print both numbers. */
#define cf_assert_close(a, b, rtol) \
  ck_assert_msg(PetscAbsReal((a) - (b)) <= (rtol) * PetscMax(PetscAbsReal(b), 1e-300), "%s = %.15g, expected %.15g (rtol %g)", #a, (double)(a), (double)(b), (double)(rtol))
#define cf_assert_near(a, b, atol) \
  ck_assert_msg(PetscAbsReal((a) - (b)) <= (atol), "%s = %.15g, expected %.15g (atol %g)", #a, (double)(a), (double)(b), (double)(atol))

/* A PETSc call inside a test: any error fails the test, naming the call. */
#define CK_PETSC(call) \
  do { \
    PetscErrorCode ierr_ = (call); \
    ck_assert_msg(!ierr_, "%s failed with PETSc error %d", #call, (int)ierr_); \
  } while (0)

/* One test case per test, so that CK_RUN_CASE=name picks one. */
static inline void cf_add_case(Suite *s, const char *name, const TTest *test)
{
  TCase *tc = tcase_create(name);
  tcase_add_test(tc, test);
  suite_add_tcase(s, tc);
}

/* main() for a suite built by make_suite(). */
#define CF_TEST_MAIN(make_suite) \
  int main(int argc, char **argv) \
  { \
    int      failed; \
    SRunner *sr; \
    if (PetscInitialize(&argc, &argv, NULL, NULL)) return 1; \
    sr = srunner_create(make_suite()); \
    srunner_set_fork_status(sr, CK_NOFORK); \
    srunner_run_all(sr, CK_NORMAL); \
    failed = srunner_ntests_failed(sr); \
    srunner_free(sr); \
    if (PetscFinalize()) return 1; \
    return failed ? 1 : 0; \
  }

#endif
