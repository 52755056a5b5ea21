//! Transient detector: reports each threshold crossing of the (optionally pre-filtered) signal to
//! a callback the C block registers.

use std::ffi::c_void;
use std::ptr::NonNull;

use crate::fir::{hyd_fir_process, Fir};
use crate::util::MAX_SAMPLES;

/// One detection, as the callback sees it (`hyd_event` in hyd_kernels.h).
#[repr(C)]
#[derive(Clone, Copy, Debug)]
pub struct HydEvent {
    /// absolute sample index of the crossing
    pub sample: u64,
    /// peak magnitude until the signal fell below the threshold (or the block ended)
    pub peak: f32,
    /// the detector's channel
    pub channel: u32,
}

/// `hyd_event_cb`: called once per event, on the thread that called `hyd_det_feed`.
pub type HydEventCb = unsafe extern "C" fn(user: *mut c_void, ev: *const HydEvent);

/// The state behind a `hyd_det *`.
pub struct Det {
    threshold: f32,
    channel: u32,
    cb: HydEventCb,
    /// the C block that registered the callback; never NULL (checked in `hyd_det_new`)
    user: NonNull<c_void>,
    /// an event still above the threshold at the end of the last block
    open: Option<HydEvent>,
}

impl Det {
    unsafe fn emit(&mut self, ev: HydEvent) {
        (self.cb)(self.user.as_ptr(), &ev);
    }
}

/// Makes a detector for one channel. `cb` is called with `user` for each event. Returns NULL
/// when `cb` or `user` is NULL or the threshold is not positive. Release with `hyd_det_free`.
///
/// # Safety
/// `user` stays valid until the detector is freed.
#[no_mangle]
pub unsafe extern "C" fn hyd_det_new(threshold: f32, channel: u32, cb: Option<HydEventCb>, user: *mut c_void) -> *mut Det {
    let (Some(cb), Some(user)) = (cb, NonNull::new(user)) else {
        return std::ptr::null_mut();
    };
    if !(threshold > 0.0) {
        return std::ptr::null_mut();
    }
    Box::into_raw(Box::new(Det { threshold, channel, cb, user, open: None }))
}

/// Feeds `n` samples starting at absolute sample `t0`. When `pre` is not NULL the samples are
/// first filtered by it (borrowed: the detector neither keeps nor frees it) into `work`, which
/// must hold `n` floats; with `pre` NULL, `work` may be NULL. Returns the number of events
/// reported during this call.
///
/// # Safety
/// `det` comes from `hyd_det_new`, `pre` is NULL or comes from `hyd_fir_new`; `x` points at `n`
/// floats and `work` (if used) at `n` writable floats; `x` and `work` may be the same buffer.
#[no_mangle]
pub unsafe extern "C" fn hyd_det_feed(det: *mut Det, pre: *mut Fir, x: *const f32, work: *mut f32, n: usize, t0: u64) -> u32 {
    let Some(det) = det.as_mut() else { return 0 };
    if x.is_null() || n > MAX_SAMPLES {
        return 0;
    }
    let src: *const f32 = if pre.is_null() {
        x
    } else {
        if work.is_null() {
            return 0;
        }
        hyd_fir_process(pre, x, work, n);
        work
    };
    let mut count = 0u32;
    for i in 0..n {
        let m = src.add(i).read().abs();
        match det.open.as_mut() {
            Some(ev) if m >= det.threshold => ev.peak = ev.peak.max(m),
            Some(_) => {
                if let Some(ev) = det.open.take() {
                    det.emit(ev);
                    count = count.saturating_add(1);
                }
            }
            None if m >= det.threshold => {
                det.open = Some(HydEvent { sample: t0.wrapping_add(i as u64), peak: m, channel: det.channel });
            }
            None => {}
        }
    }
    count
}

/// Reports an event still open (the recording stops) and returns 1, or returns 0.
///
/// # Safety
/// `det` is NULL or comes from `hyd_det_new`.
#[no_mangle]
pub unsafe extern "C" fn hyd_det_flush(det: *mut Det) -> u32 {
    let Some(det) = det.as_mut() else { return 0 };
    match det.open.take() {
        Some(ev) => {
            det.emit(ev);
            1
        }
        None => 0,
    }
}

/// Releases a detector (an open event is dropped, not reported). NULL is ignored.
///
/// # Safety
/// `det` is NULL or comes from `hyd_det_new` and is not used afterwards.
#[no_mangle]
pub unsafe extern "C" fn hyd_det_free(det: *mut Det) {
    if det.is_null() {
        return;
    }
    drop(Box::from_raw(det));
}
