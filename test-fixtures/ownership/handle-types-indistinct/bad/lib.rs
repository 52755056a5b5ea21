//! Seismic array: both handles reach Rust as `*mut c_void`.

use core::ffi::c_void;

pub struct Picker {
    energy: f64,
}

pub struct Trace {
    samples: Vec<f32>,
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_picker_reset(p: *mut c_void) {
    if let Some(p) = unsafe { (p as *mut Picker).as_mut() } {
        p.energy = 0.0;
    }
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_trace_clear(t: *mut c_void) {
    if let Some(t) = unsafe { (t as *mut Trace).as_mut() } {
        t.samples.clear();
    }
}
