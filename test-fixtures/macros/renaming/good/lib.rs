//! The tally kernels behind tally.h (built without the large-file renames).
use std::os::raw::{c_char, c_int, c_long};

#[no_mangle]
pub unsafe extern "C" fn tally_open(path: *const c_char) -> c_int {
    if path.is_null() { -1 } else { 3 }
}

#[no_mangle]
pub extern "C" fn tally_seek(fd: c_int, off: c_long) -> c_long {
    if fd < 0 { -1 } else { off }
}
