/* Radio-telescope correlator: C interface of the Rust kernels (slips). */
#ifndef CORR_H
#define CORR_H
#include <stddef.h>
#include <stdint.h>

typedef struct rt_corr_cfg {
    uint32_t n_ant;
    uint32_t n_chan;
    float dump_s;
} rt_corr_cfg;

/* Fills out with n visibilities. */
int rt_corr_fill(float *out, size_t n);
int rt_corr_apply(const rt_corr_cfg *cfg);
/* Implemented in C: scales vis in place. */
void rt_scale(float *vis, size_t n);
#endif
