/* Tide-gauge sampler: the C view of the Rust library. */
#ifndef TIDE_GAUGE_H
#define TIDE_GAUGE_H
#include <stdint.h>
#ifdef __cplusplus
extern "C" {
#endif

uint32_t tide_gauge_samples(void);

#ifdef __cplusplus
}
#endif
#endif
