/* Scenario loading and validation: the only reader of model parameters from the options
   database.  Table-driven from src/config/keys.c. */
#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <crustforge/config.h>
#include <crustforge/melting.h>
#include <crustforge/units.h>
#include "keys.h"
#include "resources.h"
#include "scan.h"

PetscReal CFKeyToSI(const CFKey *key, PetscReal v)
{
  switch (key->conv) {
  case CF_CONV_KM:      return CFKmToM(v);
  case CF_CONV_CELSIUS: return CFCelsiusToKelvin(v);
  case CF_CONV_PER_KM:  return CFPerKmToPerM(v);
  default:              return v;
  }
}

PetscReal CFKeyFromSI(const CFKey *key, PetscReal v)
{
  switch (key->conv) {
  case CF_CONV_KM:      return CFMToKm(v);
  case CF_CONV_CELSIUS: return CFKelvinToCelsius(v);
  case CF_CONV_PER_KM:  return v * 1.0e3;
  default:              return v;
  }
}

PetscBool CFParseReal(const char *text, PetscReal *v)
{
  char  *end;
  double d;

  if (!text) return PETSC_FALSE;
  while (*text == ' ' || *text == '\t') text++;
  if (!*text) return PETSC_FALSE;
  errno = 0;
  d     = strtod(text, &end);
  while (*end == ' ' || *end == '\t') end++;
  if (*end || errno == ERANGE || !isfinite(d)) return PETSC_FALSE;
  *v = (PetscReal)d;
  return PETSC_TRUE;
}

PetscBool CFParseBool(const char *text, PetscBool *v)
{
  static const char *yes[] = {"", "true", "yes", "on", "1"}, *no[] = {"false", "no", "off", "0"};
  for (size_t i = 0; i < sizeof(yes) / sizeof(yes[0]); i++)
    if (!strcasecmp(text, yes[i])) { *v = PETSC_TRUE; return PETSC_TRUE; }
  for (size_t i = 0; i < sizeof(no) / sizeof(no[0]); i++)
    if (!strcasecmp(text, no[i])) { *v = PETSC_FALSE; return PETSC_TRUE; }
  return PETSC_FALSE;
}

static void *Field(CFConfig *cfg, size_t offset) { return (char *)cfg + offset; }

/* Split text at commas into reals (the user's unit); blank text is the empty list (how an empty
   list is written and read back).  Returns 0; 1 when an item is not a finite number (its text in
   bad); 2 when there are more than CF_REAL_LIST_MAX items. */
static int ParseRealList(const char *text, CFRealList *list, char bad[], size_t len)
{
  list->n = 0;
  for (const char *p = text; p;) {
    const char *comma = strchr(p, ',');
    size_t      n     = comma ? (size_t)(comma - p) : strlen(p);
    char        item[PETSC_MAX_PATH_LEN];

    snprintf(item, sizeof(item), "%.*s", (int)PetscMin(n, sizeof(item) - 1), p);
    if (!comma && list->n == 0 && strspn(item, " \t") == strlen(item)) return 0;
    if (list->n == CF_REAL_LIST_MAX) return 2;
    if (!CFParseReal(item, &list->v[list->n])) {
      snprintf(bad, len, "%s", item);
      return 1;
    }
    list->n++;
    p = comma ? comma + 1 : NULL;
  }
  return 0;
}

/* A number as text for a user-facing message.  PETSc's printf writes a bare %g of a whole number
   with a trailing '.' ("900."), so messages format numbers with the C library first ("900"). */
static const char *Num(char *buf, size_t len, double v)
{
  snprintf(buf, len, "%g", v);
  return buf;
}

/* "1000 to 1800 C", "> 0 and <= 300 mm/yr" */
static void RangeText(const CFKey *k, char *buf, size_t len)
{
  if (!k->lo_open && !k->hi_open) snprintf(buf, len, "%g to %g %s", (double)k->lo, (double)k->hi, k->unit);
  else snprintf(buf, len, "%s %g and %s %g %s", k->lo_open ? ">" : ">=", (double)k->lo, k->hi_open ? "<" : "<=", (double)k->hi, k->unit);
}

