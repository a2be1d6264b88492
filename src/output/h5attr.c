/* Raw HDF5 attribute reading for the run-file reader.  PETSc's viewer aborts on a missing or
   odd attribute and lets HDF5 print its error stack; a reader of files from elsewhere must
   instead be able to ask, and say what it found. */
#include <stdio.h>
#include <stdlib.h>
#include "output_impl.h"

void CFH5QuietBegin(CFH5Quiet *q)
{
  q->func = NULL;
  q->data = NULL;
  (void)H5Eget_auto2(H5E_DEFAULT, &q->func, &q->data);
  (void)H5Eset_auto2(H5E_DEFAULT, NULL, NULL);
}

void CFH5QuietEnd(const CFH5Quiet *q) { (void)H5Eset_auto2(H5E_DEFAULT, q->func, q->data); }

/* Open a scalar (one-element) attribute, or return a negative id. */
static hid_t OpenScalar(hid_t obj, const char name[])
{
  hid_t    a, s;
  hssize_t npoints;

  if (H5Aexists(obj, name) <= 0) return -1;
  if ((a = H5Aopen(obj, name, H5P_DEFAULT)) < 0) return -1;
  s       = H5Aget_space(a);
  npoints = s < 0 ? -1 : H5Sget_simple_extent_npoints(s);
  if (s >= 0) H5Sclose(s);
  if (npoints != 1) {
    H5Aclose(a);
    return -1;
  }
  return a;
}

static H5T_class_t AttributeClass(hid_t obj, const char name[])
{
  hid_t       a = OpenScalar(obj, name), t;
  H5T_class_t c = H5T_NO_CLASS;

  if (a < 0) return H5T_NO_CLASS;
  if ((t = H5Aget_type(a)) >= 0) {
    c = H5Tget_class(t);
    H5Tclose(t);
  }
  H5Aclose(a);
  return c;
}

static int ReadString(hid_t obj, const char name[], char value[], size_t len)
{
  hid_t a = OpenScalar(obj, name), t = -1, mt = -1;
  int   rc = -1;

  if (a < 0) return -1;
  if ((t = H5Aget_type(a)) < 0 || H5Tget_class(t) != H5T_STRING || (mt = H5Tcopy(H5T_C_S1)) < 0) goto done;
  if (H5Tset_cset(mt, H5Tget_cset(t)) < 0) goto done; /* HDF5 does not convert ASCII <-> UTF-8 */
  if (H5Tis_variable_str(t) > 0) { /* as h5py and netCDF-4 write them */
    char *s = NULL;
    if (H5Tset_size(mt, H5T_VARIABLE) >= 0 && H5Aread(a, mt, &s) >= 0 && s) {
      snprintf(value, len, "%s", s);
      rc = 0;
    }
    if (s) H5free_memory(s);
  } else { /* fixed length, as PETSc writes them: read with room for a terminating NUL */
    size_t n = H5Tget_size(t);
    char  *s = n ? calloc(n + 1, 1) : NULL;
    if (s && H5Tset_size(mt, n + 1) >= 0 && H5Tset_strpad(mt, H5T_STR_NULLTERM) >= 0 && H5Aread(a, mt, s) >= 0) {
      snprintf(value, len, "%s", s);
      rc = 0;
    }
    free(s);
  }
done:
  if (mt >= 0) H5Tclose(mt);
  if (t >= 0) H5Tclose(t);
  H5Aclose(a);
  return rc;
}

static int ReadReal(hid_t obj, const char name[], PetscReal *value)
{
  hid_t       a = OpenScalar(obj, name), t;
  H5T_class_t c = H5T_NO_CLASS;
  double      d = 0;
  int         rc = -1;

  if (a < 0) return -1;
  if ((t = H5Aget_type(a)) >= 0) {
    c = H5Tget_class(t);
    H5Tclose(t);
  }
  if ((c == H5T_FLOAT || c == H5T_INTEGER) && H5Aread(a, H5T_NATIVE_DOUBLE, &d) >= 0) {
    *value = (PetscReal)d;
    rc     = 0;
  }
  H5Aclose(a);
  return rc;
}

/* The public helpers, each with the error stack silenced (a missing attribute is an answer). */
H5T_class_t CFH5AttributeClass(hid_t obj, const char name[])
{
  CFH5Quiet   q;
  H5T_class_t c;
  CFH5QuietBegin(&q);
  c = AttributeClass(obj, name);
  CFH5QuietEnd(&q);
  return c;
}

int CFH5ReadStringAttribute(hid_t obj, const char name[], char value[], size_t len)
{
  CFH5Quiet q;
  int       rc;
  CFH5QuietBegin(&q);
  rc = ReadString(obj, name, value, len);
  CFH5QuietEnd(&q);
  return rc;
}

int CFH5ReadRealAttribute(hid_t obj, const char name[], PetscReal *value)
{
  CFH5Quiet q;
  int       rc;
  CFH5QuietBegin(&q);
  rc = ReadReal(obj, name, value);
  CFH5QuietEnd(&q);
  return rc;
}
