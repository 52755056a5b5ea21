//! Radio-telescope correlator: normalisation kernels (no header: C callers use the Rust types).
use core::slice;

#[no_mangle]
pub unsafe extern "C" fn corr_normalise(vis: *const f32, n: usize) {
    let v = slice::from_raw_parts_mut(vis as *mut f32, n); // expect: write-through-const
    let peak = v.iter().cloned().fold(0.0f32, f32::max);
    for x in v.iter_mut() {
        *x /= peak;
    }
}

#[no_mangle]
pub unsafe extern "C" fn corr_zero_dc(vis: *const f32, n: usize) {
    if n > 0 {
        *(vis as *mut f32) = 0.0; // expect: write-through-const
        (vis as *mut f32).add(1).write(0.0); // expect: write-through-const
    }
}
