/* A second C picker backend; the build is meant to compile only one of the two, but both are
 * listed for the same library here. */
#include <stdlib.h>
#include "../include/quake.h"

void quake_picker_free(quake_picker *p) { free(p); }
