/* Reading a run file back for the post-processor.  Rank 0 first checks the integrity header
   (crustforge/integrity.h: HDF5 never sees a damaged file, which it may crash on), then probes
   the file with serial HDF5 and the error stack silenced, so that anything that is not a
   complete run of ours fails with one line naming the file and the cause; only then do all ranks
   open it through PETSc's HDF5 viewer, read the metadata and load fields into DMDA Vecs
   (natural ordering). */
#include <errno.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <petscdmda.h>
#include <crustforge/integrity.h>
#include "output_impl.h"

struct _n_CFRunReader {
  MPI_Comm       comm;
  PetscViewer    viewer;
  char           path[PETSC_MAX_PATH_LEN];
  PetscInt       nx, nz;
  PetscInt       nfields, nentries;
  CFFieldRecord *fields;
  CFConfigEntry *entries;
  char (*units)[CF_NAME_LEN]; /* storage behind entries[i].unit */
};

/* Rank 0: why path is not a complete crustforge run file, with the error class; "" if it is. */
static void Probe(const char *path, PetscErrorCode *code, char msg[], size_t len)
{
  struct stat st;
  hid_t       h5;
  char        format[64];
  PetscReal   version = 0;

  *code = PETSC_ERR_FILE_OPEN;
  if (stat(path, &st)) { snprintf(msg, len, "run file '%s': %s", path, strerror(errno)); return; }
  if ((*code = CFIntegrityVerify(path, CF_FILE_RUN, msg, len))) return;
  *code = PETSC_ERR_FILE_UNEXPECTED;
  if ((h5 = H5Fopen(path, H5F_ACC_RDONLY, H5P_DEFAULT)) < 0) { snprintf(msg, len, "run file '%s' is damaged (HDF5 cannot open it)", path); return; }
  if (CFH5ReadStringAttribute(h5, CF_ATTR_FORMAT, format, sizeof(format))) {
    if (H5Aexists(h5, CF_ATTR_VERSION) > 0) snprintf(msg, len, "run file '%s' is incomplete (the run that wrote it did not finish)", path);
    else snprintf(msg, len, "run file '%s' is HDF5 but not a crustforge run (no root attribute '%s')", path, CF_ATTR_FORMAT);
  } else if (strcmp(format, CF_RUN_FORMAT)) snprintf(msg, len, "run file '%s' is not a crustforge run (format '%s')", path, format);
  else if (CFH5ReadRealAttribute(h5, CF_ATTR_FORMAT_VERSION, &version) || version < 1) snprintf(msg, len, "run file '%s' has no valid '%s' attribute", path, CF_ATTR_FORMAT_VERSION);
  else if (version > CF_RUN_FORMAT_VERSION) snprintf(msg, len, "run file '%s' has format version %g, newer than this program reads (%d)", path, (double)version, CF_RUN_FORMAT_VERSION);
  H5Fclose(h5);
}

/* Length of the 1-D dataset name, or -1. */
static PetscInt Length1D(hid_t h5, const char name[])
{
  hid_t    d = H5Dopen2(h5, name, H5P_DEFAULT), s;
  hsize_t  dims[2];
  PetscInt n = -1;

  if (d < 0) return -1;
  if ((s = H5Dget_space(d)) >= 0) {
    if (H5Sget_simple_extent_ndims(s) == 1 && H5Sget_simple_extent_dims(s, dims, NULL) == 1) n = (PetscInt)dims[0];
    H5Sclose(s);
  }
  H5Dclose(d);
  return n;
}

