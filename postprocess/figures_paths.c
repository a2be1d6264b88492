/* The P-T diagram: parcels' paths over the melting model's solidus and liquidus, in the
   petrologists' orientation (temperature across, pressure increasing downward), with the
   lithostatic depth on the right-hand axis. */
#include <crustforge/melting.h>
#include <crustforge/units.h>
#include "figures_common.h"

#define CF_FIG_NCURVE 200
#define CF_FIG_ONSET  1.0e-6 /* depletion above which a parcel counts as melting */

static const PLINT PathColors[] = {CF_COL_ORANGE, CF_COL_SKY_BLUE, CF_COL_GREEN, CF_COL_BLUE, CF_COL_VERMILLION, CF_COL_PURPLE, CF_COL_YELLOW};
#define CF_FIG_NPATHCOLORS ((PetscInt)(sizeof(PathColors) / sizeof(PathColors[0])))

/* Paths share the adiabat at depth: earlier ones wider, so each shows beside the later ones. */
static PLFLT PathWidth(PetscInt p, PetscInt n) { return CF_FIG_LINE_WIDTH + PetscMin(6.0, 1.5 * (n - 1 - p)); }

/* Everything the diagram shows, prepared before its stream is opened. */
typedef struct {
  PetscInt  npaths, npoints[CF_MAX_PATHS], onset[CF_MAX_PATHS];
  PetscReal Pmax, depth_max, Tlo, Thi; /* Pa, m, C */
  PetscReal *T_C[CF_MAX_PATHS], *P_GPa[CF_MAX_PATHS];
  PetscReal curve_P_GPa[CF_FIG_NCURVE], sol_C[CF_FIG_NCURVE], liq_C[CF_FIG_NCURVE];
  char      text[CF_MAX_PATHS][64], subtitle[320];
} CFPathsPlot;

static PetscErrorCode PathsPlotDraw(const CFPathsPlot *pp, const char dir[])
{
  CFFigure fig;

  PetscFunctionBeginUser;
  PetscCall(CFFigureOpen(dir, "pt_paths.png", &fig));
  plvpor(0.09, 0.9, 0.12, 0.89);
  plwind(pp->Tlo, pp->Thi, CFPaToGPa(pp->Pmax), 0.0); /* pressure increases downward */
  plwidth(CF_FIG_LINE_WIDTH + 1.0);
  plcol0(CF_COL_FOREGROUND);
  CFFigureLine(CF_FIG_NCURVE, pp->sol_C, pp->curve_P_GPa);
  pllsty(3);
  CFFigureLine(CF_FIG_NCURVE, pp->liq_C, pp->curve_P_GPa);
  pllsty(1);
  for (PetscInt p = 0; p < pp->npaths; p++) {
    plwidth(PathWidth(p, pp->npaths));
    plcol0(PathColors[p % CF_FIG_NPATHCOLORS]);
    pllsty(1 + (PLINT)(p / CF_FIG_NPATHCOLORS));
    CFFigureLine(pp->npoints[p], pp->T_C[p], pp->P_GPa[p]);
    if (pp->onset[p] >= 0) plptex(pp->T_C[p][pp->onset[p]], pp->P_GPa[p][pp->onset[p]], 1.0, 0.0, 0.5, "●");
  }
  pllsty(1);
  plwidth(1.0);
  plcol0(CF_COL_FOREGROUND);
  plbox("bcnst", 0.0, 0, "bnstv", 0.0, 0);
  plmtex("b", 3.0, 0.5, 0.5, "Temperature (°C)");
  plmtex("l", 3.6, 0.5, 0.5, "Pressure (GPa)");
  plmtex("t", 2.4, 0.5, 0.5, "Pressure-temperature paths of mantle parcels");
  plschr(0.0, 0.8 * CF_FIG_TEXT_SCALE);
  plmtex("t", 1.2, 0.5, 0.5, pp->subtitle);
  plschr(0.0, CF_FIG_TEXT_SCALE);
  /* lithostatic depth P / (rho_m g) on the right */
  plwind(pp->Tlo, pp->Thi, CFMToKm(pp->depth_max), 0.0);
  plbox("", 0.0, 0, "cmstv", 0.0, 0);
  plmtex("r", 3.6, 0.5, 0.5, "Depth (km, lithostatic)");
  {
    CFLegendEntry e[CF_MAX_PATHS + 3];
    PetscInt      n = 0;
    e[n++] = (CFLegendEntry){"solidus", CF_COL_FOREGROUND, 1, CF_FIG_LINE_WIDTH + 1.0, NULL, 0};
    e[n++] = (CFLegendEntry){"liquidus", CF_COL_FOREGROUND, 3, CF_FIG_LINE_WIDTH + 1.0, NULL, 0};
    for (PetscInt p = 0; p < pp->npaths; p++) e[n++] = (CFLegendEntry){pp->text[p], PathColors[p % CF_FIG_NPATHCOLORS], 1 + (PLINT)(p / CF_FIG_NPATHCOLORS), PathWidth(p, pp->npaths), NULL, 0};
    e[n++] = (CFLegendEntry){"melting begins", CF_COL_FOREGROUND, 0, 0.0, "●", 0};
    CFFigureLegend(n, e, PL_POSITION_LEFT | PL_POSITION_BOTTOM | PL_POSITION_INSIDE, 1, 0.02, 0.03);
  }
  PetscCall(CFFigureClose(&fig));
  PetscFunctionReturn(0);
}

