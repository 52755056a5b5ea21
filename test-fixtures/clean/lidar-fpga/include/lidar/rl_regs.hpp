// Weather-lidar receiver: register map of the FPGA capture engine as user space sees it through
// mmap, and the engine library's C interface (defined in src/rl_engine.cpp, called by the Rust
// control daemon; the daemon's exports are declared at the end). Mirrored in daemon/src/regs.rs.
#pragma once

#include <stddef.h>
#include <stdint.h>

#include "rl_ring.h"

// Capture mode, one byte in the control register and in rl_capture_cfg.
enum class rl_mode : uint8_t {
    idle = 0,
    single = 1,
    burst = 2,
    continuous = 3,
};

// CTRL register (offset 0x04). Bit-fields of uint32_t, allocated from bit 0 on these
// little-endian ABIs; the Rust side reads and writes the whole word.
struct rl_ctrl_reg {
    uint32_t enable : 1;
    uint32_t mode : 3;
    uint32_t : 4;
    uint32_t threshold : 12;
    uint32_t decim : 4;
    uint32_t irq_en : 1;
    uint32_t : 7;
};

// STATUS register (offset 0x08), read-only to software.
struct rl_status_reg {
    uint32_t busy : 1;
    uint32_t overrun : 1;
    uint32_t : 6;
    uint32_t fifo_level : 10;
    uint32_t : 6;
    uint32_t last_err : 8;
};

// The register block at the start of BAR0.
struct rl_regs {
    volatile uint32_t id;              // 0x00: RL_REGS_ID
    volatile rl_ctrl_reg ctrl;         // 0x04
    volatile rl_status_reg status;     // 0x08
    volatile uint32_t irq_ack;         // 0x0c: write 1 to clear
    volatile uint64_t ring_bus_addr;   // 0x10
    volatile uint32_t ring_nslots;     // 0x18
    volatile uint32_t shots_done;      // 0x1c
};

// Capture configuration the daemon hands to the engine; the engine keeps a copy.
struct alignas(16) rl_capture_cfg {
    rl_mode mode;
    uint8_t decim;
    uint16_t threshold;
    uint32_t nslots;
    uint64_t gate_ns;
};

static_assert(sizeof(rl_ctrl_reg) == 4, "CTRL is one 32-bit register");
static_assert(alignof(rl_ctrl_reg) == 4, "CTRL is 4-aligned");
static_assert(sizeof(rl_status_reg) == 4, "STATUS is one 32-bit register");
static_assert(sizeof(rl_mode) == 1, "rl_mode is one byte");
static_assert(offsetof(rl_regs, status) == 0x08, "STATUS at 0x08");
static_assert(offsetof(rl_regs, ring_bus_addr) == 0x10, "RING_BUS_ADDR at 0x10");
static_assert(offsetof(rl_regs, shots_done) == 0x1c, "SHOTS_DONE at 0x1c");
static_assert(sizeof(rl_regs) == 32, "register block is 32 bytes");
static_assert(sizeof(rl_capture_cfg) == 16, "rl_capture_cfg is 16 bytes");
static_assert(alignof(rl_capture_cfg) == 16, "rl_capture_cfg is 16-aligned");
static_assert(offsetof(rl_capture_cfg, nslots) == 4, "nslots at 4");
static_assert(offsetof(rl_capture_cfg, gate_ns) == 8, "gate_ns at 8");
static_assert(sizeof(rl_slot) == 16, "rl_slot is 16 bytes on every target");
static_assert(offsetof(rl_slot, len) == 8, "rl_slot.len at 8");
static_assert(sizeof(rl_ring) == 16 && alignof(rl_ring) == 16, "rl_ring header: 16 bytes, 16-aligned");
static_assert(offsetof(rl_ring, slots) == 16, "slots follow the header");
static_assert(sizeof(rl_shot_hdr) == 16, "rl_shot_hdr is 16 bytes");
static_assert(offsetof(rl_shot_hdr, t_ns) == 4, "t_ns right after shot");

#define RL_REGS_ID 0x524c0102u

typedef struct rl_engine rl_engine;

extern "C" {
// Defined in src/rl_engine.cpp.

// Takes over the mapped registers and ring (both must outlive the engine); NULL if the register
// block does not identify as a capture engine or the ring header is not initialised.
rl_engine *rl_engine_open(rl_regs *regs, rl_ring *ring);
// NULL is allowed.
void rl_engine_close(rl_engine *e);
// Programs CTRL from cfg (copied); 0 on success, -1 on a bad configuration.
int32_t rl_engine_configure(rl_engine *e, const rl_capture_cfg *cfg);
// Copies up to cap completed slots into out[0..cap) and frees them in the ring; returns how many.
size_t rl_engine_drain(rl_engine *e, rl_slot *out, size_t cap);
// The STATUS register as one word.
uint32_t rl_engine_status_word(const rl_engine *e);

// Defined in the Rust daemon (daemon/src/lib.rs).

// The CTRL word for these settings (threshold is 12 bits, decim 4), 0 if out of range.
uint32_t rl_ctl_ctrl_word(uint8_t mode, uint32_t threshold, uint32_t decim);
// Sum of the shot's samples; the record is nsamples words after its header.
uint64_t rl_ctl_shot_energy(const rl_shot_hdr *shot);
// One capture round: configures the engine, drains the ring and sums the energy of every
// completed shot (bufs[i] is the shot record slot i's bus address stands for). Returns the
// number of shots, -1 on error.
int32_t rl_ctl_run(rl_regs *regs, rl_ring *ring, const rl_shot_hdr *const *bufs, size_t nbufs, uint64_t *energy_out);
}
