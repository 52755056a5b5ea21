/* Radio-telescope correlator: integration loop driven from C (slips). */
#ifndef CORR_RUN_H
#define CORR_RUN_H
#include <stddef.h>
#include <stdint.h>

typedef int rt_progress_fn(float pct, void *ctx);

/* Registers the RFI flagger; on_flag may be NULL to disable flagging. */
int rt_set_flagger(int (*on_flag)(uint32_t chan, void *ctx), void *ctx);
/* Sets the progress hook; cb is called once per percent. */
void rt_set_progress(rt_progress_fn *cb, void *ctx);
#endif
