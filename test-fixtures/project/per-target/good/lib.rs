//! Point filter: the Rust side of lidar.h.

/// Mirror of `lidar_frame`; `stamp_ns` follows the header's `#ifdef __LP64__`, which holds on
/// 64-bit Unix targets (not on 64-bit Windows, which is LLP64).
#[repr(C)]
pub struct LidarFrame {
    pub seq: u32,
    #[cfg(all(target_pointer_width = "64", not(windows)))]
    pub stamp_ns: u64,
    #[cfg(not(all(target_pointer_width = "64", not(windows))))]
    pub stamp_ns: u32,
    pub n_points: usize,
    pub points: *const f32,
}

#[no_mangle]
pub unsafe extern "C" fn lidar_frame_valid(f: *const LidarFrame) -> usize {
    if f.is_null() || (*f).points.is_null() {
        return 0;
    }
    let pts = std::slice::from_raw_parts((*f).points, (*f).n_points);
    pts.iter().filter(|p| p.is_finite()).count()
}
