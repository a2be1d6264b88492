/* Private to the output module: the writer's state, the names of the file layout that writer and
   reader share, and small raw-HDF5 helpers for what PETSc's HDF5 viewer does not offer
   (listing attributes and links, reading attributes without error-stack noise). */
#ifndef CRUSTFORGE_OUTPUT_IMPL_H
#define CRUSTFORGE_OUTPUT_IMPL_H

#include <hdf5.h>
#include <petscviewerhdf5.h>
#include <crustforge/output.h>

#define CF_RUN_MAX_FIELDS 64

/* Root attributes written by the module itself; run figures may not reuse these names. */
#define CF_ATTR_FORMAT         "format"
#define CF_ATTR_FORMAT_VERSION "format_version"
#define CF_ATTR_VERSION        "crustforge_version"
#define CF_ATTR_REVISION       "crustforge_revision"
#define CF_ATTR_PETSC          "petsc_version"
#define CF_ATTR_HDF5           "hdf5_version"
#define CF_ATTR_RANKS          "mpi_ranks"
#define CF_ATTR_CREATED        "created"
#define CF_ATTR_SCENARIO_FILE  "scenario_file"
#define CF_GROUP_SCENARIO      "/scenario"
#define CF_GROUP_SCENARIO_UNITS "/scenario/units"

struct _n_CFRunFile {
  MPI_Comm      comm;
  PetscViewer   viewer;  /* NULL once closed */
  hid_t         file_id; /* the viewer's HDF5 file, -1 once closed */
  PetscInt      nx, nz;
  char          path[PETSC_MAX_PATH_LEN], tmp_path[PETSC_MAX_PATH_LEN];
  char          xdmf_path[PETSC_MAX_PATH_LEN], xdmf_tmp_path[PETSC_MAX_PATH_LEN];
  char          dir[PETSC_MAX_PATH_LEN]; /* the directory the files are written in */
  PetscBool     reserved;                /* disk room reserved past the file's end (rank 0) */
  PetscInt      nfields;
  CFFieldRecord fields[CF_RUN_MAX_FIELDS];
};

/* Coordinates, provenance and scenario (header.c). */
PETSC_INTERN PetscErrorCode CFRunFileWriteHeader_Private(CFRunFile file, const CFConfig *cfg);
/* Whether name is reserved for the module's own root attributes (header.c). */
PETSC_INTERN PetscBool CFRunAttributeReserved_Private(const char name[]);
/* The XDMF sidecar of file at xdmf_tmp_path; rank 0 only, no PETSc calls: returns 0, or -1 with
   a one-line message (xdmf.c). */
PETSC_INTERN int CFXdmfWrite_Private(const struct _n_CFRunFile *file, char msg[], size_t len);

/* The field v (this rank's part of a global vector of the 2-D DMDA da, one dof) as the dataset
   name[nz][nx] of file_id, natural order; collective (dataset.c). */
PETSC_INTERN PetscErrorCode CFRunFileWriteBlock_Private(hid_t file_id, const char name[], DM da, const PetscReal v[]);

/* Disk room (room.c).  CheckRoom: collective; refuses, with one line, a file of nfields fields
   that would pass the file-size limit or not fit on the disk, and reserves its room once the
   temporary file exists.  ReleaseRoom: rank 0, the closed file at path; 0 or -1 with errno.
   WriteCause: why a write failed, from its errno or the disk's state. */
PETSC_INTERN PetscErrorCode CFRunFileCheckRoom_Private(CFRunFile file, PetscInt nfields);
PETSC_INTERN int            CFRunFileReleaseRoom_Private(const char path[]);
PETSC_INTERN void           CFRunFileWriteCause_Private(CFRunFile file, int err, char cause[], size_t len);

/* Raw HDF5 helpers (h5attr.c).  They never print an HDF5 error stack; each returns 0 on success
   and -1 when the attribute is missing or of the wrong kind. */
typedef struct {
  H5E_auto2_t func;
  void       *data;
} CFH5Quiet;
PETSC_INTERN void CFH5QuietBegin(CFH5Quiet *q);
PETSC_INTERN void CFH5QuietEnd(const CFH5Quiet *q);
PETSC_INTERN int  CFH5ReadStringAttribute(hid_t obj, const char name[], char value[], size_t len);
PETSC_INTERN int  CFH5ReadRealAttribute(hid_t obj, const char name[], PetscReal *value);
/* The class of attribute name of obj (H5T_STRING, H5T_FLOAT, ...), or H5T_NO_CLASS. */
PETSC_INTERN H5T_class_t CFH5AttributeClass(hid_t obj, const char name[]);

#endif
