/* Seismic array: raw-trace kernels that count bytes (Rust). */
#include <stddef.h>
#include <stdint.h>
#ifndef __sized_by
#define __sized_by(n)
#endif
#ifdef __cplusplus
extern "C" {
#endif
/* Checksum of nbytes bytes of a telemetry frame. */
uint32_t seis_checksum(const void *frame, size_t nbytes) __attribute__((access(read_only, 1, 2)));
/* Zeroes a raw trace buffer of nbytes bytes. */
void seis_zero_raw(float *__sized_by(nbytes) raw, size_t nbytes);
/* Fills a Hann taper into a buffer of nbytes bytes of float samples.
 * ferrule-buffers: taper[nbytes bytes] */
void seis_fill_taper(float *taper, size_t nbytes);
/* Applies gain g to nbytes bytes of float samples. */
void seis_gain_scaled(float *raw, size_t nbytes, float g);
/* Applies gain g to nbytes bytes of float samples (walked by index). */
void seis_gain_raw(float *raw, size_t nbytes, float g);
#ifdef __cplusplus
}
#endif