static PetscBool InRange(PetscReal v, PetscReal lo, PetscReal hi, PetscBool lo_open, PetscBool hi_open)
{
  if (lo_open ? !(v > lo) : !(v >= lo)) return PETSC_FALSE;
  if (hi_open ? !(v < hi) : !(v <= hi)) return PETSC_FALSE;
  return PETSC_TRUE;
}

PetscErrorCode CFConfigSetDefaults(CFConfig *cfg)
{
  PetscFunctionBeginUser;
  PetscCall(PetscMemzero(cfg, sizeof(*cfg)));
  for (size_t i = 0; i < CFKeyCount; i++) {
    const CFKey *k = &CFKeys[i];
    PetscReal    v;
    switch (k->type) {
    case CF_KEY_REAL:
      if (CFParseReal(k->def, &v)) *(PetscReal *)Field(cfg, k->offset) = CFKeyToSI(k, v);
      break;
    case CF_KEY_REAL_LIST: {
      CFRealList *list = (CFRealList *)Field(cfg, k->offset);
      char        bad[8];
      if (ParseRealList(k->def, list, bad, sizeof(bad))) list->n = 0;
      for (PetscInt m = 0; m < list->n; m++) list->v[m] = CFKeyToSI(k, list->v[m]);
    } break;
    case CF_KEY_STRING: PetscCall(PetscStrncpy((char *)Field(cfg, k->offset), k->def, k->size)); break;
    case CF_KEY_BOOL: {
      PetscBool b = PETSC_FALSE;
      (void)CFParseBool(k->def, &b);
      *(PetscBool *)Field(cfg, k->offset) = b;
    } break;
    }
  }
  {
    const CFMeltingType *mt = CFMeltingTypeFind(cfg->melting_model);
    if (mt) {
      cfg->melting_nparams = mt->nparams;
      for (PetscInt p = 0; p < mt->nparams; p++) cfg->melting_params[p] = mt->params[p].value;
    }
  }
  PetscFunctionReturn(0);
}

static PetscErrorCode ReadKey(PetscOptionItems *PetscOptionsObject, MPI_Comm comm, const CFKey *k, CFConfig *cfg)
{
  char      opt[128], help[512], value[PETSC_MAX_PATH_LEN];
  PetscBool set;

  PetscFunctionBeginUser;
  PetscCall(PetscSNPrintf(opt, sizeof(opt), "-%s", k->name));
  PetscCall(PetscSNPrintf(help, sizeof(help), "%s [%s]", k->help, k->unit[0] ? k->unit : "-"));
  PetscCall(PetscOptionsString(opt, help, NULL, k->def, value, sizeof(value), &set));
  if (!set) PetscFunctionReturn(0);
  switch (k->type) {
  case CF_KEY_REAL: {
    PetscReal v;
    char      range[128], vs[32];
    RangeText(k, range, sizeof(range));
    PetscCheck(CFParseReal(value, &v), comm, PETSC_ERR_USER_INPUT, "%s.%s: '%s' is not a finite number (expected %s)", k->section, k->name, value, range);
    PetscCheck(InRange(v, k->lo, k->hi, k->lo_open, k->hi_open), comm, PETSC_ERR_USER_INPUT, "%s.%s: %s %s is outside the allowed range (%s)", k->section, k->name, Num(vs, sizeof(vs), v), k->unit, range);
    *(PetscReal *)Field(cfg, k->offset) = CFKeyToSI(k, v);
  } break;
  case CF_KEY_REAL_LIST: {
    CFRealList list;
    char       range[128], vs[32], bad[64];
    int        rc = ParseRealList(value, &list, bad, sizeof(bad));
    RangeText(k, range, sizeof(range));
    PetscCheck(rc != 2, comm, PETSC_ERR_USER_INPUT, "%s.%s: more than %d numbers (at most %d allowed)", k->section, k->name, CF_REAL_LIST_MAX, CF_REAL_LIST_MAX);
    PetscCheck(rc != 1, comm, PETSC_ERR_USER_INPUT, "%s.%s: '%s' is not a finite number (expected a list of numbers, each %s)", k->section, k->name, bad, range);
    for (PetscInt m = 0; m < list.n; m++) {
      PetscCheck(InRange(list.v[m], k->lo, k->hi, k->lo_open, k->hi_open), comm, PETSC_ERR_USER_INPUT, "%s.%s: %s %s is outside the allowed range (%s)", k->section, k->name, Num(vs, sizeof(vs), list.v[m]), k->unit, range);
      list.v[m] = CFKeyToSI(k, list.v[m]);
    }
    *(CFRealList *)Field(cfg, k->offset) = list;
  } break;
  case CF_KEY_STRING: {
    size_t n;
    PetscCall(PetscStrlen(value, &n));
    PetscCheck(n > 0, comm, PETSC_ERR_USER_INPUT, "%s.%s: empty value (expected text)", k->section, k->name);
    PetscCheck(n < k->size, comm, PETSC_ERR_USER_INPUT, "%s.%s: value is %zu characters long (at most %zu allowed)", k->section, k->name, n, k->size - 1);
    PetscCall(PetscStrncpy((char *)Field(cfg, k->offset), value, k->size));
  } break;
  case CF_KEY_BOOL: {
    PetscBool b;
    PetscCheck(CFParseBool(value, &b), comm, PETSC_ERR_USER_INPUT, "%s.%s: '%s' is not true or false", k->section, k->name, value);
    *(PetscBool *)Field(cfg, k->offset) = b;
  } break;
  }
  if (k->set_offset != (size_t)-1) *(PetscBool *)Field(cfg, k->set_offset) = PETSC_TRUE;
  PetscFunctionReturn(0);
}

