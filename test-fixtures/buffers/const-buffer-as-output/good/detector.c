/* Lightning detector (C): the envelope lands in a writable scratch buffer. */
#include <stddef.h>
#include "strike.h"

static float envelope[64];

void detect(const float *samples, size_t n) {
    strike_envelope(samples, envelope, n);
}
