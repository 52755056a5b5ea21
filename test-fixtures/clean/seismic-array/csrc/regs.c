/* Descriptor rings, register snapshots and telemetry headers. */
#include <stdio.h>
#include <string.h>
#include "seis/seis_dsp.h"

int seis_desc_chain(seis_dma_desc *descs, size_t n, uint64_t base, uint32_t seg_len, seis_chan_id chan)
{
    if (descs == NULL || n == 0)
        return -1;
    for (size_t i = 0; i < n; i++) {
        size_t next = (i + 1) % n;
        descs[i].ctrl = 1u; /* owned by the FPGA */
        descs[i].rsvd0 = 0;
        descs[i].addr = base + (uint64_t)i * seg_len;
        descs[i].len_bytes = seg_len;
        descs[i].chan = chan;
        descs[i].next = base + (uint64_t)next * seg_len;
    }
    return 0;
}

ssize_t seis_regs_snapshot(const seis_regs *live, seis_regs *out)
{
    if (live == NULL || out == NULL)
        return -1;
    memcpy(out, live, sizeof *out);
    return (ssize_t)sizeof *out;
}

long seis_clock_offset_us(int64_t local_ns, int64_t gps_ns)
{
    return (long)((local_ns - gps_ns) / 1000);
}

int seis_station_code(char *buf, size_t cap, uint16_t network, uint16_t station)
{
    int len;
    if (buf == NULL || cap == 0)
        return -1;
    len = snprintf(buf, cap, "%02u.%04u", (unsigned)(network % 100u), (unsigned)(station % 10000u));
    return (len < 0 || (size_t)len >= cap) ? -1 : len;
}

int seis_wire_decode(const uint8_t *bytes, size_t nbytes, seis_wire_hdr *out)
{
    if (bytes == NULL || out == NULL || nbytes < sizeof *out)
        return -1;
    memcpy(out, bytes, sizeof *out);
    return 0;
}
