//! A mesh: the configuration and the calibration table of one deployment, opened through an
//! out-parameter so the status code and the handle come back separately.

use std::sync::Arc;

use crate::calib::{share, Calib};
use crate::tally::{count, Shared};

/// `gm_cfg` in gm.h.
#[repr(C)]
#[derive(Clone, Copy, Debug)]
pub struct GmCfg {
    pub nodes: u32,
    pub rate_hz: u32,
    pub threshold: f32,
}

pub const GM_OK: i32 = 0;
pub const GM_EINVAL: i32 = -1;

/// The state behind a `gm_mesh *`.
pub struct Mesh {
    cfg: GmCfg,
    calib: Arc<Calib>,
    /// samples seen so far, per node
    seen: Vec<u64>,
}

/// # Safety
/// `cfg` and `calib` are NULL or valid for the call; `out` is NULL or writable.
#[no_mangle]
pub unsafe extern "C" fn gm_mesh_open(cfg: *const GmCfg, calib: *const Calib, out: *mut *mut Mesh) -> i32 {
    let (Some(cfg), false, false) = (cfg.as_ref(), calib.is_null(), out.is_null()) else {
        return GM_EINVAL;
    };
    if cfg.nodes == 0 || cfg.rate_hz == 0 || !(cfg.threshold > 0.0) {
        return GM_EINVAL;
    }
    let mesh = Mesh { cfg: *cfg, calib: share(calib), seen: vec![0; cfg.nodes as usize] };
    *out = Box::into_raw(Box::new(mesh));
    GM_OK
}

/// # Safety
/// `mesh` came from `gm_mesh_open`.
#[no_mangle]
pub unsafe extern "C" fn gm_mesh_calib(mesh: *const Mesh) -> *const Calib {
    match mesh.as_ref() {
        Some(m) => Arc::into_raw(Arc::clone(&m.calib)),
        None => std::ptr::null(),
    }
}

/// # Safety
/// `mesh` came from `gm_mesh_open`; `tally` holds a reference; `samples` points to `n` floats.
#[no_mangle]
pub unsafe extern "C" fn gm_mesh_feed(mesh: *mut Mesh, tally: *const Shared, node: u32, samples: *const f32, n: usize) -> u32 {
    let (Some(m), Some(t)) = (mesh.as_mut(), tally.as_ref()) else {
        return 0;
    };
    if samples.is_null() || node >= m.cfg.nodes {
        return 0;
    }
    let gain = m.calib.gain(node as usize);
    let mut events = 0u32;
    for &x in std::slice::from_raw_parts(samples, n) {
        let amp = (x * gain).abs();
        if amp > m.cfg.threshold && count(t, node, amp) {
            events = events.saturating_add(1);
        }
    }
    if let Some(seen) = m.seen.get_mut(node as usize) {
        *seen = seen.saturating_add(n as u64);
    }
    events
}

/// # Safety
/// `mesh` is NULL or came from `gm_mesh_open` and is not used again.
#[no_mangle]
pub unsafe extern "C" fn gm_mesh_close(mesh: *mut Mesh) {
    if !mesh.is_null() {
        drop(Box::from_raw(mesh));
    }
}
