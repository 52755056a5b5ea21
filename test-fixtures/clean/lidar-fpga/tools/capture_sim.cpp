// Test driver: plays the FPGA. The "mapped" registers and DMA area are heap buffers; the driver
// fills the ring with completed shots, runs one capture round of the Rust daemon, then checks
// what the daemon and the engine left in the registers through the C++ bit-fields.
#include "lidar/rl_regs.hpp"

#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <new>

namespace {

int failures = 0;

void check(bool ok, const char *what) {
    if (!ok) {
        std::printf("FAIL %s\n", what);
        failures++;
    }
}

rl_shot_hdr *make_shot(uint32_t shot, uint32_t nsamples) {
    void *mem = std::malloc(sizeof(rl_shot_hdr) + nsamples * sizeof(uint32_t));
    if (mem == nullptr) std::abort();
    rl_shot_hdr *h = static_cast<rl_shot_hdr *>(mem);
    h->shot = shot;
    h->t_ns = 1'000'000'000ull * shot + 250;
    h->nsamples = nsamples;
    for (uint32_t i = 0; i < nsamples; i++) h->samples[i] = shot * 100 + i;
    return h;
}

} // namespace

int main() {
    // the CTRL word the daemon computes equals the bit-field layout the compiler uses
    rl_ctrl_reg want{};
    want.enable = 1;
    want.mode = 3;
    want.threshold = 0xabc;
    want.decim = 5;
    want.irq_en = 1;
    uint32_t want_word;
    std::memcpy(&want_word, &want, sizeof want_word);
    check(rl_ctl_ctrl_word(3, 0xabc, 5) == want_word, "ctrl word layout");
    check(rl_ctl_ctrl_word(4, 1, 1) == 0 && rl_ctl_ctrl_word(1, 0x1000, 1) == 0, "ctrl word range");
    check(rl_ctl_shot_energy(nullptr) == 0, "energy of NULL");

    rl_regs *regs = new rl_regs{};
    regs->id = RL_REGS_ID;
    regs->status.fifo_level = 5;

    const uint32_t nslots = 8;
    const size_t ring_bytes = sizeof(rl_ring) + nslots * sizeof(rl_slot);
    void *dma = ::operator new(ring_bytes, std::align_val_t{alignof(rl_ring)});
    std::memset(dma, 0, ring_bytes);
    rl_ring *ring = static_cast<rl_ring *>(dma);
    ring->magic = RL_RING_MAGIC;
    ring->nslots = nslots;

    // six slots written by the "FPGA", the ring wrapped once (tail 5, head 11); slot 3 failed
    const size_t nbufs = 6;
    rl_shot_hdr *bufs[nbufs];
    for (uint32_t i = 0; i < nbufs; i++) bufs[i] = make_shot(i + 1, 16 + 4 * i);
    ring->tail = 5;
    for (uint32_t i = 0; i < nbufs; i++) {
        rl_slot &s = ring->slots[(5 + i) & (nslots - 1)];
        s.bus_lo = i;
        s.bus_hi = 0xa0000000u;
        s.len = static_cast<uint32_t>(sizeof(rl_shot_hdr) + bufs[i]->nsamples * sizeof(uint32_t));
        s.flags = RL_SLOT_DONE;
        s.gate = static_cast<uint8_t>(i);
        s.status = i == 3 ? 7 : 0;
    }
    ring->head = 5 + nbufs;

    uint64_t energy = 0;
    const int32_t shots = rl_ctl_run(regs, ring, bufs, nbufs, &energy);
    uint64_t expect = 0;
    for (uint32_t i = 0; i < nbufs; i++)
        if (i != 3)
            for (uint32_t k = 0; k < bufs[i]->nsamples; k++) expect += bufs[i]->samples[k];
    check(shots == 5, "five good shots");
    check(energy == expect, "energy");
    check(ring->tail == ring->head, "ring drained");
    check(regs->irq_ack == 1, "irq acknowledged");
    check(regs->ctrl.enable == 0 && regs->ctrl.mode == 2 && regs->ctrl.threshold == 300 && regs->ctrl.decim == 2 && regs->ctrl.irq_en == 1, "ctrl bit-fields");

    // an overrun makes the round fail, and the engine refuses a ring that is not set up
    regs->status.overrun = 1;
    ring->head = ring->tail;
    check(rl_ctl_run(regs, ring, bufs, nbufs, &energy) == -1, "overrun reported");
    ring->magic = 0;
    check(rl_ctl_run(regs, ring, bufs, nbufs, &energy) == -1, "bad ring refused");
    check(rl_engine_open(nullptr, ring) == nullptr, "open NULL");
    rl_engine_close(nullptr);

    std::printf("shots %d energy %llu ctrl %08x\n", shots, static_cast<unsigned long long>(energy), want_word);
    for (rl_shot_hdr *b : bufs) std::free(b);
    ::operator delete(dma, std::align_val_t{alignof(rl_ring)});
    delete regs;
    if (failures == 0) std::printf("all checks passed\n");
    return failures == 0 ? 0 : 1;
}
