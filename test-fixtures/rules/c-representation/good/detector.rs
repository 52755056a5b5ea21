use core::ffi::{c_char, c_int, c_void};
use core::ptr::NonNull;

#[repr(C)]
pub struct Event { t_ns: u64, amp: f32 }

#[repr(transparent)]
pub struct Nanos(u64);

#[repr(u8)]
pub enum Polarity { Pos = 1, Neg = 2 }

pub struct Internal { v: Vec<f32> }

#[no_mangle]
pub extern "C" fn ld_events(buf: *const f32, n: usize) -> c_int { 0 }

#[no_mangle]
pub extern "C" fn ld_name(name: *const c_char) -> c_int { 0 }

#[no_mangle]
pub extern "C" fn ld_take(ev: Event, at: Nanos, p: Polarity) -> c_int { 0 }

#[no_mangle]
pub extern "C" fn ld_state(s: *mut Internal) -> c_int { 0 }

#[no_mangle]
pub extern "C" fn ld_ref(e: &Event, out: &mut Event, h: Option<NonNull<c_void>>) -> c_int { 0 }

#[no_mangle]
pub extern "C" fn ld_event_free(b: Option<Box<Event>>) {}

#[no_mangle]
pub extern "C" fn ld_cb(f: Option<extern "C" fn(i32) -> i32>) -> c_int { 0 }

fn internal(v: Vec<f32>, s: &str) -> String { String::new() }
