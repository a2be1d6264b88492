/* Writing a run file: created under a temporary name, filled collectively through PETSc's HDF5
   viewer (parallel HDF5), and published by rename only once it is complete, so a failed or
   killed run never leaves a file that looks finished.  The file is created with an HDF5 user
   block, and its integrity header (crustforge/integrity.h) is written there after the close;
   the marker attribute "format" is written last before the close, so even the temporary file of
   a killed run is refused by the reader twice over. */
#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>
#include <petscdmda.h>
#include <crustforge/integrity.h>
#include "output_impl.h"

static PetscBool NameValid(const char name[])
{
  size_t n = name ? strlen(name) : 0;
  if (!n || n >= CF_NAME_LEN || !(name[0] == '_' || (name[0] >= 'A' && name[0] <= 'Z') || (name[0] >= 'a' && name[0] <= 'z'))) return PETSC_FALSE;
  for (size_t i = 1; i < n; i++)
    if (!(name[i] == '_' || (name[i] >= 'A' && name[i] <= 'Z') || (name[i] >= 'a' && name[i] <= 'z') || (name[i] >= '0' && name[i] <= '9'))) return PETSC_FALSE;
  return PETSC_TRUE;
}

/* The paths of the pair: <path>.tmp, <path without .h5>.xdmf and <that>.tmp. */
static PetscErrorCode SetPaths(MPI_Comm comm, CFRunFile f, const char path[])
{
  size_t      n;
  const char *base;

  PetscFunctionBeginUser;
  PetscCheck(path && path[0], comm, PETSC_ERR_USER_INPUT, "run file: no path given");
  PetscCall(PetscStrlen(path, &n));
  PetscCheck(n + 10 < PETSC_MAX_PATH_LEN, comm, PETSC_ERR_USER_INPUT, "run file '%s': path too long", path);
  base = strrchr(path, '/');
  base = base ? base + 1 : path;
  /* XDMF names the HDF5 file as "file:/dataset". */
  PetscCheck(base[0] && !strchr(base, ':'), comm, PETSC_ERR_USER_INPUT, "run file '%s': the file name must be non-empty and hold no ':'", path);
  PetscCall(PetscStrncpy(f->path, path, sizeof(f->path)));
  PetscCall(PetscSNPrintf(f->tmp_path, sizeof(f->tmp_path), "%s.tmp", path));
  if (n > 3 && !strcmp(path + n - 3, ".h5")) PetscCall(PetscSNPrintf(f->xdmf_path, sizeof(f->xdmf_path), "%.*s.xdmf", (int)(n - 3), path));
  else PetscCall(PetscSNPrintf(f->xdmf_path, sizeof(f->xdmf_path), "%s.xdmf", path));
  PetscCall(PetscSNPrintf(f->xdmf_tmp_path, sizeof(f->xdmf_tmp_path), "%s.tmp", f->xdmf_path));
  if (base == path) PetscCall(PetscStrncpy(f->dir, ".", sizeof(f->dir)));
  else if (base == path + 1) PetscCall(PetscStrncpy(f->dir, "/", sizeof(f->dir)));
  else PetscCall(PetscSNPrintf(f->dir, sizeof(f->dir), "%.*s", (int)(base - path - 1), path));
  PetscFunctionReturn(0);
}

/* Create the temporary file with its user block (rank 0, serial HDF5: PETSc's viewer offers no
   file-creation properties), then reopen it on every rank through the viewer; a directory that
   is missing or not writable is a one-line error instead of HDF5's error stack. */
static PetscErrorCode OpenTemporary(CFRunFile f)
{
  PetscMPIInt    rank;
  char           msg[2 * PETSC_MAX_PATH_LEN + 256] = "";
  PetscErrorCode ierr;
  CFH5Quiet      quiet;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(f->comm, &rank));
  if (!rank) {
    if (access(f->dir, W_OK)) snprintf(msg, sizeof(msg), "run file '%s': cannot write in directory '%s': %s", f->path, f->dir, strerror(errno));
    else if (CFIntegrityCreateFile(f->tmp_path, msg, sizeof(msg))) snprintf(msg, sizeof(msg), "run file '%s': HDF5 cannot create '%s'", f->path, f->tmp_path);
  }
  PetscCallMPI(MPI_Bcast(msg, sizeof(msg), MPI_CHAR, 0, f->comm));
  PetscCheck(!msg[0], f->comm, PETSC_ERR_FILE_OPEN, "%s", msg);
  CFH5QuietBegin(&quiet);
  PetscCall(PetscPushErrorHandler(PetscReturnErrorHandler, NULL));
  ierr = PetscViewerHDF5Open(f->comm, f->tmp_path, FILE_MODE_APPEND, &f->viewer); /* opens the file made above */
  PetscCall(PetscPopErrorHandler());
  CFH5QuietEnd(&quiet);
  PetscCheck(!ierr, f->comm, PETSC_ERR_FILE_OPEN, "run file '%s': HDF5 cannot create '%s'", f->path, f->tmp_path);
  PetscCall(PetscViewerHDF5GetFileId(f->viewer, &f->file_id));
  PetscFunctionReturn(0);
}

