/* Every range limit of every numeric scenario key, from the key table itself (src/config/keys.c)
   and the melting models' parameter tables: a value at a closed limit is accepted, a value just
   past it (by one part in 1e9) is refused naming the key, and a value at an open limit is
   refused.  The expected behaviour is the project's own contract as --help prints it ("a to b":
   inclusive; "> a": exclusive) (common practice, no source). */
#include <stdio.h>
#include <string.h>
#include <crustforge/config.h>
#include <crustforge/melting.h>
#include "../src/config/keys.h"
#include "cf_test.h"


/* A small grid for every key but the grid's own (keeps the derived checks away from the limit). */
static PetscErrorCode SetContext(const char *section, const char *model)
{
  PetscFunctionBeginUser;
  PetscCall(PetscOptionsClear(NULL));
  if (!strcmp(section, "grid")) {
    PetscCall(PetscOptionsSetValue(NULL, "-grid_width", "1000"));
    PetscCall(PetscOptionsSetValue(NULL, "-grid_depth", "1000"));
    PetscCall(PetscOptionsSetValue(NULL, "-grid_spacing", "50"));
  } else {
    PetscCall(PetscOptionsSetValue(NULL, "-grid_width", "200"));
    PetscCall(PetscOptionsSetValue(NULL, "-grid_depth", "200"));
    PetscCall(PetscOptionsSetValue(NULL, "-grid_spacing", "20"));
  }
  if (model) PetscCall(PetscOptionsSetValue(NULL, "-melting_model", model));
  PetscFunctionReturn(0);
}

/* Validate with option = value (a list key gets the value twice); the error code, quietly. */
static PetscErrorCode Try(const char *section, const char *model, const char *option, PetscBool list, double value, PetscErrorCode *err)
{
  char     text[80];
  CFConfig cfg;

  PetscFunctionBeginUser;
  PetscCall(SetContext(section, model));
  if (list) snprintf(text, sizeof(text), "%.17g,%.17g", value, value);
  else snprintf(text, sizeof(text), "%.17g", value);
  PetscCall(PetscOptionsSetValue(NULL, option, text));
  PetscCall(PetscPushErrorHandler(PetscReturnErrorHandler, NULL));
  *err = CFConfigSetFromOptions(PETSC_COMM_WORLD, &cfg);
  PetscCall(PetscPopErrorHandler());
  PetscFunctionReturn(0);
}

static double JustPast(double bound, int sign) { return bound + sign * 1e-9 * PetscMax(PetscAbsReal(bound), 1.0); }

/* One limit of one key; returns how many checks failed (each reported). */
static int CheckLimit(const char *section, const char *name, const char *model, PetscBool list, double bound, PetscBool open, int outward)
{
  char           option[160], key[160];
  PetscErrorCode err;
  const char    *text = NULL;
  char          *msg  = NULL;
  int            bad  = 0;

  snprintf(option, sizeof(option), "-%s_%s", section, name);
  snprintf(key, sizeof(key), "%s.%s", section, name);
  CK_PETSC(Try(section, model, option, list, bound, &err));
  if (open ? err != PETSC_ERR_USER_INPUT : err != 0) {
    fprintf(stderr, "%s at its %s limit %g: error %d, expected %s\n", key, open ? "open" : "closed", bound, (int)err, open ? "refused" : "accepted");
    bad++;
  }
  CK_PETSC(Try(section, model, option, list, JustPast(bound, outward), &err));
  (void)PetscErrorMessage(err, &text, &msg);
  if (err != PETSC_ERR_USER_INPUT || !msg || !strstr(msg, key) || !strstr(msg, "outside the allowed range")) {
    fprintf(stderr, "%s just past %g: error %d (%s), expected a refusal naming the key\n", key, bound, (int)err, msg ? msg : "");
    bad++;
  }
  return bad;
}

START_TEST(test_key_limits)
{
  int bad = 0, n = 0;

  for (size_t i = 0; i < CFKeyCount; i++) {
    const CFKey *k = &CFKeys[i];
    if (k->type != CF_KEY_REAL && k->type != CF_KEY_REAL_LIST) continue;
    bad += CheckLimit(k->section, k->name, NULL, (PetscBool)(k->type == CF_KEY_REAL_LIST), k->lo, k->lo_open, -1);
    bad += CheckLimit(k->section, k->name, NULL, (PetscBool)(k->type == CF_KEY_REAL_LIST), k->hi, k->hi_open, +1);
    n += 4;
  }
  fprintf(stderr, "scenario keys: %d limit checks\n", n);
  ck_assert_msg(bad == 0, "%d of %d limit checks failed", bad, n);
}
END_TEST

START_TEST(test_melting_parameter_limits)
{
  int bad = 0, n = 0;

  for (PetscInt m = 0; m < CFMeltingTypeCount(); m++) {
    const CFMeltingType *mt = CFMeltingTypeGet(m);
    for (PetscInt p = 0; p < mt->nparams; p++) {
      bad += CheckLimit(mt->name, mt->params[p].key, mt->name, PETSC_FALSE, mt->params[p].lo, PETSC_FALSE, -1);
      bad += CheckLimit(mt->name, mt->params[p].key, mt->name, PETSC_FALSE, mt->params[p].hi, PETSC_FALSE, +1);
      n += 4;
    }
  }
  fprintf(stderr, "melting parameters: %d limit checks\n", n);
  ck_assert_msg(bad == 0, "%d of %d limit checks failed", bad, n);
}
END_TEST

static Suite *LimitsSuite(void)
{
  Suite *s  = suite_create("limits");
  TCase *tc = tcase_create("ranges");

  tcase_add_test(tc, test_key_limits);
  tcase_add_test(tc, test_melting_parameter_limits);
  suite_add_tcase(s, tc);
  return s;
}

CF_TEST_MAIN(LimitsSuite)
