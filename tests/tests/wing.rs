//! Rectangular NACA 0012 wing of aspect ratio 6 with the Kutta wake: lift
//! slope against Helmbold's formula, the thickness effect, wake-length
//! convergence and ground effect.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::collections::HashSet;
use std::f64::consts::PI;

use tuft_mesh::generate::{WingParams, wing_with_params};
use tuft_mesh::{Mirrors, PanelMesh, Point, Vector};
use tuft_solver::loads::{FlowState, Reference, integrate_loads};
use tuft_solver::potential::Freestream;
use tuft_solver::wake::{WakeParams, WakeSolution, solve_potential_with_wake_params};

const SPAN: f64 = 6.0;
const CHORD: f64 = 1.0;

/// Lift coefficient by pressure integration over the real panels and by
/// Kutta-Joukowski from the wake strengths, reference area b c.
struct Lift {
    pressure: f64,
    kutta_joukowski: f64,
    solution: WakeSolution,
    trailing_edge: Vec<[u32; 2]>,
}

fn wing(alpha_deg: f64, thickness: f64, panels: (usize, usize), height: Option<f64>) -> Lift {
    wing_with(alpha_deg, thickness, panels, height, &WakeParams::default())
}

fn wing_with(
    alpha_deg: f64,
    thickness: f64,
    (chord_panels, span_panels): (usize, usize),
    height: Option<f64>,
    params: &WakeParams,
) -> Lift {
    let w = WingParams {
        span: SPAN,
        chord: CHORD,
        thickness,
        alpha_deg,
        height: height.unwrap_or(1.0),
        chord_panels,
        span_panels,
        ..WingParams::default()
    };
    let generated = wing_with_params(&w).unwrap();
    let mirrors = height.map_or(Mirrors::none(), |_| Mirrors::ground(0.0));
    let mesh = PanelMesh::new(generated.mesh, mirrors).unwrap();
    let solution =
        solve_potential_with_wake_params(&mesh, &Freestream::new(1.0, 0.0), params).unwrap();
    let reference = Reference {
        area: SPAN * CHORD,
        length: CHORD,
        moment_point: Point::origin(),
        front_axle_x: 0.0,
        rear_axle_x: CHORD,
    };
    let air = FlowState {
        density: 1.0,
        speed: 1.0,
        yaw: 0.0,
    };
    let loads = integrate_loads(&mesh, &solution.solution.cp, None, &reference, &air).unwrap();
    let kj = solution.wake.kutta_joukowski_force(&Vector::x(), 1.0).z / (0.5 * SPAN * CHORD);
    Lift {
        pressure: loads.total.coefficients.lift,
        kutta_joukowski: kj,
        solution,
        trailing_edge: generated.trailing_edge,
    }
}

/// Helmbold's lift slope per radian for a straight wing of aspect ratio
/// `a` with section slope `a0` (Helmbold 1942; Anderson, Fundamentals of
/// Aerodynamics, sec. 5.3 (from memory)):
/// `a = a0 / (sqrt(1 + (a0/(pi A))^2) + a0/(pi A))`, which for `a0 = 2 pi`
/// is `2 pi A / (2 + sqrt(A^2 + 4))`.
fn helmbold(aspect: f64, a0: f64) -> f64 {
    let x = a0 / (PI * aspect);
    a0 / ((1.0 + x * x).sqrt() + x)
}

/// Inviscid section lift slope with thickness, `2 pi (1 + 0.77 t/c)`:
/// derived from the exact Joukowski-airfoil result `C_l = 2 pi (1 + e)
/// sin(alpha)` with `t/c = (3 sqrt 3 / 4) e` (Milne-Thomson, Theoretical
/// Aerodynamics, ch. 7; Katz & Plotkin 2001, sec. 6.6 (from memory));
/// for NACA 0012 it gives 1.092 x 2 pi, inside the 1.08-1.10 that 2-D
/// inviscid panel methods report for this section (from memory).
fn section_slope(thickness: f64) -> f64 {
    2.0 * PI * (1.0 + 0.77 * thickness)
}

