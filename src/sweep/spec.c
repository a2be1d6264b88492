/* The sweep file: the base scenario (read by the config module as any scenario) and the sweep
   section, whose options are -sweep_SECTION_KEY (a list "a,b,c") or -sweep_SECTION_KEY_from,
   _to, _count | _step, _scale (a range). */
#include <math.h>
#include <string.h>
#include <strings.h>
#include <crustforge/sweep.h>

/* Does option name (without '-') belong to the sweep section? */
static PetscBool IsSweepOption(const char *name) { return (PetscBool)(!strncasecmp(name, "sweep_", 6) || !strcasecmp(name, "sweep")); }

static PetscErrorCode ParseList(MPI_Comm comm, const char key[], const char text[], CFSweepAxis *ax)
{
  char buf[PETSC_MAX_PATH_LEN], *save = NULL;

  PetscFunctionBeginUser;
  PetscCall(PetscStrncpy(buf, text, sizeof(buf)));
  ax->n = 0;
  for (char *tok = strtok_r(buf, ",", &save); tok; tok = strtok_r(NULL, ",", &save)) {
    char  *end;
    double v = strtod(tok, &end);
    while (*end == ' ' || *end == '\t') end++;
    PetscCheck(end != tok && !*end && isfinite(v), comm, PETSC_ERR_USER_INPUT, "sweep.%s: '%s' is not a finite number", key, tok);
    PetscCheck(ax->n < CF_SWEEP_MAX_VALUES, comm, PETSC_ERR_USER_INPUT, "sweep.%s: more than %d values", key, CF_SWEEP_MAX_VALUES);
    ax->v[ax->n++] = (PetscReal)v;
  }
  PetscCheck(ax->n > 0, comm, PETSC_ERR_USER_INPUT, "sweep.%s: an empty list (give values [a, b, ...] or a range {from, to, count})", key);
  PetscFunctionReturn(0);
}

/* {from, to, count} or {from, to, step}; scale log spaces count values geometrically. */
static PetscErrorCode ParseRange(MPI_Comm comm, const char key[], const char opt[], CFSweepAxis *ax)
{
  char      name[256], scale[16] = "linear";
  PetscReal from, to, step = 0, count = 0;
  PetscBool has_from, has_to, has_step, has_count, is_log;

  PetscFunctionBeginUser;
  PetscCall(PetscSNPrintf(name, sizeof(name), "%s_from", opt));
  PetscCall(PetscOptionsGetReal(NULL, NULL, name, &from, &has_from));
  PetscCall(PetscSNPrintf(name, sizeof(name), "%s_to", opt));
  PetscCall(PetscOptionsGetReal(NULL, NULL, name, &to, &has_to));
  PetscCall(PetscSNPrintf(name, sizeof(name), "%s_step", opt));
  PetscCall(PetscOptionsGetReal(NULL, NULL, name, &step, &has_step));
  PetscCall(PetscSNPrintf(name, sizeof(name), "%s_count", opt));
  PetscCall(PetscOptionsGetReal(NULL, NULL, name, &count, &has_count));
  PetscCall(PetscSNPrintf(name, sizeof(name), "%s_scale", opt));
  PetscCall(PetscOptionsGetString(NULL, NULL, name, scale, sizeof(scale), NULL));
  PetscCheck(has_from && has_to, comm, PETSC_ERR_USER_INPUT, "sweep.%s: a range needs from and to", key);
  PetscCheck(has_step != has_count, comm, PETSC_ERR_USER_INPUT, "sweep.%s: a range needs either count or step", key);
  PetscCheck(!strcasecmp(scale, "linear") || !strcasecmp(scale, "log"), comm, PETSC_ERR_USER_INPUT, "sweep.%s.scale: '%s' is neither linear nor log", key, scale);
  is_log = (PetscBool)!strcasecmp(scale, "log");
  PetscCheck(!is_log || (from > 0 && to > 0), comm, PETSC_ERR_USER_INPUT, "sweep.%s: a log range needs from and to above 0", key);
  if (has_step) {
    PetscCheck(!is_log, comm, PETSC_ERR_USER_INPUT, "sweep.%s: a log range takes count, not step", key);
    PetscCheck(step > 0, comm, PETSC_ERR_USER_INPUT, "sweep.%s.step: %g is not above 0", key, (double)step);
    count = PetscFloorReal(PetscAbsReal(to - from) / step * (1 + 1e-12)) + 1;
    if (to < from) step = -step;
  } else {
    PetscCheck(count >= 1 && count == PetscFloorReal(count), comm, PETSC_ERR_USER_INPUT, "sweep.%s.count: %g is not a whole number of at least 1", key, (double)count);
    step = count > 1 ? (to - from) / (count - 1) : 0;
  }
  PetscCheck(count <= CF_SWEEP_MAX_VALUES, comm, PETSC_ERR_USER_INPUT, "sweep.%s: %g values (at most %d)", key, (double)count, CF_SWEEP_MAX_VALUES);
  ax->n = (PetscInt)count;
  for (PetscInt k = 0; k < ax->n; k++) {
    if (is_log) ax->v[k] = ax->n > 1 ? from * PetscPowReal(to / from, (PetscReal)k / (ax->n - 1)) : from;
    else ax->v[k] = from + k * step;
  }
  if (has_count && ax->n > 1) ax->v[ax->n - 1] = to; /* exactly the end the user wrote */
  PetscFunctionReturn(0);
}

