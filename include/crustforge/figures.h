/* Figures of a finished run: PNG files drawn with PLplot's pngcairo device.
   Rank 0 only: call these from one process (rank 0 of the run's communicator, which holds the
   gathered CFRunData fields); they do no communication.  Each figure is written under a
   temporary name in dir and renamed into place, so a figure file is either complete or absent.
   Every figure opens its own PLplot stream and ends it, and the caller's current PLplot stream
   is current again on return, also after an error. */
#ifndef CRUSTFORGE_FIGURES_H
#define CRUSTFORGE_FIGURES_H

#include <crustforge/rundata.h>
#include <crustforge/postprocess.h>
#include <crustforge/crust_series.h>

#define CF_FIGURE_WIDTH_PX  1200
#define CF_FIGURE_HEIGHT_PX 800

/* The part of the section a field figure shows, from the axis and the surface (m).
   A value <= 0 takes the default: the full width, and depth to 150 km (or the domain's depth). */
typedef struct {
  PetscReal width, depth;
} CFFigureWindow;

/* Whether the pngcairo device is there, asked of PLplot's driver list without opening a stream
   (plinit prompts on stdin or exits the process when the device is missing). */
PETSC_EXTERN PetscErrorCode CFFiguresAvailable(PetscBool *ok);

/* Field sections (window may be NULL for the default), with streamlines and the outline of the
   melting region: temperature.png (labelled isotherms), depletion.png, melting_rate.png. */
PETSC_EXTERN PetscErrorCode CFFigureTemperature(const CFRunData *run, const CFFigureWindow *window, const char dir[]);
PETSC_EXTERN PetscErrorCode CFFigureDepletion(const CFRunData *run, const CFFigureWindow *window, const char dir[]);
PETSC_EXTERN PetscErrorCode CFFigureMeltingRate(const CFRunData *run, const CFFigureWindow *window, const char dir[]);
/* pt_paths.png: the parcels' pressure-temperature paths over the melting model's solidus and
   liquidus, pressure increasing downward. */
PETSC_EXTERN PetscErrorCode CFFigurePTPaths(const CFRunData *run, const CFPTPaths *paths, const char dir[]);
/* heat_flow.png and seafloor_depth.png against plate age: the model, half-space cooling with the
   run's parameters, and the empirical fits of Parsons & Sclater (1977) and Stein & Stein (1992).
   ridge_depth (m) is the seafloor depth at the axis that the half-space curve starts from. */
PETSC_EXTERN PetscErrorCode CFFigureHeatFlow(const CFRunData *run, const CFProfiles *prof, const char dir[]);
PETSC_EXTERN PetscErrorCode CFFigureSeafloorDepth(const CFRunData *run, const CFProfiles *prof, PetscReal ridge_depth, const char dir[]);
/* All of the above into dir, the field figures with the default window. */
/* crust_history.png: crustal thickness and spreading rate against time, and the crustal
   thickness profile across the flank that the history leaves.  Rank 0 only. */
PETSC_EXTERN PetscErrorCode CFFigureCrustHistory(const CFConfig *cfg, const CFCrustSeries *cs, const char dir[]);
PETSC_EXTERN PetscErrorCode CFFiguresWriteAll(const CFRunData *run, const CFProfiles *prof, const CFPTPaths *paths, const char dir[]);

/* ---- Reference curves drawn beside the model (SI: t in s, results in W m-2 and m) ---------- */
/* Half-space cooling with the run's parameters (Turcotte & Schubert, Geodynamics, 2nd ed.,
   sections 4.15-4.17): kappa = k / (rho_m cp), dT = Tp - T_surface. */
typedef struct {
  PetscReal conductivity, diffusivity, temperature_difference, expansivity, mantle_density, water_density;
} CFCoolingParams;

PETSC_EXTERN void      CFCoolingParamsFromConfig(const CFConfig *cfg, CFCoolingParams *cp);
/* q = k dT / sqrt(pi kappa t) */
PETSC_EXTERN PetscReal CFHalfSpaceHeatFlow(const CFCoolingParams *cp, PetscReal t);
/* w = 2 rho_m alpha dT / (rho_m - rho_w) sqrt(kappa t / pi), depth below the ridge crest */
PETSC_EXTERN PetscReal CFHalfSpaceSubsidence(const CFCoolingParams *cp, PetscReal t);

typedef enum { CF_FIT_PARSONS_SCLATER_1977, CF_FIT_STEIN_STEIN_1992, CF_NFITS } CFEmpiricalFit;
/* The fit's name for a legend ("Parsons & Sclater (1977)"). */
PETSC_EXTERN const char *CFEmpiricalFitName(CFEmpiricalFit fit);
/* The fit's heat flow (W m-2) and seafloor depth (m) at age t; NaN outside the age range it was
   fitted over (and at t <= 0). */
PETSC_EXTERN PetscReal   CFEmpiricalHeatFlow(CFEmpiricalFit fit, PetscReal t);
PETSC_EXTERN PetscReal   CFEmpiricalDepth(CFEmpiricalFit fit, PetscReal t);

#endif
