//! Seismic array mirror with asserts that hold on every target.
use core::mem::{align_of, offset_of, size_of};

#[repr(C, align(8))]
pub struct SeisPkt {
    pub station: u32,
    pub reserved: u32,
    pub t_ns: u64,
}

const _: () = assert!(size_of::<SeisPkt>() == 16);
const _: () = assert!(offset_of!(SeisPkt, t_ns) == 8);
const _: () = assert!(align_of::<SeisPkt>() == 8);
