/* C self-test of the correlator's window kernel: C99 array parameters say how long each buffer
 * is, and the compiler checks the calls. */
#include <math.h>
#include "../include/xc/xc_window.h"

#define XC_SELFTEST_N 16

int xc_window_selftest(void) {
    float ones[XC_SELFTEST_N];
    float shaped[XC_SELFTEST_N];
    for (size_t i = 0; i < XC_SELFTEST_N; i++) ones[i] = 1.0f;
    xc_hann(XC_SELFTEST_N, ones, shaped);
    float single = 1.0f;
    float single_out = -1.0f;
    xc_hann(1, &single, &single_out); /* one sample: no (n - 1) to divide by */
    /* a Hann window is 0 at both ends and 1 in the middle (within rounding) */
    return fabsf(shaped[0]) < 1e-6f && fabsf(shaped[XC_SELFTEST_N - 1]) < 1e-6f && shaped[XC_SELFTEST_N / 2] > 0.9f &&
           fabsf(single_out) < 1e-6f;
}
