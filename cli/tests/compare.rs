//! End-to-end tests of `tuft compare` on runs of the built binary.
#![allow(clippy::unwrap_used, clippy::expect_used)]

mod common;

use std::path::Path;
use std::process::Command;

use serde_json::Value;

const TUFT: &str = env!("CARGO_BIN_EXE_tuft");

fn tuft(args: &[&str]) -> std::process::Output {
    let out = Command::new(TUFT).args(args).output().unwrap();
    assert!(
        out.status.code() == Some(0) || out.status.code() == Some(1),
        "tuft {args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    out
}

fn run_case(dir: &Path, name: &str, body: &str) -> String {
    let case = dir.join(format!("{name}.toml"));
    std::fs::write(&case, body).unwrap();
    let out = dir.join(name);
    tuft(&[
        "run",
        case.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--quiet",
    ]);
    out.to_string_lossy().into_owned()
}

/// Compare `a` and `b` into `out`; exit 1 exactly when the comparison
/// has notes (warnings to read, as the README's exit codes say).
fn compare(a: &str, b: &str, out: &Path) -> Value {
    // --threads as every command takes it (a review's scripts passed it
    // to every command).
    let code = tuft(&[
        "compare",
        a,
        b,
        "--out",
        out.to_str().unwrap(),
        "--quiet",
        "--threads",
        "1",
    ])
    .status
    .code();
    for f in ["compare.html", "delta-cp.png", "separation-change.png"] {
        assert!(out.join(f).is_file(), "{f}");
    }
    let v: Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("compare.json")).unwrap()).unwrap();
    // B's named regions are outlined on the comparison's pictures as on
    // its own, on the separation change in dark purple (its legend's blue
    // is "separates in A only"), and nothing is without them.
    let pic = common::read_png(&std::fs::read(out.join("separation-change.png")).unwrap());
    let count = |colour: [u8; 3]| {
        pic.pixels
            .chunks(pic.channels)
            .filter(|p| p[..3] == colour)
            .count()
    };
    let outline = count([95, 20, 110]);
    assert!(count([20, 80, 200]) < 20, "the run report's blue outline");
    let b_regions: Value =
        serde_json::from_str(&std::fs::read_to_string(Path::new(b).join("summary.json")).unwrap())
            .unwrap();
    let named = b_regions["regions"]
        .as_array()
        .is_some_and(|r| !r.is_empty());
    assert_eq!(outline > 100, named, "{outline} outline pixels");
    // The changed shape's near-black outline where the note promises it
    // (a review found it on the Cp difference only).
    let promised = std::fs::read_to_string(out.join("compare.html"))
        .unwrap()
        .contains("(the changed shape outlined in black)");
    assert_eq!(
        count([25, 25, 25]) > 100,
        promised,
        "changed shape's outline"
    );
    let noted = v["notes"].as_array().is_some_and(|n| !n.is_empty());
    assert_eq!(code, Some(if noted { 1 } else { 0 }), "{}", v["notes"]);
    v
}

fn num(v: &Value, path: &str) -> f64 {
    v.pointer(path)
        .and_then(Value::as_f64)
        .unwrap_or_else(|| panic!("{path}"))
}

fn coupe(slope: f64) -> String {
    format!(
        "[geometry]\nshape = \"coupe\"\nrear_window_deg = {slope}\npanels = 1200\n[ground]\nz = 0.0\n\
         [reference]\nfront_axle_x = 0.95\nrear_axle_x = 3.65\n"
    )
}

/// Copy the folder `from` to `to`, subfolders included.
fn copy_dir(from: &Path, to: &Path) {
    std::fs::create_dir_all(to).unwrap();
    for entry in std::fs::read_dir(from).unwrap() {
        let entry = entry.unwrap();
        let target = to.join(entry.file_name());
        if entry.file_type().unwrap().is_dir() {
            copy_dir(&entry.path(), &target);
        } else {
            std::fs::copy(entry.path(), target).unwrap();
        }
    }
}

