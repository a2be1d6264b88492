/* The sweep's figures, from sweep.csv (so resumed cases draw as well): sweep_crust.png, crustal
   thickness against full spreading rate, one curve per combination of the other swept keys, over
   the seismic thickness of normal oceanic crust, 7.1 +/- 0.8 km (White, McKenzie & O'Nions 1992,
   JGR 97, 19683); sweep_depths.png, melting onset depth and melt-lens depth against rate.
   Drawn with the post-processor's figure helpers (postprocess/figures_common.h), rank 0. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <crustforge/sweep.h>
#include "figures_common.h"

#define CF_NORMAL_CRUST_KM       7.1 /* White, McKenzie & O'Nions (1992) */
#define CF_NORMAL_CRUST_SPREAD_KM 0.8

enum { COL_RATE, COL_TP, COL_WATER, COL_CRUST, COL_ONSET, COL_LENS, NCOLS };
static const char *const ColName[NCOLS] = {"full_spreading_rate_mm_yr", "potential_temperature_C", "water_ppm", "crustal_thickness_km", "melt_onset_depth_km", "melt_lens_depth_km"};
static const PLINT        CurveColor[]  = {CF_COL_BLUE, CF_COL_VERMILLION, CF_COL_GREEN, CF_COL_ORANGE, CF_COL_PURPLE, CF_COL_SKY_BLUE, CF_COL_FOREGROUND};
#define NCURVECOLORS ((PetscInt)(sizeof(CurveColor) / sizeof(CurveColor[0])))

typedef struct {
  PetscInt   n, ncurves, per; /* cases, curves, points per curve */
  PetscReal *v[NCOLS];        /* by case; NaN for a failed case */
  char     (*text)[128];      /* legend of each curve */
} SweepPlot;

/* Cases along the rate axis (when swept, axis 0: the key table lists it first) form a curve. */
static PetscInt PointsPerCurve(const CFSweep *sw) { return !strcmp(sw->axis[0].key, "ridge.full_spreading_rate") ? sw->axis[0].n : 1; }

static PetscErrorCode ReadTable(const CFSweep *sw, SweepPlot *p)
{
  char  path[CF_SWEEP_PATH_LEN], line[CF_SWEEP_ROW_LEN];
  int   col[NCOLS], ncol = 0;
  FILE *fp;

  PetscFunctionBeginUser;
  (void)snprintf(path, sizeof(path), "%s/sweep.csv", sw->base.output_dir);
  fp = fopen(path, "r");
  PetscCheck(fp, PETSC_COMM_SELF, PETSC_ERR_FILE_OPEN, "sweep figures: cannot read %s", path);
  for (int k = 0; k < NCOLS; k++) col[k] = -1;
  if (fgets(line, sizeof(line), fp)) {
    char *save = NULL;
    for (char *t = strtok_r(line, ",\n", &save); t; t = strtok_r(NULL, ",\n", &save), ncol++)
      for (int k = 0; k < NCOLS; k++)
        if (!strcmp(t, ColName[k])) col[k] = ncol;
  }
  while (fgets(line, sizeof(line), fp)) { /* case, values ...: fields split by hand, empty ones kept */
    char    *f[256];
    int      nf = 0;
    PetscInt c;
    for (char *q = line; nf < 256;) {
      f[nf++] = q;
      if (!(q = strchr(q, ','))) break;
      *q++ = 0;
    }
    c = (PetscInt)strtol(f[0], NULL, 10) - 1;
    if (c < 0 || c >= p->n) continue;
    for (int k = 0; k < NCOLS; k++) p->v[k][c] = col[k] >= 0 && col[k] < nf ? strtod(f[col[k]], NULL) : NAN;
  }
  fclose(fp);
  PetscFunctionReturn(0);
}

static void DrawCurves(const SweepPlot *p, PetscInt k, PLINT style)
{
  pllsty(style);
  plwidth(CF_FIG_LINE_WIDTH);
  for (PetscInt q = 0; q < p->ncurves; q++) {
    plcol0(CurveColor[q % NCURVECOLORS]);
    CFFigureLine(p->per, &p->v[COL_RATE][q * p->per], &p->v[k][q * p->per]);
    for (PetscInt i = 0; i < p->per; i++) /* points too: a curve of one case is still seen */
      if (isfinite(p->v[k][q * p->per + i])) plstring(1, &p->v[COL_RATE][q * p->per + i], &p->v[k][q * p->per + i], "•");
  }
  pllsty(1);
}

static void Range(const SweepPlot *p, PetscInt k, PetscReal *lo, PetscReal *hi)
{
  if (!CFFigureRange(p->n, p->v[k], lo, hi)) *lo = *hi = 0;
}

