//! A Rust-only state behind an opaque C handle needs no repr(C): C never looks inside.
pub struct SeisFilter {
    taps: Vec<f32>,
}

#[no_mangle]
pub unsafe extern "C" fn seis_filter_reset(h: *mut SeisFilter) {
    if let Some(f) = unsafe { h.as_mut() } {
        f.taps.clear();
    }
}
