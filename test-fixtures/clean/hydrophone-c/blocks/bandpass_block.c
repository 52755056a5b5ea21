/* bandpass_block.c - one Rust FIR per hydrophone over interleaved frames. */
#include <stdlib.h>
#include <string.h>

#include "hyd_blocks.h"

int hyd_bandpass_init(hyd_bandpass_block *b, size_t nchan, const float *const *taps,
                      const size_t *ntaps, size_t max_frames, float gain)
{
    size_t c;

    memset(b, 0, sizeof *b);
    if (nchan == 0 || max_frames == 0)
        return -1;

    b->fir = calloc(nchan, sizeof *b->fir);
    if (!b->fir)
        return -1;
    b->chan = malloc(max_frames * sizeof *b->chan);
    if (!b->chan)
        goto fail;

    for (c = 0; c < nchan; c++) {
        b->fir[c] = hyd_fir_new(taps[c], ntaps[c]);
        if (!b->fir[c])
            goto fail;
        b->nchan = c + 1;
    }
    b->max_frames = max_frames;
    b->gain = gain;
    return 0;

fail:
    /* release the filters made so far: b->nchan counts them */
    for (c = 0; c < b->nchan; c++)
        hyd_fir_free(b->fir[c]);
    free(b->fir);
    free(b->chan);
    memset(b, 0, sizeof *b);
    return -1;
}

size_t hyd_bandpass_work(hyd_bandpass_block *b, float *frames, size_t nframes)
{
    size_t c, i;

    if (nframes > b->max_frames)
        nframes = b->max_frames;
    for (c = 0; c < b->nchan; c++) {
        for (i = 0; i < nframes; i++)
            b->chan[i] = frames[i * b->nchan + c];
        /* in place: hyd_fir_process documents input == output as supported */
        hyd_fir_process(b->fir[c], b->chan, b->chan, nframes);
        for (i = 0; i < nframes; i++)
            frames[i * b->nchan + c] = b->chan[i];
    }
    hyd_gain_f32(frames, nframes * b->nchan, b->gain);
    return nframes;
}

void hyd_bandpass_destroy(hyd_bandpass_block *b)
{
    size_t c;

    for (c = 0; c < b->nchan; c++) {
        hyd_fir_free(b->fir[c]);
        b->fir[c] = NULL;
    }
    free(b->fir);
    free(b->chan);
    memset(b, 0, sizeof *b);
}
