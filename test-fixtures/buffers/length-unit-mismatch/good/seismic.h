/* Seismic array: trace kernels (Rust). */
#include <stddef.h>
#ifdef __cplusplus
extern "C" {
#endif
/* Scales a trace given as `nbytes` bytes of float samples. */
void seis_scale(const float *trace, size_t nbytes, float *out);
void seis_detrend(const float *in, float *out, size_t n);
#ifdef __cplusplus
}
#endif
