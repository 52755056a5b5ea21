use core::ffi::{c_char, c_int, c_long, c_void};

#[no_mangle]
pub unsafe extern "C" fn ld_filter(x: *const f32, y: *mut f32, n: usize) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_envelope(x: *const f32, n: u32, out: *mut f32) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_peak(x: *const f32, n: usize) -> f64 { 0.0 }

#[no_mangle]
pub unsafe extern "C" fn ld_scale(x: *mut f32, n: usize, k: f32) {}

#[no_mangle]
pub unsafe extern "C" fn ld_window(n: usize) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_offset(ns: c_long) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_tag(t: i8) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_pp(rows: *mut *mut f32) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_on_strike(cb: Option<unsafe extern "C" fn(*mut c_void, f32)>, ctx: *mut c_void) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_log(level: c_int, fmt: *const c_char) -> c_int { 0 }

#[no_mangle]
pub unsafe extern "C" fn ld_read(x: *const f32, n: usize) -> c_int { 0 }
