/* Scenario scaffolding for the verification suites: finish a CFConfig whose fields a test set
   directly (the derived fields CFConfigSetFromOptions fills from the options database), switch
   melting off, and gather a steady solution to rank 0 for evaluation. */
#ifndef CF_SCENARIO_H
#define CF_SCENARIO_H

#include <petscdmda.h>
#include <crustforge/config.h>
#include <crustforge/melting.h>
#include <crustforge/steady.h>
#include <crustforge/units.h>
#include "cf_test.h"

/* A PETSc call inside a Check test: fail the test, naming the call, on any error code. */
#ifndef CK_PETSC
#endif

/* The derived fields, as src/config/config.c sets them: plate speed, adiabatic gradient (unless
   set), whole numbers of cells and the actual cell size. */
static inline void CFScenarioFinish(CFConfig *cfg)
{
  cfg->half_rate = CFHalfRateFromFullMmPerYr(cfg->full_spreading_rate_mm_yr);
  if (!cfg->adiabatic_gradient_set) cfg->adiabatic_gradient = cfg->thermal_expansivity * cfg->gravity * cfg->potential_temperature / cfg->heat_capacity;
  cfg->nx = (PetscInt)PetscCeilReal(cfg->width / cfg->spacing - 1e-9);
  cfg->nz = (PetscInt)PetscCeilReal(cfg->depth / cfg->spacing - 1e-9);
  cfg->dx = cfg->width / cfg->nx;
  cfg->dz = cfg->depth / cfg->nz;
}

/* Adiabat off: pure advection then keeps T constant along a streamline. */
static inline void CFScenarioNoAdiabat(CFConfig *cfg)
{
  cfg->adiabatic_gradient     = 0.0;
  cfg->adiabatic_gradient_set = PETSC_TRUE;
}

/* No melting anywhere and no latent heat: the "linear" model with its solidus at the top of the
   allowed parameter range (2000 C + 500 C/GPa), far above any temperature of these tests. */
static inline PetscErrorCode CFScenarioNoMelting(CFConfig *cfg)
{
  const CFMeltingType *mt = CFMeltingTypeFind("linear");

  PetscFunctionBeginUser;
  PetscCheck(mt && mt->nparams == 4, PETSC_COMM_SELF, PETSC_ERR_PLIB, "melting model linear is not registered with its four parameters");
  PetscCall(PetscStrncpy(cfg->melting_model, "linear", sizeof(cfg->melting_model)));
  cfg->melting_nparams   = 4;
  cfg->melting_params[0] = 2000.0; /* solidus at the surface, C */
  cfg->melting_params[1] = 500.0;  /* solidus slope, C/GPa */
  cfg->melting_params[2] = 2500.0; /* liquidus at the surface, C */
  cfg->melting_params[3] = 500.0;  /* liquidus slope, C/GPa */
  cfg->entropy_of_fusion = 0.0;
  PetscFunctionReturn(0);
}

/* Solve from the built-in initial guess, failing on non-convergence. */
static inline PetscErrorCode CFScenarioSolve(CFSteady s, CFSolveReport *report)
{
  PetscFunctionBeginUser;
  PetscCall(CFSteadySetInitialGuess(s));
  PetscCall(CFSteadySolve(s, report));
  PetscFunctionReturn(0);
}

/* A dof-1 field of the solver's scalar DM on rank 0 of its communicator, natural order
   f[j * nx + i] (j down, i outward); an empty vector on the other ranks.  VecDestroy after use. */
static inline PetscErrorCode CFScenarioGather(CFSteady s, Vec field, Vec *zero)
{
  DM         da1;
  Vec        natural;
  VecScatter scatter;

  PetscFunctionBeginUser;
  PetscCall(CFSteadyGetScalarDM(s, &da1));
  PetscCall(DMDACreateNaturalVector(da1, &natural));
  PetscCall(DMDAGlobalToNaturalBegin(da1, field, INSERT_VALUES, natural));
  PetscCall(DMDAGlobalToNaturalEnd(da1, field, INSERT_VALUES, natural));
  PetscCall(VecScatterCreateToZero(natural, &scatter, zero));
  PetscCall(VecScatterBegin(scatter, natural, *zero, INSERT_VALUES, SCATTER_FORWARD));
  PetscCall(VecScatterEnd(scatter, natural, *zero, INSERT_VALUES, SCATTER_FORWARD));
  PetscCall(VecScatterDestroy(&scatter));
  PetscCall(VecDestroy(&natural));
  PetscFunctionReturn(0);
}

/* Temperature (K) of every cell on rank 0, as CFScenarioGather. */
static inline PetscErrorCode CFScenarioGatherTemperature(CFSteady s, Vec *Tzero)
{
  DM  da1;
  Vec T;

  PetscFunctionBeginUser;
  PetscCall(CFSteadyGetScalarDM(s, &da1));
  PetscCall(DMCreateGlobalVector(da1, &T));
  PetscCall(CFSteadyGetFields(s, T, NULL, NULL, NULL, NULL));
  PetscCall(CFScenarioGather(s, T, Tzero));
  PetscCall(VecDestroy(&T));
  PetscFunctionReturn(0);
}

/* Conductive surface heat flow (W m-2) of column i from the three top cell centres (depths dz/2,
   3dz/2, 5dz/2) and the surface value: the derivative at z = 0 of the cubic through the four
   points, dT/dz = (225 T0 - 50 T1 + 9 T2 - 184 Ts) / (60 dz) + O(dz^3) (derived, Lagrange
   interpolation; the quadratic through Ts, T0, T1 gives (9 T0 - T1 - 8 Ts) / (3 dz), with an
   error of dz^2 T_zzz / 8). */
static inline PetscReal CFScenarioSurfaceHeatFlow(const CFConfig *cfg, const PetscScalar *T, PetscInt i)
{
  const PetscReal T0 = PetscRealPart(T[i]), T1 = PetscRealPart(T[cfg->nx + i]), T2 = PetscRealPart(T[2 * cfg->nx + i]);
  return cfg->conductivity * (225.0 * T0 - 50.0 * T1 + 9.0 * T2 - 184.0 * cfg->surface_temperature) / (60.0 * cfg->dz);
}

#endif
