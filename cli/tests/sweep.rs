//! End-to-end tests of `tuft sweep` and `tuft collect`.
#![allow(clippy::unwrap_used, clippy::expect_used)]

mod common;

use std::collections::BTreeSet;
use std::path::Path;
use std::process::Command;

use serde_json::Value;

const TUFT: &str = env!("CARGO_BIN_EXE_tuft");

fn tuft(args: &[&str]) -> (i32, String) {
    let out = Command::new(TUFT).args(args).output().unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// `tuft sweep FILE --out OUT`: its exit code and stderr.
fn sweep_to(file: &std::path::Path, out: &std::path::Path) -> (i32, String) {
    tuft(&[
        "sweep",
        file.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ])
}

/// The exit code a sweep owes the progress lines on its stderr: 2 when a
/// variant failed, 1 when one finished with warnings (as `tuft run`
/// exits 1 on them), else 0.
fn sweep_code(err: &str) -> i32 {
    let lines = || err.lines().filter(|l| l.starts_with('['));
    if lines().any(|l| l.contains("FAILED")) {
        2
    } else if lines().any(|l| l.contains(" warning")) {
        1
    } else {
        0
    }
}

fn json(path: &Path) -> Value {
    serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap()
}

fn rel_close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol * a.abs().max(b.abs()).max(1e-300)
}

const COUPE: &str = "[geometry]\nshape = \"coupe\"\npanels = 1000\n[ground]\nz = 0.0\n\
                     [reference]\nfront_axle_x = 0.95\nrear_axle_x = 3.65\n";

