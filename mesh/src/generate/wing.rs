//! Rectangular wing with a NACA 4-digit section and a sharp trailing edge.

use super::builder::{Builder, cluster_both};
use super::{positive, require, unit_interval};
use crate::{MeshError, Point, TriMesh};

/// Settings of [`wing_with_params`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct WingParams {
    /// Span b, metres (the wing runs from y = -b/2 to b/2).
    pub span: f64,
    /// Chord c, metres.
    pub chord: f64,
    /// Maximum camber as a fraction of the chord (first digit / 100).
    pub max_camber: f64,
    /// Chordwise position of the maximum camber as a fraction of the chord
    /// (second digit / 10); unused when `max_camber` is zero.
    pub camber_position: f64,
    /// Maximum thickness as a fraction of the chord (last two digits / 100).
    pub thickness: f64,
    /// Angle of attack, degrees, nose up positive: a rotation about the
    /// quarter-chord line (parallel to y).
    pub alpha_deg: f64,
    /// Height of the quarter-chord line above the ground plane z = 0, metres.
    pub height: f64,
    /// Panels along the chord on each surface (cosine spaced).
    pub chord_panels: usize,
    /// Panels along the span.
    pub span_panels: usize,
    /// Clustering of the spanwise stations towards the tips: 0 uniform,
    /// 1 full cosine.
    pub span_clustering: f64,
    /// Round the tips: each tip section is closed by half a turn of the
    /// local half-thickness about the mean line, which adds that
    /// half-thickness (at most t c / 2) to each end of the span. Flat tips
    /// when false.
    pub rounded_tips: bool,
}

impl Default for WingParams {
    /// NACA 0012, chord 0.2 m, aspect ratio 6 (a usual size for checking a
    /// lift slope against Helmbold's formula; common practice), at zero
    /// incidence one chord above the ground, 24 x 24 panels per surface.
    fn default() -> Self {
        Self {
            span: 1.2,
            chord: 0.2,
            max_camber: 0.0,
            camber_position: 0.4,
            thickness: 0.12,
            alpha_deg: 0.0,
            height: 0.2,
            chord_panels: 24,
            span_panels: 24,
            span_clustering: 0.5,
            rounded_tips: false,
        }
    }
}

impl WingParams {
    /// The section of a 4-digit designation, e.g. `"2412"`: camber 2 %,
    /// at 40 % chord, 12 % thick. `None` unless four digits.
    pub fn naca(mut self, digits: &str) -> Option<Self> {
        let d: Vec<u32> = digits
            .chars()
            .map(|c| c.to_digit(10))
            .collect::<Option<_>>()?;
        let [m, p, t1, t2] = d[..] else { return None };
        self.max_camber = f64::from(m) / 100.0;
        self.camber_position = f64::from(p) / 10.0;
        self.thickness = f64::from(10 * t1 + t2) / 100.0;
        Some(self)
    }
}

/// A wing mesh and the edges of its sharp trailing edge.
#[derive(Debug, Clone, PartialEq)]
pub struct WingMesh {
    /// The closed, outward surface.
    pub mesh: TriMesh,
    /// Trailing-edge edges as vertex pairs, tip to tip along +y. Upper and
    /// lower surfaces share these vertices.
    pub trailing_edge: Vec<[u32; 2]>,
}

/// NACA 4-digit half-thickness at chord fraction `x` for thickness ratio
/// `t`, with the closed trailing edge (last coefficient -0.1036 instead of
/// -0.1015, so the thickness is zero at x = 1; the usual sharp-edged
/// variant). Abbott & von Doenhoff, *Theory of Wing Sections* (1959),
/// sec. 6.4, "NACA four-digit wing sections".
pub fn naca_half_thickness(x: f64, t: f64) -> f64 {
    5.0 * t
        * (0.2969 * x.sqrt() - 0.1260 * x - 0.3516 * x.powi(2) + 0.2843 * x.powi(3)
            - 0.1036 * x.powi(4))
}

