//! Reports (text, snprintf convention) and binary frames.

use std::ffi::{CStr, CString};
use std::os::raw::c_char;
use std::{ptr, slice};

use crate::text::set_last_error;
use crate::{fill_name, TgReport, TgSample};

const FRAME_MAGIC: [u8; 2] = [0x7e, 0x47];
const FRAME_HEADER: usize = 4;
const FRAME_PER_SAMPLE: usize = 14;

/// # Safety
/// `r` is NULL or writable; `name` is NULL or a NUL-terminated string.
#[no_mangle]
pub unsafe extern "C" fn tg_report_init(r: *mut TgReport, name: *const c_char) -> bool {
    if r.is_null() || name.is_null() {
        set_last_error("null argument");
        return false;
    }
    let mut rep = TgReport { name: [0; crate::TG_NAME_MAX], n_samples: 0, min_mm: i32::MAX, max_mm: i32::MIN, mean_mm: 0.0 };
    fill_name(&mut rep.name, CStr::from_ptr(name).to_bytes(), |b| b);
    r.write(rep);
    true
}

/// # Safety
/// `r` and `s` are NULL or valid.
#[no_mangle]
pub unsafe extern "C" fn tg_report_add(r: *mut TgReport, s: *const TgSample) {
    let (Some(rep), Some(s)) = (r.as_mut(), s.as_ref()) else { return };
    let Some(n) = rep.n_samples.checked_add(1) else { return };
    rep.n_samples = n;
    rep.min_mm = rep.min_mm.min(s.level_mm);
    rep.max_mm = rep.max_mm.max(s.level_mm);
    rep.mean_mm += (f64::from(s.level_mm) - rep.mean_mm) / f64::from(n);
}

fn report_text(rep: &TgReport) -> String {
    let end = rep.name.iter().position(|b| *b == 0).unwrap_or(rep.name.len());
    let name = String::from_utf8_lossy(rep.name.get(..end).unwrap_or(&[]));
    if rep.n_samples == 0 {
        return format!("{name}: no samples");
    }
    format!("{name}: n={} min={} mm max={} mm mean={:.1} mm", rep.n_samples, rep.min_mm, rep.max_mm, rep.mean_mm)
}

/// snprintf convention: writes at most `out_len` bytes including the NUL and
/// returns the length the whole text needs, NUL included.
///
/// # Safety
/// `r` is NULL or valid; `out` is NULL or points to `out_len` writable bytes.
#[no_mangle]
pub unsafe extern "C" fn tg_format_report(r: *const TgReport, out: *mut c_char, out_len: usize) -> usize {
    let Some(rep) = r.as_ref() else { return 0 };
    let text = report_text(rep);
    let needed = text.len().saturating_add(1);
    if !out.is_null() && out_len > 0 {
        let n = text.len().min(out_len - 1);
        ptr::copy_nonoverlapping(text.as_ptr(), out as *mut u8, n);
        *out.add(n) = 0;
    }
    needed
}

fn encode(samples: &[TgSample]) -> Option<Vec<u8>> {
    let count = u16::try_from(samples.len()).ok()?;
    let size = samples.len().checked_mul(FRAME_PER_SAMPLE)?.checked_add(FRAME_HEADER + 1)?;
    let mut v = Vec::with_capacity(size);
    v.extend_from_slice(&FRAME_MAGIC);
    v.extend_from_slice(&count.to_le_bytes());
    for s in samples {
        v.extend_from_slice(&s.t_ms.to_le_bytes());
        v.extend_from_slice(&s.level_mm.to_le_bytes());
        v.extend_from_slice(&s.flags.to_le_bytes());
    }
    let check = v.iter().fold(0u8, |acc, b| acc ^ b);
    v.push(check);
    Some(v)
}

