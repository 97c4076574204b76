//! Influence kernels against adaptive numerical quadrature, the closed-body
//! identity of the doublet matrix, and the far-field switch-over error.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use nalgebra::Vector3;
use tuft_mesh::{Mirrors, Panel, PanelMesh, Point, generate};
use tuft_solver::influence::{point, triangle, triangle_influence};

const FOUR_PI: f64 = 4.0 * std::f64::consts::PI;
use tuft_solver::potential::PotentialParams;

/// Radon's 7-point degree-5 rule on a triangle (Stroud, *Approximate
/// Calculation of Multiple Integrals*, 1971, formula T2:5-1 (from memory)): barycentric
/// points and weights (summing to 1).
fn radon7() -> [([f64; 3], f64); 7] {
    let s15 = 15f64.sqrt();
    let a1 = (6.0 - s15) / 21.0;
    let a2 = (6.0 + s15) / 21.0;
    let w1 = (155.0 - s15) / 1200.0;
    let w2 = (155.0 + s15) / 1200.0;
    [
        ([1.0 / 3.0; 3], 9.0 / 40.0),
        ([a1, a1, 1.0 - 2.0 * a1], w1),
        ([a1, 1.0 - 2.0 * a1, a1], w1),
        ([1.0 - 2.0 * a1, a1, a1], w1),
        ([a2, a2, 1.0 - 2.0 * a2], w2),
        ([a2, 1.0 - 2.0 * a2, a2], w2),
        ([1.0 - 2.0 * a2, a2, a2], w2),
    ]
}

/// Integrate `f` over triangle `t` with the 7-point rule.
fn rule(t: &[Point; 3], f: &dyn Fn(&Point) -> f64) -> f64 {
    let area = 0.5 * (t[1] - t[0]).cross(&(t[2] - t[0])).norm();
    radon7()
        .iter()
        .map(|(b, w)| {
            let q = Point::from(t[0].coords * b[0] + t[1].coords * b[1] + t[2].coords * b[2]);
            w * f(&q)
        })
        .sum::<f64>()
        * area
}

/// Adaptive quadrature: split into four until the split changes the
/// result by less than `tol` (absolute), at most `depth` levels.
fn adaptive(t: &[Point; 3], f: &dyn Fn(&Point) -> f64, tol: f64, depth: u32) -> f64 {
    let whole = rule(t, f);
    let mid = |a: &Point, b: &Point| Point::from((a.coords + b.coords) / 2.0);
    let (m01, m12, m20) = (mid(&t[0], &t[1]), mid(&t[1], &t[2]), mid(&t[2], &t[0]));
    let kids = [
        [t[0], m01, m20],
        [m01, t[1], m12],
        [m20, m12, t[2]],
        [m01, m12, m20],
    ];
    let parts: f64 = kids.iter().map(|k| rule(k, f)).sum();
    if (parts - whole).abs() < tol.max(1e-14 * parts.abs()) || depth == 0 {
        return parts;
    }
    kids.iter()
        .map(|k| adaptive(k, f, tol / 4.0, depth - 1))
        .sum()
}

fn panel() -> Panel {
    Panel::new([
        Point::new(0.1, -0.2, 0.05),
        Point::new(1.3, 0.1, -0.1),
        Point::new(0.2, 0.9, 0.2),
    ])
    .unwrap()
}

/// S and D by quadrature of their definitions (Katz & Plotkin 2001,
/// ch. 10 (from memory)): S = int 1/r, D = int n.(P - Q)/r^3.
fn quadrature(p: &Point, t: &Panel) -> (f64, f64) {
    let n = t.normal.into_inner();
    let s = |q: &Point| 1.0 / (p - q).norm();
    let d = |q: &Point| n.dot(&(p - q)) / (p - q).norm().powi(3);
    (
        adaptive(&t.vertices, &s, 1e-10, 16),
        adaptive(&t.vertices, &d, 1e-10, 16),
    )
}

/// Exact kernels against quadrature at near, on-plane, edge-line and far
/// points: relative 1e-6 (the quadrature tolerance is 1e-10 absolute).
#[test]
fn kernels_match_quadrature() {
    let t = panel();
    let c = t.centroid;
    let n = t.normal.into_inner();
    let (e0, e1) = (t.vertices[0], t.vertices[1]);
    let along = e1 - e0;
    let cases = [
        ("near above", c + n * 0.05 + t.l.into_inner() * 0.1),
        ("near below", c - n * 0.08),
        ("above a corner", e1 + n * 0.1),
        ("on plane, outside", c + (c - t.vertices[2]) * 1.2),
        ("on the edge line, beyond the corner", e1 + along * 0.5),
        ("above the edge line", e1 + along * 0.3 + n * 0.02),
        (
            "two sizes away",
            c + Vector3::new(1.0, 2.0, 2.0).normalize() * 2.0 * t.size,
        ),
        ("far", c + Vector3::new(-3.0, 1.0, 4.0) * 3.0),
    ];
    for (name, p) in cases {
        let exact = triangle::exact(&p, &t);
        let (s, d) = quadrature(&p, &t);
        let rel_s = (exact.source - s).abs() / s.abs();
        let rel_d = (exact.doublet - d).abs() / d.abs().max(1e-3 * s.abs() / t.size);
        println!(
            "{name:40} S {:.10} ({rel_s:.1e})  D {:.10} ({rel_d:.1e})",
            exact.source, exact.doublet
        );
        assert!(
            rel_s < 1e-6,
            "{name}: source {} vs quadrature {s}",
            exact.source
        );
        assert!(
            rel_d < 1e-6,
            "{name}: doublet {} vs quadrature {d}",
            exact.doublet
        );
    }
}

