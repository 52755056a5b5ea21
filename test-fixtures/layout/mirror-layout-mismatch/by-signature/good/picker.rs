//! Seismic array trigger picker (Rust side of seis.h).

/// Start and end of the sample run, kept together.
#[repr(C)]
pub struct Span {
    pub start: *const f32,
    pub end: *const f32,
}

/// The C `seis_window`, with its two pointers grouped.
#[repr(C)]
pub struct SeisScanWindow {
    pub span: Span,
    pub n_ch: u32,
    pub gain_db: i32,
}

/// The C `seis_stage`; the coefficient union is held as its array member.
#[repr(C)]
pub struct SeisStage {
    pub coef: [i16; 4],
    pub decim: u32,
}

#[repr(C)]
#[derive(Clone, Copy)]
pub enum Mode {
    Idle = 0,
    Trigger = 1,
    Record = 2,
}

/// Rust's own picker state; the C `picker` of the same name is a test double, never passed.
pub struct Picker {
    sta: f64,
    lta: f64,
    history: Vec<f64>,
}

#[no_mangle]
pub unsafe extern "C" fn seis_scan(w: *mut SeisScanWindow, st: *const SeisStage) -> i32 {
    if w.is_null() || st.is_null() {
        return -1;
    }
    let w = &mut *w;
    let [c0, ..] = (*st).coef;
    w.gain_db = c0 as i32;
    0
}

#[no_mangle]
pub unsafe extern "C" fn seis_state(w: *const SeisScanWindow) -> Mode {
    if w.is_null() || (*w).n_ch == 0 { Mode::Idle } else { Mode::Trigger }
}

impl Picker {
    pub fn ratio(&self) -> f64 {
        let _ = self.history.len();
        self.sta / self.lta
    }
}
