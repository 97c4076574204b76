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

/// A closed sphere of radius `r` about the origin, triangulated in rings
/// about its north pole (+z) whose edges are about `fine` metres within
/// `fine_reach` metres of the pole (measured along the surface) and grow
/// by a quarter of the distance beyond, up to a tenth of the radius: a
/// fine scan's facets on one spot of a car-sized body, in few facets. Each
/// ring is turned by a random phase and its vertices moved along and
/// across it by up to a fifth of an edge, so that no two rings line up
/// (a random-ish triangulation); every vertex lies on the sphere.
/// Counter-clockwise seen from outside.
pub fn graded_sphere(r: f64, fine: f64, fine_reach: f64, rng: &mut Lcg) -> TriMesh {
    use std::f64::consts::PI;
    let edge = |s: f64| (fine + 0.25 * (s - fine_reach).max(0.0)).min(0.1 * r);
    let at = |theta: f64, phi: f64| {
        Point::new(
            r * theta.sin() * phi.cos(),
            r * theta.sin() * phi.sin(),
            r * theta.cos(),
        )
    };
    let mut vertices = vec![at(0.0, 0.0)];
    // Each ring: its vertices' indices and azimuths (increasing).
    let mut rings: Vec<Vec<(u32, f64)>> = Vec::new();
    let mut s = 0.0;
    loop {
        let h = edge(s);
        s += h * 3f64.sqrt() / 2.0;
        if s > PI * r - 0.5 * edge(s) {
            break;
        }
        let theta = s / r;
        let n = ((2.0 * PI * r * theta.sin() / h).round() as usize).max(3);
        let step = 2.0 * PI / n as f64;
        let phase = rng.next_f64() * step;
        let ring = (0..n)
            .map(|i| {
                let phi = phase + step * (i as f64 + 0.4 * (rng.next_f64() - 0.5));
                let th = theta + 0.4 * (rng.next_f64() - 0.5) * h / r;
                vertices.push(at(th, phi));
                ((vertices.len() - 1) as u32, phi)
            })
            .collect();
        rings.push(ring);
    }
    vertices.push(at(PI, 0.0));
    let south = (vertices.len() - 1) as u32;
    let mut triangles = Vec::new();
    let first = &rings[0];
    for i in 0..first.len() {
        triangles.push([0, first[i].0, first[(i + 1) % first.len()].0]);
    }
    for pair in rings.windows(2) {
        let (a, b) = (&pair[0], &pair[1]);
        let (na, nb) = (a.len(), b.len());
        // Unwrapped azimuths: ring a from its first vertex, ring b from
        // the vertex nearest that one.
        let a0 = a[0].1;
        let j0 = (0..nb)
            .min_by(|&i, &j| {
                let d = |k: usize| (b[k].1 - a0 + PI).rem_euclid(2.0 * PI) - PI;
                d(i).abs().total_cmp(&d(j).abs())
            })
            .unwrap();
        let ua = |i: usize| a[i % na].1 + 2.0 * PI * (i / na) as f64;
        let b0 = a0 + (b[j0].1 - a0 + PI).rem_euclid(2.0 * PI) - PI;
        let ub = |j: usize| {
            let k = (j0 + j) % nb;
            b0 + (b[k].1 - b[j0].1).rem_euclid(2.0 * PI) + 2.0 * PI * (j / nb) as f64
        };
        let (mut i, mut j) = (0, 0);
        while i < na || j < nb {
            let (va, vb) = (a[i % na].0, b[(j0 + j) % nb].0);
            if j == nb || (i < na && ua(i + 1) < ub(j + 1)) {
                triangles.push([va, vb, a[(i + 1) % na].0]);
                i += 1;
            } else {
                triangles.push([va, vb, b[(j0 + j + 1) % nb].0]);
                j += 1;
            }
        }
    }
    let last = rings.last().unwrap();
    for i in 0..last.len() {
        triangles.push([last[i].0, south, last[(i + 1) % last.len()].0]);
    }
    TriMesh::new(vertices, triangles).unwrap()
}

/// `mesh` less the facets whose centroids lie within `radius` of
/// `centre`: a round hole cut along the facets' edges, as a scan's
/// software cuts one, its rim jagged by about a facet.
pub fn punch(mesh: &TriMesh, centre: Point, radius: f64) -> TriMesh {
    let mut out = mesh.clone();
    out.triangles.retain(|t| {
        let c = t
            .iter()
            .map(|&v| mesh.vertices[v as usize].coords)
            .sum::<tuft_mesh::Vector>()
            / 3.0;
        (Point::from(c) - centre).norm() >= radius
    });
    out
}