/* Close what a failed write left open in the file (PETSc's VecView returns on an HDF5 error
   without closing its dataset), since HDF5 does not close a file that still has open objects. */
static void CloseLeftOpen(hid_t file_id)
{
  ssize_t n = H5Fget_obj_count(file_id, H5F_OBJ_DATASET | H5F_OBJ_GROUP | H5F_OBJ_DATATYPE | H5F_OBJ_ATTR | H5F_OBJ_LOCAL);
  hid_t   ids[64];

  if (n <= 0) return;
  n = H5Fget_obj_ids(file_id, H5F_OBJ_DATASET | H5F_OBJ_GROUP | H5F_OBJ_DATATYPE | H5F_OBJ_ATTR | H5F_OBJ_LOCAL, sizeof(ids) / sizeof(ids[0]), ids);
  for (ssize_t k = 0; k < n; k++) {
    switch (H5Iget_type(ids[k])) {
    case H5I_DATASET: (void)H5Dclose(ids[k]); break;
    case H5I_GROUP: (void)H5Gclose(ids[k]); break;
    case H5I_DATATYPE: (void)H5Tclose(ids[k]); break;
    case H5I_ATTR: (void)H5Aclose(ids[k]); break;
    default: break;
    }
  }
}

/* Close the viewer and remove whatever temporary files exist.  Cleanup after a failure: errors
   here are ignored so that the first error, the cause, is the one reported.  The file must still
   close inside HDF5, or HDF5's own clean-up at MPI_Finalize crashes on it: what a failed write
   left open is closed first, rank 0 empties the void file, which gives back its space for the
   metadata the close still writes, and a close that fails is tried once more by hand. */
static PetscErrorCode Discard(CFRunFile f)
{
  PetscMPIInt    rank;
  PetscErrorCode ierr;
  CFH5Quiet      quiet;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(f->comm, &rank));
  if (f->viewer) {
    if (!rank) {
      int rc = truncate(f->tmp_path, 0); /* a failure only means there is nothing to give back */
      (void)rc;
    }
    PetscCallMPI(MPI_Barrier(f->comm));
  }
  CFH5QuietBegin(&quiet);
  if (f->file_id >= 0 && H5Iis_valid(f->file_id) > 0) CloseLeftOpen(f->file_id);
  PetscCall(PetscPushErrorHandler(PetscReturnErrorHandler, NULL));
  ierr = PetscViewerDestroy(&f->viewer);
  PetscCall(PetscPopErrorHandler());
  if (f->file_id >= 0 && H5Iis_valid(f->file_id) > 0) (void)H5Fclose(f->file_id);
  CFH5QuietEnd(&quiet);
  (void)ierr;
  f->viewer  = NULL; /* a viewer whose close failed is left, not destroyed twice */
  f->file_id = -1;
  PetscCallMPI(MPI_Barrier(f->comm));
  if (!rank) {
    (void)unlink(f->tmp_path);
    (void)unlink(f->xdmf_tmp_path);
  }
  PetscFunctionReturn(0);
}

/* Guarded writes: HDF5's error stack silenced and PETSc errors returned, so that a write that
   fails (a full disk) ends as one line naming the cause.  The file is discarded before that line
   is raised: closing a file whose writes failed raises HDF5 errors of its own, and PETSc reports
   the last error raised. */
static PetscErrorCode GuardBegin(CFH5Quiet *quiet)
{
  PetscFunctionBeginUser;
  CFH5QuietBegin(quiet);
  PetscCall(PetscPushErrorHandler(PetscReturnErrorHandler, NULL));
  errno = 0;
  PetscFunctionReturn(0);
}

static PetscErrorCode GuardEnd(CFRunFile f, const CFH5Quiet *quiet, PetscErrorCode ierr, const char what[])
{
  int  err = errno;
  char cause[PETSC_MAX_PATH_LEN + 128];

  PetscFunctionBeginUser;
  PetscCall(PetscPopErrorHandler());
  CFH5QuietEnd(quiet);
  if (!ierr) PetscFunctionReturn(0);
  CFRunFileWriteCause_Private(f, err, cause, sizeof(cause));
  PetscCall(Discard(f));
  SETERRQ(f->comm, PETSC_ERR_FILE_WRITE, "run file '%s': cannot write %s: %s", f->path, what, cause);
}

