// Links the C host helpers (c/host) into the static library.
fn main() {
    println!("cargo:rerun-if-changed=../c/host");
}