#[test]
fn three_yaw_angles_share_one_matrix_and_equal_separate_runs() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    std::fs::write(d.join("base.toml"), COUPE).unwrap();
    std::fs::write(
        d.join("yaw.toml"),
        "base = \"base.toml\"\n[[vary]]\nkey = \"yaw\"\nvalues = [0.0, 4.0, 8.0]\n",
    )
    .unwrap();
    let out = d.join("yaw");
    let (code, err) = sweep_to(&d.join("yaw.toml"), &out);
    assert_eq!(code, sweep_code(&err), "{err}");
    // One result line per variant.
    assert_eq!(
        err.lines().filter(|l| l.starts_with('[')).count(),
        3,
        "{err}"
    );
    // And the phases between, as `tuft run` says them in a log: the
    // shared geometry and matrix once, each variant's loop (a review's
    // sweep had sat silent for 25 to 35 s a variant).
    for phase in [
        "yaw-0: reading and preparing the geometry ...",
        "yaw-0: assembling the matrix the 3 variants share",
        "yaw-4: separated-flow loop on the shared matrix",
        "yaw-8: drawing pictures and the report ...",
    ] {
        assert!(err.contains(phase), "{phase}: {err}");
    }
    assert_eq!(err.matches("preparing the geometry").count(), 1, "{err}");
    for (k, yaw) in [0.0, 4.0, 8.0].into_iter().enumerate() {
        let name = format!("yaw-{yaw}");
        let v = json(&out.join(&name).join("variant.json"));
        // The flag each variant carries: one assembly for the three,
        // paid for by the first, reused by the others.
        assert_eq!(v["matrix"]["variants_sharing"], 3);
        assert_eq!(v["matrix"]["assemblies"], 1);
        assert_eq!(v["matrix"]["assembled_for"], "yaw-0");
        assert_eq!(v["matrix"]["reused"], Value::Bool(k > 0));
        // The same case run alone with `tuft run` (its own assembly and
        // assembly) gives the same numbers to 1e-10 relative: the
        // matrix does not depend on the free stream (Katz & Plotkin 2001,
        // sec. 12.2), only the right-hand side does.
        let case = d.join(format!("alone-{k}.toml"));
        std::fs::write(&case, format!("{COUPE}[flow]\nyaw = {yaw:?}\n")).unwrap();
        let alone = d.join(format!("alone-{k}"));
        let (code, err) = tuft(&[
            "run",
            case.to_str().unwrap(),
            "--out",
            alone.to_str().unwrap(),
            "--quiet",
        ]);
        assert!(code == 0 || code == 1, "{err}");
        let (s1, s2) = (
            json(&out.join(&name).join("summary.json")),
            json(&alone.join("summary.json")),
        );
        for p in [
            "/coefficients/drag",
            "/coefficients/lift",
            "/coefficients/side",
            "/lift_kg/front_axle",
            "/drag_estimate/cd_low",
            "/drag_estimate/cd_high",
            "/separation/area_m2",
        ] {
            let (a, b) = (
                s1.pointer(p).unwrap().as_f64().unwrap(),
                s2.pointer(p).unwrap().as_f64().unwrap(),
            );
            assert!(rel_close(a, b, 1e-10), "{name} {p}: {a} vs {b}");
        }
        let cp = |dir: &Path| -> Vec<f64> {
            std::fs::read_to_string(dir.join("panels.csv"))
                .unwrap()
                .lines()
                .skip(1)
                .map(|l| l.split(',').nth(7).unwrap().parse().unwrap())
                .collect()
        };
        let (c1, c2) = (cp(&out.join(&name)), cp(&alone));
        assert_eq!(c1.len(), c2.len());
        let scale = c2.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
        for (a, b) in c1.iter().zip(&c2) {
            assert!((a - b).abs() <= 1e-10 * scale, "{name}: Cp {a} vs {b}");
        }
    }
    // Collect keeps the three yaw angles apart (drag at another yaw is
    // another test: each is first in its own wind condition) and carries
    // each variant's warnings.
    let collected = Command::new(TUFT)
        .args(["collect", out.to_str().unwrap()])
        .output()
        .unwrap();
    let stdout = String::from_utf8_lossy(&collected.stdout);
    let c = json(&out.join("sweep.json"));
    let rows = c["variants"].as_array().unwrap();
    assert_eq!(rows.len(), 3);
    let order: Vec<(f64, u64)> = rows
        .iter()
        .map(|r| (r["yaw_deg"].as_f64().unwrap(), r["rank"].as_u64().unwrap()))
        .collect();
    assert_eq!(order, [(0.0, 1), (4.0, 1), (8.0, 1)]);
    let mut warned = false;
    for r in rows {
        let s = json(&out.join(r["name"].as_str().unwrap()).join("summary.json"));
        assert_eq!(r["warning_texts"], s["warnings"], "{}", r["name"]);
        warned |= !s["warnings"].as_array().unwrap().is_empty();
    }
    // A sweep over yaw carries the cross-wind note (what its plots against
    // yaw are worth), which, the same for every such sweep, does not set
    // the exit code: the variants' warnings do.
    assert_eq!(collected.status.code(), Some(i32::from(warned)), "{stdout}");
    assert!(
        stdout.contains("Drag and lift against yaw are this model's"),
        "{stdout}"
    );
    // One variant per yaw: nothing to rank, so a coarse mesh withholds
    // nothing either (a review's yaw sweep had read "the drag ranking is
    // not converged ... no winner is named").
    let first = stdout.lines().next().unwrap_or_default();
    assert!(
        first.contains("one variant per wind condition, so no drag ranking"),
        "{stdout}"
    );
    assert!(first.contains("yaw 0°: drag: yaw-0"), "{stdout}");
    assert!(first.contains("yaw 8°: drag: yaw-8"), "{stdout}");
    let csv = std::fs::read_to_string(out.join("sweep.csv")).unwrap();
    assert_eq!(csv.lines().count(), 4);
    let html = std::fs::read_to_string(out.join("sweep.html")).unwrap();
    assert_eq!(
        html.matches("<figure><img").count(),
        5,
        "drag, lift, separated area, front- and rear-axle lift against yaw"
    );
    // Each yaw angle's variant at a glance, under its wind condition.
    assert_eq!(html.matches("<img class=\"glance\"").count(), 3);
    assert!(html.contains("<h3>yaw 4°</h3>"), "{html}");
    assert!(html.contains("seen from its lee side"), "{html}");
    // The separated-share caution is judged within a wind condition, and
    // each condition here has one variant: nothing to compare.
    assert!(!html.contains("drag ranking of rear slants"));
    assert_eq!(html.contains("<h2>Warnings</h2>"), warned);
}

/// Spheres over a ground 0.55 m below their centres: the 0.7 m radius
/// reaches 0.15 m below it (a tenth of its height, twice what tyres may
/// be pressed in), which only the run finds, once the body is prepared.
const SPHERE_SWEEP: &str = "[base.geometry]\nshape = \"sphere\"\npanels = 320\n\
    [base.ground]\nz = -0.55\n\
    [[base.region]]\nname = \"rear half\"\nfacing = \"rear\"\n\
    [[vary]]\nkey = \"speed\"\nvalues = [20.0, 30.0]\n\
    [[vary]]\nkey = \"radius\"\nvalues = [0.5, 0.7, 0.4]\n";

