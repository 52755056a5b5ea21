//! A stream scales one node's samples by its calibration gain and hands each block to a sink.
//! The sink is a closure over the C callback and its `user` pointer, kept type-erased: a
//! `Box<dyn FnMut>` is a fat pointer, so it is boxed once more and the thin outer pointer is
//! stored as `*mut c_void` (common practice for closures passed through C).

use std::ffi::c_void;
use std::sync::Arc;

use crate::calib::{share, Calib};

/// `gm_block_cb`.
pub type BlockCb = unsafe extern "C" fn(samples: *const f32, n: usize, user: *mut c_void);

type Sink = Box<dyn FnMut(&[f32])>;

/// The state behind a `gm_stream *`.
pub struct Stream {
    calib: Arc<Calib>,
    node: u32,
    scratch: Vec<f32>,
    /// a `*mut Sink` from `Box::into_raw`, freed in `Drop`
    sink: *mut c_void,
}

fn erase(sink: Sink) -> *mut c_void {
    Box::into_raw(Box::new(sink)) as *mut c_void
}

impl Stream {
    fn deliver(&mut self) {
        // SAFETY: `sink` is the `*mut Sink` made by `erase` and lives until `drop`.
        let sink = unsafe { &mut *(self.sink as *mut Sink) };
        sink(&self.scratch);
    }
}

impl Drop for Stream {
    fn drop(&mut self) {
        if !self.sink.is_null() {
            // SAFETY: made by `erase`, dropped once.
            drop(unsafe { Box::from_raw(self.sink as *mut Sink) });
        }
    }
}

/// # Safety
/// `calib` is NULL or holds a reference for the duration of the call; `user` stays valid until
/// `gm_stream_release`.
#[no_mangle]
pub unsafe extern "C" fn gm_stream_new(calib: *const Calib, node: u32, cb: Option<BlockCb>, user: *mut c_void) -> *mut Stream {
    let Some(cb) = cb else {
        return std::ptr::null_mut();
    };
    if calib.is_null() {
        return std::ptr::null_mut();
    }
    let sink: Sink = Box::new(move |block: &[f32]| unsafe { cb(block.as_ptr(), block.len(), user) });
    Box::into_raw(Box::new(Stream { calib: share(calib), node, scratch: Vec::new(), sink: erase(sink) }))
}

/// # Safety
/// `stream` came from `gm_stream_new`; `samples` points to `n` floats (or `n` is 0).
#[no_mangle]
pub unsafe extern "C" fn gm_stream_push(stream: *mut Stream, samples: *const f32, n: usize) -> usize {
    let Some(s) = stream.as_mut() else {
        return 0;
    };
    if samples.is_null() || n == 0 {
        return 0;
    }
    let gain = s.calib.gain(s.node as usize);
    let input = std::slice::from_raw_parts(samples, n);
    s.scratch.clear();
    s.scratch.extend(input.iter().map(|x| x * gain));
    s.deliver();
    n
}

/// # Safety
/// `stream` is NULL or came from `gm_stream_new` and is not used again.
#[no_mangle]
pub unsafe extern "C" fn gm_stream_release(stream: *mut Stream) {
    if stream.is_null() {
        return;
    }
    drop(Box::from_raw(stream));
}