/// NACA 4-digit mean line height and slope at chord fraction `x`: two
/// parabolas meeting at the maximum camber `m` at `p`. Abbott & von
/// Doenhoff (1959), sec. 6.4.
pub fn naca_camber(x: f64, m: f64, p: f64) -> (f64, f64) {
    if m == 0.0 {
        (0.0, 0.0)
    } else if x < p {
        (
            m / (p * p) * (2.0 * p * x - x * x),
            2.0 * m / (p * p) * (p - x),
        )
    } else {
        let q = (1.0 - p).powi(2);
        (
            m / q * (1.0 - 2.0 * p + 2.0 * p * x - x * x),
            2.0 * m / q * (p - x),
        )
    }
}

/// Upper and lower surface points (chord fractions, section plane x-z) at
/// `x`: the half thickness laid off normal to the mean line. Abbott & von
/// Doenhoff (1959), sec. 6.2. The leading and trailing edge give
/// one point.
fn section_point(x: f64, w: &WingParams) -> [(f64, f64); 2] {
    let (yc, slope) = naca_camber(x, w.max_camber, w.camber_position);
    let yt = if x >= 1.0 {
        0.0
    } else {
        naca_half_thickness(x, w.thickness)
    };
    let th = slope.atan();
    let (s, c) = th.sin_cos();
    [(x - yt * s, yc + yt * c), (x + yt * s, yc - yt * c)]
}

/// Rectangular NACA 4-digit wing with flat tips; see [`wing_with_params`].
pub fn wing(span: f64, chord: f64, naca: &str, alpha_deg: f64) -> Result<WingMesh, MeshError> {
    let params = WingParams {
        span,
        chord,
        alpha_deg,
        ..WingParams::default()
    };
    let params = params.naca(naca).ok_or(MeshError::InvalidParameter {
        name: "naca",
        value: f64::NAN,
        reason: "a 4-digit section is four decimal digits such as 0012".into(),
    })?;
    wing_with_params(&params)
}

/// Rectangular wing: span along y centred on y = 0, leading edge at x = 0
/// before the incidence is applied, cosine spacing along the chord, flat
/// closed tips, quarter chord at z = `height`. The trailing edge is one row
/// of vertices shared by both surfaces, listed in [`WingMesh::trailing_edge`].
///
/// # Errors
/// [`MeshError::InvalidParameter`] for non-positive sizes, a thickness
/// outside (0, 0.4], camber outside [0, 0.095] or its position outside
/// (0, 1), |alpha| of 45 degrees or more, fewer than 2 chordwise panels or
/// no spanwise panel, or more than [`MAX_PANELS`](super::MAX_PANELS)
/// chordwise times spanwise panels.
pub fn wing_with_params(w: &WingParams) -> Result<WingMesh, MeshError> {
    validate(w)?;
    let n = w.chord_panels;
    let xs: Vec<f64> = (0..=n)
        .map(|k| 0.5 * (1.0 - (std::f64::consts::PI * k as f64 / n as f64).cos()))
        .collect();
    let section: Vec<[(f64, f64); 2]> = xs.iter().map(|&x| section_point(x, w)).collect();
    // Around the section: lower trailing edge -> leading edge -> upper trailing edge.
    let around: Vec<(f64, f64)> = (0..=n)
        .rev()
        .map(|k| section[k][1])
        .chain((1..=n).map(|k| section[k][0]))
        .collect();
    let place = placement(w);
    let ys: Vec<f64> = (0..=w.span_panels)
        .map(|j| w.span * (cluster_both(j as f64 / w.span_panels as f64, w.span_clustering) - 0.5))
        .collect();
    let mut builder = Builder::default();
    let rows: Vec<Vec<Point>> = ys
        .iter()
        .map(|&y| around.iter().map(|&(x, z)| place(x, y, z)).collect())
        .collect();
    let ids = builder.grid(&rows, true);
    for (y, side) in [(ys[0], -1.0), (ys[w.span_panels], 1.0)] {
        let rows: Vec<Vec<u32>> = (0..=n)
            .map(|k| builder.row(&tip_row(w, &section, &xs, k, y, side, &place)))
            .collect();
        for pair in rows.windows(2) {
            builder.zip(&pair[0], &pair[1], side > 0.0);
        }
    }
    let (mesh, remap) = builder.finish(1e-9 * w.span.max(w.chord));
    let te: Vec<u32> = ids.iter().map(|row| remap[row[0] as usize]).collect();
    let trailing_edge = te.windows(2).map(|p| [p[0], p[1]]).collect();
    Ok(WingMesh {
        mesh,
        trailing_edge,
    })
}

