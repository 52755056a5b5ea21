/* Shared types of the seismic-array front end: the digitiser's DMA descriptors and register
 * block as the FPGA lays them out, and the records the C kernels and the Rust picker exchange.
 * Every layout here is fixed by the hardware or the wire format, so it is pinned below with
 * _Static_assert and mirrored in rust/src/types.rs with the same numbers. */
#ifndef SEIS_TYPES_H
#define SEIS_TYPES_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#define SEIS_ADC_LANES 4
#define SEIS_ADC_BANKS 2
#define SEIS_SLOT_SAMPLES 8

/* Channel number as the digitiser counts it (Rust: a transparent newtype over u32). */
typedef uint32_t seis_chan_id;

/* Programmable-gain settings; stored in uint8_t fields. */
typedef enum seis_gain {
    SEIS_GAIN_X1 = 0,
    SEIS_GAIN_X4 = 1,
    SEIS_GAIN_X16 = 2,
    SEIS_GAIN_X64 = 3
} seis_gain;

/* One scatter-gather DMA descriptor. The FPGA reads it as 32 little-endian bytes: the explicit
 * reserved word keeps `addr` at offset 8 on i386 too, where uint64_t is only 4-aligned in structs. */
typedef struct seis_dma_desc {
    uint32_t ctrl;
    uint32_t rsvd0;
    uint64_t addr;
    uint32_t len_bytes;
    seis_chan_id chan;
    uint64_t next;
} seis_dma_desc;

/* One ADC bank's registers. */
typedef struct seis_adc_regs {
    uint32_t ctrl;
    uint32_t status;
    uint16_t gain_code[SEIS_ADC_LANES];
    int32_t offset_uv[SEIS_ADC_LANES];
} seis_adc_regs;

/* The register block (BAR0), as a snapshot in memory. */
typedef struct seis_regs {
    uint32_t id;
    uint32_t version;
    seis_adc_regs adc[SEIS_ADC_BANKS];
    uint64_t timestamp_ns;
    seis_dma_desc ring_head;
} seis_regs;

/* A raw sample word: two 16-bit I/Q halves, the 32-bit code, or a calibrated float. */
typedef union seis_sample_word {
    uint32_t raw;
    int16_t iq[2];
    float volts;
} seis_sample_word;

/* Header of a frame on the telemetry link: packed, 15 bytes. */
typedef struct __attribute__((packed)) seis_wire_hdr {
    uint8_t kind;
    uint32_t seq;
    uint64_t t_ns;
    uint16_t n_samples;
} seis_wire_hdr;

/* One slot of the acquisition ring: one cache line each, so the FPGA and the CPU never share one. */
typedef struct seis_ring_slot {
    uint64_t seq;
    uint32_t fill;
    uint32_t flags;
    int32_t samples[SEIS_SLOT_SAMPLES];
} __attribute__((aligned(64))) seis_ring_slot;

/* Per-channel configuration, built by the application and read by the kernels and the picker. */
typedef struct seis_chan_cfg {
    seis_chan_id chan;
    uint8_t gain; /* a seis_gain value */
    bool enabled;
    uint16_t decim;
    float cutoff_hz;
} seis_chan_cfg;

/* An onset the picker found, written by the picker for the application. */
typedef struct seis_pick {
    uint64_t sample; /* index in the decimated stream */
    float ratio;     /* STA/LTA at the onset */
    seis_chan_id chan;
    uint8_t gain;    /* the seis_gain the channel ran at */
    bool confirmed;
    uint8_t rsvd[6]; /* 24 bytes on i386 too */
} seis_pick;

/* Digitiser operations: the picker pulls samples through this table. Any entry may be NULL. */
typedef struct seis_dig_ops {
    int (*start)(void *ctx, seis_chan_id chan);
    ptrdiff_t (*read)(void *ctx, int32_t *dst, size_t max_samples);
    void (*stop)(void *ctx);
    void *ctx;
} seis_dig_ops;

_Static_assert(sizeof(seis_dma_desc) == 32, "DMA descriptor is 32 bytes");
_Static_assert(offsetof(seis_dma_desc, addr) == 8, "addr at 8 on every target");
_Static_assert(offsetof(seis_dma_desc, next) == 24, "next at 24 on every target");
_Static_assert(sizeof(seis_adc_regs) == 32, "ADC bank is 32 bytes");
_Static_assert(offsetof(seis_adc_regs, offset_uv) == 16, "offsets after the gain codes");
_Static_assert(sizeof(seis_regs) == 112, "register block is 112 bytes");
_Static_assert(offsetof(seis_regs, timestamp_ns) == 72, "timestamp at 72");
_Static_assert(offsetof(seis_regs, ring_head) == 80, "ring head at 80");
_Static_assert(sizeof(seis_sample_word) == 4, "sample word is 4 bytes");
_Static_assert(sizeof(seis_wire_hdr) == 15, "wire header is packed");
_Static_assert(_Alignof(seis_wire_hdr) == 1, "wire header is byte-aligned");
_Static_assert(offsetof(seis_wire_hdr, n_samples) == 13, "sample count at 13");
_Static_assert(sizeof(seis_ring_slot) == 64, "one ring slot per cache line");
_Static_assert(_Alignof(seis_ring_slot) == 64, "ring slot is cache-line aligned");
_Static_assert(sizeof(seis_chan_cfg) == 12, "channel config is 12 bytes");
_Static_assert(offsetof(seis_chan_cfg, enabled) == 5, "enabled flag at 5");
_Static_assert(offsetof(seis_chan_cfg, cutoff_hz) == 8, "cutoff at 8");
_Static_assert(sizeof(seis_pick) == 24, "pick record is 24 bytes");
_Static_assert(offsetof(seis_pick, gain) == 16, "gain at 16");
_Static_assert(sizeof(seis_dig_ops) == 4 * sizeof(void *), "ops table is four pointers");

#endif