#[test]
fn shards_split_the_variants_without_loss_or_repeats_and_failures_are_reported() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let file = d.join("s.toml");
    std::fs::write(&file, SPHERE_SWEEP).unwrap();
    let out = d.join("s");
    // Six variants, two of which (radius 0.7, through the ground) fail;
    // four shards of 1 or 2 variants each.
    let mut ran: Vec<String> = Vec::new();
    let mut failed = 0;
    for k in 1..=4 {
        let shard = format!("{k}/4");
        let (code, err) = tuft(&[
            "sweep",
            file.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
            "--shard",
            &shard,
        ]);
        let lines: Vec<&str> = err.lines().filter(|l| l.starts_with('[')).collect();
        assert!((1..=2).contains(&lines.len()), "{shard}: {err}");
        let bad = lines.iter().filter(|l| l.contains("FAILED")).count();
        assert_eq!(code, sweep_code(&err), "{shard}: {err}");
        failed += bad;
        ran.extend(lines.iter().map(|l| {
            l.split_whitespace()
                .nth(1)
                .unwrap()
                .trim_end_matches(':')
                .to_string()
        }));
    }
    assert_eq!(failed, 2);
    let unique: BTreeSet<&String> = ran.iter().collect();
    assert_eq!(unique.len(), ran.len(), "no variant runs twice: {ran:?}");
    let plan = json(&out.join("sweep-plan.json"));
    let planned: BTreeSet<String> = plan["variants"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v["name"].as_str().unwrap().to_string())
        .collect();
    assert_eq!(planned.len(), 6);
    assert_eq!(
        unique.into_iter().cloned().collect::<BTreeSet<_>>(),
        planned,
        "every variant ran once"
    );
    // Collect finds the four that finished and names the two that failed
    // (with --threads, as every command takes it).
    let (code, err) = tuft(&[
        "collect",
        out.to_str().unwrap(),
        "--quiet",
        "--threads",
        "1",
    ]);
    // Planned variants missing: the study is incomplete, a failure; each
    // with the reason its run gave, kept by the sweep, and the advice to
    // mend it (running again alone fails them again).
    assert_eq!(code, 2);
    assert!(
        err.contains("mend what each failure names, then run the sweep again"),
        "{err}"
    );
    assert_eq!(
        std::fs::read_dir(out.join("failures")).unwrap().count(),
        2,
        "one reason per failed variant"
    );
    let c = json(&out.join("sweep.json"));
    assert_eq!(c["variants"].as_array().unwrap().len(), 4);
    let missing: Vec<&str> = c["missing"]
        .as_array()
        .unwrap()
        .iter()
        .map(|m| m.as_str().unwrap())
        .collect();
    assert_eq!(missing.len(), 2);
    assert!(
        missing
            .iter()
            .all(|m| m.contains("radius-0.7") && m.contains("(failed: ") && m.contains("ground")),
        "{missing:?}"
    );
    // The region's share and verdict per variant, in sweep.csv and on the
    // page.
    let csv = std::fs::read_to_string(out.join("sweep.csv")).unwrap();
    let header: Vec<&str> = csv.lines().next().unwrap().split(',').collect();
    let at = header
        .iter()
        .position(|h| *h == "region:rear half:verdict")
        .unwrap();
    assert_eq!(header[at - 1], "region:rear half:separated_percent");
    for line in csv.lines().skip(1) {
        let verdict = line.split(',').nth(at).unwrap();
        assert!(
            ["attached", "partly separated", "separated"].contains(&verdict),
            "{line}"
        );
    }
    let html = std::fs::read_to_string(out.join("sweep.html")).unwrap();
    assert!(html.contains("<th>rear half separated</th>"));
    // Two speeds: two wind conditions, one ranking each.
    assert!(html.contains("restarts at 1 in each"));
    // A second pass keeps the finished folders and runs only what failed.
    let (code, err) = sweep_to(&file, &out);
    assert_eq!(code, 2);
    assert_eq!(err.matches("already finished").count(), 4, "{err}");
    // A changed base case runs the finished variants again instead of
    // keeping results computed for other inputs.
    std::fs::write(&file, SPHERE_SWEEP.replace("panels = 320", "panels = 330")).unwrap();
    let (_, err) = sweep_to(&file, &out);
    assert_eq!(err.matches("already finished").count(), 0, "{err}");
    assert_eq!(err.matches("its case changed").count(), 4, "{err}");
    // ... and does run them: each of the four folders now holds the new
    // case's result.
    assert!(!err.contains("already exists"), "{err}");
    let rerun = plan["variants"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| out.join(v["name"].as_str().unwrap()).join("summary.json"))
        .filter(|p| p.exists())
        .map(|p| json(&p)["case"]["geometry"]["panels"].clone())
        .collect::<Vec<_>>();
    assert_eq!(rerun.len(), 4, "{err}");
    assert!(rerun.iter().all(|p| p == 330), "{rerun:?}");
}

