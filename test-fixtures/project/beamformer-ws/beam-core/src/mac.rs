/// macOS builds only (no configured target): not part of the model.
#[no_mangle]
pub extern "C" fn beam_gain(db: f32) -> f32 {
    db
}
