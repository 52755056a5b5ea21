use wasm_bindgen::prelude::*;

// Imports from the JavaScript host, not from C.
#[wasm_bindgen]
extern "C" {
    fn console_log(s: &str);
    fn performance_now() -> f64;
}

pub fn trace(s: &str) {
    console_log(s);
}