static PetscErrorCode ReadMeltingParam(PetscOptionItems *PetscOptionsObject, MPI_Comm comm, const CFMeltingType *mt, PetscInt p, CFConfig *cfg)
{
  const CFMeltingParamInfo *pi = &mt->params[p];
  char                      opt[128], help[512], def[64], value[256], range[128], vs[32];
  PetscBool                 set;
  PetscReal                 v;

  PetscFunctionBeginUser;
  PetscCall(PetscSNPrintf(opt, sizeof(opt), "-%s", pi->key));
  PetscCall(PetscSNPrintf(help, sizeof(help), "%s [%s]", pi->help, pi->unit));
  (void)Num(def, sizeof(def), pi->value);
  snprintf(range, sizeof(range), "%g to %g %s", (double)pi->lo, (double)pi->hi, pi->unit);
  cfg->melting_params[p] = pi->value;
  PetscCall(PetscOptionsString(opt, help, NULL, def, value, sizeof(value), &set));
  if (!set) PetscFunctionReturn(0);
  PetscCheck(CFParseReal(value, &v), comm, PETSC_ERR_USER_INPUT, "%s.%s: '%s' is not a finite number (expected %s)", mt->name, pi->key, value, range);
  PetscCheck(v >= pi->lo && v <= pi->hi, comm, PETSC_ERR_USER_INPUT, "%s.%s: %s %s is outside the allowed range (%s)", mt->name, pi->key, Num(vs, sizeof(vs), v), pi->unit, range);
  cfg->melting_params[p] = v;
  PetscFunctionReturn(0);
}

/* Errors inside PetscOptionsBegin/End are raised only after PetscOptionsEnd, which frees what
   PetscOptionsBegin allocated (returning from inside the block leaks it). */
static PetscErrorCode ReadMeltingParams(MPI_Comm comm, const CFMeltingType *mt, CFConfig *cfg)
{
  char           prefix[CF_NAME_LEN + 2];
  PetscErrorCode ierr = 0;

  PetscFunctionBeginUser;
  PetscCall(PetscSNPrintf(prefix, sizeof(prefix), "%s_", mt->name));
  cfg->melting_nparams = mt->nparams;
  PetscOptionsBegin(comm, prefix, mt->description, "melting");
  for (PetscInt p = 0; p < mt->nparams && !ierr; p++) ierr = ReadMeltingParam(PetscOptionsObject, comm, mt, p, cfg);
  PetscOptionsEnd();
  PetscCall(ierr);
  PetscFunctionReturn(0);
}

/* Does option name (without '-') belong to section: "section_key", or "section" alone (a value
   where a map of keys belongs)?  Case-insensitive, as PETSc matches options. */
