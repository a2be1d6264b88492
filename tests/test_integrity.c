/* Check suite for the integrity header of run files and checkpoints (src/output/integrity.c):
   the CRC-32 against its published check value and an independent implementation (zlib), and
   sealed files that are read, or refused with the cause named, after every kind of damage:
   a flipped byte anywhere, truncation, bytes appended, a damaged header, the wrong kind, a file
   never sealed, foreign HDF5, not HDF5.  Serial: the functions are rank-0 helpers. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include <zlib.h>
#include <hdf5.h>
#include <crustforge/integrity.h>
#include "cf_test.h"

static char dir[256]; /* this suite's scratch directory, not model state */

static void MakeDir(void)
{
  const char *base = getenv("TMPDIR");
  snprintf(dir, sizeof(dir), "%s/cf_test_integrity_XXXXXX", base && base[0] ? base : "/tmp");
  ck_assert_msg(mkdtemp(dir) != NULL, "cannot create a scratch directory");
}

static void PathOf(const char *name, char path[512]) { snprintf(path, 512, "%s/%s", dir, name); }

static void RemoveDir(void)
{
  static const char *names[] = {"a.h5", "b.h5", "c.h5"};
  char               path[512];
  for (size_t i = 0; i < sizeof(names) / sizeof(names[0]); i++) {
    PathOf(names[i], path);
    (void)unlink(path);
  }
  (void)rmdir(dir);
}

/* An HDF5 file at path with one dataset of n doubles, created by CFIntegrityCreateFile when
   userblock, else by plain H5Fcreate; sealed as kind when seal is non-zero. */
static void MakeFile(const char *path, size_t n, int userblock, CFFileKind seal)
{
  char    msg[1024];
  double *v = (double *)malloc(n * sizeof(double));
  hsize_t dims[1] = {n};
  hid_t   f, s, d;

  ck_assert_ptr_nonnull(v);
  for (size_t k = 0; k < n; k++) v[k] = 1.0 / (double)(k + 1);
  if (userblock) {
    ck_assert_msg(!CFIntegrityCreateFile(path, msg, sizeof(msg)), "%s", msg);
    f = H5Fopen(path, H5F_ACC_RDWR, H5P_DEFAULT);
  } else f = H5Fcreate(path, H5F_ACC_TRUNC, H5P_DEFAULT, H5P_DEFAULT);
  ck_assert_int_ge(f, 0);
  s = H5Screate_simple(1, dims, NULL);
  d = H5Dcreate2(f, "values", H5T_NATIVE_DOUBLE, s, H5P_DEFAULT, H5P_DEFAULT, H5P_DEFAULT);
  ck_assert_int_ge(H5Dwrite(d, H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, v), 0);
  H5Dclose(d);
  H5Sclose(s);
  ck_assert_int_ge(H5Fclose(f), 0);
  free(v);
  if (seal) ck_assert_msg(!CFIntegritySeal(path, seal, msg, sizeof(msg)), "%s", msg);
}

static long Size(const char *path)
{
  struct stat st;
  return stat(path, &st) ? -1 : (long)st.st_size;
}

/* Copy src to dst, keeping the first keep bytes (all when keep < 0), then appending extra. */
static void Copy(const char *src, const char *dst, long keep, const char *extra)
{
  FILE *in = fopen(src, "rb"), *out = fopen(dst, "wb");
  int   c;
  ck_assert(in && out);
  for (long k = 0; (keep < 0 || k < keep) && (c = fgetc(in)) != EOF; k++) fputc(c, out);
  if (extra) fputs(extra, out);
  fclose(in);
  ck_assert_int_eq(fclose(out), 0);
}

static void Flip(const char *path, long offset)
{
  FILE *fp = fopen(path, "r+b");
  int   c;
  ck_assert_ptr_nonnull(fp);
  ck_assert_int_eq(fseek(fp, offset, SEEK_SET), 0);
  c = fgetc(fp);
  ck_assert_int_ne(c, EOF);
  ck_assert_int_eq(fseek(fp, offset, SEEK_SET), 0);
  fputc(c ^ 0xff, fp);
  ck_assert_int_eq(fclose(fp), 0);
}

/* Verify path as kind: expect error class code (0: accepted) and, when refused, a one-line
   message naming the file and containing cause. */
