/* Surface observables against plate age: the model's heat flow and seafloor depth beside
   half-space cooling with the run's parameters and the empirical fits of Parsons & Sclater
   (1977) and Stein & Stein (1992). */
#include <string.h>
#include <crustforge/units.h>
#include "figures_common.h"

#define CF_FIG_NREF      400
#define CF_FIG_MW_PER_W  1.0e3 /* heat flow is drawn in the trade's mW m-2 */
#define CF_FIG_NCURVES   (2 + CF_NFITS)

typedef enum { CF_PROFILE_HEAT_FLOW, CF_PROFILE_SEAFLOOR_DEPTH } CFProfileKind;

/* Everything a profile figure shows, prepared before its stream is opened: curve 0 is the model
   (on the profile's columns), curve 1 half-space cooling, then the empirical fits (on a fine
   age grid). */
typedef struct {
  CFProfileKind kind;
  PetscInt      n[CF_FIG_NCURVES];
  PetscReal    *age_myr[CF_FIG_NCURVES], *y[CF_FIG_NCURVES];
  PetscReal     age_max_myr, ylo, yhi, x_max_km;
  char          text[CF_FIG_NCURVES][160], subtitle[256];
} CFProfilePlot;

static const PLINT CurveColor[CF_FIG_NCURVES] = {CF_COL_FOREGROUND, CF_COL_BLUE, CF_COL_ORANGE, CF_COL_GREEN};
static const PLINT CurveStyle[CF_FIG_NCURVES] = {1, 1, 2, 3};
static const PLFLT CurveWidth[CF_FIG_NCURVES] = {CF_FIG_LINE_WIDTH + 1.5, CF_FIG_LINE_WIDTH, CF_FIG_LINE_WIDTH, CF_FIG_LINE_WIDTH};

static PetscErrorCode ProfilePlotDraw(const CFProfilePlot *pp, const char dir[])
{
  const PetscBool q = (PetscBool)(pp->kind == CF_PROFILE_HEAT_FLOW);
  CFFigure        fig;
  CFLegendEntry   e[CF_FIG_NCURVES];

  PetscFunctionBeginUser;
  PetscCall(CFFigureOpen(dir, q ? "heat_flow.png" : "seafloor_depth.png", &fig));
  plvpor(0.1, 0.95, 0.12, 0.78);
  /* heat flow up; seafloor depth down, as on a bathymetric section */
  if (q) plwind(0.0, pp->age_max_myr, pp->ylo, pp->yhi);
  else plwind(0.0, pp->age_max_myr, pp->yhi, pp->ylo);
  for (PetscInt c = CF_FIG_NCURVES - 1; c >= 0; c--) { /* the model last, on top */
    plcol0(CurveColor[c]);
    pllsty(CurveStyle[c]);
    plwidth(CurveWidth[c]);
    CFFigureLine(pp->n[c], pp->age_myr[c], pp->y[c]);
    e[c] = (CFLegendEntry){pp->text[c], CurveColor[c], CurveStyle[c], CurveWidth[c], NULL, 0};
  }
  pllsty(1);
  plwidth(1.0);
  plcol0(CF_COL_FOREGROUND);
  plbox("bnst", 0.0, 0, "bcnstv", 0.0, 0);
  plmtex("b", 3.0, 0.5, 0.5, "Plate age (Myr)");
  plmtex("l", 4.6, 0.5, 0.5, q ? "Surface heat flow (mW m⁻²)" : "Seafloor depth (m)");
  plmtex("t", 6.0, 0.5, 0.5, q ? "Surface heat flow against plate age" : "Seafloor depth against plate age");
  plschr(0.0, 0.8 * CF_FIG_TEXT_SCALE);
  plmtex("t", 4.5 / 0.8, 0.5, 0.5, pp->subtitle); /* in the smaller characters */
  plschr(0.0, CF_FIG_TEXT_SCALE);
  if (pp->x_max_km > 0) { /* distance from the axis along the top: age = x / U0 */
    plwind(0.0, pp->x_max_km, 0.0, 1.0);
    plbox("cmst", 0.0, 0, "", 0.0, 0);
    plmtex("t", 2.8, 0.5, 0.5, "Distance from axis (km)");
  }
  CFFigureLegend(CF_FIG_NCURVES, e, PL_POSITION_RIGHT | PL_POSITION_TOP | PL_POSITION_INSIDE, 1, 0.02, 0.03);
  PetscCall(CFFigureClose(&fig));
  PetscFunctionReturn(0);
}

