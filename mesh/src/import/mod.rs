//! From a file to a [`TriMesh`](crate::TriMesh) in metres: STL reading
//! (binary and ASCII, streamed), length units and an optional rigid motion.

mod axes;
mod stl;
mod transform;
mod units;

pub use axes::{FileAxes, PLACES_NOTE_START};
pub use stl::{StlFormat, StlReport, plain_read_error, read_stl, read_stl_from};
pub use transform::RigidTransform;
pub use units::{LengthUnit, UnknownUnit};