#[test]
fn a_run_against_itself_and_two_rear_window_slopes() {
    let dir = tempfile::tempdir().unwrap();
    let a = run_case(dir.path(), "c22", &coupe(22.0));
    let b = run_case(dir.path(), "c38", &coupe(38.0));

    // One folder named twice is refused as a slip.
    let twice = Command::new(TUFT)
        .args(["compare", &a, &a, "--quiet"])
        .output()
        .unwrap();
    assert_eq!(twice.status.code(), Some(2), "{twice:?}");
    assert!(String::from_utf8_lossy(&twice.stderr).contains("are the same result folder"));
    // Nor is either of the two its output, with --force or without (a
    // review's `--out A --force` had replaced run A by the comparison).
    for force in [true, false] {
        let mut args = vec!["compare", &a, &b, "--out", &a, "--quiet"];
        if force {
            args.push("--force");
        }
        let onto = Command::new(TUFT).args(&args).output().unwrap();
        assert_eq!(onto.status.code(), Some(2), "{onto:?}");
        assert!(
            String::from_utf8_lossy(&onto.stderr)
                .contains("is one of the two results being compared"),
            "{onto:?}"
        );
    }
    let inside = format!("{a}/sub");
    let onto = Command::new(TUFT)
        .args(["compare", &a, &b, "--out", &inside, "--quiet"])
        .output()
        .unwrap();
    assert_eq!(onto.status.code(), Some(2), "{onto:?}");
    assert!(!Path::new(&inside).exists());
    assert!(Path::new(&a).join("summary.json").is_file(), "run A stays");
    // Against a copy of itself every difference is exactly zero (the
    // mapping of a panel set onto itself is the identity) and no winner is
    // named.
    let copy = dir.path().join("c22-copy");
    copy_dir(Path::new(&a), &copy);
    let same = compare(&a, copy.to_str().unwrap(), &dir.path().join("self"));
    // Nothing changed, so no close-up of a change.
    assert!(!dir.path().join("self/delta-cp-close-up.png").exists());
    for (k, v) in same["deltas"].as_object().unwrap() {
        // Beside the differences: the noise a lift difference is set
        // against, and the built-in floor within it.
        // A value that does not apply is null (the loads scaled to B's
        // dynamic pressure, the panel noise's matched differences).
        if v.is_null() {
            continue;
        }
        if k != "lift_noise_kg" && k != "lift_floor_kg" {
            assert_eq!(v.as_f64().unwrap(), 0.0, "{k}");
        }
    }
    assert!(same["deltas"]["lift_noise_kg"].as_f64().unwrap() > 0.0);
    for k in [
        "delta_cp_rms",
        "delta_cp_max_abs",
        "separation_appears_m2",
        "separation_disappears_m2",
    ] {
        assert_eq!(num(&same, &format!("/surface/{k}")), 0.0, "{k}");
    }
    // All of it is unchanged surface, carrying none of the difference.
    assert_eq!(num(&same, "/surface/unchanged_share"), 1.0);
    for k in [
        "unchanged_delta_cp_p95",
        "unchanged_drag_counts",
        "unchanged_lift_kg",
    ] {
        assert_eq!(num(&same, &format!("/surface/{k}")), 0.0, "{k}");
    }
    assert_eq!(same["drag"]["resolved"], Value::Bool(false));
    assert_eq!(same["drag"]["direction"], "undecided");
    assert!(same["notes"].as_array().unwrap().is_empty());

    // Two slopes: the deltas follow from the two summaries.
    let c = compare(&a, &b, &dir.path().join("slopes"));
    // The rear window's change, under a third of the body long, also seen
    // close up (two reviews read a mirror head and a spoiler's lip as a
    // few pixels on the whole-body views), on the page too.
    let html = std::fs::read_to_string(dir.path().join("slopes/compare.html")).unwrap();
    for f in ["delta-cp-close-up.png", "separation-change-close-up.png"] {
        assert!(dir.path().join("slopes").join(f).is_file(), "{f}");
    }
    assert!(
        html.contains("Cp of B minus Cp of A, close-up of the changed shape (outlined in black)"),
        "the close-up on the page"
    );
    let sa: Value =
        serde_json::from_str(&std::fs::read_to_string(Path::new(&a).join("summary.json")).unwrap())
            .unwrap();
    let sb: Value =
        serde_json::from_str(&std::fs::read_to_string(Path::new(&b).join("summary.json")).unwrap())
            .unwrap();
    let diff = |p: &str| num(&sb, p) - num(&sa, p);
    // 1,200 panels is under a third of the count suggested for the coupe,
    // so each run warns that its separation and drag are not converged.
    for s in [&sa, &sb] {
        let w = s["warnings"].as_array().unwrap();
        assert!(
            w.iter()
                .any(|w| w.as_str().unwrap().contains("not converged at this count")),
            "{w:?}"
        );
    }
    let close = |x: f64, y: f64| (x - y).abs() <= 1e-9 * (1.0 + y.abs());
    // Drag counts: the drag areas' difference on A's reference area (the
    // two windows' frontal areas differ a little), as the newtons are.
    let area = |s: &Value| num(s, "/reference/area_m2");
    assert!(close(
        num(&c, "/deltas/drag_counts"),
        1000.0
            * (num(&sb, "/coefficients/drag") * area(&sb) / area(&sa)
                - num(&sa, "/coefficients/drag"))
    ));
    assert!(close(num(&c, "/deltas/lift_kg"), diff("/lift_kg/total")));
    assert!(close(
        num(&c, "/deltas/separated_area_m2"),
        diff("/separation/area_m2")
    ));
    // Axle loads add up to the whole body's, so their deltas do too.
    assert!(close(
        num(&c, "/deltas/front_axle_kg") + num(&c, "/deltas/rear_axle_kg"),
        num(&c, "/deltas/lift_kg")
    ));
    // The verdict's direction agrees with the sign of the difference.
    let d = num(&c, "/drag/delta_counts");
    match c["drag"]["direction"].as_str().unwrap() {
        "lower" => assert!(d <= -3.0),
        "higher" => assert!(d >= 3.0),
        _ => assert!(!c["drag"]["resolved"].as_bool().unwrap()),
    }
    // Every B panel got a value from A; the two bodies differ only behind
    // the roof, so only a small share of B lies far from A's surface.
    let n = num(&sb, "/mesh/panels");
    assert_eq!(num(&c, "/surface/mapped"), n);
    assert_eq!(num(&c, "/surface/panels_b"), n);
    assert!(num(&c, "/surface/far_panels") < 0.15 * n);
    // Where separation appears minus where it disappears is B's separated
    // area minus A's separated area as seen on B's panels: with the same
    // panel count the two agree to within the panels the slope moves
    // (here within a quarter of the larger separated area).
    let net =
        num(&c, "/surface/separation_appears_m2") - num(&c, "/surface/separation_disappears_m2");
    let scale = num(&sa, "/separation/area_m2").max(num(&sb, "/separation/area_m2"));
    assert!(
        (net - diff("/separation/area_m2")).abs() <= 0.25 * scale,
        "net {net}"
    );
    // The separated area moves by more than 1 % of the wetted area, or
    // where separation differs the stream sees more than 2 % of the
    // reference area: the page warns that the drag difference rests on the
    // separated-flow model and names no winner; the run against itself did
    // not warn (checked above).
    let wetted = num(&sa, "/mesh/wetted_area_m2").max(num(&sb, "/mesh/wetted_area_m2"));
    let frontal = num(&c, "/surface/separation_change_frontal_m2");
    let moved = diff("/separation/area_m2").abs() > 0.01 * wetted
        || frontal > 0.02 * num(&sb, "/reference/area_m2");
    // What the stream sees of a changed area is at most that area.
    let changed =
        num(&c, "/surface/separation_appears_m2") + num(&c, "/surface/separation_disappears_m2");
    assert!(frontal <= changed + 1e-12, "{frontal} > {changed}");
    let notes = c["notes"].as_array().unwrap();
    let warned = notes
        .iter()
        .any(|n| n.as_str().unwrap().contains("drag ranking of rear slants"));
    assert_eq!(warned, moved, "{notes:?}");
    if warned {
        assert_eq!(c["drag"]["resolved"], Value::Bool(false));
    }
    assert!(
        moved,
        "the two slopes separate alike: the check above tests nothing"
    );
    // The changed shape is outlined on the Cp difference sheet, and its
    // note says so; a run against itself changed nowhere and has no line.
    let page = |d: &str| std::fs::read_to_string(dir.path().join(d).join("compare.html")).unwrap();
    assert!(page("slopes").contains("the changed shape outlined in black"));
    assert!(!page("self").contains("outlined in black"));
}

