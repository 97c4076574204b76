//! Panel quality: aspect ratio, smallest angle, neighbour size ratio, with
//! warnings where panels will hurt accuracy, and a suggested panel count.
//!
//! Measures:
//! - aspect ratio `L_max * P / (4 sqrt(3) A)` (longest edge over the
//!   diameter of the inscribed circle, scaled to 1 for an equilateral
//!   triangle; Shewchuk 2002, "What is a good linear finite element?",
//!   table of quality measures, from memory);
//! - smallest interior angle, degrees;
//! - neighbour area ratio: the largest `A_i / A_j` across an edge.
//!
//! Thresholds (common practice for constant-strength panel methods, where
//! the collocation point sits at the centroid and the surface velocity
//! comes from differences between neighbours; Katz & Plotkin 2001,
//! *Low-Speed Aerodynamics*, ch. 12, advise smooth panel-size variation):
//! aspect ratio above 5, smallest angle below 10 degrees, neighbour area
//! ratio above 4 (edge-length ratio about 2).

use serde::Serialize;

use crate::{Panel, PanelMesh};

/// Warning thresholds (common practice, see the module docs).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct QualityParams {
    /// Warn above this aspect ratio.
    pub max_aspect_ratio: f64,
    /// Warn below this smallest angle, degrees.
    pub min_angle_deg: f64,
    /// Warn above this area ratio across an edge.
    pub max_neighbour_area_ratio: f64,
    /// Warn when more than this fraction of panels breaks a threshold.
    pub warn_fraction: f64,
}

impl Default for QualityParams {
    fn default() -> Self {
        Self {
            max_aspect_ratio: 5.0,
            min_angle_deg: 10.0,
            max_neighbour_area_ratio: 4.0,
            warn_fraction: 0.01,
        }
    }
}

/// Smallest, median and largest of a measure.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct Spread {
    /// Smallest value.
    pub min: f64,
    /// Median.
    pub median: f64,
    /// Largest value.
    pub max: f64,
}

/// The quality of a panel mesh.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct QualityReport {
    /// Panels measured.
    pub panels: usize,
    /// Aspect ratio (1 for equilateral).
    pub aspect_ratio: Spread,
    /// Smallest angle per panel, degrees.
    pub min_angle_deg: Spread,
    /// Largest area ratio across an edge per panel.
    pub neighbour_area_ratio: Spread,
    /// Panels above the aspect-ratio threshold.
    pub high_aspect: usize,
    /// Panels below the angle threshold.
    pub small_angle: usize,
    /// Panels above the neighbour-ratio threshold.
    pub size_jump: usize,
    /// Thresholds used.
    pub thresholds: QualityParams,
    /// Plain-language warnings (empty when all is well).
    pub warnings: Vec<String>,
}

/// Measure with default thresholds.
pub fn quality(mesh: &PanelMesh) -> QualityReport {
    quality_with_params(mesh, &QualityParams::default())
}

/// Measure every panel and compare with the thresholds.
pub fn quality_with_params(mesh: &PanelMesh, q: &QualityParams) -> QualityReport {
    let aspect: Vec<f64> = mesh.panels.iter().map(aspect_ratio).collect();
    let angle: Vec<f64> = mesh.panels.iter().map(smallest_angle_deg).collect();
    let ratio: Vec<f64> = (0..mesh.len())
        .map(|i| neighbour_area_ratio(mesh, i))
        .collect();
    let worst = |v: &[f64], sign: f64| {
        let i = (0..v.len())
            .max_by(|&a, &b| (sign * v[a]).total_cmp(&(sign * v[b])))
            .unwrap_or(0);
        mesh.panels.get(i).map(|p| p.centroid)
    };
    let at = [worst(&aspect, 1.0), worst(&angle, -1.0), worst(&ratio, 1.0)];
    let mut r = QualityReport {
        panels: mesh.len(),
        high_aspect: aspect.iter().filter(|&&a| a > q.max_aspect_ratio).count(),
        small_angle: angle.iter().filter(|&&a| a < q.min_angle_deg).count(),
        size_jump: ratio
            .iter()
            .filter(|&&a| a > q.max_neighbour_area_ratio)
            .count(),
        aspect_ratio: spread(aspect),
        min_angle_deg: spread(angle),
        neighbour_area_ratio: spread(ratio),
        thresholds: *q,
        warnings: Vec::new(),
    };
    r.warnings = warnings(&r, q, at);
    r
}

