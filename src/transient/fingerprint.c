/* The fingerprint of a run's physics: a hash of every key that sets what the run computes, so that
   a resumed run can prove it continues the same problem. */
#include <string.h>
#include "transient_impl.h"

/* Keys a resumed run may change: when it ends, how often it writes, where, and how the
   post-processor reads the result. */
static const char *const free_prefixes[] = {"time.end", "time.max_steps", "checkpoint.", "snapshots.", "output.", "extraction.", "observables.", "pt_paths."};

PetscBool CFConfigKeyMayChange(const char key[])
{
  for (size_t p = 0; p < sizeof(free_prefixes) / sizeof(free_prefixes[0]); p++)
    if (!strncmp(key, free_prefixes[p], strlen(free_prefixes[p]))) return PETSC_TRUE;
  return PETSC_FALSE;
}

/* FNV-1a, 64 bits (Fowler, Noll & Vo; a public-domain hash, not cryptographic). */
static void Hash(unsigned long long *h, const char *text)
{
  for (const unsigned char *c = (const unsigned char *)text; *c; c++) {
    *h ^= *c;
    *h *= 1099511628211ULL;
  }
}

PetscErrorCode CFConfigFingerprint(const CFConfig *cfg, char fp[17])
{
  PetscInt            n;
  CFConfigEntry      *e;
  unsigned long long  h = 14695981039346656037ULL;

  PetscFunctionBeginUser;
  PetscCall(CFConfigGetEntries(cfg, &n, &e));
  for (PetscInt k = 0; k < n; k++) {
    if (CFConfigKeyMayChange(e[k].key)) continue;
    Hash(&h, e[k].key);
    Hash(&h, "=");
    Hash(&h, e[k].value);
    Hash(&h, "\n");
  }
  PetscCall(PetscFree(e));
  snprintf(fp, 17, "%016llx", h);
  PetscFunctionReturn(0);
}
