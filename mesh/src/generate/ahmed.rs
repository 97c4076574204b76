//! Slant-back bluff body of the Ahmed type (Ahmed, Ramm & Faltin 1984).

use std::f64::consts::{FRAC_PI_2, FRAC_PI_4};

use super::builder::{Builder, cluster_both, cluster_end, cluster_start, stations};
use super::{positive, require, unit_interval};
use crate::{MeshError, Point, TriMesh};

/// Settings of [`ahmed_with_params`]. Dimensions after Ahmed, Ramm &
/// Faltin, "Some salient features of the time-averaged ground vehicle
/// wake", SAE 840300 (1984): length 1044 mm, width 389 mm, height 288 mm,
/// front edges rounded with radius 100 mm, rear slant module 222 mm long,
/// 50 mm ground clearance (all from memory); the body stood on four
/// stilts, which are left out here.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AhmedParams {
    /// Slant angle from the horizontal, degrees, 0 (square back) to 40.
    pub slant_deg: f64,
    /// Gap between the ground plane z = 0 and the flat underside, metres.
    pub clearance: f64,
    /// Length, metres (1.044, from memory).
    pub length: f64,
    /// Width, metres (0.389, from memory).
    pub width: f64,
    /// Height, metres (0.288, from memory).
    pub height: f64,
    /// Radius of the rounded front edges, metres (0.100, from memory).
    pub nose_radius: f64,
    /// Length along x of the rear slant module, metres (0.222, from memory).
    pub slant_length: f64,
    /// Target number of triangles on the full body (within about 15 %).
    pub panels: usize,
    /// Clustering towards the sharp edges (0 uniform, 1 cosine).
    pub clustering: f64,
    /// Only the y >= 0 half, open exactly on y = 0.
    pub half: bool,
}

impl Default for AhmedParams {
    /// The 25-degree slant of the published experiments, 4,000 panels.
    fn default() -> Self {
        Self {
            slant_deg: 25.0,
            clearance: 0.050,
            length: 1.044,
            width: 0.389,
            height: 0.288,
            nose_radius: 0.100,
            slant_length: 0.222,
            panels: 4000,
            clustering: 0.5,
            half: false,
        }
    }
}

/// Ahmed-type body with slant angle `slant_deg` and otherwise the default
/// (published) dimensions; see [`ahmed_with_params`].
pub fn ahmed(slant_deg: f64, panels: usize) -> Result<TriMesh, MeshError> {
    ahmed_with_params(&AhmedParams {
        slant_deg,
        panels,
        ..AhmedParams::default()
    })
}

/// Ahmed-type body, nose at x = 0, centred on y = 0, underside at
/// z = `clearance`. Flat sides, roof and floor with sharp long edges; the
/// front face is flat and joined to roof, floor and sides by quarter
/// cylinders of the nose radius; at the four front corners the crossing of
/// the two roundings is blended (a spherical corner at the front face,
/// fading into the sharp long edge where the rounding ends: our choice, the
/// drawings do not settle it). The rear slant is a plane from the roof
/// edge down to a flat vertical base, with sharp edges. Closed and outward
/// (or, with `half`, open on y = 0).
///
/// # Errors
/// [`MeshError::InvalidParameter`] for a slant outside [0, 40] degrees, a
/// negative clearance, non-positive dimensions, a nose radius of half the
/// width or height or more, a slant module that reaches the nose, or a
/// panel count outside [1, [`MAX_PANELS`](super::MAX_PANELS)].
pub fn ahmed_with_params(p: &AhmedParams) -> Result<TriMesh, MeshError> {
    validate(p)?;
    super::panel_count("panels", p.panels)?;
    let shape = Shape::new(p);
    let area = 2.0 * (p.length * (p.width + p.height) + p.width * p.height);
    let mut size = (2.0 * area / p.panels.max(8) as f64).sqrt();
    for _ in 0..2 {
        let plan = Plan::new(&shape, size, p.clustering);
        size *= (plan.triangles(&shape) / p.panels.max(8) as f64).sqrt();
    }
    let plan = Plan::new(&shape, size, p.clustering);
    let mut builder = Builder::default();
    let rings: Vec<[Vec<Point>; 3]> = plan.x.iter().map(|&x| plan.ring(&shape, x)).collect();
    let ids: Vec<[Vec<u32>; 3]> = rings
        .iter()
        .map(|r| r.each_ref().map(|seg| builder.row(seg)))
        .collect();
    for pair in ids.windows(2) {
        for (a, b) in pair[0].iter().zip(&pair[1]) {
            builder.zip(a, b, true);
        }
    }
    builder.grid(&Plan::cap(&rings[0]), true);
    builder.grid(&Plan::cap(&rings[rings.len() - 1]), false);
    if !p.half {
        builder.mirror_y();
    }
    Ok(builder.finish(1e-9 * p.length).0)
}

