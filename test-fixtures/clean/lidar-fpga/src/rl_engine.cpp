// The capture engine library: owns the engine state, programs the registers through their
// bit-fields and drains the DMA ring. Its C interface is declared in include/lidar/rl_regs.hpp.
#include "lidar/rl_regs.hpp"

#include <new>

struct rl_engine {
    rl_regs *regs;
    rl_ring *ring;
    rl_capture_cfg cfg;
};

extern "C" rl_engine *rl_engine_open(rl_regs *regs, rl_ring *ring) {
    if (regs == nullptr || ring == nullptr) return nullptr;
    if (regs->id != RL_REGS_ID || ring->magic != RL_RING_MAGIC) return nullptr;
    const uint32_t n = ring->nslots;
    if (n == 0 || (n & (n - 1)) != 0) return nullptr;
    return new (std::nothrow) rl_engine{regs, ring, rl_capture_cfg{}};
}

extern "C" void rl_engine_close(rl_engine *e) {
    if (e == nullptr) return;
    e->regs->ctrl.enable = 0;
    delete e;
}

extern "C" int32_t rl_engine_configure(rl_engine *e, const rl_capture_cfg *cfg) {
    if (e == nullptr || cfg == nullptr) return -1;
    if (cfg->threshold > 0xfff || cfg->decim > 0xf || cfg->nslots != e->ring->nslots) return -1;
    switch (cfg->mode) {
    case rl_mode::idle:
    case rl_mode::single:
    case rl_mode::burst:
    case rl_mode::continuous:
        break;
    default:
        return -1;
    }
    e->cfg = *cfg;
    volatile rl_ctrl_reg &c = e->regs->ctrl;
    c.mode = static_cast<uint32_t>(cfg->mode);
    c.threshold = cfg->threshold;
    c.decim = cfg->decim;
    c.irq_en = 1;
    c.enable = 1;
    return 0;
}

extern "C" size_t rl_engine_drain(rl_engine *e, rl_slot *out, size_t cap) {
    if (e == nullptr || (out == nullptr && cap != 0)) return 0;
    rl_ring *r = e->ring;
    const uint32_t mask = r->nslots - 1;
    uint32_t tail = r->tail;
    size_t n = 0;
    while (n < cap && tail != r->head) {
        out[n++] = r->slots[tail & mask];
        tail++;
    }
    r->tail = tail;
    return n;
}

extern "C" uint32_t rl_engine_status_word(const rl_engine *e) {
    if (e == nullptr) return 0;
    const volatile rl_status_reg &s = e->regs->status;
    return uint32_t{s.busy} | uint32_t{s.overrun} << 1 | uint32_t{s.fifo_level} << 8 | uint32_t{s.last_err} << 24;
}
