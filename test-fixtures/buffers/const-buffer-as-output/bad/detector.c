/* Lightning detector (C): the calibration table is const; the envelope lands in it. */
#include <stddef.h>
#include "strike.h"

static const float calibration[64] = {0};

void detect(const float *samples, size_t n) {
    strike_envelope(samples, (float *)calibration, n); /* expect: const-buffer-as-output */
}
