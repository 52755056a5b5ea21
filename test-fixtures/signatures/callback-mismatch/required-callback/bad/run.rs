//! Radio-telescope correlator: integration loop (slips).
use core::ffi::c_void;

pub type RtProgressFn = unsafe extern "C" fn(pct: f64, ctx: *mut c_void) -> i32;

static mut PROGRESS: Option<(RtProgressFn, usize)> = None;
static mut FLAGGER: Option<(unsafe extern "C" fn(u32, *mut c_void) -> i32, usize)> = None;

#[no_mangle]
pub unsafe extern "C" fn rt_set_flagger(on_flag: unsafe extern "C" fn(u32, *mut c_void) -> i32, ctx: *mut c_void) -> i32 {
    FLAGGER = Some((on_flag, ctx as usize));
    0
}

#[no_mangle]
pub unsafe extern "C" fn rt_set_progress(cb: RtProgressFn, ctx: *mut c_void) {
    PROGRESS = Some((cb, ctx as usize));
}
