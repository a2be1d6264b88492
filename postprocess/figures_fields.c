/* Field sections: a cell field as a colour image over distance from the axis and depth (down),
   with a colour bar, labelled contours, streamlines (contours of the stream function) and the
   outline of the melting region. */
#include <crustforge/units.h>
#include "figures_common.h"

#define CF_FIG_DEFAULT_DEPTH  150.0e3 /* m: the mantle where melting and plate cooling happen */
#define CF_FIG_NSTREAMLINES   12
#define CF_FIG_MELT_THRESHOLD 1.0e-2  /* outline at this fraction of the largest melting rate */
#define CF_FIG_NBAR           256

/* One cell field cut to the window, as PLplot wants it ([i][j], i along x, j down). */
typedef struct {
  PetscInt  ni, nj;
  PLFLT   **img, **con;   /* for the image: NaN below every colour (not drawn); for contours: NaN filled */
  PLFLT    *data, *xc, *zc; /* storage; cell centres (km) */
  PetscReal lo, hi;       /* finite range */
  PetscBool any;          /* any finite value */
} CFFieldGrid;

typedef struct {
  const char *file, *title, *bar_label;
  CFFieldId   id;
  PetscReal   scale, offset; /* plotted = scale * SI + offset */
  CFColorMap  cmap;
  PetscReal   contour_step;  /* labelled contours of the field, plotted unit; < 0: a round step, 0: none */
  const char *contour_name, *contour_unit;
  PLINT       stream_color, stream_swatch, outline_color;
} CFFieldFigure;

/* Contours cannot skip a cell, so a missing value takes the mean of its finite neighbours
   (repeatedly, for holes wider than a cell): the lines cross a hole instead of ringing it. */
static void FillHoles(PetscInt ni, PetscInt nj, PLFLT **c, PLFLT missing)
{
  for (PetscInt pass = 0, left = 1; left && pass < 64; pass++) {
    left = 0;
    for (PetscInt i = 0; i < ni; i++)
      for (PetscInt j = 0; j < nj; j++) {
        PetscReal sum = 0;
        PetscInt  n   = 0;
        if (!PetscIsInfOrNanReal(c[i][j])) continue;
        if (i > 0 && !PetscIsInfOrNanReal(c[i - 1][j])) sum += c[i - 1][j], n++;
        if (i < ni - 1 && !PetscIsInfOrNanReal(c[i + 1][j])) sum += c[i + 1][j], n++;
        if (j > 0 && !PetscIsInfOrNanReal(c[i][j - 1])) sum += c[i][j - 1], n++;
        if (j < nj - 1 && !PetscIsInfOrNanReal(c[i][j + 1])) sum += c[i][j + 1], n++;
        if (n) c[i][j] = sum / n; /* uses values filled earlier in this pass: fine for a picture */
        else left = 1;
      }
  }
  for (PetscInt i = 0; i < ni; i++)
    for (PetscInt j = 0; j < nj; j++)
      if (PetscIsInfOrNanReal(c[i][j])) c[i][j] = missing;
}

static PetscErrorCode FieldGridCreate(const CFRunData *run, CFFieldId id, PetscReal scale, PetscReal offset, PetscReal wx, PetscReal wz, CFFieldGrid *g)
{
  const PetscReal *f = run->field[id];
  PLFLT            below;

  PetscFunctionBeginUser;
  g->ni = PetscMin(run->nx, (PetscInt)PetscCeilReal(wx / run->dx - 1e-9));
  g->nj = PetscMin(run->nz, (PetscInt)PetscCeilReal(wz / run->dz - 1e-9));
  PetscCall(PetscMalloc5(g->ni, &g->img, g->ni, &g->con, 2 * g->ni * g->nj, &g->data, g->ni, &g->xc, g->nj, &g->zc));
  for (PetscInt i = 0; i < g->ni; i++) g->xc[i] = CFMToKm((i + 0.5) * run->dx);
  for (PetscInt j = 0; j < g->nj; j++) g->zc[j] = CFMToKm((j + 0.5) * run->dz);
  for (PetscInt i = 0; i < g->ni; i++) {
    g->img[i] = g->data + i * g->nj;
    g->con[i] = g->data + (g->ni + i) * g->nj;
    for (PetscInt j = 0; j < g->nj; j++) g->img[i][j] = g->con[i][j] = scale * f[j * run->nx + i] + offset;
  }
  g->any = CFFigureRange(g->ni * g->nj, g->data, &g->lo, &g->hi);
  if (!g->any) g->lo = g->hi = 0.0;
  below = g->lo - 1.0 - 1.0e3 * (g->hi - g->lo); /* under every colour and contour level */
  for (PetscInt k = 0; k < g->ni * g->nj; k++)
    if (PetscIsInfOrNanReal(g->data[k])) g->data[k] = below;
  FillHoles(g->ni, g->nj, g->con, below);
  PetscFunctionReturn(0);
}