/// Points across the tip at chord station `k`, from the lower to the upper
/// surface: a straight segment for a flat tip; for a rounded tip half an
/// ellipse about the mid point, bulging by the half-thickness towards
/// `side` (-1 or +1 in y), with about as many intervals as keep them near
/// the local chordwise spacing.
fn tip_row(
    w: &WingParams,
    section: &[[(f64, f64); 2]],
    xs: &[f64],
    k: usize,
    y: f64,
    side: f64,
    place: &impl Fn(f64, f64, f64) -> Point,
) -> Vec<Point> {
    let [u, l] = section[k];
    if !w.rounded_tips {
        return vec![place(l.0, y, l.1), place(u.0, y, u.1)];
    }
    let (mx, mz, dx, dz) = (
        0.5 * (u.0 + l.0),
        0.5 * (u.1 + l.1),
        0.5 * (u.0 - l.0),
        0.5 * (u.1 - l.1),
    );
    let r = dx.hypot(dz);
    let n = xs.len() - 1;
    let spacing = 0.5 * (xs[(k + 1).min(n)] - xs[k.saturating_sub(1)]);
    let m = ((std::f64::consts::PI * r / spacing).round() as usize).clamp(1, 16);
    (0..=m)
        .map(|j| {
            let (s, c) = (std::f64::consts::PI * j as f64 / m as f64).sin_cos();
            let (s, c) = if j == m { (0.0, -1.0) } else { (s, c) };
            place(mx - dx * c, y + side * w.chord * r * s, mz - dz * c)
        })
        .collect()
}

/// Chord fractions and span position to metres: scale by the chord, turn
/// nose up by alpha about the quarter chord (a rotation about +y by alpha
/// lifts points ahead of it), put the quarter chord at (c/4, y, height).
fn placement(w: &WingParams) -> impl Fn(f64, f64, f64) -> Point {
    let (s, c) = w.alpha_deg.to_radians().sin_cos();
    let (chord, height) = (w.chord, w.height);
    move |x, y, z| {
        let (dx, dz) = ((x - 0.25) * chord, z * chord);
        Point::new(0.25 * chord + dx * c + dz * s, y, height - dx * s + dz * c)
    }
}

fn validate(w: &WingParams) -> Result<(), MeshError> {
    positive("span", w.span)?;
    positive("chord", w.chord)?;
    let t = w.thickness;
    require("thickness", t, t > 0.0 && t <= 0.4, "must lie in (0, 0.4]")?;
    let m = w.max_camber;
    require(
        "max_camber",
        m,
        (0.0..=0.095).contains(&m),
        "must lie in [0, 0.095]",
    )?;
    let p = w.camber_position;
    require(
        "camber_position",
        p,
        m == 0.0 || (p > 0.0 && p < 1.0),
        "must lie in (0, 1)",
    )?;
    let a = w.alpha_deg;
    require(
        "alpha_deg",
        a,
        a.abs() < 45.0,
        "must be below 45 degrees in size",
    )?;
    require("height", w.height, w.height.is_finite(), "must be finite")?;
    let nc = w.chord_panels as f64;
    require(
        "chord_panels",
        nc,
        w.chord_panels >= 2,
        "must be at least 2",
    )?;
    let ns = w.span_panels as f64;
    require("span_panels", ns, w.span_panels >= 1, "must be at least 1")?;
    super::panel_count(
        "chord_panels x span_panels",
        w.chord_panels.saturating_mul(w.span_panels),
    )?;
    unit_interval("span_clustering", w.span_clustering)
}

