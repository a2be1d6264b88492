/* The crust made by a transient run, in the trade's units: one entry per time step. */
#ifndef CRUSTFORGE_CRUST_SERIES_H
#define CRUSTFORGE_CRUST_SERIES_H

#include <petscsys.h>

typedef struct {
  PetscInt   n;
  PetscReal *time_myr;              /* end of the step */
  PetscReal *full_rate_mm_yr;       /* full spreading rate during the step */
  PetscReal *accretion_km2_per_myr; /* crust area added to one flank per unit ridge length */
  PetscReal *thickness_km;          /* thickness of the crust made in the step */
  PetscReal *distance_km;           /* where the plate has carried it by the end of the record */
  PetscReal *formed_at_myr, *age_myr;
} CFCrustSeries;

#endif
