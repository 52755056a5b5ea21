//! Towed-array beamformer kernels exported to the C host.
mod kernels;
mod sys;
#[cfg_attr(unix, path = "platform/unix_clock.rs")]
#[cfg_attr(windows, path = "platform/win_clock.rs")]
mod clock;
#[cfg(target_os = "macos")]
mod mac;
#[cfg(feature = "wasm")]
mod web;

pub use kernels::*;
