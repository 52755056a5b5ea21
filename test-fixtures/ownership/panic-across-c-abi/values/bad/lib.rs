//! Hydrophone ring-buffer kernels: panics that C's input can reach.

use core::ffi::{c_char, c_int};
use std::ffi::CStr;

const TAPS: [f32; 8] = [0.02, 0.07, 0.16, 0.25, 0.25, 0.16, 0.07, 0.02];

/// A label that is not UTF-8 panics in `unwrap`.
#[no_mangle]
pub unsafe extern "C" fn hyd_label_len(label: *const c_char) -> c_int {
    CStr::from_ptr(label).to_str().unwrap().len() as c_int
}

/// A mode C passes outside 0..=1 reaches `unreachable!`.
#[no_mangle]
pub extern "C" fn hyd_mode_gain(mode: c_int) -> f32 {
    match mode {
        0 => 1.0,
        1 => 0.5,
        _ => unreachable!(),
    }
}

/// An index from C into a fixed table, unchecked.
#[no_mangle]
pub extern "C" fn hyd_tap(i: usize) -> f32 {
    TAPS[i]
}

/// `n - 1` with n = 0 overflows (a debug build panics).
#[no_mangle]
pub extern "C" fn hyd_last_index(n: usize) -> usize {
    n - 1
}

/// The guard says n > 0, the subtraction needs n >= 2.
#[no_mangle]
pub extern "C" fn hyd_pair_index(n: usize) -> usize {
    if n > 0 { n - 2 } else { 0 }
}

/// Frames of `hop` samples; the helper states its contract with an assert.
fn frame_count(total: usize, hop: usize) -> usize {
    assert!(hop > 0);
    total.checked_div(hop).unwrap_or(0)
}

/// A hop of 0 from C reaches the helper's assert.
#[no_mangle]
pub extern "C" fn hyd_frame_count(total: usize, hop: usize) -> usize {
    frame_count(total, hop)
}
