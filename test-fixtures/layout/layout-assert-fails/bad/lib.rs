//! Seismic array: the Rust mirror agrees with the C header on every target, but the asserts
//! assume x86_64.
use core::mem::{offset_of, size_of};

#[repr(C)]
pub struct SeisPkt {
    pub station: u32,
    pub t_ns: u64,
}

const _: () = assert!(size_of::<SeisPkt>() == 16);
const _: () = assert!(core::mem::offset_of!(SeisPkt, t_ns) == 8);
const _: () = assert!(offset_of!(SeisPkt, station) == 0);