static PetscErrorCode WriteHeader(CFRunFile f, const CFConfig *cfg)
{
  CFH5Quiet      quiet;
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  PetscCall(GuardBegin(&quiet));
  ierr = CFRunFileWriteHeader_Private(f, cfg);
  PetscCall(GuardEnd(f, &quiet, ierr, "its header (coordinates, provenance, scenario)"));
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunFileCreate(MPI_Comm comm, const CFConfig *cfg, DM da, const char path[], CFRunFile *file)
{
  CFRunFile      f;
  PetscInt       dim, mx, my, dof;
  PetscBool      isda;
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  PetscCheck(cfg && file, comm, PETSC_ERR_ARG_NULL, "run file: no scenario or no output argument");
  *file = NULL;
  PetscCall(PetscObjectTypeCompare((PetscObject)da, DMDA, &isda));
  PetscCheck(isda, comm, PETSC_ERR_ARG_WRONG, "run file: the grid must be a DMDA");
  PetscCall(DMDAGetInfo(da, &dim, &mx, &my, NULL, NULL, NULL, NULL, &dof, NULL, NULL, NULL, NULL, NULL));
  PetscCheck(dim == 2 && dof == 1, comm, PETSC_ERR_ARG_WRONG, "run file: the grid must be a 2-D DMDA with one dof (got %" PetscInt_FMT "-D, dof %" PetscInt_FMT ")", dim, dof);
  PetscCheck(mx == cfg->nx && my == cfg->nz, comm, PETSC_ERR_ARG_SIZ, "run file: the DMDA is %" PetscInt_FMT " x %" PetscInt_FMT " cells but the scenario grid is %" PetscInt_FMT " x %" PetscInt_FMT, mx, my, cfg->nx, cfg->nz);
  PetscCall(PetscNew(&f));
  f->comm = comm;
  f->nx   = mx;
  f->nz      = my;
  f->file_id = -1;
  ierr       = SetPaths(comm, f, path);
  if (!ierr) ierr = CFRunFileCheckRoom_Private(f, 0);
  if (!ierr) ierr = OpenTemporary(f);
  if (!ierr) ierr = CFRunFileCheckRoom_Private(f, 0); /* now reserved */
  if (!ierr) ierr = WriteHeader(f, cfg);
  if (ierr) {
    if (f->viewer) PetscCall(Discard(f));
    PetscCall(PetscFree(f));
    PetscFunctionReturn(ierr);
  }
  *file = f;
  PetscFunctionReturn(0);
}

static PetscErrorCode CheckFieldInfo(CFRunFile f, const CFFieldInfo *info)
{
  PetscFunctionBeginUser;
  PetscCheck(info, f->comm, PETSC_ERR_ARG_NULL, "run file '%s': no field description", f->path);
  PetscCheck(f->viewer, f->comm, PETSC_ERR_ARG_WRONGSTATE, "run file '%s': already closed", f->path);
  PetscCheck(NameValid(info->name) && strcmp(info->name, "x") && strcmp(info->name, "z") && strcmp(info->name, "scenario"), f->comm, PETSC_ERR_ARG_WRONG, "run file '%s': '%s' is not a valid field name (a C identifier other than x, z, scenario)", f->path, info->name ? info->name : "(null)");
  PetscCheck(info->long_name && info->long_name[0] && strlen(info->long_name) < CF_LONG_NAME_LEN, f->comm, PETSC_ERR_ARG_WRONG, "run file '%s': field %s needs a long_name shorter than %d characters", f->path, info->name, CF_LONG_NAME_LEN);
  PetscCheck(info->units && info->units[0] && strlen(info->units) < CF_NAME_LEN && info->si_units && info->si_units[0] && strlen(info->si_units) < CF_NAME_LEN, f->comm, PETSC_ERR_ARG_WRONG, "run file '%s': field %s needs units and si_units (\"1\" when dimensionless)", f->path, info->name);
  PetscCheck(isfinite(info->scale) && info->scale != 0 && isfinite(info->offset), f->comm, PETSC_ERR_ARG_WRONG, "run file '%s': field %s: scale %g and offset %g must be finite, scale non-zero", f->path, info->name, (double)info->scale, (double)info->offset);
  PetscCheck(f->nfields < CF_RUN_MAX_FIELDS, f->comm, PETSC_ERR_ARG_OUTOFRANGE, "run file '%s': more than %d fields", f->path, CF_RUN_MAX_FIELDS);
  for (PetscInt i = 0; i < f->nfields; i++) PetscCheck(strcmp(f->fields[i].name, info->name), f->comm, PETSC_ERR_ARG_WRONG, "run file '%s': field %s written twice", f->path, info->name);
  PetscFunctionReturn(0);
}

/* The stored copy of v in the output unit, and its attributes. */
static PetscErrorCode WriteFieldData(CFRunFile f, const CFFieldInfo *info, DM da, Vec v)
{
  Vec                w;
  const PetscScalar *a;
  char               dataset[CF_NAME_LEN + 1];
  PetscErrorCode     ierr;

  PetscFunctionBeginUser;
  /* the same operations as the post-processing's round trip (rundata.c), so both hold the
     same bits */
  PetscCall(VecDuplicate(v, &w));
  PetscCall(VecCopy(v, w));
  PetscCall(VecScale(w, info->scale));
  PetscCall(VecShift(w, info->offset));
  PetscCall(PetscSNPrintf(dataset, sizeof(dataset), "/%s", info->name));
  PetscCall(VecGetArrayRead(w, &a));
  ierr = CFRunFileWriteBlock_Private(f->file_id, dataset, da, a); /* errors are returned here (GuardBegin): free w either way */
  PetscCall(VecRestoreArrayRead(w, &a));
  PetscCall(VecDestroy(&w));
  PetscCall(ierr);
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, dataset, "units", PETSC_STRING, info->units));
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, dataset, "long_name", PETSC_STRING, info->long_name));
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, dataset, "si_units", PETSC_STRING, info->si_units));
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, dataset, "si_scale", PETSC_REAL, &info->scale));
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, dataset, "si_offset", PETSC_REAL, &info->offset));
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunFileWriteField(CFRunFile f, const CFFieldInfo *info, Vec v)
{
  DM             dm;
  PetscInt       mx, my, dof;
  PetscBool      isda = PETSC_FALSE;
  CFFieldRecord *r;
  CFH5Quiet      quiet;
  PetscErrorCode ierr;
  char           what[CF_NAME_LEN + 16];

  PetscFunctionBeginUser;
  PetscCheck(f, PETSC_COMM_SELF, PETSC_ERR_ARG_NULL, "run file: not created");
  PetscCall(CheckFieldInfo(f, info));
  PetscCall(CFRunFileCheckRoom_Private(f, f->nfields + 1));
  PetscCall(VecGetDM(v, &dm));
  if (dm) PetscCall(PetscObjectTypeCompare((PetscObject)dm, DMDA, &isda));
  PetscCheck(isda, f->comm, PETSC_ERR_ARG_WRONG, "run file '%s': field %s is not a Vec of a DMDA", f->path, info->name);
  PetscCall(DMDAGetInfo(dm, NULL, &mx, &my, NULL, NULL, NULL, NULL, &dof, NULL, NULL, NULL, NULL, NULL));
  PetscCheck(mx == f->nx && my == f->nz && dof == 1, f->comm, PETSC_ERR_ARG_SIZ, "run file '%s': field %s is on a %" PetscInt_FMT " x %" PetscInt_FMT " grid (dof %" PetscInt_FMT "), the file's is %" PetscInt_FMT " x %" PetscInt_FMT, f->path, info->name, mx, my, dof, f->nx, f->nz);

  PetscCall(PetscSNPrintf(what, sizeof(what), "field %s", info->name));
  PetscCall(GuardBegin(&quiet));
  ierr = WriteFieldData(f, info, dm, v);
  PetscCall(GuardEnd(f, &quiet, ierr, what));

  r = &f->fields[f->nfields++];
  PetscCall(PetscStrncpy(r->name, info->name, sizeof(r->name)));
  PetscCall(PetscStrncpy(r->long_name, info->long_name, sizeof(r->long_name)));
  PetscCall(PetscStrncpy(r->units, info->units, sizeof(r->units)));
  PetscCall(PetscStrncpy(r->si_units, info->si_units, sizeof(r->si_units)));
  r->scale  = info->scale;
  r->offset = info->offset;
  PetscFunctionReturn(0);
}

