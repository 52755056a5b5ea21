//! The calibration table: immutable once made, shared by every stream and mesh that uses it.
//! A `gm_calib *` is a pointer made by `Arc::into_raw`; each holder owns one strong count.

use std::sync::Arc;

/// The state behind a `gm_calib *`.
pub struct Calib {
    gains: Vec<f32>,
}

impl Calib {
    pub fn gain(&self, node: usize) -> f32 {
        self.gains.get(node).copied().unwrap_or(1.0)
    }
}

/// Makes a table holding one reference for the caller.
///
/// # Safety
/// `gains` points to `n` floats, or `n` is 0.
#[no_mangle]
pub unsafe extern "C" fn gm_calib_new(gains: *const f32, n: usize) -> *const Calib {
    let gains: Vec<f32> = if n == 0 || gains.is_null() {
        Vec::new()
    } else {
        std::slice::from_raw_parts(gains, n).to_vec()
    };
    if gains.iter().any(|g| !g.is_finite()) {
        return std::ptr::null();
    }
    Arc::into_raw(Arc::new(Calib { gains }))
}

/// One more reference to the same table.
///
/// # Safety
/// `calib` came from `gm_calib_new` (or `gm_mesh_calib`) and still holds a reference.
#[no_mangle]
pub unsafe extern "C" fn gm_calib_retain(calib: *const Calib) {
    if !calib.is_null() {
        Arc::increment_strong_count(calib);
    }
}

/// Drops one reference; the last one frees the table.
///
/// # Safety
/// `calib` is NULL or holds a reference the caller gives up.
#[no_mangle]
pub unsafe extern "C" fn gm_calib_release(calib: *const Calib) {
    if calib.is_null() {
        return;
    }
    drop(Arc::from_raw(calib));
}

/// # Safety
/// `calib` holds a reference for the duration of the call.
#[no_mangle]
pub unsafe extern "C" fn gm_calib_gain(calib: *const Calib, node: usize) -> f32 {
    if calib.is_null() {
        return 1.0;
    }
    let table: &Calib = &*calib;
    table.gain(node)
}

/// # Safety
/// `calib` holds a reference for the duration of the call.
#[no_mangle]
pub unsafe extern "C" fn gm_calib_len(calib: *const Calib) -> usize {
    match calib.as_ref() {
        Some(table) => table.gains.len(),
        None => 0,
    }
}

/// An owned `Arc` for a pointer the caller only lends: the count goes up first, so the `Arc`
/// made from it owns the new reference and the caller keeps its own (std docs,
/// `Arc::increment_strong_count`).
///
/// # Safety
/// `calib` is not NULL and holds a reference for the duration of the call.
pub unsafe fn share(calib: *const Calib) -> Arc<Calib> {
    Arc::increment_strong_count(calib);
    Arc::from_raw(calib)
}
