//! Cp on a sphere against the exact solution as the panel count grows, on
//! the compressed operator: error, time and memory from about 1,000 to
//! 80,000 panels.
//!
//! Lamb, *Hydrodynamics*, 6th ed. (1932), sec. 92: on a sphere in a
//! uniform stream `Cp = 1 - 9/4 sin^2 theta`, theta from the stream axis.
//! Each size is solved once with [`LinearSolver::Compressed`] (default
//! settings: ACA to 1e-6, GMRES to 1e-10) on an icosphere (levels 3 to 5,
//! 1,280 to 20,480 panels; level 6, 81,920 panels, with
//! `TUFT_BENCH_LARGE=1`) and on latitude-longitude spheres (10,000 and
//! 40,000 panels; 90,000 with `TUFT_BENCH_LARGE=1`). Printed: rms and
//! largest `|Cp - Cp_exact|` over the panels, the wall-clock time of the
//! solve (compressed build, GMRES, surface velocity) and the process's
//! peak resident memory so far (`VmHWM`; sizes run in increasing order
//! within each family, so it is the peak of the largest run yet).
//!
//! A plain timing harness (one run per size), not criterion: the largest
//! sizes take tens of seconds. `cargo bench -p tuft-solver --bench
//! sphere_convergence`; extra arguments are ignored.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::time::Instant;

use tuft_mesh::{Mirrors, PanelMesh, TriMesh, generate};
use tuft_solver::potential::{
    Freestream, LinearSolver, PotentialParams, solve_potential_with_params,
};

/// Peak resident memory of this process so far, MB (Linux; `None`
/// elsewhere).
fn peak_mb() -> Option<f64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kb: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kb / 1e3)
}

fn run(name: &str, body: TriMesh) {
    let mesh = PanelMesh::new(body, Mirrors::none()).unwrap();
    let params = PotentialParams {
        linear_solver: LinearSolver::Compressed,
        ..PotentialParams::default()
    };
    let t = Instant::now();
    let sol = solve_potential_with_params(&mesh, &Freestream::new(1.0, 0.0), &params).unwrap();
    let seconds = t.elapsed().as_secs_f64();
    let (mut sq, mut worst) = (0.0, 0.0f64);
    for (p, cp) in mesh.panels.iter().zip(&sol.cp) {
        let cos = p.centroid.x / p.centroid.coords.norm();
        let e = cp - (1.0 - 2.25 * (1.0 - cos * cos));
        sq += e * e;
        worst = worst.max(e.abs());
    }
    let rms = (sq / mesh.len() as f64).sqrt();
    println!(
        "| {name} | {} | {rms:.2e} | {worst:.2e} | {seconds:.1} s | {} | {} |",
        mesh.len(),
        sol.stats.iterations.unwrap_or(0),
        peak_mb().map_or("-".into(), |m| format!("{m:.0} MB")),
    );
}

fn main() {
    let large = std::env::var_os("TUFT_BENCH_LARGE").is_some();
    println!("sphere_convergence: Cp against Lamb's sphere on the compressed operator");
    println!("| mesh | panels | rms error | max error | solve | GMRES it. | peak RSS so far |");
    println!("| --- | --- | --- | --- | --- | --- | --- |");
    let levels = if large { 3..=6 } else { 3..=5 };
    for level in levels {
        run("icosphere", generate::icosphere(1.0, level));
    }
    let mut bands = vec![(51, 100), (101, 200)];
    if large {
        bands.push((151, 300));
    }
    for (lat, lon) in bands {
        run(
            "latitude-longitude",
            generate::latlong_sphere(1.0, lat, lon),
        );
    }
}
