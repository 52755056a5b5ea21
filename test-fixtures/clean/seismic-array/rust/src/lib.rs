//! STA/LTA onset picker of the seismic-array front end, built as a staticlib and called from the
//! acquisition application through include/seis/seis_picker.h. It calls the C kernels of csrc/
//! (include/seis/seis_dsp.h) itself. Nothing here indexes or does overflowing integer arithmetic,
//! so no exported function can panic.

pub mod ffi;
pub mod types;

use std::ffi::{c_char, c_int, c_long, CStr, CString};
use std::ptr::NonNull;
use types::{ChanCfg, ChanId, DigOps, DmaDesc, Gain, Pick, Regs, RingSlot, SampleWord, WireHdr};

const TRIGGER_RATIO: f32 = 3.0;
const LSB_UV: f32 = 2.5;

pub struct Picker {
    chan: ChanId,
    gain: Gain,
    decim: u32,
    a_sta: f32,
    a_lta: f32,
    sta: f32,
    lta: f32,
    warmup: u32,
    triggered: bool,
    sample: u64,
    onsets: u64,
    last: Option<Pick>,
    name: Option<CString>,
    ops: Option<DigOps>,
}

#[no_mangle]
pub unsafe extern "C" fn seis_picker_new(cfg: *const ChanCfg, sta_s: f32, lta_s: f32, rate_hz: f32) -> *mut Picker {
    let Some(cfg) = cfg.as_ref() else { return std::ptr::null_mut() };
    if !(sta_s > 0.0 && lta_s > sta_s && rate_hz > 0.0) {
        return std::ptr::null_mut();
    }
    let Some(gain) = Gain::from_code(cfg.gain) else { return std::ptr::null_mut() };
    let rate = rate_hz / f32::from(cfg.decim.max(1));
    let picker = Picker {
        chan: cfg.chan,
        gain,
        decim: u32::from(cfg.decim.max(1)),
        a_sta: (1.0 / (sta_s * rate)).min(1.0),
        a_lta: (1.0 / (lta_s * rate)).min(1.0),
        sta: 0.0,
        lta: 0.0,
        warmup: (lta_s * rate) as u32,
        triggered: false,
        sample: 0,
        onsets: 0,
        last: None,
        name: None,
        ops: None,
    };
    Box::into_raw(Box::new(picker))
}

#[no_mangle]
pub unsafe extern "C" fn seis_picker_free(p: *mut Picker) {
    if !p.is_null() {
        drop(Box::from_raw(p));
    }
}

#[no_mangle]
pub unsafe extern "C" fn seis_picker_set_name(p: *mut Picker, name: *const c_char) -> c_int {
    let Some(picker) = p.as_mut() else { return -1 };
    if name.is_null() {
        return -1;
    }
    picker.name = Some(CStr::from_ptr(name).to_owned());
    0
}

#[no_mangle]
pub unsafe extern "C" fn seis_picker_set_ops(p: *mut Picker, ops: *const DigOps) {
    if let Some(picker) = p.as_mut() {
        picker.ops = ops.as_ref().copied();
    }
}

#[no_mangle]
pub unsafe extern "C" fn seis_picker_pull(p: *mut Picker, scratch: *mut i32, max_samples: usize, out: *mut f32, max_out: usize) -> isize {
    let Some(picker) = p.as_mut() else { return -1 };
    let Some(ops) = picker.ops else { return -1 };
    let Some(read) = ops.read else { return -1 };
    if scratch.is_null() || out.is_null() {
        return -1;
    }
    let got = read(ops.ctx, scratch, max_samples);
    if got < 0 {
        return -1;
    }
    let got = (got as usize).min(max_samples);
    ffi::seis_decimate(scratch, got, picker.decim, out, max_out) as isize
}

#[no_mangle]
pub unsafe extern "C" fn seis_picker_feed(p: Option<NonNull<Picker>>, samples: *const f32, n: usize) -> isize {
    let Some(mut p) = p else { return -1 };
    let picker = p.as_mut();
    if samples.is_null() {
        return -1;
    }
    let x = std::slice::from_raw_parts(samples, n);
    let mut first: isize = -1;
    for (i, &s) in x.iter().enumerate() {
        let e = s * s;
        picker.sta += picker.a_sta * (e - picker.sta);
        picker.lta += picker.a_lta * (e - picker.lta);
        picker.sample = picker.sample.wrapping_add(1);
        if picker.warmup > 0 {
            picker.warmup = picker.warmup.saturating_sub(1);
            continue;
        }
        let ratio = if picker.lta > 0.0 { picker.sta / picker.lta } else { 0.0 };
        if !picker.triggered && ratio > TRIGGER_RATIO {
            picker.triggered = true;
            picker.onsets = picker.onsets.wrapping_add(1);
            picker.last = Some(Pick {
                sample: picker.sample.wrapping_sub(1),
                ratio,
                chan: picker.chan,
                gain: picker.gain,
                confirmed: ratio > 2.0 * TRIGGER_RATIO,
                rsvd: [0; 6],
            });
            if first < 0 {
                first = i as isize;
            }
        } else if picker.triggered && ratio < 1.0 {
            picker.triggered = false;
        }
    }
    first
}

