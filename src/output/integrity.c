/* The integrity header in the HDF5 user block of run files and checkpoints (crustforge/
   integrity.h).  Readers check it with plain reads before HDF5 parses a byte, because HDF5 1.10
   crashes on some damaged files instead of failing.  The checksum is CRC-32 (reflected
   polynomial 0xEDB88320, initial value and final XOR 0xFFFFFFFF: the CRC of ISO-HDLC, zip and
   PNG), the reflected table-driven form of R. N. Williams 1993, "A painless guide to CRC error
   detection algorithms"; its check value, the CRC of "123456789", is 0xCBF43926 (Williams 1993,
   the "CRC-32" model; G. Cook, "Catalogue of parametrised CRC algorithms", CRC-32/ISO-HDLC).  It catches every burst of up to 32 damaged
   bits and all but 1 in 2^32 other damage; it is no defence against a forger.

   Header, 512 bytes, integers little-endian whatever the host:
     0   16  magic "\211crustforge\r\n\032\n\0" (PNG-style: the high-bit byte and the CR LF
             and ^Z catch 7-bit and text-mode transfers)
     16  4   header version, 1
     20  4   kind: 1 run file, 2 checkpoint
     24  8   length of the whole file in bytes, user block included
     32  4   user block size, 512
     36  4   CRC-32 of bytes [512, length): everything HDF5 wrote
     40  468 zero
     508 4   CRC-32 of bytes [0, 508) of the header itself */
#include <errno.h>
#include <fcntl.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include <hdf5.h>
#include <petscsys.h>
#include <crustforge/integrity.h>

#define HEADER_VERSION 1
#define OFF_VERSION    16
#define OFF_KIND       20
#define OFF_LENGTH     24
#define OFF_USERBLOCK  32
#define OFF_CRC        36
#define OFF_HEADER_CRC (CF_USERBLOCK_SIZE - 4)
#define CHUNK          65536 /* the checksum pass reads through this buffer, never the whole file */

static const unsigned char magic[16]         = "\211crustforge\r\n\032\n";
static const unsigned char hdf5_signature[8] = {0x89, 'H', 'D', 'F', '\r', '\n', 0x1a, '\n'}; /* HDF5 File Format Specification, superblock */

void CFCrc32Begin(CFCrc32 *c)
{
  for (uint32_t n = 0; n < 256; n++) {
    uint32_t r = n;
    for (int k = 0; k < 8; k++) r = (r >> 1) ^ (0xEDB88320u & (0u - (r & 1u)));
    c->table[0][n] = r;
  }
  for (int k = 1; k < 8; k++)
    for (uint32_t n = 0; n < 256; n++) c->table[k][n] = (c->table[k - 1][n] >> 8) ^ c->table[0][c->table[k - 1][n] & 0xFFu];
  c->crc = 0xFFFFFFFFu;
}

static inline uint32_t Load32(const unsigned char *p) { return (uint32_t)p[0] | (uint32_t)p[1] << 8 | (uint32_t)p[2] << 16 | (uint32_t)p[3] << 24; }

/* Eight bytes per step by "slicing-by-8" (M. E. Kounavis and F. L. Berry 2005, "A systematic
   approach to building high performance software-based CRC generators", IEEE ISCC): the same
   CRC as the byte-wise loop, several times faster on the sealing pass over a large run file. */
void CFCrc32Update(CFCrc32 *c, const void *data, size_t n)
{
  const unsigned char *p   = (const unsigned char *)data;
  uint32_t             crc = c->crc;
  const uint32_t(*t)[256]  = c->table;

  for (; n >= 8; n -= 8, p += 8) {
    const uint32_t lo = crc ^ Load32(p), hi = Load32(p + 4);
    crc = t[7][lo & 0xFFu] ^ t[6][(lo >> 8) & 0xFFu] ^ t[5][(lo >> 16) & 0xFFu] ^ t[4][lo >> 24] ^ t[3][hi & 0xFFu] ^ t[2][(hi >> 8) & 0xFFu] ^ t[1][(hi >> 16) & 0xFFu] ^ t[0][hi >> 24];
  }
  for (; n; n--, p++) crc = t[0][(crc ^ *p) & 0xFFu] ^ (crc >> 8);
  c->crc = crc;
}

