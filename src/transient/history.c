/* Histories of the scenario: spreading rate and potential temperature as piecewise-linear
   functions of time, given as (Myr, value) pairs, constant before the first and after the last. */
#include <crustforge/units.h>
#include "transient_impl.h"

PetscErrorCode CFHistoryFromList(MPI_Comm comm, const char key[], const CFRealList *list, PetscReal constant, PetscReal lo, PetscReal hi, PetscBool lo_open, PetscReal (*to_si)(PetscReal), CFHistory *h)
{
  PetscFunctionBeginUser;
  PetscCall(PetscMemzero(h, sizeof(*h)));
  if (!list->n) {
    h->n    = 1;
    h->t[0] = 0.0;
    h->v[0] = constant;
    PetscFunctionReturn(0);
  }
  PetscCheck(list->n % 2 == 0, comm, PETSC_ERR_USER_INPUT, "%s: %d numbers, not pairs of time (Myr) and value", key, (int)list->n);
  h->n = list->n / 2;
  for (PetscInt p = 0; p < h->n; p++) {
    const PetscReal t_myr = list->v[2 * p], v = list->v[2 * p + 1];
    PetscCheck(!p || t_myr > list->v[2 * p - 2], comm, PETSC_ERR_USER_INPUT, "%s: times must increase (%.6g Myr follows %.6g Myr)", key, (double)t_myr, (double)list->v[2 * p - 2]);
    PetscCheck((lo_open ? v > lo : v >= lo) && v <= hi, comm, PETSC_ERR_USER_INPUT, "%s: value %.6g at %.6g Myr is outside the allowed range (%s%.6g to %.6g)", key, (double)v, (double)t_myr, lo_open ? "above " : "", (double)lo, (double)hi);
    h->t[p] = CFMyrToS(t_myr);
    h->v[p] = to_si(v);
  }
  PetscFunctionReturn(0);
}

PetscReal CFHistoryValue(const CFHistory *h, PetscReal t)
{
  if (t <= h->t[0]) return h->v[0];
  for (PetscInt p = 1; p < h->n; p++)
    if (t < h->t[p]) return h->v[p - 1] + (h->v[p] - h->v[p - 1]) * (t - h->t[p - 1]) / (h->t[p] - h->t[p - 1]);
  return h->v[h->n - 1];
}

/* Trapezoids between the breakpoints that fall inside [a, b]: exact for a piecewise-linear function. */
PetscReal CFHistoryIntegral(const CFHistory *h, PetscReal a, PetscReal b)
{
  PetscReal sum = 0.0, t0 = a, v0 = CFHistoryValue(h, a);

  for (PetscInt p = 0; p <= h->n; p++) {
    const PetscReal t1 = p < h->n ? PetscMin(h->t[p], b) : b;
    if (t1 <= t0) continue;
    {
      const PetscReal v1 = CFHistoryValue(h, t1);
      sum += 0.5 * (v0 + v1) * (t1 - t0);
      t0 = t1;
      v0 = v1;
    }
  }
  return sum;
}
