//! Boundary loops and non-manifold edges; small holes filled.
//!
//! An edge used by one facet is a boundary edge; chained head to tail they
//! make boundary loops. Each loop is, in this order:
//! 1. closed by a mirror: every edge on a declared plane (the image
//!    body supplies the other side), left open;
//! 2. a slit: it encloses (numerically) no area, `|A| < ratio * P^2`, as
//!    after a T-junction or a removed cap sliver; zero width leaks nothing,
//!    so it is left open and reported;
//! 3. a small hole, perimeter at most the fill limit: filled with a fan of
//!    triangles from its length-weighted centre (a single triangle for a
//!    three-edge loop), oriented against the loop so that the fill agrees
//!    with its neighbours;
//! 4. otherwise refused with [`MeshError::OpenHole`].
//!
//! Edges used by three or more facets are counted as non-manifold and left.

use serde::Serialize;

use super::edges::{EdgeUse, edge_groups, sorted_edge_uses};
use crate::fasthash::FastMap;
use crate::{MeshError, Mirrors, Point, TriMesh, Vector};

/// One boundary loop, as reported.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LoopInfo {
    /// Length-weighted centre, metres.
    pub centre: [f64; 3],
    /// Perimeter, metres.
    pub perimeter: f64,
    /// Edges around the loop.
    pub edges: usize,
    /// The mirror plane(s) that close it, if any (`"ground"`, `"symmetry"`
    /// or `"ground and symmetry"`).
    pub plane: Option<&'static str>,
}

/// What the boundary pass found and changed.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct HoleReport {
    /// Boundary loops found.
    pub loops: usize,
    /// Loops closed by a declared mirror plane.
    pub mirror_closed: Vec<LoopInfo>,
    /// Loops enclosing no area (left open, harmless).
    pub slits: usize,
    /// Small holes filled.
    pub filled: Vec<LoopInfo>,
    /// Facets added by filling.
    pub facets_added: usize,
    /// Edges shared by three or more facets.
    pub non_manifold_edges: usize,
    /// The fill limit on perimeter, metres.
    pub fill_limit: f64,
}

/// Settings of the boundary pass (lengths in metres).
#[derive(Debug, Clone, Copy)]
pub struct HoleSettings {
    /// Mirror planes that may close a loop.
    pub mirrors: Mirrors,
    /// How far from a plane a vertex may lie and still count as on it.
    pub plane_tolerance: f64,
    /// Largest perimeter filled.
    pub fill_limit: f64,
    /// A loop with `|A| < slit_ratio * P^2` is a slit.
    pub slit_ratio: f64,
}

/// A directed boundary edge `from -> to`, as its facet runs it.
#[derive(Debug, Clone, Copy)]
struct HalfEdge {
    from: u32,
    to: u32,
    facet: u32,
}

/// Find loops, fill the small ones; `component` gets an entry per added facet.
///
/// # Errors
/// [`MeshError::OpenHole`] naming the largest loop that can be neither
/// filled nor closed by a mirror.
pub fn close_holes(
    mesh: &mut TriMesh,
    component: &mut Vec<u32>,
    s: &HoleSettings,
) -> Result<HoleReport, MeshError> {
    let uses = sorted_edge_uses(&mesh.triangles);
    close_holes_with_uses(mesh, component, s, &uses)
}

/// As [`close_holes`], given the sorted edge uses of the current facets.
pub(crate) fn close_holes_with_uses(
    mesh: &mut TriMesh,
    component: &mut Vec<u32>,
    s: &HoleSettings,
    uses: &[EdgeUse],
) -> Result<HoleReport, MeshError> {
    let (half, non_manifold) = boundary_half_edges(&mesh.triangles, uses);
    let loops = chain_loops(&half);
    let mut report = HoleReport {
        loops: loops.len(),
        non_manifold_edges: non_manifold,
        fill_limit: s.fill_limit,
        ..HoleReport::default()
    };
    let mut refused: Vec<(usize, LoopInfo)> = Vec::new();
    for (index, (edges, closed)) in loops.iter().enumerate() {
        let mut info = describe(&mesh.vertices, &half, edges);
        info.plane = on_plane(&mesh.vertices, &half, edges, s);
        if info.plane.is_some() {
            report.mirror_closed.push(info);
        } else if *closed && is_slit(&mesh.vertices, &half, edges, &info, s.slit_ratio) {
            report.slits += 1;
        } else if *closed && info.perimeter <= s.fill_limit {
            report.facets_added += fill(mesh, component, &half, edges, &info);
            report.filled.push(info);
        } else {
            refused.push((index, info));
        }
    }
    refuse(refused, s.fill_limit)?;
    Ok(report)
}

fn refuse(mut refused: Vec<(usize, LoopInfo)>, limit: f64) -> Result<(), MeshError> {
    refused.sort_by(|a, b| b.1.perimeter.total_cmp(&a.1.perimeter));
    match refused.first() {
        None => Ok(()),
        Some((loop_index, info)) => Err(MeshError::OpenHole {
            loop_index: *loop_index,
            edges: info.edges,
            centre: info.centre,
            perimeter: info.perimeter,
            limit,
            refused: refused.len(),
        }),
    }
}

