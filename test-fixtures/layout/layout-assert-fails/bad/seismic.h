/* Seismic array packet header; the asserts were written on an x86_64 workstation. */
#include <stddef.h>
#include <stdint.h>

struct seis_pkt {
    uint32_t station;
    uint64_t t_ns;
};

struct seis_window {
    uint32_t first;
    long count;
};

_Static_assert(sizeof(struct seis_pkt) == 16, "packet header is 16 bytes");
_Static_assert(offsetof(struct seis_pkt, t_ns) == 8, "timestamp after padding");
_Static_assert(sizeof(struct seis_window) == 16, "window is 16 bytes");
_Static_assert(sizeof(long) == 8, "LP64 only");
