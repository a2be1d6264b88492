/* crustforge-post: re-analyse a saved run with other extraction and observable settings,
   without solving again. */
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <crustforge/app.h>
#include <crustforge/melting.h>
#include <crustforge/postprocess.h>
#include "crustforge_version.h"

static const char help[] = "crustforge-post: re-analyse a saved crustforge run without solving again.\n"
                           "Usage: crustforge-post RUN_DIR|RUN_FILE.h5 [-section_key value ...] [-figures false]\n"
                           "       crustforge-post --help | --version\n\n";

/* The sections whose keys change only what is made of the solution. */
static const char *const post_sections[] = {"extraction", "observables", "pt_paths", "output"};

static void Usage(FILE *fp)
{
  fputs(help, fp);
  fputs("Reads RUN_DIR/run.h5 (or the run file given), rebuilds the run's scenario from it, applies\n"
        "the keys given on the command line, and writes summary.csv, profiles.csv, pt_paths.csv\n"
        "(and the figures unless -figures false) into output.dir: by default the directory 'post'\n"
        "beside the run file, which must not already hold files unless output.overwrite is true\n"
        "(output.dir and output.overwrite come from the command line only, never from the run).\n"
        "Only keys of the sections extraction, observables, pt_paths and output may be given:\n"
        "anything else would change the solution, which needs crustforge run.\n"
        "Exit status: 0 success, 2 bad input, missing or unreadable run file, 1 anything else.\n\n",
        fp);
}

static PetscBool IsPostSection(const char *section)
{
  for (size_t s = 0; s < sizeof(post_sections) / sizeof(post_sections[0]); s++)
    if (!strcasecmp(section, post_sections[s])) return PETSC_TRUE;
  return PETSC_FALSE;
}

/* Is option (without '-') a key of section, or the section itself? */
static PetscBool InSection(const char *option, const char *section, size_t len)
{
  return (PetscBool)(!strncasecmp(option, section, len) && (option[len] == '_' || !option[len]));
}

/* Refuse command-line keys of the solved model (scenario sections other than the post ones,
   and melting-model parameters). */
static PetscErrorCode CheckOverrides(int argc, char **argv)
{
  CFConfig       cfg;
  CFConfigEntry *e;
  PetscInt       n;

  PetscFunctionBeginUser;
  PetscCall(CFConfigSetDefaults(&cfg));
  PetscCall(CFConfigGetEntries(&cfg, &n, &e));
  for (int a = 2; a < argc; a++) {
    const char *opt = argv[a] + 1;
    if (argv[a][0] != '-') continue;
    for (PetscInt k = 0; k < n; k++) {
      char   section[2 * CF_NAME_LEN];
      size_t len = strcspn(e[k].key, ".");
      snprintf(section, sizeof(section), "%.*s", (int)len, e[k].key);
      if (IsPostSection(section) || !InSection(opt, section, len)) continue;
      PetscCall(PetscFree(e));
      SETERRQ(PETSC_COMM_WORLD, PETSC_ERR_USER_INPUT, "%s: a key of the solved model; crustforge-post only takes keys of extraction, observables, pt_paths and output (run crustforge again to change %s)", argv[a], section);
    }
    for (PetscInt m = 0; m < CFMeltingTypeCount(); m++) {
      const char *name = CFMeltingTypeGet(m)->name;
      if (!InSection(opt, name, strlen(name))) continue;
      PetscCall(PetscFree(e));
      SETERRQ(PETSC_COMM_WORLD, PETSC_ERR_USER_INPUT, "%s: a parameter of melting model %s; crustforge-post cannot change the solved model (run crustforge again)", argv[a], name);
    }
  }
  PetscCall(PetscFree(e));
  PetscFunctionReturn(0);
}

static PetscBool Given(int argc, char **argv, const char option[])
{
  for (int a = 2; a < argc; a++)
    if (!strcasecmp(argv[a], option)) return PETSC_TRUE;
  return PETSC_FALSE;
}

