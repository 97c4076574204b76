//! Halving a whole body at its symmetry plane `y = 0`, so that a whole scan
//! or surface of a symmetric body can run as a half model (half the panels,
//! a quarter of the memory, and a flow that is mirror-symmetric by
//! construction).
//!
//! The facets are clipped against the plane: a facet wholly on `y >= 0` is
//! kept, one wholly below is dropped, and one across is cut along the plane
//! into one or two triangles, with one new vertex per crossed edge (shared
//! by the two facets of that edge, so the surface stays connected). The
//! cut leaves an open border on `y = 0`, which the symmetry plane's image
//! closes, as for a half model exported cut.

use std::collections::HashMap;

use serde::Serialize;

use crate::distance::SurfaceGrid;
use crate::repair::remove_unused_vertices;
use crate::{MeshError, Point, TriMesh};

/// Share of the body's width each side of `y = 0` must reach for the body
/// to count as whole (a half model lies on one side, up to the few
/// millimetres of a rough cut; our choice).
pub const WHOLE_SIDE_SHARE: f64 = 0.25;

/// Largest offset of the body's centre (the middle of its extent in y)
/// from `y = 0`, as a share of its width, for a whole body to be cut
/// there: beyond it the plane is not the body's symmetry plane (our
/// choice: 2 %, about 36 mm on a 1.8 m wide car).
pub const CENTRE_TOLERANCE: f64 = 0.02;

/// True when a body spanning `y_min` to `y_max` has its centre within
/// [`CENTRE_TOLERANCE`] of its width of `y = 0` (and some width).
pub fn centred(y_min: f64, y_max: f64) -> bool {
    let width = y_max - y_min;
    width > 0.0 && 0.5 * (y_max + y_min).abs() <= CENTRE_TOLERANCE * width
}

/// Most vertices of the dropped half whose distance from the kept half's
/// mirror image is measured (evenly spread); the measure is a report, so a
/// sample keeps it to a fraction of a second on a scan of millions of
/// facets.
const DIFFERENCE_SAMPLES: usize = 20_000;

/// What halving a whole body did.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct HalfCut {
    /// Facets of the whole body.
    pub facets_before: usize,
    /// Facets kept whole (on `y >= 0`).
    pub facets_kept: usize,
    /// Facets across the plane, cut along it.
    pub facets_split: usize,
    /// The body's extent in y before the cut, metres.
    pub y_range: [f64; 2],
    /// The whole body's bounding-box diagonal, metres.
    pub diagonal: f64,
    /// Largest distance of a (sampled) vertex of either half, mirrored
    /// onto the other side, from the other half: how far the body is from
    /// symmetric, metres.
    pub largest_difference: f64,
    /// Where that vertex lies once mirrored, metres.
    pub largest_difference_at: [f64; 3],
}

/// Halves that differ by more than this share of the body's diagonal
/// (about 50 mm on a car) make a half model of it a different body: the
/// run warns, and `tuft check` advises running it whole (our choice).
pub const ASYMMETRY_SHARE: f64 = 0.01;

impl HalfCut {
    /// The halves differ by more than [`ASYMMETRY_SHARE`] of the diagonal.
    pub fn differs(&self) -> bool {
        self.largest_difference > ASYMMETRY_SHARE * self.diagonal
    }

    /// One sentence for reports.
    pub fn describe(&self) -> String {
        let [x, y, z] = self.largest_difference_at;
        let differ = if self.largest_difference < 0.5e-3 {
            "the two halves are mirror images to half a millimetre".to_string()
        } else {
            format!(
                "the two halves differ by up to {:.1} mm (near x {x:.3}, y {y:.3}, z {z:.3} m on the kept \
                 side)",
                1000.0 * self.largest_difference
            )
        };
        format!(
            "whole body (y {:.3} to {:.3} m) cut at y = 0 and its y >= 0 half run mirrored: {} of its {} \
             facets kept whole, {} cut along the plane; {differ}",
            self.y_range[0],
            self.y_range[1],
            self.facets_kept,
            self.facets_before,
            self.facets_split,
        )
    }
}