static PetscErrorCode FieldGridDestroy(CFFieldGrid *g)
{
  PetscFunctionBeginUser;
  PetscCall(PetscFree5(g->img, g->con, g->data, g->xc, g->zc));
  PetscFunctionReturn(0);
}

static void Contours(const CFFieldGrid *g, PetscInt n, const PLFLT levels[])
{
  PLcGrid cg = {g->xc, g->zc, NULL, (PLINT)g->ni, (PLINT)g->nj, 0};
  if (n > 0 && g->ni > 1 && g->nj > 1) plcont((const PLFLT *const *)g->con, (PLINT)g->ni, (PLINT)g->nj, 1, (PLINT)g->ni, 1, (PLINT)g->nj, levels, (PLINT)n, pltr1, &cg);
}

/* A step of 1, 2 or 5 times a power of ten giving about n intervals over range. */
static PetscReal RoundStep(PetscReal range, PetscInt n)
{
  const PetscReal raw = range / n, p = PetscPowReal(10.0, PetscFloorReal(PetscLog10Real(raw))), m = raw / p;

  return p * (m < 1.5 ? 1.0 : m < 3.5 ? 2.0 : m < 7.5 ? 5.0 : 10.0);
}

/* Everything a field figure shows, prepared before its stream is opened. */
typedef struct {
  CFFieldGrid val, psi, melt;
  PetscReal   wx, wz, vlo, vhi, step;
  PLFLT       bar[CF_FIG_NBAR], stream_levels[CF_FIG_NSTREAMLINES], melt_level, levels[64];
  PetscInt    nlevels;
  PetscBool   show_melt;
  char        scenario[256];
} CFFieldPlot;

