/* The figure device, palette, colour maps and drawing helpers (see figures_common.h). */
#include <errno.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include <crustforge/units.h>
#include "figures_common.h"

#define CF_FIG_DEVICE   "pngcairo"
#define CF_FIG_MAX_DEVS 128

PetscErrorCode CFFiguresAvailable(PetscBool *ok)
{
  const char *menu_buf[CF_FIG_MAX_DEVS], *name_buf[CF_FIG_MAX_DEVS];
  const char **menu = menu_buf, **name = name_buf;
  int          n    = CF_FIG_MAX_DEVS;

  PetscFunctionBeginUser;
  *ok = PETSC_FALSE;
  /* the driver list only: no stream is initialised, so nothing can prompt */
  plgDevs(&menu, &name, &n);
  for (int i = 0; i < n; i++)
    if (name[i] && !strcmp(name[i], CF_FIG_DEVICE)) *ok = PETSC_TRUE;
  PetscFunctionReturn(0);
}

/* Okabe & Ito (2008), RGB 0-255, after background white and foreground black; then greys and
   the first entry of viridis. */
static const PLINT Palette[CF_NCOLORS][3] = {
  [CF_COL_BACKGROUND] = {255, 255, 255}, [CF_COL_FOREGROUND] = {0, 0, 0},     [CF_COL_ORANGE] = {230, 159, 0},
  [CF_COL_SKY_BLUE]   = {86, 180, 233},  [CF_COL_GREEN]      = {0, 158, 115}, [CF_COL_YELLOW] = {240, 228, 66},
  [CF_COL_BLUE]       = {0, 114, 178},   [CF_COL_VERMILLION] = {213, 94, 0},  [CF_COL_PURPLE] = {204, 121, 167},
  [CF_COL_GREY]       = {90, 90, 90},    [CF_COL_WHITE]      = {255, 255, 255}, [CF_COL_DARK] = {68, 1, 84},
};

PetscErrorCode CFFigureOpen(const char dir[], const char name[], CFFigure *fig)
{
  PetscBool ok;
  FILE     *fp;

  PetscFunctionBeginUser;
  PetscCall(CFFiguresAvailable(&ok));
  PetscCheck(ok, PETSC_COMM_SELF, PETSC_ERR_SUP, "figure %s: PLplot has no %s device (apt-get install plplot-driver-cairo)", name, CF_FIG_DEVICE);
  PetscCall(PetscSNPrintf(fig->path, sizeof(fig->path), "%s/%s", dir, name));
  PetscCall(PetscSNPrintf(fig->tmp, sizeof(fig->tmp), "%s.tmp", fig->path));
  /* PLplot retries a file it cannot open and then exits the process: create it here first */
  fp = fopen(fig->tmp, "wb");
  PetscCheck(fp, PETSC_COMM_SELF, PETSC_ERR_FILE_OPEN, "figure %s: cannot create %s (%s)", name, fig->tmp, strerror(errno));
  PetscCheck(!fclose(fp), PETSC_COMM_SELF, PETSC_ERR_FILE_WRITE, "figure %s: cannot close %s (%s)", name, fig->tmp, strerror(errno));

  plgstrm(&fig->previous);
  plmkstrm(&fig->stream);
  if (fig->stream < 0) {
    (void)unlink(fig->tmp);
    plsstrm(fig->previous);
    SETERRQ(PETSC_COMM_SELF, PETSC_ERR_LIB, "figure %s: PLplot has no free stream", name);
  }
  plsdev(CF_FIG_DEVICE);
  plsfnam(fig->tmp);
  plspage(0.0, 0.0, CF_FIGURE_WIDTH_PX, CF_FIGURE_HEIGHT_PX, 0, 0);
  plscmap0n(CF_NCOLORS);
  for (int c = 0; c < CF_NCOLORS; c++) plscol0(c, Palette[c][0], Palette[c][1], Palette[c][2]);
  plinit();
  pladv(0);
  plschr(0.0, CF_FIG_TEXT_SCALE);
  plwidth(1.0);
  plcol0(CF_COL_FOREGROUND);
  PetscFunctionReturn(0);
}

/* A complete PNG ends with the IEND chunk: length 0, "IEND", CRC ae 42 60 82 (PNG spec, 11.2.5). */
static PetscBool EndsWithIEND(const char path[], off_t size)
{
  static const unsigned char iend[12] = {0, 0, 0, 0, 'I', 'E', 'N', 'D', 0xae, 0x42, 0x60, 0x82};
  unsigned char              tail[12];
  FILE                      *fp = size >= 12 ? fopen(path, "rb") : NULL;
  PetscBool                  ok = PETSC_FALSE;

  if (!fp) return PETSC_FALSE;
  if (!fseek(fp, -12L, SEEK_END) && fread(tail, 1, 12, fp) == 12) ok = (PetscBool)!memcmp(tail, iend, 12);
  fclose(fp);
  return ok;
}

