//! Tide-gauge telemetry kernels, called from the C and C++ side through
//! include/tg/tide_gauge.h.

use std::os::raw::c_char;

pub mod parse;
pub mod report;
pub mod text;

pub const TG_NAME_MAX: usize = 16;

pub const TG_OK: i32 = 0;
pub const TG_ERR_NULL: i32 = -1;
pub const TG_ERR_SYNTAX: i32 = -2;
pub const TG_ERR_RANGE: i32 = -3;

/// Mirrors `tg_sample`.
#[repr(C)]
#[derive(Clone, Copy)]
pub struct TgSample {
    pub t_ms: i64,
    pub level_mm: i32,
    pub flags: u16,
    pub station: [c_char; TG_NAME_MAX],
}

/// Mirrors `tg_report`.
#[repr(C)]
pub struct TgReport {
    pub name: [u8; TG_NAME_MAX],
    pub n_samples: u32,
    pub min_mm: i32,
    pub max_mm: i32,
    pub mean_mm: f64,
}

/// Copies `src` into a fixed NUL-terminated field, truncating to the field's
/// size minus one; the rest of the field is zeroed.
pub(crate) fn fill_name<T: Copy>(dst: &mut [T; TG_NAME_MAX], src: &[u8], conv: impl Fn(u8) -> T) {
    let keep = src.iter().take(TG_NAME_MAX - 1).chain(std::iter::repeat(&0u8));
    for (d, s) in dst.iter_mut().zip(keep) {
        *d = conv(*s);
    }
}