static PetscErrorCode FieldPlotDraw(const CFRunData *run, const CFFieldPlot *fp, const CFFieldFigure *spec, const char dir[])
{
  CFFigure           fig;
  const CFFieldGrid *val = &fp->val;

  PetscFunctionBeginUser;
  PetscCall(CFFigureOpen(dir, spec->file, &fig));
  plvpor(0.09, 0.85, 0.13, 0.88);
  plwind(0.0, CFMToKm(fp->wx), CFMToKm(fp->wz), 0.0); /* depth increases downward */
  CFFigureSetColorMap(spec->cmap);
  if (val->any) plimagefr((const PLFLT *const *)val->img, (PLINT)val->ni, (PLINT)val->nj, 0.0, CFMToKm(val->ni * run->dx), 0.0, CFMToKm(val->nj * run->dz), PetscMin(fp->vlo, val->lo), fp->vhi, fp->vlo, fp->vhi, NULL, NULL);

  /* streamlines under the labelled contours */
  plwidth(1.5);
  pllsty(2);
  plcol0(spec->stream_color);
  if (fp->psi.any && fp->psi.hi > fp->psi.lo) Contours(&fp->psi, CF_FIG_NSTREAMLINES, fp->stream_levels);
  pllsty(1);
  if (fp->show_melt) {
    plwidth(3.0);
    plcol0(spec->outline_color);
    Contours(&fp->melt, 1, &fp->melt_level);
  }
  /* each contour in black or white, whichever stands out from the colour under it */
  plwidth(1.5);
  pl_setcontlabelparam(0.008, 0.6, 0.35, 1);
  for (PetscInt k = 0; k < fp->nlevels; k++) {
    /* PLplot writes sigdig - 1 - floor(log10 v) decimals: give every label the step's decimals */
    const int e = (int)PetscFloorReal(PetscLog10Real(fp->levels[k]) + 1e-9), decimals = PetscMax(0, -(int)PetscFloorReal(PetscLog10Real(fp->step) + 1e-9));
    pl_setcontlabelformat(10, PetscMax(1, decimals + 1 + e));
    plcol0(CFFigureColorMapLuminance(spec->cmap, (fp->levels[k] - fp->vlo) / (fp->vhi - fp->vlo)) < 0.2 ? CF_COL_WHITE : CF_COL_FOREGROUND);
    Contours(val, 1, &fp->levels[k]);
  }
  /* these two settings are process-wide in PLplot (statics in plcont.c, no getter): put back its defaults */
  pl_setcontlabelparam(0.006, 0.3, 0.1, 0);
  pl_setcontlabelformat(4, 2);

  plwidth(1.0);
  plcol0(CF_COL_FOREGROUND);
  plbox("bcnst", 0.0, 0, "bcnstv", 0.0, 0);
  plmtex("b", 3.0, 0.5, 0.5, "Distance from axis (km)");
  plmtex("l", 3.6, 0.5, 0.5, "Depth (km)");
  plmtex("t", 2.4, 0.5, 0.5, spec->title);
  plschr(0.0, 0.8 * CF_FIG_TEXT_SCALE);
  plmtex("t", 1.2, 0.5, 0.5, fp->scenario);
  {
    PLINT        label_opts[1] = {PL_COLORBAR_LABEL_RIGHT}, sub_ticks[1] = {0}, n_values[1] = {CF_FIG_NBAR};
    const char  *labels[1] = {spec->bar_label}, *axis_opts[1] = {"bcvtm"};
    PLFLT        ticks[1] = {0.0}, w, h;
    const PLFLT *values[1] = {fp->bar};
    plcolorbar(&w, &h, PL_COLORBAR_IMAGE, PL_POSITION_RIGHT | PL_POSITION_OUTSIDE | PL_POSITION_VIEWPORT, 0.015, 0.0, 0.025, 1.0, CF_COL_BACKGROUND, CF_COL_FOREGROUND, 1, 0.0, 0.0, 0, 0.0, 1, label_opts, labels, 1, axis_opts, ticks, sub_ticks, n_values, values);
  }
  {
    char          contour_text[64];
    CFLegendEntry e[3];
    PetscInt      n = 0;
    if (fp->nlevels) {
      (void)snprintf(contour_text, sizeof(contour_text), "%s every %g%s", spec->contour_name, (double)fp->step, spec->contour_unit);
      e[n++] = (CFLegendEntry){contour_text, CF_COL_FOREGROUND, 1, 1.5, NULL, 0};
    }
    if (fp->psi.any && fp->psi.hi > fp->psi.lo) e[n++] = (CFLegendEntry){"streamlines", spec->stream_color, 2, 1.5, NULL, spec->stream_swatch};
    if (fp->show_melt) e[n++] = (CFLegendEntry){"melting region", spec->outline_color, 1, 3.0, NULL, 0};
    if (n) CFFigureLegend(n, e, PL_POSITION_RIGHT | PL_POSITION_BOTTOM | PL_POSITION_INSIDE, 1, 0.02, 0.03); /* deep and far out: least to see */
  }
  PetscCall(CFFigureClose(&fig));
  PetscFunctionReturn(0);
}

