//! Parts of the input thinner than the panels can follow.
//!
//! A surface assembled from parts (roof bars on their feet, a mirror, a
//! spoiler blade) keeps each part through the wrap, but a part thinner
//! than about two panels' edges comes out of the coarsening as a ridge of
//! a few panels: its section is not resolved, so the pressures on its own
//! faces, and its own drag, are not in the results (a review's 30 mm roof
//! bars under 100 mm panels had their front faces at the dead water's
//! pressure and carried 5 N of the 40 N the bars added). Each part's
//! thickness is its extent along its thinnest principal axis (of the
//! covariance of its vertices), so a bar turned in plan still reads its
//! depth; a part wholly inside another (which the wrap drops) and the
//! largest part (the body) are left out.

use nalgebra::{Matrix3, SymmetricEigen};
use serde::Serialize;

use crate::{Point, TriMesh, Vector};

/// A part of the input and its thickness.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct PartSize {
    /// Extent along its thinnest principal axis, m.
    pub thickness: f64,
    /// Middle of its bounding box, m.
    pub centre: [f64; 3],
}

/// Parts thinner than this share of the body's length are measured (a
/// roof bar is 0.6 % of a car's length, a mirror housing 3 %; thicker
/// parts are resolved by any usual panel count): our choice.
pub const MEASURED_SHARE: f64 = 0.05;

/// The parts of `mesh` (facets joined through shared vertices) but the
/// largest by area, thinner than [`MEASURED_SHARE`] of the body's length
/// and not wholly inside another part, thinnest first.
pub fn thin_parts(mesh: &TriMesh) -> Vec<PartSize> {
    let part_of = crate::crossing::surfaces(mesh);
    let mut ids: Vec<usize> = part_of.clone();
    ids.sort_unstable();
    ids.dedup();
    if ids.len() < 2 {
        return Vec::new();
    }
    let index = |r: usize| ids.binary_search(&r).unwrap_or(0);
    let mut area = vec![0.0; ids.len()];
    let mut facets: Vec<Vec<usize>> = vec![Vec::new(); ids.len()];
    for (t, &r) in part_of.iter().enumerate() {
        let k = index(r);
        area[k] += mesh.area_vector(t).norm();
        facets[k].push(t);
    }
    let body = (0..ids.len())
        .max_by(|&a, &b| area[a].total_cmp(&area[b]))
        .unwrap_or(0);
    let Some((lo, hi)) = mesh.bounds() else {
        return Vec::new();
    };
    let length = (hi - lo).max();
    let mut thin: Vec<(f64, usize, Vec<Point>)> = Vec::new();
    for (k, part) in facets.iter().enumerate() {
        if k == body {
            continue;
        }
        let mut vertices: Vec<u32> = part.iter().flat_map(|&t| mesh.triangles[t]).collect();
        vertices.sort_unstable();
        vertices.dedup();
        let points: Vec<Point> = vertices
            .iter()
            .map(|&v| mesh.vertices[v as usize])
            .collect();
        let thickness = thinnest_extent(&points);
        if thickness < MEASURED_SHARE * length {
            thin.push((thickness, k, points));
        }
    }
    thin.sort_by(|a, b| a.0.total_cmp(&b.0));
    let Some(rays) = crate::wrap::PartRays::new(mesh, &part_of) else {
        return Vec::new();
    };
    thin.into_iter()
        .take(MOST_TESTED)
        .filter(|(_, k, points)| !rays.inside_another(part_of[facets[*k][0]], &points[0]))
        .map(|(thickness, _, points)| {
            let (plo, phi) = points
                .iter()
                .fold((points[0], points[0]), |(l, h), p| (l.inf(p), h.sup(p)));
            let c = nalgebra::center(&plo, &phi);
            PartSize {
                thickness,
                centre: [c.x, c.y, c.z],
            }
        })
        .collect()
}

/// Most parts [`thin_parts`] tests for lying inside another, thinnest
/// first (a scan's hundreds of loose fragments need not all be named).
pub const MOST_TESTED: usize = 50;

/// The extent of `points` along their thinnest principal axis.
fn thinnest_extent(points: &[Point]) -> f64 {
    let n = points.len().max(1) as f64;
    let mean = points.iter().fold(Vector::zeros(), |s, p| s + p.coords) / n;
    let mut cov = Matrix3::zeros();
    for p in points {
        let d = p.coords - mean;
        cov += d * d.transpose();
    }
    let eig = SymmetricEigen::new(cov / n);
    (0..3)
        .map(|k| {
            let axis = eig.eigenvectors.column(k).into_owned();
            let (lo, hi) = points
                .iter()
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), p| {
                    let s = p.coords.dot(&axis);
                    (l.min(s), h.max(s))
                });
            hi - lo
        })
        .fold(f64::INFINITY, f64::min)
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;
    use crate::generate;

    fn moved(mut m: TriMesh, by: Vector) -> TriMesh {
        m.map_vertices(|p| p + by);
        m
    }

    /// A flat ellipsoid (a bar 20 mm deep) over a sphere of 2 m, another
    /// inside the sphere, and a round part thicker than the measured
    /// share: only the first is listed, with its depth.
    #[test]
    fn a_thin_part_outside_the_body_is_found_with_its_depth() {
        let body = generate::icosphere(1.0, 3);
        let bar = |c: Vector| {
            let mut m = generate::icosphere(1.0, 3);
            m.map_vertices(|p| Point::new(0.3 * p.x, 0.05 * p.y, 0.01 * p.z));
            moved(m, c)
        };
        let ball = moved(generate::icosphere(0.2, 2), Vector::new(0.0, 1.5, 0.0));
        let parts = body
            .joined(&bar(Vector::new(0.0, 0.0, 1.2)))
            .joined(&bar(Vector::zeros()))
            .joined(&ball);
        let thin = thin_parts(&parts);
        assert_eq!(thin.len(), 1, "{thin:?}");
        assert!((thin[0].thickness - 0.02).abs() < 0.002, "{thin:?}");
        assert!((thin[0].centre[2] - 1.2).abs() < 1e-9, "{thin:?}");
        assert!(thin_parts(&body).is_empty());
    }

    /// The thinnest extent does not depend on how the part is turned.
    #[test]
    fn a_turned_plate_reads_its_thickness() {
        let mut plate = generate::icosphere(1.0, 3);
        plate.map_vertices(|p| Point::new(0.5 * p.x, 0.2 * p.y, 0.015 * p.z));
        let r = nalgebra::Rotation3::from_euler_angles(0.4, 0.7, 1.1);
        let points: Vec<Point> = plate.vertices.iter().map(|p| r * p).collect();
        assert!((thinnest_extent(&points) - 0.03).abs() < 0.002);
    }
}
