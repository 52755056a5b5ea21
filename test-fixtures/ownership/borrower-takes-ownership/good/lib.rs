//! Seismic-array picker: `seis_picker_push` borrows the picker; only `seis_picker_free` and
//! `seis_picker_into_energy` take it back.

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
    let picker = unsafe { &mut *p };
    picker.count = picker.count.wrapping_add(1);
    picker.energy += sample * sample;
    0
}

/// Borrows the picker through a Box for a moment and hands it back with Box::into_raw.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_picker_reset(p: *mut Picker) {
    if p.is_null() {
        return;
    }
    let mut b = unsafe { Box::from_raw(p) };
    b.count = 0;
    b.energy = 0.0;
    let _ = Box::into_raw(b);
}

/// Consumes the picker and returns its energy.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_picker_into_energy(p: *mut Picker) -> f64 {
    if p.is_null() {
        return 0.0;
    }
    unsafe { Box::from_raw(p) }.energy
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_picker_free(p: *mut Picker) {
    if !p.is_null() {
        drop(unsafe { Box::from_raw(p) });
    }
}
