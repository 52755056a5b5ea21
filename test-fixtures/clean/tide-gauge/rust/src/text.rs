//! Strings that cross the seam: owned (CString::into_raw, freed by
//! tg_string_free) and borrowed (static, or the thread's last error).

use std::cell::Cell;
use std::ffi::CString;
use std::os::raw::{c_char, c_int};
use std::ptr;

use crate::{TG_ERR_NULL, TG_ERR_RANGE, TG_ERR_SYNTAX, TG_OK};

const VERSION: &[u8] = b"tide-gauge 2.3.1\0";

thread_local! {
    static LAST_ERROR: Cell<Option<CString>> = const { Cell::new(None) };
}

/// Records the message for `tg_last_error`; the previous one is dropped.
pub(crate) fn set_last_error(msg: &str) {
    let c = CString::new(msg).ok();
    LAST_ERROR.with(|slot| slot.set(c));
}

pub(crate) fn clear_last_error() {
    LAST_ERROR.with(|slot| slot.set(None));
}

/// Owned: a new name such as "STN03"; the caller frees it with tg_string_free.
#[no_mangle]
pub extern "C" fn tg_station_name(station_id: u32) -> *mut c_char {
    match CString::new(format!("STN{:02}", station_id)) {
        Ok(s) => s.into_raw(),
        Err(_) => ptr::null_mut(),
    }
}

/// Copies the name into a caller's buffer; false (nothing written) if it
/// does not fit with its NUL.
///
/// # Safety
/// `buf` is NULL or points to `buf_len` writable bytes.
#[no_mangle]
pub unsafe extern "C" fn tg_station_name_into(station_id: u32, buf: *mut c_char, buf_len: usize) -> bool {
    let name = format!("STN{:02}\0", station_id);
    if buf.is_null() || name.len() > buf_len {
        return false;
    }
    ptr::copy_nonoverlapping(name.as_ptr(), buf.cast::<u8>(), name.len());
    true
}

/// Takes back a string made by tg_station_name or tg_report_json.
///
/// # Safety
/// `s` is NULL or came from `tg_station_name` or `tg_report_json` and was not freed before.
#[no_mangle]
pub unsafe extern "C" fn tg_string_free(s: *mut c_char) {
    if s.is_null() {
        return;
    }
    drop(CString::from_raw(s));
}

/// Borrowed, static.
#[no_mangle]
pub extern "C" fn tg_version() -> *const c_char {
    VERSION.as_ptr().cast()
}

/// Borrowed, static.
#[no_mangle]
pub extern "C" fn tg_error_name(code: c_int) -> *const c_char {
    let name: &'static [u8] = match code {
        TG_OK => b"ok\0",
        TG_ERR_NULL => b"null argument\0",
        TG_ERR_SYNTAX => b"syntax error\0",
        TG_ERR_RANGE => b"out of range\0",
        _ => b"unknown error\0",
    };
    name.as_ptr().cast()
}

/// Borrowed: valid until the next call that sets or clears the message on
/// this thread. The CString's heap buffer does not move when the value is
/// taken out of the cell and put back.
#[no_mangle]
pub extern "C" fn tg_last_error() -> *const c_char {
    LAST_ERROR.with(|slot| {
        let msg = slot.take();
        let p = msg.as_ref().map_or(ptr::null(), |m| m.as_ptr());
        slot.set(msg);
        p
    })
}
