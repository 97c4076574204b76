//! Mapping one run's panel values onto another run's panels by the nearest
//! surface point.
//!
//! For each target centroid the few nearest source centroids are found in a
//! k-d tree (kiddo); each candidate panel is approximated by a disc of
//! equal area in its own plane, and the candidate whose disc lies closest to
//! the target point wins, among candidates whose normals face the same way
//! (so a thin roof never takes values from the floor below it). The target
//! gets the winner's value corrected to first order by a least-squares
//! surface gradient over the same-facing candidates (the weighted
//! least-squares reconstruction of finite-volume practice, e.g. Blazek,
//! *Computational Fluid Dynamics*, 2001, sec. 5.3.4), limited to the range
//! of the candidates' values so it never overshoots. A point that lies on a
//! source centroid gets that panel's value exactly.

use kiddo::{KdTree, SquaredEuclidean};
use nalgebra::{Point3, Vector3};

/// Candidates examined per target point.
const CANDIDATES: usize = 6;

/// A source panel as the mapping sees it.
#[derive(Debug, Clone, Copy)]
pub struct SourcePanel {
    /// Centroid.
    pub centroid: Point3<f64>,
    /// Unit normal.
    pub normal: Vector3<f64>,
    /// Area.
    pub area: f64,
}

/// Where each target point found its source panel.
#[derive(Debug, Clone, PartialEq)]
pub struct Mapping {
    /// Source panel index per target point.
    pub source: Vec<usize>,
    /// Distance from the target point to the chosen source disc, m.
    pub distance: Vec<f64>,
    /// Linear weights of source values per target point (they sum to 1).
    pub weights: Vec<Vec<(usize, f64)>>,
    /// How far the source panels were moved before mapping, m (zero unless
    /// the source body lies elsewhere in its file, see
    /// `compare::map_a_onto_b`).
    pub shift: Vector3<f64>,
}

impl Mapping {
    /// Values of the source field at the target points.
    pub fn pull<T: Copy>(&self, field: &[T]) -> Vec<T> {
        self.source.iter().map(|&j| field[j]).collect()
    }

    /// A continuous source field interpolated at the target points (first
    /// order, limited to the values of the stencil).
    pub fn interpolate(&self, field: &[f64]) -> Vec<f64> {
        self.weights
            .iter()
            .map(|w| {
                let v: f64 = w.iter().map(|&(j, c)| c * field[j]).sum();
                let (lo, hi) = w
                    .iter()
                    .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), &(j, _)| {
                        (l.min(field[j]), h.max(field[j]))
                    });
                v.clamp(lo, hi)
            })
            .collect()
    }
}

/// Distance from `p` to the disc of equal area centred on the panel's
/// centroid in the panel's plane.
fn disc_distance(p: &Point3<f64>, s: &SourcePanel) -> f64 {
    let d = p - s.centroid;
    let normal_part = s.normal.dot(&d);
    let in_plane = (d - s.normal * normal_part).norm();
    let radius = (s.area / std::f64::consts::PI).sqrt();
    normal_part.hypot((in_plane - radius).max(0.0))
}

/// Map every target point (with its normal) onto the source panels.
/// Returns `None` only for an empty source.
pub fn map_nearest(
    source: &[SourcePanel],
    targets: &[(Point3<f64>, Vector3<f64>)],
) -> Option<Mapping> {
    if source.is_empty() {
        return None;
    }
    let mut tree: KdTree<f64, 3> = KdTree::new();
    for (j, s) in source.iter().enumerate() {
        tree.add(&[s.centroid.x, s.centroid.y, s.centroid.z], j as u64);
    }
    let mut out = Mapping {
        source: Vec::with_capacity(targets.len()),
        distance: Vec::with_capacity(targets.len()),
        weights: Vec::with_capacity(targets.len()),
        shift: Vector3::zeros(),
    };
    for (p, n) in targets {
        let (j, d, stencil) = best_candidate(&tree, source, p, n);
        out.source.push(j);
        out.distance.push(d);
        out.weights.push(gradient_weights(source, j, &stencil, p));
    }
    Some(out)
}

/// The best of the nearest candidates for one target point, its distance
/// and the same-facing candidates (the interpolation stencil).
fn best_candidate(
    tree: &KdTree<f64, 3>,
    source: &[SourcePanel],
    p: &Point3<f64>,
    n: &Vector3<f64>,
) -> (usize, f64, Vec<usize>) {
    let near = tree.nearest_n::<SquaredEuclidean>(&[p.x, p.y, p.z], CANDIDATES);
    let score = |j: usize| disc_distance(p, &source[j]);
    let stencil: Vec<usize> = near
        .iter()
        .map(|c| c.item as usize)
        .filter(|&j| source[j].normal.dot(n) > 0.0)
        .collect();
    let best = stencil
        .iter()
        .map(|&j| (j, score(j)))
        .min_by(|a, b| a.1.total_cmp(&b.1));
    match best {
        Some((j, d)) => (j, d, stencil),
        None => {
            // No candidate faces the same way: take the nearest centroid.
            let j = near.first().map_or(0, |c| c.item as usize);
            (j, score(j), vec![j])
        }
    }
}

