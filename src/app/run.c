/* The steady run: from a validated scenario to the files in output.dir. */
#include <crustforge/app.h>
#include <crustforge/steady.h>
#include <crustforge/units.h>

PetscErrorCode CFRunSteady(MPI_Comm comm, const CFConfig *cfg)
{
  PetscViewer   viewer = PETSC_VIEWER_STDOUT_(comm);
  CFSteady      s;
  CFSolveReport rep;
  PetscReal     H, Hs;

  PetscFunctionBeginUser;
  PetscCall(CFConfigView(cfg, viewer));
  PetscCall(CFOutputDirPrepare(comm, cfg));
  PetscCall(CFSteadyCreate(comm, cfg, &s));
  PetscCall(CFSteadySetInitialGuess(s));
  PetscCall(CFSteadySolve(s, &rep));
  PetscCall(PetscPrintf(comm, "steady solve: %" PetscInt_FMT " Newton iterations, %" PetscInt_FMT " linear iterations, residual %.3e K -> %.3e K (%s), %.2f s\n", rep.nonlinear_iterations, rep.linear_iterations, (double)rep.initial_residual, (double)rep.final_residual, SNESConvergedReasons[rep.reason], (double)rep.seconds));
  PetscCall(CFSteadyCrustalThickness(s, &H, &Hs));
  PetscCall(PetscPrintf(comm, "crustal thickness: %.4f km from melting rate, %.4f km from far-side depletion flux\n", (double)CFMToKm(H), (double)CFMToKm(Hs)));
  PetscCall(CFSteadyDestroy(&s));
  PetscFunctionReturn(0);
}
