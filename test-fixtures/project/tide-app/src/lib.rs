//! Tide-gauge logger for a handheld: the app's Objective-C side starts the Rust sampler.
use std::sync::atomic::{AtomicU32, Ordering};

static SAMPLES: AtomicU32 = AtomicU32::new(0);

/// Declared and called in app/AppMain.m (Objective-C, which ferrule does not parse).
#[no_mangle]
pub extern "C" fn tide_app_main() {
    SAMPLES.store(0, Ordering::Relaxed);
}

/// Named in no C, C++ or Objective-C file: still reported.
#[no_mangle]
pub extern "C" fn tide_gauge_reset() {
    SAMPLES.store(0, Ordering::Relaxed);
}

/// Declared in include/tide_gauge.h.
#[no_mangle]
pub extern "C" fn tide_gauge_samples() -> u32 {
    SAMPLES.load(Ordering::Relaxed)
}
