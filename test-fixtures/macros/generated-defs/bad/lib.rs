//! Rust side of the hydrophone front end: one import names a stage the macro never generates.
extern "C" {
    pub fn hydro_gain_short(src: *const i16, dst: *mut f64, n: usize, g: f64);
    pub fn hydro_gain_float(src: *const f32, dst: *mut f64, n: usize, g: f64);
    pub fn hydro_gain_double(src: *const f64, dst: *mut f64, n: usize, g: f64);
}

pub fn gain_all(a: &[i16], b: &[f32], c: &[f64], dst: &mut [f64], g: f64) {
    unsafe {
        hydro_gain_short(a.as_ptr(), dst.as_mut_ptr(), a.len().min(dst.len()), g);
        hydro_gain_float(b.as_ptr(), dst.as_mut_ptr(), b.len().min(dst.len()), g);
        hydro_gain_double(c.as_ptr(), dst.as_mut_ptr(), c.len().min(dst.len()), g);
    }
}
