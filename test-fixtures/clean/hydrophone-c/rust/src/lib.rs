//! Kernels of the hydrophone-array recorder. The stream blocks are plain C (`blocks/`); they
//! reach these functions through `include/hyd/hyd_kernels.h`.

mod util;
pub mod gain;
pub mod fir;
pub mod beam;
pub mod detect;

pub use detect::{HydEvent, HydEventCb};
