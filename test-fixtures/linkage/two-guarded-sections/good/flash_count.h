/* Lightning detector: stroke counter kernels (implemented in Rust). */
#ifndef FLASH_COUNT_H
#define FLASH_COUNT_H

#include <stddef.h>
#include <stdint.h>

#if defined (__cplusplus)
extern "C" {
#endif

/* Stable API: number of strokes above `threshold` in `n` samples. */
uint32_t flash_count(const float *samples, size_t n, float threshold);

#if defined (__cplusplus)
}
#endif

#endif /* FLASH_COUNT_H */

/* Experimental section, only with FLASH_EXPERIMENTAL defined by the build. */
#if defined(FLASH_EXPERIMENTAL) && !defined(FLASH_COUNT_H_EXPERIMENTAL)
#define FLASH_COUNT_H_EXPERIMENTAL

#ifdef __cplusplus
extern "C" {
#endif

uint32_t flash_count_windowed(const float *samples, size_t n, size_t window);

#ifdef __cplusplus
}
#endif

#endif /* FLASH_COUNT_H_EXPERIMENTAL */