uint32_t CFCrc32End(const CFCrc32 *c) { return c->crc ^ 0xFFFFFFFFu; }

static void Put32(unsigned char *p, uint32_t v)
{
  for (int k = 0; k < 4; k++) p[k] = (unsigned char)(v >> (8 * k));
}
static void Put64(unsigned char *p, uint64_t v)
{
  for (int k = 0; k < 8; k++) p[k] = (unsigned char)(v >> (8 * k));
}
static uint32_t Get32(const unsigned char *p)
{
  uint32_t v = 0;
  for (int k = 3; k >= 0; k--) v = (v << 8) | p[k];
  return v;
}
static uint64_t Get64(const unsigned char *p)
{
  uint64_t v = 0;
  for (int k = 7; k >= 0; k--) v = (v << 8) | p[k];
  return v;
}

static const char *Label(CFFileKind kind) { return kind == CF_FILE_CHECKPOINT ? "checkpoint" : "run file"; }
static const char *Noun(uint32_t kind) { return kind == CF_FILE_CHECKPOINT ? "crustforge checkpoint" : kind == CF_FILE_RUN ? "crustforge run file" : "crustforge file of an unknown kind"; }

/* msg = "<label> '<path>' <cause>"; returns code. */
static int Fail(int code, char msg[], size_t len, CFFileKind kind, const char path[], const char *fmt, ...)
{
  va_list ap;
  int     n = snprintf(msg, len, "%s '%s' ", Label(kind), path);
  if (n >= 0 && (size_t)n < len) {
    va_start(ap, fmt);
    vsnprintf(msg + n, len - (size_t)n, fmt, ap);
    va_end(ap);
  }
  return code;
}

/* Up to n bytes at offset; the count read (short only at end of file), or -1. */
static ssize_t ReadAt(int fd, void *buf, size_t n, off_t offset)
{
  size_t got = 0;
  while (got < n) {
    ssize_t r = pread(fd, (char *)buf + got, n - got, offset + (off_t)got);
    if (r < 0 && errno == EINTR) continue;
    if (r < 0) return -1;
    if (!r) break;
    got += (size_t)r;
  }
  return (ssize_t)got;
}

/* CRC-32 of bytes [from, to) of fd; 0, or -1 on a read error or early end of file. */
static int CrcOfRange(int fd, uint64_t from, uint64_t to, uint32_t *crc)
{
  unsigned char buf[CHUNK];
  CFCrc32       c;

  CFCrc32Begin(&c);
  while (from < to) {
    size_t  want = to - from < CHUNK ? (size_t)(to - from) : CHUNK;
    ssize_t got  = ReadAt(fd, buf, want, (off_t)from);
    if (got <= 0) {
      if (!got) errno = EIO;
      return -1;
    }
    CFCrc32Update(&c, buf, (size_t)got);
    from += (uint64_t)got;
  }
  *crc = CFCrc32End(&c);
  return 0;
}

static uint32_t HeaderCrc(const unsigned char *ub)
{
  CFCrc32 c;
  CFCrc32Begin(&c);
  CFCrc32Update(&c, ub, OFF_HEADER_CRC);
  return CFCrc32End(&c);
}

static int HasSignature(int fd, off_t offset)
{
  unsigned char sig[8];
  return ReadAt(fd, sig, sizeof(sig), offset) == (ssize_t)sizeof(sig) && !memcmp(sig, hdf5_signature, sizeof(sig));
}