static PetscErrorCode ReadSettings(MPI_Comm comm, CFSweep *sw)
{
  PetscInt  rpc = 1;
  PetscBool set;

  PetscFunctionBeginUser;
  PetscCall(PetscOptionsGetInt(NULL, NULL, "-sweep_ranks_per_case", &rpc, &set));
  PetscCheck(rpc >= 1, comm, PETSC_ERR_USER_INPUT, "sweep.ranks_per_case: %" PetscInt_FMT " is not at least 1", rpc);
  sw->ranks_per_case = rpc;
  sw->continuation   = PETSC_FALSE; /* measured on the demonstration sweep: more Newton iterations than the grid-sequenced cold start */
  sw->run_files      = PETSC_FALSE;
  PetscCall(PetscOptionsGetBool(NULL, NULL, "-sweep_continuation", &sw->continuation, NULL));
  PetscCall(PetscOptionsGetBool(NULL, NULL, "-sweep_run_files", &sw->run_files, NULL));
  PetscFunctionReturn(0);
}

/* Every numeric key of the scenario may be swept; the others (text, flags, lists) may not. */
static PetscErrorCode ReadAxes(MPI_Comm comm, CFSweep *sw)
{
  PetscInt       n;
  CFConfigEntry *e;

  PetscFunctionBeginUser;
  PetscCall(CFConfigGetEntries(&sw->base, &n, &e));
  sw->naxes = 0;
  for (PetscInt i = 0; i < n; i++) {
    char      opt[2 * CF_NAME_LEN + 8], name[2 * CF_NAME_LEN + 16], text[PETSC_MAX_PATH_LEN];
    PetscBool list, range;

    PetscCall(PetscSNPrintf(opt, sizeof(opt), "-sweep_%s", e[i].option + 1));
    PetscCall(PetscOptionsGetString(NULL, NULL, opt, text, sizeof(text), &list));
    PetscCall(PetscSNPrintf(name, sizeof(name), "%s_from", opt));
    PetscCall(PetscOptionsHasName(NULL, NULL, name, &range));
    if (!list && !range) continue;
    PetscCheck(e[i].is_real, comm, PETSC_ERR_USER_INPUT, "sweep.%s: only numeric keys can be swept", e[i].key);
    PetscCheck(!(list && range), comm, PETSC_ERR_USER_INPUT, "sweep.%s: give a list or a range, not both", e[i].key);
    PetscCheck(sw->naxes < CF_SWEEP_MAX_AXES, comm, PETSC_ERR_USER_INPUT, "sweep: more than %d keys swept", CF_SWEEP_MAX_AXES);
    {
      CFSweepAxis *ax = &sw->axis[sw->naxes++];
      PetscCall(PetscStrncpy(ax->key, e[i].key, sizeof(ax->key)));
      PetscCall(PetscStrncpy(ax->option, e[i].option, sizeof(ax->option)));
      PetscCall(PetscStrncpy(ax->unit, e[i].unit, sizeof(ax->unit)));
      if (list) PetscCall(ParseList(comm, ax->key, text, ax));
      else PetscCall(ParseRange(comm, ax->key, opt, ax));
    }
  }
  PetscCall(PetscFree(e));
  PetscFunctionReturn(0);
}

/* A sweep option left unread is a misspelled key or range part. */
static PetscErrorCode CheckUnknown(MPI_Comm comm)
{
  PetscInt n;
  char   **names, **values, bad[256] = "";

  PetscFunctionBeginUser;
  PetscCall(PetscOptionsLeftGet(NULL, &n, &names, &values));
  for (PetscInt i = 0; i < n && !bad[0]; i++) {
    const char *name = names[i][0] == '-' ? names[i] + 1 : names[i];
    if (IsSweepOption(name)) PetscCall(PetscStrncpy(bad, name, sizeof(bad)));
  }
  PetscCall(PetscOptionsLeftRestore(NULL, &n, &names, &values));
  PetscCheck(!bad[0], comm, PETSC_ERR_USER_INPUT, "sweep: unknown key '%s' (write sweep: {section: {key: [values]}} or a range {from, to, count | step}, for a numeric scenario key; or ranks_per_case, continuation, run_files)", bad);
  PetscFunctionReturn(0);
}

PetscErrorCode CFSweepLoad(MPI_Comm comm, const char file[], int argc, char **argv, CFSweep *sw)
{
  PetscFunctionBeginUser;
  PetscCall(PetscMemzero(sw, sizeof(*sw)));
  PetscCall(PetscStrncpy(sw->file, file, sizeof(sw->file)));
  PetscCall(CFConfigLoad(comm, file, argc, argv, &sw->base));
  PetscCall(ReadSettings(comm, sw));
  PetscCall(ReadAxes(comm, sw));
  PetscCall(CheckUnknown(comm));
  PetscCheck(sw->naxes > 0, comm, PETSC_ERR_USER_INPUT, "sweep: no key is swept (add e.g. sweep: {ridge: {full_spreading_rate: [10, 20, 60]}})");
  PetscCall(CFSweepCasesCreate(comm, sw));
  PetscFunctionReturn(0);
}

PetscErrorCode CFSweepDestroy(CFSweep *sw)
{
  PetscFunctionBeginUser;
  PetscCall(PetscFree(sw->cases));
  sw->ncases = 0;
  PetscFunctionReturn(0);
}
