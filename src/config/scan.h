/* Private to the config module: the structural pre-scan of a scenario file (scan.c). */
#ifndef CRUSTFORGE_CONFIG_SCAN_H
#define CRUSTFORGE_CONFIG_SCAN_H

#include <stddef.h>
#include <stdio.h>

/* Parse the YAML in fp with libyaml and check what PETSc's loader does not: no key twice in one
   map, keys shorter than 64 and values shorter than 4096 characters, no aliases, nesting at most
   8 deep, and syntax (with the line).  Returns 0, or -1 with a one-line cause in msg. */
int CFScenarioScanFile(FILE *fp, char msg[], size_t len);

#endif
