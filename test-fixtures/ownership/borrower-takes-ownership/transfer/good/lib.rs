//! Hydrophone processing chain: a stage handed over by a documented transfer, and a monitor
//! looked at through `ManuallyDrop<Box<_>>` on every callback.

use std::ffi::c_void;
use std::mem::ManuallyDrop;

pub struct HydStage {
    gain: f32,
}

pub struct HydChain {
    stages: Vec<Box<HydStage>>,
}

pub struct HydMonitor {
    peak: f32,
}

#[no_mangle]
pub extern "C" fn hyd_chain_new() -> *mut HydChain {
    Box::into_raw(Box::new(HydChain { stages: Vec::new() }))
}

#[no_mangle]
pub unsafe extern "C" fn hyd_chain_free(chain: *mut HydChain) {
    if !chain.is_null() {
        drop(Box::from_raw(chain));
    }
}

#[no_mangle]
pub extern "C" fn hyd_stage_new(gain: f32) -> *mut HydStage {
    Box::into_raw(Box::new(HydStage { gain }))
}

#[no_mangle]
pub unsafe extern "C" fn hyd_stage_free(stage: *mut HydStage) {
    if !stage.is_null() {
        drop(Box::from_raw(stage));
    }
}

#[no_mangle]
pub unsafe extern "C" fn hyd_chain_append(chain: *mut HydChain, stage: *mut HydStage) -> i32 {
    if chain.is_null() || stage.is_null() {
        return -1;
    }
    (*chain).stages.push(Box::from_raw(stage));
    0
}

/// Puts `stage` first. The chain takes ownership of the stage; the caller must not free it.
#[no_mangle]
pub unsafe extern "C" fn hyd_chain_insert_front(chain: *mut HydChain, stage: *mut HydStage) -> i32 {
    if chain.is_null() || stage.is_null() {
        return -1;
    }
    (*chain).stages.insert(0, Box::from_raw(stage));
    0
}

#[no_mangle]
pub extern "C" fn hyd_monitor_new() -> *mut HydMonitor {
    Box::into_raw(Box::new(HydMonitor { peak: 0.0 }))
}

#[no_mangle]
pub unsafe extern "C" fn hyd_monitor_free(mon: *mut HydMonitor) {
    if !mon.is_null() {
        drop(Box::from_raw(mon));
    }
}

#[no_mangle]
pub unsafe extern "C" fn hyd_monitor_level(ctx: *mut c_void, level: f32) {
    if ctx.is_null() {
        return;
    }
    let mut mon = ManuallyDrop::new(Box::from_raw(ctx as *mut HydMonitor));
    mon.peak = mon.peak.max(level);
}

pub fn total_gain(chain: &HydChain) -> f32 {
    chain.stages.iter().map(|s| s.gain).product()
}