/// `--memory-limit` holds for a sweep as for `tuft run`: a shared matrix
/// that would not fit is refused before it is assembled, each variant is
/// reported failed with the reason (the refusal `tuft run` gives, with a
/// panel count that fits), and no result folder is written; an attached
/// sweep is held to it too.
#[test]
fn a_sweep_keeps_to_the_memory_limit() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    for (name, solver) in [
        ("loop", ""),
        ("attached", "[base.solver]\nwakes = \"attached\"\n"),
    ] {
        let file = d.join(format!("{name}.toml"));
        std::fs::write(
            &file,
            format!(
                "[base.geometry]\nshape = \"sphere\"\npanels = 1280\n{solver}\
                 [[vary]]\nkey = \"speed\"\nvalues = [20.0, 30.0]\n"
            ),
        )
        .unwrap();
        let out = d.join(name);
        let (code, err) = tuft(&[
            "sweep",
            file.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
            // Room for the smallest run a case may ask for (100 panels),
            // not for 1,280.
            "--memory-limit",
            "62M",
        ]);
        assert_eq!(code, 2, "{name}: {err}");
        let failed: Vec<&str> = err.lines().filter(|l| l.contains("FAILED")).collect();
        assert_eq!(failed.len(), 2, "{name}: {err}");
        assert!(
            failed
                .iter()
                .all(|l| l.contains("GB is available") && l.contains("geometry.panels")),
            "{name}: {err}"
        );
        assert!(
            !out.join("speed-20").exists() && !out.join("speed-30").exists(),
            "{name}: no result folder"
        );
    }
}

/// A finished variant whose case has changed since (the base case was
/// edited and only one shard ran again) is not ranked by `collect`: it is
/// listed as computed for an older case.
/// The numbers in the column `name` of `out`'s sweep.csv, in its order.
fn number_column(out: &Path, name: &str) -> Vec<f64> {
    let csv = std::fs::read_to_string(out.join("sweep.csv")).unwrap();
    let mut lines = csv.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    let at = header.iter().position(|h| *h == name).unwrap();
    lines
        .map(|l| l.split(',').nth(at).unwrap().parse().unwrap())
        .collect()
}

/// `tuft sweep FILE --out OUT` as arguments, run once (its exit code
/// checked against its progress lines).
fn sweep_args<'a>(file: &'a Path, out: &'a Path) -> [&'a str; 4] {
    let args = [
        "sweep",
        file.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ];
    let (code, err) = tuft(&args);
    assert_eq!(code, sweep_code(&err), "{err}");
    args
}

/// A sweep of the sphere at two speeds written into `d`: its file, its
/// result folder and its text.
fn speed_sweep(d: &Path) -> (std::path::PathBuf, std::path::PathBuf, &'static str) {
    let sweep = "[base.geometry]\nshape = \"sphere\"\npanels = 320\n\
                 [[vary]]\nkey = \"speed\"\nvalues = [20.0, 30.0]\n";
    let file = d.join("s.toml");
    std::fs::write(&file, sweep).unwrap();
    (file, d.join("s"), sweep)
}

#[test]
fn collect_leaves_out_results_of_an_older_case() {
    let dir = tempfile::tempdir().unwrap();
    let (file, out, sweep) = speed_sweep(dir.path());
    let args = sweep_args(&file, &out);
    std::fs::write(&file, sweep.replace("panels = 320", "panels = 330")).unwrap();
    let (code, err) = tuft(&[&args[..], &["--shard", "1/2"]].concat());
    assert_eq!(code, sweep_code(&err), "{err}");
    let (code, err) = tuft(&["collect", out.to_str().unwrap(), "--quiet"]);
    assert_eq!(code, 2);
    assert!(
        err.starts_with("tuft: ")
            && err.contains("1 of the sweep's 2 planned variants is missing or failed (speed-30; why: sweep.html)"),
        "{err}"
    );
    let c = json(&out.join("sweep.json"));
    let ranked: Vec<&str> = c["variants"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v["name"].as_str().unwrap())
        .collect();
    assert_eq!(ranked, ["speed-20"]);
    let missing = c["missing"].as_array().unwrap();
    assert_eq!(missing.len(), 1);
    let m = missing[0].as_str().unwrap();
    assert!(m.starts_with("speed-30") && m.contains("older case"), "{m}");
}

