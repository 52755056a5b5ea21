#include <stddef.h>
#define QUAKE_EXPERIMENTAL 1
#include "../../include/quake.h"

size_t quake_picker_backlog(const quake_picker *p) { (void)p; return 0; }
