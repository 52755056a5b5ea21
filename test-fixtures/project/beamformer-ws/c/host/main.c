/* The array host program. */
#include <stdio.h>
#include "beam.h"

int main(void) {
    float staves[4] = {1, 2, 3, 4}, out = 0;
    beam_steer(staves, 4, 30.0f, &out);
    printf("%f %d\n", out, beam_level(staves, 4));
    return 0;
}
