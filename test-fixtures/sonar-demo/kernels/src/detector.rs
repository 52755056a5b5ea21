//! Narrowband detector: keeps a running average per frequency bin and counts the bins whose
//! power stands above it. The state lives in Rust behind the opaque `sonar_det` handle.

use core::ffi::c_int;
use core::slice;

/// Detector state (opaque to C).
pub struct SonarDet {
    threshold: f32,
    avg: Vec<f32>,
}

/// Creates a detector for `nbins` frequency bins.
#[unsafe(no_mangle)]
pub extern "C" fn sonar_det_new(nbins: usize, threshold: f32) -> *mut SonarDet {
    Box::into_raw(Box::new(SonarDet { threshold, avg: vec![0.0; nbins] }))
}

/// Feeds one spectrum of `nbins` powers; returns the number of bins above the threshold.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn sonar_det_update(h: *mut SonarDet, power: *const f32, nbins: usize) -> c_int {
    if power.is_null() {
        return -1;
    }
    match unsafe { h.as_mut() } {
        None => -1,
        Some(det) => {
            let p = unsafe { slice::from_raw_parts(power, nbins) };
            let mut hits = 0;
            for (a, x) in det.avg.iter_mut().zip(p) {
                *a = 0.9 * *a + 0.1 * x;
                if *x > det.threshold * *a {
                    hits += 1;
                }
            }
            hits
        }
    }
}

/// Releases the detector (NULL is ignored).
#[unsafe(no_mangle)]
pub unsafe extern "C" fn sonar_det_free(h: *mut SonarDet) {
    if !h.is_null() {
        drop(unsafe { Box::from_raw(h) });
    }
}
