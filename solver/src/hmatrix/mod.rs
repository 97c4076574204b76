//! Compressed (hierarchical-matrix) influence operator for large meshes.
//!
//! The dense system of [`mod@crate::assemble`] needs `8 N^2` bytes and `N^2`
//! kernel evaluations. Here the same matrix entries (images folded in,
//! [`entry`]) are grouped by a cluster tree of the panels ([`cluster`]);
//! blocks of well-separated clusters are approximated by adaptive cross
//! approximation ([`aca`]) to a relative tolerance, the rest stored dense
//! ([`operator`]), so memory and work grow roughly as `N log N`
//! (Bebendorf 2000; Rjasanow & Steinbach 2007, ch. 3 (from memory)). The source matrix
//! `B` is never stored: each of its blocks (dense near field, ACA far
//! field) is applied to the three normal components for the
//! right-hand-side basis as it is computed. The doublet system is solved
//! by GMRES with a block-Jacobi preconditioner ([`precondition`]).

pub mod aca;
pub mod cluster;
pub mod entry;
pub mod operator;
pub mod precondition;
pub mod solve;

pub use operator::{CompressedMatrix, CompressedParams, CompressionStats};
pub use solve::{CompressedSystem, assemble_compressed, solve_compressed};
