use core::mem::size_of;
use core::slice;

#[no_mangle]
pub unsafe extern "C" fn seis_scale(trace: *const f32, nbytes: usize, out: *mut f32) {
    let x = slice::from_raw_parts(trace, nbytes); // expect: length-unit-mismatch
    let y = slice::from_raw_parts_mut(out, nbytes / size_of::<f32>());
    for (o, v) in y.iter_mut().zip(x) {
        *o = v * 0.5;
    }
}

#[no_mangle]
pub unsafe extern "C" fn seis_detrend(input: *const f32, out: *mut f32, n: usize) {
    let x = slice::from_raw_parts(input, n);
    let y = slice::from_raw_parts_mut(out, n);
    let mean = x.iter().sum::<f32>() / n as f32;
    for (o, v) in y.iter_mut().zip(x) {
        *o = v - mean;
    }
}
