/* Private to the config module: the key table and its entry type. */
#ifndef CRUSTFORGE_CONFIG_KEYS_H
#define CRUSTFORGE_CONFIG_KEYS_H

#include <crustforge/config.h>

/* CF_KEY_REAL_LIST: a CFRealList field; lo, hi, conversion and the unit apply to each value. */
typedef enum { CF_KEY_REAL, CF_KEY_STRING, CF_KEY_BOOL, CF_KEY_REAL_LIST } CFKeyType;

/* How a value in the user's unit becomes SI: temperatures C -> K, lengths km -> m, K/km -> K/m. */
typedef enum { CF_CONV_NONE, CF_CONV_KM, CF_CONV_CELSIUS, CF_CONV_PER_KM } CFConversion;

typedef struct {
  const char  *section; /* YAML map; option prefix is section_ */
  const char  *name;
  const char  *unit;    /* the user's unit */
  CFKeyType    type;
  CFConversion conv;
  const char  *def;     /* default as text in the user's unit ("derived": computed when unset) */
  PetscReal    lo, hi;  /* allowed range in the user's unit (reals) */
  PetscBool    lo_open, hi_open;
  size_t       offset, size; /* field in CFConfig */
  size_t       set_offset;   /* PetscBool field recording that the user set it, or (size_t)-1 */
  const char  *help;
} CFKey;

extern const CFKey  CFKeys[];
extern const size_t CFKeyCount;

PetscReal CFKeyToSI(const CFKey *key, PetscReal v);
PetscReal CFKeyFromSI(const CFKey *key, PetscReal v);
/* Parse text as a finite real; returns PETSC_FALSE on any trailing text, overflow, NaN or Inf. */
PetscBool CFParseReal(const char *text, PetscReal *v);
/* Parse true/false/yes/no/on/off/1/0 (empty means true, as for a flag). */
PetscBool CFParseBool(const char *text, PetscBool *v);

#endif
