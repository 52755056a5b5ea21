//! Browser monitor of the array: JavaScript imports through the bindings generator, not C.
use wasm_bindgen::prelude::*;

pub struct Monitor {
    pub tx: Vec<String>,
}

#[wasm_bindgen(module = "/monitor.js")]
extern "C" {
    fn start_monitor(m: Monitor);
}
