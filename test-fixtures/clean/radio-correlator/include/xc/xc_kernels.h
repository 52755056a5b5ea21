/* Rust kernels of the radio-telescope correlator (kernels/src/lib.rs).
 * Lengths count items of the pointed-to type; a length named nbytes counts bytes. */
#ifndef XC_KERNELS_H
#define XC_KERNELS_H

#include "xc_types.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Converts n interleaved int16 I/Q samples (2*n shorts) to complex floats scaled to [-1, 1).
 * ferrule-buffers: iq[2*n], out[n] */
xc_status xc_iq16_to_cf32(const int16_t *iq, xc_cf32 *out, size_t n);

/* Fringe stopping: rotates n samples by phase + rate*i radians. in and out may be the same
 * buffer (blocks call it in place). */
void xc_fringe_stop(const xc_cf32 *in, xc_cf32 *out, size_t n, float phase, float rate);

/* Power of n spectra of nchan channels each: power[k] = |spec[k]|^2 for k < n*nchan.
 * ferrule-buffers: spec[n*nchan], power[n*nchan] */
void xc_power_spectrum(const xc_cf32 *spec, float *power, size_t n, size_t nchan);

/* Multiplies the floats of a raw buffer of nbytes bytes by gain (nbytes is a multiple of 4). */
void xc_scale_raw(float *buf, size_t nbytes, float gain);

/* FNV-1a checksum of nbytes bytes, for the visibility dump. */
uint32_t xc_checksum(const void *data, size_t nbytes)
    __attribute__((access(read_only, 1, 2)));

/* Accumulator of nchan-channel power spectra. */
xc_accum *xc_accum_new(size_t nchan);
void xc_accum_free(xc_accum *acc);
/* Adds n spectra of nchan channels; XC_ESHAPE when nchan differs from the accumulator's. */
xc_status xc_accum_add(xc_accum *acc, const float *power, size_t n, size_t nchan)
    __attribute__((access(read_only, 2)));
size_t xc_accum_nchan(const xc_accum *acc);
uint64_t xc_accum_count(const xc_accum *acc);
/* Writes the average spectrum, at most max_out channels; returns how many it wrote. */
size_t xc_accum_read(const xc_accum *acc, float *out, size_t max_out)
    __attribute__((access(write_only, 2, 3)));
void xc_accum_reset(xc_accum *acc);

/* Integer delay line of `delay` samples followed by a short real FIR. */
xc_delay *xc_delay_new(size_t delay);
void xc_delay_free(xc_delay *line);
void xc_delay_set_taps(xc_delay *line, const float *taps, size_t ntaps)
    __attribute__((access(read_only, 2, 3)));
/* Delays and filters n samples; returns n. */
size_t xc_delay_process(xc_delay *line, const xc_cf32 *in, xc_cf32 *out, size_t n);

/* Flagger: calls cb(chan, level, user) for every channel of the accumulator's average spectrum
 * above level. cb may be NULL (then it only counts). The accumulator is borrowed, not kept. */
xc_flagger *xc_flagger_new(float level, xc_flag_cb cb, void *user);
void xc_flagger_free(xc_flagger *flagger);
size_t xc_flagger_scan(xc_flagger *flagger, const xc_accum *acc);

#ifdef __cplusplus
}
#endif

#endif
