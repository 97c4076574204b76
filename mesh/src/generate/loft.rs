//! A closed body lofted through cross-sections along x, with a pole at each
//! end and as many points on each section as its perimeter needs, so the
//! panels stay near-square from the nose to the middle (no pole fans of
//! slivers: the ring next to a pole has eight points). Sections should
//! stay within a few to one in width to height near the poles.
//!
//! The sections are half sections on y >= 0, from the bottom centre line
//! (y = 0) round the widest side point to the top centre line (y = 0); the
//! full body is the half plus its mirror image. Stations are spaced by
//! arc length along the body (averaged over five meridians), clustered
//! towards the poles; consecutive sections are zipped together.

use super::builder::{Builder, cluster_both};
use crate::{Point, TriMesh};

/// A body described by half cross-sections along x.
pub(crate) trait Sections {
    /// The nose and tail poles' x.
    fn x_range(&self) -> (f64, f64);
    /// The point at station `x` and section parameter `u` in [0, 1]:
    /// u = 0 bottom centre line, 0.5 the widest side point, 1 top centre
    /// line. At the two ends of `x_range` every `u` gives the pole.
    fn point(&self, x: f64, u: f64) -> Point;
}

/// How finely to loft.
#[derive(Debug, Clone, Copy)]
pub(crate) struct LoftSpec {
    /// Target number of triangles on the full body.
    pub panels: usize,
    /// Clustering of the stations towards the poles (0 uniform arc length,
    /// 1 full cosine).
    pub clustering: f64,
    /// Only the y >= 0 half, open along y = 0.
    pub half: bool,
}

/// Samples along x used to measure the body (cosine-spaced so the poles,
/// where the surface turns across x, are resolved).
const TABLE: usize = 600;
/// The meridians (values of u) whose arc length is averaged.
const MERIDIANS: [f64; 5] = [0.0, 0.25, 0.5, 0.75, 1.0];
/// Points per half section used to measure its perimeter.
const PERIMETER_SAMPLES: usize = 64;

/// Loft `body` into a closed (or, for `half`, y = 0-bounded) outward mesh.
pub(crate) fn loft(body: &impl Sections, spec: LoftSpec) -> TriMesh {
    let table = ArcTable::new(body);
    let mut size = (2.0 * table.area() / spec.panels.max(8) as f64).sqrt();
    // Two corrections of the nominal size bring the count near the target.
    for _ in 0..2 {
        let plan = plan_stations(&table, size, spec.clustering);
        let count = estimate_triangles(&plan);
        size *= (count / spec.panels.max(8) as f64).sqrt();
    }
    let plan = plan_stations(&table, size, spec.clustering);
    let mut builder = Builder::default();
    let rows: Vec<[Vec<u32>; 2]> = plan
        .iter()
        .map(|st| half_section(body, st.x, st.counts).map(|q| builder.row(&q)))
        .collect();
    for pair in rows.windows(2) {
        for (a, b) in pair[0].iter().zip(&pair[1]) {
            builder.zip(a, b, true);
        }
    }
    if !spec.half {
        builder.mirror_y();
    }
    builder.finish(1e-9 * table.length.max(1e-3)).0
}

/// One station: its x and the number of intervals on the lower and upper
/// quarter of its half section (zero for a pole).
#[derive(Debug, Clone, Copy)]
struct Station {
    x: f64,
    counts: [usize; 2],
}

/// Arc length along the body and section perimeters, tabulated in x.
struct ArcTable {
    x: Vec<f64>,
    s: Vec<f64>,
    /// Lower and upper quarter perimeters.
    quarters: Vec<[f64; 2]>,
    length: f64,
}

impl ArcTable {
    fn new(body: &impl Sections) -> Self {
        let (x0, x1) = body.x_range();
        let x: Vec<f64> = (0..=TABLE)
            .map(|k| {
                let t = k as f64 / TABLE as f64;
                x0 + (x1 - x0) * 0.5 * (1.0 - (std::f64::consts::PI * t).cos())
            })
            .collect();
        let mut s = vec![0.0];
        for w in x.windows(2) {
            let step = MERIDIANS
                .iter()
                .map(|&u| (body.point(w[1], u) - body.point(w[0], u)).norm())
                .sum::<f64>()
                / MERIDIANS.len() as f64;
            s.push(s[s.len() - 1] + step);
        }
        let quarters = x.iter().map(|&xi| quarter_lengths(body, xi)).collect();
        let length = s[TABLE];
        Self {
            x,
            s,
            quarters,
            length,
        }
    }

    /// Surface area of the full body (trapezoidal in arc length).
    fn area(&self) -> f64 {
        (1..=TABLE)
            .map(|k| {
                let p0: f64 = self.quarters[k - 1].iter().sum();
                let p1: f64 = self.quarters[k].iter().sum();
                (self.s[k] - self.s[k - 1]) * (p0 + p1)
            })
            .sum()
    }

