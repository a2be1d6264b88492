/* The XDMF 3 sidecar: a light XML description of the run file's grid and fields so that
   ParaView and VisIt open the HDF5 file directly.  The grid is a 2-D rectilinear mesh through
   the cell centres (2DRectMesh, geometry VXVY from the x and z datasets), so fields are
   node-centred on it.  The HDF5 file is named by its base name: the pair can be moved together. */
#include <errno.h>
#include <stdio.h>
#include <string.h>
#include "output_impl.h"

/* The base name with XML's special characters escaped. */
static void XmlEscape(const char *in, char *out, size_t len)
{
  size_t k = 0;
  for (; *in && k + 7 < len; in++) {
    const char *rep = NULL;
    switch (*in) {
    case '&': rep = "&amp;"; break;
    case '<': rep = "&lt;"; break;
    case '>': rep = "&gt;"; break;
    case '"': rep = "&quot;"; break;
    case '\'': rep = "&apos;"; break;
    }
    if (rep) {
      memcpy(out + k, rep, strlen(rep));
      k += strlen(rep);
    } else out[k++] = *in;
  }
  out[k] = 0;
}

static void DataItem(FILE *fp, const char *indent, const char *h5, const char *dataset, PetscInt n1, PetscInt n2)
{
  char dims[64];
  if (n2 > 0) snprintf(dims, sizeof(dims), "%d %d", (int)n1, (int)n2);
  else snprintf(dims, sizeof(dims), "%d", (int)n1);
  fprintf(fp, "%s<DataItem Dimensions=\"%s\" NumberType=\"Float\" Precision=\"8\" Format=\"HDF\">%s:/%s</DataItem>\n", indent, dims, h5, dataset);
}

int CFXdmfWrite_Private(const struct _n_CFRunFile *f, char msg[], size_t len)
{
  const char *base = strrchr(f->path, '/');
  char        h5[3 * PETSC_MAX_PATH_LEN];
  FILE       *fp;
  int         bad;

  XmlEscape(base ? base + 1 : f->path, h5, sizeof(h5));
  if (!(fp = fopen(f->xdmf_tmp_path, "w"))) {
    snprintf(msg, len, "run file '%s': cannot write the XDMF sidecar '%s': %s", f->path, f->xdmf_tmp_path, strerror(errno));
    return -1;
  }
  fprintf(fp, "<?xml version=\"1.0\" ?>\n"
              "<!-- crustforge run %s: x and z (depth, positive down) in km at the cell centres;\n"
              "     units and long names of the fields are attributes of the datasets in the HDF5 file. -->\n"
              "<Xdmf Version=\"3.0\">\n  <Domain>\n    <Grid Name=\"crustforge\" GridType=\"Uniform\">\n",
          h5);
  fprintf(fp, "      <Topology TopologyType=\"2DRectMesh\" Dimensions=\"%d %d\"/>\n      <Geometry GeometryType=\"VXVY\">\n", (int)f->nz, (int)f->nx);
  DataItem(fp, "        ", h5, "x", f->nx, 0);
  DataItem(fp, "        ", h5, "z", f->nz, 0);
  fprintf(fp, "      </Geometry>\n");
  for (PetscInt i = 0; i < f->nfields; i++) {
    fprintf(fp, "      <Attribute Name=\"%s\" AttributeType=\"Scalar\" Center=\"Node\">\n", f->fields[i].name);
    DataItem(fp, "        ", h5, f->fields[i].name, f->nz, f->nx);
    fprintf(fp, "      </Attribute>\n");
  }
  fprintf(fp, "    </Grid>\n  </Domain>\n</Xdmf>\n");
  bad = ferror(fp);
  if (fclose(fp) || bad) {
    snprintf(msg, len, "run file '%s': writing the XDMF sidecar '%s' failed: %s", f->path, f->xdmf_tmp_path, strerror(errno));
    return -1;
  }
  return 0;
}
