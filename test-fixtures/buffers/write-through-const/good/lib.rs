//! Radio-telescope correlator: normalisation kernels (no header: C callers use the Rust types).
use core::slice;

#[no_mangle]
pub unsafe extern "C" fn corr_normalise(vis: *mut f32, n: usize) {
    let v = slice::from_raw_parts_mut(vis, n);
    let peak = v.iter().cloned().fold(0.0f32, f32::max);
    for x in v.iter_mut() {
        *x /= peak;
    }
}

#[no_mangle]
pub unsafe extern "C" fn corr_zero_dc(vis: *mut f32, n: usize) {
    if n > 1 {
        *vis = 0.0;
        vis.add(1).write(0.0);
    }
}

#[no_mangle]
pub unsafe extern "C" fn corr_peak(vis: *const f32, n: usize) -> f32 {
    let v = slice::from_raw_parts(vis, n);
    v.iter().cloned().fold(0.0f32, f32::max)
}
