/* Bracketed scalar root finding: Brent's method (Brent 1973, "Algorithms for Minimization
   without Derivatives", ch. 4): inverse quadratic / secant steps, falling back to bisection, so
   it converges whenever the interval brackets a sign change.  No PETSc calls and no shared
   state: safe inside OpenMP loops.  Private to the library. */
#ifndef CRUSTFORGE_BRENT_H
#define CRUSTFORGE_BRENT_H

#include <petscsys.h>

typedef PetscReal (*CFBrentFunction)(PetscReal x, void *ctx);

/* Why CFBrentFindRoot gave no root (the root is then NaN). */
enum {
  CF_BRENT_OK = 0,
  CF_BRENT_NOT_BRACKETED, /* f(a), f(b) nonzero and of the same sign */
  CF_BRENT_NOT_FINITE,    /* f gave NaN or Inf, or a, b, xtol are unusable */
  CF_BRENT_MAX_ITERATIONS /* not converged in maxit evaluations */
};

/* A root of f in [a, b], given fa = f(a) and fb = f(b): converged when the bracket around it is
   within xtol (absolute, > 0) or |f| <= ftol (>= 0; 0 asks for the bracket alone).
   Returns CF_BRENT_OK and the root; *its (may be NULL) counts the evaluations of f after a and b. */
int CFBrentFindRootBracketed(CFBrentFunction f, void *ctx, PetscReal a, PetscReal fa, PetscReal b, PetscReal fb, PetscReal xtol, PetscReal ftol, PetscInt maxit, PetscReal *root, PetscInt *its);
/* The same, evaluating f(a) and f(b) itself. */
int CFBrentFindRoot(CFBrentFunction f, void *ctx, PetscReal a, PetscReal b, PetscReal xtol, PetscReal ftol, PetscInt maxit, PetscReal *root, PetscInt *its);

#endif
