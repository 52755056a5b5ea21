//! Seismic-array trigger settings parsed from C strings; panics reach the C ABI.

use core::ffi::{c_char, c_int};
use std::cell::RefCell;
use std::ffi::CStr;

thread_local! {
    static RATIOS: RefCell<Vec<f32>> = RefCell::new(Vec::new());
}

const WINDOWS: [u32; 4] = [32, 64, 128, 256];

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_set_threshold(text: *const c_char) -> c_int {
    let s = unsafe { CStr::from_ptr(text) }.to_str().unwrap();
    let v: f32 = s.trim().parse().expect("threshold must be a number");
    RATIOS.with(|r| r.borrow_mut().push(v));
    0
}

fn window_len(idx: usize) -> u32 {
    WINDOWS[idx]
}

fn checked_window(idx: usize) -> u32 {
    window_len(idx)
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_window(idx: usize) -> u32 {
    checked_window(idx)
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_total_samples(windows: u32, per_window: u32) -> u32 {
    windows * per_window
}