int CFIntegrityCreateFile(const char path[], char msg[], size_t len)
{
  H5E_auto2_t func = NULL;
  void       *data = NULL;
  hid_t       fcpl, f = -1;
  int         ok;

  msg[0] = 0;
  (void)H5Eget_auto2(H5E_DEFAULT, &func, &data);
  (void)H5Eset_auto2(H5E_DEFAULT, NULL, NULL);
  fcpl = H5Pcreate(H5P_FILE_CREATE);
  ok   = fcpl >= 0 && H5Pset_userblock(fcpl, CF_USERBLOCK_SIZE) >= 0 && (f = H5Fcreate(path, H5F_ACC_TRUNC, fcpl, H5P_DEFAULT)) >= 0;
  if (f >= 0 && H5Fclose(f) < 0) ok = 0;
  if (fcpl >= 0) (void)H5Pclose(fcpl);
  (void)H5Eset_auto2(H5E_DEFAULT, func, data);
  if (!ok) return snprintf(msg, len, "HDF5 cannot create '%s'", path), PETSC_ERR_FILE_OPEN;
  return 0;
}

int CFIntegritySeal(const char path[], CFFileKind kind, char msg[], size_t len)
{
  unsigned char ub[CF_USERBLOCK_SIZE];
  struct stat   st;
  uint32_t      crc;
  int           fd, code = 0;

  msg[0] = 0;
  if ((fd = open(path, O_RDWR)) < 0) return Fail(PETSC_ERR_FILE_WRITE, msg, len, kind, path, "cannot be opened to seal it: %s", strerror(errno));
  if (fstat(fd, &st)) code = Fail(PETSC_ERR_FILE_WRITE, msg, len, kind, path, "cannot be sealed: %s", strerror(errno));
  else if (!HasSignature(fd, CF_USERBLOCK_SIZE)) code = Fail(PETSC_ERR_FILE_WRITE, msg, len, kind, path, "has no %d-byte HDF5 user block to seal", CF_USERBLOCK_SIZE);
  else if (CrcOfRange(fd, CF_USERBLOCK_SIZE, (uint64_t)st.st_size, &crc)) code = Fail(PETSC_ERR_FILE_WRITE, msg, len, kind, path, "cannot be read back to seal it: %s", strerror(errno));
  else {
    ssize_t put;
    memset(ub, 0, sizeof(ub));
    memcpy(ub, magic, sizeof(magic));
    Put32(ub + OFF_VERSION, HEADER_VERSION);
    Put32(ub + OFF_KIND, (uint32_t)kind);
    Put64(ub + OFF_LENGTH, (uint64_t)st.st_size);
    Put32(ub + OFF_USERBLOCK, CF_USERBLOCK_SIZE);
    Put32(ub + OFF_CRC, crc);
    Put32(ub + OFF_HEADER_CRC, HeaderCrc(ub));
    do put = pwrite(fd, ub, sizeof(ub), 0);
    while (put < 0 && errno == EINTR);
    if (put != (ssize_t)sizeof(ub)) code = Fail(PETSC_ERR_FILE_WRITE, msg, len, kind, path, "cannot write its integrity header: %s", put < 0 ? strerror(errno) : "short write");
  }
  if (close(fd) && !code) code = Fail(PETSC_ERR_FILE_WRITE, msg, len, kind, path, "cannot write its integrity header: %s", strerror(errno));
  return code;
}

/* Why a file without our magic is refused. */
static int NoHeader(int fd, const unsigned char *ub, ssize_t got, CFFileKind kind, const char path[], char msg[], size_t len)
{
  int zeros = got == CF_USERBLOCK_SIZE;
  for (ssize_t k = 0; zeros && k < got; k++) zeros = !ub[k];
  /* the writer seals the user block only after a successful close */
  if (zeros && HasSignature(fd, CF_USERBLOCK_SIZE)) return Fail(PETSC_ERR_FILE_UNEXPECTED, msg, len, kind, path, "is incomplete (the run that wrote it did not finish)");
  if (HasSignature(fd, 0) || HasSignature(fd, CF_USERBLOCK_SIZE)) return Fail(PETSC_ERR_FILE_UNEXPECTED, msg, len, kind, path, "is not a %s (HDF5 without a crustforge header)", Noun(kind));
  return Fail(PETSC_ERR_FILE_UNEXPECTED, msg, len, kind, path, "is not a %s (not an HDF5 file)", Noun(kind));
}

