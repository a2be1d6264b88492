/* The steady energy balance of one cell (DESIGN 2.2), finite volumes:
     div(rho cp v T) - div(k grad T) = rho cp Gamma_ad w_down - L Gamma + S
   Advection is conservative with the stream-function face fluxes and a van Leer limited
   upwind-biased face value (second order where smooth, no new extrema); diffusion is central with
   harmonic-mean face conductivities. */
#include "steady_impl.h"

/* van Leer limited face value from upwind-upwind, upwind and downwind values: the increment
   0.5 phi(r) (Td - Tu) written without dividing by a vanishing difference. */
static inline PetscReal LimitedFace(PetscReal Tuu, PetscReal Tu, PetscReal Td)
{
  const PetscReal a = Tu - Tuu, b = Td - Tu;
  if (a * b <= 0.0) return Tu;
  return Tu + a * b / (a + b);
}

/* Heat carried through the x-face at fi (between cells fi-1 and fi) of row j, +x, per rho cp. */
static PetscReal AdvectX(const CFResidualCtx *rc, const CFCellState *const *x, PetscInt fi, PetscInt j)
{
  const PetscReal q = CF_QX(&rc->corners, fi, j);
  if (fi == 0) return 0.0; /* axis: psi = 0, no flux */
  if (fi == rc->nx) {      /* far side: outflow at the cell value, inflow (never in corner flow) at it too */
    return q * x[j][fi - 1].T;
  }
  if (q >= 0.0) return q * (fi - 2 >= 0 ? LimitedFace(x[j][fi - 2].T, x[j][fi - 1].T, x[j][fi].T) : x[j][fi - 1].T);
  return q * (fi + 1 < rc->nx ? LimitedFace(x[j][fi + 1].T, x[j][fi].T, x[j][fi - 1].T) : x[j][fi].T);
}

/* Heat carried upward through the z-face at fj (between cells fj-1 above and fj below) of column i. */
static PetscReal AdvectZ(const CFResidualCtx *rc, const CFCellState *const *x, PetscInt i, PetscInt fj)
{
  const PetscReal q = CF_QZ(&rc->corners, i, fj);
  if (fj == 0) return 0.0;                      /* surface: psi = 0, no flux */
  if (fj == rc->nz) return q * rc->T_bottom;    /* inflow of mantle at the bottom temperature */
  if (q >= 0.0) {                              /* from fj below to fj-1 above */
    const PetscReal Tuu = fj + 1 < rc->nz ? x[fj + 1][i].T : 2.0 * rc->T_bottom - x[fj][i].T;
    return q * LimitedFace(Tuu, x[fj][i].T, x[fj - 1][i].T);
  }
  {
    const PetscReal Tuu = fj - 2 >= 0 ? x[fj - 2][i].T : 2.0 * rc->T_surface - x[fj - 1][i].T;
    return q * LimitedFace(Tuu, x[fj - 1][i].T, x[fj][i].T);
  }
}

PetscReal CFEnergyResidualCell(const CFResidualCtx *rc, const DMDALocalInfo *info, const CFCellState *const *x, const PetscReal *kcell, PetscInt i, PetscInt j, PetscReal Gamma_V)
{
  const PetscReal dx = rc->dx, dz = rc->dz, rcp = rc->rho * rc->cp, TP = x[j][i].T, kP = KCELL(info, kcell, i, j);
  PetscReal       adv, cond_x_in = 0.0, cond_x_out = 0.0, cond_up_top, cond_up_bot, R;

  /* net advective outflow of heat */
  adv = rcp * (AdvectX(rc, x, i + 1, j) - AdvectX(rc, x, i, j) + AdvectZ(rc, x, i, j) - AdvectZ(rc, x, i, j + 1));

  /* conductive heat flux, +x at the side faces and upward at the top and bottom faces */
  if (i > 0) cond_x_in = -CFHarmonicMean(KCELL(info, kcell, i - 1, j), kP) * (TP - x[j][i - 1].T) / dx * dz;
  if (i < rc->nx - 1) cond_x_out = -CFHarmonicMean(kP, KCELL(info, kcell, i + 1, j)) * (x[j][i + 1].T - TP) / dx * dz;
  if (j > 0) cond_up_top = CFHarmonicMean(KCELL(info, kcell, i, j - 1), kP) * (TP - x[j - 1][i].T) / dz * dx;
  else cond_up_top = kP * (TP - rc->T_surface) / (0.5 * dz) * dx;
  if (j < rc->nz - 1) cond_up_bot = CFHarmonicMean(kP, KCELL(info, kcell, i, j + 1)) * (x[j + 1][i].T - TP) / dz * dx;
  else cond_up_bot = kP * (rc->T_bottom - TP) / (0.5 * dz) * dx;

  R = adv + (cond_x_out - cond_x_in) + (cond_up_top - cond_up_bot);
  /* adiabatic decompression: -rho cp Gamma_ad w_down V, with w_down V from the face fluxes */
  R += rcp * rc->adiabatic_gradient * dz * 0.5 * (CF_QZ(&rc->corners, i, j) + CF_QZ(&rc->corners, i, j + 1));
  /* latent heat L = T dS taken up by melting */
  R += TP * rc->entropy_of_fusion * Gamma_V;
  if (rc->source) R -= rc->source((i + 0.5) * dx, (j + 0.5) * dz, TP, rc->sctx) * dx * dz;
  return R / rc->energy_scale;
}

