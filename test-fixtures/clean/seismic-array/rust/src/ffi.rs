//! The C kernels of csrc/, as include/seis/seis_dsp.h declares them.

use crate::types::{ChanId, DmaDesc, Regs, SampleWord, WireHdr};
use std::ffi::{c_char, c_int, c_long};

extern "C" {
    pub fn seis_decimate(input: *const i32, n_in: usize, factor: u32, out: *mut f32, max_out: usize) -> usize;
    pub fn seis_crc32(data: *const u8, nbytes: usize) -> u32;
    pub fn seis_desc_chain(descs: *mut DmaDesc, n: usize, base: u64, seg_len: u32, chan: ChanId) -> c_int;
    pub fn seis_regs_snapshot(live: *const Regs, out: *mut Regs) -> isize;
    pub fn seis_clock_offset_us(local_ns: i64, gps_ns: i64) -> c_long;
    pub fn seis_station_code(buf: *mut c_char, cap: usize, network: u16, station: u16) -> c_int;
    pub fn seis_wire_decode(bytes: *const u8, nbytes: usize, out: *mut WireHdr) -> c_int;
    pub fn seis_word_volts(w: SampleWord, lsb_uv: f32) -> f32;
    #[link_name = "seis_gain_name"]
    pub fn gain_name(gain: u8) -> *const c_char;
}