/* The run file and the directory that holds it. */
static PetscErrorCode RunPaths(const char arg[], char file[], char dir[])
{
  struct stat st;
  const char *slash;

  PetscFunctionBeginUser;
  if (!stat(arg, &st) && S_ISDIR(st.st_mode)) {
    PetscCall(PetscSNPrintf(file, PETSC_MAX_PATH_LEN, "%s/run.h5", arg));
    PetscCall(PetscStrncpy(dir, arg, PETSC_MAX_PATH_LEN));
  } else {
    PetscCall(PetscStrncpy(file, arg, PETSC_MAX_PATH_LEN));
    slash = strrchr(arg, '/');
    if (!slash) PetscCall(PetscStrncpy(dir, ".", PETSC_MAX_PATH_LEN));
    else PetscCall(PetscSNPrintf(dir, PETSC_MAX_PATH_LEN, "%.*s", (int)(slash == arg ? 1 : slash - arg), arg));
  }
  PetscFunctionReturn(0);
}

/* Where to write (never the run's own directory unless asked, and never by the run's own
   output.overwrite), then the post-processing. */
static PetscErrorCode PostLoaded(int argc, char **argv, const char file[], const char dir[], PetscBool figures, const CFRunData *run)
{
  CFConfig       out = run->cfg;
  CFPostSettings set;

  PetscFunctionBeginUser;
  if (!Given(argc, argv, "-output_dir")) PetscCall(PetscSNPrintf(out.output_dir, sizeof(out.output_dir), "%s/post", dir));
  if (!Given(argc, argv, "-output_overwrite")) out.output_overwrite = PETSC_FALSE;
  PetscCall(CFOutputDirPrepare(PETSC_COMM_WORLD, &out));
  PetscCall(PetscPrintf(PETSC_COMM_WORLD, "crustforge-post: %s (%" PetscInt_FMT " x %" PetscInt_FMT " cells, %s)\n", file, run->nx, run->nz, run->cfg.melting_model));
  PetscCall(CFPostSettingsFromConfig(&run->cfg, &set));
  PetscCall(CFPostRun(PETSC_COMM_WORLD, run, &set, out.output_dir, figures));
  PetscFunctionReturn(0);
}

static PetscErrorCode Post(int argc, char **argv)
{
  CFRunData      run;
  PetscBool      figures = PETSC_TRUE;
  PetscErrorCode ierr;
  char           file[PETSC_MAX_PATH_LEN], dir[PETSC_MAX_PATH_LEN];

  PetscFunctionBeginUser;
  PetscCheck(argc >= 2 && argv[1][0] != '-', PETSC_COMM_WORLD, PETSC_ERR_USER_INPUT, "no run given (usage: crustforge-post RUN_DIR|RUN_FILE.h5 [-key value ...])");
  PetscCall(CheckOverrides(argc, argv));
  PetscCall(PetscOptionsGetBool(NULL, NULL, "-figures", &figures, NULL));
  PetscCall(RunPaths(argv[1], file, dir));
  PetscCall(CFRunDataLoad(PETSC_COMM_WORLD, file, argc, argv, &run));
  ierr = PostLoaded(argc, argv, file, dir, figures, &run);
  PetscCall(CFRunDataDestroy(&run));
  PetscCall(ierr);
  PetscFunctionReturn(0);
}

int main(int argc, char **argv)
{
  PetscErrorCode ierr;
  const char    *arg = argc > 1 ? argv[1] : "";
  int            status;
  PetscBool      traceback = PETSC_FALSE;

  if (!strcmp(arg, "--help") || !strcmp(arg, "-h") || !strcmp(arg, "help")) {
    Usage(stdout);
    CFConfigPrintKeys(stdout);
    return CF_EXIT_OK;
  }
  if (!strcmp(arg, "--version")) {
    printf("crustforge-post %s (revision %s)\n", CRUSTFORGE_VERSION, CRUSTFORGE_REVISION);
    return CF_EXIT_OK;
  }
  if (!arg[0]) {
    Usage(stderr);
    fprintf(stderr, "crustforge-post: no run given\n");
    return CF_EXIT_INPUT;
  }

  ierr = PetscInitialize(&argc, &argv, NULL, help);
  if (ierr) return CF_EXIT_INTERNAL;
  /* One line per error unless a developer asks for PETSc's traceback. */
  if (PetscOptionsGetBool(NULL, NULL, "-debug_traceback", &traceback, NULL)) traceback = PETSC_FALSE;
  if (!traceback) PetscPushErrorHandler(PetscReturnErrorHandler, NULL);
  ierr   = Post(argc, argv);
  status = CFExitStatus(ierr);
  if (ierr) {
    PetscMPIInt rank = 0;
    MPI_Comm_rank(PETSC_COMM_WORLD, &rank);
    if (!rank) CFReportError("crustforge-post", ierr);
  }
  if (!traceback) PetscPopErrorHandler();
  PetscFinalize();
  return status;
}
