// A probe program: each links the library on its own and defines the same hook and main.
#[no_mangle]
pub extern "C" fn beam_probe_hook() -> i32 {
    7
}

fn main() {
    println!("{}", beam_probe_hook());
}
