/* Lightning-detector front end: envelope kernel (Rust). */
#include <stddef.h>
void strike_envelope(const float *in, float *out, size_t n);
