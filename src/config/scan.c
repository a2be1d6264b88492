/* A structural pre-scan of the scenario's YAML with libyaml, before PETSc's loader sees it.
   PETSc's loader keeps one of two duplicated keys without a word, expands aliases (an alias
   bomb takes exponential time), recurses without a depth limit and reports syntax errors without
   a line; this pass refuses all of these with one line naming the key or the place. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <yaml.h>
#include "scan.h"

#define SCAN_MAX_DEPTH 8    /* sections hold keys; lists and flow maps add a level or two */
#define SCAN_MAX_KEYS  256  /* per map: far more than a section has */
#define SCAN_KEY_LEN   64   /* as CF_NAME_LEN: longer is no key of ours */
#define SCAN_VALUE_LEN 4096 /* PETSC_MAX_PATH_LEN: the longest value the loader reads whole */

typedef struct {
  int    is_map, expect_key;
  int    nkeys;
  char   path[2 * SCAN_KEY_LEN + 2]; /* "section" of the map, for messages */
  char (*keys)[SCAN_KEY_LEN];
  size_t *lines;
  char   pending[SCAN_KEY_LEN]; /* the key whose value comes next */
} Frame;

typedef struct {
  Frame  frames[SCAN_MAX_DEPTH + 1];
  int    depth, ndocs;
  char  *msg;
  size_t len;
} Scan;

/* The dotted name of key under the innermost map: "grid.spacing". */
static void KeyName(const Scan *sc, const char *key, char *buf, size_t len)
{
  const Frame *top = &sc->frames[sc->depth - 1];
  if (top->path[0]) snprintf(buf, len, "%s.%s", top->path, key);
  else snprintf(buf, len, "%s", key);
}

static int Push(Scan *sc, int is_map, const yaml_mark_t *mark)
{
  Frame *f;
  if (sc->depth == SCAN_MAX_DEPTH) {
    snprintf(sc->msg, sc->len, "nested more than %d levels deep at line %zu", SCAN_MAX_DEPTH, mark->line + 1);
    return -1;
  }
  f = &sc->frames[sc->depth];
  memset(f, 0, sizeof(*f));
  f->is_map     = is_map;
  f->expect_key = is_map;
  if (sc->depth > 0) {
    const Frame *up = &sc->frames[sc->depth - 1];
    char         path[sizeof(f->path)];
    if (up->is_map) KeyName(sc, up->pending, path, sizeof(path));
    else memcpy(path, up->path, sizeof(path));
    memcpy(f->path, path, sizeof(path));
  }
  if (is_map) {
    f->keys  = calloc(SCAN_MAX_KEYS, sizeof(*f->keys));
    f->lines = calloc(SCAN_MAX_KEYS, sizeof(*f->lines));
    if (!f->keys || !f->lines) {
      free(f->keys);
      free(f->lines);
      snprintf(sc->msg, sc->len, "out of memory");
      return -1;
    }
  }
  sc->depth++;
  return 0;
}

static void Pop(Scan *sc)
{
  Frame *f = &sc->frames[--sc->depth];
  free(f->keys);
  free(f->lines);
  f->keys  = NULL;
  f->lines = NULL;
}

/* A complete value (scalar, alias, or closed list or map) was read in the innermost frame. */
static void ValueDone(Scan *sc)
{
  if (sc->depth > 0 && sc->frames[sc->depth - 1].is_map) sc->frames[sc->depth - 1].expect_key = 1;
}

static int Key(Scan *sc, const char *key, size_t n, const yaml_mark_t *mark)
{
  Frame *f = &sc->frames[sc->depth - 1];
  char   name[3 * SCAN_KEY_LEN];

  if (n >= SCAN_KEY_LEN || strlen(key) != n) {
    snprintf(sc->msg, sc->len, "line %zu: a key %zu characters long ('%.40s...'; keys are at most %d)", mark->line + 1, n, key, SCAN_KEY_LEN - 1);
    return -1;
  }
  for (int i = 0; i < f->nkeys; i++)
    if (!strcmp(f->keys[i], key)) {
      KeyName(sc, key, name, sizeof(name));
      snprintf(sc->msg, sc->len, "%s: key given twice (lines %zu and %zu)", name, f->lines[i] + 1, mark->line + 1);
      return -1;
    }
  if (f->nkeys == SCAN_MAX_KEYS) {
    snprintf(sc->msg, sc->len, "line %zu: more than %d keys in one map", mark->line + 1, SCAN_MAX_KEYS);
    return -1;
  }
  memcpy(f->keys[f->nkeys], key, n + 1);
  f->lines[f->nkeys++] = mark->line;
  memcpy(f->pending, key, n + 1);
  f->expect_key = 0;
  return 0;
}