PetscErrorCode CFFigurePTPaths(const CFRunData *run, const CFPTPaths *paths, const char dir[])
{
  const CFConfig *cfg   = &run->cfg;
  const PetscReal rho_g = cfg->mantle_density * cfg->gravity;
  CFMeltingModel  model;
  CFPathsPlot    *pp;
  PetscReal       lo, hi;
  char            scenario[256];
  PetscErrorCode  ierr;

  PetscFunctionBeginUser;
  PetscCall(PetscNew(&pp));
  pp->npaths = PetscMin(paths ? paths->npaths : 0, CF_MAX_PATHS);
  for (PetscInt p = 0; p < pp->npaths; p++) {
    pp->npoints[p] = PetscMax(paths->npoints[p], 0);
    if (CFFigureRange(pp->npoints[p], paths->P[p], &lo, &hi)) pp->Pmax = PetscMax(pp->Pmax, hi);
  }
  if (!(pp->Pmax > 0)) pp->Pmax = rho_g * run->nz * run->dz; /* no paths: the whole column */
  pp->depth_max = pp->Pmax / rho_g;

  PetscCall(CFMeltingModelCreate(cfg, &model));
  PetscCall(CFFigureScenarioText(cfg, scenario, sizeof(scenario)));
  PetscCall(PetscSNPrintf(pp->subtitle, sizeof(pp->subtitle), "%s, melting model %s", scenario, CFMeltingModelName(model)));
  for (PetscInt k = 0; k < CF_FIG_NCURVE; k++) {
    PetscReal P = pp->Pmax * k / (CF_FIG_NCURVE - 1.0), Ts, Tl;
    PetscCall(CFMeltingModelSolidus(model, P, &Ts));
    PetscCall(CFMeltingModelLiquidus(model, P, &Tl));
    pp->curve_P_GPa[k] = CFPaToGPa(P);
    pp->sol_C[k]       = CFKelvinToCelsius(Ts);
    pp->liq_C[k]       = CFKelvinToCelsius(Tl);
  }
  PetscCall(CFMeltingModelDestroy(&model));

  if (!CFFigureRange(CF_FIG_NCURVE, pp->sol_C, &pp->Tlo, &pp->Thi)) pp->Tlo = pp->Thi = 0.0;
  if (CFFigureRange(CF_FIG_NCURVE, pp->liq_C, &lo, &hi)) pp->Thi = PetscMax(pp->Thi, hi);
  for (PetscInt p = 0; p < pp->npaths; p++) {
    const PetscInt n = pp->npoints[p];
    PetscCall(PetscMalloc2(n, &pp->T_C[p], n, &pp->P_GPa[p]));
    pp->onset[p] = -1;
    for (PetscInt k = 0; k < n; k++) {
      pp->T_C[p][k]   = CFKelvinToCelsius(paths->T[p][k]);
      pp->P_GPa[p][k] = CFPaToGPa(paths->P[p][k]);
      if (pp->onset[p] < 0 && paths->F[p][k] > CF_FIG_ONSET && !PetscIsInfOrNanReal(pp->T_C[p][k]) && !PetscIsInfOrNanReal(pp->P_GPa[p][k])) pp->onset[p] = k;
    }
    if (CFFigureRange(n, pp->T_C[p], &lo, &hi)) {
      pp->Tlo = PetscMin(pp->Tlo, lo);
      pp->Thi = PetscMax(pp->Thi, hi);
    }
    if (n > 0 && !PetscIsInfOrNanReal(paths->x[p][0])) (void)snprintf(pp->text[p], sizeof(pp->text[p]), "parcel from x = %.0f km", (double)CFMToKm(paths->x[p][0]));
    else (void)snprintf(pp->text[p], sizeof(pp->text[p]), "parcel %d", (int)(p + 1));
  }
  pp->Tlo = 100.0 * PetscFloorReal(pp->Tlo / 100.0);
  pp->Thi = 100.0 * PetscCeilReal(pp->Thi / 100.0 + 1e-9);

  ierr = PathsPlotDraw(pp, dir); /* free the arrays also when drawing fails */
  for (PetscInt p = 0; p < pp->npaths; p++) PetscCall(PetscFree2(pp->T_C[p], pp->P_GPa[p]));
  PetscCall(PetscFree(pp));
  PetscCall(ierr);
  PetscFunctionReturn(0);
}
