use core::slice;

#[no_mangle]
pub unsafe extern "C" fn seis_stack(traces: *const f32, weights: *const f32, beam: *mut f32, n: usize) {
    let t = slice::from_raw_parts(traces, n);
    let w = slice::from_raw_parts(weights, n); // expect: nullable-unchecked
    let b = slice::from_raw_parts_mut(beam, n);
    for i in 0..n {
        b[i] += t[i] * w[i];
    }
}

#[no_mangle]
pub unsafe extern "C" fn seis_gate(mask: *const f32, beam: *mut f32, n: usize) {
    let b = slice::from_raw_parts_mut(beam, n);
    if *mask == 0.0 { // expect: nullable-unchecked
        b.fill(0.0);
    }
}
