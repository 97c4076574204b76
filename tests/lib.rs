//! Shared helpers for the validation suite and the end-to-end tests.

use tuft_mesh::generate::latlong_sphere;
use tuft_mesh::generate::{AhmedParams, ahmed_with_params};
use tuft_mesh::{MeshError, Mirrors, PanelMesh, Point, TriMesh};

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

/// The part of a unit lat-long sphere (poles on x, meridians every
/// 360/`n_lon` degrees, `n_lon` divisible by 4) with y >= 0, cut on
/// meridians, its plane vertices set exactly on y = 0 and its centre
/// raised to `centre_z`.
pub fn half_sphere(n_lat: usize, n_lon: usize, centre_z: f64) -> TriMesh {
    let full = latlong_sphere(1.0, n_lat, n_lon);
    let keep: Vec<[u32; 3]> = full
        .triangles
        .iter()
        .copied()
        .filter(|t| t.iter().map(|&v| full.vertices[v as usize].y).sum::<f64>() > 0.0)
        .collect();
    let vertices = full
        .vertices
        .iter()
        .map(|p| {
            Point::new(
                p.x,
                if p.y.abs() < 1e-12 { 0.0 } else { p.y },
                p.z + centre_z,
            )
        })
        .collect();
    TriMesh {
        vertices,
        triangles: keep,
    }
}
