//! Sphere in uniform flow: surface pressure against Lamb's exact solution.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use tuft_mesh::{Mirrors, PanelMesh, TriMesh, generate};
use tuft_solver::potential::{Freestream, PotentialParams, solve_potential_with_params};

/// Lamb, *Hydrodynamics*, 6th ed. (1932), sec. 92: Cp = 1 - 9/4 sin^2 theta.
fn exact_cp(x: f64, r: f64) -> f64 {
    let cos = x / r;
    1.0 - 2.25 * (1.0 - cos * cos)
}

/// (rms, max) Cp error and the mean panel size.
fn cp_errors(mesh: TriMesh) -> (f64, f64, f64, usize) {
    let mesh = PanelMesh::new(mesh, Mirrors::none()).unwrap();
    let sol = solve_potential_with_params(
        &mesh,
        &Freestream::new(1.0, 0.0),
        &PotentialParams::default(),
    )
    .unwrap();
    let mut sum = 0.0;
    let mut max: f64 = 0.0;
    for (p, cp) in mesh.panels.iter().zip(&sol.cp) {
        let e = cp - exact_cp(p.centroid.x, p.centroid.coords.norm());
        sum += e * e;
        max = max.max(e.abs());
    }
    let h = (mesh.area() / mesh.len() as f64).sqrt();
    ((sum / mesh.len() as f64).sqrt(), max, h, mesh.len())
}

#[test]
fn sphere_quick() {
    for m in [
        generate::icosphere(1.0, 2),
        generate::icosphere(1.0, 3),
        generate::icosphere(1.0, 4),
        generate::latlong_sphere(1.0, 12, 14),
        generate::latlong_sphere(1.0, 24, 28),
        generate::latlong_sphere(1.0, 48, 54),
    ] {
        let (rms, max, h, n) = cp_errors(m);
        println!("n {n} h {h:.4} rms {rms:.2e} max {max:.2e}");
    }
}
