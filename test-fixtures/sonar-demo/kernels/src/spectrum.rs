//! Spectrum kernels of the passive-sonar receiver: bin power and decibels, called from
//! blocks/spectrum_block.cc through include/sonar_spectrum.h.

use core::slice;

/// Power of `nbins` complex bins given as interleaved (re, im) floats.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn sonar_bin_power(spectrum: *const f32, power: *mut f32, nbins: usize) {
    let s = unsafe { slice::from_raw_parts(spectrum, 2 * nbins) };
    let p = unsafe { slice::from_raw_parts_mut(power, nbins) };
    for (out, bin) in p.iter_mut().zip(s.chunks_exact(2)) {
        if let [re, im] = bin {
            *out = re * re + im * im;
        }
    }
}

/// Converts `n` power values to decibels.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn sonar_spec_db(power: *const f32, db: *mut f32, n: usize) {
    let p = unsafe { slice::from_raw_parts(power, n) };
    let d = unsafe { slice::from_raw_parts_mut(db, n) };
    for (out, v) in d.iter_mut().zip(p) {
        *out = 10.0 * v.max(1e-12).log10();
    }
}
