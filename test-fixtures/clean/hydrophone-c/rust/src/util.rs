//! Small helpers shared by the kernels.

/// Largest sample count one call accepts. On 64-bit targets the bound is the one the recorder's
/// ring buffer uses; on 32-bit boards it keeps `n * 4` bytes inside the address space.
#[cfg(target_pointer_width = "64")]
pub(crate) const MAX_SAMPLES: usize = 1 << 32;
#[cfg(not(target_pointer_width = "64"))]
pub(crate) const MAX_SAMPLES: usize = 1 << 28;

/// `n` items behind `p` as a slice, or `None` when the pointer is NULL or the count is out of
/// range (an empty slice for `n == 0`, whatever `p` is).
///
/// # Safety
/// When `p` is not NULL it must point at `n` readable `T`s that outlive `'a`.
pub(crate) unsafe fn input<'a, T>(p: *const T, n: usize) -> Option<&'a [T]> {
    if n == 0 {
        return Some(&[]);
    }
    if p.is_null() || n > MAX_SAMPLES {
        return None;
    }
    Some(std::slice::from_raw_parts(p, n))
}

#[cfg(target_pointer_width = "64")]
#[inline]
pub(crate) fn frames_of(nsamples: usize, nchan: usize) -> usize {
    // 64-bit: a division is cheap next to the kernel; no overflow is possible either way
    if nchan == 0 { 0 } else { nsamples / nchan }
}

#[cfg(not(target_pointer_width = "64"))]
#[inline]
pub(crate) fn frames_of(nsamples: usize, nchan: usize) -> usize {
    nsamples.checked_div(nchan).unwrap_or(0)
}
