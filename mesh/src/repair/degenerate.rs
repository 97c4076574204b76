//! Drop facets that span no surface: collapsed (a repeated vertex after
//! welding), zero area, and slivers (caps: one angle near 180 degrees, so the
//! area is tiny against the longest edge squared).

use serde::Serialize;

use crate::{Point, TriMesh};

/// What the degenerate-facet pass dropped.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize)]
pub struct DegenerateReport {
    /// Facets with a repeated vertex index (two corners welded together).
    pub collapsed: usize,
    /// Facets with (numerically) zero area: `2A <= 1e-12 L^2`, `L` the
    /// longest edge.
    pub zero_area: usize,
    /// Cap slivers: largest angle above the limit and `2A / L^2` below the
    /// ratio limit.
    pub slivers: usize,
}

impl DegenerateReport {
    /// Facets dropped in all.
    pub fn total(&self) -> usize {
        self.collapsed + self.zero_area + self.slivers
    }
}

/// Why a facet is degenerate, if it is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Defect {
    Collapsed,
    ZeroArea,
    Sliver,
}

/// Drop degenerate facets in place. A sliver is a facet whose largest angle
/// exceeds `max_angle_deg` and whose `2A / L^2` is below `sliver_ratio`
/// (for an equilateral triangle `2A / L^2 = sqrt(3)/2`).
pub fn drop_degenerate(
    mesh: &mut TriMesh,
    max_angle_deg: f64,
    sliver_ratio: f64,
) -> DegenerateReport {
    let mut report = DegenerateReport::default();
    let cos_limit = max_angle_deg.to_radians().cos();
    let vertices = &mesh.vertices;
    mesh.triangles.retain(|t| {
        let defect = classify(t, vertices, cos_limit, sliver_ratio);
        match defect {
            Some(Defect::Collapsed) => report.collapsed += 1,
            Some(Defect::ZeroArea) => report.zero_area += 1,
            Some(Defect::Sliver) => report.slivers += 1,
            None => {}
        }
        defect.is_none()
    });
    report
}

fn classify(t: &[u32; 3], vertices: &[Point], cos_limit: f64, sliver_ratio: f64) -> Option<Defect> {
    if t[0] == t[1] || t[1] == t[2] || t[2] == t[0] {
        return Some(Defect::Collapsed);
    }
    let [a, b, c] = t.map(|v| vertices[v as usize]);
    let twice_area = (b - a).cross(&(c - a)).norm();
    let edges = [b - a, c - b, a - c];
    let longest_sq = edges.iter().map(|e| e.norm_squared()).fold(0.0, f64::max);
    if twice_area.is_nan() || twice_area <= 1e-12 * longest_sq {
        return Some(Defect::ZeroArea);
    }
    let ratio = twice_area / longest_sq;
    (ratio < sliver_ratio && largest_angle_cos(&edges) < cos_limit).then_some(Defect::Sliver)
}

/// Cosine of the largest angle: the angle at corner `k` lies between
/// `-edges[k-1]` and `edges[k]`.
fn largest_angle_cos(edges: &[crate::Vector; 3]) -> f64 {
    (0..3)
        .map(|k| {
            let (u, v) = (-edges[(k + 2) % 3], edges[k]);
            u.dot(&v) / (u.norm() * v.norm())
        })
        .fold(1.0, f64::min)
}
