//! Lidar point frames: a method of the crate's own type that panics on C's value, and a helper
//! that takes a closure but does not catch.

use core::ffi::{c_char, c_int};
use std::ffi::CStr;

pub struct Frame {
    ranges: Vec<f32>,
}

impl Frame {
    fn push(&mut self, r: f32) {
        assert!(r >= 0.0, "negative range");
        self.ranges.push(r);
    }
}

/// Runs `f` (no catch_unwind).
fn relay<F: FnOnce() -> c_int>(f: F) -> c_int {
    f()
}

/// A negative range from C reaches `Frame::push`'s assert.
#[no_mangle]
pub unsafe extern "C" fn lid_add_range(frame: *mut Frame, r: f32) -> c_int {
    if frame.is_null() {
        return -1;
    }
    let frame = &mut *frame;
    frame.push(r);
    0
}

/// The closure's unwrap panics on a label that is not UTF-8, and `relay` does not catch it.
#[no_mangle]
pub unsafe extern "C" fn lid_label_len(label: *const c_char) -> c_int {
    relay(|| CStr::from_ptr(label).to_str().unwrap().len() as c_int)
}
