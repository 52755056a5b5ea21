use core::mem::size_of;
use core::slice;

#[no_mangle]
pub unsafe extern "C" fn seis_scale(trace: *const f32, nbytes: usize, out: *mut f32) {
    let x = slice::from_raw_parts(trace, nbytes / size_of::<f32>());
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

#[no_mangle]
pub unsafe extern "C" fn seis_checksum(frame: *const core::ffi::c_void, nbytes: usize) -> u32 {
    let b = slice::from_raw_parts(frame as *const u8, nbytes);
    b.iter().fold(0x811c_9dc5u32, |h, &x| (h ^ u32::from(x)).wrapping_mul(0x0100_0193))
}

#[no_mangle]
pub unsafe extern "C" fn seis_zero_raw(raw: *mut f32, nbytes: usize) {
    core::ptr::write_bytes(raw as *mut u8, 0, nbytes);
}

#[no_mangle]
pub unsafe extern "C" fn seis_fill_taper(taper: *mut f32, nbytes: usize) {
    let n = nbytes / size_of::<f32>();
    for i in 0..n {
        let x = core::f32::consts::PI * i as f32 / n as f32;
        *taper.add(i) = x.sin() * x.sin();
    }
}

#[no_mangle]
pub unsafe extern "C" fn seis_gain_scaled(raw: *mut f32, nbytes: usize, g: f32) {
    let v = slice::from_raw_parts_mut(raw, nbytes / size_of::<f32>());
    for x in v {
        *x *= g;
    }
}

#[no_mangle]
pub unsafe extern "C" fn seis_gain_raw(raw: *mut f32, nbytes: usize, g: f32) {
    for i in 0..nbytes / 4 {
        *raw.add(i) *= g;
    }
}