/// Cut a whole body at `y = 0` and keep its `y >= 0` half; `Ok(None)` when
/// the body is not whole (it reaches less than [`WHOLE_SIDE_SHARE`] of its
/// width to one side: a half model, cut or not quite).
///
/// # Errors
/// [`MeshError::NotCentred`] when the body is whole but its centre lies
/// more than [`CENTRE_TOLERANCE`] of its width off `y = 0`.
pub fn keep_right_half(mesh: &TriMesh) -> Result<Option<(TriMesh, HalfCut)>, MeshError> {
    let Some((lo, hi)) = mesh.bounds() else {
        return Ok(None);
    };
    let width = hi.y - lo.y;
    if width <= 0.0 || -lo.y < WHOLE_SIDE_SHARE * width || hi.y < WHOLE_SIDE_SHARE * width {
        return Ok(None);
    }
    if !centred(lo.y, hi.y) {
        return Err(MeshError::NotCentred {
            y_min: lo.y,
            y_max: hi.y,
        });
    }
    let snap = 1e-9 * (hi - lo).norm();
    let (half, kept, split) = clip_right(mesh, snap)?;
    // The other half, mirrored onto y >= 0: a part on one side only (a
    // mirror, an open window) shows from either side.
    let mut mirrored = mesh.clone();
    mirrored.map_vertices(|p| Point::new(p.x, -p.y, p.z));
    let (other, _, _) = clip_right(&mirrored, snap)?;
    let (largest_difference, largest_difference_at) = [
        largest_difference(mesh, &half),
        largest_difference(&mirrored, &other),
    ]
    .into_iter()
    .fold(
        (0.0, [0.0; 3]),
        |best, d| if d.0 > best.0 { d } else { best },
    );
    let cut = HalfCut {
        facets_before: mesh.len(),
        facets_kept: kept,
        facets_split: split,
        y_range: [lo.y, hi.y],
        diagonal: (hi - lo).norm(),
        largest_difference,
        largest_difference_at,
    };
    Ok(Some((half, cut)))
}

/// `mesh` clipped to y >= 0 (vertices within `snap` of the plane, round-off
/// of a plane the export meant, put on it), with the facets kept whole and
/// the facets cut. Vertices further off, as a scan's noise, can leave thin
/// slivers along the cut; the repair's weld and degenerate-facet passes
/// that follow remove them.
fn clip_right(mesh: &TriMesh, snap: f64) -> Result<(TriMesh, usize, usize), MeshError> {
    let y_of = |p: &Point| if p.y.abs() <= snap { 0.0 } else { p.y };
    let mut vertices: Vec<Point> = mesh
        .vertices
        .iter()
        .map(|p| Point::new(p.x, y_of(p), p.z))
        .collect();
    let mut on_edge: HashMap<(u32, u32), u32> = HashMap::new();
    let mut triangles = Vec::with_capacity(mesh.len() / 2 + 16);
    let (mut kept, mut split) = (0, 0);
    for t in &mesh.triangles {
        let ys = t.map(|v| vertices[v as usize].y);
        if ys.iter().all(|&y| y >= 0.0) {
            triangles.push(*t);
            kept += 1;
            continue;
        }
        if ys.iter().all(|&y| y <= 0.0) {
            continue;
        }
        split += 1;
        // Sutherland-Hodgman against y >= 0: the kept polygon, in order.
        let mut polygon: Vec<u32> = Vec::with_capacity(4);
        for k in 0..3 {
            let (a, b) = (t[k], t[(k + 1) % 3]);
            let (ya, yb) = (ys[k], ys[(k + 1) % 3]);
            if ya >= 0.0 {
                polygon.push(a);
            }
            if (ya > 0.0 && yb < 0.0) || (ya < 0.0 && yb > 0.0) {
                let key = (a.min(b), a.max(b));
                let v = *on_edge.entry(key).or_insert_with(|| {
                    let (pa, pb) = (vertices[key.0 as usize], vertices[key.1 as usize]);
                    let s = pa.y / (pa.y - pb.y);
                    let mut p = pa + (pb - pa) * s;
                    p.y = 0.0;
                    vertices.push(p);
                    (vertices.len() - 1) as u32
                });
                polygon.push(v);
            }
        }
        for k in 1..polygon.len().saturating_sub(1) {
            triangles.push([polygon[0], polygon[k], polygon[k + 1]]);
        }
    }
    let mut half = TriMesh::new(vertices, triangles)?;
    remove_unused_vertices(&mut half);
    Ok((half, kept, split))
}

