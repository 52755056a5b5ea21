/* detect_block.c - transient detection on the beam, events collected through a callback. */
#include <stdlib.h>
#include <string.h>

#include "hyd_blocks.h"

static void on_event(void *user, const hyd_event *ev)
{
    hyd_detect_block *b = user;

    if (b->nevents < sizeof(b->events) / sizeof(b->events[0]))
        b->events[b->nevents++] = *ev;
    else
        b->dropped++;
}

int hyd_detect_init(hyd_detect_block *b, float threshold, const float *pre_taps, size_t npre,
                    size_t max_n)
{
    memset(b, 0, sizeof *b);
    if (max_n == 0)
        return -1;

    if (pre_taps) {
        b->pre = hyd_fir_new(pre_taps, npre);
        if (!b->pre)
            goto fail;
        b->work = calloc(max_n, sizeof *b->work);
        if (!b->work)
            goto fail;
    }
    b->det = hyd_det_new(threshold, 0, on_event, b);
    if (!b->det)
        goto fail;
    b->max_n = max_n;
    return 0;

fail:
    free(b->work);
    hyd_fir_free(b->pre); /* NULL when it was never made */
    memset(b, 0, sizeof *b);
    return -1;
}

uint32_t hyd_detect_work(hyd_detect_block *b, const float *x, size_t n)
{
    uint32_t found = 0;

    while (n > 0) {
        size_t chunk = n < b->max_n ? n : b->max_n;

        /* b->pre is lent to the detector for this call only */
        found += hyd_det_feed(b->det, b->pre, x, b->work, chunk, b->t);
        b->t += chunk;
        x += chunk;
        n -= chunk;
    }
    return found;
}

void hyd_detect_finish(hyd_detect_block *b)
{
    if (b->det)
        hyd_det_flush(b->det);
}

void hyd_detect_destroy(hyd_detect_block *b)
{
    if (b->det) {
        hyd_det_free(b->det);
        b->det = NULL;
    }
    hyd_fir_free(b->pre);
    b->pre = NULL;
    free(b->work);
    b->work = NULL;
}
