/* crust_history.png: what a transient history leaves in the crust.  Upper panel: crustal
   thickness made at each time, with the full spreading rate on the right axis; lower panel: the
   thickness profile across the flank at the end of the record. */
#include "figures_common.h"

/* Finite range of v padded by a tenth, never empty. */
static void PaddedRange(PetscInt n, const PetscReal v[], PetscReal *lo, PetscReal *hi)
{
  if (!CFFigureRange(n, v, lo, hi)) {
    *lo = 0.0;
    *hi = 1.0;
  }
  if (*hi - *lo < 1e-6 * PetscMax(1.0, PetscAbsReal(*hi))) {
    *lo -= 0.5;
    *hi += 0.5;
  }
  {
    const PetscReal pad = 0.1 * (*hi - *lo);
    *lo = PetscMax(0.0, *lo - pad);
    *hi += pad;
  }
}

PetscErrorCode CFFigureCrustHistory(const CFConfig *cfg, const CFCrustSeries *cs, const char dir[])
{
  CFFigure      fig;
  char          subtitle[256];
  PetscReal     tlo, thi, hlo, hhi, rlo, rhi, xlo, xhi;
  CFLegendEntry e[2] = {
    {"crustal thickness", CF_COL_FOREGROUND, 1, CF_FIG_LINE_WIDTH + 1.0, NULL, 0},
    {"full spreading rate (right axis)", CF_COL_BLUE, 2, CF_FIG_LINE_WIDTH, NULL, 0},
  };

  PetscFunctionBeginUser;
  PetscCheck(cs->n > 0, PETSC_COMM_SELF, PETSC_ERR_ARG_WRONG, "crust history figure: the crust record is empty");
  PetscCall(CFFigureScenarioText(cfg, subtitle, sizeof(subtitle)));
  (void)CFFigureRange(cs->n, cs->time_myr, &tlo, &thi);
  tlo = PetscMin(tlo, 0.0);
  if (!(thi > tlo)) thi = tlo + 1.0;
  PaddedRange(cs->n, cs->thickness_km, &hlo, &hhi);
  PaddedRange(cs->n, cs->full_rate_mm_yr, &rlo, &rhi);
  (void)CFFigureRange(cs->n, cs->distance_km, &xlo, &xhi);
  if (!(xhi > 0.0)) xhi = 1.0;

  PetscCall(CFFigureOpen(dir, "crust_history.png", &fig));
  /* upper panel: against time */
  plvpor(0.1, 0.88, 0.58, 0.86);
  plwind(tlo, thi, rlo, rhi);
  plcol0(CF_COL_BLUE);
  pllsty(2);
  plwidth(CF_FIG_LINE_WIDTH);
  CFFigureLine(cs->n, cs->time_myr, cs->full_rate_mm_yr);
  pllsty(1);
  plwidth(1.0);
  plbox("", 0.0, 0, "cmstv", 0.0, 0);
  plmtex("r", 4.0, 0.5, 0.5, "Full spreading rate (mm/yr)");
  plwind(tlo, thi, hlo, hhi);
  plcol0(CF_COL_FOREGROUND);
  plwidth(CF_FIG_LINE_WIDTH + 1.0);
  CFFigureLine(cs->n, cs->time_myr, cs->thickness_km);
  plwidth(1.0);
  plbox("bnst", 0.0, 0, "bnstv", 0.0, 0);
  plmtex("b", 2.6, 0.5, 0.5, "Time (Myr)");
  plmtex("l", 4.0, 0.5, 0.5, "Crust made (km)");
  plmtex("t", 3.2, 0.5, 0.5, "Crust made by the history");
  plschr(0.0, 0.8 * CF_FIG_TEXT_SCALE);
  plmtex("t", 1.2 / 0.8, 0.5, 0.5, subtitle);
  plschr(0.0, CF_FIG_TEXT_SCALE);
  CFFigureLegend(2, e, PL_POSITION_RIGHT | PL_POSITION_TOP | PL_POSITION_INSIDE, 1, 0.02, 0.03);

  /* lower panel: across the flank, axis at the left */
  plvpor(0.1, 0.88, 0.12, 0.42);
  plwind(0.0, xhi, hlo, hhi);
  plcol0(CF_COL_FOREGROUND);
  plwidth(CF_FIG_LINE_WIDTH + 1.0);
  CFFigureLine(cs->n, cs->distance_km, cs->thickness_km);
  plwidth(1.0);
  plbox("bcnst", 0.0, 0, "bcnstv", 0.0, 0);
  plmtex("b", 2.6, 0.5, 0.5, "Distance from axis at the end of the record (km)");
  plmtex("l", 4.0, 0.5, 0.5, "Crustal thickness (km)");
  plmtex("t", 1.0, 0.5, 0.5, "Crustal thickness across the flank");
  PetscCall(CFFigureClose(&fig));
  PetscFunctionReturn(0);
}
