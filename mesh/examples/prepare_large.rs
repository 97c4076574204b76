//! Prepare a large generated surface once and print the time of each step;
//! run under `/usr/bin/time -v` to see the peak memory:
//!
//! ```text
//! cargo build --release -p tuft-mesh --example prepare_large
//! /usr/bin/time -v target/release/examples/prepare_large 2000000 10000
//! ```
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::io::{BufWriter, Write};
use std::time::Instant;

use tuft_mesh::prepare::{PrepareParams, prepare};
use tuft_mesh::{LengthUnit, TriMesh, generate};

/// A lat-long sphere of radius 1 m with about `facets` facets.
fn sphere(facets: usize) -> TriMesh {
    let n = ((facets / 2) as f64).sqrt().round() as usize;
    generate::latlong_sphere(1.0, n + 1, n)
}

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

fn main() {
    let args: Vec<usize> = std::env::args()
        .skip(1)
        .filter_map(|a| a.parse().ok())
        .collect();
    let facets = args.first().copied().unwrap_or(2_000_000);
    let target = args.get(1).copied().unwrap_or(10_000);
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("large.stl");
    let mesh = sphere(facets);
    write_binary(&mesh, &path);
    println!("wrote {} facets", mesh.len());
    drop(mesh);
    let params = PrepareParams {
        units: LengthUnit::M,
        target_panels: Some(target),
        ..PrepareParams::default()
    };
    let t0 = Instant::now();
    let (m, _) = tuft_mesh::import::read_stl(&path).unwrap();
    let t1 = Instant::now();
    let (half, cut) = tuft_mesh::cut::keep_right_half(&m).unwrap().unwrap();
    println!(
        "cut at y = 0 (a whole body declared a half model): {:.2} s, {} of {} facets kept, {} split, \
         halves differ by {:.1e} m",
        (Instant::now() - t1).as_secs_f64(),
        half.len(),
        cut.facets_before,
        cut.facets_split,
        cut.largest_difference
    );
    drop(half);
    let t1r = Instant::now();
    let (m, r) = tuft_mesh::repair::repair(m, &tuft_mesh::Mirrors::none()).unwrap();
    let t2 = Instant::now();
    let (_, c) = tuft_mesh::coarsen::coarsen(&m, &tuft_mesh::Mirrors::none(), target);
    let t3 = Instant::now();
    println!(
        "stages: read {:.2} s, repair {:.2} s, coarsen {:.2} s; welded {}, degenerate {:?}; coarsen {:?}",
        (t1 - t0).as_secs_f64(),
        (t2 - t1r).as_secs_f64(),
        (t3 - t2).as_secs_f64(),
        r.vertices_welded,
        r.degenerate,
        c
    );
    drop(m);
    if std::env::var_os("TUFT_PASSES").is_some() {
        passes(&path);
    }
    let start = Instant::now();
    let (panels, report) = prepare(&path, &params).unwrap();
    println!(
        "prepare: {:.2} s, {} panels, max deviation {:.2e} m, repair changes {}",
        start.elapsed().as_secs_f64(),
        panels.len(),
        report.coarsen.as_ref().map_or(0.0, |c| c.max_deviation),
        report.repair.changes()
    );
}

/// Time each repair pass on its own (set `TUFT_PASSES=1`).
fn passes(path: &std::path::Path) {
    use tuft_mesh::repair::*;
    let (mut m, _) = tuft_mesh::import::read_stl(path).unwrap();
    let t = Instant::now();
    weld(&mut m, 3.46e-5);
    println!("weld {:.2}", t.elapsed().as_secs_f64());
    let t = Instant::now();
    drop_degenerate(&mut m, 179.0, 1e-3);
    println!("degenerate {:.2}", t.elapsed().as_secs_f64());
    let t = Instant::now();
    drop_duplicates(&mut m);
    println!("duplicates {:.2}", t.elapsed().as_secs_f64());
    let t = Instant::now();
    let (o, mut comp) = orient_consistently(&mut m);
    println!("orient {:.2}", t.elapsed().as_secs_f64());
    let t = Instant::now();
    let s = HoleSettings {
        mirrors: tuft_mesh::Mirrors::none(),
        plane_tolerance: 1e-4,
        fill_limit: 0.07,
        local_factor: 4.0,
        slit_ratio: 1e-4,
    };
    close_holes(&mut m, &mut comp, &s).unwrap();
    println!("holes {:.2}", t.elapsed().as_secs_f64());
    let t = Instant::now();
    orient_outward(&mut m, &comp, o.components, &tuft_mesh::Mirrors::none());
    println!("outward {:.2}", t.elapsed().as_secs_f64());
    let t = Instant::now();
    remove_unused_vertices(&mut m);
    println!("compact {:.2}", t.elapsed().as_secs_f64());
    for regularize in [false, true] {
        let t = Instant::now();
        let p = tuft_mesh::coarsen::CoarsenParams {
            target_panels: 10_000,
            regularize,
            deviation_samples: 1,
            ..Default::default()
        };
        let (_, r) = tuft_mesh::coarsen::coarsen_with_params(&m, &tuft_mesh::Mirrors::none(), &p);
        println!(
            "coarsen (1 sample, regularize {regularize}) {:.2} {:?}",
            t.elapsed().as_secs_f64(),
            r.fallback
        );
    }
}
