//! Tri-axial ellipsoid (a prolate spheroid when b = c), poles on the x axis.

use std::f64::consts::PI;

use super::loft::{LoftSpec, Sections, loft};
use super::positive;
use crate::{MeshError, Point, TriMesh};

/// Settings of [`ellipsoid_with_params`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EllipsoidParams {
    /// Semi-axis along x (the flow direction), metres.
    pub a: f64,
    /// Semi-axis along y, metres.
    pub b: f64,
    /// Semi-axis along z, metres.
    pub c: f64,
    /// Target number of triangles (the result is within about 15 %).
    pub panels: usize,
    /// Clustering of the stations towards the nose and tail: 0 spaces them
    /// evenly in arc length, 1 is full cosine spacing.
    pub clustering: f64,
}

impl Default for EllipsoidParams {
    /// A 6:1 prolate spheroid of length 1 m (one of the slenderness ratios
    /// tabulated by Lamb 1918), 2,000 panels, half-cosine clustering.
    fn default() -> Self {
        Self {
            a: 0.5,
            b: 0.5 / 6.0,
            c: 0.5 / 6.0,
            panels: 2000,
            clustering: 0.5,
        }
    }
}

/// Ellipsoid x²/a² + y²/b² + z²/c² = 1 centred at the origin, with about
/// `panels` triangles; see [`ellipsoid_with_params`].
pub fn ellipsoid(a: f64, b: f64, c: f64, panels: usize) -> Result<TriMesh, MeshError> {
    ellipsoid_with_params(&EllipsoidParams {
        a,
        b,
        c,
        panels,
        ..EllipsoidParams::default()
    })
}

/// Ellipsoid lofted through elliptic sections x = const, with poles at
/// (±a, 0, 0): stations are spaced in arc length along the body and
/// clustered towards the poles, each section carries as many points as its
/// perimeter needs for near-square panels, so the nose is resolved without
/// a fan of slivers. Closed and outward.
///
/// # Errors
/// [`MeshError::InvalidParameter`] when a semi-axis is not a positive
/// finite number, the clustering is outside [0, 1] or the panel count
/// outside [1, [`MAX_PANELS`](super::MAX_PANELS)].
pub fn ellipsoid_with_params(params: &EllipsoidParams) -> Result<TriMesh, MeshError> {
    positive("a", params.a)?;
    positive("b", params.b)?;
    positive("c", params.c)?;
    super::unit_interval("clustering", params.clustering)?;
    super::panel_count("panels", params.panels)?;
    let spec = LoftSpec {
        panels: params.panels,
        clustering: params.clustering,
        half: false,
    };
    Ok(loft(params, spec))
}

impl Sections for EllipsoidParams {
    fn x_range(&self) -> (f64, f64) {
        (-self.a, self.a)
    }

    fn point(&self, x: f64, u: f64) -> Point {
        let r = (1.0 - (x / self.a).powi(2)).max(0.0).sqrt();
        let phi = PI * (u - 0.5);
        Point::new(x, self.b * r * phi.cos(), self.c * r * phi.sin())
    }
}

#[cfg(test)]
mod tests {
    use super::super::check;
    use super::*;

    /// Knud Thomsen's approximation of the ellipsoid's area (p = 1.6075,
    /// relative error at most 1.061 %; Thomsen 2004, quoted by Michon,
    /// "Surface area of an ellipsoid", numericana.com, from memory).
    fn thomsen_area(a: f64, b: f64, c: f64) -> f64 {
        let p = 1.6075;
        let m = ((a * b).powf(p) + (a * c).powf(p) + (b * c).powf(p)) / 3.0;
        4.0 * PI * m.powf(1.0 / p)
    }

    /// Exact area of a prolate spheroid (a > b = c), e² = 1 - b²/a²:
    /// S = 2 pi b² (1 + a asin(e) / (b e)) (standard result, e.g.
    /// Abramowitz & Stegun-era tables; derived by integrating the surface
    /// of revolution).
    fn prolate_area(a: f64, b: f64) -> f64 {
        let e = (1.0 - b * b / (a * a)).sqrt();
        2.0 * PI * b * b * (1.0 + a * e.asin() / (b * e))
    }

    #[test]
    fn ellipsoids_are_closed_outward_and_match_volume_and_area() {
        // Volume 4/3 pi a b c (exact). A polyhedron inscribed in a smooth
        // surface loses volume and area of order h² (h the panel size):
        // tolerances 3 % at ~800 panels and 1 % at ~3,200.
        let cases = [(1.0, 1.0, 1.0), (0.5, 0.125, 0.125), (1.0, 0.5, 0.25)];
        for &(a, b, c) in &cases {
            let mut errors = Vec::new();
            for (panels, tol) in [(800, 0.03), (3200, 0.01)] {
                let m = ellipsoid(a, b, c, panels).unwrap();
                check::closed_outward(&m);
                // Near-square panels; the elliptic ring next to a pole of the
                // tri-axial body (b/c = 2) is the worst place.
                check::min_angle_above(&m, 14.0);
                let n = m.len() as f64;
                assert!((n / panels as f64 - 1.0).abs() < 0.25, "{n} triangles");
                let exact = 4.0 / 3.0 * PI * a * b * c;
                let ev = (m.signed_volume() - exact) / exact;
                let prolate = b == c && a > b;
                let area = if prolate {
                    prolate_area(a, b)
                } else {
                    thomsen_area(a, b, c)
                };
                let ea = (m.area() - area) / area;
                // Thomsen's formula (exact for a sphere) adds its own 1.1 %
                // to the area bound of a tri-axial ellipsoid.
                let tol_a = if prolate || a == b { tol } else { tol + 0.011 };
                assert!(ev.abs() < tol, "{a} {b} {c} {panels}: volume error {ev}");
                assert!(ea.abs() < tol_a, "{a} {b} {c} {panels}: area error {ea}");
                errors.push(ev.abs());
            }
            assert!(errors[1] < errors[0] / 2.0, "volume converges: {errors:?}");
        }
    }

    #[test]
    fn bad_semi_axes_are_errors() {
        assert!(ellipsoid(0.0, 1.0, 1.0, 100).is_err());
        assert!(ellipsoid(1.0, f64::NAN, 1.0, 100).is_err());
    }
}
