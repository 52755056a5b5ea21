//! Hydrophone array, C API with slips.
use core::marker::PhantomData;

pub struct Strided<T> {
    pub data: T,
    pub stride: usize,
}

#[repr(C)]
pub struct Tagged<T> {
    pub value: T,
    pub tag: u32,
}

#[repr(transparent)]
pub struct RawHandle<T>(*mut T, PhantomData<T>);

pub struct Array {
    gain: f32,
}

pub enum Status {
    Ok,
    Failed,
}

#[no_mangle]
pub unsafe extern "C" fn hyd_row_energy(row: Strided<*const f32>, n: usize) -> f32 {
    let _ = (row.stride, n);
    0.0
}

#[no_mangle]
pub extern "C" fn hyd_tagged_peak(t: Tagged<Vec<f32>>) -> f32 {
    t.value.iter().cloned().fold(0.0, f32::max)
}

#[no_mangle]
pub extern "C" fn hyd_array_close(a: Option<RawHandle<Array>>) -> i32 {
    a.is_some() as i32
}

#[no_mangle]
pub extern "C" fn hyd_status() -> Status {
    Status::Failed
}

#[no_mangle]
pub extern "C" fn hyd_tint(c: rgbx::Rgba<u8>) -> u8 {
    c.r
}