    /// x and quarter perimeters at arc length `s` (linear in the table).
    fn at(&self, s: f64) -> (f64, [f64; 2]) {
        let k = self.s.partition_point(|&v| v < s).clamp(1, TABLE);
        let f = ((s - self.s[k - 1]) / (self.s[k] - self.s[k - 1]).max(1e-300)).clamp(0.0, 1.0);
        let q = [0, 1].map(|i| self.quarters[k - 1][i] * (1.0 - f) + self.quarters[k][i] * f);
        (self.x[k - 1] * (1.0 - f) + self.x[k] * f, q)
    }
}

/// Lengths of the lower (u in [0, 0.5]) and upper quarter at `x`.
fn quarter_lengths(body: &impl Sections, x: f64) -> [f64; 2] {
    [0.0, 0.5].map(|u0| {
        (0..PERIMETER_SAMPLES)
            .map(|k| {
                let ua = u0 + 0.5 * k as f64 / PERIMETER_SAMPLES as f64;
                let ub = u0 + 0.5 * (k + 1) as f64 / PERIMETER_SAMPLES as f64;
                (body.point(x, ub) - body.point(x, ua)).norm()
            })
            .sum()
    })
}

/// Stations at clustered arc length; sections get enough points for
/// near-square panels of the local station spacing (at least two per
/// quarter, so the ring next to a pole has eight points on the full body);
/// the end sections are poles (no intervals).
fn plan_stations(table: &ArcTable, size: f64, clustering: f64) -> Vec<Station> {
    let n = ((table.length / size).round() as usize).max(4);
    let s: Vec<f64> = (0..=n)
        .map(|i| table.length * cluster_both(i as f64 / n as f64, clustering))
        .collect();
    let (x0, x1) = (table.x[0], table.x[TABLE]);
    (0..=n)
        .map(|i| {
            if i == 0 || i == n {
                let x = if i == 0 { x0 } else { x1 };
                return Station { x, counts: [0, 0] };
            }
            let spacing = 0.5 * (s[i + 1] - s[i - 1]);
            let (x, quarters) = table.at(s[i]);
            let counts = quarters.map(|q| ((q / spacing).round() as usize).max(2));
            Station { x, counts }
        })
        .collect()
}

/// Triangles the plan will give on the full body.
fn estimate_triangles(plan: &[Station]) -> f64 {
    plan.windows(2)
        .map(|w| {
            let a: usize = w[0].counts.iter().sum();
            let b: usize = w[1].counts.iter().sum();
            2.0 * (a + b) as f64
        })
        .sum()
}

/// The lower and upper quarter of the half section at `x` (sharing the
/// side point), by equal arc length within each; the centre-line ends get
/// y = 0 exactly. A pole is a single point.
fn half_section(body: &impl Sections, x: f64, counts: [usize; 2]) -> [Vec<Point>; 2] {
    if counts == [0, 0] {
        let p = body.point(x, 0.5);
        let pole = vec![Point::new(p.x, 0.0, p.z)];
        return [pole.clone(), pole];
    }
    let mut quarters = [0, 1].map(|q| {
        let u0 = 0.5 * q as f64;
        let us = equal_arc_parameters(|u| body.point(x, u), u0, u0 + 0.5, counts[q]);
        us.iter().map(|&u| body.point(x, u)).collect::<Vec<Point>>()
    });
    quarters[0][0].y = 0.0;
    let last = quarters[1].len() - 1;
    quarters[1][last].y = 0.0;
    quarters[1][0] = quarters[0][counts[0]];
    quarters
}

/// `n + 1` parameters on [u0, u1] at equal arc length of `curve`, the
/// ends exact.
pub(crate) fn equal_arc_parameters(
    curve: impl Fn(f64) -> Point,
    u0: f64,
    u1: f64,
    n: usize,
) -> Vec<f64> {
    let m = PERIMETER_SAMPLES;
    let u: Vec<f64> = (0..=m)
        .map(|k| u0 + (u1 - u0) * k as f64 / m as f64)
        .collect();
    let mut s = vec![0.0];
    for w in u.windows(2) {
        s.push(s[s.len() - 1] + (curve(w[1]) - curve(w[0])).norm());
    }
    let total = s[m];
    let mut out = vec![u0];
    for i in 1..n {
        let target = total * i as f64 / n as f64;
        let k = s.partition_point(|&v| v < target).clamp(1, m);
        let f = (target - s[k - 1]) / (s[k] - s[k - 1]).max(1e-300);
        out.push(u[k - 1] + f * (u[k] - u[k - 1]));
    }
    out.push(u1);
    out
}
