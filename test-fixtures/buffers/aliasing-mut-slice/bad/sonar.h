/* Passive-sonar receiver: gain stage (Rust). */
#include <stddef.h>
#ifdef __cplusplus
extern "C" {
#endif
/* Applies gain to n samples; in and out may be the same buffer (in-place use). */
void sonar_gain(const float *in, float *out, size_t n, float g);
#ifdef __cplusplus
}
#endif