/// The largest distance of a sample of `whole`'s vertices below `y = 0`,
/// mirrored, from `half` (on y >= 0), and where it is.
fn largest_difference(whole: &TriMesh, half: &TriMesh) -> (f64, [f64; 3]) {
    let Some((lo, hi)) = half.bounds() else {
        return (0.0, [0.0; 3]);
    };
    let grid = SurfaceGrid::new(half, lo, hi);
    let below: Vec<Point> = whole
        .vertices
        .iter()
        .filter(|p| p.y < 0.0)
        .map(|p| Point::new(p.x, -p.y, p.z))
        .collect();
    let stride = below.len().div_ceil(DIFFERENCE_SAMPLES).max(1);
    below
        .iter()
        .step_by(stride)
        .map(|p| (grid.distance(p), [p.x, p.y, p.z]))
        .fold(
            (0.0, [0.0; 3]),
            |best, d| if d.0 > best.0 { d } else { best },
        )
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;
    use crate::generate;
    use crate::repair::edges::{edge_groups, sorted_edge_uses};

    /// The icosphere is symmetric about each coordinate plane (the
    /// icosahedron's vertices are the cyclic permutations of (0, +-1,
    /// +-phi)), so its y >= 0 half has exactly half its area, and every
    /// open edge of the cut lies on the plane.
    #[test]
    fn a_sphere_halves_into_half_its_area_with_the_border_on_the_plane() {
        let whole = generate::icosphere(1.0, 3);
        let (half, cut) = keep_right_half(&whole).unwrap().unwrap();
        assert!((half.area() - 0.5 * whole.area()).abs() < 1e-12 * whole.area());
        assert!(half.vertices.iter().all(|p| p.y >= 0.0));
        let uses = sorted_edge_uses(&half.triangles);
        let open: Vec<_> = edge_groups(&uses).filter(|g| g.len() == 1).collect();
        assert!(!open.is_empty());
        for g in open {
            let (a, b) = g[0].ends();
            assert_eq!(half.vertices[a as usize].y, 0.0);
            assert_eq!(half.vertices[b as usize].y, 0.0);
        }
        assert_eq!(cut.facets_before, whole.len());
        assert!(cut.largest_difference < 1e-9, "{}", cut.largest_difference);
    }

    /// An ellipsoid turned about z is no longer symmetric about y = 0 and is cut
    /// across facets: the kept half's facets all lie on y >= 0, each cut
    /// facet's new vertices are shared by its neighbour across the edge
    /// (no new open edge off the plane), and the halves' difference is
    /// reported.
    #[test]
    fn a_turned_ellipsoid_is_cut_across_facets_and_stays_connected() {
        let mut whole = generate::icosphere(1.0, 2);
        whole.map_vertices(|p| Point::new(2.0 * p.x, p.y, p.z));
        let (c, s) = (0.1f64.cos(), 0.1f64.sin());
        whole.map_vertices(|p| Point::new(c * p.x - s * p.y, s * p.x + c * p.y, p.z));
        let (half, cut) = keep_right_half(&whole).unwrap().unwrap();
        assert!(cut.facets_split > 0);
        assert!(half.vertices.iter().all(|p| p.y >= 0.0));
        let uses = sorted_edge_uses(&half.triangles);
        for g in edge_groups(&uses).filter(|g| g.len() == 1) {
            let (a, b) = g[0].ends();
            assert_eq!(half.vertices[a as usize].y, 0.0);
            assert_eq!(half.vertices[b as usize].y, 0.0);
        }
        // Turned by 0.1 rad, the ellipsoid's tips (2 m out) move 0.2 m
        // across: the halves differ by about that much.
        assert!(cut.largest_difference > 0.05, "{}", cut.largest_difference);
    }

    /// A part on the kept side only (a bump on y > 0, as a door mirror on
    /// one side) shows in the halves' difference, as one on the dropped
    /// side does.
    #[test]
    fn a_part_on_either_side_only_shows_in_the_difference() {
        for side in [1.0, -1.0] {
            let mut body = generate::icosphere(1.0, 3);
            body.map_vertices(|p| {
                if side * p.y > 0.8 {
                    Point::new(p.x, p.y + side * 0.05, p.z)
                } else {
                    p
                }
            });
            let (_, cut) = keep_right_half(&body).unwrap().unwrap();
            assert!(
                cut.largest_difference > 0.03 && cut.differs(),
                "side {side}: {}",
                cut.largest_difference
            );
        }
    }

    #[test]
    fn a_half_model_is_left_alone_and_an_off_centre_whole_body_refused() {
        let whole = generate::icosphere(1.0, 2);
        let (half, _) = keep_right_half(&whole).unwrap().unwrap();
        assert!(keep_right_half(&half).unwrap().is_none());
        let mut off = whole.clone();
        off.map_vertices(|p| Point::new(p.x, p.y + 0.1, p.z));
        let e = keep_right_half(&off).unwrap_err();
        assert!(matches!(e, MeshError::NotCentred { .. }), "{e}");
        assert!(e.to_string().contains("-0.900"), "{e}");
    }
}