static PetscBool InSection(const char *name, const char *section, size_t *len)
{
  *len = strlen(section);
  return (PetscBool)(!strncasecmp(name, section, *len) && (name[*len] == '_' || !name[*len]));
}

/* Any option left unused under one of our sections is a misspelled or unknown key. */
static PetscErrorCode CheckUnknownKeys(MPI_Comm comm, const CFConfig *cfg)
{
  PetscInt n;
  char   **names, **values;

  PetscFunctionBeginUser;
  PetscCall(PetscOptionsLeftGet(NULL, &n, &names, &values));
  for (PetscInt i = 0; i < n; i++) {
    const char *section = NULL, *other = NULL;
    char        name[256];
    size_t      len = 0;

    PetscCall(PetscStrncpy(name, names[i][0] == '-' ? names[i] + 1 : names[i], sizeof(name)));
    for (size_t k = 0; k < CFKeyCount && !section; k++)
      if (InSection(name, CFKeys[k].section, &len)) section = CFKeys[k].section;
    for (PetscInt m = 0; m < CFMeltingTypeCount() && !section; m++) {
      const CFMeltingType *mt = CFMeltingTypeGet(m);
      if (InSection(name, mt->name, &len)) {
        section = mt->name;
        if (strcmp(mt->name, cfg->melting_model)) other = mt->name;
      }
    }
    if (section) {
      PetscCall(PetscOptionsLeftRestore(NULL, &n, &names, &values));
      PetscCheck(name[len], comm, PETSC_ERR_USER_INPUT, "%s: a section, not a key (write %s: {key: value}; crustforge --help lists its keys)", section, section);
      PetscCheck(!other, comm, PETSC_ERR_USER_INPUT, "%s.%s: a parameter of melting model %s, but melting.model is %s", section, name + len + 1, other, cfg->melting_model);
      SETERRQ(comm, PETSC_ERR_USER_INPUT, "%s.%s: unknown key (crustforge --help lists the keys of section %s)", section, name + len + 1, section);
    }
  }
  PetscCall(PetscOptionsLeftRestore(NULL, &n, &names, &values));
  PetscFunctionReturn(0);
}

static PetscErrorCode SetDerived(MPI_Comm comm, CFConfig *cfg)
{
  char a[32], b[32];

  PetscFunctionBeginUser;
  cfg->half_rate = CFHalfRateFromFullMmPerYr(cfg->full_spreading_rate_mm_yr);
  if (!cfg->adiabatic_gradient_set) cfg->adiabatic_gradient = cfg->thermal_expansivity * cfg->gravity * cfg->potential_temperature / cfg->heat_capacity;
  cfg->nx = (PetscInt)PetscCeilReal(cfg->width / cfg->spacing - 1e-9);
  cfg->nz = (PetscInt)PetscCeilReal(cfg->depth / cfg->spacing - 1e-9);
  PetscCheck(cfg->nx >= 8, comm, PETSC_ERR_USER_INPUT, "grid.spacing: %s km gives %" PetscInt_FMT " cells across grid.width %s km (at least 8 needed)", Num(a, sizeof(a), CFMToKm(cfg->spacing)), cfg->nx, Num(b, sizeof(b), CFMToKm(cfg->width)));
  PetscCheck(cfg->nz >= 8, comm, PETSC_ERR_USER_INPUT, "grid.spacing: %s km gives %" PetscInt_FMT " cells down grid.depth %s km (at least 8 needed)", Num(a, sizeof(a), CFMToKm(cfg->spacing)), cfg->nz, Num(b, sizeof(b), CFMToKm(cfg->depth)));
  PetscCheck((double)cfg->nx * (double)cfg->nz < 2.0e9, comm, PETSC_ERR_USER_INPUT, "grid.spacing: %s km gives %s cells, more than a 32-bit index allows", Num(a, sizeof(a), CFMToKm(cfg->spacing)), Num(b, sizeof(b), (double)cfg->nx * (double)cfg->nz));
  cfg->dx = cfg->width / cfg->nx;
  cfg->dz = cfg->depth / cfg->nz;
  PetscCheck(cfg->surface_temperature < cfg->potential_temperature, comm, PETSC_ERR_USER_INPUT, "surface.temperature: %s C is not below mantle.potential_temperature %s C", Num(a, sizeof(a), CFKelvinToCelsius(cfg->surface_temperature)), Num(b, sizeof(b), CFKelvinToCelsius(cfg->potential_temperature)));
  PetscFunctionReturn(0);
}

