//! Seismic-array handles that nothing takes back: the close function only clears the caller's
//! pointer, and the picker has no release function at all.

use std::mem::ManuallyDrop;

pub struct Picker {
    threshold: f32,
    history: ManuallyDrop<Vec<f32>>,
}

#[no_mangle]
pub extern "C" fn seis_picker_new(threshold: f32) -> Option<Box<Picker>> {
    Some(Box::new(Picker { threshold, history: ManuallyDrop::new(Vec::new()) }))
}

pub struct Station {
    id: u32,
}

#[no_mangle]
pub extern "C" fn seis_station_open(id: u32) -> *mut Station {
    Box::into_raw(Box::new(Station { id }))
}

#[no_mangle]
pub unsafe extern "C" fn seis_station_close(st: *mut *mut Station) {
    if st.is_null() {
        return;
    }
    *st = std::ptr::null_mut();
}

pub struct Trace<'a> {
    samples: &'a [f32],
}

/// Nothing takes a trace back.
#[no_mangle]
pub unsafe extern "C" fn seis_trace_new(samples: *const f32, n: usize) -> Option<Box<Trace<'static>>> {
    if samples.is_null() {
        return None;
    }
    Some(Box::new(Trace { samples: std::slice::from_raw_parts(samples, n) }))
}
