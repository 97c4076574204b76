//! Separation lines that shed a wake: the perimeter of a bluff base and the
//! upstream boundary of a separated region.
//!
//! Each line is a list of mesh edges, oriented as [`TrailingEdge`]s so the
//! Kutta wake of [`super::kutta`] can be shed from them unchanged: the
//! `upper` panel is the one on the attached (upstream) side, the `lower`
//! panel the one on the separated (downstream) side, and the wake strength
//! is `mu_upper - mu_lower`, so the potential jump across the sheet equals
//! the jump between the attached and the separated side and the flow leaves
//! the line smoothly (the Kutta condition of Katz & Plotkin, 2001, sec. 9.3
//! and eq. 12.15, applied at a separation line as in the free-streamline
//! wake models reviewed by Hoerner, *Fluid-Dynamic Drag*, 1965, ch. 3).
//! The wake normal `(end - start) x u` points to the outer flow, taken as
//! the sum of the two outward normals (the difference used at a thin
//! trailing edge vanishes on a smooth surface).

use std::collections::HashSet;

use tuft_mesh::{PanelMesh, Vector};

use super::TrailingEdge;
use crate::boundary_layer::FlowState;

/// Settings of the separation-line search.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SeparationLineParams {
    /// A panel faces downstream (belongs to a base) when its outward normal
    /// is within this many degrees of the free stream. Default 45.
    pub base_normal_deg: f64,
    /// A base edge is convex with the outward normals at least this many
    /// degrees apart. Default 45 (a bluff base meets the sides at about 90).
    pub base_edge_deg: f64,
    /// Edges within this many degrees of the free stream shed no sheet (the
    /// sheet would have next to no area). Default 30.
    pub min_stream_angle_deg: f64,
    /// A separation line (not a base edge) sheds a sheet only where the
    /// outward normals of its two panels are less than this many degrees
    /// apart: a sheet from a side edge of a slant runs in the plane of the
    /// side wall, where the panel influence is ill-defined. Default 60.
    pub max_line_fold_deg: f64,
}

impl Default for SeparationLineParams {
    fn default() -> Self {
        Self {
            base_normal_deg: 45.0,
            base_edge_deg: 45.0,
            min_stream_angle_deg: 30.0,
            max_line_fold_deg: 60.0,
        }
    }
}

/// Every edge of `mesh` that is a pair `(t, o)` of neighbouring panels,
/// once each (`t < o`), with its two vertices.
fn interior_edges(mesh: &PanelMesh) -> impl Iterator<Item = (usize, usize, u32, u32)> + '_ {
    mesh.triangles.iter().enumerate().flat_map(move |(t, tri)| {
        (0..3).filter_map(move |k| {
            let o = mesh.edge_neighbours[t][k]? as usize;
            (o > t).then_some((t, o, tri[k], tri[(k + 1) % 3]))
        })
    })
}

/// True when panel `p` faces downstream (a base panel).
fn faces_downstream(mesh: &PanelMesh, p: usize, u: &Vector, params: &SeparationLineParams) -> bool {
    mesh.panels[p].normal.dot(u) > params.base_normal_deg.to_radians().cos()
}

/// True when edge `a-b` is convex between panels `p` and `q`: each
/// centroid lies behind the other panel's plane.
fn convex(mesh: &PanelMesh, p: usize, q: usize) -> bool {
    let (pp, pq) = (&mesh.panels[p], &mesh.panels[q]);
    (pq.centroid - pp.centroid).dot(&pp.normal) < 0.0
        && (pp.centroid - pq.centroid).dot(&pq.normal) < 0.0
}

/// True when edge `a-b` makes at least the set angle with the stream.
fn across_stream(mesh: &PanelMesh, a: u32, b: u32, u: &Vector, min_deg: f64) -> bool {
    let e = mesh.vertices[b as usize] - mesh.vertices[a as usize];
    e.normalize().cross(u).norm() >= min_deg.to_radians().sin()
}

/// Orient edge `a-b` for a sheet with `upper` on the attached side: the
/// wake normal `(end - start) x u` along the sum of the outward normals.
pub fn oriented(
    mesh: &PanelMesh,
    a: u32,
    b: u32,
    upper: usize,
    lower: usize,
    u: &Vector,
) -> TrailingEdge {
    let out = mesh.panels[upper].normal.into_inner() + mesh.panels[lower].normal.into_inner();
    super::detect::edge_facing(mesh, [a, b], (upper, lower), &out, u)
}