/* Field records for every 2-D dataset at the root (links come sorted by name). */
static PetscErrorCode ReadFields(CFRunReader r, hid_t h5)
{
  H5G_info_t info;

  PetscFunctionBeginUser;
  PetscCheck(H5Gget_info(h5, &info) >= 0, r->comm, PETSC_ERR_FILE_UNEXPECTED, "run file '%s': cannot list its datasets", r->path);
  PetscCall(PetscCalloc1(info.nlinks + 1, &r->fields));
  for (hsize_t i = 0; i < info.nlinks; i++) {
    CFFieldRecord *f = &r->fields[r->nfields];
    hid_t          d, s;
    hsize_t        dims[3];
    int            ndims = -1;

    if (H5Lget_name_by_idx(h5, ".", H5_INDEX_NAME, H5_ITER_INC, i, f->name, sizeof(f->name), H5P_DEFAULT) < 0) continue;
    if ((d = H5Dopen2(h5, f->name, H5P_DEFAULT)) < 0) continue; /* a group */
    if ((s = H5Dget_space(d)) >= 0) {
      ndims = H5Sget_simple_extent_ndims(s);
      if (ndims == 2) H5Sget_simple_extent_dims(s, dims, NULL);
      H5Sclose(s);
    }
    if (ndims == 2) {
      int bad = (PetscInt)dims[0] != r->nz || (PetscInt)dims[1] != r->nx;
      bad     = bad || CFH5ReadStringAttribute(d, "units", f->units, sizeof(f->units)) || CFH5ReadStringAttribute(d, "long_name", f->long_name, sizeof(f->long_name));
      bad     = bad || CFH5ReadStringAttribute(d, "si_units", f->si_units, sizeof(f->si_units)) || CFH5ReadRealAttribute(d, "si_scale", &f->scale) || CFH5ReadRealAttribute(d, "si_offset", &f->offset) || f->scale == 0;
      H5Dclose(d);
      PetscCheck(!bad, r->comm, PETSC_ERR_FILE_UNEXPECTED, "run file '%s': field %s is not %" PetscInt_FMT " x %" PetscInt_FMT " with units, long_name, si_units, si_scale, si_offset", r->path, f->name, r->nz, r->nx);
      r->nfields++;
    } else H5Dclose(d);
  }
  PetscFunctionReturn(0);
}

/* Scenario entries from the attributes of /scenario (sorted by name), units from /scenario/units. */
static PetscErrorCode ReadScenario(CFRunReader r, hid_t h5)
{
  hid_t    g, gu = -1;
  PetscInt n = 0;
  char     name[2 * CF_NAME_LEN];

  PetscFunctionBeginUser;
  g = H5Lexists(h5, CF_GROUP_SCENARIO, H5P_DEFAULT) > 0 ? H5Gopen2(h5, CF_GROUP_SCENARIO, H5P_DEFAULT) : -1;
  PetscCheck(g >= 0, r->comm, PETSC_ERR_FILE_UNEXPECTED, "run file '%s' has no group %s", r->path, CF_GROUP_SCENARIO);
  if (H5Lexists(g, "units", H5P_DEFAULT) > 0) gu = H5Gopen2(g, "units", H5P_DEFAULT);
  while (H5Aget_name_by_idx(g, ".", H5_INDEX_NAME, H5_ITER_INC, (hsize_t)n, name, sizeof(name), H5P_DEFAULT) >= 0) n++;
  PetscCall(PetscCalloc1(n + 1, &r->entries));
  PetscCall(PetscCalloc1(n + 1, &r->units));
  for (PetscInt i = 0; i < n; i++) {
    CFConfigEntry *e = &r->entries[i];
    H5T_class_t    c;
    char          *dot;
    int            bad;

    (void)H5Aget_name_by_idx(g, ".", H5_INDEX_NAME, H5_ITER_INC, (hsize_t)i, e->key, sizeof(e->key), H5P_DEFAULT);
    c = CFH5AttributeClass(g, e->key);
    if (c == H5T_FLOAT || c == H5T_INTEGER) {
      e->is_real = PETSC_TRUE;
      bad        = CFH5ReadRealAttribute(g, e->key, &e->real_value);
      if (!bad) snprintf(e->value, sizeof(e->value), "%.17g", (double)e->real_value);
    } else bad = c != H5T_STRING || CFH5ReadStringAttribute(g, e->key, e->value, sizeof(e->value));
    dot = strchr(e->key, '.');
    if (!bad && dot && dot != e->key && dot[1]) {
      snprintf(e->option, sizeof(e->option), "-%s", e->key);
      e->option[1 + (dot - e->key)] = '_';
    } else bad = 1;
    if (gu < 0 || CFH5ReadStringAttribute(gu, e->key, r->units[i], sizeof(r->units[i]))) r->units[i][0] = 0;
    e->unit = r->units[i];
    if (bad) {
      if (gu >= 0) H5Gclose(gu);
      H5Gclose(g);
      SETERRQ(r->comm, PETSC_ERR_FILE_UNEXPECTED, "run file '%s': scenario key '%s' is not a number or text named section.key", r->path, e->key);
    }
  }
  r->nentries = n;
  if (gu >= 0) H5Gclose(gu);
  H5Gclose(g);
  PetscFunctionReturn(0);
}