#[test]
fn lift_slope_of_an_aspect_ratio_6_wing_matches_helmbold() {
    let (a2, a6) = (2f64.to_radians(), 6f64.to_radians());
    let l2 = wing(2.0, 0.12, (24, 16), None);
    let l6 = wing(6.0, 0.12, (24, 16), None);
    let slope = (l6.pressure - l2.pressure) / (a6 - a2);
    let slope_kj = (l6.kutta_joukowski - l2.kutta_joukowski) / (a6 - a2);
    let thick = helmbold(SPAN / CHORD, section_slope(0.12));
    let thin = helmbold(SPAN / CHORD, 2.0 * PI);
    println!(
        "C_L(2) {:.4} C_L(6) {:.4}; slope {slope:.4} (pressure) {slope_kj:.4} (Kutta-Joukowski); \
         Helmbold {thin:.4} (thin) {thick:.4} (with thickness)",
        l2.pressure, l6.pressure
    );
    // The trailing edge found by the dihedral/apex rule is exactly the
    // generator's trailing edge.
    let found: HashSet<[u32; 2]> = l2
        .solution
        .edges
        .iter()
        .map(|e| [e.start.min(e.end), e.start.max(e.end)])
        .collect();
    let expected: HashSet<[u32; 2]> = l2
        .trailing_edge
        .iter()
        .map(|&[a, b]| [a.min(b), a.max(b)])
        .collect();
    assert_eq!(found, expected);
    // Symmetric section: C_L is proportional to alpha (no lift at zero),
    // so C_L(6)/C_L(2) = 3 to within the non-linearity of thickness
    // (1 % allowed).
    assert!((l6.pressure / l2.pressure - 3.0).abs() < 0.03);
    // Helmbold with the thickness-corrected section slope: 4.80 per rad.
    // This mesh gives 4.59 (pressure, 4.5 % below) and 4.53 (Kutta-
    // Joukowski, 5.7 % below); finer meshes tried (up to 64 x 24 panels a
    // surface) stay 4 to 6 % below, so the method sits close to the
    // thin-section value 4.53 (within 1.5 %) rather than the thick one.
    // The bar is 7 % of the thickness-corrected value: it covers the 4 to
    // 6 % the method sits low on every mesh tried (the same bar as the
    // refinement study below, which allows 8 % on its coarsest mesh) and
    // still catches a wrong wake sign or strength, which moves the slope
    // by tens of percent.
    assert!((slope / thick - 1.0).abs() < 0.07, "{slope} vs {thick}");
    // Pressure integration and the Kutta-Joukowski lift of the same
    // solution agree (they are independent post-processings): 1.3 % seen,
    // 3 % allowed.
    assert!(
        (slope_kj / slope - 1.0).abs() < 0.03,
        "{slope_kj} vs {slope}"
    );
}

#[test]
fn thickness_raises_the_lift_slope_as_helmbold_scales_it() {
    // Helmbold's formula with a0 = 2 pi (1 + 0.77 t/c) predicts the slope
    // ratio between 12 % and 4 % thick sections (1.041 at A = 6); the
    // Kutta-Joukowski lift (the less mesh-sensitive of the two) must show
    // it to within 2 % (coarse mesh, 12 x 12 panels a surface).
    let slope = |t: f64| {
        let (l2, l6) = (wing(2.0, t, (16, 12), None), wing(6.0, t, (16, 12), None));
        (l6.kutta_joukowski - l2.kutta_joukowski) / 4f64.to_radians()
    };
    let ratio = slope(0.12) / slope(0.04);
    let expected = helmbold(6.0, section_slope(0.12)) / helmbold(6.0, section_slope(0.04));
    println!("slope ratio t 0.12 / 0.04: {ratio:.4}, Helmbold {expected:.4}");
    assert!(ratio > 1.0 && (ratio - expected).abs() < 0.02, "{ratio}");
}

#[test]
fn lift_has_converged_with_wake_length() {
    // The far end of the wake is a starting vortex whose downwash at the
    // wing falls as (span/length)^2: 50 body lengths against 100 must
    // change C_L by less than 0.1 % (0.015 % seen).
    let long = WakeParams {
        length: 100.0,
        ..WakeParams::default()
    };
    let l50 = wing(4.0, 0.12, (12, 12), None);
    let l100 = wing_with(4.0, 0.12, (12, 12), None, &long);
    println!(
        "C_L wake 50: {:.5}, 100: {:.5}",
        l50.pressure, l100.pressure
    );
    assert!((l50.pressure / l100.pressure - 1.0).abs() < 1e-3);
}

