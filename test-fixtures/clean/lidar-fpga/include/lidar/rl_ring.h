/* Weather-lidar receiver: the DMA ring the FPGA capture engine fills, and the shot records it
 * writes into each slot's buffer. Plain C11, also included by the C++ engine library. The Rust
 * control daemon mirrors these types in daemon/src/ring.rs; both files pin the same numbers. */
#ifndef RL_RING_H
#define RL_RING_H

#include <stdalign.h>
#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

#define RL_RING_MAGIC 0x524c5247u /* "RLRG" */

/* One ring slot, written by the FPGA, read by the engine. The bus address is one 64-bit word to
 * the DMA engine and two 32-bit register writes to the slot programmer. */
typedef struct rl_slot {
    union {
        uint64_t bus_addr;
        struct {
            uint32_t bus_lo;
            uint32_t bus_hi;
        };
    };
    uint32_t len;   /* bytes of shot data at bus_addr */
    uint16_t flags; /* RL_SLOT_* */
    uint8_t gate;   /* range gate index */
    uint8_t status; /* 0 = ok, else FPGA error code */
} rl_slot;

#define RL_SLOT_DONE 0x0001u
#define RL_SLOT_OVERRUN 0x0002u

/* Ring header at the start of the DMA area: the slots follow it (flexible array member, C11
 * 6.7.2.1p18). The FPGA needs the header on a 16-byte boundary. */
typedef struct rl_ring {
    alignas(16) uint32_t magic;
    uint32_t nslots;        /* a power of two */
    volatile uint32_t head; /* written by the FPGA */
    volatile uint32_t tail; /* written by the engine */
    rl_slot slots[];
} rl_ring;

/* One shot as the FPGA writes it: packed to 4 so the 64-bit timestamp sits right after the shot
 * counter on every target, then the samples (flexible array member). */
#pragma pack(push, 4)
typedef struct rl_shot_hdr {
    uint32_t shot;
    uint64_t t_ns;
    uint32_t nsamples;
    uint32_t samples[];
} rl_shot_hdr;
#pragma pack(pop)

/* (C++ has no _Static_assert: rl_regs.hpp pins the same numbers with static_assert) */
#ifndef __cplusplus
_Static_assert(sizeof(rl_slot) == 16, "rl_slot is 16 bytes on every target");
_Static_assert(offsetof(rl_slot, len) == 8, "rl_slot.len at 8");
_Static_assert(offsetof(rl_slot, gate) == 14, "rl_slot.gate at 14");
_Static_assert(sizeof(rl_ring) == 16, "rl_ring header is 16 bytes");
_Static_assert(alignof(rl_ring) == 16, "rl_ring is 16-aligned");
_Static_assert(offsetof(rl_ring, slots) == 16, "slots follow the header");
_Static_assert(sizeof(rl_shot_hdr) == 16, "rl_shot_hdr is 16 bytes");
_Static_assert(alignof(rl_shot_hdr) == 4, "rl_shot_hdr is 4-aligned under pack(4)");
_Static_assert(offsetof(rl_shot_hdr, t_ns) == 4, "t_ns right after shot");
_Static_assert(offsetof(rl_shot_hdr, samples) == 16, "samples after the header");
#endif

#ifdef __cplusplus
}
#endif

#endif /* RL_RING_H */
