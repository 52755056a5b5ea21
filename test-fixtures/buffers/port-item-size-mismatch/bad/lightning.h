/* Lightning-detector front end: kernels (Rust). */
#include <stddef.h>
#ifdef __cplusplus
extern "C" {
#endif
void strike_envelope(const float *in, float *out, size_t n);
#ifdef __cplusplus
}
#endif