static PetscErrorCode SetAttribute(CFRunFile f, const char name[], PetscDataType type, const void *value)
{
  CFH5Quiet      quiet;
  PetscErrorCode ierr;
  char           what[CF_NAME_LEN + 32];

  PetscFunctionBeginUser;
  PetscCheck(f, PETSC_COMM_SELF, PETSC_ERR_ARG_NULL, "run file: not created");
  PetscCheck(f->viewer, f->comm, PETSC_ERR_ARG_WRONGSTATE, "run file '%s': already closed", f->path);
  PetscCheck(NameValid(name) && !CFRunAttributeReserved_Private(name), f->comm, PETSC_ERR_ARG_WRONG, "run file '%s': '%s' is not a valid attribute name (a C identifier, not a provenance name)", f->path, name ? name : "(null)");
  PetscCall(PetscSNPrintf(what, sizeof(what), "root attribute %s", name));
  PetscCall(GuardBegin(&quiet));
  ierr = PetscViewerHDF5WriteAttribute(f->viewer, "/", name, type, value);
  PetscCall(GuardEnd(f, &quiet, ierr, what));
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunFileSetAttributeReal(CFRunFile f, const char name[], PetscReal value)
{
  PetscFunctionBeginUser;
  PetscCall(SetAttribute(f, name, PETSC_REAL, &value));
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunFileSetAttributeInt(CFRunFile f, const char name[], PetscInt value)
{
  PetscFunctionBeginUser;
  PetscCall(SetAttribute(f, name, PETSC_INT, &value));
  PetscFunctionReturn(0);
}

/* Rank 0, after every rank has closed the file: integrity header, sidecar, sync, then rename the
   HDF5 file first so that a sidecar in place always points at a complete file. */
static void PublishOnRank0(CFRunFile f, char msg[], size_t len)
{
  if (f->reserved && CFRunFileReleaseRoom_Private(f->tmp_path)) {
    snprintf(msg, len, "run file '%s': cannot release the room reserved for it: %s", f->path, strerror(errno));
    return;
  }
  if (CFIntegritySeal(f->tmp_path, CF_FILE_RUN, msg, len)) return;
  if (CFXdmfWrite_Private(f, msg, len)) return;
  if (CFFileSync(f->tmp_path) || CFFileSync(f->xdmf_tmp_path)) snprintf(msg, len, "run file '%s': cannot flush it to disk: %s", f->path, strerror(errno));
  else if (rename(f->tmp_path, f->path)) snprintf(msg, len, "run file '%s': cannot rename '%s' into place: %s", f->path, f->tmp_path, strerror(errno));
  else if (rename(f->xdmf_tmp_path, f->xdmf_path)) snprintf(msg, len, "run file '%s': cannot rename '%s' into place: %s", f->path, f->xdmf_tmp_path, strerror(errno));
}

/* The marker attributes, then the collective H5Fclose that writes the cached metadata. */
static PetscErrorCode MarkAndClose(CFRunFile f)
{
  PetscInt version = CF_RUN_FORMAT_VERSION;

  PetscFunctionBeginUser;
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, "/", CF_ATTR_FORMAT_VERSION, PETSC_INT, &version));
  PetscCall(PetscViewerHDF5WriteAttribute(f->viewer, "/", CF_ATTR_FORMAT, PETSC_STRING, CF_RUN_FORMAT));
  PetscCall(PetscViewerDestroy(&f->viewer));
  f->file_id = -1;
  PetscFunctionReturn(0);
}

