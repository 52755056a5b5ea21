//! Weather-lidar control daemon (the part that talks to the capture engine): configures the
//! engine through the C++ engine library, drains the DMA ring and integrates shot energy.

mod regs;
mod ring;

pub use regs::*;
pub use ring::*;

use core::ptr::{self, addr_of, addr_of_mut};

/// The engine library's handle (opaque; owned by the library).
#[repr(C)]
pub struct RlEngine {
    _private: [u8; 0],
}

extern "C" {
    fn rl_engine_open(regs: *mut RlRegs, ring: *mut RlRing) -> *mut RlEngine;
    fn rl_engine_close(e: *mut RlEngine);
    fn rl_engine_configure(e: *mut RlEngine, cfg: *const RlCaptureCfg) -> i32;
    fn rl_engine_drain(e: *mut RlEngine, out: *mut RlSlot, cap: usize) -> usize;
    fn rl_engine_status_word(e: *const RlEngine) -> u32;
}

/// The CTRL word for these settings, 0 when a value does not fit its bit-field.
#[no_mangle]
pub extern "C" fn rl_ctl_ctrl_word(mode: u8, threshold: u32, decim: u32) -> u32 {
    if mode > RlMode::Continuous as u8 || threshold > 0xfff || decim > 0xf {
        return 0;
    }
    CTRL_ENABLE
        | (mode as u32) << CTRL_MODE_SHIFT
        | threshold << CTRL_THRESHOLD_SHIFT
        | decim << CTRL_DECIM_SHIFT
        | CTRL_IRQ_EN
}

/// Sum of one shot's samples.
///
/// # Safety
/// `shot` is NULL or points to a record followed by its `nsamples` samples.
#[no_mangle]
pub unsafe extern "C" fn rl_ctl_shot_energy(shot: *const RlShotHdr) -> u64 {
    if shot.is_null() {
        return 0;
    }
    // (a packed struct: copy the field out rather than borrow it)
    let n = (*shot).nsamples as usize;
    let samples = addr_of!((*shot).samples) as *const u32;
    let s = core::slice::from_raw_parts(samples, n);
    s.iter().fold(0u64, |acc, &x| acc.wrapping_add(u64::from(x)))
}

const BUS_WINDOW: u32 = 0xa000_0000;

/// One capture round; see include/lidar/rl_regs.hpp.
///
/// # Safety
/// `regs` and `ring` point to the mapped register block and ring, `bufs` to `nbufs` shot records.
#[no_mangle]
pub unsafe extern "C" fn rl_ctl_run(
    regs: *mut RlRegs,
    ring: *mut RlRing,
    bufs: *const *const RlShotHdr,
    nbufs: usize,
    energy_out: *mut u64,
) -> i32 {
    if regs.is_null() || ring.is_null() || bufs.is_null() || energy_out.is_null() {
        return -1;
    }
    let e = rl_engine_open(regs, ring);
    if e.is_null() {
        return -1;
    }
    let cfg = RlCaptureCfg { mode: RlMode::Burst, decim: 2, threshold: 300, nslots: (*ring).nslots, gate_ns: 2_000 };
    if rl_engine_configure(e, &cfg) != 0 {
        rl_engine_close(e);
        return -1;
    }
    // the engine programmed CTRL through its bit-fields; the word must be the one we compute
    let ctrl = ptr::read_volatile(addr_of!((*regs).ctrl));
    if ctrl != rl_ctl_ctrl_word(cfg.mode as u8, u32::from(cfg.threshold), u32::from(cfg.decim)) {
        rl_engine_close(e);
        return -1;
    }
    let mut shots: i32 = 0;
    let mut energy: u64 = 0;
    let mut batch = [RlSlot::EMPTY; 4];
    loop {
        let n = rl_engine_drain(e, batch.as_mut_ptr(), batch.len());
        if n == 0 {
            break;
        }
        for s in batch.iter().take(n) {
            if s.status != 0 || s.flags & SLOT_DONE == 0 {
                continue;
            }
            let w = s.bus.words;
            if w.hi != BUS_WINDOW || s.bus.addr >> 32 != u64::from(BUS_WINDOW) {
                continue;
            }
            let idx = w.lo as usize;
            if idx >= nbufs {
                continue;
            }
            energy = energy.wrapping_add(rl_ctl_shot_energy(*bufs.add(idx)));
            shots = shots.saturating_add(1);
        }
    }
    let status = rl_engine_status_word(e);
    ptr::write_volatile(addr_of_mut!((*regs).irq_ack), 1);
    rl_engine_close(e);
    if status & (STATUS_BUSY | STATUS_OVERRUN) != 0 {
        return -1;
    }
    *energy_out = energy;
    shots
}