/// A finished variant of another sweep run into the same folder is left
/// out of the ranking, with a note naming it (a review's follow-up sweep
/// ranked 9 folders under its 3-variant name).
#[test]
fn collect_leaves_out_variants_of_another_sweep() {
    let dir = tempfile::tempdir().unwrap();
    let (file, out, _) = speed_sweep(dir.path());
    let (code, err) = tuft(&[
        "sweep",
        file.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(code, sweep_code(&err), "{err}");
    // A log says what runs as it starts.
    assert!(
        err.lines().next()
            == Some("speed-20: running with 1 more of this shape, variant 1 of 2 ..."),
        "{err}"
    );
    let other = out.join("speed-99");
    std::fs::create_dir(&other).unwrap();
    for f in std::fs::read_dir(out.join("speed-20")).unwrap() {
        let f = f.unwrap().path();
        if f.is_file() {
            std::fs::copy(&f, other.join(f.file_name().unwrap())).unwrap();
        }
    }
    let record = other.join("variant.json");
    let text = std::fs::read_to_string(&record).unwrap();
    std::fs::write(&record, text.replace("\"speed-20\"", "\"speed-99\"")).unwrap();
    let (code, err) = tuft(&["collect", out.to_str().unwrap(), "--quiet"]);
    assert_eq!(code, 1);
    // Quiet, a script still reads why the exit code is 1, on one line.
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(
        err.starts_with(&format!("tuft: {}: finished with ", out.display()))
            && err.contains("note")
            && err.trim_end().ends_with("sweep.html"),
        "{err}"
    );
    let c = json(&out.join("sweep.json"));
    assert_eq!(c["variants"].as_array().unwrap().len(), 2);
    assert!(c["missing"].as_array().unwrap().is_empty());
    let notes = c["notes"].to_string();
    assert!(
        notes.contains("also holds 1 finished variant of another sweep (speed-99)"),
        "{notes}"
    );
}

/// `tuft sweep --noise` measures each variant's panel noise; finished
/// variants run without it are run again rather than kept, and
/// `collect` carries each spread into sweep.csv.
#[test]
fn a_sweep_with_noise_runs_again_what_was_run_without() {
    let dir = tempfile::tempdir().unwrap();
    let (file, out, _) = speed_sweep(dir.path());
    let args = sweep_args(&file, &out);
    let (code, err) = tuft(&[&args[..], &["--noise"]].concat());
    assert_eq!(code, sweep_code(&err), "{err}");
    assert_eq!(
        err.matches("it was run without --noise, so it runs again")
            .count(),
        2,
        "{err}"
    );
    assert_eq!(err.matches("; panel noise: drag ").count(), 2, "{err}");
    for v in ["speed-20", "speed-30"] {
        let s = json(&out.join(v).join("summary.json"));
        assert_eq!(s["panel_noise"]["panels"].as_array().unwrap().len(), 3);
    }
    // Run again with --noise: both kept.
    let (_, err) = tuft(&[&args[..], &["--noise"]].concat());
    assert_eq!(err.matches("already finished, kept").count(), 2, "{err}");
    let (code, _) = tuft(&["collect", out.to_str().unwrap(), "--quiet"]);
    assert!(code <= 1);
    let spreads = number_column(&out, "panel_noise_counts");
    assert!(
        spreads.len() == 2 && spreads.iter().all(|&n| n >= 0.0),
        "{spreads:?}"
    );
    // The axles' spreads too, and the speed in km/h as a case gives it.
    for column in ["front_axle_noise_kg", "rear_axle_noise_kg"] {
        let kg = number_column(&out, column);
        assert!(
            kg.len() == 2 && kg.iter().all(|&n| n >= 0.0),
            "{column}: {kg:?}"
        );
    }
    let mut kmh = number_column(&out, "speed_kmh");
    kmh.sort_by(f64::total_cmp);
    assert_eq!(kmh, [72.0, 108.0]);
    // The page's table gives them beside the values.
    let html = std::fs::read_to_string(out.join("sweep.html")).unwrap();
    assert!(html.contains("<th>panel noise</th>"));
    assert!(html.contains("<td>drag "));
}

/// Values a case refuses (a negative speed) or a built-in shape's
/// generator refuses (a rear window at 89 degrees) stop the whole sweep
/// before any variant runs, naming each bad variant, with no folder
/// written: an overnight sweep had run its good variants and failed the
/// bad ones in the morning. A sweep file given to `tuft run`, or a case
/// file to `tuft sweep`, is named as such.
#[test]
fn bad_values_stop_the_sweep_before_any_variant_runs() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let file = d.join("bad.toml");
    std::fs::write(
        &file,
        "combine = \"each\"\n[base.geometry]\nshape = \"coupe\"\npanels = 600\n\
         [[vary]]\nkey = \"speed\"\nvalues = [30.0, -40.0]\n\
         [[vary]]\nkey = \"rear_window_deg\"\nvalues = [20, 89]\n",
    )
    .unwrap();
    let out = d.join("bad");
    let (code, err) = sweep_to(&file, &out);
    assert_eq!(code, 2, "{err}");
    let lines: Vec<&str> = err.lines().collect();
    assert_eq!(lines.len(), 1, "{err}");
    assert!(
        lines[0].starts_with("tuft:")
            && lines[0].contains("bad.toml")
            && lines[0].contains("2 of 4 variants cannot run, so none was started")
            && lines[0].contains("speed-minus40: flow.speed must be a positive number")
            && lines[0].contains("rear_window_deg-89: geometry.shape = \"coupe\""),
        "{err}"
    );
    assert!(!out.exists(), "no folder written");

    // The other kind of file.
    let case = d.join("case.toml");
    std::fs::write(&case, "[geometry]\nshape = \"sphere\"\n").unwrap();
    let (code, err) = tuft(&["sweep", case.to_str().unwrap()]);
    assert_eq!(code, 2, "{err}");
    assert!(
        err.contains("case.toml: this is a case file") && err.contains("tuft run"),
        "{err}"
    );
    let (code, err) = tuft(&["run", file.to_str().unwrap()]);
    assert_eq!(code, 2, "{err}");
    assert!(
        err.contains("bad.toml: this is a sweep file") && err.contains("tuft sweep"),
        "{err}"
    );
    let (code, err) = tuft(&["run", d.to_str().unwrap()]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("this is a folder"), "{err}");
}

/// A mistake in a sweep's base case file is named in that file, with its
/// line, on one line, before any variant runs.
#[test]
fn a_mistake_in_the_base_case_names_its_file_and_line() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    std::fs::write(
        d.join("basecase.toml"),
        "[geometry]\nshape = \"coupe\"\nrear_windo_deg = 30\n",
    )
    .unwrap();
    let file = d.join("sw.toml");
    std::fs::write(
        &file,
        "base = \"basecase.toml\"\n[[vary]]\nkey = \"speed\"\nvalues = [30.0]\n",
    )
    .unwrap();
    let (code, err) = tuft(&["sweep", file.to_str().unwrap()]);
    assert_eq!(code, 2, "{err}");
    let lines: Vec<&str> = err.lines().collect();
    assert_eq!(lines.len(), 1, "{err}");
    assert!(
        lines[0].starts_with("tuft:")
            && lines[0].contains("basecase.toml: line 3")
            && lines[0].contains("rear_windo_deg"),
        "{err}"
    );
}

