//! Seismic array stacker: the slips. Each assert or unwrap reads a value C hands over.

use std::os::raw::c_int;

pub struct Array {
    channels: usize,
    sums: Vec<f32>,
}

impl Array {
    fn accumulate(&mut self, src: &[f32], channels: usize) {
        // C's channel count, never compared with the array's
        assert!(src.len() % channels == 0);
        for (i, v) in src.iter().enumerate() {
            if let Some(s) = self.sums.get_mut(i % self.channels) {
                *s += *v;
            }
        }
    }
}

pub struct SeisArray {
    inner: Array,
}

#[no_mangle]
pub unsafe extern "C" fn seis_add_frames(arr: *mut SeisArray, src: *const f32, frames: usize, channels: usize) -> c_int {
    if arr.is_null() || src.is_null() {
        return -1;
    }
    let a = &mut *arr;
    a.inner.accumulate(std::slice::from_raw_parts(src, frames), channels);
    0
}

/// A grid C defines and fills: its row lengths are C's.
#[repr(C)]
pub struct SeisGrid {
    width: usize,
    n_rows: usize,
    rows: *const *const f32,
    row_len: *const usize,
}

fn stack_row(row: &[f32], width: usize, out: &mut [f32]) {
    assert_eq!(row.len(), width);
    for (o, v) in out.iter_mut().zip(row) {
        *o += *v;
    }
}

#[no_mangle]
pub unsafe extern "C" fn seis_grid_stack(grid: &SeisGrid, out: *mut f32, out_len: usize) -> c_int {
    if out.is_null() || out_len < grid.width {
        return -1;
    }
    let out = std::slice::from_raw_parts_mut(out, grid.width);
    let rows = std::slice::from_raw_parts(grid.rows, grid.n_rows);
    let lens = std::slice::from_raw_parts(grid.row_len, grid.n_rows);
    for (r, l) in rows.iter().zip(lens) {
        stack_row(std::slice::from_raw_parts(*r, *l), grid.width, out);
    }
    0
}

/// The body length is read from C's bytes and never compared with what C handed over.
#[no_mangle]
pub unsafe extern "C" fn seis_take_packet(data: *mut *const u8, len: *mut usize) -> c_int {
    if data.is_null() || len.is_null() || (*data).is_null() || *len < 8 {
        return -1;
    }
    let buf = std::slice::from_raw_parts(*data, *len);
    let (head, _rest) = buf.split_at(std::mem::size_of::<u64>());
    let body_len = u64::from_le_bytes(head.try_into().unwrap()) as usize;
    *data = (*data).offset(body_len.try_into().unwrap());
    0
}

fn release_bytes(p: *mut u8, len: usize) {
    assert_ne!(len, 0);
    unsafe { drop(Vec::from_raw_parts(p, len, len)) };
}

/// C's length goes straight to the helper's assert.
#[no_mangle]
pub unsafe extern "C" fn seis_bytes_free(p: *mut u8, len: usize) {
    if p.is_null() {
        return;
    }
    release_bytes(p, len);
}

/// The public part of a file handle C sees and may write.
#[repr(C)]
pub struct seis_file_s {
    have: u32,
}
pub type seis_file = *mut seis_file_s;

/// `have` is C's to write: the length passed on is C's value.
#[no_mangle]
pub unsafe extern "C" fn seis_file_close(file: seis_file) -> c_int {
    if file.is_null() {
        return -1;
    }
    release_bytes(file.cast::<u8>(), (*file).have as usize);
    0
}
