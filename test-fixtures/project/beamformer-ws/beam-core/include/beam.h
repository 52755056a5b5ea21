/* Towed-array beamformer: the C view of the Rust kernels. */
#ifndef BEAM_H
#define BEAM_H
#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

int beam_steer(const float *staves, size_t n_staves, float bearing_deg, float *out);
float beam_sum(const float *x, size_t n);
float beam_norm(const float *x, size_t n);
uint64_t beam_clock(void);
float beam_gain(float db);
int beam_level(const float *x, size_t n);
float beam_window_hann(size_t i, size_t n);
void beam_window_fill(float *w, size_t n);
uint32_t beam_cpu_features(void);
void beam_flush(void);
uint32_t beam_sample_rate(void);

#ifdef __cplusplus
}
#endif
#endif