#[cfg(test)]
mod tests {
    use super::super::check;
    use super::*;

    /// Section area of a 4-digit section per unit chord², integrating the
    /// thickness 2 y_t(x) numerically: Simpson's rule in x = (1 - cos b)/2,
    /// which takes away the square root at the nose.
    fn thickness_integral(t: f64) -> f64 {
        let n = 4000;
        let h = std::f64::consts::PI / n as f64;
        (0..=n)
            .map(|k| {
                let b = k as f64 * h;
                let x = 0.5 * (1.0 - b.cos());
                let wgt = check::simpson_weight(k, n);
                wgt * 2.0 * naca_half_thickness(x, t) * 0.5 * b.sin()
            })
            .sum::<f64>()
            * h
            / 3.0
    }

    #[test]
    fn section_area_is_about_0685_t_c2() {
        // About 0.685 t c² for the NACA 00tt section (from memory, with the
        // open trailing edge); the closed trailing edge takes off a little
        // (-0.0021 x 10 t / 5 in the last term), so allow 1 %.
        let k = thickness_integral(0.12) / 0.12;
        assert!((k / 0.685 - 1.0).abs() < 0.01, "area / (t c²) = {k}");
    }

    #[test]
    fn wings_are_closed_outward_with_the_section_volume() {
        // Volume = span x section area; the inscribed cosine-spaced polygon
        // loses area of order 1/n²: 1.5 % at 12 chordwise panels, 0.3 % at
        // 32, and the error must fall at least four-fold between the two
        // ((32/12)² = 7.1 for second order).
        for (digits, alpha) in [("0012", 0.0), ("0006", 8.0), ("2412", -4.0), ("4418", 12.0)] {
            let mut errors = Vec::new();
            for (chord_panels, tol) in [(12, 0.015), (32, 0.003)] {
                let p = WingParams {
                    chord_panels,
                    span_panels: 10,
                    alpha_deg: alpha,
                    ..WingParams::default()
                }
                .naca(digits)
                .unwrap();
                let w = wing_with_params(&p).unwrap();
                check::closed_outward(&w.mesh);
                let exact = p.span * p.chord.powi(2) * thickness_integral(p.thickness);
                let err = w.mesh.signed_volume() / exact - 1.0;
                // Camber changes the area only at second order in the
                // mean-line slope (at most 2m/p = 0.2 here: 1 %).
                let tol = if p.max_camber > 0.0 { tol + 0.01 } else { tol };
                assert!(
                    err.abs() < tol,
                    "{digits} n={chord_panels}: volume error {err}"
                );
                errors.push(err.abs());
                // Cosine spacing makes the panels at the leading and
                // trailing edges long and thin, as usual for lifting
                // surfaces: the smallest angle is set by the shortest chord
                // step, c pi² / (4 n²), against the widest span step; no
                // triangle may be worse than half of that ratio's angle.
                let dx =
                    p.chord * std::f64::consts::PI.powi(2) / (4.0 * (chord_panels as f64).powi(2));
                let dy = p.span / p.span_panels as f64 * 1.5;
                check::min_angle_above(&w.mesh, 0.5 * (dx / dy).atan().to_degrees());
            }
            if digits.starts_with("00") {
                assert!(errors[1] < errors[0] / 4.0, "{digits}: {errors:?}");
            }
        }
    }

