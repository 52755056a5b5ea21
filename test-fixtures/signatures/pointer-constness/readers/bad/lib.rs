//! Lidar return binning: the slips. A buffer C expects filled taken read-only, an array C
//! rewrites lent read-only, and Rust writing through a pointer C declares const.

extern "C" {
    fn ldr_detrend(echo: *const f32, n: usize);
}

#[no_mangle]
pub unsafe extern "C" fn ldr_calibrate(raw: *const f32, n: usize, cal: *const f32) -> i32 {
    if raw.is_null() || cal.is_null() {
        return -1;
    }
    let _ = std::slice::from_raw_parts(raw, n);
    0
}

#[no_mangle]
pub unsafe extern "C" fn ldr_set_gain(gain: *mut f32, n: usize) -> i32 {
    if gain.is_null() {
        return -1;
    }
    for g in std::slice::from_raw_parts_mut(gain, n) {
        *g = g.clamp(0.0, 4.0);
    }
    0
}

pub fn detrend(echo: &[f32]) {
    unsafe { ldr_detrend(echo.as_ptr(), echo.len()) }
}
