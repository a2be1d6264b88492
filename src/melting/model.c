/* A melting model bound to its parameters and a scenario's bulk water. */
#include <crustforge/melting.h>
#include <crustforge/units.h>

struct _p_CFMeltingModel {
  const CFMeltingType *type;
  PetscReal            params[CF_MELTING_MAX_PARAMS];
  PetscReal            water_ppm;
};

PetscErrorCode CFMeltingModelCreate(const CFConfig *cfg, CFMeltingModel *model)
{
  const CFMeltingType *type = CFMeltingTypeFind(cfg->melting_model);
  CFMeltingModel       m;

  PetscFunctionBeginUser;
  PetscCheck(type, PETSC_COMM_SELF, PETSC_ERR_USER_INPUT, "melting.model: '%s' is not a melting model", cfg->melting_model);
  PetscCheck(cfg->melting_nparams == type->nparams, PETSC_COMM_SELF, PETSC_ERR_ARG_WRONG, "melting model %s takes %" PetscInt_FMT " parameters, scenario holds %" PetscInt_FMT, type->name, type->nparams, cfg->melting_nparams);
  PetscCall(PetscNew(&m));
  m->type = type;
  for (PetscInt i = 0; i < type->nparams; i++) m->params[i] = cfg->melting_params[i];
  m->water_ppm = cfg->water_ppm;
  *model       = m;
  PetscFunctionReturn(0);
}

PetscErrorCode CFMeltingModelDestroy(CFMeltingModel *model)
{
  PetscFunctionBeginUser;
  PetscCall(PetscFree(*model));
  PetscFunctionReturn(0);
}

const char *CFMeltingModelName(CFMeltingModel model) { return model->type->name; }

PetscErrorCode CFMeltingModelView(CFMeltingModel model, PetscViewer viewer)
{
  PetscFunctionBeginUser;
  PetscCall(PetscViewerASCIIPrintf(viewer, "Melting model %s: %s; bulk water %g ppm\n", model->type->name, model->type->description, (double)model->water_ppm));
  PetscCall(PetscViewerASCIIPushTab(viewer));
  for (PetscInt i = 0; i < model->type->nparams; i++) PetscCall(PetscViewerASCIIPrintf(viewer, "%-20s %-12g %s\n", model->type->params[i].key, (double)model->params[i], model->type->params[i].unit));
  PetscCall(PetscViewerASCIIPopTab(viewer));
  PetscFunctionReturn(0);
}

PetscErrorCode CFMeltingModelSolidus(CFMeltingModel model, PetscReal P, PetscReal *T)
{
  PetscFunctionBeginUser;
  *T = model->type->solidus(model->params, P, model->water_ppm);
  PetscFunctionReturn(0);
}

PetscErrorCode CFMeltingModelLiquidus(CFMeltingModel model, PetscReal P, PetscReal *T)
{
  PetscFunctionBeginUser;
  *T = model->type->liquidus(model->params, P, model->water_ppm);
  PetscFunctionReturn(0);
}

PetscErrorCode CFMeltingModelMeltFraction(CFMeltingModel model, PetscReal P, PetscReal T, PetscReal *F, PetscReal *dFdT)
{
  PetscFunctionBeginUser;
  PetscCheck(!model->type->melt_fraction(model->params, P, T, model->water_ppm, F, dFdT), PETSC_COMM_SELF, PETSC_ERR_NOT_CONVERGED, "melting model %s: no melt fraction at P = %g GPa, T = %g C", model->type->name, (double)CFPaToGPa(P), (double)CFKelvinToCelsius(T));
  PetscFunctionReturn(0);
}

PetscErrorCode CFMeltingModelMeltFractionArray(CFMeltingModel model, PetscInt n, const PetscReal P[], const PetscReal T[], PetscReal F[], PetscReal dFdT[])
{
  PetscInt      bad = -1;
  PetscLogEvent event;

  PetscFunctionBeginUser;
  /* registering an existing name returns its event: -log_view shows the melting model's share */
  PetscCall(PetscLogEventRegister("CFMeltFraction", 0, &event));
  PetscCall(PetscLogEventBegin(event, 0, 0, 0, 0));
  /* Each point is independent, so the result cannot depend on the thread count. */
#pragma omp parallel for schedule(static) reduction(max : bad)
  for (PetscInt i = 0; i < n; i++) {
    if (model->type->melt_fraction(model->params, P[i], T[i], model->water_ppm, &F[i], dFdT ? &dFdT[i] : NULL)) bad = PetscMax(bad, i);
  }
  PetscCall(PetscLogEventEnd(event, 0, 0, 0, 0));
  PetscCheck(bad < 0, PETSC_COMM_SELF, PETSC_ERR_NOT_CONVERGED, "melting model %s: no melt fraction at P = %g GPa, T = %g C", model->type->name, (double)CFPaToGPa(P[bad]), (double)CFKelvinToCelsius(T[bad]));
  PetscFunctionReturn(0);
}
