//! # tuft-solver: potential flow, boundary layer and loads
//!
//! No I/O, no printing: everything here takes geometry and flow conditions
//! and returns numbers.
//!
//! The potential-flow panel method (Katz & Plotkin, *Low-Speed
//! Aerodynamics*, 2nd ed., 2001, ch. 9-12) is in [`potential`]: influence
//! coefficients in [`influence`], assembly with mirror images in
//! [`mod@assemble`], linear solvers in [`linear`], the surface gradient of the
//! doublet strength in [`gradient`], and the compressed (hierarchical
//! matrix) operator for large meshes in [`hmatrix`].
#![deny(missing_docs)]

pub mod error;
pub mod influence;

pub use error::SolverError;
pub mod assemble;
pub mod boundary_layer;
pub mod gradient;
pub mod hmatrix;
pub mod linear;
pub mod loads;
pub mod offbody;
pub mod potential;
pub mod viscous_loop;
pub mod wake;

pub use assemble::{InfluenceSystem, assemble};
pub use potential::{
    Freestream, LinearSolver, PotentialParams, PotentialSolution, SolveStats, solve_potential,
    solve_potential_many, solve_potential_with_params, surface_velocity,
};
