//! Hydrophone ring-buffer kernels: every panic site is ruled out by the code around it.

use core::ffi::{c_char, c_int};
use std::ffi::CStr;

const TAPS: [f32; 8] = [0.02, 0.07, 0.16, 0.25, 0.25, 0.16, 0.07, 0.02];

/// Last minus first sample; fewer than two samples give 0 (early return guards `n - 1`).
#[no_mangle]
pub unsafe extern "C" fn hyd_swing(samples: *const f32, n: usize) -> f32 {
    if samples.is_null() || n < 2 {
        return 0.0;
    }
    let x = std::slice::from_raw_parts(samples, n);
    let last = n - 1;
    let first = x.first().copied().unwrap_or(0.0);
    x.get(last).copied().unwrap_or(first) - first
}

/// Sum of squares: the loop bound is the slice's own length.
#[no_mangle]
pub unsafe extern "C" fn hyd_energy(samples: *const f32, n: usize) -> f32 {
    if samples.is_null() {
        return 0.0;
    }
    let x = std::slice::from_raw_parts(samples, n);
    let mut e = 0.0f32;
    for i in 0..n {
        e += x[i] * x[i];
    }
    for (i, v) in x.iter().enumerate() {
        e += v * x[i];
    }
    e
}

/// One FIR tap by a masked or `%`-bounded index into a fixed-size table.
#[no_mangle]
pub extern "C" fn hyd_tap(i: usize, wrap: bool) -> f32 {
    if wrap { TAPS[i % 8] } else { TAPS[i & 7] }
}

/// Walks a ring of `n` slots from `start`: the position is always `% n`.
#[no_mangle]
pub unsafe extern "C" fn hyd_ring_peak(ring: *const f32, n: usize, start: usize, count: usize) -> f32 {
    if ring.is_null() || n == 0 {
        return 0.0;
    }
    let buf = std::slice::from_raw_parts(ring, n);
    let mut pos = start % n;
    let mut peak = 0.0f32;
    for _ in 0..count.min(n) {
        peak = peak.max(buf[pos]);
        pos = (pos + 1) % n;
    }
    peak
}

/// Saturating and checked arithmetic, widening conversions, debug-only and constant asserts.
#[no_mangle]
pub extern "C" fn hyd_frames(total: u32, hop: u32, overlap: u32) -> u64 {
    debug_assert!(hop > 0);
    assert!(TAPS.len() == 8);
    let usable = total.saturating_sub(overlap);
    let frames: u32 = usable.checked_div(hop).unwrap_or(0);
    frames as u64 + overlap as u64
}

/// A 2-bit gain code: every value of `code & 3` has its arm.
#[no_mangle]
pub extern "C" fn hyd_gain(code: u32) -> f32 {
    match code & 3 {
        0 => 1.0,
        1 => 2.0,
        2 => 4.0,
        3 => 8.0,
        _ => unreachable!(),
    }
}

/// A sensor label: NULL and invalid UTF-8 are refused before anything unwraps.
#[no_mangle]
pub unsafe extern "C" fn hyd_label_len(label: *const c_char) -> c_int {
    if label.is_null() {
        return -1;
    }
    let s = CStr::from_ptr(label).to_str();
    if s.is_err() {
        return -1;
    }
    s.unwrap().len() as c_int
}

/// The serial number is the first four bytes of the header.
#[no_mangle]
pub unsafe extern "C" fn hyd_serial(header: *const u8) -> u32 {
    let Some(h) = header.as_ref() else { return 0 };
    let bytes = std::slice::from_raw_parts(h as *const u8, 8);
    let (head, _) = bytes.split_at(4);
    u32::from_le_bytes(head.try_into().unwrap())
}

/// Frames of `hop` samples; the helper states its contract with an assert.
fn frame_count(total: usize, hop: usize) -> usize {
    assert!(hop > 0);
    total.checked_div(hop).unwrap_or(0)
}

/// The caller refuses a hop of 0 before the helper's assert.
#[no_mangle]
pub extern "C" fn hyd_frame_count(total: usize, hop: usize) -> usize {
    if hop == 0 {
        return 0;
    }
    frame_count(total, hop)
}
