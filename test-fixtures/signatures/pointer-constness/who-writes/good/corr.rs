//! Radio-telescope correlator kernels.
use core::ffi::c_char;
use core::ptr::NonNull;
use std::ffi::CString;

#[repr(C)]
pub struct RtCorrCfg {
    pub n_ant: u32,
    pub n_chan: u32,
    pub dump_s: f32,
}

extern "C" {
    fn rt_log_stats(vis: *mut f32, n: usize);
}

#[no_mangle]
pub unsafe extern "C" fn rt_corr_check(cfg: *const RtCorrCfg) -> i32 {
    if cfg.is_null() || (*cfg).n_ant < 2 { -1 } else { 0 }
}

#[no_mangle]
pub unsafe extern "C" fn rt_corr_sum(rows: *const *const f32, n_rows: usize, n: usize) -> f32 {
    let mut s = 0.0;
    for r in core::slice::from_raw_parts(rows, n_rows) {
        for v in core::slice::from_raw_parts(*r, n) {
            s += *v;
        }
    }
    s
}

#[no_mangle]
pub extern "C" fn rt_label_new(ant: u32) -> *mut c_char {
    CString::new(format!("ant{ant}")).map(CString::into_raw).unwrap_or(core::ptr::null_mut())
}

#[no_mangle]
pub unsafe extern "C" fn rt_label_free(label: *mut c_char) {
    if !label.is_null() {
        drop(CString::from_raw(label));
    }
}

#[no_mangle]
pub unsafe extern "C" fn rt_corr_peak(vis: NonNull<f32>, n: usize) -> f32 {
    let v = core::slice::from_raw_parts(vis.as_ptr(), n);
    let peak = v.iter().cloned().fold(0.0, f32::max);
    let mut copy = v.to_vec();
    rt_log_stats(copy.as_mut_ptr(), copy.len());
    peak
}
