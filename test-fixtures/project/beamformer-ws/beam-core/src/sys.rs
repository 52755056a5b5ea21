// Imports: the maths library, the sound system library, and the C host helpers of this tree.

#[link(name = "m")]
extern "C" {
    fn cosf(x: f32) -> f32;
    fn sinf(x: f32) -> f32;
}

#[link(name = "asound")]
extern "C" {
    fn snd_pcm_open(pcm: *mut *mut core::ffi::c_void, name: *const core::ffi::c_char, stream: i32, mode: i32) -> i32;
    fn snd_pcm_close(pcm: *mut core::ffi::c_void) -> i32;
}

extern "C" {
    fn beam_window_hann(i: usize, n: usize) -> f32;
    fn beam_window_fill(w: *mut f32, n: usize);
    // Slip: the C helper is `beam_window_fill`
    fn beam_window_fil(w: *mut f32, n: usize);
    fn beam_cpu_features() -> u32;
}

pub fn steer_weight(i: usize, n: usize, phase: f32) -> f32 {
    unsafe { beam_window_hann(i, n) * cosf(phase) + sinf(phase) * 0.0 }
}
