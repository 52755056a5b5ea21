//! Seismic array stacker: asserts the caller's values cannot fail, because the crate built
//! them itself (from one count, behind a handle C cannot look into) or bounded them by a slice.

use std::os::raw::{c_char, c_int};

/// Interleaved frames, checked on the way in.
pub struct Frames<'a> {
    data: &'a [f32],
    channels: usize,
}

impl<'a> Frames<'a> {
    pub fn new(data: &'a [f32], channels: usize) -> Result<Self, ()> {
        if channels == 0 || data.len() % channels != 0 {
            return Err(());
        }
        Ok(Frames { data, channels })
    }

    pub fn channels(&self) -> usize {
        self.channels
    }
}

pub struct Array {
    channels: usize,
    sums: Vec<f32>,
}

impl Array {
    fn accumulate(&mut self, src: Frames) {
        // the crate made `src` with `self.channels` (add_frames below)
        assert!(src.channels() == self.channels);
        for (i, v) in src.data.iter().enumerate() {
            if let Some(s) = self.sums.get_mut(i % self.channels) {
                *s += *v;
            }
        }
    }

    pub fn add_frames(&mut self, frames: &[f32]) -> Result<(), ()> {
        self.accumulate(Frames::new(frames, self.channels)?);
        Ok(())
    }
}

pub struct SeisArray {
    inner: Array,
}

#[no_mangle]
pub unsafe extern "C" fn seis_add_frames(arr: *mut SeisArray, src: *const f32, frames: usize) -> c_int {
    if arr.is_null() || src.is_null() {
        return -1;
    }
    let a = &mut *arr;
    let n = match frames.checked_mul(a.inner.channels) {
        Some(n) => n,
        None => return -1,
    };
    match a.inner.add_frames(std::slice::from_raw_parts(src, n)) {
        Ok(()) => 0,
        Err(()) => -1,
    }
}

/// A trace the crate made; C sees `seis_trace` as an incomplete type.
#[repr(C)]
pub struct SeisTrace {
    magic: u32,
    width: usize,
    rows: Vec<Vec<f32>>,
}

fn stack_row(row: &[f32], width: usize, out: &mut [f32]) {
    assert_eq!(row.len(), width);
    for (o, v) in out.iter_mut().zip(row) {
        *o += *v;
    }
}

#[no_mangle]
pub unsafe extern "C" fn seis_trace_stack(trace: &mut SeisTrace, out: *mut f32, out_len: usize) -> c_int {
    if trace.magic != 0x5e15 || out.is_null() || out_len < trace.width {
        return -1;
    }
    let out = std::slice::from_raw_parts_mut(out, trace.width);
    for row in &trace.rows {
        stack_row(row, trace.width, out);
    }
    0
}

/// A length-prefixed packet: the 4-byte length, then the body. The pointer moves past it.
#[no_mangle]
pub unsafe extern "C" fn seis_take_packet(data: *mut *const u8, len: *mut usize) -> c_int {
    if data.is_null() || len.is_null() || (*data).is_null() || *len < 4 {
        return -1;
    }
    let buf = std::slice::from_raw_parts(*data, *len);
    let (head, rest) = buf.split_at(std::mem::size_of::<u32>());
    let body_len = u32::from_le_bytes(head.try_into().unwrap()) as usize;
    if body_len > rest.len() {
        return -1;
    }
    let full = body_len + 4;
    *len -= full;
    *data = (*data).offset(full.try_into().unwrap());
    0
}

fn release_bytes(p: *mut u8, len: usize) {
    assert_ne!(len, 0);
    unsafe { drop(Vec::from_raw_parts(p, len, len)) };
}

extern "C" {
    fn strlen(s: *const c_char) -> usize;
}

/// Frees a label the crate allocated with room for its terminating NUL.
#[no_mangle]
pub unsafe extern "C" fn seis_label_free(label: *mut c_char) {
    if label.is_null() {
        return;
    }
    release_bytes(label.cast(), strlen(label) + 1);
}

/// The public part of a file handle C sees, at the front of the crate's own state.
#[repr(C)]
pub struct seis_file_s {
    have: u32,
}
pub type seis_file = *mut seis_file_s;

#[repr(C)]
struct FileState {
    public: seis_file_s,
    want: usize,
    buf: *mut u8,
}

unsafe fn release_state(state: *mut FileState) {
    if state.is_null() {
        return;
    }
    let s = &mut *state;
    if !s.buf.is_null() {
        release_bytes(s.buf, s.want);
    }
    drop(Box::from_raw(state));
}

/// C cannot see `FileState`: `want` is what the crate's open function put there.
#[no_mangle]
pub unsafe extern "C" fn seis_file_close(file: seis_file) -> c_int {
    if file.is_null() {
        return -1;
    }
    release_state(file.cast::<FileState>());
    0
}
