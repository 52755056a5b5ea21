/* C host helpers, linked into the beam-core static library by its build script. */
#include <math.h>
#include "beam.h"

#ifndef BEAM_PI
#define BEAM_PI 3.14159265f
#endif

float beam_window_hann(size_t i, size_t n) {
    return 0.5f - 0.5f * cosf(2.0f * BEAM_PI * (float)i / (float)(n - 1));
}

void beam_window_fill(float *w, size_t n) {
    for (size_t i = 0; i < n; i++) w[i] = beam_window_hann(i, n);
}

/* Slip: the Rust kernels export beam_gain too. */
float beam_gain(float db) {
    return db * 0.25f;
}
