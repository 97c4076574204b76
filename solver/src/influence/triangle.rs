//! Exact influence of a flat triangle carrying a unit constant-strength
//! source and a unit constant-strength doublet.
//!
//! Doublet: the signed solid angle by van Oosterom & Strackee (IEEE Trans.
//! Biomed. Eng. 30, 1983). Source: the closed form of Newman
//! (J. Ship Res. 30, 1986 (from memory); Hess & Smith 1967 for the same
//! integral), written edge by edge with logarithms and the solid angle.

use tuft_mesh::{Panel, Point};

/// Raw integrals over one triangle, without the `1/(4 pi)` factor.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RawIntegrals {
    /// `S = \int 1/|P - Q| dS_Q`, metres.
    pub source: f64,
    /// `D = \int n.(P - Q)/|P - Q|^3 dS_Q`, the solid angle (steradians)
    /// the triangle subtends at `P`, positive on the side `n` points to.
    pub doublet: f64,
}

/// Signed solid angle of triangle `(a, b, c)` (corners already relative to
/// the field point, i.e. `a = A - P`), positive when `P` is on the side the
/// counter-clockwise normal points to.
///
/// van Oosterom & Strackee (1983):
/// `tan(Omega/2) = a.(b x c) / (|a||b||c| + (a.b)|c| + (a.c)|b| + (b.c)|a|)`.
/// Their `Omega` is positive for `P` behind the counter-clockwise face, so
/// the sign is flipped here to match `D`.
pub fn solid_angle(
    a: &nalgebra::Vector3<f64>,
    b: &nalgebra::Vector3<f64>,
    c: &nalgebra::Vector3<f64>,
) -> f64 {
    let (ra, rb, rc) = (a.norm(), b.norm(), c.norm());
    let num = a.dot(&b.cross(c));
    let den = ra * rb * rc + a.dot(b) * rc + a.dot(c) * rb + b.dot(c) * ra;
    -2.0 * num.atan2(den)
}

/// Exact source and doublet integrals of `panel` at `p`.
///
/// `S = sum_k h_k ln((r_k + r_{k+1} + d_k) / (r_k + r_{k+1} - d_k)) - z D`
/// (Newman 1986, edge form (from memory)), with `z` the height of `p` above the
/// panel plane along `n`, `h_k` the in-plane distance from the projection
/// of `p` to edge `k` (positive on the panel's side of the edge), `d_k` the
/// edge length and `r_k` the distance from `p` to corner `k`.
///
/// A point in the panel plane and inside the triangle has no unique solid
/// angle (it jumps by `4 pi` across the panel); there `D` is the limit from
/// the inside of the body, `-2 pi` (the Dirichlet collocation side, Katz &
/// Plotkin 2001, ch. 10 (from memory)). On an edge line the `0 * ln(0)` term is zero.
pub fn exact(p: &Point, panel: &Panel) -> RawIntegrals {
    let n = panel.normal.into_inner();
    let rel = panel.vertices.map(|v| v - p);
    let r = rel.map(|v| v.norm());
    let z = -rel[0].dot(&n);
    let doublet = if z.abs() <= 1e-12 * panel.size {
        in_plane_solid_angle(p, panel)
    } else {
        solid_angle(&rel[0], &rel[1], &rel[2])
    };
    let mut edge_sum = 0.0;
    for k in 0..3 {
        let k1 = (k + 1) % 3;
        let edge = panel.vertices[k1] - panel.vertices[k];
        let d = edge.norm();
        let outward = edge.cross(&n) / d;
        let h = rel[k].dot(&outward);
        let (sum, den) = (r[k] + r[k1], r[k] + r[k1] - d);
        if den > 1e-14 * sum && h != 0.0 {
            edge_sum += h * ((sum + d) / den).ln();
        }
    }
    RawIntegrals {
        source: edge_sum - z * doublet,
        doublet,
    }
}

/// Solid angle for a point in the panel plane: `-2 pi` strictly inside the
/// triangle (inside-body limit), zero outside or on the boundary.
fn in_plane_solid_angle(p: &Point, panel: &Panel) -> f64 {
    let n = panel.normal.into_inner();
    let inside = (0..3).all(|k| {
        let a = panel.vertices[k];
        let b = panel.vertices[(k + 1) % 3];
        (b - a).cross(&(p - a)).dot(&n) > 1e-12 * panel.size * panel.size
    });
    if inside {
        -2.0 * std::f64::consts::PI
    } else {
        0.0
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn unit_triangle() -> Panel {
        Panel::new([
            Point::new(0.0, 0.0, 0.0),
            Point::new(1.0, 0.0, 0.0),
            Point::new(0.0, 1.0, 0.0),
        ])
        .unwrap_or_else(|| unreachable!())
    }

    /// Far away both integrals tend to the point values `A/r` and (to the
    /// second-order term, about `(size/r)^2 = 1e-4` relative)
    /// `A z / r^3` (Katz & Plotkin 2001, ch. 10 (from memory)); the solid angle is
    /// positive on the normal side by definition.
    #[test]
    fn far_limits_and_signs() {
        let t = unit_triangle();
        for z in [100.0, -100.0] {
            let p = Point::new(1.0 / 3.0, 1.0 / 3.0, z);
            let e = exact(&p, &t);
            let r = z.abs();
            assert!((e.source - 0.5 / r).abs() < 1e-4 * 0.5 / r, "{e:?}");
            assert!((e.doublet - 0.5 * z / r.powi(3)).abs() < 1e-4 * 0.5 / (r * r));
        }
    }

    /// Just above and below the centroid the solid angle tends to +-2 pi.
    #[test]
    fn near_limits() {
        let t = unit_triangle();
        let up = exact(&Point::new(0.3, 0.3, 1e-9), &t).doublet;
        let down = exact(&Point::new(0.3, 0.3, -1e-9), &t).doublet;
        let on = exact(&Point::new(0.3, 0.3, 0.0), &t).doublet;
        let tau = 2.0 * std::f64::consts::PI;
        assert!((up - tau).abs() < 1e-6 && (down + tau).abs() < 1e-6);
        assert!((on + tau).abs() < 1e-15);
    }
}
