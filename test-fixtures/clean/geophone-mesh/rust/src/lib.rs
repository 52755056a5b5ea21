//! Geophone mesh core: the state the C++ stream blocks share, kept in Rust behind opaque handles
//! (include/gm/gm.h). The calibration table and the event tally are reference counted (`Arc`);
//! a stream owns a type-erased sink closure; a mesh is opened through an out-parameter.

pub mod calib;
pub mod mesh;
pub mod stream;
pub mod tally;
