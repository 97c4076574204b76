//! An indexed triangle mesh in metres.

use crate::{MeshError, Point, Vector};

/// Indexed triangles. Vertices are counter-clockwise seen from outside once
/// the mesh has been repaired, so `(b - a) x (c - a)` points out of the body.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct TriMesh {
    /// Vertex positions in metres.
    pub vertices: Vec<Point>,
    /// Triangles as three vertex indices.
    pub triangles: Vec<[u32; 3]>,
}

impl TriMesh {
    /// A mesh from vertices and triangles, checking every index.
    pub fn new(vertices: Vec<Point>, triangles: Vec<[u32; 3]>) -> Result<Self, MeshError> {
        let count = vertices.len();
        for (facet, t) in triangles.iter().enumerate() {
            for &v in t {
                if v as usize >= count {
                    return Err(MeshError::BadVertexIndex {
                        facet,
                        vertex: v as usize,
                        count,
                    });
                }
            }
        }
        if let Some(vertex) = vertices
            .iter()
            .position(|p| !p.coords.iter().all(|c| c.is_finite()))
        {
            return Err(MeshError::NonFinite { vertex });
        }
        Ok(Self {
            vertices,
            triangles,
        })
    }

    /// Number of triangles.
    pub fn len(&self) -> usize {
        self.triangles.len()
    }

    /// True when there are no triangles.
    pub fn is_empty(&self) -> bool {
        self.triangles.is_empty()
    }

    /// This mesh and `other` as one, `other`'s vertices numbered after
    /// these (the two share no vertex, so their parts stay apart: an STL
    /// of several solids).
    pub fn joined(&self, other: &TriMesh) -> TriMesh {
        let offset = self.vertices.len() as u32;
        let mut out = self.clone();
        out.vertices.extend(&other.vertices);
        out.triangles
            .extend(other.triangles.iter().map(|t| t.map(|v| v + offset)));
        out
    }

    /// The three corner positions of triangle `t`.
    ///
    /// # Panics
    /// If `t` is out of range (a programmer mistake: indices are checked on construction).
    #[track_caller]
    pub fn corners(&self, t: usize) -> [Point; 3] {
        let [a, b, c] = self.triangles[t];
        [
            self.vertices[a as usize],
            self.vertices[b as usize],
            self.vertices[c as usize],
        ]
    }

    /// Bounding box `(min, max)` of triangle `t`.
    #[track_caller]
    pub fn facet_box(&self, t: usize) -> (Point, Point) {
        corner_box(&self.corners(t))
    }

    /// Area-weighted normal of triangle `t`: `(b - a) x (c - a) / 2`.
    #[track_caller]
    pub fn area_vector(&self, t: usize) -> Vector {
        let [a, b, c] = self.corners(t);
        (b - a).cross(&(c - a)) * 0.5
    }

    /// Total surface area.
    pub fn area(&self) -> f64 {
        (0..self.len()).map(|t| self.area_vector(t).norm()).sum()
    }

    /// Signed enclosed volume (divergence theorem); positive for a closed,
    /// outward-oriented surface.
    pub fn signed_volume(&self) -> f64 {
        (0..self.len())
            .map(|t| {
                let [a, b, c] = self.corners(t);
                a.coords.dot(&b.coords.cross(&c.coords)) / 6.0
            })
            .sum()
    }

    /// Axis-aligned bounding box `(min, max)`, or `None` when empty.
    pub fn bounds(&self) -> Option<(Point, Point)> {
        let first = *self.vertices.first()?;
        Some(
            self.vertices
                .iter()
                .fold((first, first), |(lo, hi), p| (lo.inf(p), hi.sup(p))),
        )
    }

    /// Apply `f` to every vertex (units, rigid transforms, mirrors).
    pub fn map_vertices(&mut self, f: impl Fn(Point) -> Point) {
        for p in &mut self.vertices {
            *p = f(*p);
        }
    }

    /// Reverse the orientation of every triangle.
    pub fn flip(&mut self) {
        for t in &mut self.triangles {
            t.swap(1, 2);
        }
    }
}

/// Bounding box `(min, max)` of three corners.
pub fn corner_box(c: &[Point; 3]) -> (Point, Point) {
    (c[0].inf(&c[1]).inf(&c[2]), c[0].sup(&c[1]).sup(&c[2]))
}
