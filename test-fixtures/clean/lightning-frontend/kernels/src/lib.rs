//! Rust kernels of the lightning-detector front end. Built as a staticlib and called from the C++
//! blocks through include/lfe/lfe_kernels.h.

use std::ffi::c_void;
use std::os::raw::c_float;

pub const LFE_MAX_STATIONS: usize = 8;

#[repr(C)]
#[derive(Clone, Copy, Default)]
pub struct Cf32 {
    pub re: f32,
    pub im: f32,
}

#[repr(C)]
#[derive(Clone, Copy, PartialEq, Eq)]
pub enum Status {
    Ok = 0,
    Invalid = 1,
    Full = 2,
}

#[repr(C)]
#[derive(Clone, Copy, Default)]
pub struct Strike {
    pub t_ns: u64,
    pub azimuth_deg: f32,
    pub energy: f32,
    pub station_mask: u32,
    pub stations_used: u16,
    pub polarity: u8,
    pub flags: u8,
}

#[repr(C)]
pub struct StationCal {
    pub gain: f64,
    pub delay_ns: i32,
    pub enabled: u32,
    pub phase_deg: [f32; LFE_MAX_STATIONS],
}

pub type StrikeCallback = Option<unsafe extern "C" fn(strike: *const Strike, user: *mut c_void)>;

pub struct Trigger {
    threshold: f32,
    holdoff: u32,
    quiet: u32,
    sample: u64,
    callback: StrikeCallback,
    user: *mut c_void,
}

#[no_mangle]
pub unsafe extern "C" fn lfe_mix_down(input: *const Cf32, output: *mut Cf32, n: usize, phase_inc: c_float, phase: *mut f32) -> Status {
    if input.is_null() || output.is_null() || phase.is_null() {
        return Status::Invalid;
    }
    let x = std::slice::from_raw_parts(input, n);
    let y = std::slice::from_raw_parts_mut(output, n);
    let mut p = *phase;
    for (o, s) in y.iter_mut().zip(x.iter()) {
        let (sin, cos) = p.sin_cos();
        *o = Cf32 { re: s.re * cos + s.im * sin, im: s.im * cos - s.re * sin };
        p += phase_inc;
    }
    *phase = p % std::f32::consts::TAU;
    Status::Ok
}

#[no_mangle]
pub unsafe extern "C" fn lfe_envelope(input: *const Cf32, env: *mut f32, n: usize) {
    if input.is_null() || env.is_null() {
        return;
    }
    let x = std::slice::from_raw_parts(input, n);
    let e = std::slice::from_raw_parts_mut(env, n);
    for (o, s) in e.iter_mut().zip(x.iter()) {
        *o = (s.re * s.re + s.im * s.im).sqrt();
    }
}

#[no_mangle]
pub unsafe extern "C" fn lfe_calibrate(cal: *const StationCal, station: usize, samples: *mut Cf32, n: usize) -> Status {
    if cal.is_null() || samples.is_null() {
        return Status::Invalid;
    }
    let cal = &*cal;
    let Some(phase) = cal.phase_deg.get(station) else { return Status::Invalid };
    if cal.enabled == 0 {
        return Status::Ok;
    }
    let (sin, cos) = phase.to_radians().sin_cos();
    let g = cal.gain as f32;
    for s in std::slice::from_raw_parts_mut(samples, n) {
        *s = Cf32 { re: g * (s.re * cos - s.im * sin), im: g * (s.re * sin + s.im * cos) };
    }
    Status::Ok
}

#[no_mangle]
pub extern "C" fn lfe_trigger_new(threshold: f32, holdoff: u32) -> *mut Trigger {
    Box::into_raw(Box::new(Trigger { threshold, holdoff, quiet: 0, sample: 0, callback: None, user: std::ptr::null_mut() }))
}

#[no_mangle]
pub unsafe extern "C" fn lfe_trigger_free(trigger: *mut Trigger) {
    if !trigger.is_null() {
        drop(Box::from_raw(trigger));
    }
}

#[no_mangle]
pub unsafe extern "C" fn lfe_trigger_run(trigger: *mut Trigger, env: *const f32, n: usize, out: *mut Strike, max_out: usize) -> usize {
    if trigger.is_null() || env.is_null() || out.is_null() {
        return 0;
    }
    let t = &mut *trigger;
    let env = std::slice::from_raw_parts(env, n);
    let out = std::slice::from_raw_parts_mut(out, max_out);
    let mut written = 0usize;
    for &v in env {
        t.sample = t.sample.wrapping_add(1);
        if t.quiet > 0 {
            t.quiet -= 1;
            continue;
        }
        if v < t.threshold {
            continue;
        }
        t.quiet = t.holdoff;
        let strike = Strike { t_ns: t.sample.wrapping_mul(1_000), energy: v, stations_used: 1, ..Strike::default() };
        if let Some(cb) = t.callback {
            cb(&strike, t.user);
        }
        if let Some(slot) = out.get_mut(written) {
            *slot = strike;
            written = written.saturating_add(1);
        }
    }
    written
}

#[no_mangle]
pub unsafe extern "C" fn lfe_trigger_on_strike(trigger: *mut Trigger, cb: StrikeCallback, user: *mut c_void) {
    if let Some(t) = trigger.as_mut() {
        t.callback = cb;
        t.user = user;
    }
}

#[no_mangle]
pub extern "C" fn lfe_version() -> i32 {
    3
}
