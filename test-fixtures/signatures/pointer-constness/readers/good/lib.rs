//! Lidar return binning: Rust only reads the arrays the header leaves writable.

extern "C" {
    fn ldr_mean_intensity(input: *const f32, n: usize) -> f32;
}

#[no_mangle]
pub unsafe extern "C" fn ldr_histogram(ranges: *const f32, n: usize, hist: *mut u32, n_bins: usize) -> i32 {
    if ranges.is_null() || hist.is_null() || n_bins == 0 {
        return -1;
    }
    let ranges = std::slice::from_raw_parts(ranges, n);
    let hist = std::slice::from_raw_parts_mut(hist, n_bins);
    for r in ranges {
        let b = ((r.max(0.0) / 200.0) * n_bins as f32) as usize;
        if let Some(h) = hist.get_mut(b) {
            *h += 1;
        }
    }
    0
}

pub fn mean_intensity(echo: &[f32]) -> f32 {
    unsafe { ldr_mean_intensity(echo.as_ptr(), echo.len()) }
}