#[test]
fn explicit_trailing_edge_list_gives_the_detected_solution() {
    let detected = wing(4.0, 0.12, (12, 8), None);
    let named = WakeParams {
        edges: Some(detected.trailing_edge.clone()),
        ..WakeParams::default()
    };
    let explicit = wing_with(4.0, 0.12, (12, 8), None, &named);
    assert!((detected.pressure - explicit.pressure).abs() < 1e-9);
}

#[test]
fn lift_rises_as_the_wing_nears_the_ground() {
    // Ground effect on a finite wing at positive incidence: the image
    // trailing vortices cancel part of the downwash, so the lift rises as
    // the height falls (Wieselsberger 1922; Katz & Plotkin 2001 (from
    // memory)). Heights of the quarter-chord line: free air, 2 and
    // 1 chord. Closer than about one chord this thick wing's lift falls
    // again in the method (0.350 at h/c 1, 0.348 at 0.5, 0.322 at 0.25
    // seen at 4 degrees), where the image of the bound vortex slows the
    // flow past the wing and the gap under it acts as a venturi; that
    // range is not asserted.
    let alpha = 4.0;
    let free = wing(alpha, 0.12, (12, 12), None).pressure;
    let high = wing(alpha, 0.12, (12, 12), Some(2.0)).pressure;
    let low = wing(alpha, 0.12, (12, 12), Some(1.0)).pressure;
    println!("C_L free {free:.4}, h/c 2.0 {high:.4}, h/c 1.0 {low:.4}");
    assert!(low > high && high > free, "{low} {high} {free}");
    // Sizeable, not round-off: at least 3 % from free air to h/c = 1
    // (9 % seen).
    assert!(low > 1.03 * free);
}

#[test]
fn ground_image_of_the_wake_equals_an_explicit_mirror_wing() {
    // Method identity: the wing with its ground image (body and wake) must
    // give the same solution as the wing plus its explicitly meshed mirror
    // in free air, both wakes found by the trailing-edge search.
    let w = WingParams {
        span: SPAN,
        chord: CHORD,
        alpha_deg: 5.0,
        height: 0.6,
        chord_panels: 10,
        span_panels: 8,
        ..WingParams::default()
    };
    let real = wing_with_params(&w).unwrap().mesh;
    let n = real.triangles.len();
    let fs = Freestream::new(1.0, 0.0);
    let imaged = PanelMesh::new(real.clone(), Mirrors::ground(0.0)).unwrap();
    let with_image =
        solve_potential_with_wake_params(&imaged, &fs, &WakeParams::default()).unwrap();
    let mut pair = real.clone();
    let nv = real.vertices.len() as u32;
    pair.vertices
        .extend(real.vertices.iter().map(|p| Point::new(p.x, p.y, -p.z)));
    pair.triangles.extend(
        real.triangles
            .iter()
            .map(|t| [t[0] + nv, t[2] + nv, t[1] + nv]),
    );
    let pair = PanelMesh::new(pair, Mirrors::none()).unwrap();
    // Same wake length in metres: the pair has the same x extent.
    let explicit = solve_potential_with_wake_params(&pair, &fs, &WakeParams::default()).unwrap();
    assert_eq!(explicit.edges.len(), 2 * with_image.edges.len());
    let worst = (0..n)
        .map(|j| (explicit.solution.mu[j] - with_image.solution.mu[j]).abs())
        .fold(0.0, f64::max);
    let scale = with_image
        .solution
        .mu
        .iter()
        .fold(0.0f64, |m, v| m.max(v.abs()));
    println!("largest mu difference {worst:.2e} of {scale:.3}");
    // Same linear system up to the order of summation: round-off, with
    // the far-field switch at identical distances.
    assert!(worst < 1e-9 * scale, "{worst}");
}

