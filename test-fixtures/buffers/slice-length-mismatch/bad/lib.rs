use core::slice;

#[no_mangle]
pub unsafe extern "C" fn strike_envelope(input: *const f32, out: *mut f32, n: usize) {
    let x = slice::from_raw_parts(input, n);
    let y = slice::from_raw_parts_mut(out, 2 * n); // expect: slice-length-mismatch
    for i in 0..n {
        y[i] = x[i].abs();
    }
}

#[no_mangle]
pub unsafe extern "C" fn strike_mix(a: *const f32, a_len: usize, b: *mut f32, b_len: usize) {
    let x = slice::from_raw_parts(a, a_len);
    let y = slice::from_raw_parts_mut(b, a_len); // expect: slice-length-mismatch
    let _ = b_len;
    for (o, v) in y.iter_mut().zip(x) {
        *o += *v;
    }
}

#[no_mangle]
pub unsafe extern "C" fn strike_iq_power(iq: *const f32, power: *mut f32, n: usize) {
    let s = slice::from_raw_parts(iq, n); // expect: slice-length-mismatch
    let p = slice::from_raw_parts_mut(power, n);
    for k in 0..n / 2 {
        p[k] = s[2 * k] * s[2 * k] + s[2 * k + 1] * s[2 * k + 1];
    }
}