/// Gauss's theorem: a closed surface subtends 4 pi at an interior point,
/// so with C_ii = 1/2 each row of C sums to 1 (Katz & Plotkin 2001,
/// sec. 10.4, from memory; Gauss's theorem itself is exact). Exact kernels
/// everywhere; tolerance 1e-9 (round-off).
#[test]
fn doublet_rows_sum_to_one_on_closed_body() {
    let mut mesh = generate::latlong_sphere(1.0, 10, 14);
    mesh.map_vertices(|p| Point::new(2.0 * p.x, p.y, 0.7 * p.z));
    let mesh = PanelMesh::new(mesh, Mirrors::none()).unwrap();
    let params = PotentialParams {
        far_field_ratio: f64::INFINITY,
        ..PotentialParams::default()
    };
    let system = tuft_solver::assemble(&mesh, &params).unwrap();
    let c = system.matrix();
    for i in 0..mesh.len() {
        let sum: f64 = (0..mesh.len()).map(|j| c[(i, j)]).sum();
        assert!((sum - 1.0).abs() < 1e-9, "row {i} sums to {sum}");
    }
}

/// The far-field switch-over: the point-singularity error relative to the
/// exact kernel, over directions, at a given distance ratio.
fn far_error(ratio: f64) -> (f64, f64) {
    let t = panel();
    let (mut es, mut ed) = (0.0f64, 0.0f64);
    for k in 0..200 {
        let z = -1.0 + (k as f64 + 0.5) / 100.0;
        let phi = k as f64 * 2.399_963;
        let dir = Vector3::new(
            (1.0 - z * z).sqrt() * phi.cos(),
            (1.0 - z * z).sqrt() * phi.sin(),
            z,
        );
        let p = t.centroid + dir * ratio * t.size;
        let (ex, fa) = (triangle::exact(&p, &t), point::far(&p, &t));
        let scale = t.area / (ratio * t.size).powi(2);
        es = es.max((ex.source - fa.source).abs() * ratio * t.size / t.area);
        ed = ed.max((ex.doublet - fa.doublet).abs() / scale);
    }
    (es, ed)
}

/// The default far-field ratio keeps the point-source and point-doublet
/// error below 1 % of the panel's own far-field scale (A/r, A/r^2), and the
/// error falls as (size/r)^2 as the multipole expansion says (Katz &
/// Plotkin 2001, sec. 10.4.3 (from memory)).
#[test]
fn far_field_error_is_small_at_default_ratio() {
    let ratio = PotentialParams::default().far_field_ratio;
    let (s6, d6) = far_error(ratio);
    let (s12, d12) = far_error(2.0 * ratio);
    println!("ratio {ratio}: source {s6:.2e} doublet {d6:.2e}; x2: {s12:.2e} {d12:.2e}");
    assert!(s6 < 1e-2 && d6 < 1e-2, "far-field error {s6:.2e} {d6:.2e}");
    assert!(
        s6 / s12 > 3.5 && d6 / d12 > 3.5,
        "error should fall as (size/r)^2"
    );
}

/// On the panel itself: the source integral is continuous across the sheet
/// (a single-layer potential, Kellogg, *Foundations of Potential Theory*,
/// 1929, ch. VI), so the in-plane value equals the limits from either side
/// (1e-6 at a height of 1e-9 sizes, the limit being linear in the height);
/// the doublet takes the documented inside value -2 pi there and +-2 pi
/// just above and below (the jump of a double layer, ibid.).
#[test]
fn on_panel_values_are_the_limits() {
    let t = panel();
    let n = t.normal.into_inner();
    let p = t.centroid + t.l.into_inner() * 0.07;
    let on = triangle::exact(&p, &t);
    let up = triangle::exact(&(p + n * 1e-9), &t);
    let down = triangle::exact(&(p - n * 1e-9), &t);
    assert!((on.source - up.source).abs() < 1e-6 * on.source);
    assert!((on.source - down.source).abs() < 1e-6 * on.source);
    let tau = 2.0 * std::f64::consts::PI;
    assert!((up.doublet - tau).abs() < 1e-6 && (down.doublet + tau).abs() < 1e-6);
    assert!((on.doublet + tau).abs() < 1e-15);
    let inf = triangle_influence(&p, &t, 6.0);
    assert!((inf.doublet + 0.5).abs() < 1e-15 && (inf.source - on.source / FOUR_PI).abs() < 1e-15);
}
