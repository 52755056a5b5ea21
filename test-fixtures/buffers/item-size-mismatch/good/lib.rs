use core::mem::size_of;
use core::slice;

#[no_mangle]
pub unsafe extern "C" fn corr_power(x: *const f32, n: usize) -> f32 {
    let s = slice::from_raw_parts(x, n);
    s.iter().map(|v| v * v).sum()
}

#[no_mangle]
pub unsafe extern "C" fn corr_checksum(x: *const f32, n: usize) -> u32 {
    let b = slice::from_raw_parts(x as *const u8, n * size_of::<f32>());
    b.iter().fold(0u32, |a, v| a.wrapping_mul(31).wrapping_add(*v as u32))
}
