//! # tuft-mesh: from an STL scan to clean surface panels
//!
//! This crate knows geometry only, no aerodynamics. The data walk is
//!
//! ```text
//! STL file --import--> TriMesh --repair--> TriMesh (closed, outward)
//!          --wrap (overlapping parts, ground contact)--> TriMesh
//!          --coarsen--> TriMesh --PanelMesh::new--> PanelMesh (+ Mirrors)
//! ```
//!
//! Main types: [`TriMesh`] (indexed triangles in metres), [`PanelMesh`]
//! (flat triangular panels with centroid, unit normal, area, local frame and
//! neighbours), [`Mirrors`] (the ground plane and the symmetry plane, whose
//! images close a cut body).
//!
//! ```
//! use tuft_mesh::{generate, Mirrors, PanelMesh};
//! let sphere = generate::icosphere(1.0, 2);
//! let panels = PanelMesh::new(sphere, Mirrors::none()).unwrap();
//! assert_eq!(panels.len(), 320);
//! let area: f64 = panels.panels.iter().map(|p| p.area).sum();
//! // An inscribed polyhedron: its area approaches 4 pi from below.
//! assert!(area < 4.0 * std::f64::consts::PI && area > 0.97 * 4.0 * std::f64::consts::PI);
//! ```
//!
//! From a file, [`prepare::prepare`] does it all: read (binary or ASCII
//! STL), scale to metres, move, repair ([`repair`]), wrap ([`wrap`]),
//! coarsen ([`coarsen`]),
//! build panels and measure their [`quality`], with a serializable report.
#![deny(missing_docs)]

pub mod coarsen;
pub mod crossing;
pub mod cut;
pub mod distance;
pub mod error;
pub mod export;
mod fasthash;
pub mod generate;
pub mod import;
pub mod mirror;
pub mod panels;
pub mod prepare;
pub mod quality;
pub mod repair;
pub mod stage;
pub mod thin;
pub mod trimesh;
pub mod wrap;

pub use error::MeshError;
pub use import::{FileAxes, LengthUnit, RigidTransform};
pub use mirror::{Mirrors, Reflection};
pub use panels::{Panel, PanelMesh};
pub use trimesh::TriMesh;

/// Points and vectors used throughout: metres, `f64`.
pub type Point = nalgebra::Point3<f64>;
/// A free vector in metres (or unitless where stated).
pub type Vector = nalgebra::Vector3<f64>;
