//! Rust side of the hydrophone front end: the gain stages are C, generated one per sample type.
extern "C" {
    pub fn hydro_gain_short(src: *const i16, dst: *mut f64, n: usize, g: f64);
    pub fn hydro_gain_float(src: *const f32, dst: *mut f64, n: usize, g: f64);
}

pub fn gain_short(src: &[i16], dst: &mut [f64], g: f64) {
    let n = src.len().min(dst.len());
    unsafe { hydro_gain_short(src.as_ptr(), dst.as_mut_ptr(), n, g) }
}

pub fn gain_float(src: &[f32], dst: &mut [f64], g: f64) {
    let n = src.len().min(dst.len());
    unsafe { hydro_gain_float(src.as_ptr(), dst.as_mut_ptr(), n, g) }
}
