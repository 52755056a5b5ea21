//! Lightning detector classifier: sorts strike records into cloud-to-ground and intra-cloud.

#[repr(C, align(16))]
pub struct StrikeSlot {
    pub t_ns: u64,
    pub amplitude: f32,
    pub bearing_deg: f32,
}

#[no_mangle]
pub unsafe extern "C" fn strike_classify(slots: *const StrikeSlot, n: usize, kind_out: *mut u8) -> i32 {
    if slots.is_null() || kind_out.is_null() {
        return -1;
    }
    let slots = core::slice::from_raw_parts(slots, n);
    let kinds = core::slice::from_raw_parts_mut(kind_out, n);
    for (s, k) in slots.iter().zip(kinds.iter_mut()) {
        *k = if s.amplitude > 30.0 { 1 } else { 2 };
    }
    0
}
