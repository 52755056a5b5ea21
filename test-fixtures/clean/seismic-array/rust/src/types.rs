//! `#[repr(C)]` mirrors of include/seis/seis_types.h. The numbers in the const asserts are the
//! ones the header pins with _Static_assert.

use std::ffi::{c_int, c_void};
use std::mem::{align_of, offset_of, size_of};

pub const ADC_LANES: usize = 4;
pub const ADC_BANKS: usize = 2;
pub const SLOT_SAMPLES: usize = 8;

/// `seis_chan_id`.
#[repr(transparent)]
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct ChanId(pub u32);

/// The values of `enum seis_gain`, as the picker stores them in `uint8_t` fields.
#[repr(u8)]
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Gain {
    X1 = 0,
    X4 = 1,
    X16 = 2,
    X64 = 3,
}

impl Gain {
    /// A `uint8_t` from C becomes a `Gain` only through here.
    pub fn from_code(code: u8) -> Option<Gain> {
        match code {
            0 => Some(Gain::X1),
            1 => Some(Gain::X4),
            2 => Some(Gain::X16),
            3 => Some(Gain::X64),
            _ => None,
        }
    }
}

#[repr(C)]
#[derive(Clone, Copy, Debug, Default)]
pub struct DmaDesc {
    pub ctrl: u32,
    pub rsvd0: u32,
    pub addr: u64,
    pub len_bytes: u32,
    pub chan: ChanId,
    pub next: u64,
}

#[repr(C)]
#[derive(Clone, Copy, Debug, Default)]
pub struct AdcRegs {
    pub ctrl: u32,
    pub status: u32,
    pub gain_code: [u16; ADC_LANES],
    pub offset_uv: [i32; ADC_LANES],
}

#[repr(C)]
#[derive(Clone, Copy, Debug, Default)]
pub struct Regs {
    pub id: u32,
    pub version: u32,
    pub adc: [AdcRegs; ADC_BANKS],
    pub timestamp_ns: u64,
    pub ring_head: DmaDesc,
}

#[repr(C)]
#[derive(Clone, Copy)]
pub union SampleWord {
    pub raw: u32,
    pub iq: [i16; 2],
    pub volts: f32,
}

#[repr(C, packed)]
#[derive(Clone, Copy, Debug, Default)]
pub struct WireHdr {
    pub kind: u8,
    pub seq: u32,
    pub t_ns: u64,
    pub n_samples: u16,
}

#[repr(C, align(64))]
#[derive(Clone, Copy, Debug, Default)]
pub struct RingSlot {
    pub seq: u64,
    pub fill: u32,
    pub flags: u32,
    pub samples: [i32; SLOT_SAMPLES],
}

/// `seis_chan_cfg`: written by C, so the gain stays a plain code here.
#[repr(C)]
#[derive(Clone, Copy, Debug)]
pub struct ChanCfg {
    pub chan: ChanId,
    pub gain: u8,
    pub enabled: bool,
    pub decim: u16,
    pub cutoff_hz: f32,
}

/// `seis_pick`: written only by Rust, so the gain can be the enum.
#[repr(C)]
#[derive(Clone, Copy, Debug)]
pub struct Pick {
    pub sample: u64,
    pub ratio: f32,
    pub chan: ChanId,
    pub gain: Gain,
    pub confirmed: bool,
    pub rsvd: [u8; 6],
}

#[repr(C)]
#[derive(Clone, Copy)]
pub struct DigOps {
    pub start: Option<unsafe extern "C" fn(ctx: *mut c_void, chan: ChanId) -> c_int>,
    pub read: Option<unsafe extern "C" fn(ctx: *mut c_void, dst: *mut i32, max_samples: usize) -> isize>,
    pub stop: Option<unsafe extern "C" fn(ctx: *mut c_void)>,
    pub ctx: *mut c_void,
}

const _: () = assert!(size_of::<DmaDesc>() == 32);
const _: () = assert!(offset_of!(DmaDesc, addr) == 8);
const _: () = assert!(offset_of!(DmaDesc, next) == 24);
const _: () = assert!(size_of::<AdcRegs>() == 32);
const _: () = assert!(offset_of!(AdcRegs, offset_uv) == 16);
const _: () = assert!(size_of::<Regs>() == 112);
const _: () = assert!(offset_of!(Regs, timestamp_ns) == 72);
const _: () = assert!(offset_of!(Regs, ring_head) == 80);
const _: () = assert!(size_of::<SampleWord>() == 4);
const _: () = assert!(size_of::<WireHdr>() == 15);
const _: () = assert!(align_of::<WireHdr>() == 1);
const _: () = assert!(offset_of!(WireHdr, n_samples) == 13);
const _: () = assert!(size_of::<RingSlot>() == 64);
const _: () = assert!(align_of::<RingSlot>() == 64);
const _: () = assert!(size_of::<ChanCfg>() == 12);
const _: () = assert!(offset_of!(ChanCfg, enabled) == 5);
const _: () = assert!(offset_of!(ChanCfg, cutoff_hz) == 8);
const _: () = assert!(size_of::<Pick>() == 24);
const _: () = assert!(offset_of!(Pick, gain) == 16);
const _: () = assert!(size_of::<DigOps>() == 4 * size_of::<usize>());
