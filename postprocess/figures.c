/* The figure set a run leaves in its directory. */
#include <crustforge/figures.h>

PetscErrorCode CFFiguresWriteAll(const CFRunData *run, const CFProfiles *prof, const CFPTPaths *paths, const char dir[])
{
  CFPostSettings set;

  PetscFunctionBeginUser;
  PetscCall(CFPostSettingsFromConfig(&run->cfg, &set)); /* the ridge depth the isostasy starts from */
  PetscCall(CFFigureTemperature(run, NULL, dir));
  PetscCall(CFFigureDepletion(run, NULL, dir));
  PetscCall(CFFigureMeltingRate(run, NULL, dir));
  PetscCall(CFFigurePTPaths(run, paths, dir));
  PetscCall(CFFigureHeatFlow(run, prof, dir));
  PetscCall(CFFigureSeafloorDepth(run, prof, set.ridge_depth, dir));
  PetscFunctionReturn(0);
}