static PetscErrorCode DrawCrust(const CFSweep *sw, const SweepPlot *p, PetscReal rmax, CFLegendEntry *e)
{
  CFFigure  fig;
  PetscReal lo, hi, bx[4], by[4];

  PetscFunctionBeginUser;
  Range(p, COL_CRUST, &lo, &hi);
  hi = PetscMax(hi, CF_NORMAL_CRUST_KM + CF_NORMAL_CRUST_SPREAD_KM) * 1.15;
  PetscCall(CFFigureOpen(sw->base.output_dir, "sweep_crust.png", &fig));
  plvpor(0.1, 0.95, 0.12, 0.88);
  plwind(0.0, rmax, 0.0, hi);
  bx[0] = bx[3] = 0.0;
  bx[1] = bx[2] = rmax;
  by[0] = by[1] = CF_NORMAL_CRUST_KM - CF_NORMAL_CRUST_SPREAD_KM;
  by[2] = by[3] = CF_NORMAL_CRUST_KM + CF_NORMAL_CRUST_SPREAD_KM;
  plscol0(CF_COL_GREY, 205, 205, 205); /* this stream only: a light band under the curves */
  plcol0(CF_COL_GREY);
  plfill(4, bx, by);
  DrawCurves(p, COL_CRUST, 1);
  plcol0(CF_COL_FOREGROUND);
  plwidth(1.0);
  plbox("bcnst", 0.0, 0, "bcnstv", 0.0, 0);
  plmtex("b", 3.0, 0.5, 0.5, "Full spreading rate (mm/yr)");
  plmtex("l", 4.0, 0.5, 0.5, "Crustal thickness (km)");
  plmtex("t", 2.0, 0.5, 0.5, "Crustal thickness against spreading rate");
  CFFigureLegend(p->ncurves + 1, e, PL_POSITION_LEFT | PL_POSITION_TOP | PL_POSITION_INSIDE, 1, 0.02, 0.03);
  PetscCall(CFFigureClose(&fig));
  PetscFunctionReturn(0);
}

static PetscErrorCode DrawDepths(const CFSweep *sw, const SweepPlot *p, PetscReal rmax, CFLegendEntry *e)
{
  CFFigure  fig;
  PetscReal lo, hi;

  PetscFunctionBeginUser;
  PetscCall(CFFigureOpen(sw->base.output_dir, "sweep_depths.png", &fig));
  /* two panels, depth increasing downward: onset (tens of km) above, melt lens (km) below */
  Range(p, COL_ONSET, &lo, &hi);
  plvpor(0.1, 0.7, 0.56, 0.9);
  plwind(0.0, rmax, PetscMax(hi, 1.0) * 1.1, 0.0);
  DrawCurves(p, COL_ONSET, 1);
  plcol0(CF_COL_FOREGROUND);
  plwidth(1.0);
  plbox("bcst", 0.0, 0, "bcnstv", 0.0, 0);
  plmtex("l", 4.0, 0.5, 0.5, "Melting onset depth (km)");
  plmtex("t", 2.0, 0.5, 0.5, "Depths at the axis against spreading rate");
  Range(p, COL_LENS, &lo, &hi);
  plvpor(0.1, 0.7, 0.12, 0.46);
  plwind(0.0, rmax, PetscMax(hi, 1.0) * 1.1, 0.0);
  DrawCurves(p, COL_LENS, 2);
  plcol0(CF_COL_FOREGROUND);
  plwidth(1.0);
  plbox("bcnst", 0.0, 0, "bcnstv", 0.0, 0);
  plmtex("b", 3.0, 0.5, 0.5, "Full spreading rate (mm/yr)");
  plmtex("l", 4.0, 0.5, 0.5, "Melt-lens depth (km)");
  plvpor(0.1, 0.7, 0.12, 0.9);
  plwind(0.0, 1.0, 0.0, 1.0);
  CFFigureLegend(p->ncurves, e + 1, PL_POSITION_RIGHT | PL_POSITION_TOP | PL_POSITION_OUTSIDE, 1, 0.02, 0.0);
  PetscCall(CFFigureClose(&fig));
  PetscFunctionReturn(0);
}

PetscErrorCode CFSweepFigures(const CFSweep *sw)
{
  SweepPlot      p;
  CFLegendEntry *e;
  PetscReal      lo, rmax;
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  p.n       = sw->ncases;
  p.per     = PointsPerCurve(sw);
  p.ncurves = p.n / p.per;
  for (int k = 0; k < NCOLS; k++) {
    PetscCall(PetscMalloc1(p.n, &p.v[k]));
    for (PetscInt c = 0; c < p.n; c++) p.v[k][c] = NAN;
  }
  PetscCall(PetscMalloc1(p.ncurves, &p.text));
  PetscCall(PetscMalloc1(p.ncurves + 1, &e));
  ierr = ReadTable(sw, &p);
  if (!ierr) {
    e[0] = (CFLegendEntry){"normal oceanic crust 7.1 ± 0.8 km (White et al. 1992)", CF_COL_GREY, 1, 12.0, NULL, 0};
    for (PetscInt q = 0; q < p.ncurves; q++) {
      const PetscInt c = q * p.per;
      size_t         n = (size_t)snprintf(p.text[q], sizeof(p.text[q]), "T_p %g °C, water %g ppm", (double)p.v[COL_TP][c], (double)p.v[COL_WATER][c]);
      for (PetscInt k = 1; k < sw->naxes && n < sizeof(p.text[q]); k++) /* any other swept key */
        if (strcmp(sw->axis[k].key, "mantle.potential_temperature") && strcmp(sw->axis[k].key, "mantle.water")) n += (size_t)snprintf(p.text[q] + n, sizeof(p.text[q]) - n, ", %s %g", sw->axis[k].key, (double)sw->axis[k].v[CFSweepCaseIndex(sw, c, k)]);
      e[q + 1] = (CFLegendEntry){p.text[q], CurveColor[q % NCURVECOLORS], 1, CF_FIG_LINE_WIDTH, "•", 0};
    }
    if (!CFFigureRange(p.n, p.v[COL_RATE], &lo, &rmax)) rmax = 100.0;
    rmax *= 1.05;
    ierr = DrawCrust(sw, &p, rmax, e);
    if (!ierr) ierr = DrawDepths(sw, &p, rmax, e);
  }
  for (int k = 0; k < NCOLS; k++) PetscCall(PetscFree(p.v[k]));
  PetscCall(PetscFree(p.text));
  PetscCall(PetscFree(e));
  PetscCall(ierr);
  PetscFunctionReturn(0);
}
