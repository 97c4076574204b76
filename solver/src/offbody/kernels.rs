//! Velocity induced at a point by constant-strength panels, per unit
//! strength, in the convention of [`crate::influence`]:
//! `phi = sigma S / (4 pi) - mu D / (4 pi)`.
//!
//! Source: `grad S = -(sum_k nu_k L_k + D n)`, where `nu_k` is the outward
//! in-plane normal of edge `k`, `L_k = ln((r_k + r_k+1 + d_k)/(r_k + r_k+1 - d_k))`
//! the integral of `1/r` along it and `D` the solid angle (Hess & Smith
//! 1967, sec. 4.3; Katz & Plotkin 2001, eqs. 10.92-10.93 in vector form:
//! the in-plane part follows from the divergence theorem in the panel
//! plane, the normal part is the solid angle).
//!
//! Doublet: `-grad D / (4 pi)` is the velocity of a vortex ring of unit
//! circulation running along the corners in their (counter-clockwise about
//! `n`) order, by the Biot-Savart law for straight segments (Katz &
//! Plotkin 2001, sec. 10.4.3 and eq. 10.115).
//!
//! Far from the panel both are replaced by point singularities at the
//! centroid (Katz & Plotkin 2001, eqs. 10.91-10.92, differentiated).

use std::f64::consts::PI;

use tuft_mesh::{Panel, Point, Vector};

use crate::influence::triangle::solid_angle;

/// Velocity per unit source and per unit doublet strength of a triangle,
/// and its solid angle `D` at the point (for the inside test).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PanelVelocity {
    /// Velocity per unit `sigma`, 1/(4 pi) included.
    pub source: Vector,
    /// Velocity per unit `mu`, 1/(4 pi) included.
    pub doublet: Vector,
    /// Solid angle `D` the panel subtends at the point, steradians.
    pub solid_angle: f64,
}

/// Exact kernels within `far_field_ratio` panel sizes, point singularities
/// beyond.
pub fn panel_velocity(p: &Point, panel: &Panel, far_field_ratio: f64) -> PanelVelocity {
    let r = p - panel.centroid;
    let limit = far_field_ratio * panel.size;
    if r.norm_squared() > limit * limit {
        far(&r, panel)
    } else {
        exact(p, panel)
    }
}

fn far(r: &Vector, panel: &Panel) -> PanelVelocity {
    let n = panel.normal.into_inner();
    let d2 = r.norm_squared();
    let d = d2.sqrt();
    let d3 = d2 * d;
    let k = panel.area / (4.0 * PI);
    let nr = n.dot(r);
    PanelVelocity {
        source: -r * (k / d3),
        doublet: -(n / d3 - r * (3.0 * nr / (d3 * d2))) * k,
        solid_angle: panel.area * nr / d3,
    }
}

fn exact(p: &Point, panel: &Panel) -> PanelVelocity {
    let n = panel.normal.into_inner();
    let rel = panel.vertices.map(|v| v - p);
    let dsolid = solid_angle(&rel[0], &rel[1], &rel[2]);
    let mut in_plane = Vector::zeros();
    for k in 0..3 {
        let k1 = (k + 1) % 3;
        let edge = panel.vertices[k1] - panel.vertices[k];
        let d = edge.norm();
        let (ra, rb) = (rel[k].norm(), rel[k1].norm());
        let den = ra + rb - d;
        if den > 1e-12 * (ra + rb) {
            in_plane += edge.cross(&n) / d * ((ra + rb + d) / den).ln();
        }
    }
    PanelVelocity {
        source: -(in_plane + n * dsolid) / (4.0 * PI),
        doublet: ring_velocity(p, &panel.vertices),
        solid_angle: dsolid,
    }
}

/// Velocity of a closed vortex ring of unit circulation through `corners`
/// (in order, closing back to the first), Biot-Savart for straight
/// segments (Katz & Plotkin 2001, eq. 10.115):
/// `v = (r1 x r2)/|r1 x r2|^2 (r0 . (r1/|r1| - r2/|r2|)) / (4 pi)`,
/// `r1 = P - A`, `r2 = P - B`, `r0 = B - A`. Zero on a segment's line.
pub fn ring_velocity(p: &Point, corners: &[Point]) -> Vector {
    let mut v = Vector::zeros();
    for (k, a) in corners.iter().enumerate() {
        let b = corners[(k + 1) % corners.len()];
        let (r1, r2) = (p - a, p - b);
        let r0 = b - a;
        let c = r1.cross(&r2);
        let c2 = c.norm_squared();
        let (n1, n2) = (r1.norm(), r2.norm());
        if c2 <= 1e-20 * r0.norm_squared() * (n1 * n1 + n2 * n2) {
            continue;
        }
        v += c * (r0.dot(&(r1 / n1 - r2 / n2)) / c2);
    }
    v / (4.0 * PI)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::influence::triangle;

    fn panel() -> Panel {
        Panel::new([
            Point::new(0.1, -0.2, 0.05),
            Point::new(1.0, 0.1, -0.1),
            Point::new(0.2, 0.9, 0.2),
        ])
        .unwrap_or_else(|| unreachable!())
    }

    /// The kernels are the gradients of the exact potential integrals
    /// (Newman 1986; van Oosterom & Strackee 1983): central differences of
    /// `S/(4 pi)` and `-D/(4 pi)` with step 1e-5 agree to 1e-7 at points
    /// near and far, on both sides.
    #[test]
    fn kernels_are_gradients_of_the_potential() {
        let t = panel();
        let h = 1e-5;
        for p in [
            Point::new(0.4, 0.3, 0.3),
            Point::new(0.4, 0.3, -0.2),
            Point::new(-0.5, 1.5, 0.1),
            Point::new(3.0, -2.0, 1.0),
        ] {
            let v = exact(&p, &t);
            let mut gs = Vector::zeros();
            let mut gd = Vector::zeros();
            for k in 0..3 {
                let mut dp = Vector::zeros();
                dp[k] = h;
                let (a, b) = (
                    triangle::exact(&(p + dp), &t),
                    triangle::exact(&(p - dp), &t),
                );
                gs[k] = (a.source - b.source) / (2.0 * h) / (4.0 * PI);
                gd[k] = -(a.doublet - b.doublet) / (2.0 * h) / (4.0 * PI);
            }
            assert!((v.source - gs).norm() < 1e-7, "{p} {v:?} {gs}");
            assert!((v.doublet - gd).norm() < 1e-7, "{p} {v:?} {gd}");
        }
    }

    /// The point-singularity kernels approach the exact ones as
    /// `(size/r)^2` (Katz & Plotkin 2001, eq. 10.91): 1e-3 relative at
    /// 30 panel sizes.
    #[test]
    fn far_field_matches_exact_far_away() {
        let t = panel();
        let p = Point::new(20.0, -25.0, 30.0);
        let (e, f) = (exact(&p, &t), far(&(p - t.centroid), &t));
        assert!((e.source - f.source).norm() < 1e-3 * e.source.norm());
        assert!((e.doublet - f.doublet).norm() < 1e-3 * e.doublet.norm());
    }
}