/// Cp of Lamb's sphere (Hydrodynamics, 1932, sec. 92): 1 - 9/4 sin^2 theta.
fn lamb_cp(x: f64, y: f64, z: f64) -> f64 {
    let c = x / (x * x + y * y + z * z).sqrt();
    1.0 - 2.25 * (1.0 - c * c)
}

/// Area-weighted RMS error of a run's Cp against Lamb's solution.
fn rms_error(run: &str) -> f64 {
    let text = std::fs::read_to_string(Path::new(run).join("panels.csv")).unwrap();
    let (mut sq, mut area) = (0.0, 0.0);
    for line in text.lines().skip(1) {
        let v: Vec<f64> = line
            .split(',')
            .take(8)
            .map(|s| s.parse().unwrap())
            .collect();
        sq += v[6] * (v[7] - lamb_cp(v[0], v[1], v[2])).powi(2);
        area += v[6];
    }
    (sq / area).sqrt()
}

#[test]
fn the_same_body_at_two_resolutions_differs_within_the_discretisation_error() {
    let dir = tempfile::tempdir().unwrap();
    let a = run_case(
        dir.path(),
        "s320",
        "[geometry]\nshape = \"sphere\"\npanels = 320\n",
    );
    let b = run_case(
        dir.path(),
        "s1280",
        "[geometry]\nshape = \"sphere\"\npanels = 1280\n",
    );
    let c = compare(&a, &b, &dir.path().join("res"));
    // The bound: each run's discretisation error is measured against the
    // exact solution; by the triangle inequality the mapped difference can
    // exceed their sum only by the error of interpolating A onto B's
    // centroids, which is of second order in A's panel size and allowed
    // here as half of A's own error. (A panel-constant nearest-value map
    // gives an RMS difference of about 0.09 here, four times the bound.)
    let (ea, eb) = (rms_error(&a), rms_error(&b));
    let bound = ea + eb + 0.5 * ea;
    let rms = num(&c, "/surface/delta_cp_rms");
    assert!(
        rms <= bound,
        "RMS delta Cp {rms} > bound {bound} (errors {ea}, {eb})"
    );
    assert!(rms > 0.0);
    assert_eq!(num(&c, "/surface/mapped"), 1280.0);
    assert_eq!(num(&c, "/surface/far_panels"), 0.0);
    // The page says the panel counts differ.
    let notes = c["notes"].as_array().unwrap();
    assert!(
        notes
            .iter()
            .any(|n| n.as_str().unwrap().contains("panel counts differ")),
        "{notes:?}"
    );
}

