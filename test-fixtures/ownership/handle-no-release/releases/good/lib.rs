//! Seismic-array handles released in the shapes the Rust side also uses: a by-value
//! `Option<Box<T>>` parameter dropped when the function returns, and a close through an
//! out-parameter (`*mut *mut T`) that also clears the caller's pointer.

use std::mem::ManuallyDrop;

pub struct Picker {
    threshold: f32,
    /// Dropped by hand in `Drop` (ManuallyDrop on a field is not a handle given to C).
    history: ManuallyDrop<Vec<f32>>,
}

impl Drop for Picker {
    fn drop(&mut self) {
        unsafe { ManuallyDrop::drop(&mut self.history) }
    }
}

#[no_mangle]
pub extern "C" fn seis_picker_new(threshold: f32) -> Option<Box<Picker>> {
    Some(Box::new(Picker { threshold, history: ManuallyDrop::new(Vec::new()) }))
}

#[no_mangle]
pub extern "C" fn seis_picker_free(_: Option<Box<Picker>>) {}

pub struct Station {
    id: u32,
}

#[no_mangle]
pub extern "C" fn seis_station_open(id: u32) -> *mut Station {
    Box::into_raw(Box::new(Station { id }))
}

#[no_mangle]
pub unsafe extern "C" fn seis_station_close(st: *mut *mut Station) {
    if st.is_null() || (*st).is_null() {
        return;
    }
    drop(Box::from_raw(*st));
    *st = std::ptr::null_mut();
}

/// A trace view with a lifetime: the handle type is a generic instance (`Trace<'static>`).
pub struct Trace<'a> {
    samples: &'a [f32],
}

#[no_mangle]
pub unsafe extern "C" fn seis_trace_new(samples: *const f32, n: usize) -> Option<Box<Trace<'static>>> {
    if samples.is_null() {
        return None;
    }
    Some(Box::new(Trace { samples: std::slice::from_raw_parts(samples, n) }))
}

#[no_mangle]
pub extern "C" fn seis_trace_free(_: Option<Box<Trace>>) {}

/// A handle that is a generic instance behind a raw pointer (`*mut Mutex<Gain>`): the
/// constructor's and the release's pointee spell the same type.
pub struct Gain {
    db: f32,
}

#[no_mangle]
pub extern "C" fn new_shared_gain(db: f32) -> *mut std::sync::Mutex<Gain> {
    let g = Box::new(std::sync::Mutex::new(Gain { db }));
    Box::into_raw(g)
}

#[no_mangle]
pub unsafe extern "C" fn shared_gain_release(g: *mut std::sync::Mutex<Gain>) {
    if g.is_null() {
        return;
    }
    drop(Box::from_raw(g));
}
