//! Seismic-array picker whose release functions accept NULL.

use core::ffi::c_void;
use core::ptr::NonNull;

pub struct Picker {
    energy: f64,
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_picker_new() -> *mut Picker {
    Box::into_raw(Box::new(Picker { energy: 0.0 }))
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_picker_free(p: *mut Picker) {
    if !p.is_null() {
        drop(unsafe { Box::from_raw(p) });
    }
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
    if let Some(t) = NonNull::new(t as *mut Trace) {
        let _ = unsafe { Box::from_raw(t.as_ptr()) };
    }
}

pub struct Gather {
    traces: u32,
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_gather_new() -> Option<Box<Gather>> {
    Some(Box::new(Gather { traces: 0 }))
}

/// Option<Box<T>> is NULL-safe by construction (Rust Reference: Option<Box<T>> has the
/// pointer's representation, None is NULL).
#[unsafe(no_mangle)]
pub extern "C" fn seis_gather_free(_g: Option<Box<Gather>>) {}
