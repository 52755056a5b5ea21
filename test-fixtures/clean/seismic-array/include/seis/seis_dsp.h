/* C kernels of the seismic-array front end (csrc/), called from the Rust picker. */
#ifndef SEIS_DSP_H
#define SEIS_DSP_H

#include <sys/types.h>
#include "seis_types.h"

/* Boxcar-averages groups of `factor` input samples into out; writes at most max_out values and
 * returns how many it wrote. factor 0 writes nothing. */
size_t seis_decimate(const int32_t *in, size_t n_in, uint32_t factor, float *out, size_t max_out);

/* CRC-32 (IEEE 802.3 polynomial) of nbytes bytes. */
uint32_t seis_crc32(const uint8_t *data, size_t nbytes);

/* Links n descriptors into a ring over one buffer at bus address base, seg_len bytes each.
 * Returns 0, or -1 when descs is NULL or n is 0. */
int seis_desc_chain(seis_dma_desc *descs, size_t n, uint64_t base, uint32_t seg_len, seis_chan_id chan);

/* Copies the live register block into *out; returns the number of bytes copied, or -1. */
ssize_t seis_regs_snapshot(const seis_regs *live, seis_regs *out);

/* Offset of the local clock from GPS time, in microseconds. */
long seis_clock_offset_us(int64_t local_ns, int64_t gps_ns);

/* Writes the station code "NN.SSSS" into buf (cap bytes, NUL-terminated); returns its length,
 * or -1 when it does not fit. */
int seis_station_code(char *buf, size_t cap, uint16_t network, uint16_t station);

/* Decodes a telemetry header from nbytes bytes; returns 0, or -1 when nbytes is too short. */
int seis_wire_decode(const uint8_t *bytes, size_t nbytes, seis_wire_hdr *out);

/* A sample word's I half in volts, given the size of one LSB in microvolts. */
float seis_word_volts(seis_sample_word w, float lsb_uv);

/* Name of a gain setting ("x1", "x4", ...), or "?" for a value outside seis_gain. */
const char *seis_gain_name(uint8_t gain);

#endif
