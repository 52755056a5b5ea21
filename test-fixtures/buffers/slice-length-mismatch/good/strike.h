/* Lightning-detector front end: envelope and mixing kernels (Rust). */
#include <stddef.h>
#ifdef __cplusplus
extern "C" {
#endif
void strike_envelope(const float *in, float *out, size_t n)
    __attribute__((access(read_only, 1, 3), access(write_only, 2, 3)));
void strike_mix(const float *a, size_t a_len, float *b, size_t b_len);
/* ferrule-buffers: iq[2*n], power[n] */
void strike_iq_power(const float *iq, float *power, size_t n);
#ifdef __cplusplus
}
#endif
