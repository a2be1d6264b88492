/* Private to the post-processor: the cell-level pieces its modules share (face fluxes of the
   corner flow, which cells melt, isotherm depths, interpolation of the cell fields) and the
   writers of its tables.  Everything here runs on rank 0, where CFRunData holds the fields. */
#ifndef CRUSTFORGE_POST_IMPL_H
#define CRUSTFORGE_POST_IMPL_H

#include <crustforge/postprocess.h>

/* A cell melts where the depletion it adds, Gamma V / (rho q_out), exceeds this fraction of its
   depletion.  A cell that only carries depleted mantle through has a melting rate that is
   round-off of rho q F (about 1e-16 of it); a melting cell adds a finite part of its F.
   (common practice, no source) */
#define CF_POST_MELTING_TOL 1.0e-9

/* Field f of run at cell (i, j), natural order. */
#define CF_POST_AT(run, f, i, j) ((run)->field[f][(j) * (run)->nx + (i)])

/* Stream function at the cell corners (I dx, J dz), 0 <= I <= nx, 0 <= J <= nz, stored
   psi[J * (nx + 1) + I], from the scenario's corner flow exactly as the solver evaluates it.
   Free with PetscFree. */
PETSC_INTERN PetscErrorCode CFPostCornerPsi(const CFRunData *run, PetscReal **psi);

/* Volume fluxes (m2/s per unit ridge length) through the faces of cell (i, j): left and right
   positive outward (+x), top and bottom positive upward. */
typedef struct {
  PetscReal left, right, top, bottom;
} CFPostFaceFluxes;
PETSC_INTERN void CFPostCellFluxes(const CFRunData *run, const PetscReal psi[], PetscInt i, PetscInt j, CFPostFaceFluxes *q);

/* melting[j * nx + i]: whether cell (i, j) melts (Gamma > 0 beyond round-off, CF_POST_MELTING_TOL). */
PETSC_INTERN PetscErrorCode CFPostMeltingCells(const CFRunData *run, const PetscReal psi[], PetscBool melting[]);

/* Depth (m) where the column T[0], T[stride], ... (cell centres (j + 0.5) dz, below the surface
   node z = 0 at T_surface) first reaches T_iso from above, linearly interpolated; NaN if never. */
PETSC_INTERN PetscReal CFPostIsothermDepth(const PetscReal T[], PetscInt stride, PetscInt nz, PetscReal dz, PetscReal T_surface, PetscReal T_iso);

/* Bilinear interpolation of a cell field at (x, z), clamped to the outermost cell centres. */
PETSC_INTERN PetscReal CFPostSample(const CFRunData *run, const PetscReal f[], PetscReal x, PetscReal z);

/* Raise on every rank an error that happened on rank 0 alone, where the computations run. */
PETSC_INTERN PetscErrorCode CFPostShareError(MPI_Comm comm, PetscErrorCode ierr);

/* Rank 0: the delivered-melt figures of sum (crust both ways, pooled melt, melt flux, regime mean F). */
PETSC_INTERN PetscErrorCode CFPostExtraction(const CFRunData *run, const CFPostSettings *set, const PetscReal psi[], const PetscBool melting[], CFSummary *sum);

/* The tables, written into dir under temporary names and renamed together (csv.c). Collective. */
PETSC_INTERN PetscErrorCode CFPostWriteTables(MPI_Comm comm, const char dir[], const CFRunData *run, const CFPostSettings *set, const CFSummary *sum, const CFProfiles *prof, const CFPTPaths *paths);

#endif
