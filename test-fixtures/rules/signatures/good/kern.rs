use core::ffi::{c_char, c_int, c_long, c_void};
use core::ptr::NonNull;

/// Complex sample as the C side sees `float _Complex`.
#[repr(C)]
pub struct Cf32 { re: f32, im: f32 }

#[no_mangle]
pub unsafe extern "C" fn ld_filter(x: *const f32, y: *mut f32, n: usize) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_envelope(x: &f32, n: libc::size_t, out: &mut f32) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_offset(ns: c_long) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_tag(t: c_char) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_pp(rows: *mut *mut f32) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_on_strike(cb: Option<unsafe extern "C" fn(*mut c_void, f32)>, ctx: *mut c_void) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_cplx(x: *const Cf32, n: usize, h: Option<NonNull<c_void>>) -> bool { true }

#[no_mangle]
pub unsafe extern "C" fn ld_handle(h: *mut c_void) {}

extern "C" {
    fn ld_log(level: c_int, fmt: *const c_char, ...) -> c_int;
}
