//! Sphere in uniform flow: surface pressure against Lamb's exact solution,
//! convergence order, doublet strength, solver agreement, far-field effect.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use tuft_mesh::{Mirrors, PanelMesh, TriMesh, generate};
use tuft_solver::potential::{
    Freestream, LinearSolver, PotentialParams, PotentialSolution, solve_potential_with_params,
};

/// Lamb, *Hydrodynamics*, 6th ed. (1932), sec. 92: Cp = 1 - 9/4 sin^2 theta,
/// theta measured from the stagnation point (here from the x axis).
fn exact_cp(p: &tuft_mesh::Point) -> f64 {
    let cos = p.x / p.coords.norm();
    1.0 - 2.25 * (1.0 - cos * cos)
}

struct Run {
    mesh: PanelMesh,
    sol: PotentialSolution,
}

fn run(mesh: TriMesh, params: &PotentialParams) -> Run {
    let mesh = PanelMesh::new(mesh, Mirrors::none()).unwrap();
    let sol = solve_potential_with_params(&mesh, &Freestream::new(1.0, 0.0), params).unwrap();
    Run { mesh, sol }
}

/// (rms, max) Cp error against Lamb, and the mean panel size sqrt(A/N).
fn cp_errors(r: &Run) -> (f64, f64, f64) {
    let errs: Vec<f64> = r
        .mesh
        .panels
        .iter()
        .zip(&r.sol.cp)
        .map(|(p, cp)| cp - exact_cp(&p.centroid))
        .collect();
    let rms = (errs.iter().map(|e| e * e).sum::<f64>() / errs.len() as f64).sqrt();
    let max = errs.iter().fold(0.0f64, |m, e| m.max(e.abs()));
    (rms, max, (r.mesh.area() / r.mesh.len() as f64).sqrt())
}

/// Least-squares slope of log(err) against log(h).
fn order(h: &[f64], e: &[f64]) -> f64 {
    let (x, y): (Vec<f64>, Vec<f64>) = (
        h.iter().map(|v| v.ln()).collect(),
        e.iter().map(|v| v.ln()).collect(),
    );
    let (mx, my) = (x.iter().sum::<f64>() / 3.0, y.iter().sum::<f64>() / 3.0);
    let sxy: f64 = x.iter().zip(&y).map(|(a, b)| (a - mx) * (b - my)).sum();
    let sxx: f64 = x.iter().map(|a| (a - mx) * (a - mx)).sum();
    sxy / sxx
}

fn convergence(name: &str, meshes: [TriMesh; 3]) {
    let params = PotentialParams::default();
    let (mut hs, mut rmss) = (Vec::new(), Vec::new());
    let mut last = (0.0, 0.0);
    for m in meshes {
        let r = run(m, &params);
        let (rms, max, h) = cp_errors(&r);
        println!(
            "{name}: {} panels, h {h:.4}, rms Cp error {rms:.2e}, max {max:.2e}",
            r.mesh.len()
        );
        hs.push(h);
        rmss.push(rms);
        last = (rms, max);
    }
    let p = order(&hs, &rmss);
    println!("{name}: observed order of the rms Cp error {p:.2}");
    // Accuracy bars at about 5,000 panels against Lamb's exact Cp (Lamb
    // 1932): rms 3e-3 and max 2e-2, the accuracy a screening needs (a tenth
    // of the Cp differences between design variants, common practice) and
    // about twice the 1.2-1.7e-3 rms these meshes give, so a slip in a
    // kernel or the gradient shows.
    assert!(
        last.0 <= 3e-3,
        "{name}: rms Cp error {:.2e} > 3e-3 (Lamb)",
        last.0
    );
    assert!(
        last.1 <= 2e-2,
        "{name}: max Cp error {:.2e} > 2e-2 (Lamb)",
        last.1
    );
    // Second-order gradient reconstruction: at least 1.5 observed.
    assert!(p >= 1.5, "{name}: observed order {p:.2} < 1.5");
}

