/* Passive-sonar receiver: C interface of the Rust kernels (hand-written). */
#ifndef SONAR_KERNELS_H
#define SONAR_KERNELS_H

#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Opaque FIR filter state owned by Rust. */
typedef struct sonar_fir sonar_fir;

/* Detection callback; may be NULL to disable detections. */
typedef void (*sonar_detect_cb)(void *ctx, float bearing_deg);

sonar_fir *sonar_fir_new(const float *taps, size_t ntaps);
int sonar_fir_process(sonar_fir *h, const float *input, double *output, size_t n);
void sonar_fir_reset(sonar_fir *h);
void sonar_fir_free(sonar_fir *h);

/* spectrum: nbins interleaved (re, im) pairs; mag: nbins outputs. */
void sonar_fft_mag(const float *spectrum, size_t nbins, float *mag);

float sonar_beam_power(const float *beam, long n_samples);
int sonar_set_gain(float db);
int sonar_on_detect(sonar_detect_cb cb, void *ctx);

/* Last detection of the receiver, filled in by Rust (same layout on both sides). */
typedef struct sonar_detection {
    float bearing_deg;
    uint32_t stave;
    double snr_db;
    uint8_t flags;
} sonar_detection;

int sonar_fir_last_detection(const sonar_fir *h, sonar_detection *out);

#ifdef __cplusplus
}
#endif

#endif /* SONAR_KERNELS_H */
