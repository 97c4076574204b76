//! Wrap a large generated surface once and print the time of each step;
//! run under `/usr/bin/time -v` to see the peak memory:
//!
//! ```text
//! cargo build --release -p tuft-mesh --example wrap_large
//! /usr/bin/time -v target/release/examples/wrap_large 2000000 10000
//! ```
//!
//! The surface: two lat-long spheres of radius 1 m, centres 1 m apart
//! along x (each runs into the other), pressed 1 cm into the ground at
//! z = 0, about `facets` facets in all.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::time::Instant;

use tuft_mesh::prepare::{PrepareParams, prepare_mesh};
use tuft_mesh::wrap::{WrapParams, reasons, wrap};
use tuft_mesh::{LengthUnit, Mirrors, TriMesh, Vector, generate};

fn sphere(facets: usize, centre: Vector) -> TriMesh {
    let n = ((facets / 2) as f64).sqrt().round() as usize;
    let mut m = generate::latlong_sphere(1.0, n + 1, n);
    m.map_vertices(|p| p + centre);
    m
}

fn main() {
    let args: Vec<usize> = std::env::args()
        .skip(1)
        .filter_map(|a| a.parse().ok())
        .collect();
    let facets = args.first().copied().unwrap_or(2_000_000);
    let target = args.get(1).copied().unwrap_or(10_000);
    let mut mesh = sphere(facets / 2, Vector::new(-0.5, 0.0, 0.99));
    let other = sphere(facets / 2, Vector::new(0.5, 0.0, 0.99));
    let offset = mesh.vertices.len() as u32;
    mesh.vertices.extend(&other.vertices);
    mesh.triangles
        .extend(other.triangles.iter().map(|t| t.map(|v| v + offset)));
    println!("{} facets", mesh.len());
    let mirrors = Mirrors::ground(0.0);
    let params = WrapParams::default();
    let t0 = Instant::now();
    let why = reasons(&mesh, &mirrors, &params, 1e-6);
    let t1 = Instant::now();
    let (wrapped, report) = wrap(&mesh, &mirrors, why, &params);
    let t2 = Instant::now();
    println!(
        "reasons {:.2} s, wrap {:.2} s: {} facets, cell {:.4} m, nodes {:?}, volume {:.4} m^3",
        (t1 - t0).as_secs_f64(),
        (t2 - t1).as_secs_f64(),
        wrapped.len(),
        report.cell,
        report.nodes,
        report.volume
    );
    drop(wrapped);
    let prepare = PrepareParams {
        units: LengthUnit::M,
        mirrors,
        target_panels: Some(target),
        ..PrepareParams::default()
    };
    let t = Instant::now();
    let (panels, _) = prepare_mesh(mesh, None, &prepare).unwrap();
    println!(
        "prepare (repair, wrap, coarsen, panels): {:.2} s, {} panels",
        t.elapsed().as_secs_f64(),
        panels.len()
    );
}