PetscErrorCode CFFigureClose(CFFigure *fig)
{
  struct stat st;

  PetscFunctionBeginUser;
  plend1();
  plsstrm(fig->previous);
  if (stat(fig->tmp, &st) || !EndsWithIEND(fig->tmp, st.st_size)) {
    (void)unlink(fig->tmp);
    SETERRQ(PETSC_COMM_SELF, PETSC_ERR_FILE_WRITE, "figure %s: PLplot did not write a complete PNG (disk full?)", fig->path);
  }
  if (rename(fig->tmp, fig->path)) {
    const int e = errno;
    (void)unlink(fig->tmp);
    SETERRQ(PETSC_COMM_SELF, PETSC_ERR_FILE_WRITE, "figure %s: cannot rename %s into place (%s)", fig->path, fig->tmp, strerror(e));
  }
  PetscFunctionReturn(0);
}

/* Control points every 16th entry (and the last) of the 256-entry tables of van der Walt & Smith
   (2015), the matplotlib colour maps (CC0), RGB 0-1; linear in between. */
#define CF_CMAP_NPTS 17
static const PLFLT CmapPos[CF_CMAP_NPTS] = {0 / 255., 16 / 255., 32 / 255., 48 / 255., 64 / 255., 80 / 255., 96 / 255., 112 / 255., 128 / 255., 144 / 255., 160 / 255., 176 / 255., 192 / 255., 208 / 255., 224 / 255., 240 / 255., 1.0};
static const PLFLT Viridis[CF_CMAP_NPTS][3] = {
  {0.267004, 0.004874, 0.329415}, {0.282327, 0.094955, 0.417331}, {0.278826, 0.175490, 0.483397}, {0.258965, 0.251537, 0.524736}, {0.229739, 0.322361, 0.545706}, {0.199430, 0.387607, 0.554642},
  {0.172719, 0.448791, 0.557885}, {0.149039, 0.508051, 0.557250}, {0.127568, 0.566949, 0.550556}, {0.120638, 0.625828, 0.533488}, {0.157851, 0.683765, 0.501686}, {0.246070, 0.738910, 0.452024},
  {0.369214, 0.788888, 0.382914}, {0.515992, 0.831158, 0.294279}, {0.678489, 0.863742, 0.189503}, {0.845561, 0.887322, 0.099702}, {0.993248, 0.906157, 0.143936},
};
static const PLFLT Inferno[CF_CMAP_NPTS][3] = {
  {0.001462, 0.000466, 0.013866}, {0.042253, 0.028139, 0.141141}, {0.129285, 0.047293, 0.290788}, {0.238273, 0.036621, 0.396353}, {0.341500, 0.062325, 0.429425}, {0.441207, 0.099338, 0.431594},
  {0.540920, 0.134729, 0.415123}, {0.640135, 0.171438, 0.381065}, {0.735683, 0.215906, 0.330245}, {0.822386, 0.275197, 0.266085}, {0.894305, 0.353399, 0.193584}, {0.946965, 0.449191, 0.115272},
  {0.978422, 0.557937, 0.034931}, {0.987874, 0.675267, 0.065257}, {0.974638, 0.797692, 0.206332}, {0.947594, 0.917399, 0.410665}, {0.988362, 0.998364, 0.644924},
};

void CFFigureSetColorMap(CFColorMap map)
{
  const PLFLT(*rgb)[3] = map == CF_CMAP_INFERNO ? Inferno : Viridis;
  PLFLT r[CF_CMAP_NPTS], g[CF_CMAP_NPTS], b[CF_CMAP_NPTS], a[CF_CMAP_NPTS];

  for (int k = 0; k < CF_CMAP_NPTS; k++) {
    r[k] = rgb[k][0];
    g[k] = rgb[k][1];
    b[k] = rgb[k][2];
    a[k] = 1.0;
  }
  plscmap1n(256);
  plscmap1la(1, CF_CMAP_NPTS, CmapPos, r, g, b, a, NULL);
}

