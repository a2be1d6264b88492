/* The cases of a sweep: the Cartesian product of its axes, the first axis fastest, each case's
   scenario validated by the config module exactly as a single run's would be. */
#include <string.h>
#include <crustforge/sweep.h>

PetscInt CFSweepCaseIndex(const CFSweep *sw, PetscInt c, PetscInt a)
{
  for (PetscInt k = 0; k < a; k++) c /= sw->axis[k].n;
  return c % sw->axis[a].n;
}

PetscInt CFSweepCaseDistance(const CFSweep *sw, PetscInt a, PetscInt b)
{
  const CFConfig *ca = &sw->cases[a], *cb = &sw->cases[b];
  PetscInt        d  = 0;

  if (ca->nx != cb->nx || ca->nz != cb->nz) return PETSC_MAX_INT;
  for (PetscInt k = 0; k < sw->naxes; k++) d += PetscAbsInt(CFSweepCaseIndex(sw, a, k) - CFSweepCaseIndex(sw, b, k));
  return d;
}

void CFSweepCaseLabel(const CFSweep *sw, PetscInt c, char text[], size_t len)
{
  size_t n = 0;

  text[0] = 0;
  for (PetscInt k = 0; k < sw->naxes && n < len; k++) {
    int w = snprintf(text + n, len - n, "%s%s=%.15g", k ? " " : "", sw->axis[k].key, (double)sw->axis[k].v[CFSweepCaseIndex(sw, c, k)]);
    n += w > 0 ? (size_t)w : 0;
  }
}

/* Set (value non-NULL) or clear an option of the database. */
static PetscErrorCode SetOption(const char option[], const char value[])
{
  PetscFunctionBeginUser;
  if (value) PetscCall(PetscOptionsSetValue(NULL, option, value));
  else PetscCall(PetscOptionsClearValue(NULL, option));
  PetscFunctionReturn(0);
}

/* Read case c's scenario; a bad value fails naming the case's key and value (the config
   module's message), before any case runs. */
static PetscErrorCode ReadCase(MPI_Comm comm, CFSweep *sw, PetscInt c)
{
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  for (PetscInt k = 0; k < sw->naxes; k++) {
    char v[64];
    (void)snprintf(v, sizeof(v), "%.17g", (double)sw->axis[k].v[CFSweepCaseIndex(sw, c, k)]);
    PetscCall(SetOption(sw->axis[k].option, v));
  }
  PetscCall(PetscPushErrorHandler(PetscReturnErrorHandler, NULL));
  ierr = CFConfigSetFromOptions(comm, &sw->cases[c]);
  PetscCall(PetscPopErrorHandler());
  if (ierr) {
    const char *text;
    char       *specific = NULL, msg[1024];
    PetscCall(PetscErrorMessage(ierr, &text, &specific));
    PetscCall(PetscStrncpy(msg, specific && specific[0] ? specific : text, sizeof(msg)));
    SETERRQ(comm, ierr, "sweep value refused: %s", msg);
  }
  PetscCall(PetscStrncpy(sw->cases[c].scenario, sw->file, sizeof(sw->cases[c].scenario)));
  PetscFunctionReturn(0);
}

PetscErrorCode CFSweepCasesCreate(MPI_Comm comm, CFSweep *sw)
{
  char      saved[CF_SWEEP_MAX_AXES][PETSC_MAX_PATH_LEN];
  PetscBool had[CF_SWEEP_MAX_AXES];
  double    n = 1;

  PetscFunctionBeginUser;
  for (PetscInt k = 0; k < sw->naxes; k++) n *= sw->axis[k].n;
  PetscCheck(n <= CF_SWEEP_MAX_CASES, comm, PETSC_ERR_USER_INPUT, "sweep: %g cases (at most %d)", n, CF_SWEEP_MAX_CASES);
  sw->ncases = (PetscInt)n;
  PetscCall(PetscCalloc1(sw->ncases, &sw->cases));
  for (PetscInt k = 0; k < sw->naxes; k++) PetscCall(PetscOptionsGetString(NULL, NULL, sw->axis[k].option, saved[k], sizeof(saved[k]), &had[k]));
  /* all cases are read before any runs: the first bad value stops the sweep before it starts */
  {
    PetscErrorCode ierr = 0;
    for (PetscInt c = 0; c < sw->ncases && !ierr; c++) ierr = ReadCase(comm, sw, c);
    if (ierr) { /* refused before any case runs: nothing of the sweep is kept */
      PetscCall(PetscFree(sw->cases));
      sw->ncases = 0;
      PetscCall(ierr);
    }
  }
  for (PetscInt k = 0; k < sw->naxes; k++) PetscCall(SetOption(sw->axis[k].option, had[k] ? saved[k] : NULL));
  PetscFunctionReturn(0);
}
