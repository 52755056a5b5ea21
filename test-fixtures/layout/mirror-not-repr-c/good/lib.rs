//! Seismic array kernels.

/// One geophone sample.
#[repr(C)]
pub struct SeisSample {
    pub channel: u32,
    pub counts: f32,
}

#[no_mangle]
pub unsafe extern "C" fn seis_push(s: *const SeisSample, n: u32) {
    let _ = (s, n);
}
