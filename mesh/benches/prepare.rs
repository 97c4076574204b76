//! Read, repair and coarsen a 2-million-facet closed surface (a lat-long
//! sphere written as binary STL to a temporary file) to 10,000 panels.
//!
//! `cargo bench -p tuft-mesh --bench prepare` (about a minute; run it alone,
//! on a quiet machine). Results are kept in BENCHMARKS.md.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::io::{BufWriter, Write};
use std::time::Duration;

use criterion::{Criterion, criterion_group, criterion_main};
use tuft_mesh::prepare::{PrepareParams, prepare};
use tuft_mesh::{LengthUnit, TriMesh, generate};

fn write_binary(mesh: &TriMesh, path: &std::path::Path) {
    let mut w = BufWriter::new(std::fs::File::create(path).unwrap());
    w.write_all(&[0u8; 80]).unwrap();
    w.write_all(&(mesh.len() as u32).to_le_bytes()).unwrap();
    for t in &mesh.triangles {
        w.write_all(&[0u8; 12]).unwrap();
        for &v in t {
            let p = mesh.vertices[v as usize];
            for c in [p.x, p.y, p.z] {
                w.write_all(&(c as f32).to_le_bytes()).unwrap();
            }
        }
        w.write_all(&[0u8; 2]).unwrap();
    }
    w.flush().unwrap();
}

fn bench_prepare(c: &mut Criterion) {
    // 2 * 1000 * (1001 - 1) = 2,000,000 facets.
    let mesh = generate::latlong_sphere(1.0, 1001, 1000);
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("sphere-2m.stl");
    write_binary(&mesh, &path);
    drop(mesh);
    let params = PrepareParams {
        units: LengthUnit::M,
        target_panels: Some(10_000),
        ..PrepareParams::default()
    };
    let mut group = c.benchmark_group("prepare");
    group.sample_size(10);
    group.measurement_time(Duration::from_secs(20));
    group.warm_up_time(Duration::from_secs(1));
    group.bench_function("sphere_2M_facets_to_10k_panels", |b| {
        b.iter(|| prepare(&path, &params).unwrap())
    });
    group.finish();
}

criterion_group!(benches, bench_prepare);
criterion_main!(benches);