    #[test]
    fn rounded_tips_add_half_a_body_of_revolution_at_each_end() {
        // Each rounded tip is half a solid of revolution of radius y_t
        // about the mean line: volume (pi/2) c³ integral of y_t² dx per tip
        // (Pappus-free direct integration, Simpson's rule in x = (1 - cos b)/2).
        let p = WingParams {
            rounded_tips: true,
            chord_panels: 32,
            ..WingParams::default()
        };
        let w = wing_with_params(&p).unwrap();
        check::closed_outward(&w.mesh);
        let n = 4000;
        let h = std::f64::consts::PI / n as f64;
        let yt2: f64 = (0..=n)
            .map(|k| {
                let b = k as f64 * h;
                let x = 0.5 * (1.0 - b.cos());
                let wgt = check::simpson_weight(k, n);
                wgt * naca_half_thickness(x, p.thickness).powi(2) * 0.5 * b.sin()
            })
            .sum::<f64>()
            * h
            / 3.0;
        let caps = std::f64::consts::PI * p.chord.powi(3) * yt2;
        let exact = p.span * p.chord.powi(2) * thickness_integral(p.thickness) + caps;
        let err = w.mesh.signed_volume() / exact - 1.0;
        // The 0.3 % bound of the flat-tipped wing at 32 chordwise panels,
        // plus the caps' own inscribed-polygon deficit (arcs cut into
        // steps of the chordwise spacing, a few percent of the caps'
        // 4 % share of the volume): 0.5 %.
        assert!(err.abs() < 0.005, "volume error {err}");
        let dx = p.chord * std::f64::consts::PI.powi(2) / (4.0 * 32f64.powi(2));
        let dy = p.span / p.span_panels as f64 * 1.5;
        check::min_angle_above(&w.mesh, 0.5 * (dx / dy).atan().to_degrees());
        // The span grows by the largest half-thickness at each end
        // (0.06 c at 30 % chord for NACA 0012, from memory; derived here).
        let (lo, hi) = w.mesh.bounds().unwrap();
        let t_max = (0..1000)
            .map(|k| naca_half_thickness(k as f64 / 1000.0, p.thickness))
            .fold(0.0, f64::max);
        let grow = hi.y - lo.y - p.span;
        assert!(
            (grow / (2.0 * p.chord * t_max) - 1.0).abs() < 0.01,
            "span grows {grow}"
        );
    }

    #[test]
    fn trailing_edge_is_one_shared_row_at_the_rotated_position() {
        let p = WingParams {
            alpha_deg: 10.0,
            ..WingParams::default()
        };
        let w = wing_with_params(&p).unwrap();
        assert_eq!(w.trailing_edge.len(), p.span_panels);
        // Nose up: the trailing edge drops by (3/4) c sin(alpha) below the
        // quarter chord and sits (3/4) c cos(alpha) behind it (geometry).
        let a = 10f64.to_radians();
        for &[i, j] in &w.trailing_edge {
            let (pi, pj) = (w.mesh.vertices[i as usize], w.mesh.vertices[j as usize]);
            assert!(pj.y > pi.y);
            assert!((pi.z - (p.height - 0.75 * p.chord * a.sin())).abs() < 1e-12);
            assert!((pi.x - (0.25 + 0.75 * a.cos()) * p.chord).abs() < 1e-12);
        }
        // Every trailing-edge edge joins an upper and a lower panel at a
        // sharp angle (the closed-TE NACA 0012 wedge is about 16 degrees
        // (from memory), so the normals differ by more than 150 degrees).
        let nb = crate::panels::edge_neighbours(&w.mesh.triangles);
        let mut found = 0;
        for (t, tri) in w.mesh.triangles.iter().enumerate() {
            for k in 0..3 {
                let e = [tri[k], tri[(k + 1) % 3]];
                let on_te = w
                    .trailing_edge
                    .iter()
                    .any(|&[a, b]| e == [a, b] || e == [b, a]);
                if let (true, Some(o)) = (on_te, nb[t][k]) {
                    let n1 = w.mesh.area_vector(t).normalize();
                    let n2 = w.mesh.area_vector(o as usize).normalize();
                    assert!(n1.angle(&n2).to_degrees() > 150.0);
                    found += 1;
                }
            }
        }
        assert_eq!(found, 2 * p.span_panels);
    }

    #[test]
    fn bad_sections_are_errors() {
        assert!(wing(1.0, 0.2, "12", 0.0).is_err());
        assert!(wing(1.0, 0.2, "0000", 0.0).is_err());
        assert!(wing(-1.0, 0.2, "0012", 0.0).is_err());
    }
}
