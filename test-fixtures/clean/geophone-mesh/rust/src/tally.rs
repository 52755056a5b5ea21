//! The event tally: counts per node behind a `Mutex`, shared by C++ threads through retained
//! references to one `Arc<Mutex<Tally>>`.

use std::sync::{Arc, Mutex, MutexGuard};

/// The state behind a `gm_tally *`.
pub struct Tally {
    counts: Vec<u64>,
    total: u64,
    peak: f32,
}

pub type Shared = Mutex<Tally>;

/// Locks the tally; a poisoned lock (a panicking holder) still holds consistent counts, so it is
/// taken over rather than unwrapped.
fn lock(tally: &Shared) -> MutexGuard<'_, Tally> {
    match tally.lock() {
        Ok(g) => g,
        Err(poisoned) => poisoned.into_inner(),
    }
}

/// Counts one event; `false` for a node out of range.
pub fn count(tally: &Shared, node: u32, amp: f32) -> bool {
    let mut t = lock(tally);
    let Some(c) = t.counts.get_mut(node as usize) else {
        return false;
    };
    *c = c.saturating_add(1);
    t.total = t.total.saturating_add(1);
    if amp > t.peak {
        t.peak = amp;
    }
    true
}

#[no_mangle]
pub extern "C" fn gm_tally_new(nodes: u32) -> *const Shared {
    let tally = Tally { counts: vec![0; nodes as usize], total: 0, peak: 0.0 };
    Arc::into_raw(Arc::new(Mutex::new(tally)))
}

/// # Safety
/// `tally` came from `gm_tally_new` and still holds a reference.
#[no_mangle]
pub unsafe extern "C" fn gm_tally_retain(tally: *const Shared) {
    if !tally.is_null() {
        Arc::increment_strong_count(tally);
    }
}

/// # Safety
/// `tally` is NULL or holds a reference the caller gives up.
#[no_mangle]
pub unsafe extern "C" fn gm_tally_release(tally: *const Shared) {
    if !tally.is_null() {
        Arc::decrement_strong_count(tally);
    }
}

/// # Safety
/// `tally` holds a reference for the duration of the call.
#[no_mangle]
pub unsafe extern "C" fn gm_tally_add(tally: *const Shared, node: u32, amp: f32) -> i32 {
    match tally.as_ref() {
        Some(t) if count(t, node, amp) => 0,
        _ => -1,
    }
}

/// # Safety
/// `tally` holds a reference for the duration of the call.
#[no_mangle]
pub unsafe extern "C" fn gm_tally_total(tally: *const Shared) -> u64 {
    match tally.as_ref() {
        Some(t) => lock(t).total,
        None => 0,
    }
}

/// # Safety
/// `tally` holds a reference for the duration of the call.
#[no_mangle]
pub unsafe extern "C" fn gm_tally_peak(tally: *const Shared) -> f32 {
    match tally.as_ref() {
        Some(t) => lock(t).peak,
        None => 0.0,
    }
}
