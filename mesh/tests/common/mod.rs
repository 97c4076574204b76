//! Helpers shared by the mesh tests: writing STL files in a temporary folder.
#![allow(dead_code, clippy::unwrap_used, clippy::expect_used)]

use std::io::Write;
use std::path::{Path, PathBuf};

use tuft_mesh::TriMesh;

/// Binary STL bytes of `mesh` (normals left zero: readers must not trust them).
pub fn binary_stl(mesh: &TriMesh) -> Vec<u8> {
    let mut out = vec![0u8; 80];
    out.extend_from_slice(&(mesh.len() as u32).to_le_bytes());
    for t in &mesh.triangles {
        out.extend_from_slice(&[0u8; 12]);
        for &v in t {
            let p = mesh.vertices[v as usize];
            for c in [p.x, p.y, p.z] {
                out.extend_from_slice(&(c as f32).to_le_bytes());
            }
        }
        out.extend_from_slice(&[0u8; 2]);
    }
    out
}

/// ASCII STL text of `mesh`.
pub fn ascii_stl(mesh: &TriMesh) -> String {
    let mut s = String::from("solid test\n");
    for t in &mesh.triangles {
        s.push_str("facet normal 0 0 0\nouter loop\n");
        for &v in t {
            let p = mesh.vertices[v as usize];
            s.push_str(&format!("vertex {} {} {}\n", p.x as f32, p.y as f32, p.z as f32));
        }
        s.push_str("endloop\nendfacet\n");
    }
    s.push_str("endsolid test\n");
    s
}

/// Write `bytes` to `name` in `dir`.
pub fn write(dir: &Path, name: &str, bytes: &[u8]) -> PathBuf {
    let path = dir.join(name);
    std::fs::File::create(&path).unwrap().write_all(bytes).unwrap();
    path
}

/// Keep only the part of `mesh` whose facet centroids satisfy `keep`.
pub fn cut(mesh: &TriMesh, keep: impl Fn(&tuft_mesh::Point) -> bool) -> TriMesh {
    let triangles = (0..mesh.len())
        .filter(|&t| {
            let [a, b, c] = mesh.corners(t);
            keep(&tuft_mesh::Point::from((a.coords + b.coords + c.coords) / 3.0))
        })
        .map(|t| mesh.triangles[t])
        .collect();
    TriMesh { vertices: mesh.vertices.clone(), triangles }
}
