//! Stroke counting kernels exported to the C++ blocks.

#[no_mangle]
pub unsafe extern "C" fn flash_count(samples: *const f32, n: usize, threshold: f32) -> u32 {
    if samples.is_null() {
        return 0;
    }
    let s = std::slice::from_raw_parts(samples, n);
    s.iter().filter(|&&x| x > threshold).count() as u32
}

#[no_mangle]
pub unsafe extern "C" fn flash_count_windowed(samples: *const f32, n: usize, window: usize) -> u32 {
    if samples.is_null() || window == 0 {
        return 0;
    }
    let s = std::slice::from_raw_parts(samples, n);
    s.chunks(window).filter(|c| c.iter().any(|&x| x > 0.5)).count() as u32
}
