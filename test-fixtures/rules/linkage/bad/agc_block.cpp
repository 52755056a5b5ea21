#include "agc.h"

void agc_reset();

void agc_block_work(float *x, size_t n) {
    agc_run(x, n);
    agc_reset();
}