#[test]
fn icosphere_cp_converges_to_lamb() {
    convergence(
        "icosphere",
        [
            generate::icosphere(1.0, 2),
            generate::icosphere(1.0, 3),
            generate::icosphere(1.0, 4),
        ],
    );
}

#[test]
fn latlong_sphere_cp_converges_to_lamb() {
    convergence(
        "lat-long sphere",
        [
            generate::latlong_sphere(1.0, 12, 14),
            generate::latlong_sphere(1.0, 24, 28),
            generate::latlong_sphere(1.0, 48, 54),
        ],
    );
}

/// Lamb (1932), sec. 92: a sphere of radius a in a stream U has the
/// outside perturbation potential phi = U a^3 x / (2 r^3), so x/2 on the
/// surface (U = 1); the Dirichlet condition makes the inside one zero, and
/// mu = inside - outside = -x/2 (the identity that pins the sign of mu).
/// Tolerance 1e-2 in rms at 1,280 panels (observed 6e-4).
#[test]
fn doublet_strength_is_minus_half_x() {
    let r = run(generate::icosphere(2.0, 3), &PotentialParams::default());
    let rms = (r
        .mesh
        .panels
        .iter()
        .zip(&r.sol.mu)
        .map(|(p, mu)| {
            let x = 2.0 * p.centroid.x / p.centroid.coords.norm();
            (mu + 0.5 * x).powi(2)
        })
        .sum::<f64>()
        / r.mesh.len() as f64)
        .sqrt();
    println!("rms(mu + x/2) = {rms:.2e} (radius 2)");
    assert!(rms < 1e-2, "mu differs from -x/2 by {rms:.2e} rms");
}

/// Dense LU and GMRES solve the same system: they agree to 1e-8 (the
/// Krylov tolerance is 1e-12 and the system is well conditioned, a
/// second-kind integral equation, Atkinson 1997, ch. 9).
#[test]
fn lu_and_krylov_agree() {
    let base = PotentialParams {
        krylov_tolerance: 1e-12,
        ..PotentialParams::default()
    };
    let lu = run(
        generate::icosphere(1.0, 3),
        &PotentialParams {
            linear_solver: LinearSolver::DenseLu,
            ..base
        },
    );
    let kr = run(
        generate::icosphere(1.0, 3),
        &PotentialParams {
            linear_solver: LinearSolver::Krylov,
            ..base
        },
    );
    assert_eq!(lu.sol.stats.method, LinearSolver::DenseLu);
    assert_eq!(kr.sol.stats.method, LinearSolver::Krylov);
    let diff = lu
        .sol
        .mu
        .iter()
        .zip(&kr.sol.mu)
        .fold(0.0f64, |m, (a, b)| m.max((a - b).abs()));
    println!(
        "GMRES: {:?} iterations, residual {:.1e}; max |mu_LU - mu_GMRES| = {diff:.1e}",
        kr.sol.stats.iterations, kr.sol.stats.residual
    );
    assert!(diff < 1e-8, "LU and GMRES differ by {diff:.1e}");
}

/// The far field (point singularities beyond the default ratio) moves Cp
/// by less than 1e-3 against exact influences everywhere, well below the
/// discretisation error (common practice: keep model errors a few times
/// below the discretisation error).
#[test]
fn far_field_barely_moves_cp() {
    let exact = run(
        generate::icosphere(1.0, 3),
        &PotentialParams {
            far_field_ratio: f64::INFINITY,
            ..PotentialParams::default()
        },
    );
    let far = run(generate::icosphere(1.0, 3), &PotentialParams::default());
    let diff = exact
        .sol
        .cp
        .iter()
        .zip(&far.sol.cp)
        .fold(0.0f64, |m, (a, b)| m.max((a - b).abs()));
    let (rms, _, _) = cp_errors(&exact);
    println!("max Cp change from the far field {diff:.1e}; discretisation rms error {rms:.1e}");
    assert!(
        diff < 1e-3 && diff < rms,
        "far field changes Cp by {diff:.1e}"
    );
}
