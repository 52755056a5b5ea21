use core::slice;

#[no_mangle]
pub unsafe extern "C" fn sonar_filter(input: *const f32, out: *mut f32, n: usize) {
    let x = slice::from_raw_parts(input, n);
    let y = slice::from_raw_parts_mut(out, n);
    y.copy_from_slice(x);
}

#[no_mangle]
pub unsafe extern "C" fn sonar_resample(src: *const f32, src_len: usize, dst: *mut f32, dst_len: usize) {
    let x = slice::from_raw_parts(src, src_len);
    let y = slice::from_raw_parts_mut(dst, dst_len);
    for (i, o) in y.iter_mut().enumerate() {
        *o = x[i * src_len / dst_len];
    }
}
