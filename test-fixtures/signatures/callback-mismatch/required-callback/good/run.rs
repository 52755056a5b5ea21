//! Radio-telescope correlator: integration loop.
use core::ffi::c_void;

pub type RtProgressFn = unsafe extern "C" fn(pct: f32, ctx: *mut c_void) -> i32;

static mut PROGRESS: Option<(RtProgressFn, usize)> = None;

#[no_mangle]
pub unsafe extern "C" fn rt_corr_run(n_dumps: u32, on_dump: unsafe extern "C" fn(*const f32, usize, *mut c_void), ctx: *mut c_void) -> i32 {
    let vis = [0.0f32; 64];
    for _ in 0..n_dumps {
        on_dump(vis.as_ptr(), vis.len(), ctx);
    }
    0
}

#[no_mangle]
pub unsafe extern "C" fn rt_set_progress(cb: RtProgressFn, ctx: *mut c_void) {
    PROGRESS = Some((cb, ctx as usize));
}
