//! Lightning-detector front end: stroke tracker and sensor channels, owned by Rust behind
//! opaque handles. Every handle has a constructor and a NULL-safe release function.

use core::ffi::{c_char, c_int};
use std::ffi::CString;

pub struct StrokeTracker {
    window: u32,
    count: u32,
    last: Vec<f32>,
}

pub struct Sensor {
    channel: u32,
    gain: f32,
}

#[unsafe(no_mangle)]
pub extern "C" fn ltg_tracker_new(window: u32) -> *mut StrokeTracker {
    Box::into_raw(Box::new(StrokeTracker { window, count: 0, last: Vec::with_capacity(16) }))
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn ltg_tracker_feed(h: *mut StrokeTracker, field_vm: f32) -> c_int {
    match unsafe { h.as_mut() } {
        Some(st) => {
            if field_vm.abs() > 1000.0 {
                st.count = st.count.wrapping_add(1);
                if st.last.len() < st.window as usize {
                    st.last.push(field_vm);
                }
            }
            0
        }
        None => -1,
    }
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn ltg_tracker_count(h: *const StrokeTracker) -> u32 {
    match unsafe { h.as_ref() } {
        Some(st) => st.count,
        None => 0,
    }
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn ltg_tracker_free(h: *mut StrokeTracker) {
    if h.is_null() {
        return;
    }
    drop(unsafe { Box::from_raw(h) });
}

#[unsafe(no_mangle)]
pub extern "C" fn ltg_sensor_new(channel: u32) -> *mut Sensor {
    Box::into_raw(Box::new(Sensor { channel, gain: 1.0 }))
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn ltg_sensor_gain(s: *const Sensor) -> f32 {
    match unsafe { s.as_ref() } {
        Some(s) => s.gain * (1.0 + s.channel as f32 * 0.0),
        None => 0.0,
    }
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn ltg_sensor_free(s: *mut Sensor) {
    if !s.is_null() {
        drop(unsafe { Box::from_raw(s) });
    }
}

#[unsafe(no_mangle)]
pub extern "C" fn ltg_label(channel: u32) -> *mut c_char {
    CString::new(format!("ltg-ch{channel}")).unwrap_or_default().into_raw()
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn ltg_label_free(s: *mut c_char) {
    if s.is_null() {
        return;
    }
    drop(unsafe { CString::from_raw(s) });
}
