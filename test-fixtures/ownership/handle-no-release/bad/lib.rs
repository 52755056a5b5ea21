//! Seismic-array picker: the C side can create a picker and a station label, but nothing
//! releases either.

use core::ffi::{c_char, c_int};
use std::ffi::CString;

pub struct Picker {
    sta_len: u32,
    energy: f64,
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_picker_new(sta_len: u32) -> *mut Picker {
    Box::into_raw(Box::new(Picker { sta_len, energy: 0.0 }))
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
pub extern "C" fn seis_station_name(idx: u32) -> *mut c_char {
    CString::new(format!("STA{idx:03}")).unwrap_or_default().into_raw()
}
