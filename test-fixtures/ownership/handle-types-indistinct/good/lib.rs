//! Seismic array: each handle has its own Rust type.

pub struct Picker {
    energy: f64,
}

pub struct Trace {
    samples: Vec<f32>,
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_picker_reset(p: *mut Picker) {
    if let Some(p) = unsafe { p.as_mut() } {
        p.energy = 0.0;
    }
}

#[unsafe(no_mangle)]
pub unsafe extern "C" fn seis_trace_clear(t: *mut Trace) {
    if let Some(t) = unsafe { t.as_mut() } {
        t.samples.clear();
    }
}