fn validate(p: &AhmedParams) -> Result<(), MeshError> {
    let s = p.slant_deg;
    require(
        "slant_deg",
        s,
        (0.0..=40.0).contains(&s),
        "must lie in [0, 40]",
    )?;
    let c = p.clearance;
    require(
        "clearance",
        c,
        c.is_finite() && c >= 0.0,
        "must be zero or more",
    )?;
    for (name, v) in [
        ("length", p.length),
        ("width", p.width),
        ("height", p.height),
        ("nose_radius", p.nose_radius),
        ("slant_length", p.slant_length),
    ] {
        positive(name, v)?;
    }
    let r = p.nose_radius;
    let fits = 2.0 * r < p.width.min(p.height);
    require(
        "nose_radius",
        r,
        fits,
        "must be below half the width and height",
    )?;
    let free = p.slant_length + r < p.length;
    require(
        "slant_length",
        p.slant_length,
        free,
        "the slant reaches the nose rounding",
    )?;
    let drop = p.slant_length * s.to_radians().tan();
    require(
        "slant_deg",
        s,
        drop < p.height,
        "the slant cuts through the floor",
    )?;
    unit_interval("clustering", p.clustering)
}

/// The body's dimensions as the section builder needs them.
struct Shape {
    length: f64,
    half_width: f64,
    floor: f64,
    roof: f64,
    radius: f64,
    slant_start: f64,
    slant_slope: f64,
}

/// One cross-section: half width, floor and top heights, corner radius.
struct Section {
    half_width: f64,
    bottom: f64,
    top: f64,
    corner: f64,
}

impl Shape {
    fn new(p: &AhmedParams) -> Self {
        Self {
            length: p.length,
            half_width: 0.5 * p.width,
            floor: p.clearance,
            roof: p.clearance + p.height,
            radius: p.nose_radius,
            slant_start: p.length - p.slant_length,
            slant_slope: p.slant_deg.to_radians().tan(),
        }
    }

    /// The section at `x`: within the nose radius the quarter-circle
    /// rounding r(x) = sqrt(R² - (R - x)²) sets the inset R - r of floor,
    /// roof and sides, and the corner radius r (1 - x/R) blends the front
    /// corners; behind the slant edge the top follows the slant.
    fn section(&self, x: f64) -> Section {
        let r_nose = self.radius;
        let (inset, corner) = if x < r_nose {
            let r = (r_nose * r_nose - (r_nose - x).powi(2)).max(0.0).sqrt();
            (r_nose - r, r * (1.0 - x / r_nose))
        } else {
            (0.0, 0.0)
        };
        let slant = (x - self.slant_start).max(0.0) * self.slant_slope;
        Section {
            half_width: self.half_width - inset,
            bottom: self.floor + inset,
            top: self.roof - inset - slant,
            corner,
        }
    }
}

/// A piece of a section outline in the (y, z) plane.
enum Piece {
    Line([f64; 2], [f64; 2]),
    /// Centre, radius, start and end angle (from +y towards +z).
    Arc([f64; 2], f64, f64, f64),
}

impl Piece {
    fn length(&self) -> f64 {
        match *self {
            Piece::Line(a, b) => (b[0] - a[0]).hypot(b[1] - a[1]),
            Piece::Arc(_, r, t0, t1) => r * (t1 - t0).abs(),
        }
    }

    fn at(&self, f: f64) -> [f64; 2] {
        match *self {
            Piece::Line(a, b) => [a[0] + f * (b[0] - a[0]), a[1] + f * (b[1] - a[1])],
            Piece::Arc(c, r, t0, t1) => {
                let t = t0 + f * (t1 - t0);
                [c[0] + r * t.cos(), c[1] + r * t.sin()]
            }
        }
    }
}

/// The point at arc length fraction `f` along a chain of pieces.
fn along(pieces: &[Piece], f: f64) -> [f64; 2] {
    let total: f64 = pieces.iter().map(Piece::length).sum();
    let mut s = f * total;
    for piece in pieces {
        let l = piece.length();
        if s <= l && l > 0.0 {
            return piece.at(s / l);
        }
        s -= l;
    }
    pieces.last().map_or([0.0, 0.0], |p| p.at(1.0))
}

/// Station positions and point counts.
struct Plan {
    x: Vec<f64>,
    /// Intervals on the floor (and roof) from the centre line to the edge.
    n_half_width: usize,
    /// Intervals up the side.
    n_side: usize,
    clustering: f64,
}

