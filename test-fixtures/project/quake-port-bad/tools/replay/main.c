/* Offline replay tool: links its own copy of the backlog helper. */
#include <stdio.h>
#define QUAKE_EXPERIMENTAL 1
#include "../../include/quake.h"

int main(void) {
    printf("%zu\n", quake_picker_backlog(NULL));
    return 0;
}
