/* The integrity gate of crustforge's own HDF5 files (run files and checkpoints).  HDF5 1.10
   cannot be made safe on arbitrary bytes (damaged attribute tables crash it), so every such file
   is created with a 512-byte HDF5 user block, and once it is closed a header of ours goes into
   that block: magic, version, kind, file length and a CRC-32 of everything after the block.
   Readers verify it before HDF5 sees the file.  Layout and reasons: DEVELOPERS.md.
   These functions make no PETSc or MPI calls: call them on one rank.  Each returns 0, or a PETSc
   error class (PETSC_ERR_FILE_OPEN, _READ, _WRITE, _UNEXPECTED) with a one-line message naming
   the file and the cause in msg. */
#ifndef CRUSTFORGE_INTEGRITY_H
#define CRUSTFORGE_INTEGRITY_H

#include <stddef.h>
#include <stdint.h>

#define CF_USERBLOCK_SIZE 512 /* HDF5 wants a power of two, at least 512 */

typedef enum {
  CF_FILE_RUN        = 1,
  CF_FILE_CHECKPOINT = 2
} CFFileKind;

/* CRC-32, streaming: Begin, Update over the bytes in order, End gives the value. */
typedef struct {
  uint32_t table[8][256]; /* table[0] byte-wise; table[k] for the byte k places back (slicing-by-8) */
  uint32_t crc;
} CFCrc32;
void     CFCrc32Begin(CFCrc32 *c);
void     CFCrc32Update(CFCrc32 *c, const void *data, size_t n);
uint32_t CFCrc32End(const CFCrc32 *c);

/* Create an empty HDF5 file at path with the user block (replacing any file there), for the
   writer to reopen and fill. */
int CFIntegrityCreateFile(const char path[], char msg[], size_t len);
/* Write the header into the user block of the closed file at path. */
int CFIntegritySeal(const char path[], CFFileKind kind, char msg[], size_t len);
/* Check the header, length and checksum of the file at path before anything else reads it. */
int CFIntegrityVerify(const char path[], CFFileKind kind, char msg[], size_t len);
/* fsync a file or directory by name, so that a rename publishes data already on disk (common
   practice for atomic replacement, no source).  0 on success, -1 with errno set. */
int CFFileSync(const char path[]);

#endif
