/* The registered melting models, looked up by name (-melting_model NAME).
   To add a model: write src/melting/NAME.c defining a CFMeltingType, add one line below. */
#include <string.h>
#include <crustforge/melting.h>

extern const CFMeltingType CFMeltingKatz2003;
extern const CFMeltingType CFMeltingLinear;

static const CFMeltingType *const types[] = {
  &CFMeltingKatz2003,
  &CFMeltingLinear,
};

PetscInt CFMeltingTypeCount(void) { return (PetscInt)(sizeof(types) / sizeof(types[0])); }

const CFMeltingType *CFMeltingTypeGet(PetscInt i) { return (i >= 0 && i < CFMeltingTypeCount()) ? types[i] : NULL; }

const CFMeltingType *CFMeltingTypeFind(const char name[])
{
  for (PetscInt i = 0; name && i < CFMeltingTypeCount(); i++)
    if (!strcmp(types[i]->name, name)) return types[i];
  return NULL;
}
