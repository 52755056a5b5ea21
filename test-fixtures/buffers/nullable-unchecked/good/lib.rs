use core::slice;

#[no_mangle]
pub unsafe extern "C" fn seis_stack(traces: *const f32, weights: *const f32, beam: *mut f32, n: usize) {
    let t = slice::from_raw_parts(traces, n);
    let b = slice::from_raw_parts_mut(beam, n);
    if weights.is_null() {
        for i in 0..n {
            b[i] += t[i];
        }
        return;
    }
    let w = slice::from_raw_parts(weights, n);
    for i in 0..n {
        b[i] += t[i] * w[i];
    }
}

#[no_mangle]
pub unsafe extern "C" fn seis_gate(mask: *const f32, beam: *mut f32, n: usize) {
    let b = slice::from_raw_parts_mut(beam, n);
    if let Some(m) = mask.as_ref() {
        if *m == 0.0 {
            b.fill(0.0);
        }
    }
}