static PetscErrorCode FieldFigure(const CFRunData *run, const CFFigureWindow *window, const char dir[], const CFFieldFigure *spec)
{
  CFFieldPlot   *fp;
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  for (CFFieldId id = 0; id < CF_NFIELDS; id++)
    PetscCheck(run->field[id] || (id != spec->id && id != CF_FIELD_STREAM_FUNCTION && id != CF_FIELD_MELTING_RATE), PETSC_COMM_SELF, PETSC_ERR_ARG_WRONGSTATE, "figure %s: field %s is not on this rank (figures are drawn on rank 0)", spec->file, CFRunFields[id].name);
  PetscCall(PetscNew(&fp));
  fp->wx = run->nx * run->dx;
  fp->wz = PetscMin(run->nz * run->dz, CF_FIG_DEFAULT_DEPTH);
  if (window && window->width > 0) fp->wx = PetscMin(fp->wx, window->width);
  if (window && window->depth > 0) fp->wz = PetscMin(run->nz * run->dz, window->depth);
  PetscCall(FieldGridCreate(run, spec->id, spec->scale, spec->offset, fp->wx, fp->wz, &fp->val));
  PetscCall(FieldGridCreate(run, CF_FIELD_STREAM_FUNCTION, 1.0, 0.0, fp->wx, fp->wz, &fp->psi));
  PetscCall(FieldGridCreate(run, CF_FIELD_MELTING_RATE, 1.0, 0.0, fp->wx, fp->wz, &fp->melt));
  PetscCall(CFFigureScenarioText(&run->cfg, fp->scenario, sizeof(fp->scenario)));

  /* colour range from zero (these fields are zero or positive) to the largest value */
  fp->vlo = PetscMin(0.0, fp->val.lo);
  fp->vhi = fp->val.hi > fp->vlo ? fp->val.hi : fp->vlo + 1.0;
  for (PetscInt k = 0; k < CF_FIG_NBAR; k++) fp->bar[k] = fp->vlo + (fp->vhi - fp->vlo) * k / (CF_FIG_NBAR - 1.0);
  fp->step = spec->contour_step < 0 ? RoundStep(fp->vhi - fp->vlo, 6) : spec->contour_step;
  if (fp->step > 0 && fp->val.any)
    for (PetscReal c = fp->step * PetscCeilReal(fp->vlo / fp->step + 1e-9); c < fp->vhi && fp->nlevels < 64; c += fp->step)
      if (c > fp->vlo) fp->levels[fp->nlevels++] = c;
  for (PetscInt k = 0; k < CF_FIG_NSTREAMLINES; k++) fp->stream_levels[k] = fp->psi.lo + (fp->psi.hi - fp->psi.lo) * (k + 1.0) / (CF_FIG_NSTREAMLINES + 1.0);
  fp->show_melt  = (PetscBool)(fp->melt.any && fp->melt.hi > 0);
  fp->melt_level = CF_FIG_MELT_THRESHOLD * fp->melt.hi;

  ierr = FieldPlotDraw(run, fp, spec, dir); /* free the grids also when drawing fails */
  PetscCall(FieldGridDestroy(&fp->melt));
  PetscCall(FieldGridDestroy(&fp->psi));
  PetscCall(FieldGridDestroy(&fp->val));
  PetscCall(PetscFree(fp));
  PetscCall(ierr);
  PetscFunctionReturn(0);
}

PetscErrorCode CFFigureTemperature(const CFRunData *run, const CFFigureWindow *window, const char dir[])
{
  const CFFieldFigure spec = {"temperature.png", "Temperature", "Temperature (°C)", CF_FIELD_TEMPERATURE, 1.0, -CF_KELVIN_OFFSET, CF_CMAP_INFERNO, 200.0, "isotherms", " °C", CF_COL_SKY_BLUE, 0, CF_COL_GREEN};

  PetscFunctionBeginUser;
  PetscCall(FieldFigure(run, window, dir, &spec));
  PetscFunctionReturn(0);
}

PetscErrorCode CFFigureDepletion(const CFRunData *run, const CFFigureWindow *window, const char dir[])
{
  const CFFieldFigure spec = {"depletion.png", "Depletion (melt fraction extracted)", "Depletion F#dd#u (1)", CF_FIELD_DEPLETION, 1.0, 0.0, CF_CMAP_VIRIDIS, -1.0, "contours", "", CF_COL_WHITE, CF_COL_DARK, CF_COL_VERMILLION};

  PetscFunctionBeginUser;
  PetscCall(FieldFigure(run, window, dir, &spec));
  PetscFunctionReturn(0);
}

PetscErrorCode CFFigureMeltingRate(const CFRunData *run, const CFFigureWindow *window, const char dir[])
{
  /* per Myr: kg m-3 s-1 values are of order 1e-12 */
  const CFFieldFigure spec = {"melting_rate.png", "Melting rate", "Melting rate (kg m⁻³ Myr⁻¹)", CF_FIELD_MELTING_RATE, CFMyrToS(1.0), 0.0, CF_CMAP_VIRIDIS, 0.0, NULL, NULL, CF_COL_WHITE, CF_COL_DARK, CF_COL_VERMILLION};

  PetscFunctionBeginUser;
  PetscCall(FieldFigure(run, window, dir, &spec));
  PetscFunctionReturn(0);
}
