//! Correlator kernels: hand-written mirrors of correlator.h.
use core::ffi::c_long;

#[repr(C)]
pub struct CorrFrameHdr {
    pub magic: u32,
    pub seq: u32,
    pub timestamp_us: i64,
    pub gain: f32,
}

#[repr(C)]
pub struct CorrCfg {
    pub nchan: u32,
    pub scale: f32,
}

#[repr(C)]
pub struct CorrDmaDesc {
    pub flags: u8,
    pub addr: u64,
    pub len: u16,
}

#[repr(C)]
pub struct CorrRingSlot {
    pub head: u32,
    pub tail: u32,
}

#[repr(C)]
pub struct CorrTaps {
    pub ntaps: u32,
    pub taps: [f32; 15],
}

// ferrule-mirror: corr_stats
#[repr(C)]
pub struct CorrelatorStats {
    pub frames: u64,
    pub dropped: u32,
}

#[no_mangle]
pub unsafe extern "C" fn corr_push(hdr: *const CorrFrameHdr, cfg: *const CorrCfg) {
    let _ = (hdr, cfg, 0 as c_long);
}

#[no_mangle]
pub unsafe extern "C" fn corr_dma(ring: *mut CorrDmaDesc, n: u32) {
    let _ = (ring, n);
}

#[no_mangle]
pub unsafe extern "C" fn corr_ring(slot: *mut CorrRingSlot) {
    let _ = slot;
}

#[no_mangle]
pub unsafe extern "C" fn corr_set_taps(taps: *const CorrTaps) {
    let _ = taps;
}
