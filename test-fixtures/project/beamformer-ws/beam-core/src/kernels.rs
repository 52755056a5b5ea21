use core::ffi::c_int;

/// Delay-and-sum steering, vectorised build.
#[cfg(feature = "simd")]
#[no_mangle]
pub unsafe extern "C" fn beam_steer(staves: *const f32, n_staves: usize, bearing_deg: f32, out: *mut f32) -> c_int {
    if staves.is_null() || out.is_null() { return -1; }
    *out = bearing_deg * n_staves as f32;
    0
}

/// Delay-and-sum steering, scalar build (the twin of the one above).
#[cfg(not(feature = "simd"))]
#[no_mangle]
pub unsafe extern "C" fn beam_steer(staves: *const f32, n_staves: usize, bearing_deg: f32, out: *mut f32) -> c_int {
    if staves.is_null() || out.is_null() { return -1; }
    *out = bearing_deg * n_staves as f32;
    0
}

/// The Rust replacement of the C reference kernel (csrc/reference/beam_ref.c).
#[cfg(not(feature = "c-reference"))]
#[no_mangle]
pub unsafe extern "C" fn beam_sum(x: *const f32, n: usize) -> f32 {
    if x.is_null() { return 0.0; }
    let mut s = 0.0;
    for i in 0..n { s += *x.add(i); }
    s
}

/// Exported under its C name in the default (simd) build.
#[cfg_attr(feature = "simd", no_mangle)]
pub unsafe extern "C" fn beam_norm(x: *const f32, n: usize) -> f32 {
    beam_sum(x, n) / n.max(1) as f32
}

/// Slip: declared in beam.h, but exported without #[no_mangle].
pub unsafe extern "C" fn beam_level(x: *const f32, n: usize) -> c_int {
    (beam_norm(x, n) * 100.0) as c_int
}

/// Slip: also defined by the C host helpers (c/host/beam_window.c), which the build script links in.
#[no_mangle]
pub extern "C" fn beam_gain(db: f32) -> f32 {
    db * 0.5
}

/// Slip: exported, but beam.h does not declare it.
#[no_mangle]
pub extern "C" fn beam_reset() -> c_int {
    0
}

/// Slip: both conditions hold on the 64-bit Linux targets, so two definitions link there.
#[cfg(unix)]
#[no_mangle]
pub extern "C" fn beam_sample_rate() -> u32 {
    48000
}

#[cfg(target_pointer_width = "64")]
#[no_mangle]
pub extern "C" fn beam_sample_rate() -> u32 {
    96000
}

#[cfg(test)]
mod tests {
    #[no_mangle]
    pub extern "C" fn beam_gain(db: f32) -> f32 { db }
}