/// Boundary half-edges and the number of non-manifold edges.
/// The direction is read from the facet as it is now (an earlier pass may
/// have flipped it since the uses were sorted).
fn boundary_half_edges(triangles: &[[u32; 3]], uses: &[EdgeUse]) -> (Vec<HalfEdge>, usize) {
    let mut half = Vec::new();
    let mut non_manifold = 0;
    for group in edge_groups(uses) {
        match group {
            [u] => {
                let t = triangles[u.facet as usize];
                let (a, b) = u.ends();
                let runs_ab = (0..3).any(|k| t[k] == a && t[(k + 1) % 3] == b);
                let (from, to) = if runs_ab { (a, b) } else { (b, a) };
                half.push(HalfEdge {
                    from,
                    to,
                    facet: u.facet,
                });
            }
            [_, _] => {}
            _ => non_manifold += 1,
        }
    }
    (half, non_manifold)
}

/// Chain half-edges head to tail; each loop with a flag saying whether it
/// came back to its start.
fn chain_loops(half: &[HalfEdge]) -> Vec<(Vec<usize>, bool)> {
    let mut outgoing: FastMap<u32, Vec<usize>> = FastMap::default();
    for (i, h) in half.iter().enumerate() {
        outgoing.entry(h.from).or_default().push(i);
    }
    let mut used = vec![false; half.len()];
    let mut loops = Vec::new();
    for start in 0..half.len() {
        if used[start] {
            continue;
        }
        used[start] = true;
        let mut edges = vec![start];
        let mut at = half[start].to;
        let mut closed = true;
        while at != half[start].from {
            let next = outgoing
                .get(&at)
                .and_then(|l| l.iter().copied().find(|&e| !used[e]));
            let Some(e) = next else {
                closed = false;
                break;
            };
            used[e] = true;
            edges.push(e);
            at = half[e].to;
        }
        loops.push((edges, closed));
    }
    loops
}

fn describe(vertices: &[Point], half: &[HalfEdge], edges: &[usize]) -> LoopInfo {
    let mut perimeter = 0.0;
    let mut weighted = Vector::zeros();
    for &e in edges {
        let (a, b) = ends(vertices, &half[e]);
        let len = (b - a).norm();
        perimeter += len;
        weighted += (a.coords + b.coords) * (0.5 * len);
    }
    let centre = if perimeter > 0.0 {
        weighted / perimeter
    } else {
        vertices[half[edges[0]].from as usize].coords
    };
    LoopInfo {
        centre: [centre.x, centre.y, centre.z],
        perimeter,
        edges: edges.len(),
        plane: None,
    }
}

fn ends(vertices: &[Point], h: &HalfEdge) -> (Point, Point) {
    (vertices[h.from as usize], vertices[h.to as usize])
}

/// The plane(s) closing a loop: every edge must lie on a declared plane
/// (both ends within the tolerance). A half model standing on the ground
/// has loops with edges on both planes.
fn on_plane(
    vertices: &[Point],
    half: &[HalfEdge],
    edges: &[usize],
    s: &HoleSettings,
) -> Option<&'static str> {
    let tol = s.plane_tolerance;
    let on_ground = |p: &Point| s.mirrors.ground.is_some_and(|h| (p.z - h).abs() <= tol);
    let on_sym = |p: &Point| s.mirrors.symmetry && p.y.abs() <= tol;
    let (mut ground, mut sym) = (false, false);
    for &e in edges {
        let (a, b) = ends(vertices, &half[e]);
        if on_ground(&a) && on_ground(&b) {
            ground = true;
        } else if on_sym(&a) && on_sym(&b) {
            sym = true;
        } else {
            return None;
        }
    }
    match (ground, sym) {
        (true, true) => Some("ground and symmetry"),
        (true, false) => Some("ground"),
        (false, true) => Some("symmetry"),
        (false, false) => None,
    }
}

/// Vector area `1/2 sum (a - c) x (b - c)` against the perimeter squared.
fn is_slit(
    vertices: &[Point],
    half: &[HalfEdge],
    edges: &[usize],
    info: &LoopInfo,
    ratio: f64,
) -> bool {
    let c = Point::from(info.centre);
    let area: Vector = edges
        .iter()
        .map(|&e| {
            let (a, b) = ends(vertices, &half[e]);
            (a - c).cross(&(b - c)) * 0.5
        })
        .sum();
    area.norm() < ratio * info.perimeter * info.perimeter
}

/// Fill one closed loop; returns the number of facets added.
fn fill(
    mesh: &mut TriMesh,
    component: &mut Vec<u32>,
    half: &[HalfEdge],
    edges: &[usize],
    info: &LoopInfo,
) -> usize {
    let part = component[half[edges[0]].facet as usize];
    let before = mesh.triangles.len();
    if let [e0, e1, _] = edges {
        let (a, b, c) = (half[*e0].from, half[*e0].to, half[*e1].to);
        mesh.triangles.push([a, c, b]);
    } else {
        let centre = mesh.vertices.len() as u32;
        mesh.vertices.push(Point::from(info.centre));
        for &e in edges {
            mesh.triangles.push([half[e].to, half[e].from, centre]);
        }
    }
    let added = mesh.triangles.len() - before;
    component.extend(std::iter::repeat_n(part, added));
    added
}
