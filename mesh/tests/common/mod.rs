//! Helpers shared by the mesh tests: writing STL files in a temporary folder,
//! test bodies.
#![allow(dead_code, clippy::unwrap_used, clippy::expect_used)]

use std::collections::HashMap;
use std::io::Write;
use std::path::{Path, PathBuf};

use tuft_mesh::{Point, TriMesh};

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
            s.push_str(&format!(
                "vertex {} {} {}\n",
                p.x as f32, p.y as f32, p.z as f32
            ));
        }
        s.push_str("endloop\nendfacet\n");
    }
    s.push_str("endsolid test\n");
    s
}

/// Write `bytes` to `name` in `dir`.
pub fn write(dir: &Path, name: &str, bytes: &[u8]) -> PathBuf {
    let path = dir.join(name);
    std::fs::File::create(&path)
        .unwrap()
        .write_all(bytes)
        .unwrap();
    path
}

/// Keep only the part of `mesh` whose facet centroids satisfy `keep`.
pub fn cut(mesh: &TriMesh, keep: impl Fn(&tuft_mesh::Point) -> bool) -> TriMesh {
    let triangles = (0..mesh.len())
        .filter(|&t| {
            let [a, b, c] = mesh.corners(t);
            keep(&tuft_mesh::Point::from(
                (a.coords + b.coords + c.coords) / 3.0,
            ))
        })
        .map(|t| mesh.triangles[t])
        .collect();
    TriMesh {
        vertices: mesh.vertices.clone(),
        triangles,
    }
}

/// A tiny seeded generator (64-bit linear congruential, Knuth's MMIX
/// constants) so tests need no random crate and always draw the same data.
pub struct Lcg(pub u64);

impl Lcg {
    /// Uniform in `[0, 1)`.
    pub fn next_f64(&mut self) -> f64 {
        self.0 = self
            .0
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
    /// Uniform index below `n`.
    pub fn below(&mut self, n: usize) -> usize {
        ((self.next_f64() * n as f64) as usize).min(n.saturating_sub(1))
    }
}

/// Every facet with its own three vertices (an STL "triangle soup"), each
/// corner moved by up to `jitter` metres in each axis.
pub fn soup(mesh: &TriMesh, jitter: f64, rng: &mut Lcg) -> TriMesh {
    let mut vertices = Vec::with_capacity(mesh.len() * 3);
    let mut triangles = Vec::with_capacity(mesh.len());
    for t in 0..mesh.len() {
        let base = vertices.len() as u32;
        for p in mesh.corners(t) {
            let d = tuft_mesh::Vector::new(rng.next_f64(), rng.next_f64(), rng.next_f64());
            vertices.push(p + (d * 2.0 - tuft_mesh::Vector::repeat(1.0)) * jitter);
        }
        triangles.push([base, base + 1, base + 2]);
    }
    TriMesh {
        vertices,
        triangles,
    }
}

/// True when every edge has a matching, oppositely oriented neighbour.
pub fn closed(mesh: &TriMesh) -> bool {
    tuft_mesh::panels::edge_neighbours(&mesh.triangles)
        .iter()
        .flatten()
        .all(Option::is_some)
}

/// Closed unit cube whose faces are `n x n` grids of squares, each split in
/// two triangles, counter-clockwise seen from outside.
pub fn grid_cube(n: u32) -> TriMesh {
    let mut index: HashMap<[u32; 3], u32> = HashMap::new();
    let mut vertices = Vec::new();
    let mut triangles = Vec::new();
    let h = 1.0 / f64::from(n);
    let mut id = |c: [u32; 3]| {
        *index.entry(c).or_insert_with(|| {
            vertices.push(Point::new(
                f64::from(c[0]) * h,
                f64::from(c[1]) * h,
                f64::from(c[2]) * h,
            ));
            (vertices.len() - 1) as u32
        })
    };
    // Each face: the axis it is normal to, its side, and two in-plane axes
    // (u, v) with u x v pointing outward.
    for (axis, side, u, v) in [
        (2, n, 0, 1),
        (2, 0, 1, 0),
        (0, n, 1, 2),
        (0, 0, 2, 1),
        (1, n, 2, 0),
        (1, 0, 0, 2),
    ] {
        for i in 0..n {
            for j in 0..n {
                let at = |di: u32, dj: u32| {
                    let mut c = [0; 3];
                    c[axis] = side;
                    c[u] = i + di;
                    c[v] = j + dj;
                    c
                };
                let q = [at(0, 0), at(1, 0), at(1, 1), at(0, 1)].map(&mut id);
                triangles.push([q[0], q[1], q[2]]);
                triangles.push([q[0], q[2], q[3]]);
            }
        }
    }
    TriMesh::new(vertices, triangles).unwrap()
}

/// The directed edges `(a, b)` of `mesh`'s facets (in their winding) that
/// no facet runs the other way: its open rim, as the facets beside it run
/// it.
#[allow(dead_code)]
pub fn open_edges(mesh: &TriMesh) -> Vec<(u32, u32)> {
    let directed: Vec<(u32, u32)> = mesh
        .triangles
        .iter()
        .flat_map(|t| [(t[0], t[1]), (t[1], t[2]), (t[2], t[0])])
        .collect();
    let set: std::collections::HashSet<(u32, u32)> = directed.iter().copied().collect();
    directed
        .into_iter()
        .filter(|&(a, b)| !set.contains(&(b, a)))
        .collect()
}
