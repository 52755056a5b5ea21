//! Rust kernels of the radio-telescope correlator. Built as a staticlib and called from the C++
//! stream blocks through include/xc/xc_kernels.h (and from the C self-test via xc_window.h).
//! Every kernel checks its pointers for NULL and avoids anything that can panic: a panic in an
//! `extern "C"` function aborts the process.

use std::ffi::c_void;
use std::mem::size_of;

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
    Shape = 2,
}

pub type FlagCallback = Option<unsafe extern "C" fn(chan: usize, level: f32, user: *mut c_void)>;

pub struct Accum {
    sum: Vec<f64>,
    count: u64,
}

pub struct Delay {
    history: Vec<Cf32>,
    head: usize,
    taps: Vec<f32>,
    recent: Vec<Cf32>,
}

pub struct Flagger {
    level: f32,
    cb: FlagCallback,
    user: *mut c_void,
}

#[no_mangle]
pub unsafe extern "C" fn xc_iq16_to_cf32(iq: *const i16, out: *mut Cf32, n: usize) -> Status {
    if iq.is_null() || out.is_null() {
        return Status::Invalid;
    }
    let raw = std::slice::from_raw_parts(iq, 2 * n);
    let samples = std::slice::from_raw_parts_mut(out, n);
    for (s, pair) in samples.iter_mut().zip(raw.chunks_exact(2)) {
        if let &[i, q] = pair {
            *s = Cf32 { re: f32::from(i) / 32768.0, im: f32::from(q) / 32768.0 };
        }
    }
    Status::Ok
}

/// In place is allowed (`input == out`), so no slice is built: element-wise reads and writes.
#[no_mangle]
pub unsafe extern "C" fn xc_fringe_stop(input: *const Cf32, out: *mut Cf32, n: usize, phase: f32, rate: f32) {
    if input.is_null() || out.is_null() {
        return;
    }
    let mut p = phase;
    for i in 0..n {
        let s = input.add(i).read();
        let (sin, cos) = p.sin_cos();
        out.add(i).write(Cf32 { re: s.re * cos + s.im * sin, im: s.im * cos - s.re * sin });
        p += rate;
    }
}

#[no_mangle]
pub unsafe extern "C" fn xc_power_spectrum(spec: *const Cf32, power: *mut f32, n: usize, nchan: usize) {
    if spec.is_null() || power.is_null() {
        return;
    }
    let spec = std::slice::from_raw_parts(spec, n * nchan);
    let power = std::slice::from_raw_parts_mut(power, n * nchan);
    for (p, s) in power.iter_mut().zip(spec.iter()) {
        *p = s.re * s.re + s.im * s.im;
    }
}

#[no_mangle]
pub unsafe extern "C" fn xc_scale_raw(buf: *mut f32, nbytes: usize, gain: f32) {
    if buf.is_null() {
        return;
    }
    let v = std::slice::from_raw_parts_mut(buf, nbytes / size_of::<f32>());
    for x in v {
        *x *= gain;
    }
}

#[no_mangle]
pub unsafe extern "C" fn xc_checksum(data: *const c_void, nbytes: usize) -> u32 {
    if data.is_null() {
        return 0;
    }
    let bytes = std::slice::from_raw_parts(data as *const u8, nbytes);
    bytes.iter().fold(0x811c_9dc5u32, |h, &b| (h ^ u32::from(b)).wrapping_mul(0x0100_0193))
}

#[no_mangle]
pub extern "C" fn xc_accum_new(nchan: usize) -> *mut Accum {
    Box::into_raw(Box::new(Accum { sum: vec![0.0; nchan], count: 0 }))
}

#[no_mangle]
pub unsafe extern "C" fn xc_accum_free(acc: *mut Accum) {
    if !acc.is_null() {
        drop(Box::from_raw(acc));
    }
}

#[no_mangle]
pub unsafe extern "C" fn xc_accum_add(acc: *mut Accum, power: *const f32, n: usize, nchan: usize) -> Status {
    let Some(a) = acc.as_mut() else { return Status::Invalid };
    if power.is_null() {
        return Status::Invalid;
    }
    if nchan != a.sum.len() || nchan == 0 {
        return Status::Shape;
    }
    let power = std::slice::from_raw_parts(power, n * nchan);
    for spectrum in power.chunks_exact(nchan) {
        for (s, p) in a.sum.iter_mut().zip(spectrum.iter()) {
            *s += f64::from(*p);
        }
        a.count = a.count.wrapping_add(1);
    }
    Status::Ok
}

#[no_mangle]
pub unsafe extern "C" fn xc_accum_nchan(acc: *const Accum) -> usize {
    acc.as_ref().map_or(0, |a| a.sum.len())
}

#[no_mangle]
pub unsafe extern "C" fn xc_accum_count(acc: *const Accum) -> u64 {
    acc.as_ref().map_or(0, |a| a.count)
}

