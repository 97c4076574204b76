//! Facets that cross another facet: a surface that passes through itself.
//!
//! A closed, consistently oriented mesh can still be no body at all: a fan
//! of facets whose apex sits at the wrong end runs straight through the
//! inside and crosses the facets of the other end. Edge matching cannot see
//! that; only geometry can. Two facets that share no vertex cross when an
//! edge of one pierces the inside of the other (for two triangles in general
//! position the intersection segment ends on such edges: Moller 1997, "A
//! fast triangle-triangle intersection test", J. Graphics Tools 2(2), from
//! memory); an edge through the border of the other facet counts too, since
//! on a surface that does not pass through itself two facets sharing no
//! vertex do not meet at all. An edge that only rests on the other facet's
//! plane, coplanar overlap, and facets sharing a vertex are not counted.
//!
//! Candidate pairs come from a uniform grid ([`SurfaceGrid`]), and each pair
//! is tested once, in the cell holding the low corner of the overlap of
//! their bounding boxes, so the cost grows about linearly with the facet
//! count for a surface whose facets are of similar size.

use rayon::prelude::*;
use serde::Serialize;

use crate::distance::SurfaceGrid;
use crate::{Point, TriMesh, Vector};

/// Two facets that cross each other.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Crossing {
    /// The facet whose edge pierces the other (or is pierced by it).
    pub facet: usize,
    /// The other facet.
    pub other: usize,
    /// Where an edge pierces, metres.
    pub point: [f64; 3],
    /// Both facets belong to the same connected surface (a body passing
    /// through itself, not two bodies overlapping).
    pub same_surface: bool,
}

/// Every pair of crossing facets, sorted by facet index (the cells are
/// searched in parallel; the result does not depend on the thread count).
pub fn crossings(mesh: &TriMesh) -> Vec<Crossing> {
    let Some((lo, hi)) = mesh.bounds() else {
        return Vec::new();
    };
    let grid = SurfaceGrid::new(mesh, lo, hi);
    let boxes: Vec<(Point, Point)> = (0..mesh.len()).map(|t| mesh.facet_box(t)).collect();
    let surface = surfaces(mesh);
    let cells: Vec<(usize, &[u32])> = grid.cells().filter(|(_, ids)| ids.len() > 1).collect();
    let mut out: Vec<Crossing> = cells
        .par_iter()
        .flat_map_iter(|&(cell, ids)| {
            let mut found = Vec::new();
            for (k, &i) in ids.iter().enumerate() {
                for &j in &ids[k + 1..] {
                    let (i, j) = (i as usize, j as usize);
                    if !first_meeting(mesh, &grid, &boxes, cell, i, j) {
                        continue;
                    }
                    if let Some(p) = facets_cross(&mesh.corners(i), &mesh.corners(j)) {
                        found.push(Crossing {
                            facet: i.min(j),
                            other: i.max(j),
                            point: [p.x, p.y, p.z],
                            same_surface: surface[i] == surface[j],
                        });
                    }
                }
            }
            found
        })
        .collect();
    out.sort_by_key(|c| (c.facet, c.other));
    out
}

/// True when facets `i` and `j` share no vertex, their boxes overlap, and
/// `cell` holds the low corner of that overlap (so the pair is tested once).
fn first_meeting(
    mesh: &TriMesh,
    grid: &SurfaceGrid<'_>,
    boxes: &[(Point, Point)],
    cell: usize,
    i: usize,
    j: usize,
) -> bool {
    let (ti, tj) = (mesh.triangles[i], mesh.triangles[j]);
    if ti.iter().any(|v| tj.contains(v)) {
        return false;
    }
    let lo = boxes[i].0.sup(&boxes[j].0);
    let hi = boxes[i].1.inf(&boxes[j].1);
    (0..3).all(|k| lo[k] <= hi[k]) && grid.cell_of(&lo) == cell
}

/// A point where an edge of one triangle pierces the inside of the other.
pub fn facets_cross(p: &[Point; 3], q: &[Point; 3]) -> Option<Point> {
    (0..3)
        .find_map(|k| pierce(q, &p[k], &p[(k + 1) % 3]))
        .or_else(|| (0..3).find_map(|k| pierce(p, &q[k], &q[(k + 1) % 3])))
}

