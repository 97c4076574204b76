//! Test helpers: the properties every generated mesh must have.

use std::collections::HashMap;

use crate::TriMesh;

/// Weight of sample `k` of `0..=n` (n even) in Simpson's rule: 1, 4, 2,
/// ..., 4, 1 (multiply the weighted sum by `h / 3`).
pub(crate) fn simpson_weight(k: usize, n: usize) -> f64 {
    if k == 0 || k == n {
        1.0
    } else if k % 2 == 1 {
        4.0
    } else {
        2.0
    }
}

/// Directed edge counts of a mesh.
fn directed_edges(m: &TriMesh) -> HashMap<(u32, u32), usize> {
    let mut edges = HashMap::new();
    for t in &m.triangles {
        for k in 0..3 {
            *edges.entry((t[k], t[(k + 1) % 3])).or_insert(0) += 1;
        }
    }
    edges
}

/// Every edge is used once in each direction (closed, consistently
/// oriented, manifold) and the enclosed volume is positive (outward).
#[track_caller]
pub(crate) fn closed_outward(m: &TriMesh) {
    let edges = directed_edges(m);
    for (&(a, b), &n) in &edges {
        assert_eq!(n, 1, "edge {a}-{b} used {n} times in one direction");
        assert_eq!(edges.get(&(b, a)), Some(&1), "edge {a}-{b} has no twin");
    }
    assert!(m.signed_volume() > 0.0, "volume {}", m.signed_volume());
}

/// Half model: consistently oriented, every open edge lies on y = 0
/// exactly, every vertex has y >= 0.
#[track_caller]
pub(crate) fn half_open_on_symmetry_plane(m: &TriMesh) {
    let edges = directed_edges(m);
    let mut open = 0;
    for (&(a, b), &n) in &edges {
        assert_eq!(n, 1, "edge {a}-{b} used {n} times in one direction");
        if !edges.contains_key(&(b, a)) {
            open += 1;
            for v in [a, b] {
                let y = m.vertices[v as usize].y;
                assert!(y == 0.0, "open edge {a}-{b} off y = 0 (y = {y})");
            }
        }
    }
    assert!(open > 0, "a half model has an open boundary");
    assert!(m.vertices.iter().all(|p| p.y >= 0.0));
}

/// Smallest interior angle of any triangle, degrees.
pub(crate) fn min_angle_deg(m: &TriMesh) -> f64 {
    (0..m.len())
        .flat_map(|t| {
            let p = m.corners(t);
            (0..3).map(move |k| {
                let (a, b, c) = (p[k], p[(k + 1) % 3], p[(k + 2) % 3]);
                (b - a).angle(&(c - a)).to_degrees()
            })
        })
        .fold(f64::INFINITY, f64::min)
}

/// No triangle has an angle below `bound` degrees.
#[track_caller]
pub(crate) fn min_angle_above(m: &TriMesh, bound: f64) {
    let a = min_angle_deg(m);
    assert!(a > bound, "smallest angle {a:.2} deg, bound {bound}");
}