static PetscErrorCode Publish(CFRunFile f)
{
  PetscMPIInt    rank;
  char           msg[3 * PETSC_MAX_PATH_LEN] = "";
  CFH5Quiet      quiet;
  PetscErrorCode ierr;

  PetscFunctionBeginUser;
  PetscCheck(f->viewer, f->comm, PETSC_ERR_ARG_WRONGSTATE, "run file '%s': already closed", f->path);
  PetscCall(GuardBegin(&quiet));
  ierr = MarkAndClose(f);
  PetscCall(GuardEnd(f, &quiet, ierr, "its metadata (closing it)"));
  PetscCallMPI(MPI_Barrier(f->comm));
  PetscCallMPI(MPI_Comm_rank(f->comm, &rank));
  if (!rank) PublishOnRank0(f, msg, sizeof(msg));
  PetscCallMPI(MPI_Bcast(msg, sizeof(msg), MPI_CHAR, 0, f->comm));
  PetscCheck(!msg[0], f->comm, PETSC_ERR_FILE_WRITE, "%s", msg);
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunFileClose(CFRunFile *file, PetscBool success)
{
  CFRunFile      f;
  PetscErrorCode ierr = 0;

  PetscFunctionBeginUser;
  if (!file || !(f = *file)) PetscFunctionReturn(0);
  *file = NULL;
  if (success) ierr = Publish(f);
  if (!success || ierr) PetscCall(Discard(f));
  PetscCall(PetscFree(f));
  PetscFunctionReturn(ierr);
}
