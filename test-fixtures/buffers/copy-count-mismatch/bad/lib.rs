//! Lightning-detector front end: capture-buffer copies.
use core::mem::size_of;
use core::ptr;

/// ferrule-buffers: src[n], dst[n]
#[no_mangle]
pub unsafe extern "C" fn strike_capture(src: *const f32, dst: *mut f32, n: usize) {
    ptr::copy_nonoverlapping(src, dst, n * size_of::<f32>()); // expect: copy-count-mismatch
}

/// ferrule-buffers: src[n], dst[m]
#[no_mangle]
pub unsafe extern "C" fn strike_window(src: *const f32, n: usize, dst: *mut f32, m: usize, gain: usize) {
    ptr::copy(src, dst, gain); // expect: copy-count-mismatch
    let _ = (n, m);
}
