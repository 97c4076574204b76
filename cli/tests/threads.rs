//! The thread count changes speed, not results: the same case run on one
//! and on two threads gives the same numbers to 1e-10 relative (parallel
//! work in tuft is split so that every sum is formed in a fixed order).
#![allow(clippy::unwrap_used, clippy::expect_used)]

mod common;

use common::{copy_case, tuft};

fn run(dir: &std::path::Path, threads: &str) -> (serde_json::Value, Vec<f64>) {
    let case = copy_case("coupe", dir);
    let out = format!("out-{threads}");
    let r = tuft(
        dir,
        &["run", &case, "--out", &out, "--threads", threads, "--quiet"],
    );
    assert!(r.code == 0 || r.code == 1, "tuft run failed: {}", r.stderr);
    let summary: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(dir.join(&out).join("summary.json")).unwrap(),
    )
    .unwrap();
    let csv = std::fs::read_to_string(dir.join(&out).join("panels.csv")).unwrap();
    let cp = csv
        .lines()
        .skip(1)
        .map(|l| l.split(',').nth(7).unwrap().parse::<f64>().unwrap())
        .collect();
    (summary, cp)
}

#[test]
fn one_and_two_threads_agree() {
    let dir = tempfile::tempdir().unwrap();
    let (s1, cp1) = run(dir.path(), "1");
    let (s2, cp2) = run(dir.path(), "2");
    assert_eq!(cp1.len(), cp2.len());
    let scale = cp1.iter().fold(0.0f64, |m, c| m.max(c.abs()));
    let worst = cp1
        .iter()
        .zip(&cp2)
        .fold(0.0f64, |m, (a, b)| m.max((a - b).abs()));
    assert!(
        worst <= 1e-10 * scale,
        "Cp differs by {worst} between 1 and 2 threads"
    );
    for key in common::COEFFICIENTS {
        let (a, b) = (
            s1["coefficients"][key].as_f64().unwrap(),
            s2["coefficients"][key].as_f64().unwrap(),
        );
        assert!(
            (a - b).abs() <= 1e-10 * a.abs().max(1e-3),
            "{key}: {a} vs {b}"
        );
    }
    for key in ["total", "front_axle", "rear_axle"] {
        let (a, b) = (
            s1["lift_kg"][key].as_f64().unwrap(),
            s2["lift_kg"][key].as_f64().unwrap(),
        );
        assert!(
            (a - b).abs() <= 1e-10 * a.abs().max(1.0),
            "lift_kg.{key}: {a} vs {b}"
        );
    }
}
