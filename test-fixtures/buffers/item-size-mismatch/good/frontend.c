/* Correlator front end (C): raw 16-bit I/Q converted to float first. */
#include <stdint.h>
#include "corr.h"

float raw_power(const int16_t *iq, float *scratch, size_t n) {
    for (size_t i = 0; i < 2 * n; i++) scratch[i] = (float)iq[i];
    return corr_power(scratch, 2 * n);
}
