//! Sharp trailing edges: mesh edges where the flow must leave the body
//! smoothly (the Kutta condition) and a wake is shed.
//!
//! An edge between panels 1 and 2 is a trailing edge when
//!
//! 1. it is sharp: the outward normals are more than
//!    [`DetectParams::min_normal_angle_deg`] apart (120 degrees by default,
//!    i.e. a wedge of interior angle below 60 degrees; a NACA 0012 trailing
//!    edge, about 16 degrees, passes with room to spare, while the 90-degree
//!    corners of a box or a wing tip do not), and
//! 2. the wedge points downstream: the apex direction `w` (from the mid
//!    point of the two centroids to the edge, perpendicular to the edge)
//!    makes less than [`DetectParams::max_apex_angle_deg`] (60 degrees) with
//!    the free stream.
//!
//! Rule 2 replaces the rough "both normals face downstream" test: it is the
//! bisector of the wedge, so it stays right for a wedge that is tilted (a
//! deflected flap, a wing at incidence, a spoiler lip) and for a wedge of
//! zero thickness, where the two normals are opposite and say nothing about
//! the direction. It rejects sharp leading edges (apex upstream) and sharp
//! side edges parallel to the stream (apex across the stream: those are
//! tips, where a Kutta condition does not apply). It also implies the edge
//! is at least 60 degrees from the stream, so the wake panel has area.
//!
//! Katz & Plotkin (2001), sec. 9.3 and 12.3: the Kutta condition is applied
//! at the sharp trailing edge of lifting bodies.

use tuft_mesh::{PanelMesh, Vector};

use super::WakeError;

/// Settings of the trailing-edge search.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DetectParams {
    /// Smallest angle between the two outward normals, degrees.
    pub min_normal_angle_deg: f64,
    /// Largest angle between the wedge apex direction and the free stream,
    /// degrees.
    pub max_apex_angle_deg: f64,
}

impl Default for DetectParams {
    fn default() -> Self {
        Self {
            min_normal_angle_deg: 120.0,
            max_apex_angle_deg: 60.0,
        }
    }
}

/// One trailing-edge edge, oriented for its wake.
///
/// `start -> end` is ordered so that the wake panel
/// `[start, end, end + L u, start + L u]` (`u` the free-stream direction)
/// has its normal `(end - start) x u` on the side of the `upper` panel;
/// the wake strength is then `mu_upper - mu_lower`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct TrailingEdge {
    /// Vertex where the edge starts.
    pub start: u32,
    /// Vertex where the edge ends.
    pub end: u32,
    /// Panel on the side the wake normal points to.
    pub upper: usize,
    /// Panel on the other side.
    pub lower: usize,
}

/// Every sharp trailing edge of `mesh` for a free stream along `stream`
/// (any length), with default settings. Edges on mirror planes (open
/// edges) are never trailing edges: their images close the body there.
pub fn find_trailing_edges(mesh: &PanelMesh, stream: &Vector) -> Vec<TrailingEdge> {
    find_trailing_edges_with_params(mesh, stream, &DetectParams::default())
}

/// [`find_trailing_edges`] with explicit settings.
pub fn find_trailing_edges_with_params(
    mesh: &PanelMesh,
    stream: &Vector,
    params: &DetectParams,
) -> Vec<TrailingEdge> {
    let u = stream.normalize();
    let cos_normals = params.min_normal_angle_deg.to_radians().cos();
    let cos_apex = params.max_apex_angle_deg.to_radians().cos();
    let mut out = Vec::new();
    for (t, tri) in mesh.triangles.iter().enumerate() {
        for k in 0..3 {
            let Some(other) = mesh.edge_neighbours[t][k].map(|o| o as usize) else {
                continue;
            };
            if other < t {
                continue;
            }
            let (a, b) = (tri[k], tri[(k + 1) % 3]);
            let (n1, n2) = (mesh.panels[t].normal, mesh.panels[other].normal);
            if n1.dot(&n2) < cos_normals && apex(mesh, a, b, t, other).dot(&u) > cos_apex {
                out.push(orient(mesh, a, b, t, other, &u));
            }
        }
    }
    out
}

/// Unit apex direction of the wedge formed by panels `p` and `q` at edge
/// `a-b`: from the mean of the centroids to the edge, perpendicular to it.
fn apex(mesh: &PanelMesh, a: u32, b: u32, p: usize, q: usize) -> Vector {
    let (va, vb) = (mesh.vertices[a as usize], mesh.vertices[b as usize]);
    let e = (vb - va).normalize();
    let mid = (mesh.panels[p].centroid.coords + mesh.panels[q].centroid.coords) / 2.0;
    let w = (va.coords + vb.coords) / 2.0 - mid;
    (w - e * w.dot(&e))
        .try_normalize(0.0)
        .unwrap_or_else(Vector::zeros)
}

/// Pick the upper panel (larger normal z, then y, component; any fixed
/// rule works since the wake strength follows the labels) and order the
/// edge so the wake normal points to it.
fn orient(mesh: &PanelMesh, a: u32, b: u32, p: usize, q: usize, u: &Vector) -> TrailingEdge {
    let (np, nq) = (mesh.panels[p].normal, mesh.panels[q].normal);
    let p_up = (np.z, np.y, np.x) >= (nq.z, nq.y, nq.x);
    let (upper, lower) = if p_up { (p, q) } else { (q, p) };
    let diff = mesh.panels[upper].normal.into_inner() - mesh.panels[lower].normal.into_inner();
    edge_facing(mesh, [a, b], (upper, lower), &diff, u)
}

