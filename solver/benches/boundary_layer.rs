//! Boundary-layer screening cost: streamline tracing plus marching on the
//! exact potential-flow velocity of a sphere and of a 4:1 prolate spheroid
//! (Lamb, Hydrodynamics sec. 114-115), swept over the panel count.
//!
//! Run with `cargo bench -p tuft-solver --bench boundary_layer`.
#![allow(missing_docs)]

use criterion::{BenchmarkId, Criterion, criterion_group, criterion_main};
use nalgebra::{Point3, Vector3};
use tuft_mesh::{Mirrors, PanelMesh, generate};
use tuft_solver::boundary_layer::{BoundaryLayerParams, screen_boundary_layer};

/// `V = (1 + k) U [e_x - (e_x . n) n]` at the panel centroids.
fn velocity(mesh: &PanelMesh, k: f64, speed: f64) -> Vec<Vector3<f64>> {
    let d = Vector3::x();
    mesh.panels
        .iter()
        .map(|p| {
            let n = p.normal.into_inner();
            (d - n * d.dot(&n)) * (1.0 + k) * speed
        })
        .collect()
}

fn body(level: u32, b: f64) -> PanelMesh {
    let mut m = generate::icosphere(1.0, level);
    m.map_vertices(|p| Point3::new(p.x, b * p.y, b * p.z));
    PanelMesh::new(m, Mirrors::none()).unwrap_or_else(|e| panic!("bench mesh: {e}"))
}

fn screening(c: &mut Criterion) {
    let mut group = c.benchmark_group("boundary_layer_screen");
    group.sample_size(10);
    let params = BoundaryLayerParams::default();
    // Sphere: k = 0.5; 4:1 spheroid: k = 0.0816 (Lamb's table).
    for (name, b, k) in [("sphere", 1.0, 0.5), ("spheroid_4to1", 0.25, 0.0816)] {
        for level in [3, 4, 5] {
            let mesh = body(level, b);
            let v = velocity(&mesh, k, 40.0);
            group.bench_with_input(BenchmarkId::new(name, mesh.len()), &mesh, |bench, mesh| {
                bench.iter(|| screen_boundary_layer(mesh, &v, 40.0, &params));
            });
        }
    }
    group.finish();
}

criterion_group!(benches, screening);
criterion_main!(benches);
