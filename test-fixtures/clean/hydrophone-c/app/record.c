/* record.c - drives the recorder's blocks on a synthetic ping crossing the array, and checks the
 * answers. Also makes two inits fail half-way so their cleanup paths run. */
#include <stdio.h>
#include <stdlib.h>

#include "../blocks/hyd_blocks.h"

#define NFRAMES 2048
#define PING_AT 500      /* frame the ping reaches hydrophone HYD_NCHAN - 1 */
#define SPACING 7        /* frames between neighbouring hydrophones */
#define PING_LEN 12

static int failures;

static void check(int ok, const char *what)
{
    if (!ok) {
        printf("FAILED: %s\n", what);
        failures++;
    }
}

static float noise(unsigned *state)
{
    *state = *state * 1103515245u + 12345u;
    return ((float)((*state >> 16) & 0x7fff) / 32767.0f - 0.5f) * 0.1f;
}

int main(void)
{
    static const float smooth[5] = { 0.2f, 0.2f, 0.2f, 0.2f, 0.2f };
    static const float pre[3] = { 0.25f, 0.5f, 0.25f };
    const float *taps[HYD_NCHAN] = { smooth, smooth, smooth, smooth };
    size_t ntaps[HYD_NCHAN] = { 5, 5, 5, 5 };
    hyd_bandpass_block bp;
    hyd_beam_block bm;
    hyd_detect_block det;
    float (*frames)[HYD_NCHAN];
    int16_t pcm[256];
    unsigned seed = 2024;
    size_t i, c, nout;
    uint32_t found;

    /* ---- inits that fail half-way: the goto fail paths free what was made ---- */
    ntaps[2] = 0; /* hyd_fir_new refuses channel 2 after channels 0 and 1 were made */
    check(hyd_bandpass_init(&bp, HYD_NCHAN, taps, ntaps, NFRAMES, 2.0f) == -1, "bandpass init fails on a 0-tap channel");
    check(bp.fir == NULL && bp.nchan == 0, "failed bandpass init leaves nothing");
    ntaps[2] = 5;
    check(hyd_detect_init(&det, 0.0f, pre, 3, 256) == -1, "detect init fails on a zero threshold");
    check(det.pre == NULL && det.work == NULL && det.det == NULL, "failed detect init leaves nothing");
    check(hyd_beam_block_init(&bm, SPACING, 0) == -1, "beam init refuses 0 frames");

    /* ---- the real chain ---- */
    check(hyd_bandpass_init(&bp, HYD_NCHAN, taps, ntaps, NFRAMES, 2.0f) == 0, "bandpass init");
    check(hyd_beam_block_init(&bm, SPACING, NFRAMES) == 0, "beam init");
    check(hyd_detect_init(&det, 1.0f, pre, sizeof(pre) / sizeof(pre[0]), 256) == 0, "detect init");

    frames = malloc(NFRAMES * sizeof *frames);
    if (!frames)
        return 1;
    for (i = 0; i < NFRAMES; i++) {
        for (c = 0; c < HYD_NCHAN; c++) {
            size_t arrive = PING_AT + (HYD_NCHAN - 1 - c) * SPACING;
            frames[i][c] = noise(&seed);
            if (i >= arrive && i < arrive + PING_LEN)
                frames[i][c] += 1.0f;
        }
    }

    check(hyd_bandpass_work(&bp, (float *)frames, NFRAMES) == NFRAMES, "bandpass all frames");
    nout = hyd_beam_block_work(&bm, (const float (*)[HYD_NCHAN])frames, NFRAMES);
    check(nout == NFRAMES, "beam all frames");
    found = hyd_detect_work(&det, bm.out, nout);
    hyd_detect_finish(&det);
    check(found == 1 && det.nevents == 1, "exactly one event");
    if (det.nevents > 0) {
        const hyd_event *ev = &det.events[0];
        size_t aligned = PING_AT + (HYD_NCHAN - 1) * SPACING;
        printf("event at sample %llu peak %.2f channel %u\n", (unsigned long long)ev->sample,
               (double)ev->peak, (unsigned)ev->channel);
        check(ev->sample >= aligned && ev->sample < aligned + 8, "event where the aligned ping is");
        check(ev->peak > 1.8f && ev->peak < 2.2f, "beam peak is the gain times the ping");
    }

    /* ---- 16-bit PCM gain, saturating ---- */
    for (i = 0; i < sizeof(pcm) / sizeof(pcm[0]); i++)
        pcm[i] = (int16_t)((int)i * 256 - 32768);
    hyd_gain_i16(pcm, sizeof(pcm) / sizeof(pcm[0]), 4.0f);
    check(pcm[0] == -32768 && pcm[255] == 32767 && pcm[128] == 0, "i16 gain saturates");
    printf("pcm %d %d %d\n", pcm[0], pcm[128], pcm[255]);

    free(frames);
    hyd_detect_destroy(&det);
    hyd_detect_destroy(&det); /* a second destroy finds everything NULL */
    hyd_beam_block_destroy(&bm);
    hyd_bandpass_destroy(&bp);

    if (failures)
        return 1;
    printf("all checks passed\n");
    return 0;
}
