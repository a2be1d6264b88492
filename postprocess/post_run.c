/* Everything the post-processor leaves in a run's directory: the summary on stdout, the three
   tables and, when asked, the figures.  The solver calls it at the end of every run and
   crustforge-post on a saved run, with the same CFRunData, so both give the same numbers. */
#include <math.h>
#include <stdio.h>
#include <crustforge/figures.h>
#include <crustforge/units.h>
#include "post_impl.h"

/* A depth in km, or why there is none. */
static void Depth(char buf[], size_t len, PetscReal z, const char *none)
{
  if (isnan(z)) snprintf(buf, len, "%s", none);
  else snprintf(buf, len, "%.2f km", (double)CFMToKm(z));
}

/* The summary as text.  Formatted by the C library, not PETSc's printf, which writes whole
   numbers under %g with a trailing '.'. */
static void SummaryText(const CFRunData *run, const CFPostSettings *set, const CFSummary *s, const char dir[], char buf[], size_t len)
{
  char   extraction[192] = "all melt delivered", width[32] = "off", lid[32] = "off", onset[96], lens[128], none[96];
  size_t n = 0;

  if (set->focusing_width > 0.0 || set->min_depletion > 0.0 || set->lid_temperature > 0.0) {
    if (set->focusing_width > 0.0) snprintf(width, sizeof(width), "%g km", (double)CFMToKm(set->focusing_width));
    if (set->lid_temperature > 0.0) snprintf(lid, sizeof(lid), "%g C", (double)CFKelvinToCelsius(set->lid_temperature));
    snprintf(extraction, sizeof(extraction), "focusing width %s, min depletion %g, lid %s", width, (double)set->min_depletion, lid);
  }
  Depth(onset, sizeof(onset), s->melt_onset_depth, "none (the axis column never reaches the solidus)");
  if (!isnan(s->melt_onset_depth) && s->melt_onset_depth >= run->nz * run->dz) snprintf(onset, sizeof(onset), "at or below the domain bottom, %.2f km", (double)CFMToKm(s->melt_onset_depth));
  snprintf(none, sizeof(none), "none (the %g C isotherm does not reach the axis column)", (double)CFKelvinToCelsius(set->melt_lens_isotherm));
  Depth(lens, sizeof(lens), s->melt_lens_depth, none);
#define ADD(...) n += (size_t)snprintf(buf + PetscMin(n, len - 1), n < len ? len - n : 0, __VA_ARGS__)
  ADD("post-processing (extraction: %s)\n", extraction);
  ADD("  crustal thickness      %.4f km from the delivered melt, %.4f km from the far-side depletion flux (all melt)\n", (double)CFMToKm(s->crustal_thickness), (double)CFMToKm(s->crustal_thickness_side_flux));
  ADD("  delivered melt flux    %.6g kg/m/s per metre of ridge, half domain\n", (double)s->melt_flux);
  ADD("  melt onset at the axis %s\n", onset);
  ADD("  melting region         width %.1f km, area %.1f km2\n", (double)CFMToKm(s->melting_region_width), (double)(s->melting_region_area * 1.0e-6));
  ADD("  mean melt fraction     %.4f (melting-rate weighted), regime mean %.4f (Plank & Langmuir 1992)\n", (double)s->mean_melt_fraction, (double)s->regime_mean_melt_fraction);
  ADD("  mean melting pressure  %.3f GPa\n", (double)CFPaToGPa(s->mean_melting_pressure));
  ADD("  maximum depletion      %.4f\n", (double)s->max_depletion);
  ADD("  melt-lens depth        %s (%g C at the axis)\n", lens, (double)CFKelvinToCelsius(set->melt_lens_isotherm));
  ADD("wrote %s/summary.csv, profiles.csv and pt_paths.csv\n", dir);
#undef ADD
}

/* The figures are drawn on rank 0 alone (crustforge/figures.h); a missing PNG device is a note,
   not an error, so a run on a machine without it still leaves its tables. */
static PetscErrorCode Figures(MPI_Comm comm, const CFRunData *run, const CFProfiles *prof, const CFPTPaths *paths, const char dir[])
{
  PetscMPIInt    rank;
  PetscErrorCode ierr = 0;
  int            ok   = 0;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  if (!rank) {
    PetscBool avail = PETSC_FALSE;
    ierr            = CFFiguresAvailable(&avail);
    if (!ierr && avail) ierr = CFFiguresWriteAll(run, prof, paths, dir);
    ok = avail;
  }
  PetscCall(CFPostShareError(comm, ierr));
  PetscCallMPI(MPI_Bcast(&ok, 1, MPI_INT, 0, comm));
  if (ok) PetscCall(PetscPrintf(comm, "wrote the figures (PNG) into %s\n", dir));
  else PetscCall(PetscPrintf(comm, "figures skipped: PLplot's pngcairo device is not installed\n"));
  PetscFunctionReturn(0);
}

static PetscErrorCode WriteAll(MPI_Comm comm, const CFRunData *run, const CFPostSettings *set, const char dir[], PetscBool figures, const CFSummary *sum, const CFProfiles *prof, const CFPTPaths *paths)
{
  char text[4096];

  PetscFunctionBeginUser;
  PetscCall(CFPostWriteTables(comm, dir, run, set, sum, prof, paths));
  SummaryText(run, set, sum, dir, text, sizeof(text));
  PetscCall(PetscPrintf(comm, "%s", text));
  if (figures) PetscCall(Figures(comm, run, prof, paths, dir));
  PetscFunctionReturn(0);
}

PetscErrorCode CFPostRun(MPI_Comm comm, const CFRunData *run, const CFPostSettings *set, const char dir[], PetscBool figures)
{
  CFSummary      sum;
  CFProfiles     prof;
  CFPTPaths      paths;
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  PetscCall(CFPostSummary(comm, run, set, &sum));
  PetscCall(CFPostProfiles(comm, run, set, &prof));
  ierr = CFPostPTPaths(comm, run, set, &paths);
  if (!ierr) ierr = WriteAll(comm, run, set, dir, figures, &sum, &prof, &paths);
  PetscCall(CFPostPTPathsDestroy(&paths));
  PetscCall(CFPostProfilesDestroy(&prof));
  PetscCall(ierr);
  PetscFunctionReturn(0);
}
