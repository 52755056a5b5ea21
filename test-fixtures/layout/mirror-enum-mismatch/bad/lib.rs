//! Lightning-detector kernels.

#[repr(C)]
pub enum LightningMode {
    Idle = 0,
    Armed = 2,
    Triggered = 3,
}

#[repr(u8)]
pub enum Polarity {
    Pos,
    Neg,
}

#[repr(C)]
pub struct StrikeEvent {
    pub pol: Polarity,
    pub peak_ka: f32,
}

#[repr(C)]
pub enum StrikeKind {
    Cloud = 1,
    Ground = 2,
}

#[no_mangle]
pub unsafe extern "C" fn lm_report(ev: *const StrikeEvent, kind: StrikeKind) {
    let _ = (ev, kind);
}
