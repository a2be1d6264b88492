/* The steady coupled problem: temperature (DESIGN 2.2) and depletion (2.4) on one cell-centred
   DMDA with two unknowns per cell, solved together by Newton's method (SNES) so that latent heat
   and melting stay consistent.  The object owns its DMDA, SNES, solution and work arrays. */
#ifndef CRUSTFORGE_STEADY_H
#define CRUSTFORGE_STEADY_H

#include <petscsnes.h>
#include <crustforge/config.h>
#include <crustforge/flow.h>
#include <crustforge/melting.h>

typedef struct _p_CFSteady *CFSteady;

/* Unknowns of one cell: temperature (K) and depletion F_d (extent of melting of the solid). */
typedef struct {
  PetscScalar T, F;
} CFCellState;

/* A pointwise function of position (m), and temperature (K) where it matters; for verification. */
typedef PetscReal (*CFPointFunction)(PetscReal x, PetscReal z, PetscReal T, void *ctx);

typedef struct {
  PetscInt           nonlinear_iterations, linear_iterations;
  PetscReal          initial_residual, final_residual; /* scaled 2-norms (K) */
  PetscReal          seconds;
  SNESConvergedReason reason;
} CFSolveReport;

PETSC_EXTERN PetscErrorCode CFSteadyCreate(MPI_Comm comm, const CFConfig *cfg, CFSteady *s);
PETSC_EXTERN PetscErrorCode CFSteadyDestroy(CFSteady *s);
/* Verification hooks: replace the conductivity model k(x, z, T) (W m-1 K-1) and add a heat source
   (W m-3).  Either may be NULL. */
PETSC_EXTERN PetscErrorCode CFSteadySetConductivityFunction(CFSteady s, CFPointFunction k, void *ctx);
PETSC_EXTERN PetscErrorCode CFSteadySetHeatSource(CFSteady s, CFPointFunction q, void *ctx);
/* Fill the solution with a cooling-plate temperature and the depletion it implies. */
PETSC_EXTERN PetscErrorCode CFSteadySetInitialGuess(CFSteady s);
/* The same, improved by grid sequencing: solve on grids 2, 4, ... times coarser (down to the
   spacing -steady_coarsest_spacing, km, default 8) and interpolate.  Reports the levels used and
   the Newton iterations spent on them. */
PETSC_EXTERN PetscErrorCode CFSteadySequenceInitialGuess(CFSteady s, PetscInt *levels, PetscInt *coarse_iterations);
/* Continuation (sweeps): start from the solution X of another CFSteady on a grid of the same
   size and layout (a neighbouring case): its temperature, with the depletion that temperature
   implies under s's own parameters (the exact upstream sweep). */
PETSC_EXTERN PetscErrorCode CFSteadyCopySolution(CFSteady s, Vec X);
/* Solve from the current solution.  Non-convergence is PETSC_ERR_NOT_CONVERGED naming PETSc's
   reason; the report is filled either way. */
PETSC_EXTERN PetscErrorCode CFSteadySolve(CFSteady s, CFSolveReport *report);

PETSC_EXTERN PetscErrorCode CFSteadyGetDM(CFSteady s, DM *da);       /* dof 2 */
PETSC_EXTERN PetscErrorCode CFSteadyGetScalarDM(CFSteady s, DM *da); /* dof 1, same layout */
PETSC_EXTERN PetscErrorCode CFSteadyGetSolution(CFSteady s, Vec *X);
PETSC_EXTERN PetscErrorCode CFSteadyGetFlow(CFSteady s, CFFlow *flow);
PETSC_EXTERN PetscErrorCode CFSteadyGetMeltingModel(CFSteady s, CFMeltingModel *model);
PETSC_EXTERN const CFConfig *CFSteadyGetConfig(CFSteady s);

/* Derived cell fields into dof-1 vectors of the scalar DM (any may be NULL): temperature (K),
   depletion, equilibrium melt fraction, melting rate (kg m-3 s-1), effective conductivity. */
PETSC_EXTERN PetscErrorCode CFSteadyGetFields(CFSteady s, Vec T, Vec F, Vec Feq, Vec Gamma, Vec k);
/* Lithostatic pressure rho_m g z (Pa) at the cell centres. */
PETSC_EXTERN PetscErrorCode CFSteadyGetPressure(CFSteady s, Vec P);
/* Crustal thickness (m) from the integrated melting rate and from the depletion flux through the
   far side, both per half domain: H = integral(Gamma dA) / (rho_c U0). */
PETSC_EXTERN PetscErrorCode CFSteadyCrustalThickness(CFSteady s, PetscReal *H_melting, PetscReal *H_side);

#endif
