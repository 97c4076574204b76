//! Build and solve time and memory of the compressed operator against the
//! dense path, on the Ahmed-type body over the ground.
//!
//! `cargo run --release -p tuft-solver --example compressed_scaling -- 10000 20000 40000`
//! runs the compressed path at each panel count; add `--dense N` (repeatable)
//! to also run the dense Krylov path at N panels (needs `8 N^2` bytes).
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::time::Instant;

use tuft_mesh::generate::{AhmedParams, ahmed_with_params};
use tuft_mesh::{Mirrors, PanelMesh};
use tuft_solver::hmatrix::{assemble_compressed, solve_compressed};
use tuft_solver::potential::{Freestream, LinearSolver, PotentialParams};
use tuft_solver::{assemble, linear::gmres};

fn mesh(panels: usize) -> PanelMesh {
    let p = AhmedParams {
        panels,
        ..AhmedParams::default()
    };
    PanelMesh::new(ahmed_with_params(&p).unwrap(), Mirrors::ground(0.0)).unwrap()
}

fn compressed(mesh: &PanelMesh, params: &PotentialParams) {
    let t = Instant::now();
    let sys = assemble_compressed(mesh, params).unwrap();
    let build = t.elapsed().as_secs_f64();
    let rhs = sys.rhs(&Freestream::new(1.0, 0.0).velocity());
    let t = Instant::now();
    let sol = solve_compressed(&sys, &rhs, params).unwrap();
    let solve = t.elapsed().as_secs_f64();
    let s = sys.matrix.stats();
    let mb = |b: usize| b as f64 / 1e6;
    println!(
        "compressed N={:>6}: build {build:7.1} s (C and -B n), solve {solve:6.1} s ({} it, res {:.1e}); C {:8.1} MB (dense {:.1} + low rank {:.1}, max rank {}), 8N^2 {:8.1} MB",
        mesh.len(),
        sol.iterations,
        sol.residual,
        mb(s.dense_bytes + s.low_rank_bytes),
        mb(s.dense_bytes),
        mb(s.low_rank_bytes),
        s.max_rank,
        mb(s.full_bytes)
    );
}

fn dense(mesh: &PanelMesh, params: &PotentialParams) {
    let t = Instant::now();
    let sys = assemble(mesh, params).unwrap();
    let build = t.elapsed().as_secs_f64();
    let rhs = sys.rhs(&Freestream::new(1.0, 0.0).velocity());
    let t = Instant::now();
    let sol = gmres(
        sys.matrix(),
        &rhs,
        params.krylov_tolerance,
        params.max_iterations,
        params.krylov_restart,
    )
    .unwrap();
    let solve = t.elapsed().as_secs_f64();
    println!(
        "dense      N={:>6}: build {build:7.1} s, solve {solve:6.1} s ({} it, Jacobi GMRES); C {:8.1} MB",
        mesh.len(),
        sol.iterations,
        8.0 * (mesh.len() as f64).powi(2) / 1e6
    );
}

fn main() {
    let params = PotentialParams {
        linear_solver: LinearSolver::Compressed,
        ..PotentialParams::default()
    };
    let args: Vec<String> = std::env::args().skip(1).collect();
    let mut i = 0;
    while i < args.len() {
        if args[i] == "--dense" {
            let n: usize = args[i + 1].parse().unwrap();
            dense(&mesh(n), &params);
            i += 2;
        } else {
            compressed(&mesh(args[i].parse().unwrap()), &params);
            i += 1;
        }
    }
}