static void Expect(const char *path, CFFileKind kind, int code, const char *cause)
{
  char msg[1024];
  int  got = CFIntegrityVerify(path, kind, msg, sizeof(msg));
  ck_assert_msg(got == code, "%s: code %d, expected %d (%s)", path, got, code, msg);
  if (code) ck_assert_msg(strstr(msg, path) && strstr(msg, cause) && !strchr(msg, '\n'), "%s: message '%s' does not name the file and '%s' on one line", path, msg, cause);
}

/* The check value of the CRC catalogue: CRC-32 of the nine ASCII digits "123456789" is
   0xCBF43926 (R. N. Williams 1993, "A painless guide to CRC error detection algorithms", the
   "CRC-32" model; G. Cook, "Catalogue of parametrised CRC algorithms", CRC-32/ISO-HDLC).  The CRC of no bytes is 0 (derived: initial value XOR final value). */
START_TEST(crc32_check_value)
{
  CFCrc32 c;
  CFCrc32Begin(&c);
  CFCrc32Update(&c, "123456789", 9);
  ck_assert_uint_eq(CFCrc32End(&c), 0xCBF43926u);
  CFCrc32Begin(&c);
  ck_assert_uint_eq(CFCrc32End(&c), 0u);
}
END_TEST

/* The same CRC as zlib's crc32() (the CRC-32 of RFC 1952, section 8), an independent
   implementation, on 1 MB of pseudo-random bytes fed in uneven pieces: every table entry is
   used and streaming equals one pass. */
START_TEST(crc32_matches_zlib)
{
  size_t         n   = 1 << 20;
  unsigned char *buf = (unsigned char *)malloc(n);
  unsigned int   x   = 12345u;
  CFCrc32        c;

  ck_assert_ptr_nonnull(buf);
  for (size_t k = 0; k < n; k++) {
    x      = x * 1103515245u + 12345u; /* ANSI C rand() recurrence: any bytes will do */
    buf[k] = (unsigned char)(x >> 16);
  }
  CFCrc32Begin(&c);
  for (size_t k = 0, step = 1; k < n; k += step, step = step * 3 % 70001 + 1) CFCrc32Update(&c, buf + k, k + step <= n ? step : n - k);
  ck_assert_uint_eq(CFCrc32End(&c), (uint32_t)crc32(crc32(0L, Z_NULL, 0), buf, (uInt)n));
  free(buf);
}
END_TEST

/* A sealed file passes, also when the data (300 KB) is longer than the checksum's buffer, and
   standard HDF5 still opens it; the same file flipped, truncated, appended to, or asked for as
   the other kind is refused with the cause (crustforge/integrity.h; expected causes: the
   header's own definition, derived). */
START_TEST(sealed_and_damaged)
{
  char a[512], b[512];
  long size;
  hid_t f;

  MakeDir();
  PathOf("a.h5", a);
  PathOf("b.h5", b);
  MakeFile(a, 300 * 1024 / 8, 1, CF_FILE_RUN);
  size = Size(a);
  Expect(a, CF_FILE_RUN, 0, NULL);
  f = H5Fopen(a, H5F_ACC_RDONLY, H5P_DEFAULT);
  ck_assert_int_ge(f, 0);
  ck_assert_int_gt(H5Lexists(f, "values", H5P_DEFAULT), 0);
  H5Fclose(f);
  Expect(a, CF_FILE_CHECKPOINT, PETSC_ERR_FILE_UNEXPECTED, "is not a crustforge checkpoint (it is a crustforge run file)");

  Copy(a, b, -1, NULL);
  Flip(b, size - 1000);
  Expect(b, CF_FILE_RUN, PETSC_ERR_FILE_UNEXPECTED, "is damaged: checksum mismatch");
  Copy(a, b, -1, NULL);
  Flip(b, 40); /* reserved header bytes are covered by the header's own CRC */
  Expect(b, CF_FILE_RUN, PETSC_ERR_FILE_UNEXPECTED, "is damaged: header checksum mismatch");
  Copy(a, b, size - 1, NULL);
  {
    char cause[128];
    snprintf(cause, sizeof(cause), "is truncated: %ld bytes, header says %ld", size - 1, size);
    Expect(b, CF_FILE_RUN, PETSC_ERR_FILE_UNEXPECTED, cause);
  }
  Copy(a, b, 300, NULL);
  Expect(b, CF_FILE_RUN, PETSC_ERR_FILE_UNEXPECTED, "is truncated: 300 bytes, shorter than its 512-byte header");
  Copy(a, b, -1, "x");
  Expect(b, CF_FILE_RUN, PETSC_ERR_FILE_UNEXPECTED, "is damaged:");
  RemoveDir();
}
END_TEST

