//! Rust port of the seismic picker; exports the C API of include/quake.h.

use std::os::raw::c_float;

/// `quake_mode` as an integer newtype: C may add modes without breaking Rust.
#[repr(transparent)]
#[derive(Clone, Copy, PartialEq, Eq)]
pub struct QuakeMode(u8);

impl QuakeMode {
    pub const STA_LTA: Self = Self(0);
    pub const ENVELOPE: Self = Self(1);
}

/// Mirror of `QuakeThreshold` (C tag `QuakeThresholdTag`).
#[repr(C)]
pub struct QuakeThresholdTag {
    pub on: f64,
    pub off: c_float,
}

/// The port's own picker state (C callers only hold a pointer).
pub struct QuakePicker {
    mode: QuakeMode,
    on: f32,
    backlog: usize,
}

#[no_mangle]
pub unsafe extern "C" fn quake_picker_new(mode: QuakeMode, thr: *const QuakeThresholdTag) -> *mut QuakePicker {
    if thr.is_null() {
        return std::ptr::null_mut();
    }
    Box::into_raw(Box::new(QuakePicker { mode, on: (*thr).on as f32, backlog: 0 }))
}

#[no_mangle]
pub unsafe extern "C" fn quake_picker_run(p: *mut QuakePicker, samples: *const f32, n: usize, hist: *mut u16) -> usize {
    if p.is_null() || samples.is_null() || hist.is_null() {
        return 0;
    }
    let s = std::slice::from_raw_parts(samples, n);
    let h = std::slice::from_raw_parts_mut(hist, 16);
    let mut picks = 0;
    for (i, &x) in s.iter().enumerate() {
        if x > (*p).on && (*p).mode == QuakeMode::STA_LTA || x > (*p).on {
            picks += 1;
            h[i % 16] = h[i % 16].wrapping_add(1);
        }
    }
    picks
}

#[no_mangle]
pub unsafe extern "C" fn quake_picker_free(p: *mut QuakePicker) {
    if !p.is_null() {
        drop(Box::from_raw(p));
    }
}

#[no_mangle]
pub unsafe extern "C" fn quake_picker_backlog(p: *const QuakePicker) -> usize {
    if p.is_null() { 0 } else { (*p).backlog }
}