/* sRGB relative luminance (IEC 61966-2-1 transfer function, Rec. 709 weights). */
PetscReal CFFigureColorMapLuminance(CFColorMap map, PetscReal v)
{
  const PLFLT(*rgb)[3] = map == CF_CMAP_INFERNO ? Inferno : Viridis;
  const PetscReal w[3] = {0.2126, 0.7152, 0.0722};
  PetscReal       y    = 0.0;
  int             k    = 0;

  v = PetscMin(1.0, PetscMax(0.0, v));
  while (k < CF_CMAP_NPTS - 2 && v > CmapPos[k + 1]) k++;
  for (int c = 0; c < 3; c++) {
    const PetscReal t = (v - CmapPos[k]) / (CmapPos[k + 1] - CmapPos[k]);
    const PetscReal s = rgb[k][c] + t * (rgb[k + 1][c] - rgb[k][c]);
    y += w[c] * (s <= 0.04045 ? s / 12.92 : PetscPowReal((s + 0.055) / 1.055, 2.4));
  }
  return y;
}

void CFFigureLine(PetscInt n, const PetscReal x[], const PetscReal y[])
{
  PetscInt i = 0;

  while (i < n) {
    PetscInt start;
    while (i < n && (PetscIsInfOrNanReal(x[i]) || PetscIsInfOrNanReal(y[i]))) i++;
    start = i;
    while (i < n && !PetscIsInfOrNanReal(x[i]) && !PetscIsInfOrNanReal(y[i])) i++;
    if (i - start >= 2) plline((PLINT)(i - start), x + start, y + start);
    else if (i - start == 1) plpoin(1, x + start, y + start, 1);
  }
}

PetscBool CFFigureRange(PetscInt n, const PetscReal v[], PetscReal *lo, PetscReal *hi)
{
  PetscBool any = PETSC_FALSE;

  *lo = PETSC_MAX_REAL;
  *hi = -PETSC_MAX_REAL;
  for (PetscInt i = 0; i < n; i++) {
    if (PetscIsInfOrNanReal(v[i])) continue;
    any = PETSC_TRUE;
    *lo = PetscMin(*lo, v[i]);
    *hi = PetscMax(*hi, v[i]);
  }
  return any;
}

PetscErrorCode CFFigureScenarioText(const CFConfig *cfg, char text[], size_t len)
{
  PetscFunctionBeginUser;
  /* C's %g, not PetscSNPrintf's (which writes 60 as "60.") */
  PetscCheck(snprintf(text, len, "full spreading rate %g mm/yr, T#dp#u %g °C, water %g ppm", (double)cfg->full_spreading_rate_mm_yr, (double)CFKelvinToCelsius(cfg->potential_temperature), (double)cfg->water_ppm) < (int)len, PETSC_COMM_SELF, PETSC_ERR_ARG_SIZ, "figures: scenario text longer than %zu characters", len);
  PetscFunctionReturn(0);
}

void CFFigureLegend(PetscInt n, const CFLegendEntry e[], PLINT position, PLINT ncolumn, PLFLT x, PLFLT y)
{
  PLINT       opt[24], text_col[24], box_col[24], box_pat[24], line_col[24], line_sty[24], sym_col[24], sym_num[24];
  PLFLT       box_scale[24], box_w[24], line_w[24], sym_scale[24], width, height;
  const char *text[24], *sym[24];

  n = PetscMin(n, 24);
  for (PetscInt k = 0; k < n; k++) {
    opt[k] = (e[k].style > 0 ? PL_LEGEND_LINE : 0) | (e[k].symbol ? PL_LEGEND_SYMBOL : 0) | (e[k].swatch ? PL_LEGEND_COLOR_BOX : 0);
    if (!opt[k]) opt[k] = PL_LEGEND_NONE;
    text[k]      = e[k].text;
    text_col[k]  = CF_COL_FOREGROUND;
    box_col[k]   = e[k].swatch;
    box_pat[k]   = 0;
    box_scale[k] = 0.8;
    box_w[k]     = 1.0;
    line_col[k]  = e[k].color;
    line_sty[k]  = e[k].style > 0 ? e[k].style : 1;
    line_w[k]    = e[k].width;
    sym_col[k]   = e[k].color;
    sym_scale[k] = 1.0;
    sym_num[k]   = 1;
    sym[k]       = e[k].symbol ? e[k].symbol : "";
  }
  pllegend(&width, &height, PL_LEGEND_BACKGROUND | PL_LEGEND_BOUNDING_BOX | (ncolumn > 1 ? PL_LEGEND_ROW_MAJOR : 0), position | PL_POSITION_VIEWPORT, x, y, 0.06, CF_COL_BACKGROUND, CF_COL_FOREGROUND, 1, ncolumn > 1 ? 1 : 0, ncolumn > 1 ? ncolumn : 0, (PLINT)n, opt, 1.0, 0.9, 2.0, 0.0, text_col, text, box_col, box_pat, box_scale, box_w, line_col, line_sty, line_w, sym_col, sym_scale, sym_num, sym);
  pllsty(1);
  plwidth(1.0);
}
