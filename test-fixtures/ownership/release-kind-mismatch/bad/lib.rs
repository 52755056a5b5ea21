//! Seismic-array event log: a station label released as a Box, and an event record released as
//! the wrong struct.

use core::ffi::{c_char, c_void};
use std::ffi::CString;

pub struct Event {
    origin_ms: u64,
    magnitude: f32,
}

pub struct Station {
    code: [u8; 8],
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_label_new(idx: u32) -> *mut c_char {
    CString::new(format!("EV{idx}")).unwrap_or_default().into_raw()
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_label_free(s: *mut c_char) {
    if !s.is_null() {
        drop(unsafe { Box::from_raw(s) });
    }
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_event_new(origin_ms: u64) -> *mut c_void {
    Box::into_raw(Box::new(Event { origin_ms, magnitude: 0.0 })) as *mut c_void
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_event_free(e: *mut c_void) {
    if !e.is_null() {
        drop(unsafe { Box::from_raw(e as *mut Station) });
    }
}
