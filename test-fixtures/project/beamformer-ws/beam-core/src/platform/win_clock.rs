/// Monotonic sample clock (Windows build).
#[no_mangle]
pub extern "C" fn beam_clock() -> u64 {
    1
}