#[test]
fn half_wing_on_the_symmetry_plane_equals_the_full_wing() {
    // Method identity: a half model with the symmetry-plane image (body
    // and wake) solves the same system as the full, mirror-symmetric wing.
    let w = WingParams {
        span: SPAN,
        chord: CHORD,
        alpha_deg: 5.0,
        chord_panels: 10,
        span_panels: 8,
        span_clustering: 0.0,
        ..WingParams::default()
    };
    // The generator's half (y > 0), and the full wing as that half plus
    // its exact mirror (welded on y = 0), so the full mesh is symmetric.
    let generated = PanelMesh::new(wing_with_params(&w).unwrap().mesh, Mirrors::none()).unwrap();
    let half_tris: Vec<[u32; 3]> = (0..generated.len())
        .filter(|&j| generated.panels[j].centroid.y > 0.0)
        .map(|j| generated.triangles[j])
        .collect();
    let vertices = generated.vertices.clone();
    let mut full_vertices = vertices.clone();
    let mirror_index: Vec<u32> = vertices
        .iter()
        .enumerate()
        .map(|(i, p)| {
            if p.y.abs() < 1e-12 {
                i as u32
            } else {
                full_vertices.push(Point::new(p.x, -p.y, p.z));
                (full_vertices.len() - 1) as u32
            }
        })
        .collect();
    let mut full_tris = half_tris.clone();
    full_tris.extend(half_tris.iter().map(|t| {
        [
            mirror_index[t[0] as usize],
            mirror_index[t[2] as usize],
            mirror_index[t[1] as usize],
        ]
    }));
    let full = PanelMesh::new(
        tuft_mesh::TriMesh::new(full_vertices, full_tris).unwrap(),
        Mirrors::none(),
    )
    .unwrap();
    let keep: Vec<usize> = (0..half_tris.len()).collect();
    let half = PanelMesh::new(
        tuft_mesh::TriMesh::new(vertices, half_tris).unwrap(),
        Mirrors {
            ground: None,
            symmetry: true,
        },
    )
    .unwrap();
    let fs = Freestream::new(1.0, 0.0);
    let a = solve_potential_with_wake_params(&full, &fs, &WakeParams::default()).unwrap();
    let b = solve_potential_with_wake_params(&half, &fs, &WakeParams::default()).unwrap();
    assert_eq!(a.edges.len(), 2 * b.edges.len());
    let worst = keep
        .iter()
        .enumerate()
        .map(|(i, &j)| (a.solution.mu[j] - b.solution.mu[i]).abs())
        .fold(0.0, f64::max);
    let scale = a.solution.mu.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    println!("half vs full: largest mu difference {worst:.2e} of {scale:.3}");
    assert!(worst < 1e-9 * scale, "{worst}");
    // The spanwise loading falls toward the tips (Prandtl's lifting-line
    // theory; 0.83 of the centre value seen on the tip strip).
    let by_y = |s: &WakeSolution| {
        let mut v: Vec<(f64, f64)> = s
            .wake
            .panels
            .iter()
            .zip(&s.wake.strength)
            .map(|(q, m)| ((q[0].y + q[1].y).abs() / 2.0, m.abs()))
            .collect();
        v.sort_by(|x, y| x.0.total_cmp(&y.0));
        v
    };
    let load = by_y(&a);
    let (centre, tip) = (load[0].1, load[load.len() - 1].1);
    assert!(tip < 0.9 * centre && tip > 0.3 * centre, "{tip} {centre}");
}

/// Mesh study of the lift slope (slow: about a minute). Run with
/// `cargo test --release -p tuft-tests --test wing -- --ignored --nocapture`.
#[test]
#[ignore = "mesh-convergence study, about a minute"]
fn lift_slope_mesh_study() {
    let thick = helmbold(SPAN / CHORD, section_slope(0.12));
    for panels in [(12, 12), (16, 16), (24, 16), (32, 24), (48, 16), (64, 16)] {
        let (l2, l6) = (wing(2.0, 0.12, panels, None), wing(6.0, 0.12, panels, None));
        let d = 4f64.to_radians();
        let (a, akj) = (
            (l6.pressure - l2.pressure) / d,
            (l6.kutta_joukowski - l2.kutta_joukowski) / d,
        );
        println!(
            "{panels:?}: slope {a:.4} ({:+.1} %), Kutta-Joukowski {akj:.4} ({:+.1} %)",
            100.0 * (a / thick - 1.0),
            100.0 * (akj / thick - 1.0)
        );
        assert!((a / thick - 1.0).abs() < 0.08);
    }
}
