//! Radio-telescope correlator kernels (slips).

#[repr(C)]
pub struct RtCorrCfg {
    pub n_ant: u32,
    pub n_chan: u32,
    pub dump_s: f32,
}

extern "C" {
    fn rt_scale(vis: *const f32, n: usize);
}

#[no_mangle]
pub unsafe extern "C" fn rt_corr_fill(out: *const f32, n: usize) -> i32 {
    let v = core::slice::from_raw_parts(out, n);
    rt_scale(v.as_ptr(), v.len());
    0
}

#[no_mangle]
pub unsafe extern "C" fn rt_corr_apply(cfg: *mut RtCorrCfg) -> i32 {
    if cfg.is_null() {
        return -1;
    }
    (*cfg).dump_s = 1.0;
    0
}
