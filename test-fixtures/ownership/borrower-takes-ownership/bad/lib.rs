//! Seismic-array picker: `seis_picker_push` takes the picker back into a Box to work on it, so
//! the picker is freed at the end of every push while the C++ block still holds it.

use core::ffi::c_int;

pub struct Picker {
    count: u64,
    energy: f64,
}

#[unsafe(no_mangle)]
pub extern "C" fn seis_picker_new() -> *mut Picker {
    Box::into_raw(Box::new(Picker { count: 0, energy: 0.0 }))
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_picker_push(p: *mut Picker, sample: f64) -> c_int {
    if p.is_null() {
        return -1;
    }
    let mut picker = unsafe { Box::from_raw(p) };
    picker.count = picker.count.wrapping_add(1);
    picker.energy += sample * sample;
    0
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_picker_free(p: *mut Picker) {
    if !p.is_null() {
        drop(unsafe { Box::from_raw(p) });
    }
}
