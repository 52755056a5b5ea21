/// Monotonic sample clock (Unix build).
#[no_mangle]
pub extern "C" fn beam_clock() -> u64 {
    0
}