/* Every single byte of a small sealed file, flipped in turn, is refused: a CRC of degree 32
   detects every burst of up to 32 bits (W. W. Peterson and D. T. Brown 1961, "Cyclic codes for
   error detection", Proc. IRE 49, 228), and the header has its own CRC. */
START_TEST(every_byte_flipped)
{
  char a[512], b[512], msg[1024];
  long size, refused = 0;

  MakeDir();
  PathOf("a.h5", a);
  PathOf("b.h5", b);
  MakeFile(a, 16, 1, CF_FILE_CHECKPOINT);
  size = Size(a);
  ck_assert_int_gt(size, 512);
  Copy(a, b, -1, NULL);
  for (long k = 0; k < size; k++) {
    Flip(b, k);
    refused += CFIntegrityVerify(b, CF_FILE_CHECKPOINT, msg, sizeof(msg)) == PETSC_ERR_FILE_UNEXPECTED;
    Flip(b, k); /* back */
  }
  ck_assert_int_eq(refused, size);
  Expect(b, CF_FILE_CHECKPOINT, 0, NULL);
  RemoveDir();
}
END_TEST

/* Files that were never sealed by crustforge: created but not sealed (a killed run), foreign
   HDF5, HDF5 1.10's own crash case kept from fuzzing (its bytes must never reach HDF5), text,
   empty, missing; and sealing a file without a user block is refused. */
START_TEST(not_ours)
{
  char a[512], b[512], c[512], msg[1024];

  MakeDir();
  PathOf("a.h5", a);
  PathOf("b.h5", b);
  PathOf("c.h5", c);
  MakeFile(a, 16, 1, 0);
  Expect(a, CF_FILE_RUN, PETSC_ERR_FILE_UNEXPECTED, "is incomplete (the run that wrote it did not finish)");
  MakeFile(b, 16, 0, 0);
  Expect(b, CF_FILE_RUN, PETSC_ERR_FILE_UNEXPECTED, "is not a crustforge run file (HDF5 without a crustforge header)");
  ck_assert_int_eq(CFIntegritySeal(b, CF_FILE_RUN, msg, sizeof(msg)), PETSC_ERR_FILE_WRITE);
  ck_assert_msg(strstr(msg, "has no 512-byte HDF5 user block"), "%s", msg);
  Expect(CF_KNOWN_CRASH_FILE, CF_FILE_RUN, PETSC_ERR_FILE_UNEXPECTED, "HDF5 without a crustforge header");
  Copy(a, c, 0, "temperature,depth\n1350,10\n");
  Expect(c, CF_FILE_RUN, PETSC_ERR_FILE_UNEXPECTED, "is not a crustforge run file (not an HDF5 file)");
  Copy(a, c, 0, NULL);
  Expect(c, CF_FILE_CHECKPOINT, PETSC_ERR_FILE_UNEXPECTED, "is not a crustforge checkpoint (not an HDF5 file)");
  (void)unlink(c);
  Expect(c, CF_FILE_RUN, PETSC_ERR_FILE_OPEN, "cannot be read: No such file");
  Expect(dir, CF_FILE_RUN, PETSC_ERR_FILE_OPEN, "is a directory");
  RemoveDir();
}
END_TEST

static Suite *IntegritySuite(void)
{
  Suite *s = suite_create("integrity");
  cf_add_case(s, "crc32_check_value", crc32_check_value);
  cf_add_case(s, "crc32_matches_zlib", crc32_matches_zlib);
  cf_add_case(s, "sealed_and_damaged", sealed_and_damaged);
  cf_add_case(s, "every_byte_flipped", every_byte_flipped);
  cf_add_case(s, "not_ours", not_ours);
  return s;
}

CF_TEST_MAIN(IntegritySuite)
