//! Mirror of include/lidar/rl_ring.h: the DMA ring and the shot records.

use core::mem::{align_of, offset_of, size_of};

/// The two 32-bit halves of a slot's bus address (the C header's anonymous struct).
#[repr(C)]
#[derive(Clone, Copy)]
pub struct RlBusWords {
    pub lo: u32,
    pub hi: u32,
}

/// The C header's anonymous union at the start of `rl_slot`.
#[repr(C)]
#[derive(Clone, Copy)]
pub union RlBusAddr {
    pub addr: u64,
    pub words: RlBusWords,
}

#[repr(C)]
#[derive(Clone, Copy)]
pub struct RlSlot {
    pub bus: RlBusAddr,
    pub len: u32,
    pub flags: u16,
    pub gate: u8,
    pub status: u8,
}

impl RlSlot {
    pub const EMPTY: RlSlot = RlSlot { bus: RlBusAddr { addr: 0 }, len: 0, flags: 0, gate: 0, status: 0 };
}

pub const SLOT_DONE: u16 = 0x0001;
pub const RING_MAGIC: u32 = 0x524c_5247;

/// Ring header; the slots follow it (a flexible array member in C, a zero-length array here:
/// common practice, it adds no size but keeps the slots' offset and alignment).
#[repr(C, align(16))]
pub struct RlRing {
    pub magic: u32,
    pub nslots: u32,
    pub head: u32,
    pub tail: u32,
    pub slots: [RlSlot; 0],
}

/// One shot record (`#pragma pack(push, 4)` in C), its samples after it.
#[repr(C, packed(4))]
pub struct RlShotHdr {
    pub shot: u32,
    pub t_ns: u64,
    pub nsamples: u32,
    pub samples: [u32; 0],
}

const _: () = assert!(size_of::<RlSlot>() == 16);
const _: () = assert!(offset_of!(RlSlot, len) == 8);
const _: () = assert!(offset_of!(RlSlot, gate) == 14);
const _: () = assert!(size_of::<RlRing>() == 16);
const _: () = assert!(align_of::<RlRing>() == 16);
const _: () = assert!(offset_of!(RlRing, slots) == 16);
const _: () = assert!(size_of::<RlShotHdr>() == 16);
const _: () = assert!(align_of::<RlShotHdr>() == 4);
const _: () = assert!(offset_of!(RlShotHdr, t_ns) == 4);
const _: () = assert!(offset_of!(RlShotHdr, samples) == 16);
