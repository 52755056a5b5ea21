//! Seismic-array picker whose release functions trust the pointer.

use core::ffi::c_void;

pub struct Picker {
    energy: f64,
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_picker_new() -> *mut Picker {
    Box::into_raw(Box::new(Picker { energy: 0.0 }))
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_picker_free(p: *mut Picker) {
    drop(unsafe { Box::from_raw(p) });
}

pub struct Trace {
    samples: Vec<f32>,
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_trace_new() -> *mut c_void {
    Box::into_raw(Box::new(Trace { samples: Vec::new() })) as *mut c_void
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_trace_free(t: *mut c_void) {
    let t = t as *mut Trace;
    let _ = unsafe { Box::from_raw(t) };
}
