/* Seismic array packet header: fixed-width fields, explicit padding, asserts hold everywhere. */
#include <stddef.h>
#include <stdint.h>

struct seis_pkt {
    uint32_t station;
    uint32_t reserved;
    uint64_t t_ns;
} __attribute__((aligned(8)));

_Static_assert(sizeof(struct seis_pkt) == 16, "packet header is 16 bytes");
_Static_assert(offsetof(struct seis_pkt, t_ns) == 8, "timestamp at 8");
_Static_assert(_Alignof(struct seis_pkt) == 8, "8-aligned");
_Static_assert(sizeof(int32_t) == 4, "");
