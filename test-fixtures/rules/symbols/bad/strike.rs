// Lightning-detector front end: strike counter kernels.
use core::ffi::c_int;

#[no_mangle]
pub extern "C" fn strike_count_reset() -> c_int { 0 }

pub extern "C" fn strike_window_ms(ms: u32) -> c_int { ms as c_int }

#[no_mangle]
pub fn strike_gain(db: f32) -> f32 { db }

#[no_mangle]
pub extern "C" fn strike_rate(per_min: f32) -> f32 { per_min }

extern "C" {
    fn strike_led_blink(times: u32);
}
