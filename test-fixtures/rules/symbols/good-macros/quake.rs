use core::ffi::c_int;

#[unsafe(no_mangle)]
pub unsafe extern "C" fn quake_pick(trace: *const f32, n: usize) -> c_int { 0 }

#[unsafe(no_mangle)]
pub unsafe extern "C" fn quake_window(len: *mut usize) -> *const f32 { core::ptr::null() }
