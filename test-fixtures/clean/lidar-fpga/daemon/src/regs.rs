//! Mirror of the register map in include/lidar/rl_regs.hpp. Rust has no bit-fields, so the CTRL
//! and STATUS registers are whole `u32` words here (common practice) and the daemon shifts and
//! masks; the bit positions are those the psABIs give the C++ bit-fields (allocated from bit 0).

use core::mem::{align_of, offset_of, size_of};

/// Capture mode; `enum class rl_mode : uint8_t` in C++. Only the daemon writes it (into
/// `RlCaptureCfg`, handed to the engine behind a const pointer).
#[repr(u8)]
#[derive(Clone, Copy, PartialEq, Eq, Debug)]
pub enum RlMode {
    Idle = 0,
    Single = 1,
    Burst = 2,
    Continuous = 3,
}

/// The register block at the start of BAR0. Accessed only through volatile reads and writes.
#[repr(C)]
pub struct RlRegs {
    pub id: u32,
    pub ctrl: u32,
    pub status: u32,
    pub irq_ack: u32,
    pub ring_bus_addr: u64,
    pub ring_nslots: u32,
    pub shots_done: u32,
}

/// Capture configuration handed to the engine (`struct alignas(16) rl_capture_cfg`).
#[repr(C, align(16))]
#[derive(Clone, Copy)]
pub struct RlCaptureCfg {
    pub mode: RlMode,
    pub decim: u8,
    pub threshold: u16,
    pub nslots: u32,
    pub gate_ns: u64,
}

pub const REGS_ID: u32 = 0x524c_0102;

// CTRL bits: enable 0, mode 1..=3, (4..=7 reserved), threshold 8..=19, decim 20..=23, irq_en 24.
pub const CTRL_ENABLE: u32 = 1 << 0;
pub const CTRL_MODE_SHIFT: u32 = 1;
pub const CTRL_THRESHOLD_SHIFT: u32 = 8;
pub const CTRL_DECIM_SHIFT: u32 = 20;
pub const CTRL_IRQ_EN: u32 = 1 << 24;
// STATUS bits: busy 0, overrun 1, fifo_level 8..=17, last_err 24..=31.
pub const STATUS_BUSY: u32 = 1 << 0;
pub const STATUS_OVERRUN: u32 = 1 << 1;

const _: () = assert!(size_of::<RlMode>() == 1);
const _: () = assert!(size_of::<RlRegs>() == 32);
const _: () = assert!(offset_of!(RlRegs, status) == 0x08);
const _: () = assert!(offset_of!(RlRegs, ring_bus_addr) == 0x10);
const _: () = assert!(offset_of!(RlRegs, shots_done) == 0x1c);
const _: () = assert!(size_of::<RlCaptureCfg>() == 16);
const _: () = assert!(align_of::<RlCaptureCfg>() == 16);
const _: () = assert!(offset_of!(RlCaptureCfg, nslots) == 4);
const _: () = assert!(offset_of!(RlCaptureCfg, gate_ns) == 8);
