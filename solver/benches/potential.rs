//! Benchmarks of the potential-flow solver: influence pairs per second
//! (exact and far field), assembly, dense LU, GMRES, surface velocity and
//! the whole solve, on lat-long spheres of 2,000 / 5,000 / 10,000 panels
//! (20,000 with `TUFT_BENCH_LARGE=1`) with a ground image.
//!
//! Run: `cargo bench -p tuft-solver --bench potential` (add a criterion
//! filter such as `-- whole` to run one group).
#![allow(missing_docs, clippy::unwrap_used, clippy::expect_used)]

use std::hint::black_box;
use std::time::Duration;

use criterion::{BenchmarkId, Criterion, Throughput, criterion_group, criterion_main};
use tuft_mesh::{Mirrors, Panel, PanelMesh, Point, generate};
use tuft_solver::influence::{point, triangle};
use tuft_solver::linear::{DenseLu, gmres};
use tuft_solver::potential::{Freestream, PotentialParams};
use tuft_solver::{assemble, solve_potential_with_params, surface_velocity};

/// Unit sphere centred 1.5 above the ground plane z = 0, `2 n_lon (n_lat - 1)` panels.
fn sphere(n: usize) -> PanelMesh {
    let (n_lat, n_lon) = match n {
        2000 => (26, 40),
        5000 => (51, 50),
        10000 => (51, 100),
        _ => (101, 100),
    };
    let mut m = generate::latlong_sphere(1.0, n_lat, n_lon);
    m.map_vertices(|p| Point::new(p.x, p.y, p.z + 1.5));
    PanelMesh::new(m, Mirrors::ground(0.0)).unwrap()
}

fn sizes() -> Vec<usize> {
    let mut s = vec![2000, 5000, 10000];
    if std::env::var_os("TUFT_BENCH_LARGE").is_some() {
        s.push(20000);
    }
    s
}

fn kernels(c: &mut Criterion) {
    let panel = Panel::new([
        Point::new(0.0, 0.0, 0.0),
        Point::new(0.1, 0.0, 0.0),
        Point::new(0.0, 0.1, 0.0),
    ])
    .unwrap();
    let near: Vec<Point> = (0..1000)
        .map(|k| {
            Point::new(
                0.01 * (k % 10) as f64,
                0.01 * (k / 100) as f64,
                0.02 + 0.001 * (k % 7) as f64,
            )
        })
        .collect();
    let far: Vec<Point> = near
        .iter()
        .map(|p| Point::new(p.x + 2.0, p.y, p.z))
        .collect();
    let mut g = c.benchmark_group("influence_pairs");
    g.throughput(Throughput::Elements(near.len() as u64));
    g.bench_function("exact", |b| {
        b.iter(|| {
            near.iter()
                .map(|p| triangle::exact(black_box(p), &panel).source)
                .sum::<f64>()
        })
    });
    g.bench_function("far_field", |b| {
        b.iter(|| {
            far.iter()
                .map(|p| point::far(black_box(p), &panel).source)
                .sum::<f64>()
        })
    });
    g.finish();
}

fn assembly(c: &mut Criterion) {
    let params = PotentialParams::default();
    let mut g = c.benchmark_group("assembly_ground");
    g.sample_size(10).measurement_time(Duration::from_secs(5));
    for n in sizes() {
        let mesh = sphere(n);
        g.bench_with_input(BenchmarkId::from_parameter(n), &mesh, |b, m| {
            b.iter(|| assemble(m, &params).unwrap())
        });
    }
    g.finish();
}

fn solvers(c: &mut Criterion) {
    let params = PotentialParams::default();
    let v = Freestream::new(1.0, 0.0).velocity();
    let mut g = c.benchmark_group("linear");
    g.sample_size(10).measurement_time(Duration::from_secs(5));
    for n in sizes() {
        let system = assemble(&sphere(n), &params).unwrap();
        let rhs = system.rhs(&v);
        g.bench_with_input(BenchmarkId::new("gmres", n), &system, |b, s| {
            b.iter(|| {
                gmres(
                    s.matrix(),
                    &rhs,
                    params.krylov_tolerance,
                    params.max_iterations,
                    params.krylov_restart,
                )
                .unwrap()
            })
        });
        if n <= 5000 {
            g.bench_with_input(BenchmarkId::new("dense_lu", n), &system, |b, s| {
                b.iter_batched(
                    || s.clone(),
                    |s| DenseLu::factor(s).unwrap().solve(&rhs),
                    criterion::BatchSize::PerIteration,
                )
            });
        }
    }
    g.finish();
}

fn velocity(c: &mut Criterion) {
    let v = Freestream::new(1.0, 0.0).velocity();
    let mut g = c.benchmark_group("surface_velocity");
    g.sample_size(10);
    for n in sizes() {
        let mesh = sphere(n);
        let mu: Vec<f64> = mesh.panels.iter().map(|p| -0.5 * p.centroid.x).collect();
        g.bench_with_input(BenchmarkId::from_parameter(n), &mesh, |b, m| {
            b.iter(|| surface_velocity(m, &mu, &v))
        });
    }
    g.finish();
}

fn whole(c: &mut Criterion) {
    let fs = Freestream::new(1.0, 0.0);
    let params = PotentialParams::default();
    let mut g = c.benchmark_group("whole_solve_ground");
    g.sample_size(10).measurement_time(Duration::from_secs(5));
    for n in sizes() {
        let mesh = sphere(n);
        g.bench_with_input(BenchmarkId::from_parameter(n), &mesh, |b, m| {
            b.iter(|| solve_potential_with_params(m, &fs, &params).unwrap())
        });
    }
    g.finish();
}

criterion_group!(benches, kernels, assembly, solvers, velocity, whole);
criterion_main!(benches);
