use core::slice;

#[no_mangle]
pub unsafe extern "C" fn sonar_gain(input: *const f32, out: *mut f32, n: usize, g: f32) {
    let x = slice::from_raw_parts(input, n);
    let y = slice::from_raw_parts_mut(out, n); // expect: aliasing-mut-slice
    for i in 0..n {
        y[i] = x[i] * g;
    }
}
