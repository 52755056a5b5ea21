//! Hydrophone array, Rust-side API: its own status enum, never handed to C.

#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Status {
    Listening,
    Clipped,
    Lost(u32),
}