#[no_mangle]
pub unsafe extern "C" fn xc_accum_read(acc: *const Accum, out: *mut f32, max_out: usize) -> usize {
    let Some(a) = acc.as_ref() else { return 0 };
    if out.is_null() {
        return 0;
    }
    let out = std::slice::from_raw_parts_mut(out, max_out);
    let scale = if a.count == 0 { 0.0 } else { 1.0 / a.count as f64 };
    let mut written = 0usize;
    for (o, s) in out.iter_mut().zip(a.sum.iter()) {
        *o = (*s * scale) as f32;
        written = written.saturating_add(1);
    }
    written
}

#[no_mangle]
pub unsafe extern "C" fn xc_accum_reset(acc: *mut Accum) {
    if let Some(a) = acc.as_mut() {
        a.sum.iter_mut().for_each(|s| *s = 0.0);
        a.count = 0;
    }
}

#[no_mangle]
pub extern "C" fn xc_delay_new(delay: usize) -> *mut Delay {
    Box::into_raw(Box::new(Delay { history: vec![Cf32::default(); delay], head: 0, taps: vec![1.0], recent: vec![Cf32::default()] }))
}

#[no_mangle]
pub unsafe extern "C" fn xc_delay_free(line: *mut Delay) {
    if line.is_null() {
        return;
    }
    drop(Box::from_raw(line));
}

#[no_mangle]
pub unsafe extern "C" fn xc_delay_set_taps(line: *mut Delay, taps: *const f32, ntaps: usize) {
    let Some(d) = line.as_mut() else { return };
    if taps.is_null() || ntaps == 0 {
        return;
    }
    d.taps = std::slice::from_raw_parts(taps, ntaps).to_vec();
    d.recent = vec![Cf32::default(); ntaps];
}

#[no_mangle]
pub unsafe extern "C" fn xc_delay_process(line: *mut Delay, input: *const Cf32, out: *mut Cf32, n: usize) -> usize {
    let Some(d) = line.as_mut() else { return 0 };
    if input.is_null() || out.is_null() {
        return 0;
    }
    let x = std::slice::from_raw_parts(input, n);
    let y = std::slice::from_raw_parts_mut(out, n);
    for (o, s) in y.iter_mut().zip(x.iter()) {
        // ring buffer of the last `delay` inputs: the slot at head is the oldest
        let delayed = match d.history.get_mut(d.head) {
            Some(slot) => std::mem::replace(slot, *s),
            None => *s,
        };
        let next = d.head.wrapping_add(1);
        d.head = if next >= d.history.len() { 0 } else { next };
        d.recent.rotate_right(1);
        if let Some(newest) = d.recent.first_mut() {
            *newest = delayed;
        }
        let mut acc = Cf32::default();
        for (t, r) in d.taps.iter().zip(d.recent.iter()) {
            acc.re += t * r.re;
            acc.im += t * r.im;
        }
        *o = acc;
    }
    n
}

#[no_mangle]
pub extern "C" fn xc_flagger_new(level: f32, cb: FlagCallback, user: *mut c_void) -> *mut Flagger {
    Box::into_raw(Box::new(Flagger { level, cb, user }))
}

#[no_mangle]
pub unsafe extern "C" fn xc_flagger_free(flagger: *mut Flagger) {
    if let Some(nn) = std::ptr::NonNull::new(flagger) {
        drop(Box::from_raw(nn.as_ptr()));
    }
}

#[no_mangle]
pub unsafe extern "C" fn xc_flagger_scan(flagger: *mut Flagger, acc: *const Accum) -> usize {
    let (Some(f), Some(a)) = (flagger.as_ref(), acc.as_ref()) else { return 0 };
    let scale = if a.count == 0 { 0.0 } else { 1.0 / a.count as f64 };
    let mut flagged = 0usize;
    for (chan, s) in a.sum.iter().enumerate() {
        let level = (*s * scale) as f32;
        if level > f.level {
            if let Some(cb) = f.cb {
                cb(chan, level, f.user);
            }
            flagged = flagged.saturating_add(1);
        }
    }
    flagged
}

#[no_mangle]
pub unsafe extern "C" fn xc_hann(n: usize, input: *const f32, out: *mut f32) {
    if input.is_null() || out.is_null() || n == 0 {
        return;
    }
    let x = std::slice::from_raw_parts(input, n);
    let y = std::slice::from_raw_parts_mut(out, n);
    let denom = if n > 1 { (n - 1) as f32 } else { 1.0 };
    for (i, (o, v)) in y.iter_mut().zip(x.iter()).enumerate() {
        let w = 0.5 - 0.5 * (std::f32::consts::TAU * i as f32 / denom).cos();
        *o = v * w;
    }
}
