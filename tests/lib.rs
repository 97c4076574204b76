//! Shared helpers for the validation suite and the end-to-end tests.

use tuft_mesh::generate::{AhmedParams, ahmed_with_params};
use tuft_mesh::{MeshError, Mirrors, PanelMesh, TriMesh};

/// Mirrors of a half model standing on the ground: the ground plane z = 0
/// and the symmetry plane y = 0.
pub fn ground_and_symmetry() -> Mirrors {
    Mirrors {
        ground: Some(0.0),
        symmetry: true,
    }
}

/// Panels of the half model `half` (the y >= 0 side) on the ground plane
/// z = 0, mirrored in both planes.
///
/// # Errors
/// The mesh errors of [`PanelMesh::new`].
pub fn on_ground_half(half: TriMesh) -> Result<PanelMesh, MeshError> {
    PanelMesh::new(half, ground_and_symmetry())
}

/// The Ahmed-type slant-back body (Ahmed, Ramm & Faltin 1984, dimensions
/// from memory) as a half model on the ground, with `panels` triangles on
/// the full body (the half model holds about half of them).
///
/// # Errors
/// The generator's and [`PanelMesh::new`]'s errors.
pub fn half_ahmed(slant_deg: f64, panels: usize) -> Result<PanelMesh, MeshError> {
    on_ground_half(ahmed_with_params(&AhmedParams {
        slant_deg,
        panels,
        half: true,
        ..AhmedParams::default()
    })?)
}