/// Where segment `s0`-`s1` passes through triangle `t`: its ends strictly
/// on opposite sides of the plane (by more than a relative 1e-9, so an end
/// resting on the plane is contact, not a crossing) and the crossing point
/// inside or on the border (barycentric coordinates at least -1e-9: an edge
/// through an edge of a facet it shares no vertex with is a crossing too,
/// as where two mirror-image fans meet).
fn pierce(t: &[Point; 3], s0: &Point, s1: &Point) -> Option<Point> {
    const REL: f64 = 1e-9;
    let [a, b, c] = t;
    let n: Vector = (b - a).cross(&(c - a));
    let nn = n.norm_squared();
    if nn == 0.0 {
        return None;
    }
    let length = [
        (b - a).norm(),
        (c - b).norm(),
        (a - c).norm(),
        (s1 - s0).norm(),
    ]
    .into_iter()
    .fold(0.0, f64::max);
    let tol = REL * length * nn.sqrt();
    let (d0, d1) = (n.dot(&(s0 - a)), n.dot(&(s1 - a)));
    if !((d0 > tol && d1 < -tol) || (d0 < -tol && d1 > tol)) {
        return None;
    }
    let x = s0 + (s1 - s0) * (d0 / (d0 - d1));
    let inside = [(a, b), (b, c), (c, a)]
        .iter()
        .all(|(u, v)| (*v - *u).cross(&(x - *u)).dot(&n) >= -REL * nn);
    inside.then_some(x)
}

/// A label per facet: facets joined through shared vertices share a label
/// (union-find with path halving; Tarjan 1975, "Efficiency of a good but
/// not linear set union algorithm", J. ACM 22(2)).
pub(crate) fn surfaces(mesh: &TriMesh) -> Vec<usize> {
    let mut parent: Vec<usize> = (0..mesh.vertices.len()).collect();
    let find = |parent: &mut Vec<usize>, mut v: usize| {
        while parent[v] != v {
            parent[v] = parent[parent[v]];
            v = parent[v];
        }
        v
    };
    for t in &mesh.triangles {
        let r0 = find(&mut parent, t[0] as usize);
        for &v in &t[1..] {
            let r = find(&mut parent, v as usize);
            parent[r] = r0;
        }
    }
    mesh.triangles
        .iter()
        .map(|t| find(&mut parent, t[0] as usize))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::generate;

    #[test]
    fn a_closed_sphere_has_no_crossing() {
        assert!(crossings(&generate::icosphere(1.0, 3)).is_empty());
        assert!(crossings(&generate::latlong_sphere(1.0, 24, 48)).is_empty());
    }

    #[test]
    fn an_edge_through_a_triangle_is_found_and_a_touch_is_not() {
        let t = [
            Point::new(0.0, 0.0, 0.0),
            Point::new(1.0, 0.0, 0.0),
            Point::new(0.0, 1.0, 0.0),
        ];
        let through = [
            Point::new(0.2, 0.2, -1.0),
            Point::new(0.2, 0.2, 1.0),
            Point::new(5.0, 5.0, 0.5),
        ];
        // The point found lies in both planes, z = 0 and x = y.
        let p = facets_cross(&t, &through).unwrap();
        assert!(p.z.abs() < 1e-15 && (p.x - p.y).abs() < 1e-15, "{p}");
        // Resting on the plane at one corner: contact, not a crossing.
        let touch = [
            Point::new(0.2, 0.2, 0.0),
            Point::new(0.3, 0.2, 1.0),
            Point::new(0.2, 0.3, 1.0),
        ];
        assert!(facets_cross(&t, &touch).is_none());
    }

    #[test]
    fn a_fan_moved_to_the_far_pole_crosses_the_other_fan() {
        // Give the nose pole's fan the tail pole's position and vice versa:
        // still closed and consistently oriented, but both fans now run
        // through the inside and cross each other near the centre.
        let mut m = generate::latlong_sphere(1.0, 12, 16);
        let last = m.vertices.len() - 1; // the poles are the first and last vertices
        m.vertices.swap(0, last);
        let found = crossings(&m);
        assert!(!found.is_empty() && found.iter().all(|c| c.same_surface));
        // Two disjoint spheres overlapping: crossings, but between surfaces.
        let mut two = generate::icosphere(1.0, 2);
        let other = generate::icosphere(1.0, 2);
        let n = two.vertices.len() as u32;
        two.vertices.extend(
            other
                .vertices
                .iter()
                .map(|p| p + Vector::new(1.0, 0.1, 0.05)),
        );
        two.triangles
            .extend(other.triangles.iter().map(|t| t.map(|v| v + n)));
        let found = crossings(&two);
        assert!(!found.is_empty() && found.iter().all(|c| !c.same_surface));
    }
}
