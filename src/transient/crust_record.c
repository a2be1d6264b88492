/* The crust record of a transient run: what each step made, and the two tables it gives.
   Crust made at time t leaves the axis on the plate and sits, at the end of the run, at the
   distance the plate has carried it since: x = integral of U0 from t to the end (DESIGN 2.1). */
#include <crustforge/units.h>
#include "transient_impl.h"

PetscErrorCode CFCrustRecordAppend(CFCrustRecord *r, PetscReal t, PetscReal dt, PetscReal melt, PetscReal U)
{
  PetscFunctionBeginUser;
  if (r->n == r->cap) {
    const PetscInt cap = PetscMax(64, 2 * r->cap);
    PetscReal     *nt, *ndt, *nm, *nu;
    PetscCall(PetscMalloc4(cap, &nt, cap, &ndt, cap, &nm, cap, &nu));
    if (r->n) {
      PetscCall(PetscArraycpy(nt, r->t, r->n));
      PetscCall(PetscArraycpy(ndt, r->dt, r->n));
      PetscCall(PetscArraycpy(nm, r->melt, r->n));
      PetscCall(PetscArraycpy(nu, r->U, r->n));
    }
    PetscCall(PetscFree4(r->t, r->dt, r->melt, r->U));
    r->t = nt, r->dt = ndt, r->melt = nm, r->U = nu, r->cap = cap;
  }
  r->t[r->n]    = t;
  r->dt[r->n]   = dt;
  r->melt[r->n] = melt;
  r->U[r->n]    = U;
  r->n++;
  PetscFunctionReturn(0);
}

PetscErrorCode CFCrustRecordDestroy(CFCrustRecord *r)
{
  PetscFunctionBeginUser;
  PetscCall(PetscFree4(r->t, r->dt, r->melt, r->U));
  r->n = r->cap = 0;
  PetscFunctionReturn(0);
}

PetscErrorCode CFTransientGetCrustRecord(CFTransient tr, PetscInt *n, const PetscReal **t, const PetscReal **dt, const PetscReal **melt, const PetscReal **U)
{
  PetscFunctionBeginUser;
  *n = tr->rec.n;
  if (t) *t = tr->rec.t;
  if (dt) *dt = tr->rec.dt;
  if (melt) *melt = tr->rec.melt;
  if (U) *U = tr->rec.U;
  PetscFunctionReturn(0);
}

static PetscErrorCode OpenCSV(MPI_Comm comm, const char dir[], const char name[], FILE **fp, char path[], char tmp[])
{
  PetscFunctionBeginUser;
  PetscCall(PetscSNPrintf(path, PETSC_MAX_PATH_LEN, "%s/%s", dir, name));
  PetscCall(PetscSNPrintf(tmp, PETSC_MAX_PATH_LEN, "%s.tmp", path));
  *fp = fopen(tmp, "w");
  PetscCheck(*fp, comm, PETSC_ERR_FILE_OPEN, "cannot write '%s'", tmp);
  PetscFunctionReturn(0);
}

static PetscErrorCode CloseCSV(MPI_Comm comm, FILE *fp, const char path[], const char tmp[])
{
  PetscFunctionBeginUser;
  PetscCheck(!ferror(fp) && !fclose(fp), comm, PETSC_ERR_FILE_WRITE, "writing '%s' failed", tmp);
  PetscCheck(!rename(tmp, path), comm, PETSC_ERR_FILE_WRITE, "cannot rename '%s' to '%s'", tmp, path);
  PetscFunctionReturn(0);
}

PetscErrorCode CFTransientCrustSeries(CFTransient tr, CFCrustSeries *cs)
{
  const CFCrustRecord *r     = &tr->rec;
  const PetscReal      rho_c = tr->cfg.crust_density;
  const PetscReal      t_now = r->n ? r->t[r->n - 1] : 0.0;

  PetscFunctionBeginUser;
  cs->n = r->n;
  PetscCall(PetscMalloc4(r->n, &cs->time_myr, r->n, &cs->full_rate_mm_yr, r->n, &cs->accretion_km2_per_myr, r->n, &cs->thickness_km));
  PetscCall(PetscMalloc3(r->n, &cs->distance_km, r->n, &cs->formed_at_myr, r->n, &cs->age_myr));
  for (PetscInt k = 0; k < r->n; k++) {
    /* accretion: crust area per unit ridge length and time on one flank; thickness = rate / U0 */
    const PetscReal rate  = r->melt[k] / rho_c; /* m2/s */
    const PetscReal t_mid = r->t[k] - 0.5 * r->dt[k];
    cs->time_myr[k]              = CFSToMyr(r->t[k]);
    cs->full_rate_mm_yr[k]       = 2.0 * CFMPerSToMmPerYr(r->U[k]);
    cs->accretion_km2_per_myr[k] = rate * 1e-6 * CFMyrToS(1.0);
    cs->thickness_km[k]          = CFMToKm(rate / r->U[k]);
    /* where the plate has carried the crust made at t_mid by now */
    cs->distance_km[k]   = CFMToKm(CFHistoryIntegral(&tr->rate, t_mid, t_now));
    cs->formed_at_myr[k] = CFSToMyr(t_mid);
    cs->age_myr[k]       = CFSToMyr(t_now - t_mid);
  }
  PetscFunctionReturn(0);
}

PetscErrorCode CFCrustSeriesDestroy(CFCrustSeries *cs)
{
  PetscFunctionBeginUser;
  PetscCall(PetscFree4(cs->time_myr, cs->full_rate_mm_yr, cs->accretion_km2_per_myr, cs->thickness_km));
  PetscCall(PetscFree3(cs->distance_km, cs->formed_at_myr, cs->age_myr));
  PetscFunctionReturn(0);
}

PetscErrorCode CFTransientWriteCrustCSV(CFTransient tr, const char dir[])
{
  PetscMPIInt   rank;
  FILE         *fp;
  char          path[PETSC_MAX_PATH_LEN], tmp[PETSC_MAX_PATH_LEN];
  CFCrustSeries cs;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(tr->comm, &rank));
  if (rank) PetscFunctionReturn(0);
  PetscCall(CFTransientCrustSeries(tr, &cs));
  PetscCall(OpenCSV(PETSC_COMM_SELF, dir, "crust_vs_time.csv", &fp, path, tmp));
  fprintf(fp, "time_myr,full_spreading_rate_mm_yr,crustal_accretion_rate_km2_per_myr,crustal_thickness_km\n");
  for (PetscInt k = 0; k < cs.n; k++) fprintf(fp, "%.10g,%.10g,%.10g,%.10g\n", (double)cs.time_myr[k], (double)cs.full_rate_mm_yr[k], (double)cs.accretion_km2_per_myr[k], (double)cs.thickness_km[k]);
  PetscCall(CloseCSV(PETSC_COMM_SELF, fp, path, tmp));

  PetscCall(OpenCSV(PETSC_COMM_SELF, dir, "crust_vs_distance.csv", &fp, path, tmp));
  /* the profile across the flank the history leaves, axis first */
  fprintf(fp, "distance_km,crustal_thickness_km,formed_at_myr,age_myr\n");
  for (PetscInt k = cs.n - 1; k >= 0; k--) fprintf(fp, "%.10g,%.10g,%.10g,%.10g\n", (double)cs.distance_km[k], (double)cs.thickness_km[k], (double)cs.formed_at_myr[k], (double)cs.age_myr[k]);
  PetscCall(CloseCSV(PETSC_COMM_SELF, fp, path, tmp));
  PetscCall(CFCrustSeriesDestroy(&cs));
  PetscFunctionReturn(0);
}
