// Lightning-detector front end: event export.
use core::ffi::c_int;

pub struct Event { t_ns: u64, amp: f32 }

#[repr(u8)]
pub enum Polarity { Pos = 1, Neg = 2 }

pub enum Mode { Quiet, Storm }

#[no_mangle]
pub extern "C" fn ld_events(buf: &[f32]) -> c_int { 0 }

#[no_mangle]
pub extern "C" fn ld_name(name: &str) -> c_int { 0 }

#[no_mangle]
pub extern "C" fn ld_take(ev: Event) -> c_int { 0 }

#[no_mangle]
pub extern "C" fn ld_list() -> Vec<f32> { Vec::new() }

#[no_mangle]
pub extern "C" fn ld_pair(p: (f32, f32)) -> c_int { 0 }

#[no_mangle]
pub extern "C" fn ld_glyph(c: char) -> c_int { 0 }

#[no_mangle]
pub extern "C" fn ld_mode(m: Mode) -> c_int { 0 }

#[no_mangle]
pub extern "C" fn ld_cb(f: fn(i32) -> i32) -> c_int { 0 }
