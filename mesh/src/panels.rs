//! Flat triangular surface panels with their geometry and neighbours.

use std::collections::HashMap;

use nalgebra::Unit;

use crate::{MeshError, Mirrors, Point, TriMesh, Vector};

/// One flat triangular panel.
#[derive(Debug, Clone, PartialEq)]
pub struct Panel {
    /// Corners, counter-clockwise seen from outside (from where `normal` points).
    pub vertices: [Point; 3],
    /// Centroid (collocation point).
    pub centroid: Point,
    /// Outward unit normal.
    pub normal: Unit<Vector>,
    /// Area, m^2.
    pub area: f64,
    /// First in-plane unit axis (along the first edge).
    pub l: Unit<Vector>,
    /// Second in-plane unit axis, `normal x l`.
    pub m: Unit<Vector>,
    /// Panel size: the longest edge, metres.
    pub size: f64,
}

impl Panel {
    /// A panel from three corners; `None` when they span (numerically) no area.
    pub fn new(vertices: [Point; 3]) -> Option<Self> {
        let [a, b, c] = vertices;
        let e0 = b - a;
        let cross = e0.cross(&(c - a));
        let twice_area = cross.norm();
        let size = e0.norm().max((c - b).norm()).max((a - c).norm());
        if twice_area.is_nan() || twice_area <= 1e-14 * size * size {
            return None;
        }
        let normal = Unit::try_new(cross, 0.0)?;
        let l = Unit::try_new(e0, 0.0)?;
        let m = Unit::new_normalize(normal.cross(&l));
        Some(Self {
            vertices,
            centroid: Point::from((a.coords + b.coords + c.coords) / 3.0),
            normal,
            area: 0.5 * twice_area,
            l,
            m,
            size,
        })
    }

    /// Coordinates of `p` in the panel frame `(l, m, n)` about the centroid.
    pub fn to_local(&self, p: &Point) -> Vector {
        let d = p - self.centroid;
        Vector::new(d.dot(&self.l), d.dot(&self.m), d.dot(&self.normal))
    }
}

/// The body surface as panels, with connectivity and the mirror planes that
/// close it.
#[derive(Debug, Clone)]
pub struct PanelMesh {
    /// Shared vertex positions.
    pub vertices: Vec<Point>,
    /// Vertex indices of each panel (same order as `panels`).
    pub triangles: Vec<[u32; 3]>,
    /// Panel geometry.
    pub panels: Vec<Panel>,
    /// Neighbour across edge `k` (from corner `k` to corner `k+1`); `None`
    /// on an open edge (which must lie on a mirror plane in a usable mesh)
    /// or a non-manifold edge.
    pub edge_neighbours: Vec<[Option<u32>; 3]>,
    /// Panels around each vertex.
    pub vertex_panels: Vec<Vec<u32>>,
    /// Mirror planes whose images complete the body.
    pub mirrors: Mirrors,
}

impl PanelMesh {
    /// Build panels from a repaired mesh.
    ///
    /// # Errors
    /// [`MeshError::Empty`] for no triangles, [`MeshError::DegenerateFacet`]
    /// for a triangle without area (run the repair passes first).
    pub fn new(mesh: TriMesh, mirrors: Mirrors) -> Result<Self, MeshError> {
        if mesh.is_empty() {
            return Err(MeshError::Empty);
        }
        let panels = (0..mesh.len())
            .map(|t| Panel::new(mesh.corners(t)).ok_or(MeshError::DegenerateFacet { facet: t }))
            .collect::<Result<Vec<_>, _>>()?;
        let edge_neighbours = edge_neighbours(&mesh.triangles);
        let mut vertex_panels = vec![Vec::new(); mesh.vertices.len()];
        for (t, tri) in mesh.triangles.iter().enumerate() {
            for &v in tri {
                vertex_panels[v as usize].push(t as u32);
            }
        }
        Ok(Self {
            vertices: mesh.vertices,
            triangles: mesh.triangles,
            panels,
            edge_neighbours,
            vertex_panels,
            mirrors,
        })
    }

    /// Number of (real) panels.
    pub fn len(&self) -> usize {
        self.panels.len()
    }

    /// True when there are no panels.
    pub fn is_empty(&self) -> bool {
        self.panels.is_empty()
    }

    /// Total area of the real panels, m^2.
    pub fn area(&self) -> f64 {
        self.panels.iter().map(|p| p.area).sum()
    }

    /// Axis-aligned bounds of the real panels.
    pub fn bounds(&self) -> (Point, Point) {
        let first = self.panels[0].centroid;
        self.vertices
            .iter()
            .fold((first, first), |(lo, hi), p| (lo.inf(p), hi.sup(p)))
    }

    /// Panels that share a vertex with panel `i` (excluding `i`), sorted.
    pub fn vertex_neighbourhood(&self, i: usize) -> Vec<u32> {
        let mut out: Vec<u32> = self.triangles[i]
            .iter()
            .flat_map(|&v| self.vertex_panels[v as usize].iter().copied())
            .filter(|&j| j as usize != i)
            .collect();
        out.sort_unstable();
        out.dedup();
        out
    }

    /// Back to a plain triangle mesh (for writing or re-processing).
    pub fn to_trimesh(&self) -> TriMesh {
        TriMesh {
            vertices: self.vertices.clone(),
            triangles: self.triangles.clone(),
        }
    }
}

/// Neighbour across each edge, found by matching the reversed edge. Edges
/// used by more than two triangles, or matched with the same direction
/// (inconsistent orientation), get `None`.
pub fn edge_neighbours(triangles: &[[u32; 3]]) -> Vec<[Option<u32>; 3]> {
    let mut directed: HashMap<(u32, u32), Vec<u32>> = HashMap::with_capacity(triangles.len() * 3);
    for (t, tri) in triangles.iter().enumerate() {
        for k in 0..3 {
            directed
                .entry((tri[k], tri[(k + 1) % 3]))
                .or_default()
                .push(t as u32);
        }
    }
    triangles
        .iter()
        .enumerate()
        .map(|(t, tri)| {
            std::array::from_fn(|k| {
                let (a, b) = (tri[k], tri[(k + 1) % 3]);
                let same = directed.get(&(a, b)).map_or(0, Vec::len);
                match directed.get(&(b, a)).map(Vec::as_slice) {
                    Some([other]) if same == 1 && *other != t as u32 => Some(*other),
                    _ => None,
                }
            })
        })
        .collect()
}
