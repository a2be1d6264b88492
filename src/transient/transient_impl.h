/* Private to the transient module: the object, histories, crust record, signals, progress. */
#ifndef CRUSTFORGE_TRANSIENT_IMPL_H
#define CRUSTFORGE_TRANSIENT_IMPL_H

#include <crustforge/transient.h>
#include "../thermal/steady_impl.h"

#define CF_HISTORY_MAX (CF_REAL_LIST_MAX / 2)

/* A piecewise-linear function of time (s), constant beyond its ends; values SI. */
typedef struct {
  PetscInt  n;
  PetscReal t[CF_HISTORY_MAX], v[CF_HISTORY_MAX];
} CFHistory;

/* From a key's list of (Myr, user unit) pairs; constant (SI) when the list is empty.  Values
   outside [lo, hi] (user unit), times not increasing or an odd count: PETSC_ERR_USER_INPUT. */
PetscErrorCode CFHistoryFromList(MPI_Comm comm, const char key[], const CFRealList *list, PetscReal constant, PetscReal lo, PetscReal hi, PetscBool lo_open, PetscReal (*to_si)(PetscReal), CFHistory *h);
PetscReal      CFHistoryValue(const CFHistory *h, PetscReal t);
/* integral of the function from a to b (exact for the piecewise-linear function). */
PetscReal      CFHistoryIntegral(const CFHistory *h, PetscReal a, PetscReal b);

typedef struct {
  PetscInt   n, cap;
  PetscReal *t, *dt, *melt, *U;
} CFCrustRecord;

PetscErrorCode CFCrustRecordAppend(CFCrustRecord *r, PetscReal t, PetscReal dt, PetscReal melt, PetscReal U);
PetscErrorCode CFCrustRecordDestroy(CFCrustRecord *r);

struct _p_CFTransient {
  MPI_Comm      comm;
  CFConfig      cfg;
  CFSteady      s;
  TS            ts;
  DM            da; /* the TS's: the layout of the steady solver's */
  Mat           J;
  MatFDColoring color;
  Vec           Xprev; /* state at the start of the step (melt production of the step) */
  CFHistory     rate, temperature; /* half rate (m/s), potential temperature (K) */
  PetscReal    *psi_ref;           /* corner stream function at the reference speed */
  PetscReal     U_ref, theta, t_end; /* reference speed of psi_ref; diagonal of the method */
  CFCrustRecord rec;
};

/* The TS, once (ts.c): after the steady solve of the initial state, before a checkpoint load. */
PetscErrorCode CFTransientSetUpTS(CFTransient tr);
/* Put the flow and the bottom temperature of time t into the residual context. */
PetscErrorCode CFTransientSetParameters(CFTransient tr, PetscReal t);
/* Melt production (kg m-1 s-1, half domain) of the step from Xold to X over dt. */
PetscErrorCode CFTransientMeltProduction(CFTransient tr, Vec Xold, Vec X, PetscReal dt, PetscReal *melt);

/* Whether a resumed run may change key "section.name" (fingerprint.c). */
PetscBool CFConfigKeyMayChange(const char key[]);
/* Remove all but the newest keep files checkpoint_*.h5 of dir (rank 0; checkpoint.c). */
PetscErrorCode CFCheckpointRotate(MPI_Comm comm, const char dir[], PetscInt keep);

/* A run file of the current state at path (snapshots.c), and dir/series.xdmf over the
   snapshot files in dir. */
PetscErrorCode CFTransientWriteRunFile(CFTransient tr, const char path[]);
PetscErrorCode CFTransientWriteSeries(CFTransient tr, const char dir[]);

/* SIGINT and SIGTERM: remember the signal, let the step finish (signals.c). */
PetscErrorCode CFSignalsInstall(void);
PetscErrorCode CFSignalsRestore(void);
/* The signal received on any rank (0: none).  Collective. */
PetscErrorCode CFSignalsPending(MPI_Comm comm, int *signo);

/* A progress line on stderr (rank 0): a bar with an estimated finish on a terminal, plain lines
   otherwise (progress.c). */
typedef struct {
  PetscBool tty;
  double    wall0, last;
  PetscReal t0;
} CFProgress;
void CFProgressBegin(CFProgress *p, MPI_Comm comm, PetscReal t0);
void CFProgressUpdate(CFProgress *p, MPI_Comm comm, PetscReal t, PetscReal t_end, PetscInt step, PetscReal dt, PetscReal H, PetscBool force);
void CFProgressEnd(CFProgress *p, MPI_Comm comm);

#endif
