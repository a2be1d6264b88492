/* Melting models behind one interface.  A model is a CFMeltingType: a name, a table of its
   published parameters, and pointwise functions.  Adding a model adds one file and one line in
   src/melting/registry.c; nothing in the solver changes.
   Pointwise functions take SI (P in Pa, T in K) and bulk water in ppm by weight, make no PETSc
   calls and touch no shared state, so they are safe inside OpenMP loops. */
#ifndef CRUSTFORGE_MELTING_H
#define CRUSTFORGE_MELTING_H

#include <petscsys.h>
#include <crustforge/config.h>

typedef struct {
  const char *key;   /* option key in the model's section: -<model>_<key> */
  const char *unit;  /* the unit the published coefficient is stated in */
  PetscReal   value; /* published default */
  PetscReal   lo, hi;/* allowed range, inclusive */
  const char *help;  /* meaning and source */
} CFMeltingParamInfo;

typedef struct {
  const char               *name;
  const char               *description;
  PetscInt                  nparams;
  const CFMeltingParamInfo *params;
  /* Solidus and liquidus temperature (K) at pressure P (Pa) for bulk water w (ppm). */
  PetscReal (*solidus)(const PetscReal par[], PetscReal P, PetscReal water_ppm);
  PetscReal (*liquidus)(const PetscReal par[], PetscReal P, PetscReal water_ppm);
  /* Equilibrium melt fraction F in [0,1] and dF/dT (K-1) at (P, T, w).
     Returns 0 on success, non-zero when no answer can be guaranteed (then F is NaN).
     Below the solidus F and dF/dT are exactly 0: the steady solver takes them as 0 without a
     call wherever T is more than CF_SOLIDUS_MARGIN below the solidus. */
  int (*melt_fraction)(const PetscReal par[], PetscReal P, PetscReal T, PetscReal water_ppm, PetscReal *F, PetscReal *dFdT);
} CFMeltingType;

/* K; far above the round-off between a model's solidus and its melt fraction */
#define CF_SOLIDUS_MARGIN 1.0e-6

/* The registered model called name, or NULL. */
PETSC_EXTERN const CFMeltingType *CFMeltingTypeFind(const char name[]);
/* Number of registered models and the i-th one (for help and validation messages). */
PETSC_EXTERN PetscInt             CFMeltingTypeCount(void);
PETSC_EXTERN const CFMeltingType *CFMeltingTypeGet(PetscInt i);

/* A model bound to its parameters and the bulk water of a scenario. */
typedef struct _p_CFMeltingModel *CFMeltingModel;

PETSC_EXTERN PetscErrorCode CFMeltingModelCreate(const CFConfig *cfg, CFMeltingModel *model);
PETSC_EXTERN PetscErrorCode CFMeltingModelDestroy(CFMeltingModel *model);
PETSC_EXTERN PetscErrorCode CFMeltingModelView(CFMeltingModel model, PetscViewer viewer);
PETSC_EXTERN const char    *CFMeltingModelName(CFMeltingModel model);
PETSC_EXTERN PetscErrorCode CFMeltingModelSolidus(CFMeltingModel model, PetscReal P, PetscReal *T);
PETSC_EXTERN PetscErrorCode CFMeltingModelLiquidus(CFMeltingModel model, PetscReal P, PetscReal *T);
PETSC_EXTERN PetscErrorCode CFMeltingModelMeltFraction(CFMeltingModel model, PetscReal P, PetscReal T, PetscReal *F, PetscReal *dFdT);
/* The same over n points, threaded with OpenMP; dFdT may be NULL.  Identical for any thread count. */
PETSC_EXTERN PetscErrorCode CFMeltingModelMeltFractionArray(CFMeltingModel model, PetscInt n, const PetscReal P[], const PetscReal T[], PetscReal F[], PetscReal dFdT[]);

#endif
