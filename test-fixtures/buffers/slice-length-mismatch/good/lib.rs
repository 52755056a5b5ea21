use core::slice;

#[no_mangle]
pub unsafe extern "C" fn strike_envelope(input: *const f32, out: *mut f32, n: usize) {
    let x = slice::from_raw_parts(input, n);
    let y = slice::from_raw_parts_mut(out, n);
    for i in 0..n {
        y[i] = x[i].abs();
    }
}

#[no_mangle]
pub unsafe extern "C" fn strike_mix(a: *const f32, a_len: usize, b: *mut f32, b_len: usize) {
    let x = slice::from_raw_parts(a, a_len);
    let y = slice::from_raw_parts_mut(b, b_len);
    for (o, v) in y.iter_mut().zip(x) {
        *o += *v;
    }
}

/// Interleaved complex: `n` (re, im) pairs are `2 * n` floats.
#[no_mangle]
pub unsafe extern "C" fn strike_iq_power(iq: *const f32, power: *mut f32, n: usize) {
    let s = slice::from_raw_parts(iq, 2 * n);
    let p = slice::from_raw_parts_mut(power, n);
    for k in 0..n {
        p[k] = s[2 * k] * s[2 * k] + s[2 * k + 1] * s[2 * k + 1];
    }
}