PetscErrorCode CFConfigSetFromOptions(MPI_Comm comm, CFConfig *cfg)
{
  const CFMeltingType *mt;

  PetscFunctionBeginUser;
  PetscCall(CFConfigSetDefaults(cfg));
  for (size_t i = 0; i < CFKeyCount;) {
    const char    *section = CFKeys[i].section;
    char           prefix[64], title[128];
    PetscErrorCode ierr = 0;

    PetscCall(PetscSNPrintf(prefix, sizeof(prefix), "%s_", section));
    PetscCall(PetscSNPrintf(title, sizeof(title), "Scenario keys, section %s", section));
    PetscOptionsBegin(comm, prefix, title, "crustforge");
    for (; i < CFKeyCount && !strcmp(CFKeys[i].section, section); i++)
      if (!ierr) ierr = ReadKey(PetscOptionsObject, comm, &CFKeys[i], cfg);
    PetscOptionsEnd();
    PetscCall(ierr); /* after PetscOptionsEnd: see ReadMeltingParams */
  }
  mt = CFMeltingTypeFind(cfg->melting_model);
  if (!mt) {
    char list[256] = "";
    for (PetscInt m = 0; m < CFMeltingTypeCount(); m++) {
      PetscCall(PetscStrlcat(list, m ? ", " : "", sizeof(list)));
      PetscCall(PetscStrlcat(list, CFMeltingTypeGet(m)->name, sizeof(list)));
    }
    SETERRQ(comm, PETSC_ERR_USER_INPUT, "melting.model: '%s' is not a melting model (available: %s)", cfg->melting_model, list);
  }
  PetscCall(ReadMeltingParams(comm, mt, cfg));
  PetscCall(SetDerived(comm, cfg));
  PetscCall(CFConfigCheckMemory(comm, cfg));
  PetscCall(CheckUnknownKeys(comm, cfg));
  PetscFunctionReturn(0);
}

/* Reject what cannot be a scenario before handing it to the YAML parser. */
static PetscErrorCode CheckScenarioFile(MPI_Comm comm, const char path[])
{
  struct stat st;
  FILE       *fp;
  int         c, nonblank = 0, nul = 0;

  PetscFunctionBeginUser;
  PetscCheck(path && path[0], comm, PETSC_ERR_USER_INPUT, "no scenario file given (usage: crustforge run SCENARIO.yaml [-key value ...])");
  PetscCheck(stat(path, &st) == 0, comm, PETSC_ERR_FILE_OPEN, "scenario file '%s': %s", path, strerror(errno));
  PetscCheck(!S_ISDIR(st.st_mode), comm, PETSC_ERR_FILE_OPEN, "scenario file '%s' is a directory, not a YAML file", path);
  fp = fopen(path, "rb");
  PetscCheck(fp, comm, PETSC_ERR_FILE_OPEN, "scenario file '%s' cannot be read: %s", path, strerror(errno));
  /* Count non-blank characters outside comments, and NUL bytes (binary files). */
  for (int incomment = 0; (c = fgetc(fp)) != EOF;) {
    if (c == 0) nul++;
    if (c == '#') incomment = 1;
    else if (c == '\n') incomment = 0;
    else if (!incomment && c != ' ' && c != '\t' && c != '\r') nonblank++;
  }
  fclose(fp);
  PetscCheck(!nul, comm, PETSC_ERR_FILE_UNEXPECTED, "scenario file '%s' is binary, not YAML text", path);
  PetscCheck(nonblank, comm, PETSC_ERR_FILE_UNEXPECTED, "scenario file '%s' holds no keys", path);
  { /* duplicated keys, aliases, over-long keys and values, syntax: see scan.c */
    char msg[512];
    int  rc;
    fp = fopen(path, "rb");
    PetscCheck(fp, comm, PETSC_ERR_FILE_OPEN, "scenario file '%s' cannot be read: %s", path, strerror(errno));
    rc = CFScenarioScanFile(fp, msg, sizeof(msg));
    fclose(fp);
    PetscCheck(!rc, comm, PETSC_ERR_USER_INPUT, "scenario file '%s' is not a valid scenario: %s", path, msg);
  }
  PetscFunctionReturn(0);
}

