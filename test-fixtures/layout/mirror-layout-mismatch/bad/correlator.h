/* Radio-telescope correlator: headers shared between the C++ blocks and the Rust kernels. */
#ifndef CORRELATOR_H
#define CORRELATOR_H
#include <stdint.h>

/* Frame header written by the digitiser block. */
struct corr_frame_hdr {
    uint32_t magic;
    uint32_t seq;
    long timestamp_us;
    float gain;
};

/* Per-baseline configuration. */
struct corr_cfg {
    float scale;
    uint32_t nchan;
};

/* DMA descriptor shared with the FPGA fabric: no padding allowed. */
struct __attribute__((packed)) corr_dma_desc {
    uint8_t flags;
    uint64_t addr;
    uint16_t len;
};

/* One slot of the sample ring, cache-line aligned. */
struct __attribute__((aligned(64))) corr_ring_slot {
    uint32_t head;
    uint32_t tail;
};

/* FIR taps for the channeliser. */
struct corr_taps {
    uint32_t ntaps;
    float taps[16];
};

/* Running statistics, mirrored in Rust under another name. */
struct corr_stats {
    uint64_t frames;
    uint32_t dropped;
    uint32_t overruns;
};

void corr_push(const struct corr_frame_hdr *hdr, const struct corr_cfg *cfg);
void corr_dma(struct corr_dma_desc *ring, uint32_t n);
void corr_ring(struct corr_ring_slot *slot);
void corr_set_taps(const struct corr_taps *taps);

#endif