static PetscErrorCode ReadMetadata(CFRunReader r)
{
  hid_t h5;

  PetscFunctionBeginUser;
  PetscCall(PetscViewerHDF5GetFileId(r->viewer, &h5));
  r->nx = Length1D(h5, "x");
  r->nz = Length1D(h5, "z");
  PetscCheck(r->nx > 0 && r->nz > 0, r->comm, PETSC_ERR_FILE_UNEXPECTED, "run file '%s' has no 1-D grid coordinates x and z", r->path);
  PetscCall(ReadFields(r, h5));
  PetscCall(ReadScenario(r, h5));
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunReaderOpen(MPI_Comm comm, const char path[], CFRunReader *reader)
{
  CFRunReader    r;
  PetscMPIInt    rank;
  PetscErrorCode code = 0, ierr;
  char           msg[PETSC_MAX_PATH_LEN + 256] = "";
  CFH5Quiet      quiet;

  PetscFunctionBeginUser;
  *reader = NULL;
  PetscCheck(path && path[0], comm, PETSC_ERR_FILE_OPEN, "run file: no path given");
  PetscCheck(strlen(path) < PETSC_MAX_PATH_LEN, comm, PETSC_ERR_FILE_OPEN, "run file: path too long");
  PetscCallMPI(MPI_Comm_rank(comm, &rank));
  CFH5QuietBegin(&quiet);
  if (!rank) Probe(path, &code, msg, sizeof(msg));
  CFH5QuietEnd(&quiet);
  PetscCallMPI(MPI_Bcast(msg, sizeof(msg), MPI_CHAR, 0, comm));
  PetscCallMPI(MPI_Bcast(&code, 1, MPI_INT, 0, comm));
  PetscCheck(!msg[0], comm, code, "%s", msg);

  PetscCall(PetscNew(&r));
  r->comm = comm;
  PetscCall(PetscStrncpy(r->path, path, sizeof(r->path)));
  CFH5QuietBegin(&quiet);
  PetscCall(PetscPushErrorHandler(PetscReturnErrorHandler, NULL));
  ierr = PetscViewerHDF5Open(comm, path, FILE_MODE_READ, &r->viewer);
  if (!ierr) ierr = ReadMetadata(r);
  PetscCall(PetscPopErrorHandler());
  CFH5QuietEnd(&quiet);
  if (ierr) { /* raise again under the caller's error handler: ReadMetadata's own message, else HDF5's failure */
    char *specific = NULL;
    PetscCall(PetscErrorMessage(ierr, NULL, &specific));
    if (ierr == PETSC_ERR_FILE_UNEXPECTED && specific) PetscCall(PetscStrncpy(msg, specific, sizeof(msg)));
    else PetscCall(PetscSNPrintf(msg, sizeof(msg), "run file '%s' cannot be opened with parallel HDF5", path));
    PetscCall(CFRunReaderDestroy(&r));
    SETERRQ(comm, PETSC_ERR_FILE_UNEXPECTED, "%s", msg);
  }
  *reader = r;
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunReaderDestroy(CFRunReader *reader)
{
  PetscFunctionBeginUser;
  if (!reader || !*reader) PetscFunctionReturn(0);
  PetscCall(PetscViewerDestroy(&(*reader)->viewer));
  PetscCall(PetscFree((*reader)->fields));
  PetscCall(PetscFree((*reader)->entries));
  PetscCall(PetscFree((*reader)->units));
  PetscCall(PetscFree(*reader));
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunReaderGetGrid(CFRunReader r, PetscInt *nx, PetscInt *nz)
{
  PetscFunctionBeginUser;
  if (nx) *nx = r->nx;
  if (nz) *nz = r->nz;
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunReaderGetFields(CFRunReader r, PetscInt *n, const CFFieldRecord **fields)
{
  PetscFunctionBeginUser;
  *n      = r->nfields;
  *fields = r->fields;
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunReaderReadField(CFRunReader r, const char name[], Vec v)
{
  const CFFieldRecord *f = NULL;
  DM                   dm;
  PetscInt             mx = -1, my = -1, dof = -1;
  PetscBool            isda = PETSC_FALSE;
  Vec                  w;

  PetscFunctionBeginUser;
  for (PetscInt i = 0; i < r->nfields && !f; i++)
    if (!strcmp(r->fields[i].name, name)) f = &r->fields[i];
  PetscCheck(f, r->comm, PETSC_ERR_FILE_UNEXPECTED, "run file '%s' has no field '%s'", r->path, name);
  PetscCall(VecGetDM(v, &dm));
  if (dm) PetscCall(PetscObjectTypeCompare((PetscObject)dm, DMDA, &isda));
  if (isda) PetscCall(DMDAGetInfo(dm, NULL, &mx, &my, NULL, NULL, NULL, NULL, &dof, NULL, NULL, NULL, NULL, NULL));
  PetscCheck(isda && mx == r->nx && my == r->nz && dof == 1, r->comm, PETSC_ERR_ARG_SIZ, "run file '%s': field %s needs a Vec of a %" PetscInt_FMT " x %" PetscInt_FMT " DMDA with one dof", r->path, name, r->nx, r->nz);
  PetscCall(VecDuplicate(v, &w));
  PetscCall(PetscObjectSetName((PetscObject)w, name)); /* VecLoad reads the dataset of the Vec's name */
  PetscCall(VecLoad(w, r->viewer));
  PetscCall(VecCopy(w, v));
  PetscCall(VecDestroy(&w));
  PetscCall(VecShift(v, -f->offset));
  PetscCall(VecScale(v, 1.0 / f->scale));
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunReaderGetScenario(CFRunReader r, PetscInt *n, const CFConfigEntry **entries)
{
  PetscFunctionBeginUser;
  *n       = r->nentries;
  *entries = r->entries;
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunReaderInsertScenario(CFRunReader r, PetscOptions options)
{
  PetscFunctionBeginUser;
  for (PetscInt i = 0; i < r->nentries; i++) PetscCall(PetscOptionsSetValue(options, r->entries[i].option, r->entries[i].value));
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunReaderHasAttribute(CFRunReader r, const char name[], PetscBool *has)
{
  hid_t h5;

  PetscFunctionBeginUser;
  PetscCall(PetscViewerHDF5GetFileId(r->viewer, &h5));
  *has = (PetscBool)(H5Aexists(h5, name) > 0);
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunReaderGetAttributeReal(CFRunReader r, const char name[], PetscReal *value)
{
  hid_t h5;

  PetscFunctionBeginUser;
  PetscCall(PetscViewerHDF5GetFileId(r->viewer, &h5));
  PetscCheck(!CFH5ReadRealAttribute(h5, name, value), r->comm, PETSC_ERR_FILE_UNEXPECTED, "run file '%s' has no numeric root attribute '%s'", r->path, name);
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunReaderGetAttributeInt(CFRunReader r, const char name[], PetscInt *value)
{
  PetscReal v;

  PetscFunctionBeginUser;
  PetscCall(CFRunReaderGetAttributeReal(r, name, &v));
  PetscCheck(v == PetscFloorReal(v) && PetscAbsReal(v) < PETSC_MAX_INT, r->comm, PETSC_ERR_FILE_UNEXPECTED, "run file '%s': root attribute '%s' = %g is not an integer", r->path, name, (double)v);
  *value = (PetscInt)v;
  PetscFunctionReturn(0);
}

PetscErrorCode CFRunReaderGetAttributeString(CFRunReader r, const char name[], char value[], size_t len)
{
  hid_t h5;

  PetscFunctionBeginUser;
  PetscCall(PetscViewerHDF5GetFileId(r->viewer, &h5));
  PetscCheck(!CFH5ReadStringAttribute(h5, name, value, len), r->comm, PETSC_ERR_FILE_UNEXPECTED, "run file '%s' has no text root attribute '%s'", r->path, name);
  PetscFunctionReturn(0);
}
