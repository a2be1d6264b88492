/* The steady run: from a validated scenario to the files in output.dir. */
#include <crustforge/app.h>
#include <crustforge/output.h>
#include <crustforge/postprocess.h>
#include <crustforge/rundata.h>
#include <crustforge/steady.h>
#include <crustforge/units.h>

/* Push the log stage of this name, registered on first use (a sweep pushes it once per case). */
static PetscErrorCode PushStage(const char name[])
{
  PetscLogStage stage = -1;

  PetscFunctionBeginUser;
  PetscCall(PetscLogStageGetId(name, &stage));
  if (stage < 0) PetscCall(PetscLogStageRegister(name, &stage));
  PetscCall(PetscLogStagePush(stage));
  PetscFunctionReturn(0);
}

/* Every field of the run, as dof-1 vectors of the solver's scalar DMDA. */
static PetscErrorCode ComputeFields(CFSteady s, Vec v[CF_NFIELDS])
{
  DM     da;
  CFFlow flow;

  PetscFunctionBeginUser;
  PetscCall(CFSteadyGetScalarDM(s, &da));
  PetscCall(CFSteadyGetFlow(s, &flow));
  for (PetscInt f = 0; f < CF_NFIELDS; f++) {
    PetscCall(DMCreateGlobalVector(da, &v[f]));
    PetscCall(PetscObjectSetName((PetscObject)v[f], CFRunFields[f].name));
  }
  PetscCall(CFSteadyGetFields(s, v[CF_FIELD_TEMPERATURE], v[CF_FIELD_DEPLETION], v[CF_FIELD_MELT_FRACTION_EQ], v[CF_FIELD_MELTING_RATE], v[CF_FIELD_CONDUCTIVITY]));
  PetscCall(CFSteadyGetPressure(s, v[CF_FIELD_PRESSURE]));
  PetscCall(CFFlowCellFields(flow, da, CFSteadyGetConfig(s)->dx, CFSteadyGetConfig(s)->dz, v[CF_FIELD_VELOCITY_X], v[CF_FIELD_VELOCITY_UP], v[CF_FIELD_STREAM_FUNCTION]));
  PetscFunctionReturn(0);
}

static PetscErrorCode WriteRunFile(MPI_Comm comm, const CFConfig *cfg, DM da, Vec v[CF_NFIELDS], const CFSolveReport *rep, PetscReal H, PetscReal Hs)
{
  char           path[PETSC_MAX_PATH_LEN];
  CFRunFile      file;
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  PetscCall(PetscSNPrintf(path, sizeof(path), "%s/run.h5", cfg->output_dir));
  PetscCall(CFRunFileCreate(comm, cfg, da, path, &file));
  /* a failure part way removes the temporary file, so nothing complete-looking is left */
  ierr = 0;
  for (PetscInt f = 0; f < CF_NFIELDS && !ierr; f++) ierr = CFRunFileWriteField(file, &CFRunFields[f], v[f]);
  if (!ierr) ierr = CFRunFileSetAttributeInt(file, "nonlinear_iterations", rep->nonlinear_iterations);
  if (!ierr) ierr = CFRunFileSetAttributeInt(file, "linear_iterations", rep->linear_iterations);
  if (!ierr) ierr = CFRunFileSetAttributeReal(file, "residual_norm", rep->final_residual);
  if (!ierr) ierr = CFRunFileSetAttributeReal(file, "solve_seconds", rep->seconds);
  if (!ierr) ierr = CFRunFileSetAttributeReal(file, "crustal_thickness_km", CFMToKm(H));
  if (!ierr) ierr = CFRunFileSetAttributeReal(file, "crustal_thickness_side_flux_km", CFMToKm(Hs));
  if (ierr) {
    (void)CFRunFileClose(&file, PETSC_FALSE);
    PetscCall(ierr);
  }
  PetscCall(CFRunFileClose(&file, PETSC_TRUE));
  PetscFunctionReturn(0);
}

/* The run file, in its log stage. */
static PetscErrorCode Output(MPI_Comm comm, CFSteady s, const CFSolveReport *rep, DM da, Vec v[CF_NFIELDS])
{
  const CFConfig *cfg = CFSteadyGetConfig(s);
  PetscReal       H, Hs;
  PetscErrorCode  ierr;

  PetscFunctionBeginUser;
  PetscCall(PushStage("Output"));
  PetscCall(CFSteadyCrustalThickness(s, &H, &Hs));
  ierr = WriteRunFile(comm, cfg, da, v, rep, H, Hs);
  PetscCall(PetscLogStagePop());
  PetscCall(ierr);
  PetscCall(PetscPrintf(comm, "wrote %s/run.h5 and run.xdmf\n", cfg->output_dir));
  PetscFunctionReturn(0);
}

