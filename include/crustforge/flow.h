/* Mantle flow: the isoviscous corner flow driven by two plates moving apart at the half rate U0
   (Batchelor 1967; Reid & Jackson 1981).  Stream function psi = (2 U0 / pi) z atan(x / z), with
   x the distance from the axis and z depth (down); u = dpsi/dz outward, w_up = dpsi/dx upward.
   The module knows nothing about temperature.  Discrete volume fluxes are differences of psi at
   cell corners, so every cell's net flux vanishes to round-off. */
#ifndef CRUSTFORGE_FLOW_H
#define CRUSTFORGE_FLOW_H

#include <petscdmda.h>
#include <crustforge/config.h>

typedef struct _p_CFFlow *CFFlow;

PETSC_EXTERN PetscErrorCode CFFlowCreate(const CFConfig *cfg, CFFlow *flow);
PETSC_EXTERN PetscErrorCode CFFlowDestroy(CFFlow *flow);
/* Change the plate speed (m/s): the pattern is the same, scaled (transient runs). */
PETSC_EXTERN PetscErrorCode CFFlowSetHalfRate(CFFlow flow, PetscReal half_rate);
PETSC_EXTERN PetscReal      CFFlowHalfRate(CFFlow flow);

/* Stream function (m2/s, per unit ridge length) and velocity (m/s) at a point. */
PETSC_EXTERN PetscReal CFFlowStreamFunction(CFFlow flow, PetscReal x, PetscReal z);
PETSC_EXTERN void      CFFlowVelocity(CFFlow flow, PetscReal x, PetscReal z, PetscReal *u, PetscReal *w_up);

/* psi at the cell corners (I dx, J dz) for I0 <= I < I0 + nI, J0 <= J < J0 + nJ, stored
   psi[(J - J0) * nI + (I - I0)].  The flux through a cell face is the difference of its corners. */
PETSC_EXTERN PetscErrorCode CFFlowCornerStreamFunction(CFFlow flow, PetscReal dx, PetscReal dz, PetscInt I0, PetscInt nI, PetscInt J0, PetscInt nJ, PetscReal psi[]);

/* Cell-centre fields on a cell-centred DMDA (dof 1) with spacing dx, dz: outward and upward
   velocity (m/s) and the stream function (m2/s). */
PETSC_EXTERN PetscErrorCode CFFlowCellFields(CFFlow flow, DM da, PetscReal dx, PetscReal dz, Vec u, Vec w_up, Vec psi);

#endif
