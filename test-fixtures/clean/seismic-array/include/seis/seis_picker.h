/* The Rust STA/LTA onset picker (rust/src/), called from the acquisition application. */
#ifndef SEIS_PICKER_H
#define SEIS_PICKER_H

#include <sys/types.h>
#include "seis_types.h"

typedef struct seis_picker seis_picker;

/* Makes a picker for one channel; NULL when cfg is NULL or the windows are not positive.
 * Release it with seis_picker_free. */
seis_picker *seis_picker_new(const seis_chan_cfg *cfg, float sta_s, float lta_s, float rate_hz);

/* Releases a picker; p may be NULL. */
void seis_picker_free(seis_picker *p);

/* Names the picker (copied); name must be a NUL-terminated string. Returns 0, or -1. */
int seis_picker_set_name(seis_picker *p, const char *name);

/* Installs the digitiser operations the picker pulls samples through (copied). */
void seis_picker_set_ops(seis_picker *p, const seis_dig_ops *ops);

/* Pulls up to max_samples samples through the ops table into scratch, decimates them into out
 * (at most max_out values) and returns how many values it wrote, or -1 when the read failed. */
ssize_t seis_picker_pull(seis_picker *p, int32_t *scratch, size_t max_samples, float *out, size_t max_out);

/* Feeds n decimated samples; returns the index of the first onset in them, or -1. */
ssize_t seis_picker_feed(seis_picker *p, const float *samples, size_t n);

/* The last onset; all zero (ratio 0) when there is none yet. */
seis_pick seis_picker_last(const seis_picker *p);

/* Number of onsets found so far. */
uint64_t seis_picker_onsets(const seis_picker *p);

/* Fills one ring slot from up to SEIS_SLOT_SAMPLES samples; returns how many it stored.
 * slot must not be NULL. */
uint32_t seis_ring_fill(seis_ring_slot *slot, const int32_t *samples, size_t n, uint64_t seq);

/* Links n descriptors into a ring over one buffer (through seis_desc_chain) and checks it: every
 * `next` points at the following descriptor and every length is seg_len. Returns the number of
 * descriptors that pass (0 when descs is NULL). */
size_t seis_ring_setup(seis_dma_desc *descs, size_t n, uint64_t base, uint32_t seg_len, seis_chan_id chan);

/* Builds the telemetry header for a frame and checks it through the C decoder:
 * returns the CRC-32 of the encoded header, or 0 when the round trip differs. */
uint32_t seis_frame_header(uint32_t seq, uint64_t t_ns, uint16_t n_samples, seis_wire_hdr *out);

/* Registers snapshot: copies live into *out and returns the bytes copied, or -1. */
ssize_t seis_regs_capture(const seis_regs *live, seis_regs *out);

/* Clock offset in microseconds, clamped to +/- one second. */
long seis_clock_offset_clamped(int64_t local_ns, int64_t gps_ns);

/* Writes "<station code> <gain name>" into buf (cap bytes, NUL-terminated); returns its
 * length, or -1. */
int seis_channel_label(const seis_chan_cfg *cfg, uint16_t network, uint16_t station, char *buf, size_t cap);

/* A raw word's I half in volts. */
float seis_sample_volts(seis_sample_word w);

#endif
