/* Check suite: the steady solver gives the same answer on any number of MPI ranks (DESIGN 4 and
   5.7: results must not depend on the rank count).  Run by ctest on 1, 2 and 4 ranks.  The
   expected values are not published numbers: they are the same problem solved in the same run
   on a communicator holding rank 0 alone. */
#include <math.h>
#include <crustforge/steady.h>
#include <crustforge/units.h>
#include "cf_test.h"
#include "cf_scenario.h"

#define CK_PETSC(call) \
  do { \
    PetscErrorCode ierr_ = (call); \
    ck_assert_msg(!ierr_, "%s failed with PETSc error %d", #call, (int)ierr_); \
  } while (0)

/* Scalar results compared: crustal thickness two ways, k dT/dz at the surface at three plate
   ages (the background conductivity times the gradient, CFScenarioSurfaceHeatFlow) and the
   temperature of three cells. */
enum { H_MELTING, H_SIDE, Q_1MYR, Q_2MYR, Q_5MYR, T_AXIS_50KM, T_100KM_20KM, T_300KM_100KM, NRESULTS };
static const char *result_names[NRESULTS] = {"crust from melting (m)", "crust from side flux (m)", "k dT/dz at 1 Myr (W/m2)", "k dT/dz at 2 Myr (W/m2)", "k dT/dz at 5 Myr (W/m2)", "T axis 50 km (K)", "T 100 km, 20 km (K)", "T 300 km, 100 km (K)"};

/* A default-like case (invented ridge segment): every default (katz2003, latent heat, adiabat,
   hydrothermal cooling, 60 mm/yr, Tp 1350 C, 400 x 200 km) on a coarse 8 km grid. */
static void DefaultLikeConfig(CFConfig *cfg)
{
  CK_PETSC(CFConfigSetDefaults(cfg));
  cfg->spacing = 8.0e3;
  CFScenarioFinish(cfg);
}

static PetscInt Column(const CFConfig *cfg, PetscReal x) { return PetscMin(cfg->nx - 1, (PetscInt)PetscFloorReal(x / cfg->dx)); }
static PetscInt Row(const CFConfig *cfg, PetscReal z) { return PetscMin(cfg->nz - 1, (PetscInt)PetscFloorReal(z / cfg->dz)); }

/* Solve on comm, to a tolerance well below the agreement asked for; results on every rank. */
static void SolveOn(MPI_Comm comm, const CFConfig *cfg, PetscReal res[NRESULTS], CFSolveReport *rep)
{
  const char *const opts[] = {"-snes_rtol", "1e-13", "-snes_atol", "1e-10", "-ksp_rtol", "1e-12", NULL};
  CFSteady          s      = NULL;
  Vec               T;
  PetscMPIInt       rank;

  for (const char *const *o = opts; o[0]; o += 2) CK_PETSC(PetscOptionsSetValue(NULL, o[0], o[1]));
  CK_PETSC(CFSteadyCreate(comm, cfg, &s));
  for (const char *const *o = opts; o[0]; o += 2) CK_PETSC(PetscOptionsClearValue(NULL, o[0]));
  CK_PETSC(CFScenarioSolve(s, rep));
  CK_PETSC(CFSteadyCrustalThickness(s, &res[H_MELTING], &res[H_SIDE]));
  CK_PETSC(CFScenarioGatherTemperature(s, &T));
  CK_PETSC(MPI_Comm_rank(comm, &rank));
  if (!rank) {
    const PetscScalar *t;
    const PetscReal    U0 = cfg->half_rate;
    CK_PETSC(VecGetArrayRead(T, &t));
    res[Q_1MYR]        = CFScenarioSurfaceHeatFlow(cfg, t, Column(cfg, U0 * CFMyrToS(1.0)));
    res[Q_2MYR]        = CFScenarioSurfaceHeatFlow(cfg, t, Column(cfg, U0 * CFMyrToS(2.0)));
    res[Q_5MYR]        = CFScenarioSurfaceHeatFlow(cfg, t, Column(cfg, U0 * CFMyrToS(5.0)));
    res[T_AXIS_50KM]   = PetscRealPart(t[Row(cfg, 50.0e3) * cfg->nx]);
    res[T_100KM_20KM]  = PetscRealPart(t[Row(cfg, 20.0e3) * cfg->nx + Column(cfg, 100.0e3)]);
    res[T_300KM_100KM] = PetscRealPart(t[Row(cfg, 100.0e3) * cfg->nx + Column(cfg, 300.0e3)]);
    CK_PETSC(VecRestoreArrayRead(T, &t));
  }
  CK_PETSC(MPI_Bcast(res, NRESULTS, MPIU_REAL, 0, comm));
  CK_PETSC(VecDestroy(&T));
  CK_PETSC(CFSteadyDestroy(&s));
}

/* 1, 2 or 4 ranks against rank 0 alone: every result within 1e-8 relative (DESIGN 5.7). */
START_TEST(test_thermal_ranks_agree)
{
  CFConfig      cfg;
  CFSolveReport rep_serial = {0}, rep_parallel = {0};
  PetscReal     serial[NRESULTS], parallel[NRESULTS], worst = 0.0;
  PetscMPIInt   rank, size;
  MPI_Comm      alone;

  DefaultLikeConfig(&cfg);
  CK_PETSC(MPI_Comm_rank(PETSC_COMM_WORLD, &rank));
  CK_PETSC(MPI_Comm_size(PETSC_COMM_WORLD, &size));
  CK_PETSC(MPI_Comm_split(PETSC_COMM_WORLD, rank ? MPI_UNDEFINED : 0, 0, &alone));
  if (!rank) {
    SolveOn(alone, &cfg, serial, &rep_serial);
    CK_PETSC(MPI_Comm_free(&alone));
  }
  CK_PETSC(MPI_Bcast(serial, NRESULTS, MPIU_REAL, 0, PETSC_COMM_WORLD));
  SolveOn(PETSC_COMM_WORLD, &cfg, parallel, &rep_parallel);
  for (int r = 0; r < NRESULTS; r++) {
    const PetscReal rel = PetscAbsReal(parallel[r] - serial[r]) / PetscAbsReal(serial[r]);
    worst               = PetscMax(worst, rel);
    CK_PETSC(PetscPrintf(PETSC_COMM_WORLD, "thermal ranks: %-26s 1 rank %.12e  %d ranks %.12e  rel. diff %.2e\n", result_names[r], (double)serial[r], (int)size, (double)parallel[r], (double)rel));
  }
  CK_PETSC(PetscPrintf(PETSC_COMM_WORLD, "thermal ranks: %d x %d cells; Newton %d (1 rank), %d (%d ranks); %.2f s, %.2f s\n", (int)cfg.nx, (int)cfg.nz, (int)rep_serial.nonlinear_iterations, (int)rep_parallel.nonlinear_iterations, (int)size, (double)rep_serial.seconds, (double)rep_parallel.seconds));
  ck_assert_msg(serial[H_MELTING] > 1.0e3, "the default-like case made %g m of crust: the check would compare nothing", (double)serial[H_MELTING]);
  ck_assert_msg(worst <= 1e-8, "%d ranks differ from 1 rank by %g relative", (int)size, (double)worst);
}
END_TEST

static Suite *ThermalRanksSuite(void)
{
  Suite *s  = suite_create("thermal_ranks");
  TCase *tc = tcase_create("ranks");
  tcase_add_test(tc, test_thermal_ranks_agree);
  suite_add_tcase(s, tc);
  return s;
}

CF_TEST_MAIN(ThermalRanksSuite)
