//! Hydrophone array, C API.
use core::ffi::c_void;
use core::marker::PhantomData;
use core::ptr::NonNull;

/// A row of samples with the element step between channels.
#[repr(C)]
#[derive(Clone, Copy)]
pub struct Strided<T> {
    pub data: T,
    pub stride: usize,
}

/// A reference-counted array handle: one non-null pointer.
#[repr(transparent)]
pub struct Handle<T>(NonNull<PhantomData<T>>);

pub struct Array {
    gain: f32,
}

pub type HydArray = Handle<Array>;

#[repr(C)]
pub struct Frame<'a> {
    pub samples: *const f32,
    pub n: usize,
    pub owner: PhantomData<&'a [f32]>,
}

/// The C API's own status, #[repr(C)] (the API module has another `Status`).
#[repr(C)]
#[derive(Clone, Copy)]
pub enum Status {
    Ok = 0,
    NeedMore = 1,
    Failed = -1,
}

pub type FreeFn = unsafe extern "C" fn(ptr: *const u8, cookie: Option<Handle<c_void>>);

#[no_mangle]
pub unsafe extern "C" fn hyd_row_energy(row: Strided<*const f32>, n: usize) -> f32 {
    let mut e = 0.0;
    for i in 0..n {
        let v = *row.data.add(i * row.stride);
        e += v * v;
    }
    e
}

#[no_mangle]
pub extern "C" fn hyd_array_close(a: Option<HydArray>) -> Status {
    match a {
        Some(_) => Status::Ok,
        None => Status::Failed,
    }
}

#[no_mangle]
pub extern "C" fn hyd_frame_len(f: &mut Frame<'_>) -> usize {
    f.n
}

#[no_mangle]
pub extern "C" fn hyd_set_release(_free: Option<FreeFn>, _cookie: Option<Handle<c_void>>) -> Status {
    Status::NeedMore
}