/// The perimeter of every bluff base: sharp convex edges between a
/// downstream-facing panel and a neighbour that does not face downstream,
/// the neighbour upper, the base panel lower. Edges on mirror planes (open
/// edges) are skipped: their images close the perimeter.
pub fn base_edges(
    mesh: &PanelMesh,
    stream: &Vector,
    params: &SeparationLineParams,
) -> Vec<TrailingEdge> {
    let u = stream.normalize();
    let cos_edge = params.base_edge_deg.to_radians().cos();
    interior_edges(mesh)
        .filter_map(|(t, o, a, b)| {
            let (bt, bo) = (
                faces_downstream(mesh, t, &u, params),
                faces_downstream(mesh, o, &u, params),
            );
            let sharp = mesh.panels[t].normal.dot(&mesh.panels[o].normal) < cos_edge;
            if bt == bo || !sharp || !convex(mesh, t, o) {
                return None;
            }
            let (upper, lower) = if bt { (o, t) } else { (t, o) };
            across_stream(mesh, a, b, &u, params.min_stream_angle_deg)
                .then(|| oriented(mesh, a, b, upper, lower, &u))
        })
        .collect()
}

/// The upstream boundary of the separated regions of `states`: edges
/// between an attached panel (laminar or turbulent) and a separated one
/// where the attached panel's flow `velocity` runs towards the separated
/// one, at least [`SeparationLineParams::min_stream_angle_deg`] across the
/// stream, folded by less than [`SeparationLineParams::max_line_fold_deg`],
/// and not between two base panels. Edges in `skip` (vertex pairs
/// in either order, e.g. the base perimeter) are left out.
pub fn separation_edges(
    mesh: &PanelMesh,
    states: &[FlowState],
    velocity: &[Vector],
    stream: &Vector,
    skip: &[TrailingEdge],
    params: &SeparationLineParams,
) -> Vec<TrailingEdge> {
    let u = stream.normalize();
    let taken: HashSet<(u32, u32)> = skip
        .iter()
        .map(|e| (e.start.min(e.end), e.start.max(e.end)))
        .collect();
    let attached = |p: usize| matches!(states[p], FlowState::Laminar | FlowState::Turbulent);
    interior_edges(mesh)
        .filter_map(|(t, o, a, b)| {
            let (up, down) = match (states[t], states[o]) {
                (_, FlowState::Separated) if attached(t) => (t, o),
                (FlowState::Separated, _) if attached(o) => (o, t),
                _ => return None,
            };
            let towards =
                (mesh.panels[down].centroid - mesh.panels[up].centroid).dot(&velocity[up]);
            let both_base =
                faces_downstream(mesh, t, &u, params) && faces_downstream(mesh, o, &u, params);
            let fold = mesh.panels[t].normal.dot(&mesh.panels[o].normal)
                > params.max_line_fold_deg.to_radians().cos();
            let ok = towards > 0.0
                && fold
                && !both_base
                && !taken.contains(&(a.min(b), a.max(b)))
                && across_stream(mesh, a, b, &u, params.min_stream_angle_deg);
            ok.then(|| oriented(mesh, a, b, up, down, &u))
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use tuft_mesh::generate::{AhmedParams, ahmed_with_params, icosphere};
    use tuft_mesh::{Mirrors, PanelMesh};

    /// A sphere has no base; a square-back body's base perimeter is found
    /// whole (its edges span the base outline: twice the width plus twice
    /// the height), each sheet's normal pointing away from the base.
    #[test]
    fn base_perimeter() {
        let sphere =
            PanelMesh::new(icosphere(1.0, 2), Mirrors::none()).unwrap_or_else(|e| panic!("{e}"));
        let p = SeparationLineParams::default();
        assert!(base_edges(&sphere, &Vector::x(), &p).is_empty());
        let a = AhmedParams {
            slant_deg: 0.0,
            panels: 1500,
            ..AhmedParams::default()
        };
        let body = ahmed_with_params(&a).unwrap_or_else(|e| panic!("{e}"));
        let mesh = PanelMesh::new(body, Mirrors::none()).unwrap_or_else(|e| panic!("{e}"));
        let edges = base_edges(&mesh, &Vector::x(), &p);
        let length: f64 = edges
            .iter()
            .map(|e| (mesh.vertices[e.end as usize] - mesh.vertices[e.start as usize]).norm())
            .sum();
        let perimeter = 2.0 * (a.width + a.height);
        assert!(
            (length - perimeter).abs() < 0.02 * perimeter,
            "{length} vs {perimeter}"
        );
        for e in &edges {
            assert!(mesh.panels[e.lower].normal.x > 0.7);
            let d = mesh.vertices[e.end as usize] - mesh.vertices[e.start as usize];
            let n = d.cross(&Vector::x());
            assert!(n.dot(&mesh.panels[e.upper].normal) > 0.0);
        }
    }
}