/// Each variant's axles are checked as `tuft run` checks them: one that
/// moves an axle off the body fails with the reason, the others run.
#[test]
fn a_variant_with_an_axle_off_the_body_fails_alone() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let file = d.join("axles.toml");
    std::fs::write(
        &file,
        "[base.geometry]\nshape = \"sphere\"\npanels = 320\n[base.reference]\nrear_axle_x = 0.3\n\
         [[vary]]\nkey = \"reference.front_axle_x\"\nvalues = [-0.3, -5.0]\n",
    )
    .unwrap();
    let out = d.join("axles");
    let (code, err) = sweep_to(&file, &out);
    assert_eq!(code, 2, "{err}");
    let failed: Vec<&str> = err.lines().filter(|l| l.contains("FAILED")).collect();
    assert_eq!(failed.len(), 1, "{err}");
    assert!(
        failed[0].contains("-5") && failed[0].contains("front_axle_x"),
        "{err}"
    );
    assert_eq!(
        err.lines()
            .filter(|l| l.starts_with('[') && !l.contains("FAILED"))
            .count(),
        1,
        "{err}"
    );
}

/// `tuft sweep`, `tuft collect` and `tuft compare` with their stdout
/// closed by a reader that stopped (`| head`): no panic on the broken pipe
/// (exit 101 before), the usual exit code, the files written.
#[test]
fn a_closed_stdout_ends_sweep_collect_and_compare_quietly() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    std::fs::write(
        d.join("s.toml"),
        "[base.geometry]\nshape = \"sphere\"\npanels = 320\n[[vary]]\nkey = \"speed\"\nvalues = [20.0, 30.0]\n",
    )
    .unwrap();
    let closed = |args: &[&str]| common::with_closed_stdout(d, args);
    let (code, err) = closed(&["sweep", "s.toml"]);
    assert_eq!(code, Some(sweep_code(&err)), "{err}");
    let (code, err) = closed(&["collect", "s"]);
    assert!(matches!(code, Some(0 | 1)), "{err}");
    assert!(d.join("s").join("sweep.json").is_file());
    let (code, err) = closed(&["compare", "s/speed-20", "s/speed-30", "--out", "c"]);
    assert!(matches!(code, Some(0 | 1)), "{err}");
    assert!(d.join("c").join("compare.json").is_file());
}

