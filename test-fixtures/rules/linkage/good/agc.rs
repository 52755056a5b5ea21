#[no_mangle]
pub unsafe extern "C" fn agc_run(x: *mut f32, n: usize) {}

#[no_mangle]
pub unsafe extern "C" fn agc_reset() {}
