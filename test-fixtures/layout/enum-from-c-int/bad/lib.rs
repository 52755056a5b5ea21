//! Mode control: the C block passes a plain int.

#[repr(C)]
#[derive(Clone, Copy)]
pub enum LightningMode {
    Idle = 0,
    Armed = 1,
    Triggered = 2,
}

#[no_mangle]
pub extern "C" fn lm_set_mode(mode: LightningMode) -> i32 {
    mode as i32
}

extern "C" {
    pub fn lm_get_mode() -> LightningMode;
}
