use core::ffi::{c_char, c_int, c_void};

pub type LdLogFn = unsafe extern "C" fn(*mut c_void, *const c_char);

/// Rust side of `ld_plugin_ops`: three entries C may leave NULL are plain fn pointers here.
#[repr(C)]
pub struct LdPluginOps {
    pub ctx: *mut c_void,
    pub on_strike: unsafe extern "C" fn(*mut c_void, f64) -> c_int,
    pub on_overflow: unsafe extern "C" fn(*mut c_void, u32),
    pub log: LdLogFn,
    pub on_close: unsafe extern "C" fn(*mut c_void),
}

#[no_mangle]
pub unsafe extern "C" fn ld_register(ops: *const LdPluginOps) -> c_int {
    match unsafe { ops.as_ref() } {
        Some(o) => unsafe { (o.on_strike)(o.ctx, 0.0) },
        None => -1,
    }
}
