//! The Slurm round trip: `tuft sweep --slurm` writes a job array and a
//! collect job; they are submitted to a real Slurm controller, and the
//! collected result must equal a local run of the same sweep.
//!
//! Needs a running Slurm (`sinfo` answering with an idle node) for the
//! submission. CI starts a single-node controller and node (see
//! `.ci/run`), and under CI (`CI=true`) a missing Slurm is a failure; on a
//! machine without Slurm the test says so on stderr and runs the
//! generated job scripts by hand instead (each array task with its
//! `SLURM_ARRAY_TASK_ID`, then the collect job), so everything but the
//! submission is still checked.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::path::Path;
use std::process::Command;
use std::time::{Duration, Instant};

use serde_json::Value;

const TUFT: &str = env!("CARGO_BIN_EXE_tuft");

/// Longest wait for the jobs to leave the queue.
const WAIT: Duration = Duration::from_secs(600);

fn slurm_ready() -> Result<(), String> {
    let out = Command::new("sinfo")
        .args(["-h", "-o", "%T"])
        .output()
        .map_err(|e| format!("cannot run sinfo: {e}"))?;
    let states = String::from_utf8_lossy(&out.stdout).to_string();
    if !out.status.success() {
        return Err(format!(
            "sinfo failed: {}",
            String::from_utf8_lossy(&out.stderr).trim()
        ));
    }
    if states
        .lines()
        .any(|s| s.starts_with("idle") || s.starts_with("mix") || s.starts_with("alloc"))
    {
        Ok(())
    } else {
        Err(format!(
            "no usable Slurm node (sinfo says {:?})",
            states.trim()
        ))
    }
}

fn run(cmd: &str, args: &[&str]) -> String {
    let out = Command::new(cmd).args(args).output().unwrap();
    assert!(
        out.status.success(),
        "{cmd} {args:?}: {}{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8_lossy(&out.stdout).into_owned()
}

fn json(path: &Path) -> Value {
    serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap()
}

const SWEEP: &str = "[base.geometry]\nshape = \"sphere\"\npanels = 320\n\
    [[vary]]\nkey = \"speed\"\nvalues = [20.0, 35.0]\n\
    [[vary]]\nkey = \"transition\"\nvalues = [\"free\", \"turbulent\"]\n";

/// Wait until none of `jobs` is in the queue.
fn wait_for(jobs: &[&str]) {
    let start = Instant::now();
    loop {
        let q = run("squeue", &["-h", "-j", &jobs.join(","), "-o", "%i %T"]);
        if q.trim().is_empty() {
            return;
        }
        assert!(
            start.elapsed() < WAIT,
            "jobs still queued after {WAIT:?}: {q}"
        );
        std::thread::sleep(Duration::from_secs(2));
    }
}

#[test]
fn a_sweep_through_slurm_equals_a_local_sweep() {
    let slurm = slurm_ready();
    if let Err(why) = &slurm {
        let ci = std::env::var("CI").is_ok_and(|v| v == "true");
        assert!(!ci, "Slurm is not available under CI: {why}");
        eprintln!(
            "SLURM NOT AVAILABLE: {why}. The job scripts run here by hand, as Slurm would run \
             them; their submission is tested under CI."
        );
    }
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let file = d.join("study.toml");
    std::fs::write(&file, SWEEP).unwrap();
    let cluster = d.join("cluster");
    run(
        TUFT,
        &[
            "sweep",
            file.to_str().unwrap(),
            "--out",
            cluster.to_str().unwrap(),
            "--slurm",
            "--shards",
            "2",
            "--quiet",
        ],
    );
    let scripts = cluster.join("slurm");
    let array = std::fs::read_to_string(scripts.join("array.sh")).unwrap();
    assert!(array.contains("#SBATCH --array=1-2"), "{array}");
    if slurm.is_ok() {
        run("bash", &[scripts.join("submit.sh").to_str().unwrap()]);
        let ids = std::fs::read_to_string(scripts.join("jobs.txt")).unwrap();
        let ids: Vec<&str> = ids.split_whitespace().collect();
        assert_eq!(ids.len(), 2, "{ids:?}");
        wait_for(&ids);
    } else {
        // Without a scheduler: each array task as Slurm starts it (its
        // task id in the environment), then the collect job.
        for task in ["1", "2"] {
            let out = Command::new("bash")
                .arg(scripts.join("array.sh"))
                .env("SLURM_ARRAY_TASK_ID", task)
                .output()
                .unwrap();
            assert!(
                out.status.success(),
                "array task {task}: {}",
                String::from_utf8_lossy(&out.stderr)
            );
        }
        // collect.sh runs `tuft collect`, which exits 1 on this coarse
        // sphere's warnings: the job ends as done all the same (as the
        // array tasks do on their variants' warnings), so that Slurm
        // counts it a success.
        let out = Command::new("bash")
            .arg(scripts.join("collect.sh"))
            .output()
            .unwrap();
        assert!(
            out.status.success(),
            "collect job: {}",
            String::from_utf8_lossy(&out.stderr)
        );
    }
    let log = |f: &str| std::fs::read_to_string(scripts.join(f)).unwrap_or_default();
    assert!(
        cluster.join("sweep.json").is_file(),
        "the collect job did not run; logs:\n{}\n{}\n{}",
        log("shard-1.log"),
        log("shard-2.log"),
        log("collect.log")
    );

    let local = d.join("local");
    // The sweep exits 1 on its variants' warnings, as collect does.
    let out = Command::new(TUFT)
        .args([
            "sweep",
            file.to_str().unwrap(),
            "--out",
            local.to_str().unwrap(),
            "--quiet",
        ])
        .output()
        .unwrap();
    assert!(
        matches!(out.status.code(), Some(0 | 1)),
        "sweep: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    // collect exits 1 when its variants carry warnings (this coarse
    // sphere's not-converged one); the result is written either way.
    let out = Command::new(TUFT)
        .args(["collect", local.to_str().unwrap(), "--quiet"])
        .output()
        .unwrap();
    assert!(
        matches!(out.status.code(), Some(0 | 1)),
        "collect: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    let (a, b) = (
        json(&cluster.join("sweep.json")),
        json(&local.join("sweep.json")),
    );
    let (ra, rb) = (
        a["variants"].as_array().unwrap(),
        b["variants"].as_array().unwrap(),
    );
    assert_eq!(ra.len(), 4);
    assert_eq!(ra.len(), rb.len());
    assert!(a["missing"].as_array().unwrap().is_empty());
    for (x, y) in ra.iter().zip(rb) {
        assert_eq!(x["name"], y["name"]);
        assert_eq!(x["rank"], y["rank"]);
        assert_eq!(x["settings"], y["settings"]);
        for k in [
            "cd",
            "cd_low",
            "cd_high",
            "cl",
            "lift_kg",
            "front_axle_kg",
            "rear_axle_kg",
            "separated_area_m2",
        ] {
            let (p, q) = (x[k].as_f64().unwrap(), y[k].as_f64().unwrap());
            // The same arithmetic in another process: equal to round-off
            // (1e-10 relative, far above the 1e-16 of a double).
            assert!(
                (p - q).abs() <= 1e-10 * p.abs().max(q.abs()).max(1e-12),
                "{} {k}: {p} vs {q}",
                x["name"]
            );
        }
    }
}
