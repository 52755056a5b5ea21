//! Point filter: the Rust side of lidar.h.

/// Mirror of `lidar_frame`; `stamp_ns` is keyed on the pointer width, which differs from the
/// header's `__LP64__` on 64-bit Windows (LLP64).
#[repr(C)]
pub struct LidarFrame {
    pub seq: u32,
    #[cfg(target_pointer_width = "64")]
    pub stamp_ns: u64,
    #[cfg(not(target_pointer_width = "64"))]
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
