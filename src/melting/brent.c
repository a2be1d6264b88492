/* Brent's bracketed root finder (Brent 1973, ch. 4).  The bracket [b, c] always holds a sign
   change and shrinks every step; interpolation is accepted only while it beats bisection. */
#include <math.h>
#include <float.h>
#include "brent.h"

static int Fail(PetscReal *root, int why)
{
  *root = NAN;
  return why;
}

int CFBrentFindRootBracketed(CFBrentFunction f, void *ctx, PetscReal a, PetscReal fa, PetscReal b, PetscReal fb, PetscReal xtol, PetscReal ftol, PetscInt maxit, PetscReal *root, PetscInt *its)
{
  PetscReal c, fc, d, e;

  if (its) *its = 0;
  if (!isfinite(a) || !isfinite(b) || !isfinite(fa) || !isfinite(fb) || !(xtol > 0.0) || !(ftol >= 0.0)) return Fail(root, CF_BRENT_NOT_FINITE);
  if (fabs(fa) <= ftol || fabs(fb) <= ftol) { /* an end is already a root */
    *root = (fabs(fa) <= fabs(fb)) ? a : b;
    return CF_BRENT_OK;
  }
  if ((fa > 0.0) == (fb > 0.0)) return Fail(root, CF_BRENT_NOT_BRACKETED);

  /* b: best estimate; c: contrapoint (f(c) of the other sign); a: previous b. */
  c  = a;
  fc = fa;
  d = e = b - a;
  for (PetscInt it = 1; it <= maxit; it++) {
    PetscReal tol, m;

    if ((fb > 0.0) == (fc > 0.0)) { /* the root moved between a and b: a is the new contrapoint */
      c  = a;
      fc = fa;
      d = e = b - a;
    }
    if (fabs(fc) < fabs(fb)) { /* keep the smaller residual in b */
      a  = b;
      b  = c;
      c  = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    tol = 2.0 * DBL_EPSILON * fabs(b) + 0.5 * xtol;
    m   = 0.5 * (c - b);
    if (fabs(m) <= tol || fabs(fb) <= ftol) {
      *root = b;
      return CF_BRENT_OK;
    }
    if (fabs(e) < tol || fabs(fa) <= fabs(fb)) {
      d = e = m; /* last step too small or not decreasing: bisect */
    } else {
      PetscReal p, q, r, s = fb / fa;
      if (a == c) { /* two points: secant */
        p = 2.0 * m * s;
        q = 1.0 - s;
      } else { /* three points: inverse quadratic interpolation */
        q = fa / fc;
        r = fb / fc;
        p = s * (2.0 * m * q * (q - r) - (b - a) * (r - 1.0));
        q = (q - 1.0) * (r - 1.0) * (s - 1.0);
      }
      if (p > 0.0) q = -q;
      else p = -p;
      /* Accept the step if it stays inside the bracket and shrinks faster than bisection. */
      if (2.0 * p < fmin(3.0 * m * q - fabs(tol * q), fabs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = e = m;
      }
    }
    a  = b;
    fa = fb;
    b += (fabs(d) > tol) ? d : (m > 0.0 ? tol : -tol);
    fb = f(b, ctx);
    if (its) *its = it;
    if (!isfinite(fb)) return Fail(root, CF_BRENT_NOT_FINITE);
  }
  return Fail(root, CF_BRENT_MAX_ITERATIONS);
}

int CFBrentFindRoot(CFBrentFunction f, void *ctx, PetscReal a, PetscReal b, PetscReal xtol, PetscReal ftol, PetscInt maxit, PetscReal *root, PetscInt *its)
{
  return CFBrentFindRootBracketed(f, ctx, a, f(a, ctx), b, f(b, ctx), xtol, ftol, maxit, root, its);
}
