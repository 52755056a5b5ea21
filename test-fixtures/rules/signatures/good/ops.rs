use core::ffi::{c_char, c_int, c_void};

pub type LdLogFn = unsafe extern "C" fn(*mut c_void, *const c_char);

/// Rust side of `ld_plugin_ops`: the entries C may leave NULL are `Option`s; `on_strike`, which
/// the header requires, is a plain fn pointer.
#[repr(C)]
pub struct LdPluginOps {
    pub ctx: *mut c_void,
    pub on_strike: unsafe extern "C" fn(*mut c_void, f64) -> c_int,
    pub on_overflow: Option<unsafe extern "C" fn(*mut c_void, u32)>,
    pub log: Option<LdLogFn>,
    pub on_close: Option<unsafe extern "C" fn(*mut c_void)>,
}

#[no_mangle]
pub unsafe extern "C" fn ld_register(ops: *const LdPluginOps) -> c_int {
    let Some(o) = (unsafe { ops.as_ref() }) else { return -1 };
    if let Some(close) = o.on_close {
        unsafe { close(o.ctx) };
    }
    unsafe { (o.on_strike)(o.ctx, 0.0) }
}
