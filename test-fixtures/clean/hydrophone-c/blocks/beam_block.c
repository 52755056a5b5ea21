/* beam_block.c - delay-and-sum towards one bearing, for a line array of HYD_NCHAN hydrophones. */
#include <stdlib.h>

#include "hyd_blocks.h"

int hyd_beam_block_init(hyd_beam_block *b, unsigned spacing_frames, size_t max_frames)
{
    uint32_t delays[HYD_NCHAN];
    size_t c;

    b->beam = NULL;
    b->out = NULL;
    b->max_frames = 0;
    if (max_frames == 0)
        return -1;

    /* the wavefront reaches hydrophone 0 last, each further one spacing_frames earlier: delay
     * hydrophone c by c * spacing_frames to line them up */
    for (c = 0; c < sizeof(delays) / sizeof(delays[0]); c++)
        delays[c] = (uint32_t)(c * spacing_frames);

    b->out = malloc(max_frames * sizeof *b->out);
    if (!b->out)
        return -1;
    b->beam = hyd_beam_new(delays, sizeof(delays) / sizeof(delays[0]));
    if (!b->beam) {
        free(b->out);
        b->out = NULL;
        return -1;
    }
    b->max_frames = max_frames;
    return 0;
}

size_t hyd_beam_block_work(hyd_beam_block *b, const float (*frames)[HYD_NCHAN], size_t nframes)
{
    if (hyd_beam_channels(b->beam) != HYD_NCHAN)
        return 0;
    return hyd_beam_form(b->beam, (const float *)frames, nframes * HYD_NCHAN, b->out,
                         b->max_frames);
}

void hyd_beam_block_destroy(hyd_beam_block *b)
{
    hyd_beam_free(b->beam);
    b->beam = NULL;
    free(b->out);
    b->out = NULL;
    b->max_frames = 0;
}