#[no_mangle]
pub unsafe extern "C" fn seis_picker_last(p: *const Picker) -> Pick {
    let none = Pick { sample: 0, ratio: 0.0, chan: ChanId(0), gain: Gain::X1, confirmed: false, rsvd: [0; 6] };
    p.as_ref().and_then(|picker| picker.last).unwrap_or(none)
}

#[no_mangle]
pub unsafe extern "C" fn seis_picker_onsets(p: *const Picker) -> u64 {
    p.as_ref().map_or(0, |picker| picker.onsets)
}

#[no_mangle]
pub unsafe extern "C" fn seis_ring_fill(slot: &mut RingSlot, samples: *const i32, n: usize, seq: u64) -> u32 {
    let mut stored = 0u32;
    if !samples.is_null() {
        let src = std::slice::from_raw_parts(samples, n);
        for (d, s) in slot.samples.iter_mut().zip(src.iter()) {
            *d = *s;
            stored = stored.wrapping_add(1);
        }
    }
    slot.seq = seq;
    slot.fill = stored;
    slot.flags = 1;
    stored
}

#[no_mangle]
pub unsafe extern "C" fn seis_ring_setup(descs: *mut DmaDesc, n: usize, base: u64, seg_len: u32, chan: ChanId) -> usize {
    if descs.is_null() || ffi::seis_desc_chain(descs, n, base, seg_len, chan) != 0 {
        return 0;
    }
    let ring = std::slice::from_raw_parts(descs, n);
    let mut ok = 0usize;
    let mut expect_addr = base;
    for (i, d) in ring.iter().enumerate() {
        let expect_next = if i.wrapping_add(1) == n { base } else { expect_addr.wrapping_add(u64::from(seg_len)) };
        if d.addr == expect_addr && d.next == expect_next && d.len_bytes == seg_len && d.chan == chan {
            ok = ok.wrapping_add(1);
        }
        expect_addr = expect_addr.wrapping_add(u64::from(seg_len));
    }
    ok
}

#[no_mangle]
pub unsafe extern "C" fn seis_frame_header(seq: u32, t_ns: u64, n_samples: u16, out: *mut WireHdr) -> u32 {
    if out.is_null() {
        return 0;
    }
    let hdr = WireHdr { kind: 1, seq, t_ns, n_samples };
    let mut bytes = [0u8; std::mem::size_of::<WireHdr>()];
    let encoded = [hdr.kind].into_iter().chain(seq.to_ne_bytes()).chain(t_ns.to_ne_bytes()).chain(n_samples.to_ne_bytes());
    for (d, s) in bytes.iter_mut().zip(encoded) {
        *d = s;
    }
    if ffi::seis_wire_decode(bytes.as_ptr(), bytes.len(), out) != 0 {
        return 0;
    }
    let back = *out;
    if { back.seq } != seq || { back.t_ns } != t_ns || { back.n_samples } != n_samples {
        return 0;
    }
    ffi::seis_crc32(bytes.as_ptr(), bytes.len())
}

#[no_mangle]
pub unsafe extern "C" fn seis_regs_capture(live: *const Regs, out: *mut Regs) -> isize {
    ffi::seis_regs_snapshot(live, out)
}

#[no_mangle]
pub extern "C" fn seis_clock_offset_clamped(local_ns: i64, gps_ns: i64) -> c_long {
    let us = unsafe { ffi::seis_clock_offset_us(local_ns.clamp(-(1 << 62), 1 << 62), gps_ns.clamp(-(1 << 62), 1 << 62)) };
    us.clamp(-1_000_000, 1_000_000)
}

#[no_mangle]
pub unsafe extern "C" fn seis_channel_label(cfg: *const ChanCfg, network: u16, station: u16, buf: *mut c_char, cap: usize) -> c_int {
    let Some(cfg) = cfg.as_ref() else { return -1 };
    if buf.is_null() {
        return -1;
    }
    let len = ffi::seis_station_code(buf, cap, network, station);
    if len < 0 {
        return -1;
    }
    let name = CStr::from_ptr(ffi::gain_name(cfg.gain)).to_bytes();
    let out = std::slice::from_raw_parts_mut(buf.cast::<u8>(), cap);
    let Some(rest) = out.get_mut(len as usize..) else { return -1 };
    if name.len().saturating_add(2) > rest.len() {
        return -1;
    }
    let label = std::iter::once(b' ').chain(name.iter().copied()).chain(std::iter::once(0u8));
    for (d, s) in rest.iter_mut().zip(label) {
        *d = s;
    }
    len.saturating_add(1).saturating_add(name.len() as c_int)
}

#[no_mangle]
pub extern "C" fn seis_sample_volts(w: SampleWord) -> f32 {
    unsafe { ffi::seis_word_volts(w, LSB_UV) }
}
