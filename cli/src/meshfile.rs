//! `mesh.json`: the panels of a run (shared vertices and triangles, in the
//! order of `panels.csv`) and the mirror planes, so that later commands
//! (`tuft compare`) can draw on a run's body without re-running it.
//!
//! Coordinates are written in Rust's shortest round-trip form, so the
//! panels read back are the panels solved, bit for bit.

use std::path::Path;

use anyhow::{Context, Result};
use serde::{Deserialize, Serialize};
use tuft_mesh::{Mirrors, PanelMesh, Point, TriMesh};

/// File name inside a result folder.
pub const FILE: &str = "mesh.json";

/// The stored form.
#[derive(Debug, Serialize, Deserialize)]
struct MeshFile {
    /// Vertex positions, m.
    vertices: Vec<[f64; 3]>,
    /// Vertex indices per panel, counter-clockwise seen from outside.
    triangles: Vec<[u32; 3]>,
    /// Ground plane height, m.
    ground_z: Option<f64>,
    /// Mirrored in y = 0.
    symmetry_plane: bool,
}

/// Write `mesh` to `path`.
pub fn write(path: &Path, mesh: &PanelMesh) -> Result<()> {
    let file = MeshFile {
        vertices: mesh.vertices.iter().map(|p| [p.x, p.y, p.z]).collect(),
        triangles: mesh.triangles.clone(),
        ground_z: mesh.mirrors.ground,
        symmetry_plane: mesh.mirrors.symmetry,
    };
    let text = serde_json::to_string(&file)?;
    std::fs::write(path, text).with_context(|| format!("{}: cannot write", path.display()))
}

/// Read a mesh written by [`write`].
pub fn read(path: &Path) -> Result<PanelMesh> {
    let text = std::fs::read_to_string(path)
        .with_context(|| format!("{}: cannot read the panel mesh", path.display()))?;
    let file: MeshFile = serde_json::from_str(&text)
        .with_context(|| format!("{}: not a tuft panel mesh", path.display()))?;
    let vertices = file
        .vertices
        .iter()
        .map(|v| Point::new(v[0], v[1], v[2]))
        .collect();
    let tri = TriMesh::new(vertices, file.triangles)
        .with_context(|| format!("{}: bad panel mesh", path.display()))?;
    let mirrors = Mirrors {
        ground: file.ground_z,
        symmetry: file.symmetry_plane,
    };
    PanelMesh::new(tri, mirrors).with_context(|| format!("{}: bad panel mesh", path.display()))
}
