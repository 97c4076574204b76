//! Typed errors of the mesh crate. Each variant names the bad element.

use thiserror::Error;

/// Everything that can go wrong between an STL file and a panel mesh.
#[derive(Debug, Error)]
pub enum MeshError {
    /// A facet has (numerically) zero area, so it has no normal.
    #[error("facet {facet} has zero area and no normal")]
    DegenerateFacet {
        /// Index of the facet.
        facet: usize,
    },
    /// A facet refers to a vertex that does not exist.
    #[error("facet {facet} refers to vertex {vertex}, but the mesh has only {count} vertices")]
    BadVertexIndex {
        /// Index of the facet.
        facet: usize,
        /// The vertex index it holds.
        vertex: usize,
        /// Number of vertices in the mesh.
        count: usize,
    },
    /// The mesh has no facets at all (or none left after repair).
    #[error("the mesh has no usable facets")]
    Empty,
    /// A coordinate is NaN or infinite.
    #[error("vertex {vertex} has a coordinate that is not a finite number")]
    NonFinite {
        /// Index of the vertex (or facet corner when read from STL).
        vertex: usize,
    },
    /// A shape generator was given a parameter it cannot build.
    #[error("generator parameter {name} = {value}: {reason}")]
    InvalidParameter {
        /// Name of the parameter.
        name: &'static str,
        /// The value given.
        value: f64,
        /// What is wrong with it.
        reason: &'static str,
    },
    /// The mirror planes asked for are not consistent with the body.
    #[error("mirror plane problem: {0}")]
    Mirror(String),
}
