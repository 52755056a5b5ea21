/* Passive-sonar receiver: resampler and filter (Rust). */
#include <stddef.h>
#ifdef __cplusplus
extern "C" {
#endif
void sonar_filter(const float *in, float *out, size_t n);
void sonar_resample(const float *src, size_t src_len, float *dst, size_t dst_len);
#ifdef __cplusplus
}
#endif
