# Finds what crustforge builds on; a missing piece stops configure naming the Debian package.
# scripts/install-deps.sh installs them all.
find_package(PkgConfig)
if(NOT PKG_CONFIG_FOUND)
  message(FATAL_ERROR "pkg-config not found: apt-get install pkg-config (or run scripts/install-deps.sh)")
endif()

macro(crustforge_require_pkg prefix module package)
  pkg_check_modules(${prefix} QUIET IMPORTED_TARGET ${module})
  if(NOT ${prefix}_FOUND)
    message(FATAL_ERROR "${module} not found through pkg-config: apt-get install ${package} (or run scripts/install-deps.sh)")
  endif()
endmacro()

crustforge_require_pkg(PETSC "PETSc>=3.18" petsc-dev)
crustforge_require_pkg(HDF5 hdf5-openmpi libhdf5-openmpi-dev)
crustforge_require_pkg(CHECK check check)
crustforge_require_pkg(YAML yaml-0.1 libyaml-dev) # the scenario pre-scan (src/config/scan.c)
crustforge_require_pkg(PLPLOT plplot "libplplot-dev plplot-driver-cairo")

find_package(MPI COMPONENTS C QUIET)
if(NOT MPI_C_FOUND)
  message(FATAL_ERROR "MPI for C not found: apt-get install libopenmpi-dev (or run scripts/install-deps.sh)")
endif()
find_package(OpenMP COMPONENTS C QUIET)
if(NOT OpenMP_C_FOUND)
  message(FATAL_ERROR "OpenMP for C not found: apt-get install gcc (libgomp) (or run scripts/install-deps.sh)")
endif()
find_library(MATH_LIBRARY m REQUIRED)