/// The warnings, each naming where its worst panel is (`at`: the worst
/// aspect ratio, smallest angle and area jump).
fn warnings(r: &QualityReport, q: &QualityParams, at: [Option<crate::Point>; 3]) -> Vec<String> {
    let n = r.panels.max(1) as f64;
    let mut out = Vec::new();
    let mut warn = |count: usize, what: String, harm: &str, at: Option<crate::Point>| {
        if count as f64 > q.warn_fraction * n {
            let place = at.map_or(String::new(), |p| {
                format!(
                    " (the worst near x {:.3}, y {:.3}, z {:.3} m)",
                    p.x, p.y, p.z
                )
            });
            out.push(format!(
                "{count} panels ({:.1} %) {what}{place}: {harm}",
                100.0 * count as f64 / n
            ));
        }
    };
    warn(
        r.high_aspect,
        format!("have an aspect ratio above {}", q.max_aspect_ratio),
        "long thin panels put the collocation point far from parts of the panel and spoil the velocity from doublet differences",
        at[0],
    );
    warn(
        r.small_angle,
        format!("have an angle below {} degrees", q.min_angle_deg),
        "needle-like panels make the velocity gradient noisy",
        at[1],
    );
    warn(
        r.size_jump,
        format!(
            "differ in area by more than {}x from a neighbour",
            q.max_neighbour_area_ratio
        ),
        "abrupt size changes cause local errors in pressure",
        at[2],
    );
    out
}

/// `L_max * P / (4 sqrt(3) A)`: 1 for an equilateral triangle.
pub fn aspect_ratio(p: &Panel) -> f64 {
    let [a, b, c] = p.vertices;
    let perimeter = (b - a).norm() + (c - b).norm() + (a - c).norm();
    p.size * perimeter / (4.0 * 3f64.sqrt() * p.area)
}

/// Smallest interior angle, degrees.
pub fn smallest_angle_deg(p: &Panel) -> f64 {
    let v = p.vertices;
    (0..3)
        .map(|k| {
            let (u, w) = (v[(k + 1) % 3] - v[k], v[(k + 2) % 3] - v[k]);
            u.angle(&w).to_degrees()
        })
        .fold(180.0, f64::min)
}

/// Largest area ratio (at least 1) between panel `i` and an edge neighbour.
pub fn neighbour_area_ratio(mesh: &PanelMesh, i: usize) -> f64 {
    let a = mesh.panels[i].area;
    mesh.edge_neighbours[i]
        .iter()
        .flatten()
        .map(|&j| {
            let b = mesh.panels[j as usize].area;
            (a / b).max(b / a)
        })
        .fold(1.0, f64::max)
}

fn spread(mut v: Vec<f64>) -> Spread {
    if v.is_empty() {
        return Spread::default();
    }
    v.sort_by(f64::total_cmp);
    Spread {
        min: v[0],
        median: v[v.len() / 2],
        max: v[v.len() - 1],
    }
}

/// A panel count for a body of wetted `area` (m^2, the real panels only)
/// and overall `length` (m): panels with edges about `length / 50` (so
/// about 50 panels along the body, enough to resolve the pressure peaks at
/// nose, windscreen base and roof ends with constant-strength panels;
/// common practice), as equilateral triangles of area `sqrt(3)/4 h^2`,
/// rounded to 500 and clamped to 1,000-12,000. For a full car (about
/// 4.5 m long, 15-18 m^2 of surface) this gives 4,000-6,000; the usual
/// range for screening a full car is 4,000-12,000 (common practice).
pub fn suggested_panels(area: f64, length: f64) -> usize {
    if area.is_nan() || length.is_nan() || area <= 0.0 || length <= 0.0 {
        return 1000;
    }
    let h = length / 50.0;
    let n = area / (3f64.sqrt() / 4.0 * h * h);
    ((n / 500.0).round() * 500.0).clamp(1000.0, 12_000.0) as usize
}
