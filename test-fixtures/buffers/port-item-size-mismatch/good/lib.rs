use core::slice;

#[no_mangle]
pub unsafe extern "C" fn strike_envelope(input: *const f32, out: *mut f32, n: usize) {
    let x = slice::from_raw_parts(input, n);
    let y = slice::from_raw_parts_mut(out, n);
    for i in 0..n {
        y[i] = x[i].abs();
    }
}
