//! The Rust side keeps the bit-field word as one integer.

#[repr(C)]
pub struct CorrStatus {
    pub bits: u32,
    pub temp_c: u16,
}

#[no_mangle]
pub unsafe extern "C" fn corr_status_read(out: *mut CorrStatus) {
    let _ = out;
}
