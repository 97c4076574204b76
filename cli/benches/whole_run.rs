//! The whole `tuft run` pipeline against a bare dense LU of the same size.
//!
//! For each panel count (2,000, 5,000, 10,000; 20,000 with
//! `TUFT_BENCH_LARGE=1`) the built `tuft` binary runs a generated case (the
//! built-in concept coupe above a ground plane, so every influence is
//! computed twice) as a separate process: geometry, potential flow,
//! boundary layer, loads, drag band, flow slices, pictures and report, all
//! written to disk. Its wall-clock time is taken from outside, and its peak
//! resident memory from `/usr/bin/time` when that exists. In the same
//! benchmark process faer factorises a seeded random diagonally dominant
//! N x N matrix (partial pivoting, all threads), N the run's panel count;
//! the table gives the median of the repetitions and the ratio
//! "whole run / bare LU". The run is the default one, with the
//! separated-flow loop; the same case with `[solver] wakes = "attached"`
//! is timed beside it, for the loop's cost (target: at most three times
//! the attached run).
//!
//! This is a plain timing harness, not criterion: one 10,000-panel LU takes
//! tens of seconds on a small machine and criterion wants at least ten
//! samples. Repetitions: `TUFT_BENCH_REPS` (default 3); sizes:
//! `TUFT_BENCH_SIZES=2000,10000` replaces the list. Run with
//! `cargo bench -p tuft --bench whole_run`; extra arguments are ignored, so
//! `cargo bench --workspace -- ...` passes criterion options through.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::path::Path;
use std::process::Command;
use std::time::Instant;

use faer::Mat;

/// The binary under test, as Cargo built it for this benchmark.
const TUFT: &str = env!("CARGO_BIN_EXE_tuft");

fn main() {
    // The solver's LU runs on every rayon thread; so does this one.
    faer::set_global_parallelism(faer::Par::rayon(0));
    let reps: usize = std::env::var("TUFT_BENCH_REPS")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(3)
        .max(1);
    let mut sizes = vec![2_000, 5_000, 10_000];
    if std::env::var_os("TUFT_BENCH_LARGE").is_some() {
        sizes.push(20_000);
    }
    if let Ok(list) = std::env::var("TUFT_BENCH_SIZES") {
        sizes = list
            .split(',')
            .filter_map(|s| s.trim().parse().ok())
            .collect();
    }
    let dir = tempfile::tempdir().expect("a temporary folder");
    println!("whole_run: {reps} repetitions, median wall-clock time (phases of the median run)");
    println!(
        "| panels (requested) | panels | whole run | peak RSS | bare LU | whole / LU | attached only | loop / attached | phases (s) |"
    );
    println!("| --- | --- | --- | --- | --- | --- | --- | --- | --- |");
    for &n in &sizes {
        let mut runs: Vec<Run> = (0..reps)
            .map(|_| run_case(dir.path(), n, "separated"))
            .collect();
        let attached = median(
            (0..reps)
                .map(|_| run_case(dir.path(), n, "attached").seconds)
                .collect(),
        );
        runs.sort_by(|a, b| a.seconds.total_cmp(&b.seconds));
        let mid = &runs[runs.len() / 2];
        let panels = mid.panels;
        let whole = median(runs.iter().map(|r| r.seconds).collect());
        let rss = runs.iter().filter_map(|r| r.peak_kb).max();
        let lu = median((0..reps).map(|i| bare_lu(panels, i as u64)).collect());
        println!(
            "| {n} | {panels} | {whole:.2} s | {} | {lu:.2} s | {:.2} | {attached:.2} s | {:.2} | {} |",
            rss.map_or("-".to_string(), |kb| format!(
                "{:.0} MB",
                kb as f64 * 1024.0 / 1e6
            )),
            whole / lu,
            whole / attached,
            mid.phases
        );
    }
}

/// One timed run of the binary.
struct Run {
    seconds: f64,
    panels: usize,
    peak_kb: Option<u64>,
    phases: String,
}

/// Write the case for `n` panels (separated-flow loop setting `wakes`),
/// run `tuft run` on it, read back what it did.
fn run_case(dir: &Path, n: usize, wakes: &str) -> Run {
    let case = dir.join(format!("coupe-{n}-{wakes}.toml"));
    let body = format!(
        "[geometry]\nshape = \"coupe\"\npanels = {n}\n\n[flow]\nspeed = 40.0\n\n\
         [ground]\nz = 0.0\n\n[reference]\nfront_axle_x = 0.95\nrear_axle_x = 3.65\n\n\
         [solver]\nwakes = \"{wakes}\"\n"
    );
    std::fs::write(&case, body).expect("case file written");
    let out = dir.join(format!("coupe-{n}-{wakes}"));
    let timer = Path::new("/usr/bin/time").exists();
    let mut cmd = if timer {
        let mut c = Command::new("/usr/bin/time");
        c.args(["-f", "peak_kb %M", TUFT]);
        c
    } else {
        Command::new(TUFT)
    };
    cmd.arg("run")
        .arg(&case)
        .arg("--out")
        .arg(&out)
        .args(["--force", "--quiet"]);
    let start = Instant::now();
    let output = cmd.output().expect("tuft runs");
    let seconds = start.elapsed().as_secs_f64();
    let stderr = String::from_utf8_lossy(&output.stderr);
    // 1 is a finished run with warnings to read (an attached-only run
    // warns that its drag is the plateau model's).
    assert!(
        matches!(output.status.code(), Some(0 | 1)),
        "tuft run failed on {n} panels: {stderr}"
    );
    let peak_kb = stderr
        .lines()
        .find_map(|l| l.strip_prefix("peak_kb "))
        .and_then(|s| s.trim().parse().ok());
    let summary: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("summary.json")).unwrap()).unwrap();
    let panels = summary["mesh"]["panels"].as_u64().unwrap() as usize;
    let phases = summary["timings_s"]
        .as_object()
        .unwrap()
        .iter()
        .map(|(k, v)| format!("{k} {:.2}", v.as_f64().unwrap_or(f64::NAN)))
        .collect::<Vec<_>>()
        .join(", ");
    Run {
        seconds,
        panels,
        peak_kb,
        phases,
    }
}

/// Seconds to LU-factorise (partial pivoting, faer, all rayon threads) a
/// seeded random N x N matrix with a dominant diagonal.
fn bare_lu(n: usize, seed: u64) -> f64 {
    let mut state = 0x9E37_79B9_7F4A_7C15_u64 ^ seed.wrapping_mul(0xD1B5_4A32_D192_ED03);
    let mut a = Mat::<f64>::from_fn(n, n, |_, _| next_unit(&mut state) - 0.5);
    for i in 0..n {
        a[(i, i)] += n as f64;
    }
    let start = Instant::now();
    let lu = a.partial_piv_lu();
    let seconds = start.elapsed().as_secs_f64();
    std::hint::black_box(&lu);
    seconds
}

/// Uniform number in [0, 1) from a 64-bit xorshift (Marsaglia 2003).
fn next_unit(state: &mut u64) -> f64 {
    *state ^= *state << 13;
    *state ^= *state >> 7;
    *state ^= *state << 17;
    (*state >> 11) as f64 / (1u64 << 53) as f64
}

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(f64::total_cmp);
    let m = v.len() / 2;
    if v.len() % 2 == 1 {
        v[m]
    } else {
        0.5 * (v[m - 1] + v[m])
    }
}
