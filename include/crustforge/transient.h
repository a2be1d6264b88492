/* Transient runs (DESIGN 2.2, 2.4): the time-dependent energy equation
     rho cp (dT/dt + v.grad T) = div(k grad T) + rho cp Gamma_ad w_down - L Gamma
   and the depletion carried by the solid, integrated with PETSc's TS (implicit: backward Euler or
   a two-stage L-stable second-order method), under spreading-rate and potential-temperature
   histories; the crust each step makes; checkpoints that restart bit for bit.
   Times are s inside, Myr wherever a user sees them. */
#ifndef CRUSTFORGE_TRANSIENT_H
#define CRUSTFORGE_TRANSIENT_H

#include <petscts.h>
#include <crustforge/config.h>
#include <crustforge/steady.h>
#include <crustforge/crust_series.h>

typedef struct _p_CFTransient *CFTransient;

/* Set up from a validated scenario with cfg->time_end_myr > 0.  Bad time or history keys fail
   with PETSC_ERR_USER_INPUT naming the key. */
PETSC_EXTERN PetscErrorCode CFTransientCreate(MPI_Comm comm, const CFConfig *cfg, CFTransient *tr);
PETSC_EXTERN PetscErrorCode CFTransientDestroy(CFTransient *tr);
/* The state at time 0 from time.start: steady (the steady solution of the time-0 parameters) or
   startup (a uniform adiabat under a cold lid, depletion in equilibrium with it). */
PETSC_EXTERN PetscErrorCode CFTransientSetInitialState(CFTransient tr);
/* One step (the last one shortened to end exactly at time.end); appends to the crust record. */
PETSC_EXTERN PetscErrorCode CFTransientStep(CFTransient tr);
PETSC_EXTERN PetscBool      CFTransientFinished(CFTransient tr);
PETSC_EXTERN PetscErrorCode CFTransientGetTime(CFTransient tr, PetscReal *t, PetscInt *step, PetscReal *dt_next);
/* The steady object whose grid, fields and parameters the transient run shares (its solution is
   the transient state); the flow is at the current plate speed. */
PETSC_EXTERN PetscErrorCode CFTransientGetSteady(CFTransient tr, CFSteady *s);
/* The plate (half) speed (m/s) and potential temperature (K) of the histories at time t (s). */
PETSC_EXTERN PetscErrorCode CFTransientHistories(CFTransient tr, PetscReal t, PetscReal *half_rate, PetscReal *Tp);

/* The crust record: per step, the end time (s), the step (s), the melt production (kg m-1 s-1,
   half domain, per unit ridge length) and the plate speed (m/s).  Arrays belong to tr. */
PETSC_EXTERN PetscErrorCode CFTransientGetCrustRecord(CFTransient tr, PetscInt *n, const PetscReal **t, const PetscReal **dt, const PetscReal **melt, const PetscReal **half_rate);
/* The crust record in the trade's units: against time, and where the plate has carried each
   step's crust by the end of the record.  Free with CFCrustSeriesDestroy. */
PETSC_EXTERN PetscErrorCode CFTransientCrustSeries(CFTransient tr, CFCrustSeries *cs);
PETSC_EXTERN PetscErrorCode CFCrustSeriesDestroy(CFCrustSeries *cs);
/* crust_vs_time.csv and crust_vs_distance.csv in dir (rank 0 writes). */
PETSC_EXTERN PetscErrorCode CFTransientWriteCrustCSV(CFTransient tr, const char dir[]);

/* ---- Checkpoints (checkpoint.c) ---------------------------------------------------------- */
/* Write the full state to path: under path.tmp, flushed to disk, then renamed. */
PETSC_EXTERN PetscErrorCode CFTransientCheckpointWrite(CFTransient tr, const char path[]);
/* Restore the state of a checkpoint of the same scenario into tr (created from the config that
   CFCheckpointReadConfig returned). */
PETSC_EXTERN PetscErrorCode CFTransientCheckpointLoad(CFTransient tr, const char path[]);
/* The scenario of a checkpoint, with the command-line overrides argv[first..argc-1] applied.
   A damaged, truncated or foreign file fails with PETSC_ERR_FILE_UNEXPECTED (missing:
   PETSC_ERR_FILE_OPEN); overrides that change the physics fail with PETSC_ERR_USER_INPUT naming
   the key.  One-line messages. */
PETSC_EXTERN PetscErrorCode CFCheckpointReadConfig(MPI_Comm comm, const char path[], int argc, char **argv, int first, CFConfig *cfg);
/* Fingerprint (16 hex digits) of the keys that set the physics and numerics of a run: every key
   except those a resumed run may change (time.end, time.max_steps, checkpoint.*, snapshots.*,
   output.*, and the post-processor's extraction.*, observables.*, pt_paths.*). */
PETSC_EXTERN PetscErrorCode CFConfigFingerprint(const CFConfig *cfg, char fingerprint[17]);

/* ---- The driver (src/app/transient_run.c) ------------------------------------------------ */
/* A whole transient run from a scenario, or its continuation from a checkpoint. */
PETSC_EXTERN PetscErrorCode CFRunTransient(MPI_Comm comm, const CFConfig *cfg);
PETSC_EXTERN PetscErrorCode CFResumeTransient(MPI_Comm comm, const char checkpoint[], int argc, char **argv);

#endif
