//! Lidar point frames: calls go to the function of the receiver's type, and a crate helper that
//! runs its closure under catch_unwind protects what the closure does.

use core::ffi::{c_char, c_int};
use std::ffi::CStr;
use std::io::Write;

pub struct Frame {
    ranges: Vec<f32>,
}

impl Frame {
    /// Only called with ranges already checked (not from C).
    fn push(&mut self, r: f32) {
        assert!(r >= 0.0, "negative range");
        self.ranges.push(r);
    }
}

/// A sink the crate writes diagnostics to; writing is not supported.
pub struct NullSink;

impl Write for NullSink {
    fn write(&mut self, _buf: &[u8]) -> std::io::Result<usize> {
        unimplemented!()
    }
    fn flush(&mut self) -> std::io::Result<()> {
        Ok(())
    }
}

/// Runs `f`, turning a panic into -1.
fn guard<F: FnOnce() -> c_int>(f: F) -> c_int {
    std::panic::catch_unwind(std::panic::AssertUnwindSafe(f)).unwrap_or(-1)
}

/// Copies ranges into a plain Vec (`Vec::push`, not `Frame::push`) and a byte report
/// (`Vec<u8>`'s `io::Write`, not `NullSink`'s).
#[no_mangle]
pub unsafe extern "C" fn lid_count_valid(ranges: *const f32, n: usize) -> c_int {
    if ranges.is_null() {
        return -1;
    }
    let src = std::slice::from_raw_parts(ranges, n);
    let mut kept: Vec<f32> = Vec::new();
    for &r in src {
        if r >= 0.0 {
            kept.push(r);
        }
    }
    let mut report: Vec<u8> = Vec::new();
    let _ = report.write(b"ok");
    kept.len() as c_int
}

/// Parses a label inside `guard`: a panic there never reaches C.
#[no_mangle]
pub unsafe extern "C" fn lid_label_len(label: *const c_char) -> c_int {
    guard(|| CStr::from_ptr(label).to_str().unwrap().len() as c_int)
}