/// Two diffuser angles: the underbody's separated share moves by more than
/// a point, so the comparison warns that the lift difference rests on the
/// separated-flow model (which misses the diffuser's stall), and only then.
#[test]
fn two_diffuser_angles_warn_about_the_lift() {
    let dir = tempfile::tempdir().unwrap();
    let case = |deg: f64| {
        format!(
            "[geometry]\nshape = \"coupe\"\ndiffuser_deg = {deg}\npanels = 1200\n[ground]\nz = 0.0\n\
             [reference]\nfront_axle_x = 0.95\nrear_axle_x = 3.65\n\
             [[region]]\nname = \"diffuser\"\nx = [3.4, 4.5]\nfacing = \"down\"\n"
        )
    };
    let a = run_case(dir.path(), "d0", &case(0.0));
    let b = run_case(dir.path(), "d20", &case(20.0));
    let c = compare(&a, &b, &dir.path().join("diffusers"));
    let share = |run: &str| {
        let s: Value = serde_json::from_str(
            &std::fs::read_to_string(Path::new(run).join("summary.json")).unwrap(),
        )
        .unwrap();
        num(&s, "/separation/underbody_fraction")
    };
    let moved = (share(&b) - share(&a)).abs() > 0.01;
    let notes = c["notes"].as_array().unwrap();
    let warned = notes.iter().any(|n| {
        n.as_str()
            .unwrap()
            .contains("loss of downforce when a diffuser stalls")
    });
    assert_eq!(warned, moved, "{notes:?}");
    assert!(
        moved,
        "the diffusers separate alike: the check above tests nothing"
    );
    // A moderate diffuser adds downforce against a flat floor (common
    // practice; tunnels see the gain up to about 10-15 degrees, then the
    // stall, which the model misses, so the 20-degree one is not judged).
    let m = run_case(dir.path(), "d10", &case(10.0));
    let c10 = compare(&a, &m, &dir.path().join("moderate"));
    assert!(num(&c10, "/deltas/lift_kg") < 0.0, "{}", c10["deltas"]);
}