/// Weights of `v(p) = v_j + g . t`, with `t` the offset of `p` from panel
/// `j`'s centroid in its plane and `g` the least-squares gradient fitted to
/// the stencil's values in that plane: `g = (A^T A)^-1 A^T (v_k - v_j)`.
/// Falls back to the panel's own value when the fit is singular.
fn gradient_weights(
    source: &[SourcePanel],
    j: usize,
    stencil: &[usize],
    p: &Point3<f64>,
) -> Vec<(usize, f64)> {
    let s = &source[j];
    let (e1, e2) = plane_axes(&s.normal);
    let local = |q: &Point3<f64>| {
        let d = q - s.centroid;
        nalgebra::Vector2::new(d.dot(&e1), d.dot(&e2))
    };
    let others: Vec<usize> = stencil.iter().copied().filter(|&k| k != j).collect();
    let rows: Vec<nalgebra::Vector2<f64>> =
        others.iter().map(|&k| local(&source[k].centroid)).collect();
    let ata = rows
        .iter()
        .fold(nalgebra::Matrix2::zeros(), |m, r| m + r * r.transpose());
    let t = local(p);
    let Some(inv) = ata
        .try_inverse()
        .filter(|_| t.norm() > 0.0 && others.len() >= 2)
    else {
        return vec![(j, 1.0)];
    };
    let a = inv * t;
    let mut w = vec![(j, 1.0)];
    for (k, r) in others.iter().zip(&rows) {
        let c = a.dot(r);
        w.push((*k, c));
        w[0].1 -= c;
    }
    w
}

/// Two unit vectors spanning the plane normal to `n`.
fn plane_axes(n: &Vector3<f64>) -> (Vector3<f64>, Vector3<f64>) {
    let helper = if n.x.abs() < 0.9 {
        Vector3::x()
    } else {
        Vector3::y()
    };
    let e1 = n.cross(&helper).normalize();
    (e1, n.cross(&e1))
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;

    #[test]
    fn a_set_maps_onto_itself_exactly() {
        let src: Vec<SourcePanel> = (0..50)
            .map(|k| SourcePanel {
                centroid: Point3::new(k as f64 * 0.1, (k % 7) as f64, 0.0),
                normal: Vector3::z(),
                area: 0.001,
            })
            .collect();
        let targets: Vec<_> = src.iter().map(|s| (s.centroid, s.normal)).collect();
        let m = map_nearest(&src, &targets).unwrap();
        assert_eq!(m.source, (0..50).collect::<Vec<_>>());
        assert!(m.distance.iter().all(|&d| d == 0.0));
        let field: Vec<f64> = (0..50).map(|k| (k * k) as f64).collect();
        assert_eq!(m.interpolate(&field), field);
    }

    #[test]
    fn a_linear_field_is_interpolated_exactly() {
        // The least-squares gradient of a linear field is exact, so the
        // value between centroids is too (up to round-off).
        let src: Vec<SourcePanel> = (0..36)
            .map(|k| SourcePanel {
                centroid: Point3::new((k % 6) as f64 * 0.1, (k / 6) as f64 * 0.1, 0.0),
                normal: Vector3::z(),
                area: 0.01,
            })
            .collect();
        let field: Vec<f64> = src
            .iter()
            .map(|s| 2.0 * s.centroid.x - 3.0 * s.centroid.y)
            .collect();
        let p = Point3::new(0.23, 0.31, 0.0);
        let m = map_nearest(&src, &[(p, Vector3::z())]).unwrap();
        let v = m.interpolate(&field)[0];
        assert!((v - (2.0 * 0.23 - 3.0 * 0.31)).abs() < 1e-12, "{v}");
    }

    #[test]
    fn a_thin_plate_keeps_its_sides_apart() {
        // Two panels 1 mm apart facing away from each other: a target just
        // below the top one, facing up, belongs to the top one.
        let top = SourcePanel {
            centroid: Point3::new(0.0, 0.0, 0.0005),
            normal: Vector3::z(),
            area: 0.01,
        };
        let bottom = SourcePanel {
            centroid: Point3::new(0.0, 0.0, -0.0005),
            normal: -Vector3::z(),
            area: 0.01,
        };
        let m = map_nearest(
            &[top, bottom],
            &[(Point3::new(0.0, 0.0, -0.0004), Vector3::z())],
        )
        .unwrap();
        assert_eq!(m.source, vec![0]);
    }
}
