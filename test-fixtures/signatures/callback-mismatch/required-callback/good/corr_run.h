/* Radio-telescope correlator: integration loop driven from C. */
#ifndef CORR_RUN_H
#define CORR_RUN_H
#include <stddef.h>
#include <stdint.h>

typedef int rt_progress_fn(float pct, void *ctx);

/* Runs n_dumps integrations. |on_dump| will be called after each one with its visibilities. */
int rt_corr_run(uint32_t n_dumps, void (*on_dump)(const float *vis, size_t n, void *ctx), void *ctx);
/* Sets the progress hook; cb is called once per percent. */
void rt_set_progress(rt_progress_fn *cb, void *ctx);
#endif