/// Returns the bytes written, or 0 when `frame_cap` is too small.
///
/// # Safety
/// `samples` points to `n_samples` samples; `frame` to `frame_cap` writable bytes.
#[no_mangle]
pub unsafe extern "C" fn tg_encode_frame(samples: *const TgSample, n_samples: usize, frame: *mut u8, frame_cap: usize) -> usize {
    if samples.is_null() || frame.is_null() {
        return 0;
    }
    let input = slice::from_raw_parts(samples, n_samples);
    let dst = slice::from_raw_parts_mut(frame, frame_cap);
    let Some(bytes) = encode(input) else { return 0 };
    match dst.get_mut(..bytes.len()) {
        Some(d) => {
            d.copy_from_slice(&bytes);
            bytes.len()
        }
        None => {
            set_last_error("frame buffer too small");
            0
        }
    }
}

/// # Safety
/// `s` is NULL or valid; `buf` is NULL or points to `buf_size` writable bytes.
#[no_mangle]
pub unsafe extern "C" fn tg_format_sample(s: *const TgSample, buf: *mut c_char, buf_size: usize) -> usize {
    let Some(s) = s.as_ref() else { return 0 };
    let station: Vec<u8> = s.station.iter().take_while(|c| **c != 0).map(|c| *c as u8).collect();
    let text = format!("{} {} {} {}", String::from_utf8_lossy(&station), s.t_ms, s.level_mm, s.flags);
    if !buf.is_null() && buf_size > 0 {
        let dst = slice::from_raw_parts_mut(buf as *mut u8, buf_size);
        let (body, _) = dst.split_at_mut(buf_size - 1);
        let mut written = 0;
        for (d, b) in body.iter_mut().zip(text.bytes()) {
            *d = b;
            written += 1;
        }
        if let Some(nul) = dst.get_mut(written) {
            *nul = 0;
        }
    }
    text.len().saturating_add(1)
}

/// Owned: freed with tg_string_free.
///
/// # Safety
/// `r` is NULL or valid.
#[no_mangle]
pub unsafe extern "C" fn tg_report_json(r: *const TgReport) -> *mut c_char {
    let Some(rep) = r.as_ref() else { return ptr::null_mut() };
    let end = rep.name.iter().position(|b| *b == 0).unwrap_or(rep.name.len());
    let name = String::from_utf8_lossy(rep.name.get(..end).unwrap_or(&[]));
    let json = format!("{{\"station\":\"{name}\",\"n\":{},\"min_mm\":{},\"max_mm\":{}}}", rep.n_samples, rep.min_mm, rep.max_mm);
    match CString::new(json) {
        Ok(c) => c.into_raw(),
        Err(_) => ptr::null_mut(),
    }
}

/// CRC-16/CCITT-FALSE (poly 0x1021, init 0xFFFF).
///
/// # Safety
/// `data` points to `nbytes` readable bytes (or is NULL with `nbytes == 0`).
#[no_mangle]
pub unsafe extern "C" fn tg_crc16(data: *const u8, nbytes: usize) -> u16 {
    let bytes: &[u8] = if data.is_null() || nbytes == 0 { &[] } else { slice::from_raw_parts(data, nbytes) };
    let mut crc: u16 = 0xFFFF;
    for b in bytes {
        crc ^= u16::from(*b) << 8;
        for _ in 0..8 {
            crc = if crc & 0x8000 != 0 { (crc << 1) ^ 0x1021 } else { crc << 1 };
        }
    }
    crc
}

/// Owned bytes: a boxed slice handed to C; tg_bytes_free takes it back with
/// the same length.
///
/// # Safety
/// `samples` points to `n_samples` samples; `out_len` is NULL or writable.
#[no_mangle]
pub unsafe extern "C" fn tg_encode_alloc(samples: *const TgSample, n_samples: usize, out_len: *mut usize) -> *mut u8 {
    if samples.is_null() || out_len.is_null() {
        return ptr::null_mut();
    }
    let Some(bytes) = encode(slice::from_raw_parts(samples, n_samples)) else { return ptr::null_mut() };
    let boxed: Box<[u8]> = bytes.into_boxed_slice();
    *out_len = boxed.len();
    Box::into_raw(boxed) as *mut u8
}

/// # Safety
/// `p` is NULL or came from `tg_encode_alloc` with `len` its reported length.
#[no_mangle]
pub unsafe extern "C" fn tg_bytes_free(p: *mut u8, len: usize) {
    if p.is_null() {
        return;
    }
    drop(Box::from_raw(ptr::slice_from_raw_parts_mut(p, len)));
}
