//! Mapping one run's panel values onto another run's panels by the nearest
//! surface point.
//!
//! For each target centroid the few nearest source centroids are found in a
//! k-d tree (kiddo); each candidate panel is approximated by a disc of
//! equal area in its own plane, and the candidate whose disc lies closest to
//! the target point wins, among candidates whose normals face the same way
//! (so a thin roof never takes values from the floor below it). The target
//! gets the winner's panel-constant value: constant-strength panels carry
//! one value each (Katz & Plotkin 2001, sec. 12.2), so this is the source
//! run's own piecewise-constant field read at the nearest surface point.

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
}

impl Mapping {
    /// Values of the source field at the target points.
    pub fn pull<T: Copy>(&self, field: &[T]) -> Vec<T> {
        self.source.iter().map(|&j| field[j]).collect()
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
    let (src, dist): (Vec<usize>, Vec<f64>) = targets
        .iter()
        .map(|(p, n)| best_candidate(&tree, source, p, n))
        .unzip();
    Some(Mapping {
        source: src,
        distance: dist,
    })
}

/// The best of the nearest candidates for one target point.
fn best_candidate(
    tree: &KdTree<f64, 3>,
    source: &[SourcePanel],
    p: &Point3<f64>,
    n: &Vector3<f64>,
) -> (usize, f64) {
    let near = tree.nearest_n::<SquaredEuclidean>(&[p.x, p.y, p.z], CANDIDATES);
    let score = |j: usize| disc_distance(p, &source[j]);
    let facing = near
        .iter()
        .map(|c| c.item as usize)
        .filter(|&j| source[j].normal.dot(n) > 0.0)
        .map(|j| (j, score(j)))
        .min_by(|a, b| a.1.total_cmp(&b.1));
    facing.unwrap_or_else(|| {
        // No candidate faces the same way: take the nearest centroid.
        let j = near.first().map_or(0, |c| c.item as usize);
        (j, score(j))
    })
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
