/* Test driver for tests/test_output_readers.py: writes a sample run file through the output
   module, so that independent readers (h5py, XML, h5dump) can check it.
     write_sample_run write PATH [--fail | --kill] [-section_key value ...]
       writes PATH (and its .xdmf) for an invented scenario (a fictional slow ridge segment,
       24 x 12 cells) with two analytic fields: temperature (half-space cooling, stored in degC)
       and velocity_x (corner flow, stored in mm/yr).  --fail closes it as a failed run;
       --kill stops the process with SIGKILL just before the close, as a crash would.
     write_sample_run read PATH
       opens PATH with the module's reader; prints "ok" or the one-line error.
   Exit status 0 on success, 2 on a refused file, 1 otherwise. */
#include <math.h>
#include <signal.h>
#include <string.h>
#include <petscdmda.h>
#include <crustforge/output.h>
#include <crustforge/units.h>

static const char *defaults[] = {"-grid_width", "48", "-grid_depth", "24", "-grid_spacing", "2", "-ridge_full_spreading_rate", "25", "-mantle_potential_temperature", "1380", "-output_dir", "sample-run", NULL};

static PetscErrorCode Fill(DM da, const CFConfig *cfg, PetscBool temperature, Vec v)
{
  PetscScalar **a;
  DMDALocalInfo info;
  PetscReal     kappa = cfg->conductivity / (cfg->mantle_density * cfg->heat_capacity), U0 = cfg->half_rate;

  PetscFunctionBeginUser;
  PetscCall(DMDAGetLocalInfo(da, &info));
  PetscCall(DMDAVecGetArray(da, v, &a));
  for (PetscInt j = info.ys; j < info.ys + info.ym; j++)
    for (PetscInt i = info.xs; i < info.xs + info.xm; i++) {
      PetscReal x = (i + 0.5) * cfg->dx, z = (j + 0.5) * cfg->dz;
      /* half-space cooling at age x/U0 (Turcotte & Schubert, Geodynamics, 2nd ed., 4.15-4.17);
         corner flow u (Batchelor 1967; DESIGN 2.1) */
      if (temperature) a[j][i] = cfg->surface_temperature + (cfg->potential_temperature - cfg->surface_temperature) * erf(z / (2.0 * PetscSqrtReal(kappa * x / U0)));
      else a[j][i] = 2.0 * U0 / PETSC_PI * (atan(x / z) - x * z / (x * x + z * z));
    }
  PetscCall(DMDAVecRestoreArray(da, v, &a));
  PetscFunctionReturn(0);
}

static PetscErrorCode Write(const char path[], PetscBool fail, PetscBool kill_before_close)
{
  static const CFFieldInfo temperature = {"temperature", "mantle temperature", "degC", "K", 1.0, -CF_KELVIN_OFFSET};
  static const CFFieldInfo velocity    = {"velocity_x", "horizontal mantle velocity away from the axis", "mm/yr", "m/s", 1.0e3 * CF_SECONDS_PER_YEAR, 0.0};
  CFConfig                 cfg;
  DM                       da;
  Vec                      v;
  CFRunFile                file;

  PetscFunctionBeginUser;
  for (int i = 0; defaults[i]; i += 2) {
    PetscBool set;
    PetscCall(PetscOptionsHasName(NULL, NULL, defaults[i], &set));
    if (!set) PetscCall(PetscOptionsSetValue(NULL, defaults[i], defaults[i + 1]));
  }
  PetscCall(CFConfigSetFromOptions(PETSC_COMM_WORLD, &cfg));
  PetscCall(DMDACreate2d(PETSC_COMM_WORLD, DM_BOUNDARY_NONE, DM_BOUNDARY_NONE, DMDA_STENCIL_STAR, cfg.nx, cfg.nz, PETSC_DECIDE, PETSC_DECIDE, 1, 1, NULL, NULL, &da));
  PetscCall(DMSetUp(da));
  PetscCall(DMCreateGlobalVector(da, &v));
  PetscCall(CFRunFileCreate(PETSC_COMM_WORLD, &cfg, da, path, &file));
  PetscCall(Fill(da, &cfg, PETSC_TRUE, v));
  PetscCall(CFRunFileWriteField(file, &temperature, v));
  PetscCall(Fill(da, &cfg, PETSC_FALSE, v));
  PetscCall(CFRunFileWriteField(file, &velocity, v));
  PetscCall(CFRunFileSetAttributeInt(file, "nonlinear_iterations", 7));
  PetscCall(CFRunFileSetAttributeReal(file, "residual_norm", 3.25e-11));
  PetscCall(CFRunFileSetAttributeReal(file, "solve_seconds", 0.5));
  if (kill_before_close) raise(SIGKILL);
  PetscCall(CFRunFileClose(&file, (PetscBool)!fail));
  PetscCall(VecDestroy(&v));
  PetscCall(DMDestroy(&da));
  PetscFunctionReturn(0);
}

static PetscErrorCode Read(const char path[])
{
  CFRunReader r;

  PetscFunctionBeginUser;
  PetscCall(CFRunReaderOpen(PETSC_COMM_WORLD, path, &r));
  PetscCall(CFRunReaderDestroy(&r));
  PetscCall(PetscPrintf(PETSC_COMM_WORLD, "ok\n"));
  PetscFunctionReturn(0);
}

int main(int argc, char **argv)
{
  PetscErrorCode ierr;
  int            status;
  PetscBool      fail = PETSC_FALSE, kill_it = PETSC_FALSE;

  if (argc < 3 || (strcmp(argv[1], "write") && strcmp(argv[1], "read"))) {
    fprintf(stderr, "usage: write_sample_run write|read PATH [--fail|--kill] [-key value ...]\n");
    return 1;
  }
  for (int i = 3; i < argc; i++) {
    if (!strcmp(argv[i], "--fail")) fail = PETSC_TRUE;
    if (!strcmp(argv[i], "--kill")) kill_it = PETSC_TRUE;
  }
  if (PetscInitialize(&argc, &argv, NULL, NULL)) return 1;
  PetscPushErrorHandler(PetscReturnErrorHandler, NULL);
  ierr = !strcmp(argv[1], "write") ? Write(argv[2], fail, kill_it) : Read(argv[2]);
  status = !ierr ? 0 : (ierr == PETSC_ERR_FILE_OPEN || ierr == PETSC_ERR_FILE_UNEXPECTED) ? 2 : 1;
  if (ierr) {
    const char *text     = NULL;
    char       *specific = NULL;
    PetscMPIInt rank;
    PetscErrorMessage(ierr, &text, &specific);
    MPI_Comm_rank(PETSC_COMM_WORLD, &rank);
    if (!rank) fprintf(stderr, "write_sample_run: %s\n", specific && specific[0] ? specific : text);
  }
  PetscPopErrorHandler();
  if (PetscFinalize()) return 1;
  return status;
}
