/*
 * hyd_kernels.h - the Rust kernels of the hydrophone-array recorder, as the C stream blocks see
 * them. Written by hand next to rust/src/; every function is defined there.
 *
 * Ownership: a handle made by hyd_X_new is released with hyd_X_free, which accepts NULL.
 * Lengths are counts of items (samples, channels, taps), never bytes.
 */
#ifndef HYD_KERNELS_H
#define HYD_KERNELS_H

#include <stddef.h>
#include <stdint.h>

#if defined(__GNUC__)
#define HYD_API __attribute__((visibility("default")))
#else
#define HYD_API
#endif

#ifdef __cplusplus
extern "C" {
#endif

/* ---- gain (one function per sample type) ---- */

/** Multiplies the n samples of buf by gain, in place. A NULL buf or n == 0 does nothing. */
HYD_API void hyd_gain_f32(float *buf, size_t n, float gain);

/** As hyd_gain_f32 for 16-bit PCM, saturating at the int16_t range. */
HYD_API void hyd_gain_i16(int16_t *buf, size_t n, float gain);

/* ---- band-pass FIR, one per channel ---- */

/** Opaque filter state. */
typedef struct hyd_fir hyd_fir;

/** Longest filter accepted by hyd_fir_new. */
#define HYD_FIR_MAX_TAPS 512

/**
 * Makes a filter from ntaps coefficients (copied). Returns NULL when taps is NULL or ntaps is 0
 * or above HYD_FIR_MAX_TAPS. Release with hyd_fir_free.
 */
HYD_API hyd_fir *hyd_fir_new(const float *taps, size_t ntaps);

/**
 * Filters n samples from input into output. input and output may be the same buffer (in-place
 * filtering is supported).
 */
HYD_API void hyd_fir_process(hyd_fir *fir, const float *input, float *output, size_t n);

/** Clears the delay line. NULL is ignored. */
HYD_API void hyd_fir_reset(hyd_fir *fir);

/** Releases a filter. NULL is accepted and ignored. */
HYD_API void hyd_fir_free(hyd_fir *fir);

/* ---- delay-and-sum beam over interleaved frames ---- */

typedef struct hyd_beam hyd_beam;

/** Makes a beam from nchan per-channel delays in frames (copied). NULL on bad input. */
HYD_API hyd_beam *hyd_beam_new(const uint32_t *delays, size_t nchan);

/** Channels per frame the beam expects (0 for NULL). */
HYD_API size_t hyd_beam_channels(const hyd_beam *beam);

/**
 * Sums the channels of nsamples interleaved samples (frames[i * channels + c], i.e.
 * nsamples / channels frames) into one sample per frame in out, writing at most nout.
 * Returns the number of outputs written. frames and out must not overlap.
 */
HYD_API size_t hyd_beam_form(const hyd_beam *beam, const float *restrict frames, size_t nsamples,
                             float *restrict out, size_t nout);

/** Releases a beam. NULL is accepted and ignored. */
HYD_API void hyd_beam_free(hyd_beam *beam);

/* ---- transient detector ---- */

/** One detection. */
typedef struct hyd_event {
    uint64_t sample;  /**< absolute sample index of the threshold crossing */
    float peak;       /**< peak magnitude of the event */
    uint32_t channel; /**< the detector's channel */
} hyd_event;

/** Called once per event with the user pointer given to hyd_det_new. */
typedef void (*hyd_event_cb)(void *user, const hyd_event *ev);

typedef struct hyd_det hyd_det;

/**
 * Makes a detector for one channel. Returns NULL when cb or user is NULL or threshold <= 0.
 * user must stay valid until hyd_det_free. Release with hyd_det_free.
 */
HYD_API hyd_det *hyd_det_new(float threshold, uint32_t channel, hyd_event_cb cb, void *user);

/**
 * Feeds n samples starting at absolute sample t0 and returns the number of events reported.
 * When pre is not NULL the samples are first filtered by it into work (n floats); pre is
 * borrowed, not kept. work may be NULL when pre is NULL; x and work may be the same buffer.
 */
HYD_API uint32_t hyd_det_feed(hyd_det *det, hyd_fir *pre, const float *x, float *work, size_t n,
                              uint64_t t0);

/** Reports an event still open; returns 1 if there was one, else 0. */
HYD_API uint32_t hyd_det_flush(hyd_det *det);

/** Releases a detector. NULL is accepted and ignored. */
HYD_API void hyd_det_free(hyd_det *det);

#ifdef __cplusplus
}
#endif

#endif /* HYD_KERNELS_H */
