use core::ffi::c_int;

#[unsafe(no_mangle)]
pub extern "C" fn strike_window_ms(ms: u32) -> c_int { ms as c_int }

#[unsafe(export_name = "strike_gain")]
pub extern "C" fn gain_db(db: f32) -> f32 { db }

unsafe extern "C" {
    fn strike_led_blink(times: u32);
}

fn helper_not_exported() {}
