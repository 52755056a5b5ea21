/* Acquisition application: drives a simulated digitiser through the Rust picker and the C
 * kernels, and checks every answer. Exit status 0 when all agree. */
#include <stdio.h>
#include <string.h>
#include "seis/seis_dsp.h"
#include "seis/seis_picker.h"

#define SIM_SAMPLES 4096
#define SIM_ONSET 2400

/* A simulated digitiser: quiet noise, then a burst. */
typedef struct sim_digitiser {
    uint32_t pos;
    uint32_t lcg;
    int started;
} sim_digitiser;

static int sim_start(void *ctx, seis_chan_id chan)
{
    sim_digitiser *d = ctx;
    (void)chan;
    d->started = 1;
    return 0;
}

static ptrdiff_t sim_read(void *ctx, int32_t *dst, size_t max_samples)
{
    sim_digitiser *d = ctx;
    size_t k = 0;
    if (!d->started)
        return -1;
    for (; k < max_samples && d->pos < SIM_SAMPLES; k++, d->pos++) {
        d->lcg = d->lcg * 1103515245u + 12345u;
        int32_t noise = (int32_t)((d->lcg >> 16) & 0xFF) - 128;
        dst[k] = d->pos >= SIM_ONSET ? noise * 40 : noise;
    }
    return (ptrdiff_t)k;
}

static void sim_stop(void *ctx)
{
    sim_digitiser *d = ctx;
    d->started = 0;
}

int main(void)
{
    int failures = 0;
    sim_digitiser sim = {0, 1u, 0};
    const seis_dig_ops ops = {sim_start, sim_read, sim_stop, &sim};
    const seis_chan_cfg cfg = {3u, SEIS_GAIN_X16, true, 4, 25.0f};
    int32_t scratch[256];
    float dec[64];
    char label[32];

    seis_picker *p = seis_picker_new(&cfg, 0.5f, 5.0f, 200.0f);
    if (p == NULL)
        return 2;
    failures += seis_picker_set_name(p, "ST01.BHZ") != 0;
    seis_picker_set_ops(p, &ops);
    ops.start(ops.ctx, cfg.chan);
    for (;;) {
        ssize_t got = seis_picker_pull(p, scratch, sizeof scratch / sizeof scratch[0], dec, sizeof dec / sizeof dec[0]);
        if (got <= 0)
            break;
        seis_picker_feed(p, dec, (size_t)got);
    }
    ops.stop(ops.ctx);

    const seis_pick pick = seis_picker_last(p);
    failures += pick.ratio <= 0.0f;
    failures += seis_picker_onsets(p) != 1;
    failures += pick.gain != SEIS_GAIN_X16 || pick.chan != 3u;
    failures += pick.sample < SIM_ONSET / 4 || pick.sample > SIM_ONSET / 4 + 8;
    printf("onsets %llu, first at decimated sample %llu (ratio %.1f)\n",
           (unsigned long long)seis_picker_onsets(p), (unsigned long long)pick.sample, (double)pick.ratio);
    seis_picker_free(p);

    seis_dma_desc ring[4];
    failures += seis_ring_setup(ring, sizeof ring / sizeof ring[0], 0x10000000u, 4096u, 3u) != 4;

    static seis_ring_slot slot;
    const int32_t five[5] = {1, -2, 3, -4, 5};
    failures += seis_ring_fill(&slot, five, 5, 42u) != 5 || slot.samples[4] != 5 || slot.seq != 42u;

    seis_wire_hdr hdr;
    failures += seis_frame_header(7u, 123456789u, 256u, &hdr) == 0 || hdr.n_samples != 256u;

    seis_regs live, copy;
    memset(&live, 0, sizeof live);
    live.id = 0x5E15u;
    live.adc[1].offset_uv[3] = -17;
    live.ring_head = ring[0];
    failures += seis_regs_capture(&live, &copy) != (ssize_t)sizeof copy || memcmp(&live, &copy, sizeof copy) != 0;

    failures += seis_clock_offset_clamped(5000000000LL, 1000LL) != 1000000L;
    failures += seis_clock_offset_clamped(1000LL, 3000LL) != -2L;

    int len = seis_channel_label(&cfg, 7u, 42u, label, sizeof label);
    failures += len < 0 || strcmp(label, "07.0042 x16") != 0;
    printf("label %s\n", label);

    seis_sample_word w;
    w.iq[0] = 4000;
    w.iq[1] = -5;
    float v = seis_sample_volts(w);
    failures += v < 0.0099f || v > 0.0101f;

    printf("%s\n", failures ? "FAILED" : "all checks passed");
    return failures ? 1 : 0;
}