/* Summary and post-processing outputs from the run's fields, in their log stage. */
static PetscErrorCode PostProcess(MPI_Comm comm, CFSteady s, const CFSolveReport *rep, PetscBool write, CFSummary *sum, DM da, Vec v[CF_NFIELDS])
{
  const CFConfig *cfg = CFSteadyGetConfig(s);
  CFRunData       rd;
  CFPostSettings  set;
  PetscErrorCode  ierr = 0;

  PetscFunctionBeginUser;
  PetscCall(PushStage("Post-processing"));
  PetscCall(CFRunDataCreate(comm, cfg, &rd));
  for (PetscInt f = 0; f < CF_NFIELDS && !ierr; f++) ierr = CFRunDataSetField(comm, &rd, (CFFieldId)f, da, v[f]);
  rd.nonlinear_iterations = rep->nonlinear_iterations;
  rd.linear_iterations    = rep->linear_iterations;
  rd.residual_norm        = rep->final_residual;
  rd.solve_seconds        = rep->seconds;
  if (!ierr) ierr = CFPostSettingsFromConfig(cfg, &set);
  if (!ierr && sum) ierr = CFPostSummary(comm, &rd, &set, sum);
  if (!ierr && write) ierr = CFPostRun(comm, &rd, &set, cfg->output_dir, cfg->output_figures);
  PetscCall(CFRunDataDestroy(&rd));
  PetscCall(PetscLogStagePop());
  PetscCall(ierr);
  PetscFunctionReturn(0);
}

/* The fields are freed on the error paths too (a failed write, a full disk). */
PetscErrorCode CFRunSteadyResults(MPI_Comm comm, CFSteady s, const CFSolveReport *rep, PetscBool write, CFSummary *sum)
{
  Vec            v[CF_NFIELDS];
  DM             da;
  PetscErrorCode ierr = 0;

  PetscFunctionBeginUser;
  PetscCall(ComputeFields(s, v));
  PetscCall(CFSteadyGetScalarDM(s, &da));
  if (write) ierr = Output(comm, s, rep, da, v);
  if (!ierr) ierr = PostProcess(comm, s, rep, write, sum, da, v);
  for (PetscInt f = 0; f < CF_NFIELDS; f++) PetscCall(VecDestroy(&v[f]));
  PetscCall(ierr);
  PetscFunctionReturn(0);
}

/* Solve, then write and post-process; the caller owns s either way. */
static PetscErrorCode SolveAndWrite(MPI_Comm comm, CFSteady s)
{
  CFSolveReport rep;
  PetscInt      levels, coarse_its;

  PetscFunctionBeginUser;
  PetscCall(PushStage("Steady solve"));
  PetscCall(CFSteadySequenceInitialGuess(s, &levels, &coarse_its));
  if (levels) PetscCall(PetscPrintf(comm, "initial guess: %" PetscInt_FMT " coarser grids, %" PetscInt_FMT " Newton iterations on them\n", levels, coarse_its));
  PetscCall(CFSteadySolve(s, &rep));
  PetscCall(PetscLogStagePop());
  PetscCall(PetscPrintf(comm, "steady solve: %" PetscInt_FMT " Newton iterations, %" PetscInt_FMT " linear iterations, residual %.3e K -> %.3e K (%s), %.2f s\n", rep.nonlinear_iterations, rep.linear_iterations, (double)rep.initial_residual, (double)rep.final_residual, SNESConvergedReasons[rep.reason], (double)rep.seconds));
  PetscCall(CFRunSteadyResults(comm, s, &rep, PETSC_TRUE, NULL));
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunSteady(MPI_Comm comm, const CFConfig *cfg)
{
  CFSteady       s;
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  PetscCall(CFConfigView(cfg, PETSC_VIEWER_STDOUT_(comm)));
  PetscCall(CFOutputDirPrepare(comm, cfg));
  PetscCall(CFHeapReserve(comm, cfg));
  PetscCall(PushStage("Flow and solver set-up"));
  PetscCall(CFSteadyCreate(comm, cfg, &s));
  PetscCall(PetscLogStagePop());
  /* a failed solve or write still frees the solver and the directory lock before reporting */
  ierr = SolveAndWrite(comm, s);
  PetscCall(CFSteadyDestroy(&s));
  PetscCall(CFOutputDirRelease(comm, cfg));
  PetscCall(ierr);
  PetscFunctionReturn(0);
}