/// The same body on two reference areas has the same drag force, so the
/// same drag area at both ends of its band: compared as drag areas, the
/// drag difference and both band-end differences are zero and no winner
/// is named. The band's top adds the loop's shortfall on the slant-back
/// body, a drag area measured on the frontal area; added as a fixed
/// coefficient on each run's own area, it had made the top differ by 57.5
/// counts between a sphere's runs on 0.785 and 1.0 m^2.
#[test]
fn one_body_on_two_reference_areas_has_one_drag_area_band() {
    let dir = tempfile::tempdir().unwrap();
    let case = |area: f64| {
        format!(
            "[geometry]\nshape = \"sphere\"\nradius = 0.5\npanels = 320\n[flow]\nspeed = 30.0\n\
             [reference]\narea = {area}\n"
        )
    };
    let a = run_case(dir.path(), "a", &case(0.785));
    let b = run_case(dir.path(), "b", &case(1.0));
    let v = compare(&a, &b, &dir.path().join("c"));
    let bands = v["drag"]["band_deltas_counts"].as_array().unwrap();
    for d in bands {
        assert!(d.as_f64().unwrap().abs() < 0.5, "{v}");
    }
    assert!(num(&v, "/drag/delta_counts").abs() < 0.5, "{v}");
    assert_eq!(v["drag"]["resolved"], Value::Bool(false), "{v}");
}

/// A change made at a second ride height: the verdict itself says that B
/// also stands higher, so that the difference mixes the ride height with
/// the change (a review's diffuser variant exported 20 mm higher read
/// "24.2 counts lower", the clearance in the second of five notes); where
/// the ride height is the whole change, it does not.
#[test]
fn a_second_ride_height_is_said_in_the_verdict() {
    let dir = tempfile::tempdir().unwrap();
    let body = |ride: f64, slope: f64| {
        format!(
            "[geometry]\nshape = \"coupe\"\npanels = 600\nride_height = {ride}\nrear_window_deg = {slope}\n\
             [ground]\nz = 0.0\n"
        )
    };
    let a = run_case(dir.path(), "low", &body(0.12, 22.0));
    let b = run_case(dir.path(), "high", &body(0.14, 38.0));
    let c = compare(&a, &b, &dir.path().join("ab"));
    let text = c["drag"]["text"].as_str().unwrap();
    assert!(
        text.contains(
            "; B also stands 20 mm higher than A (140 against 120 mm of ground clearance), so the \
             difference mixes the ride height with the change"
        ),
        "{text}"
    );
    let same = run_case(dir.path(), "high22", &body(0.14, 22.0));
    let c = compare(&a, &same, &dir.path().join("ride"));
    let text = c["drag"]["text"].as_str().unwrap();
    assert!(!text.contains("also stands"), "{text}");
}
