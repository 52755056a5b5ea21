#[no_mangle]
pub unsafe extern "C" fn sonar_gain(input: *const f32, out: *mut f32, n: usize, g: f32) {
    // Raw pointers only: in-place calls (input == out) stay defined.
    for i in 0..n {
        out.add(i).write(input.add(i).read() * g);
    }
}
