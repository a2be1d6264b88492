/* What the figure files share: one PLplot stream per figure, the palette, the colour maps and
   drawing helpers that skip non-finite values.  Private to postprocess/figures*.c.
   Each figure prepares everything that can fail (memory, file names) before CFFigureOpen and
   then draws with PLplot calls only, so no error can leave a stream open between Open and Close. */
#ifndef CF_FIGURES_COMMON_H
#define CF_FIGURES_COMMON_H

#include <plplot.h>
#include <crustforge/figures.h>

/* PLplot and PETSc share the same floating-point type, so arrays pass through unconverted. */
_Static_assert(sizeof(PLFLT) == sizeof(PetscReal), "PLFLT and PetscReal differ");

/* Colour map 0 indices: background, foreground, then the Okabe & Ito (2008) colour-blind-safe
   set ("Color Universal Design", https://jfly.uni-koeln.de/color/) and two greys. */
enum {
  CF_COL_BACKGROUND,
  CF_COL_FOREGROUND,
  CF_COL_ORANGE,
  CF_COL_SKY_BLUE,
  CF_COL_GREEN,
  CF_COL_YELLOW,
  CF_COL_BLUE,
  CF_COL_VERMILLION,
  CF_COL_PURPLE,
  CF_COL_GREY,
  CF_COL_WHITE,
  CF_COL_DARK,  /* the dark end of viridis, behind white lines in a legend */
  CF_NCOLORS
};

typedef enum { CF_CMAP_VIRIDIS, CF_CMAP_INFERNO } CFColorMap;

typedef struct {
  char  path[PETSC_MAX_PATH_LEN], tmp[PETSC_MAX_PATH_LEN];
  PLINT previous, stream;
} CFFigure;

/* Check the device, create dir/name under a temporary name, and open a PLplot stream on it. */
PETSC_INTERN PetscErrorCode CFFigureOpen(const char dir[], const char name[], CFFigure *fig);
/* End the stream, make the caller's stream current again and rename the file into place. */
PETSC_INTERN PetscErrorCode CFFigureClose(CFFigure *fig);

/* Character height and line widths for the figure size (1200 x 800 px). */
#define CF_FIG_TEXT_SCALE 1.0
#define CF_FIG_LINE_WIDTH 2.0

PETSC_INTERN void CFFigureSetColorMap(CFColorMap map);
/* plline over each run of consecutive finite points (an isolated finite point becomes a dot). */
PETSC_INTERN void CFFigureLine(PetscInt n, const PetscReal x[], const PetscReal y[]);
/* Minimum and maximum of the finite values; PETSC_FALSE when there are none. */
PETSC_INTERN PetscBool CFFigureRange(PetscInt n, const PetscReal v[], PetscReal *lo, PetscReal *hi);
/* "full spreading rate 60 mm/yr, T_p 1350 C, water 100 ppm" as PLplot text. */
PETSC_INTERN PetscErrorCode CFFigureScenarioText(const CFConfig *cfg, char text[], size_t len);

/* One legend entry: a line (style > 0), a symbol (symbol != NULL), or both, over a swatch of
   colour swatch (0, the background: none) for lines that are light on dark images. */
typedef struct {
  const char *text;
  PLINT       color, style;
  PLFLT       width;
  const char *symbol;
  PLINT       swatch;
} CFLegendEntry;

/* A framed legend on a white background at position (PL_POSITION_* relative to the viewport,
   INSIDE or OUTSIDE), offset by x, y (viewport units, away from the edge); ncolumn > 1 lays
   the entries out in one row of that many columns. */
PETSC_INTERN void CFFigureLegend(PetscInt n, const CFLegendEntry e[], PLINT position, PLINT ncolumn, PLFLT x, PLFLT y);
/* Relative luminance (0 dark .. 1 light) of the colour map at v in [0,1], to pick contour
   colours that stand out from the image under them. */
PETSC_INTERN PetscReal CFFigureColorMapLuminance(CFColorMap map, PetscReal v);

#endif
