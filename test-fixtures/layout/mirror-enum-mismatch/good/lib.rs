//! Lightning-detector kernels (mirrors agree; C values arrive as integers).

#[repr(C)]
pub enum LightningMode {
    Idle = 0,
    Armed = 1,
    Triggered = 2,
}

#[repr(C)]
pub enum Polarity {
    Pos,
    Neg,
}

#[repr(C)]
pub struct StrikeEvent {
    pub pol: i32,
    pub peak_ka: f32,
}

#[repr(C)]
pub enum StrikeKind {
    Cloud = 1,
    Ground = 2,
    Unknown = 3,
}

#[no_mangle]
pub unsafe extern "C" fn lm_report(ev: *const StrikeEvent, kind: i32) {
    let _ = (ev, kind);
}
