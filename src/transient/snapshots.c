/* Field output of a transient run: a run file of the current state (the same layout as a steady
   run's, so the post-processor and ParaView read it), used for the snapshots and the final state,
   and the XDMF temporal collection over the snapshots.  The melting_rate field is the advective
   part rho v.grad F_d; the crust record holds the full rate. */
#include <dirent.h>
#include <stdlib.h>
#include <string.h>
#include <crustforge/output.h>
#include <crustforge/rundata.h>
#include <crustforge/units.h>
#include "transient_impl.h"

PetscErrorCode CFTransientWriteRunFile(CFTransient tr, const char path[])
{
  CFSteady       s = tr->s;
  Vec            v[CF_NFIELDS];
  CFRunFile      file;
  PetscReal      t;
  PetscInt       step;
  PetscErrorCode ierr = 0;

  PetscFunctionBeginUser;
  PetscCall(CFTransientGetTime(tr, &t, &step, NULL));
  for (PetscInt f = 0; f < CF_NFIELDS; f++) {
    PetscCall(DMCreateGlobalVector(s->da1, &v[f]));
    PetscCall(PetscObjectSetName((PetscObject)v[f], CFRunFields[f].name));
  }
  PetscCall(CFSteadyGetFields(s, v[CF_FIELD_TEMPERATURE], v[CF_FIELD_DEPLETION], v[CF_FIELD_MELT_FRACTION_EQ], v[CF_FIELD_MELTING_RATE], v[CF_FIELD_CONDUCTIVITY]));
  PetscCall(CFSteadyGetPressure(s, v[CF_FIELD_PRESSURE]));
  PetscCall(CFFlowCellFields(s->flow, s->da1, s->rc.dx, s->rc.dz, v[CF_FIELD_VELOCITY_X], v[CF_FIELD_VELOCITY_UP], v[CF_FIELD_STREAM_FUNCTION]));
  PetscCall(CFRunFileCreate(tr->comm, &s->cfg, s->da1, path, &file));
  for (PetscInt f = 0; f < CF_NFIELDS && !ierr; f++) ierr = CFRunFileWriteField(file, &CFRunFields[f], v[f]);
  if (!ierr) ierr = CFRunFileSetAttributeReal(file, "time_myr", CFSToMyr(t));
  if (!ierr) ierr = CFRunFileSetAttributeInt(file, "time_step_number", step);
  if (!ierr && tr->rec.n) ierr = CFRunFileSetAttributeReal(file, "crustal_thickness_km", CFMToKm(tr->rec.melt[tr->rec.n - 1] / (tr->cfg.crust_density * tr->rec.U[tr->rec.n - 1])));
  if (ierr) {
    (void)CFRunFileClose(&file, PETSC_FALSE);
    PetscCall(ierr);
  }
  PetscCall(CFRunFileClose(&file, PETSC_TRUE));
  for (PetscInt f = 0; f < CF_NFIELDS; f++) PetscCall(VecDestroy(&v[f]));
  PetscFunctionReturn(0);
}

static int CompareNames(const void *a, const void *b) { return strcmp(*(char *const *)a, *(char *const *)b); }

/* series.xdmf in dir: one grid per snapshot_NNNNNNNN.h5 up to the current step, at the time the
   crust record gives for its step. */
PetscErrorCode CFTransientWriteSeries(CFTransient tr, const char dir[])
{
  PetscMPIInt rank;
  PetscInt    now;

  PetscFunctionBeginUser;
  PetscCallMPI(MPI_Comm_rank(tr->comm, &rank));
  PetscCall(CFTransientGetTime(tr, NULL, &now, NULL));
  if (rank) PetscFunctionReturn(0);
  {
    DIR           *d = opendir(dir);
    struct dirent *de;
    char         **names = NULL, path[PETSC_MAX_PATH_LEN], tmp[PETSC_MAX_PATH_LEN];
    size_t         n = 0, cap = 0;
    FILE          *fp;
    const PetscInt nx = tr->cfg.nx, nz = tr->cfg.nz;

    PetscCheck(d, PETSC_COMM_SELF, PETSC_ERR_FILE_OPEN, "cannot list snapshot directory '%s'", dir);
    while ((de = readdir(d))) {
      size_t l = strlen(de->d_name);
      if (strncmp(de->d_name, "snapshot_", 9) || l != 20 || strcmp(de->d_name + 17, ".h5")) continue;
      if (atol(de->d_name + 9) > now) continue; /* left by a run that went further */
      if (n == cap) names = (char **)realloc(names, (cap = cap ? 2 * cap : 16) * sizeof(*names));
      names[n++] = strdup(de->d_name);
    }
    closedir(d);
    if (n) qsort(names, n, sizeof(*names), CompareNames);
    PetscCall(PetscSNPrintf(path, sizeof(path), "%s/series.xdmf", dir));
    PetscCall(PetscSNPrintf(tmp, sizeof(tmp), "%s.tmp", path));
    fp = fopen(tmp, "w");
    PetscCheck(fp, PETSC_COMM_SELF, PETSC_ERR_FILE_OPEN, "cannot write '%s'", tmp);
    fprintf(fp, "<?xml version=\"1.0\" ?>\n<!-- crustforge transient run: snapshots in time (Myr); x and z in km -->\n"
                "<Xdmf Version=\"3.0\">\n  <Domain>\n    <Grid Name=\"series\" GridType=\"Collection\" CollectionType=\"Temporal\">\n");
    for (size_t k = 0; k < n; k++) {
      const PetscInt step = atol(names[k] + 9);
      const double   t    = step > 0 && step <= tr->rec.n ? (double)CFSToMyr(tr->rec.t[step - 1]) : 0.0;
      fprintf(fp, "      <Grid Name=\"step %d\" GridType=\"Uniform\">\n        <Time Value=\"%.10g\"/>\n", (int)step, t);
      fprintf(fp, "        <Topology TopologyType=\"2DRectMesh\" Dimensions=\"%d %d\"/>\n        <Geometry GeometryType=\"VXVY\">\n", (int)nz, (int)nx);
      fprintf(fp, "          <DataItem Dimensions=\"%d\" NumberType=\"Float\" Precision=\"8\" Format=\"HDF\">%s:/x</DataItem>\n", (int)nx, names[k]);
      fprintf(fp, "          <DataItem Dimensions=\"%d\" NumberType=\"Float\" Precision=\"8\" Format=\"HDF\">%s:/z</DataItem>\n        </Geometry>\n", (int)nz, names[k]);
      for (PetscInt f = 0; f < CF_NFIELDS; f++)
        fprintf(fp, "        <Attribute Name=\"%s\" AttributeType=\"Scalar\" Center=\"Node\">\n          <DataItem Dimensions=\"%d %d\" NumberType=\"Float\" Precision=\"8\" Format=\"HDF\">%s:/%s</DataItem>\n        </Attribute>\n", CFRunFields[f].name, (int)nz, (int)nx, names[k], CFRunFields[f].name);
      fprintf(fp, "      </Grid>\n");
      free(names[k]);
    }
    free(names);
    fprintf(fp, "    </Grid>\n  </Domain>\n</Xdmf>\n");
    PetscCheck(!ferror(fp) && !fclose(fp), PETSC_COMM_SELF, PETSC_ERR_FILE_WRITE, "writing '%s' failed", tmp);
    PetscCheck(!rename(tmp, path), PETSC_COMM_SELF, PETSC_ERR_FILE_WRITE, "cannot rename '%s'", tmp);
  }
  PetscFunctionReturn(0);
}