impl Plan {
    /// Panel size `size` in the middle; the nose rounding at half that
    /// (uniform in angle round the quarter circle), a quarter of it at the
    /// sharp slant and base edges, sizes growing by at most 30 % of the
    /// distance in between.
    fn new(shape: &Shape, size: f64, clustering: f64) -> Self {
        let r = shape.radius;
        let h_nose = 0.5 * size;
        let h_edge = if shape.slant_slope > 0.0 {
            0.25 * size
        } else {
            size
        };
        let n_nose = ((FRAC_PI_2 * r / h_nose).ceil() as usize).max(3);
        let mut x: Vec<f64> = (0..n_nose)
            .map(|i| r * (1.0 - (FRAC_PI_2 * i as f64 / n_nose as f64).cos()))
            .collect();
        let (xs, l) = (shape.slant_start, shape.length);
        let grow = 0.3;
        let h_nose_end = r * (FRAC_PI_2 / n_nose as f64).sin();
        let middle = stations(r, xs, 1, |t| {
            size.min(h_nose_end + grow * (t - r))
                .min(h_edge + grow * (xs - t))
        });
        x.extend(&middle[..middle.len() - 1]);
        let h_base = 0.25 * size;
        let rear = stations(xs, l, 2, |t| {
            size.min(h_edge + grow * (t - xs))
                .min(h_base + grow * (l - t))
        });
        x.extend(rear);
        Self {
            x,
            n_half_width: ((shape.half_width / size).round() as usize).max(2),
            n_side: (((shape.roof - shape.floor) / size).round() as usize).max(2),
            clustering,
        }
    }

    /// Intervals on the floor (and roof) half width and up the side at
    /// `x`: the mid-body counts scaled with the outline's length, so the
    /// short base behind a steep slant and the small front face keep
    /// near-square panels.
    fn counts(&self, shape: &Shape, x: f64) -> (usize, usize) {
        let s = shape.section(x);
        let c = s.corner;
        let floor = s.half_width - c + c * FRAC_PI_4;
        let side = s.top - s.bottom - 2.0 * c + c * FRAC_PI_2;
        let scale = |n: usize, l: f64, l_mid: f64| ((n as f64 * l / l_mid).round() as usize).max(2);
        (
            scale(self.n_half_width, floor, shape.half_width),
            scale(self.n_side, side, shape.roof - shape.floor),
        )
    }

    /// Triangles on the full body.
    fn triangles(&self, shape: &Shape) -> f64 {
        let n: Vec<(usize, usize)> = self.x.iter().map(|&x| self.counts(shape, x)).collect();
        let tube: usize = n
            .windows(2)
            .map(|w| 2 * (2 * w[0].0 + w[0].1 + 2 * w[1].0 + w[1].1))
            .sum();
        let caps = 4 * (n[0].0 * n[0].1 + n[n.len() - 1].0 * n[n.len() - 1].1);
        (tube + caps) as f64
    }

    /// Half section at `x` in three segments sharing their end points: the
    /// floor from the centre line to the lower corner, the side up to the
    /// upper corner, the roof back to the centre line. Corners (or, where
    /// rounded, the middle of the corner arc) end the segments; points are
    /// clustered towards them.
    fn ring(&self, shape: &Shape, x: f64) -> [Vec<Point>; 3] {
        let s = shape.section(x);
        let (w, b, t, c) = (s.half_width, s.bottom, s.top, s.corner);
        let low = [w - c, b + c];
        let high = [w - c, t - c];
        let floor = [
            Piece::Line([0.0, b], [w - c, b]),
            Piece::Arc(low, c, -FRAC_PI_2, -FRAC_PI_4),
        ];
        let side = [
            Piece::Arc(low, c, -FRAC_PI_4, 0.0),
            Piece::Line([w, b + c], [w, t - c]),
            Piece::Arc(high, c, 0.0, FRAC_PI_4),
        ];
        let roof = [
            Piece::Arc(high, c, FRAC_PI_4, FRAC_PI_2),
            Piece::Line([w - c, t], [0.0, t]),
        ];
        let ((nw, ns), k) = (self.counts(shape, x), self.clustering);
        let point = |[y, z]: [f64; 2]| Point::new(x, y, z);
        let mut floor: Vec<Point> = (0..=nw)
            .map(|j| point(along(&floor, cluster_end(j as f64 / nw as f64, k))))
            .collect();
        let side = (0..=ns)
            .map(|j| point(along(&side, cluster_both(j as f64 / ns as f64, k))))
            .collect();
        let mut roof: Vec<Point> = (0..=nw)
            .map(|j| point(along(&roof, cluster_start(j as f64 / nw as f64, k))))
            .collect();
        floor[0].y = 0.0;
        roof[nw].y = 0.0;
        [floor, side, roof]
    }

