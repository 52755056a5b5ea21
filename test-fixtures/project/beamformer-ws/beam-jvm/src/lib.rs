//! Native methods of the Android sonar display app (called by the JVM, not by C).
use core::ffi::c_void;

#[no_mangle]
pub extern "system" fn Java_org_sonar_display_BeamNative_steer(_env: *mut c_void, _class: *mut c_void, bearing: f32) -> f32 {
    bearing
}

#[no_mangle]
pub extern "system" fn Java_org_sonar_display_BeamNative_level(_env: *mut c_void, _class: *mut c_void) -> i32 {
    0
}
