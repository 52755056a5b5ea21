/* Radio-telescope correlator front end: sample conversion kernels (Rust). */
#include <stddef.h>
#include <stdint.h>
#ifdef __cplusplus
extern "C" {
#endif
/* Power of n float samples. */
float corr_power(const float *x, size_t n);
/* Checksum over the n float samples of a block, read as raw bytes. */
uint32_t corr_checksum(const float *x, size_t n);
#ifdef __cplusplus
}
#endif