    /// The flat end face bounded by `ring` (sharp-cornered), as a grid:
    /// rows along y from the centre line, columns up the side.
    fn cap(ring: &[Vec<Point>; 3]) -> Vec<Vec<Point>> {
        let [floor, side, _] = ring;
        floor
            .iter()
            .map(|f| side.iter().map(|s| Point::new(f.x, f.y, s.z)).collect())
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::super::check;
    use super::*;

    const SLANTS: [f64; 5] = [0.0, 12.5, 25.0, 35.0, 40.0];

    #[test]
    fn bodies_are_closed_outward_with_the_published_box() {
        // Length 1044, width 389, height 288 mm, 50 mm clearance (Ahmed,
        // Ramm & Faltin 1984; from memory). Flat faces: exact to round-off.
        for slant in SLANTS {
            for panels in [1500, 6000] {
                let m = ahmed(slant, panels).unwrap();
                check::closed_outward(&m);
                // Worst where the x-stations crowd at the sharp slant and
                // base edges next to the coarser middle of the side (about
                // 1:4.5).
                check::min_angle_above(&m, 10.0);
                let n = m.len() as f64 / panels as f64;
                assert!((n - 1.0).abs() < 0.25, "{} triangles for {panels}", m.len());
                let (lo, hi) = m.bounds().unwrap();
                let want = ([0.0, -0.1945, 0.050], [1.044, 0.1945, 0.338]);
                for k in 0..3 {
                    assert!((lo[k] - want.0[k]).abs() < 1e-12, "min {lo}");
                    assert!((hi[k] - want.1[k]).abs() < 1e-12, "max {hi}");
                }
            }
        }
    }

    #[test]
    fn slant_measured_from_the_mesh_equals_the_parameter() {
        for slant in SLANTS {
            let m = ahmed(slant, 3000).unwrap();
            // Panels facing up and back (not the roof, not the base): the
            // slant plane, normal (sin s, 0, cos s).
            let mut sum = nalgebra::Vector3::zeros();
            for t in 0..m.len() {
                let a = m.area_vector(t);
                let n = a.normalize();
                if n.z > 0.5 && n.x > 1e-6 {
                    sum += a;
                }
            }
            let measured = sum.x.atan2(sum.z).to_degrees();
            assert!(
                (measured - slant).abs() < 1e-9,
                "{slant}: measured {measured}"
            );
            // Base height = 288 mm - 222 mm tan(slant) (geometry).
            let base_top = m
                .vertices
                .iter()
                .filter(|p| (p.x - 1.044).abs() < 1e-12)
                .map(|p| p.z)
                .fold(f64::MIN, f64::max);
            let want = 0.338 - 0.222 * slant.to_radians().tan();
            assert!((base_top - want).abs() < 1e-12, "base top {base_top}");
        }
    }

    #[test]
    fn half_models_are_open_only_on_the_symmetry_plane() {
        for slant in [0.0, 25.0, 40.0] {
            let p = AhmedParams {
                slant_deg: slant,
                panels: 2000,
                ..AhmedParams::default()
            };
            let full = ahmed_with_params(&p).unwrap();
            let half = ahmed_with_params(&AhmedParams { half: true, ..p }).unwrap();
            check::half_open_on_symmetry_plane(&half);
            // The missing face lies in y = 0, where x . n = 0, so the
            // divergence-theorem volume of the half is half the body's.
            let ratio = half.signed_volume() / full.signed_volume();
            assert!((ratio - 0.5).abs() < 1e-12, "volume ratio {ratio}");
        }
    }

    #[test]
    fn volume_matches_the_box_less_the_roundings_and_the_slant() {
        // Box minus the slant wedge, minus (1 - pi/4) R² W-ish edge strips:
        // the rounded edges take (1 - pi/4) R² per unit length along the
        // four front edges; corners are only bounded, so allow 0.5 %.
        let (l, w, h, r, ls) = (1.044, 0.389, 0.288, 0.1, 0.222);
        for slant in SLANTS {
            let m = ahmed(slant, 6000).unwrap();
            let wedge = 0.5 * ls * ls * slant.to_radians().tan() * w;
            let edges = (1.0 - std::f64::consts::FRAC_PI_4) * r * r * 2.0 * (w + h);
            let approx = l * w * h - wedge - edges;
            let err = m.signed_volume() / approx - 1.0;
            assert!(err.abs() < 0.005, "{slant}: volume error {err}");
        }
    }

    #[test]
    fn out_of_range_slants_are_errors() {
        assert!(ahmed(-1.0, 1000).is_err());
        assert!(ahmed(41.0, 1000).is_err());
        assert!(ahmed(f64::NAN, 1000).is_err());
        assert!(ahmed(25.0, 0).is_err());
        assert!(ahmed(25.0, super::super::MAX_PANELS + 1).is_err());
    }
}