PetscErrorCode CFConfigLoad(MPI_Comm comm, const char scenario[], int argc, char **argv, CFConfig *cfg)
{
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  PetscCall(CheckScenarioFile(comm, scenario));
  PetscCall(PetscPushErrorHandler(PetscReturnErrorHandler, NULL));
  ierr = PetscOptionsInsertFileYAML(comm, NULL, scenario, PETSC_TRUE);
  PetscCall(PetscPopErrorHandler());
  if (ierr) {
    const char *text;
    char       *specific = NULL;
    PetscCall(PetscErrorMessage(ierr, &text, &specific));
    SETERRQ(comm, PETSC_ERR_USER_INPUT, "scenario file '%s' is not a valid scenario: %s", scenario, specific && specific[0] ? specific : text);
  }
  /* The command line was inserted by PetscInitialize before the file; insert it again so it wins. */
  if (argc > 1) PetscCall(PetscOptionsInsertArgs(NULL, argc - 1, argv + 1));
  PetscCall(CFConfigSetFromOptions(comm, cfg));
  PetscCall(PetscStrncpy(cfg->scenario, scenario, sizeof(cfg->scenario)));
  PetscFunctionReturn(0);
}

static void FormatValue(const CFConfig *cfg, const CFKey *k, const char *realfmt, char *buf, size_t len)
{
  const void *f = (const char *)cfg + k->offset;
  switch (k->type) {
  case CF_KEY_REAL: snprintf(buf, len, realfmt, (double)CFKeyFromSI(k, *(const PetscReal *)f)); break;
  case CF_KEY_STRING: snprintf(buf, len, "%s", (const char *)f); break;
  case CF_KEY_BOOL: snprintf(buf, len, "%s", *(const PetscBool *)f ? "true" : "false"); break;
  case CF_KEY_REAL_LIST: { /* "a,b,c", as PETSc reads a YAML list back */
    const CFRealList *list = (const CFRealList *)f;
    size_t            used = 0;
    buf[0]                 = 0;
    for (PetscInt m = 0; m < list->n && used + 1 < len; m++) {
      int w;
      if (m) buf[used++] = ',';
      w = snprintf(buf + used, len - used, realfmt, (double)CFKeyFromSI(k, list->v[m]));
      used += w > 0 ? (size_t)w : 0;
    }
  } break;
  }
}

PetscErrorCode CFConfigGetEntries(const CFConfig *cfg, PetscInt *n, CFConfigEntry **entries)
{
  const CFMeltingType *mt = CFMeltingTypeFind(cfg->melting_model);
  PetscInt             np = mt ? mt->nparams : 0, c = 0;
  CFConfigEntry       *e;

  PetscFunctionBeginUser;
  PetscCall(PetscCalloc1(CFKeyCount + np, &e));
  for (size_t i = 0; i < CFKeyCount; i++, c++) {
    const CFKey *k = &CFKeys[i];
    PetscCall(PetscSNPrintf(e[c].key, sizeof(e[c].key), "%s.%s", k->section, k->name));
    PetscCall(PetscSNPrintf(e[c].option, sizeof(e[c].option), "-%s_%s", k->section, k->name));
    FormatValue(cfg, k, "%.15g", e[c].value, sizeof(e[c].value));
    e[c].unit    = k->unit;
    e[c].is_real = (PetscBool)(k->type == CF_KEY_REAL);
    if (e[c].is_real) e[c].real_value = CFKeyFromSI(k, *(const PetscReal *)((const char *)cfg + k->offset));
  }
  for (PetscInt p = 0; p < np; p++, c++) {
    PetscCall(PetscSNPrintf(e[c].key, sizeof(e[c].key), "%s.%s", mt->name, mt->params[p].key));
    PetscCall(PetscSNPrintf(e[c].option, sizeof(e[c].option), "-%s_%s", mt->name, mt->params[p].key));
    PetscCall(PetscSNPrintf(e[c].value, sizeof(e[c].value), "%.15g", (double)cfg->melting_params[p]));
    e[c].unit       = mt->params[p].unit;
    e[c].is_real    = PETSC_TRUE;
    e[c].real_value = cfg->melting_params[p];
  }
  *n       = c;
  *entries = e;
  PetscFunctionReturn(0);
}

