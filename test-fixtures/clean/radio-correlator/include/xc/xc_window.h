/* C-only helpers of the correlator's self-test (tools/window_selftest.c). C99 array parameters
 * are not C++, so this header is never included from a block. */
#ifndef XC_WINDOW_H
#define XC_WINDOW_H

#include <stddef.h>

/* out[i] = in[i] * w(i) with a Hann window over n samples. */
void xc_hann(size_t n, const float in[static n], float out[static n]);

#endif
