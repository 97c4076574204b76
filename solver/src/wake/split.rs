//! Cut a mesh open along its trailing edges.
//!
//! The doublet strength jumps by the wake strength across a trailing edge,
//! so a surface-gradient stencil that reaches across it sees a step, not a
//! smooth field. On a copy of the mesh in which the vertices along the
//! trailing edges are duplicated for the panels of one side, the edge and
//! vertex neighbourhoods stop at the edge, and the gradient (and so the
//! surface velocity) on each side uses that side only, as a one-sided
//! difference at a wake junction does in Katz & Plotkin (2001, sec. 12.4).
//!
//! The same cut is made along other sharp edges (a wing tip, the corners of
//! a box): the tangential gradient is not continuous across a fold, so a
//! fit in one panel's plane should not use values from a face turned far
//! from it. Where a trailing edge meets a wing tip the trailing-edge vertex
//! is then split three ways (upper, lower, tip face), which keeps the tip
//! panels of the trailing edge one-sided too.

use std::collections::HashSet;

use tuft_mesh::{MeshError, PanelMesh, TriMesh};

use super::TrailingEdge;

/// The same panels, in the same order and with the same geometry, with
/// the connectivity cut along the trailing `edges`.
///
/// # Errors
/// Only those of [`PanelMesh::new`], which cannot occur for panels that
/// already formed a [`PanelMesh`].
pub fn split_trailing_edges(
    mesh: &PanelMesh,
    edges: &[TrailingEdge],
) -> Result<PanelMesh, MeshError> {
    let pairs: Vec<[u32; 2]> = edges.iter().map(|e| [e.start, e.end]).collect();
    split_edges(mesh, &pairs)
}

/// Edges whose two outward normals are more than `min_normal_angle_deg`
/// apart (a wing tip, the corners of a box), as vertex pairs.
pub fn sharp_edges(mesh: &PanelMesh, min_normal_angle_deg: f64) -> Vec<[u32; 2]> {
    let cos = min_normal_angle_deg.to_radians().cos();
    let mut out = Vec::new();
    for (t, tri) in mesh.triangles.iter().enumerate() {
        for k in 0..3 {
            if let Some(o) = mesh.edge_neighbours[t][k].map(|o| o as usize)
                && o > t
                && mesh.panels[t].normal.dot(&mesh.panels[o].normal) < cos
            {
                out.push([tri[k], tri[(k + 1) % 3]]);
            }
        }
    }
    out
}

/// The same panels, in the same order and with the same geometry, with
/// the connectivity cut along `edges` (vertex pairs in either order).
///
/// Around each vertex, panel corners are grouped by walking across the
/// shared edges that are not cut; each group gets its own copy of the
/// vertex. A vertex where a cut simply ends stays one group and is not
/// split.
///
/// # Errors
/// Only those of [`PanelMesh::new`], which cannot occur for panels that
/// already formed a [`PanelMesh`].
pub fn split_edges(mesh: &PanelMesh, edges: &[[u32; 2]]) -> Result<PanelMesh, MeshError> {
    let cut: HashSet<(u32, u32)> = edges.iter().flat_map(|&[a, b]| [(a, b), (b, a)]).collect();
    let corners = mesh.triangles.len() * 3;
    let mut groups = UnionFind::new(corners);
    for (t, tri) in mesh.triangles.iter().enumerate() {
        for k in 0..3 {
            let (a, b) = (tri[k], tri[(k + 1) % 3]);
            let Some(o) = mesh.edge_neighbours[t][k].map(|o| o as usize) else {
                continue;
            };
            if cut.contains(&(a, b)) {
                continue;
            }
            let other = mesh.triangles[o];
            for (v, kt) in [(a, k), (b, (k + 1) % 3)] {
                if let Some(ko) = other.iter().position(|&x| x == v) {
                    groups.union(3 * t + kt, 3 * o + ko);
                }
            }
        }
    }
    let (vertices, triangles) = relabel(mesh, &mut groups);
    PanelMesh::new(
        TriMesh {
            vertices,
            triangles,
        },
        mesh.mirrors,
    )
}

/// One vertex per group of corners; the first group of each vertex keeps
/// the original index, later groups are appended.
fn relabel(mesh: &PanelMesh, groups: &mut UnionFind) -> (Vec<tuft_mesh::Point>, Vec<[u32; 3]>) {
    let mut vertices = mesh.vertices.clone();
    let mut owner_of_root: Vec<Option<u32>> = vec![None; mesh.triangles.len() * 3];
    let mut first_root: Vec<Option<usize>> = vec![None; mesh.vertices.len()];
    let mut triangles = mesh.triangles.clone();
    for (t, tri) in triangles.iter_mut().enumerate() {
        for (k, v) in tri.iter_mut().enumerate() {
            let root = groups.find(3 * t + k);
            let label = match (owner_of_root[root], first_root[*v as usize]) {
                (Some(label), _) => label,
                (None, None) => {
                    first_root[*v as usize] = Some(root);
                    *v
                }
                (None, Some(_)) => {
                    vertices.push(mesh.vertices[*v as usize]);
                    (vertices.len() - 1) as u32
                }
            };
            owner_of_root[root] = Some(label);
            *v = label;
        }
    }
    (vertices, triangles)
}

/// Disjoint sets with path halving.
struct UnionFind(Vec<usize>);

impl UnionFind {
    fn new(n: usize) -> Self {
        Self((0..n).collect())
    }

    fn find(&mut self, mut i: usize) -> usize {
        while self.0[i] != i {
            self.0[i] = self.0[self.0[i]];
            i = self.0[i];
        }
        i
    }

    fn union(&mut self, a: usize, b: usize) {
        let (ra, rb) = (self.find(a), self.find(b));
        if ra != rb {
            self.0[ra] = rb;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::wake::find_trailing_edges;
    use tuft_mesh::generate::{WingParams, wing_with_params};
    use tuft_mesh::{Mirrors, Vector};

    /// After the cut no panel of the upper surface touches one of the
    /// lower surface across the trailing edge, and the geometry is intact.
    #[test]
    fn trailing_edge_cut_separates_the_sides() {
        let w = wing_with_params(&WingParams {
            chord_panels: 8,
            span_panels: 6,
            ..WingParams::default()
        })
        .unwrap_or_else(|e| panic!("{e}"));
        let mesh = PanelMesh::new(w.mesh, Mirrors::none()).unwrap_or_else(|e| panic!("{e}"));
        let edges = find_trailing_edges(&mesh, &Vector::x());
        let cut = split_trailing_edges(&mesh, &edges).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(cut.panels, mesh.panels);
        for e in &edges {
            assert!(!cut.edge_neighbours[e.upper].contains(&Some(e.lower as u32)));
            assert!(!cut.edge_neighbours[e.lower].contains(&Some(e.upper as u32)));
        }
        // Interior trailing-edge vertices are doubled; the two tip ends are
        // not (the cut ends there).
        assert_eq!(cut.vertices.len(), mesh.vertices.len() + edges.len() - 1);
    }
}