/* v as "1.2×10⁻⁶" (or plain %g between 0.01 and 10^4), with Unicode superscripts. */
static void FormatPow10(PetscReal v, char text[], size_t len)
{
  static const char *const sup[10] = {"⁰", "¹", "²", "³", "⁴", "⁵", "⁶", "⁷", "⁸", "⁹"};
  const int                e       = (v > 0) ? (int)PetscFloorReal(PetscLog10Real(v)) : 0;
  char                     digits[16], exp[64] = "";

  if (!(v > 0) || (e >= -2 && e < 4)) {
    (void)snprintf(text, len, "%g", (double)v);
    return;
  }
  (void)snprintf(digits, sizeof(digits), "%d", e);
  for (const char *c = digits; *c; c++) (void)strncat(exp, *c == '-' ? "⁻" : sup[*c - '0'], sizeof(exp) - strlen(exp) - 1);
  (void)snprintf(text, len, "%.2g×10%s", (double)(v / PetscPowReal(10.0, e)), exp);
}

static PetscErrorCode ProfileFigure(const CFRunData *run, const CFProfiles *prof, PetscReal ridge_depth, CFProfileKind kind, const char dir[])
{
  const PetscBool q = (PetscBool)(kind == CF_PROFILE_HEAT_FLOW);
  const PetscReal scale = q ? CF_FIG_MW_PER_W : 1.0;
  CFCoolingParams cp;
  CFProfilePlot  *pp;
  PetscReal       lo, t_ref;
  char            kappa[32], alpha[32];
  PetscErrorCode  ierr;

  PetscFunctionBeginUser;
  PetscCall(PetscNew(&pp));
  pp->kind = kind;
  pp->n[0] = prof ? PetscMax(prof->n, 0) : 0;
  for (PetscInt c = 1; c < CF_FIG_NCURVES; c++) pp->n[c] = CF_FIG_NREF;
  for (PetscInt c = 0; c < CF_FIG_NCURVES; c++) PetscCall(PetscMalloc2(pp->n[c], &pp->age_myr[c], pp->n[c], &pp->y[c]));

  for (PetscInt i = 0; i < pp->n[0]; i++) {
    pp->age_myr[0][i] = CFSToMyr(prof->age[i]);
    pp->y[0][i]       = scale * (q ? prof->heat_flow[i] : prof->seafloor_depth[i]);
  }
  if (!CFFigureRange(pp->n[0], pp->age_myr[0], &lo, &pp->age_max_myr) || !(pp->age_max_myr > 0)) pp->age_max_myr = CFSToMyr(run->nx * run->dx / run->cfg.half_rate);
  if (!(pp->age_max_myr > 0)) pp->age_max_myr = 10.0; /* no ages at all: a plain 0-10 Myr frame */
  pp->x_max_km = run->cfg.half_rate > 0 ? CFMToKm(run->cfg.half_rate * CFMyrToS(pp->age_max_myr)) : 0.0;

  CFCoolingParamsFromConfig(&run->cfg, &cp);
  for (PetscInt k = 0; k < CF_FIG_NREF; k++) {
    const PetscReal t_myr = pp->age_max_myr * (k + 1.0) / CF_FIG_NREF, t = CFMyrToS(t_myr); /* t > 0: the curves are singular or start at the axis */
    pp->age_myr[1][k] = t_myr;
    pp->y[1][k]       = q ? scale * CFHalfSpaceHeatFlow(&cp, t) : ridge_depth + CFHalfSpaceSubsidence(&cp, t);
    for (PetscInt f = 0; f < CF_NFITS; f++) {
      pp->age_myr[2 + f][k] = t_myr;
      pp->y[2 + f][k]       = scale * (q ? CFEmpiricalHeatFlow((CFEmpiricalFit)f, t) : CFEmpiricalDepth((CFEmpiricalFit)f, t));
    }
  }

  /* the vertical range from all curves; heat flow only from t_ref on, as q ~ t^-1/2 near the axis */
  t_ref   = q ? pp->age_max_myr / 20.0 : 0.0;
  pp->ylo = PETSC_MAX_REAL;
  pp->yhi = -PETSC_MAX_REAL;
  for (PetscInt c = 0; c < CF_FIG_NCURVES; c++)
    for (PetscInt k = 0; k < pp->n[c]; k++)
      if (pp->age_myr[c][k] >= t_ref && !PetscIsInfOrNanReal(pp->y[c][k])) {
        pp->ylo = PetscMin(pp->ylo, pp->y[c][k]);
        pp->yhi = PetscMax(pp->yhi, pp->y[c][k]);
      }
  if (pp->ylo > pp->yhi) pp->ylo = pp->yhi = q ? 0.0 : ridge_depth;
  if (q) {
    pp->ylo = 0.0;
    pp->yhi = PetscMax(1.1 * pp->yhi, 1.0);
  } else {
    const PetscReal pad = PetscMax(0.05 * (pp->yhi - pp->ylo), 50.0);
    pp->ylo -= pad;
    pp->yhi += pad;
  }

  /* C's %g, not PetscSNPrintf's (which writes 3300 as "3300.") */
  (void)snprintf(pp->text[0], sizeof(pp->text[0]), "model");
  FormatPow10(cp.diffusivity, kappa, sizeof(kappa));
  FormatPow10(cp.expansivity, alpha, sizeof(alpha));
  if (q) (void)snprintf(pp->text[1], sizeof(pp->text[1]), "half-space cooling (k %g W m⁻¹ K⁻¹, κ %s m² s⁻¹, ΔT %g K)", (double)cp.conductivity, kappa, (double)cp.temperature_difference);
  else (void)snprintf(pp->text[1], sizeof(pp->text[1]), "half-space cooling from %g m (α %s K⁻¹, ΔT %g K)", (double)ridge_depth, alpha, (double)cp.temperature_difference);
  for (PetscInt f = 0; f < CF_NFITS; f++) (void)snprintf(pp->text[2 + f], sizeof(pp->text[2 + f]), "%s", CFEmpiricalFitName((CFEmpiricalFit)f));
  PetscCall(CFFigureScenarioText(&run->cfg, pp->subtitle, sizeof(pp->subtitle)));

  ierr = ProfilePlotDraw(pp, dir); /* free the arrays also when drawing fails */
  for (PetscInt c = 0; c < CF_FIG_NCURVES; c++) PetscCall(PetscFree2(pp->age_myr[c], pp->y[c]));
  PetscCall(PetscFree(pp));
  PetscCall(ierr);
  PetscFunctionReturn(0);
}

PetscErrorCode CFFigureHeatFlow(const CFRunData *run, const CFProfiles *prof, const char dir[])
{
  PetscFunctionBeginUser;
  PetscCall(ProfileFigure(run, prof, 0.0, CF_PROFILE_HEAT_FLOW, dir));
  PetscFunctionReturn(0);
}

PetscErrorCode CFFigureSeafloorDepth(const CFRunData *run, const CFProfiles *prof, PetscReal ridge_depth, const char dir[])
{
  PetscFunctionBeginUser;
  PetscCall(ProfileFigure(run, prof, ridge_depth, CF_PROFILE_SEAFLOOR_DEPTH, dir));
  PetscFunctionReturn(0);
}
