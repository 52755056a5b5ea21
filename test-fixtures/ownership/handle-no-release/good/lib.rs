//! Seismic-array picker: every handle has a release function; the picker is released through a
//! helper function of the crate.

use core::ffi::{c_char, c_int};
use std::ffi::CString;

pub struct Picker {
    sta_len: u32,
    energy: f64,
}

fn make_picker(sta_len: u32) -> *mut Picker {
    Box::into_raw(Box::new(Picker { sta_len, energy: 0.0 }))
}

unsafe fn drop_picker(p: *mut Picker) {
    drop(unsafe { Box::from_raw(p) });
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_picker_new(sta_len: u32) -> *mut Picker {
    make_picker(sta_len)
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_picker_push(p: *mut Picker, sample: f64) -> c_int {
    match unsafe { p.as_mut() } {
        Some(p) => {
            p.energy += sample * sample / p.sta_len.max(1) as f64;
            0
        }
        None => -1,
    }
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_picker_free(p: *mut Picker) {
    if p.is_null() {
        return;
    }
    unsafe { drop_picker(p) };
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_station_name(idx: u32) -> *mut c_char {
    CString::new(format!("STA{idx:03}")).unwrap_or_default().into_raw()
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_string_free(s: *mut c_char) {
    if !s.is_null() {
        drop(unsafe { CString::from_raw(s) });
    }
}
