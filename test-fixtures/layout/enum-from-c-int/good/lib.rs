//! Mode control: the int is received as an int and checked.

#[repr(C)]
#[derive(Clone, Copy)]
pub enum LightningMode {
    Idle = 0,
    Armed = 1,
    Triggered = 2,
}

impl LightningMode {
    fn from_c(v: i32) -> Option<Self> {
        match v {
            0 => Some(Self::Idle),
            1 => Some(Self::Armed),
            2 => Some(Self::Triggered),
            _ => None,
        }
    }
}

#[no_mangle]
pub extern "C" fn lm_set_mode(mode: i32) -> i32 {
    match LightningMode::from_c(mode) {
        Some(m) => m as i32,
        None => -1,
    }
}

extern "C" {
    pub fn lm_get_mode() -> i32;
}
