//! # tuft-solver: potential flow, boundary layer and loads
//!
//! No I/O, no printing: everything here takes geometry and flow conditions
//! and returns numbers.
#![deny(missing_docs)]

pub mod boundary_layer;