/// The edge `a`-`b` between panels `upper` and `lower`, directed so that
/// `edge x u` points along `side` (the side the wake normal must face).
pub(crate) fn edge_facing(
    mesh: &PanelMesh,
    [a, b]: [u32; 2],
    (upper, lower): (usize, usize),
    side: &Vector,
    u: &Vector,
) -> TrailingEdge {
    let e = mesh.vertices[b as usize] - mesh.vertices[a as usize];
    let (start, end) = if e.cross(u).dot(side) >= 0.0 {
        (a, b)
    } else {
        (b, a)
    };
    TrailingEdge {
        start,
        end,
        upper,
        lower,
    }
}

/// Trailing edges named by the caller as vertex pairs (in any order).
///
/// # Errors
/// [`WakeError::EdgeNotFound`] for a pair that is not a mesh edge,
/// [`WakeError::OpenEdge`] for an edge with one panel only,
/// [`WakeError::EdgeAlongStream`] for an edge within a degree of the
/// stream direction.
pub fn trailing_edges_from_list(
    mesh: &PanelMesh,
    edges: &[[u32; 2]],
    stream: &Vector,
) -> Result<Vec<TrailingEdge>, WakeError> {
    let u = stream.normalize();
    edges
        .iter()
        .map(|&[a, b]| {
            let (p, q) = edge_panels(mesh, a, b)?;
            let e = (mesh.vertices[b as usize] - mesh.vertices[a as usize]).normalize();
            if e.cross(&u).norm() < 1f64.to_radians().sin() {
                return Err(WakeError::EdgeAlongStream { start: a, end: b });
            }
            Ok(orient(mesh, a, b, p, q, &u))
        })
        .collect()
}

/// The two panels on edge `a-b`.
fn edge_panels(mesh: &PanelMesh, a: u32, b: u32) -> Result<(usize, usize), WakeError> {
    let found = mesh.vertex_panels.get(a as usize).and_then(|ps| {
        ps.iter().find_map(|&t| {
            let tri = mesh.triangles[t as usize];
            (0..3).find_map(|k| {
                let (x, y) = (tri[k], tri[(k + 1) % 3]);
                ((x, y) == (a, b) || (x, y) == (b, a))
                    .then_some((t as usize, mesh.edge_neighbours[t as usize][k]))
            })
        })
    });
    match found {
        None => Err(WakeError::EdgeNotFound { start: a, end: b }),
        Some((_, None)) => Err(WakeError::OpenEdge { start: a, end: b }),
        Some((t, Some(o))) => Ok((t, o as usize)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use tuft_mesh::generate::{WingParams, icosphere, wing_with_params};
    use tuft_mesh::{Mirrors, PanelMesh};

    fn wing_mesh() -> (PanelMesh, Vec<[u32; 2]>) {
        let w = wing_with_params(&WingParams {
            alpha_deg: 5.0,
            chord_panels: 8,
            span_panels: 6,
            ..WingParams::default()
        })
        .unwrap_or_else(|e| panic!("{e}"));
        let mesh = PanelMesh::new(w.mesh, Mirrors::none()).unwrap_or_else(|e| panic!("{e}"));
        (mesh, w.trailing_edge)
    }

    /// A smooth closed body has no sharp edge at all.
    #[test]
    fn sphere_has_no_trailing_edge() {
        let mesh =
            PanelMesh::new(icosphere(1.0, 2), Mirrors::none()).unwrap_or_else(|e| panic!("{e}"));
        assert!(find_trailing_edges(&mesh, &Vector::x()).is_empty());
    }

    /// The wing's trailing edge is found (and nothing else: the 90-degree
    /// tips are not sharp enough); seen from behind (stream along -x) the
    /// same edge is a sharp leading edge and is rejected by the apex rule.
    #[test]
    fn wing_trailing_edge_found_and_oriented() {
        let (mesh, te) = wing_mesh();
        let found = find_trailing_edges(&mesh, &Vector::x());
        assert_eq!(found.len(), te.len());
        for e in &found {
            let key = [e.start.min(e.end), e.start.max(e.end)];
            assert!(te.iter().any(|&[a, b]| [a.min(b), a.max(b)] == key));
            // Upper panel on top, wake normal (end - start) x e_x upwards.
            assert!(mesh.panels[e.upper].normal.z > 0.0);
            let d = mesh.vertices[e.end as usize] - mesh.vertices[e.start as usize];
            assert!(d.cross(&Vector::x()).z > 0.0);
        }
        assert!(find_trailing_edges(&mesh, &-Vector::x()).is_empty());
    }

    /// Named edges: same orientation as the search; bad names are typed
    /// errors naming the edge.
    #[test]
    fn named_edges() {
        let (mesh, te) = wing_mesh();
        let named =
            trailing_edges_from_list(&mesh, &te, &Vector::x()).unwrap_or_else(|e| panic!("{e}"));
        let found = find_trailing_edges(&mesh, &Vector::x());
        for e in &named {
            assert!(found.contains(e));
        }
        let [a, _] = te[0];
        assert!(matches!(
            trailing_edges_from_list(&mesh, &[[a, a]], &Vector::x()),
            Err(WakeError::EdgeNotFound { .. })
        ));
    }
}
