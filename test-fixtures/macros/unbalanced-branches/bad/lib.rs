//! Rust side of the seismic array: the gain stage the C shot stacker calls.
#[no_mangle]
pub extern "C" fn seis_gain(x: f64) -> f64 {
    x * 0.5
}
