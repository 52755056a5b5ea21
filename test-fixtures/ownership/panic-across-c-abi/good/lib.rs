//! Seismic-array trigger settings: no panic escapes through the C ABI.

use core::ffi::{c_char, c_int};
use std::ffi::CStr;
use std::panic::{catch_unwind, AssertUnwindSafe};

const WINDOWS: [u32; 4] = [32, 64, 128, 256];

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_set_threshold(text: *const c_char) -> c_int {
    let r = catch_unwind(AssertUnwindSafe(|| {
        let s = unsafe { CStr::from_ptr(text) }.to_str().unwrap();
        let v: f32 = s.trim().parse().expect("threshold must be a number");
        if v > 0.0 { 0 } else { -1 }
    }));
    r.unwrap_or(-2)
}

fn window_len(idx: usize) -> u32 {
    WINDOWS.get(idx).copied().unwrap_or(0)
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_window(idx: usize) -> u32 {
    window_len(idx)
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_total_samples(windows: u32, per_window: u32) -> u32 {
    windows.saturating_mul(per_window)
}

/// Unwinding into the C++ caller is intended here (it catches the exception).
#[unsafe(no_mangle)]
pub unsafe extern "C-unwind" fn seis_parse_strict(text: *const c_char) -> c_int {
    let s = unsafe { CStr::from_ptr(text) }.to_str().unwrap();
    s.len() as c_int
}
