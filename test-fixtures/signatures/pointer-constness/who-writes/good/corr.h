/* Radio-telescope correlator: C interface of the Rust kernels. */
#ifndef CORR_H
#define CORR_H
#include <stddef.h>
#include <stdint.h>
#ifdef __cplusplus
extern "C" {
#endif

typedef struct rt_corr_cfg {
    uint32_t n_ant;
    uint32_t n_chan;
    float dump_s;
} rt_corr_cfg;

/* Validates a configuration (the header of an older release left it writable). */
int rt_corr_check(rt_corr_cfg *cfg);
/* Sums rows of visibilities; the rows are only read. */
float rt_corr_sum(float *const rows[], size_t n_rows, size_t n);
char *rt_label_new(uint32_t ant);
void rt_label_free(const char *label);
float rt_corr_peak(const float *vis, size_t n);
/* Implemented in C: prints statistics, reads vis only. */
void rt_log_stats(const float *vis, size_t n);

#ifdef __cplusplus
}
#endif
#endif