static int Event(Scan *sc, const yaml_event_t *ev)
{
  Frame *top = sc->depth ? &sc->frames[sc->depth - 1] : NULL;
  char   name[3 * SCAN_KEY_LEN];

  switch (ev->type) {
  case YAML_MAPPING_START_EVENT:
  case YAML_SEQUENCE_START_EVENT:
    if (top && top->is_map && top->expect_key) {
      snprintf(sc->msg, sc->len, "line %zu: a list or map used as a key", ev->start_mark.line + 1);
      return -1;
    }
    if (!top && ev->type != YAML_MAPPING_START_EVENT) {
      snprintf(sc->msg, sc->len, "line %zu: the top level is a list, not a map of sections", ev->start_mark.line + 1);
      return -1;
    }
    return Push(sc, ev->type == YAML_MAPPING_START_EVENT, &ev->start_mark);
  case YAML_MAPPING_END_EVENT:
  case YAML_SEQUENCE_END_EVENT:
    Pop(sc);
    ValueDone(sc);
    return 0;
  case YAML_ALIAS_EVENT:
    snprintf(sc->msg, sc->len, "line %zu: aliases (*%s) are not supported in a scenario", ev->start_mark.line + 1, (const char *)ev->data.alias.anchor);
    return -1;
  case YAML_SCALAR_EVENT:
    if (!top) {
      snprintf(sc->msg, sc->len, "line %zu: the top level is a single value, not a map of sections", ev->start_mark.line + 1);
      return -1;
    }
    if (top && top->is_map && top->expect_key) return Key(sc, (const char *)ev->data.scalar.value, ev->data.scalar.length, &ev->start_mark);
    if (ev->data.scalar.length >= SCAN_VALUE_LEN) {
      if (top && top->is_map) KeyName(sc, top->pending, name, sizeof(name));
      else snprintf(name, sizeof(name), "%s", top ? top->path : "scenario");
      snprintf(sc->msg, sc->len, "%s: value is %zu characters long (at most %d allowed)", name, ev->data.scalar.length, SCAN_VALUE_LEN - 1);
      return -1;
    }
    ValueDone(sc);
    return 0;
  case YAML_DOCUMENT_START_EVENT:
    if (++sc->ndocs > 1) {
      snprintf(sc->msg, sc->len, "line %zu: a second YAML document ('---'); a scenario is one", ev->start_mark.line + 1);
      return -1;
    }
    return 0;
  default: return 0; /* stream and document ends */
  }
}

int CFScenarioScanFile(FILE *fp, char msg[], size_t len)
{
  yaml_parser_t parser;
  yaml_event_t  ev;
  Scan          sc;
  int           rc = 0, done = 0;

  memset(&sc, 0, sizeof(sc));
  sc.msg = msg;
  sc.len = len;
  msg[0] = 0;
  if (!yaml_parser_initialize(&parser)) {
    snprintf(msg, len, "out of memory");
    return -1;
  }
  yaml_parser_set_input_file(&parser, fp);
  while (!done && !rc) {
    if (!yaml_parser_parse(&parser, &ev)) {
      snprintf(msg, len, "line %zu, column %zu: %s%s%s", parser.problem_mark.line + 1, parser.problem_mark.column + 1, parser.problem ? parser.problem : "YAML syntax error", parser.context ? " " : "", parser.context ? parser.context : "");
      rc = -1;
      break;
    }
    rc   = Event(&sc, &ev);
    done = ev.type == YAML_STREAM_END_EVENT;
    yaml_event_delete(&ev);
  }
  while (sc.depth) Pop(&sc);
  yaml_parser_delete(&parser);
  return rc;
}