static int VerifyOpen(int fd, CFFileKind kind, const char path[], char msg[], size_t len)
{
  unsigned char ub[CF_USERBLOCK_SIZE];
  struct stat   st;
  ssize_t       got;
  uint64_t      size, length;
  uint32_t      version, crc, want;

  if (fstat(fd, &st)) return Fail(PETSC_ERR_FILE_READ, msg, len, kind, path, "cannot be read: %s", strerror(errno));
  if (S_ISDIR(st.st_mode)) return Fail(PETSC_ERR_FILE_OPEN, msg, len, kind, path, "is a directory");
  if (!S_ISREG(st.st_mode)) return Fail(PETSC_ERR_FILE_OPEN, msg, len, kind, path, "is not a regular file");
  size = (uint64_t)st.st_size;
  if ((got = ReadAt(fd, ub, sizeof(ub), 0)) < 0) return Fail(PETSC_ERR_FILE_READ, msg, len, kind, path, "cannot be read: %s", strerror(errno));
  if (got < (ssize_t)sizeof(magic) || memcmp(ub, magic, sizeof(magic))) return NoHeader(fd, ub, got, kind, path, msg, len);
  if (got < CF_USERBLOCK_SIZE) return Fail(PETSC_ERR_FILE_UNEXPECTED, msg, len, kind, path, "is truncated: %llu bytes, shorter than its %d-byte header", (unsigned long long)size, CF_USERBLOCK_SIZE);
  if (Get32(ub + OFF_HEADER_CRC) != HeaderCrc(ub)) return Fail(PETSC_ERR_FILE_UNEXPECTED, msg, len, kind, path, "is damaged: header checksum mismatch");
  version = Get32(ub + OFF_VERSION);
  if (version != HEADER_VERSION || Get32(ub + OFF_USERBLOCK) != CF_USERBLOCK_SIZE)
    return Fail(PETSC_ERR_FILE_UNEXPECTED, msg, len, kind, path, "has integrity header version %u, which this program does not read (it reads %d)", (unsigned)version, HEADER_VERSION);
  if (Get32(ub + OFF_KIND) != (uint32_t)kind) return Fail(PETSC_ERR_FILE_UNEXPECTED, msg, len, kind, path, "is not a %s (it is a %s)", Noun(kind), Noun(Get32(ub + OFF_KIND)));
  length = Get64(ub + OFF_LENGTH);
  if (size < length) return Fail(PETSC_ERR_FILE_UNEXPECTED, msg, len, kind, path, "is truncated: %llu bytes, header says %llu", (unsigned long long)size, (unsigned long long)length);
  if (size > length) return Fail(PETSC_ERR_FILE_UNEXPECTED, msg, len, kind, path, "is damaged: %llu bytes, header says %llu", (unsigned long long)size, (unsigned long long)length);
  if (CrcOfRange(fd, CF_USERBLOCK_SIZE, length, &crc)) return Fail(PETSC_ERR_FILE_READ, msg, len, kind, path, "cannot be read: %s", strerror(errno));
  want = Get32(ub + OFF_CRC);
  if (crc != want) return Fail(PETSC_ERR_FILE_UNEXPECTED, msg, len, kind, path, "is damaged: checksum mismatch (CRC-32 %08x, header says %08x)", (unsigned)crc, (unsigned)want);
  return 0;
}

int CFIntegrityVerify(const char path[], CFFileKind kind, char msg[], size_t len)
{
  int fd, code;

  msg[0] = 0;
  /* non-blocking: a FIFO under the name must be refused, not waited on */
  if ((fd = open(path, O_RDONLY | O_NONBLOCK)) < 0) return Fail(PETSC_ERR_FILE_OPEN, msg, len, kind, path, "cannot be read: %s", strerror(errno));
  code = VerifyOpen(fd, kind, path, msg, len);
  (void)close(fd);
  return code;
}

int CFFileSync(const char path[])
{
  int fd = open(path, O_RDONLY), rc;
  if (fd < 0) return -1;
  rc = fsync(fd);
  return close(fd) || rc ? -1 : 0;
}
