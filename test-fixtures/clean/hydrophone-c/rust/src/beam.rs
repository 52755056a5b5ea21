//! Delay-and-sum beamformer over interleaved frames (`frames[i * nchan + c]`).

use crate::util::{frames_of, input};

/// The state behind a `hyd_beam *`: one delay (in frames) per channel.
pub struct Beam {
    delays: Box<[u32]>,
}

/// Makes a beam from `nchan` per-channel delays (copied). NULL when `delays` is NULL or `nchan`
/// is 0. Release with `hyd_beam_free`.
///
/// # Safety
/// `delays` is NULL or points at `nchan` readable values.
#[no_mangle]
pub unsafe extern "C" fn hyd_beam_new(delays: *const u32, nchan: usize) -> *mut Beam {
    if nchan == 0 {
        return std::ptr::null_mut();
    }
    match input(delays, nchan) {
        Some(d) => Box::into_raw(Box::new(Beam { delays: d.into() })),
        None => std::ptr::null_mut(),
    }
}

/// Number of channels the beam expects per frame (0 for NULL).
///
/// # Safety
/// `beam` is NULL or comes from `hyd_beam_new`.
#[no_mangle]
pub unsafe extern "C" fn hyd_beam_channels(beam: *const Beam) -> usize {
    beam.as_ref().map_or(0, |b| b.delays.len())
}

/// Sums the channels of `nsamples` interleaved samples (`nsamples / channels` frames) into one
/// output sample per frame, each channel taken `delay` frames earlier; frames before the start
/// count as silence. Writes at most `nout` outputs and returns how many it wrote.
///
/// # Safety
/// `beam` comes from `hyd_beam_new`; `frames` points at `nsamples` floats and `out` at `nout`
/// floats, and the two do not overlap.
#[no_mangle]
pub unsafe extern "C" fn hyd_beam_form(beam: *const Beam, frames: *const f32, nsamples: usize, out: *mut f32, nout: usize) -> usize {
    let Some(beam) = beam.as_ref() else { return 0 };
    let Some(frames) = input(frames, nsamples) else { return 0 };
    if out.is_null() || nout == 0 {
        return 0;
    }
    let out = std::slice::from_raw_parts_mut(out, nout);
    let nchan = beam.delays.len();
    let nframes = frames_of(frames.len(), nchan).min(out.len());
    for (i, o) in out.iter_mut().take(nframes).enumerate() {
        let mut acc = 0.0f32;
        for (c, &d) in beam.delays.iter().enumerate() {
            let Some(src) = i.checked_sub(d as usize) else { continue };
            if let Some(x) = frames.get(src.wrapping_mul(nchan).wrapping_add(c)) {
                acc += *x;
            }
        }
        *o = acc / nchan as f32;
    }
    nframes
}

/// Releases a beam. NULL is accepted and ignored.
///
/// # Safety
/// `beam` is NULL or comes from `hyd_beam_new` and is not used afterwards.
#[no_mangle]
pub unsafe extern "C" fn hyd_beam_free(beam: *mut Beam) {
    if !beam.is_null() {
        drop(Box::from_raw(beam));
    }
}
