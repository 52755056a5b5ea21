#ifndef AGC_H
#define AGC_H
#include <stddef.h>

void agc_run(float *x, size_t n);

#endif
