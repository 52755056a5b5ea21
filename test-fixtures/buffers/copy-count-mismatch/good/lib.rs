//! Lightning-detector front end: capture-buffer copies.
use core::ptr;

/// ferrule-buffers: src[n], dst[n]
#[no_mangle]
pub unsafe extern "C" fn strike_capture(src: *const f32, dst: *mut f32, n: usize) {
    ptr::copy_nonoverlapping(src, dst, n);
}

/// ferrule-buffers: src[n], dst[m]
#[no_mangle]
pub unsafe extern "C" fn strike_window(src: *const f32, n: usize, dst: *mut f32, m: usize, gain: usize) {
    let k = if n < m { n } else { m };
    src.copy_to(dst, m);
    let _ = (k, gain);
}
