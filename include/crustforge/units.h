/* Unit conversions: the one place where the trade's units meet SI.
   Everything inside the solver is SI (m, s, K, Pa, kg); names of anything else say so. */
#ifndef CRUSTFORGE_UNITS_H
#define CRUSTFORGE_UNITS_H

#include <petscsys.h>

#define CF_SECONDS_PER_YEAR 3.15576e7 /* Julian year, IAU convention */
#define CF_KELVIN_OFFSET    273.15

static inline PetscReal CFKmToM(PetscReal km) { return km * 1.0e3; }
static inline PetscReal CFMToKm(PetscReal m) { return m * 1.0e-3; }
static inline PetscReal CFCelsiusToKelvin(PetscReal c) { return c + CF_KELVIN_OFFSET; }
static inline PetscReal CFKelvinToCelsius(PetscReal k) { return k - CF_KELVIN_OFFSET; }
static inline PetscReal CFMyrToS(PetscReal myr) { return myr * 1.0e6 * CF_SECONDS_PER_YEAR; }
static inline PetscReal CFSToMyr(PetscReal s) { return s / (1.0e6 * CF_SECONDS_PER_YEAR); }
static inline PetscReal CFPaToGPa(PetscReal pa) { return pa * 1.0e-9; }
static inline PetscReal CFGPaToPa(PetscReal gpa) { return gpa * 1.0e9; }
/* A speed in mm/yr to m/s. */
static inline PetscReal CFMmPerYrToMPerS(PetscReal mm_yr) { return mm_yr * 1.0e-3 / CF_SECONDS_PER_YEAR; }
static inline PetscReal CFMPerSToMmPerYr(PetscReal m_s) { return m_s * 1.0e3 * CF_SECONDS_PER_YEAR; }
/* The plate (half) speed in m/s from the full spreading rate in mm/yr: each plate moves at half. */
static inline PetscReal CFHalfRateFromFullMmPerYr(PetscReal full_mm_yr) { return 0.5 * CFMmPerYrToMPerS(full_mm_yr); }
/* A gradient in K/km to K/m. */
static inline PetscReal CFPerKmToPerM(PetscReal per_km) { return per_km * 1.0e-3; }
/* A mass fraction in ppm to wt% (1 wt% = 1e4 ppm). */
static inline PetscReal CFPpmToWtPercent(PetscReal ppm) { return ppm * 1.0e-4; }

#endif