/* Derivatives of LimitedFace with respect to (Tuu, Tu, Td): with a = Tu - Tuu, b = Td - Tu and
   g = ab / (a + b), dg/da = b^2 / (a + b)^2 and dg/db = a^2 / (a + b)^2; at an extremum the face
   takes Tu. */
static inline void LimitedFaceDerivative(PetscReal Tuu, PetscReal Tu, PetscReal Td, PetscReal d[3])
{
  const PetscReal a = Tu - Tuu, b = Td - Tu;
  if (a * b <= 0.0) {
    d[0] = 0.0, d[1] = 1.0, d[2] = 0.0;
    return;
  }
  {
    const PetscReal ga = b * b / ((a + b) * (a + b)), gb = a * a / ((a + b) * (a + b));
    d[0] = -ga, d[1] = 1.0 + ga - gb, d[2] = gb;
  }
}

/* sign * q * d(face value) of the three cells (iuu, juu), (iu, ju), (id, jd) into r; a ghost
   mirror Tuu = 2 T_boundary - Tu is passed as iuu < 0 and folds into the Tu column. */
static void AddFace(CFJacRow *r, PetscReal w, const PetscReal d[3], PetscInt iuu, PetscInt juu, PetscInt iu, PetscInt ju, PetscInt id, PetscInt jd)
{
  if (iuu >= 0) CFJacRowAdd(r, iuu, juu, 0, w * d[0]);
  else CFJacRowAdd(r, iu, ju, 0, -w * d[0]);
  CFJacRowAdd(r, iu, ju, 0, w * d[1]);
  CFJacRowAdd(r, id, jd, 0, w * d[2]);
}

/* d AdvectX(fi, j) times sign w. */
static void AdvectXJacobian(const CFResidualCtx *rc, const CFCellState *const *x, PetscInt fi, PetscInt j, PetscReal w, CFJacRow *r)
{
  const PetscReal q = CF_QX(&rc->corners, fi, j);
  PetscReal       d[3];
  if (fi == 0) return;
  if (fi == rc->nx) {
    CFJacRowAdd(r, fi - 1, j, 0, w * q);
    return;
  }
  if (q >= 0.0) {
    if (fi - 2 < 0) CFJacRowAdd(r, fi - 1, j, 0, w * q);
    else {
      LimitedFaceDerivative(x[j][fi - 2].T, x[j][fi - 1].T, x[j][fi].T, d);
      AddFace(r, w * q, d, fi - 2, j, fi - 1, j, fi, j);
    }
  } else {
    if (fi + 1 >= rc->nx) CFJacRowAdd(r, fi, j, 0, w * q);
    else {
      LimitedFaceDerivative(x[j][fi + 1].T, x[j][fi].T, x[j][fi - 1].T, d);
      AddFace(r, w * q, d, fi + 1, j, fi, j, fi - 1, j);
    }
  }
}

/* d AdvectZ(i, fj) times sign w. */
static void AdvectZJacobian(const CFResidualCtx *rc, const CFCellState *const *x, PetscInt i, PetscInt fj, PetscReal w, CFJacRow *r)
{
  const PetscReal q = CF_QZ(&rc->corners, i, fj);
  PetscReal       d[3];
  if (fj == 0 || fj == rc->nz) return; /* the bottom inflow carries the fixed T_bottom */
  if (q >= 0.0) {
    const PetscBool ghost = (PetscBool)(fj + 1 >= rc->nz);
    LimitedFaceDerivative(ghost ? 2.0 * rc->T_bottom - x[fj][i].T : x[fj + 1][i].T, x[fj][i].T, x[fj - 1][i].T, d);
    AddFace(r, w * q, d, ghost ? -1 : i, fj + 1, i, fj, i, fj - 1);
  } else {
    const PetscBool ghost = (PetscBool)(fj - 2 < 0);
    LimitedFaceDerivative(ghost ? 2.0 * rc->T_surface - x[fj - 1][i].T : x[fj - 2][i].T, x[fj - 1][i].T, x[fj][i].T, d);
    AddFace(r, w * q, d, ghost ? -1 : i, fj - 2, i, fj - 1, i, fj);
  }
}

void CFEnergyAdvectionJacobian(const CFResidualCtx *rc, const CFCellState *const *x, PetscInt i, PetscInt j, CFJacRow *r)
{
  const PetscReal rcp = rc->rho * rc->cp;
  AdvectXJacobian(rc, x, i + 1, j, rcp, r);
  AdvectXJacobian(rc, x, i, j, -rcp, r);
  AdvectZJacobian(rc, x, i, j, rcp, r);
  AdvectZJacobian(rc, x, i, j + 1, -rcp, r);
}