/// The pictures of `sweep.html`'s "Separation at a glance", in page
/// order: (alt text, PNG).
fn glance_pictures(html: &str) -> Vec<(String, Vec<u8>)> {
    use base64::Engine as _;
    html.split("<img class=\"glance\" alt=\"")
        .skip(1)
        .map(|rest| {
            let (alt, rest) = rest.split_once('"').unwrap();
            let data = rest
                .split_once("base64,")
                .unwrap()
                .1
                .split_once('"')
                .unwrap()
                .0;
            let png = base64::engine::general_purpose::STANDARD
                .decode(data)
                .unwrap();
            (alt.to_string(), png)
        })
        .collect()
}

/// `sweep.html` shows every ranked variant's separation at a glance, one
/// picture each in rank order, labelled with its rank, name, swept value,
/// C_D and separated share, all at one scale (spheres of radius 0.25,
/// 0.35 and 0.5: the body's pixels grow with the radius squared); a
/// variant that failed and one whose `mesh.json` is gone get a line
/// saying so, and the rest of the page and files are still written.
#[test]
fn the_page_shows_each_variant_at_a_glance_in_rank_order() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let file = d.join("s.toml");
    std::fs::write(
        &file,
        "combine = \"each\"\n[base.geometry]\nshape = \"sphere\"\npanels = 320\n\
         [[base.region]]\nname = \"rear half\"\nfacing = \"rear\"\n\
         [[vary]]\nkey = \"radius\"\nvalues = [0.5, 0.25, 0.35]\n\
         [[vary]]\nkey = \"ground.z\"\nvalues = [0.0]\n",
    )
    .unwrap();
    let out = d.join("s");
    let (code, err) = sweep_to(&file, &out);
    // ground-0 fails: the ground through the sphere's centre; collect
    // says the study is incomplete.
    assert_eq!(code, 2, "{err}");
    let (code, err) = tuft(&["collect", out.to_str().unwrap(), "--quiet"]);
    assert_eq!(code, 2, "{err}");
    let c = json(&out.join("sweep.json"));
    // The failed variant, for a script: its name, status and reason.
    let failed = &c["missing_variants"][0];
    assert_eq!(c["missing_variants"].as_array().unwrap().len(), 1);
    assert_eq!(failed["status"], "failed");
    assert!(
        failed["variant"].as_str().unwrap().starts_with("ground")
            && failed["reason"].as_str().unwrap().contains("ground"),
        "{failed}"
    );
    let ranked: Vec<(u64, String, f64)> = c["variants"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| {
            (
                r["rank"].as_u64().unwrap(),
                r["name"].as_str().unwrap().to_string(),
                r["settings"]["geometry.radius"].as_f64().unwrap(),
            )
        })
        .collect();
    assert_eq!(ranked.len(), 3);
    // In free air there is no clearance to give (sweep.csv's column empty).
    for r in c["variants"].as_array().unwrap() {
        assert!(r["clearance_m"].is_null(), "{r}");
    }
    let csv = std::fs::read_to_string(out.join("sweep.csv")).unwrap();
    assert!(
        csv.lines()
            .next()
            .unwrap()
            .contains(",yaw_deg,clearance_m,cd,")
    );
    let html = std::fs::read_to_string(out.join("sweep.html")).unwrap();
    let section = html.find("<h2>Separation at a glance</h2>").unwrap();
    assert!(html.find("<h2>Ranking</h2>").unwrap() < section);
    assert!(section < html.find("<h2>Plots</h2>").unwrap());
    assert!(html.contains("<img class=\"glance-key\""));
    let pictures = glance_pictures(&html);
    assert_eq!(pictures.len(), 3, "one picture per variant");
    let mut body = Vec::new();
    for ((alt, png), (rank, name, radius)) in pictures.iter().zip(&ranked) {
        assert!(alt.starts_with(&format!("{rank}. {name}: ")), "{alt}");
        assert!(
            alt.contains(&format!("geometry.radius {radius} m; C_D "))
                && alt.contains("% of the surface"),
            "{alt}"
        );
        let p = common::read_png(png);
        assert_eq!((p.width, p.height), (1140, 300));
        // The pair of views under the label band: not white is body,
        // outline or the region's name.
        let drawn = p
            .pixels
            .chunks(p.channels)
            .skip(60 * p.width as usize)
            .filter(|px| px[..3] != [255, 255, 255])
            .count();
        body.push((*radius, drawn as f64));
    }
    body.sort_by(|a, b| a.0.total_cmp(&b.0));
    let ratio = body[2].1 / body[0].1;
    assert!((3.4..4.4).contains(&ratio), "{body:?}: one scale for all");
    assert!(
        html.contains("<p class=\"glance-none\">ground-0 (failed: ")
            && html.contains("): no picture.</p>"),
        "{html}"
    );
    // Without its mesh.json the second variant gets a line, not a picture.
    let second = &ranked[1].1;
    std::fs::remove_file(out.join(second).join("mesh.json")).unwrap();
    let (code, err) = tuft(&["collect", out.to_str().unwrap(), "--quiet"]);
    assert_eq!(code, 2, "{err}");
    let html = std::fs::read_to_string(out.join("sweep.html")).unwrap();
    let pictures = glance_pictures(&html);
    assert_eq!(pictures.len(), 2);
    assert!(pictures[0].0.starts_with(&format!("1. {}", ranked[0].1)));
    assert!(pictures[1].0.starts_with(&format!("3. {}", ranked[2].1)));
    let line = html
        .split("<p class=\"glance-none\">")
        .nth(1)
        .unwrap()
        .split("</p>")
        .next()
        .unwrap();
    assert!(
        line.starts_with(&format!("2. {second}: ")) && line.contains("mesh.json: missing"),
        "{line}"
    );
    assert!(html.contains("<h2>Plots</h2>"));
}