PetscErrorCode CFConfigView(const CFConfig *cfg, PetscViewer viewer)
{
  const char          *section = "";
  const CFMeltingType *mt      = CFMeltingTypeFind(cfg->melting_model);

  PetscFunctionBeginUser;
  PetscCall(PetscViewerASCIIPrintf(viewer, "Scenario %s\n", cfg->scenario[0] ? cfg->scenario : "(defaults)"));
  for (size_t i = 0; i < CFKeyCount; i++) {
    const CFKey *k = &CFKeys[i];
    char         value[PETSC_MAX_PATH_LEN];
    PetscBool    derived = (PetscBool)(k->set_offset != (size_t)-1 && !*(const PetscBool *)((const char *)cfg + k->set_offset));

    if (strcmp(section, k->section)) {
      section = k->section;
      PetscCall(PetscViewerASCIIPrintf(viewer, "  %s:\n", section));
    }
    FormatValue(cfg, k, "%g", value, sizeof(value));
    PetscCall(PetscViewerASCIIPrintf(viewer, "    %-24s %-18s %s%s\n", k->name, value, k->unit, derived ? "  (derived)" : ""));
  }
  if (mt) {
    PetscCall(PetscViewerASCIIPrintf(viewer, "  %s:\n", mt->name));
    for (PetscInt p = 0; p < mt->nparams; p++) PetscCall(PetscViewerASCIIPrintf(viewer, "    %-24s %-18g %s\n", mt->params[p].key, (double)cfg->melting_params[p], mt->params[p].unit));
  }
  {
    char dx[32], dz[32], u[32];
    PetscCall(PetscViewerASCIIPrintf(viewer, "  grid cells: %" PetscInt_FMT " x %" PetscInt_FMT " (x by z), cell %s x %s km; plate speed %s mm/yr\n", cfg->nx, cfg->nz, Num(dx, sizeof(dx), CFMToKm(cfg->dx)), Num(dz, sizeof(dz), CFMToKm(cfg->dz)), Num(u, sizeof(u), CFMPerSToMmPerYr(cfg->half_rate))));
  }
  PetscFunctionReturn(0);
}

PetscErrorCode CFConfigPrintKeys(FILE *fp)
{
  const char *section = "";

  PetscFunctionBeginUser;
  fprintf(fp, "Scenario keys (YAML 'section: {key: value}', or -section_key value on the command line):\n");
  for (size_t i = 0; i < CFKeyCount; i++) {
    const CFKey *k = &CFKeys[i];
    char         range[128] = "";
    if (strcmp(section, k->section)) {
      section = k->section;
      fprintf(fp, "\n  %s:\n", section);
    }
    if (k->type == CF_KEY_REAL) RangeText(k, range, sizeof(range));
    else if (k->type == CF_KEY_REAL_LIST) {
      char each[96];
      RangeText(k, each, sizeof(each));
      snprintf(range, sizeof(range), "list of up to %d, each %s", CF_REAL_LIST_MAX, each);
    }
    else if (k->type == CF_KEY_BOOL) snprintf(range, sizeof(range), "true or false");
    else snprintf(range, sizeof(range), "text");
    fprintf(fp, "    %-22s default %-16s %-8s range %s\n      %s\n", k->name, k->def, k->unit, range, k->help);
  }
  for (PetscInt m = 0; m < CFMeltingTypeCount(); m++) {
    const CFMeltingType *mt = CFMeltingTypeGet(m);
    fprintf(fp, "\n  %s: (parameters of melting model %s: %s)\n", mt->name, mt->name, mt->description);
    for (PetscInt p = 0; p < mt->nparams; p++) fprintf(fp, "    %-22s default %-16g %-8s range %g to %g\n      %s\n", mt->params[p].key, (double)mt->params[p].value, mt->params[p].unit, (double)mt->params[p].lo, (double)mt->params[p].hi, mt->params[p].help);
  }
  PetscFunctionReturn(0);
}
