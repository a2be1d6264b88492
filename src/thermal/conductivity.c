/* Conductivity of the mantle column, with hydrothermal cooling near the axis represented as an
   enhanced conductivity k Nu where the rock is shallow and cold enough for seawater to circulate
   (Phipps Morgan & Chen 1993).  Both cutoffs are logistic switches so that the residual stays
   smooth and Newton converges. */
#include <math.h>
#include "steady_impl.h"

static inline PetscReal Switch(PetscReal v, PetscReal cutoff, PetscReal width)
{
  const PetscReal s = (v - cutoff) / width;
  if (s > 40.0) return 0.0; /* exp overflows long before this matters */
  return 1.0 / (1.0 + exp(s));
}

PetscReal CFConductivity(const CFResidualCtx *rc, PetscReal x, PetscReal z, PetscReal T)
{
  const CFConfig *c = rc->cfg;

  if (rc->kfun) return rc->kfun(x, z, T, rc->kctx);
  if (c->nusselt <= 1.0) return c->conductivity;
  return c->conductivity * (1.0 + (c->nusselt - 1.0) * Switch(T, c->hydrothermal_temperature_cutoff, c->hydrothermal_temperature_width) * Switch(z, c->hydrothermal_depth_cutoff, c->hydrothermal_depth_width));
}

/* d k / d T.  The logistic switch differentiates in closed form; a verification hook k(x, z, T)
   has no derivative, so it gets a central difference (error of order (h / scale)^2). */
PetscReal CFConductivityDerivative(const CFResidualCtx *rc, PetscReal x, PetscReal z, PetscReal T)
{
  const CFConfig *c = rc->cfg;

  if (rc->kfun) {
    const PetscReal h = 1e-3;
    return (rc->kfun(x, z, T + h, rc->kctx) - rc->kfun(x, z, T - h, rc->kctx)) / (2.0 * h);
  }
  if (c->nusselt <= 1.0) return 0.0;
  {
    const PetscReal sT = Switch(T, c->hydrothermal_temperature_cutoff, c->hydrothermal_temperature_width);
    /* d/dv of 1 / (1 + exp((v - cutoff) / width)) is -s (1 - s) / width */
    return -c->conductivity * (c->nusselt - 1.0) * sT * (1.0 - sT) / c->hydrothermal_temperature_width * Switch(z, c->hydrothermal_depth_cutoff, c->hydrothermal_depth_width);
  }
}