/// STL variants with labels: collect writes the labels to sweep.csv and
/// plots against them; relabelling a finished sweep keeps its results
/// and gives collect the new labels.
/// STL variants are plotted against their labels; relabelled, they are
/// kept; a file replaced under its name is run again whatever its time
/// stamp (a review's `cp -p` kept another geometry's result).
#[test]
fn labelled_stl_variants_are_plotted_against_their_labels() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    for name in ["low.stl", "high.stl"] {
        std::fs::copy(common::cases_dir().join("coupe.stl"), d.join(name)).unwrap();
    }
    let sweep = |labels: &str| {
        format!(
            "[base.geometry]\npanels = 600\n[base.ground]\nz = 0.0\n\
             [[vary]]\nkey = \"stl\"\nvalues = [\"low.stl\", \"high.stl\"]\n\
             labels = {labels}\nlabel = \"boot lid raise [mm]\"\n"
        )
    };
    let file = d.join("boot.toml");
    std::fs::write(&file, sweep("[0, 30]")).unwrap();
    let out = d.join("boot");
    let run = || sweep_to(&file, &out);
    let (code, err) = run();
    assert_eq!(code, sweep_code(&err), "{err}");
    let label_column = || {
        let (code, _) = tuft(&["collect", out.to_str().unwrap(), "--quiet"]);
        assert!(code <= 1);
        let mut v = number_column(&out, "boot lid raise [mm]");
        v.sort_by(f64::total_cmp);
        v
    };
    assert_eq!(label_column(), [0.0, 30.0]);
    let page = std::fs::read_to_string(out.join("sweep.html")).unwrap();
    assert!(page.contains("against boot lid raise [mm]"), "no plot");
    assert!(!page.contains("No plot against"), "the STLs are labelled");
    std::fs::write(&file, sweep("[0, 40]")).unwrap();
    let (_, err) = run();
    assert_eq!(err.matches("already finished, kept").count(), 2, "{err}");
    assert_eq!(label_column(), [0.0, 40.0]);
    // Another file put in under the same name with an old time stamp (as
    // `cp -p` or an unpacked archive leave it): run again, by content.
    let high = d.join("high.stl");
    let mut bytes = std::fs::read(&high).unwrap();
    bytes[..12].copy_from_slice(b"re-exported ");
    std::fs::write(&high, bytes).unwrap();
    let old = std::time::SystemTime::UNIX_EPOCH + std::time::Duration::from_secs(1_000_000_000);
    std::fs::File::options()
        .write(true)
        .open(&high)
        .unwrap()
        .set_modified(old)
        .unwrap();
    let (_, err) = run();
    assert_eq!(err.matches("already finished, kept").count(), 1, "{err}");
    assert_eq!(
        err.matches("is not the file its result was computed from, so it runs again")
            .count(),
        1,
        "{err}"
    );
}
