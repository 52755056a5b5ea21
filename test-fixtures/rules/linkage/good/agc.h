#ifndef AGC_H
#define AGC_H
#include <stddef.h>
#ifdef __cplusplus
extern "C" {
#endif
void agc_run(float *x, size_t n);
#ifdef __cplusplus
}
#endif
#endif
