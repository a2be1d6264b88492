/* Private to the config module: checks of a validated scenario against the machine. */
#ifndef CRUSTFORGE_CONFIG_RESOURCES_H
#define CRUSTFORGE_CONFIG_RESOURCES_H

#include <crustforge/config.h>

/* Refuse (PETSC_ERR_USER_INPUT) a grid whose steady run would need more memory than the nodes
   of comm have: "grid.spacing: X km needs about N GB, this machine has M GB".  Collective. */
PETSC_INTERN PetscErrorCode CFConfigCheckMemory(MPI_Comm comm, const CFConfig *cfg);

#endif
