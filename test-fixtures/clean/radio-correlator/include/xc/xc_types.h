/* Types shared by the correlator's Rust kernels and its C++ blocks. */
#ifndef XC_TYPES_H
#define XC_TYPES_H

#include <stddef.h>
#include <stdint.h>

/* One complex voltage sample. Same layout as std::complex<float> and C99 float _Complex
 * (real part first, no padding), so blocks reinterpret their complex port buffers as xc_cf32. */
typedef struct xc_cf32 {
    float re;
    float im;
} xc_cf32;

typedef enum xc_status {
    XC_OK = 0,
    XC_EINVAL = 1,
    XC_ESHAPE = 2
} xc_status;

/* Opaque handles: created and destroyed by the Rust kernels only. */
typedef struct xc_accum xc_accum;     /* integrates power spectra */
typedef struct xc_delay xc_delay;     /* per-antenna integer delay line with a small FIR */
typedef struct xc_flagger xc_flagger; /* flags channels whose average power is too high */

/* Called once per flagged channel with the user pointer given to xc_flagger_new. */
typedef void (*xc_flag_cb)(size_t chan, float level, void *user);

#endif
