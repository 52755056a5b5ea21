//! One channel's band-pass FIR filter, behind the opaque `hyd_fir` handle.

use crate::util::{input, MAX_SAMPLES};

/// Longest filter the recorder designs.
pub const HYD_FIR_MAX_TAPS: usize = 512;

/// The state behind a `hyd_fir *`: the taps and a delay line of the same length, so a block can
/// feed a stream in pieces of any size.
pub struct Fir {
    taps: Box<[f32]>,
    /// the last `taps.len()` inputs, newest at `pos`
    hist: Box<[f32]>,
    pos: usize,
}

impl Fir {
    fn step(&mut self, x: f32) -> f32 {
        let len = self.hist.len();
        if len == 0 {
            return 0.0;
        }
        self.pos = if self.pos == 0 { len - 1 } else { self.pos - 1 };
        if let Some(slot) = self.hist.get_mut(self.pos) {
            *slot = x;
        }
        // newest sample meets taps[0]: walk the ring from `pos` forwards, wrapping once
        let (older, newer) = self.hist.split_at(self.pos);
        newer
            .iter()
            .chain(older.iter())
            .zip(self.taps.iter())
            .map(|(h, t)| h * t)
            .sum()
    }
}

/// Makes a filter from `ntaps` coefficients (copied). Returns NULL when `taps` is NULL, `ntaps`
/// is 0 or above `HYD_FIR_MAX_TAPS`. Release with `hyd_fir_free`.
///
/// # Safety
/// `taps` is NULL or points at `ntaps` readable floats.
#[no_mangle]
pub unsafe extern "C" fn hyd_fir_new(taps: *const f32, ntaps: usize) -> *mut Fir {
    if ntaps == 0 || ntaps > HYD_FIR_MAX_TAPS {
        return std::ptr::null_mut();
    }
    let Some(taps) = input(taps, ntaps) else {
        return std::ptr::null_mut();
    };
    let fir = Fir {
        taps: taps.to_vec().into_boxed_slice(),
        hist: vec![0.0f32; ntaps].into_boxed_slice(),
        pos: 0,
    };
    Box::into_raw(Box::new(fir))
}

/// Filters `n` samples from `input` into `output`. `input` and `output` may be the same buffer
/// (in place): each sample is read before its output is written, through raw pointers, so no
/// Rust reference to either buffer is ever made.
///
/// # Safety
/// `fir` comes from `hyd_fir_new`; `input`/`output` point at `n` floats (or are the same buffer).
#[no_mangle]
pub unsafe extern "C" fn hyd_fir_process(fir: *mut Fir, input: *const f32, output: *mut f32, n: usize) {
    if fir.is_null() || input.is_null() || output.is_null() || n > MAX_SAMPLES {
        return;
    }
    let fir = &mut *fir;
    for i in 0..n {
        let x = input.add(i).read();
        output.add(i).write(fir.step(x));
    }
}

/// Clears the delay line (a new recording starts).
///
/// # Safety
/// `fir` is NULL or comes from `hyd_fir_new`.
#[no_mangle]
pub unsafe extern "C" fn hyd_fir_reset(fir: *mut Fir) {
    if let Some(fir) = fir.as_mut() {
        fir.hist.iter_mut().for_each(|h| *h = 0.0);
        fir.pos = 0;
    }
}

/// Releases a filter. NULL is accepted and ignored.
///
/// # Safety
/// `fir` is NULL or comes from `hyd_fir_new` and is not used afterwards.
#[no_mangle]
pub unsafe extern "C" fn hyd_fir_free(fir: *mut Fir) {
    if fir.is_null() {
        return;
    }
    drop(Box::from_raw(fir));
}
