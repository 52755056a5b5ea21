// Hydrophone array: the Rust side of the frame queue and the filter stages.
#![allow(non_camel_case_types)]

#[repr(C, align(16))]
pub struct hydro_frame {
    pub samples: [f32; 12],
    pub seq: u32,
}

#[repr(C, align(16))]
pub struct hydro_ping {
    pub t0: f64,
    pub bearing: f32,
}

#[repr(C)]
pub struct hydro_bands {
    pub energy: [f32; 3],
    pub taps: [f32; 32],
}

extern "C" {
    fn hydro_open(rate: u32) -> i32;
    fn hydro_push(frame: *mut hydro_frame);
    fn hydro_bands_read(out: *mut hydro_bands) -> i32;
}

#[no_mangle]
pub unsafe extern "C" fn hydro_ping_log(ping: *const hydro_ping) {
    if ping.is_null() {
        return;
    }
}

#[no_mangle]
pub unsafe extern "C" fn hydro_fir_run(input: *const f32, out: *mut f32, n: u32) -> i32 {
    if input.is_null() || out.is_null() {
        return -1;
    }
    n as i32
}

#[no_mangle]
pub unsafe extern "C" fn hydro_decimate_run(input: *const f32, out: *mut f32, n: u32) -> i32 {
    if input.is_null() || out.is_null() {
        return -1;
    }
    n as i32
}

pub fn start(rate: u32, frame: &mut hydro_frame, bands: &mut hydro_bands) -> i32 {
    unsafe {
        hydro_push(frame);
        hydro_bands_read(bands);
        hydro_open(rate)
    }
}
