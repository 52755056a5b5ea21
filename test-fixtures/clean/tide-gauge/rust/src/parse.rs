//! Line parsing: a NUL-terminated C string, or (pointer, length) bytes.

use std::ffi::CStr;
use std::os::raw::{c_char, c_int};
use std::slice;

use crate::text::{clear_last_error, set_last_error};
use crate::{fill_name, TgSample, TG_ERR_NULL, TG_ERR_RANGE, TG_ERR_SYNTAX, TG_OK};

enum ParseError {
    Syntax(&'static str),
    Range(&'static str),
}

fn field<'a>(it: &mut impl Iterator<Item = &'a [u8]>, what: &'static str) -> Result<&'a [u8], ParseError> {
    it.next().ok_or(ParseError::Syntax(what))
}

fn number<T: std::str::FromStr>(bytes: &[u8], what: &'static str) -> Result<T, ParseError> {
    let s = std::str::from_utf8(bytes).map_err(|_| ParseError::Syntax(what))?;
    let digits = s.strip_prefix('-').unwrap_or(s);
    if digits.is_empty() || !digits.bytes().all(|b| b.is_ascii_digit()) {
        return Err(ParseError::Syntax(what));
    }
    // only digits: the value does not fit the field
    s.parse::<T>().map_err(|_| ParseError::Range(what))
}

fn parse_line(line: &[u8]) -> Result<TgSample, ParseError> {
    let mut it = line.split(|b| *b == b' ' || *b == b'\t').filter(|f| !f.is_empty());
    let station = field(&mut it, "missing station")?;
    let t_ms: i64 = number(field(&mut it, "missing time")?, "bad time")?;
    let level_mm: i32 = number(field(&mut it, "missing level")?, "bad level")?;
    let flags: u16 = match it.next() {
        Some(f) => number(f, "bad flags")?,
        None => 0,
    };
    if it.next().is_some() {
        return Err(ParseError::Syntax("trailing fields"));
    }
    let mut s = TgSample { t_ms, level_mm, flags, station: [0; crate::TG_NAME_MAX] };
    fill_name(&mut s.station, station, |b| b as c_char);
    Ok(s)
}

fn report_error(e: ParseError) -> c_int {
    match e {
        ParseError::Syntax(m) => {
            set_last_error(m);
            TG_ERR_SYNTAX
        }
        ParseError::Range(m) => {
            set_last_error(m);
            TG_ERR_RANGE
        }
    }
}

/// # Safety
/// `line` is NULL or a NUL-terminated string; `out` is NULL or writable.
#[no_mangle]
pub unsafe extern "C" fn tg_parse(line: *const c_char, out: *mut TgSample) -> c_int {
    if line.is_null() || out.is_null() {
        set_last_error("null argument");
        return TG_ERR_NULL;
    }
    let bytes = CStr::from_ptr(line).to_bytes();
    match parse_line(bytes) {
        Ok(s) => {
            out.write(s);
            clear_last_error();
            TG_OK
        }
        Err(e) => report_error(e),
    }
}

/// # Safety
/// `buf` points to `len` readable bytes (or is NULL with `len == 0`); `out` is
/// NULL or writable.
#[no_mangle]
pub unsafe extern "C" fn tg_parse_bytes(buf: *const c_char, len: usize, out: *mut TgSample) -> bool {
    if out.is_null() || (buf.is_null() && len != 0) {
        set_last_error("null argument");
        return false;
    }
    let bytes: &[u8] = if len == 0 { &[] } else { slice::from_raw_parts(buf as *const u8, len) };
    match parse_line(bytes) {
        Ok(s) => {
            *out = s;
            clear_last_error();
            true
        }
        Err(e) => {
            report_error(e);
            false
        }
    }
}
