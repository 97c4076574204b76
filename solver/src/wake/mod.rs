//! Kutta condition with a fixed, straight doublet wake.
//!
//! Sharp trailing edges are found on the mesh ([`detect`]) or named by the
//! caller; from each trailing-edge edge a flat wake panel runs straight
//! downstream along the free stream ([`kutta`]). Its doublet strength is
//! fixed by the Kutta condition `mu_w = mu_upper - mu_lower` (Katz &
//! Plotkin, *Low-Speed Aerodynamics*, 2nd ed., 2001, sec. 9.3 and eq.
//! 12.15), so the wake adds no unknown: its influence goes into the
//! columns of the two trailing-edge panels of the assembled system. The
//! surface gradient of `mu` is then taken on a copy of the mesh cut open
//! along the trailing edges ([`split`]), so no stencil straddles the jump.

pub mod detect;
pub mod kutta;
pub mod separated;
pub mod split;

use thiserror::Error;

use crate::SolverError;

pub use detect::{
    DetectParams, TrailingEdge, find_trailing_edges, find_trailing_edges_with_params,
    trailing_edges_from_list,
};
pub use kutta::{
    Wake, WakeParams, WakeSolution, add_wake_columns, side_weights, solve_potential_with_wake,
    solve_potential_with_wake_params, wake_panels, wake_strengths,
};
pub use split::{sharp_edges, split_edges, split_trailing_edges};

/// What can go wrong when shedding a wake.
#[derive(Debug, Error)]
pub enum WakeError {
    /// A named trailing edge is not an edge of the mesh.
    #[error("vertices {start} and {end} do not form an edge of the mesh")]
    EdgeNotFound {
        /// First vertex.
        start: u32,
        /// Second vertex.
        end: u32,
    },
    /// A named trailing edge has only one panel (an open or mirror-plane
    /// edge), so there is no upper and lower side.
    #[error("edge {start}-{end} has a panel on one side only and cannot shed a wake")]
    OpenEdge {
        /// First vertex.
        start: u32,
        /// Second vertex.
        end: u32,
    },
    /// A named trailing edge runs (nearly) along the free stream, so the
    /// wake panel behind it would have no area.
    #[error("edge {start}-{end} runs along the free stream and cannot shed a wake")]
    EdgeAlongStream {
        /// First vertex.
        start: u32,
        /// Second vertex.
        end: u32,
    },
    /// A wake setting is out of range.
    #[error("wake parameter {name} = {value} is out of range")]
    BadParameter {
        /// Name of the parameter.
        name: &'static str,
        /// Value given.
        value: f64,
    },
    /// The mesh cut open along the trailing edges could not be rebuilt.
    #[error(transparent)]
    Mesh(#[from] tuft_mesh::MeshError),
    /// The potential-flow solve failed.
    #[error(transparent)]
    Solver(#[from] SolverError),
}
