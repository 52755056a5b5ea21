/* A calibration tool: a program of its own. */
#include <stdio.h>
#include "beam.h"

int main(void) {
    printf("%f\n", beam_norm((const float[]){1, 2}, 2));
    return 0;
}
