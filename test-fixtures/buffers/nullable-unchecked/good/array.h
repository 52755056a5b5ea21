/* Seismic array: beam stacking (Rust). */
#include <stddef.h>
#ifdef __cplusplus
extern "C" {
#endif
/* Stacks n samples of each trace; weights may be NULL (unit weights). */
void seis_stack(const float *traces, const float *weights, float *beam, size_t n);
void seis_gate(const float *_Nullable mask, float *beam, size_t n);
#ifdef __cplusplus
}
#endif
