//! End-to-end: refusals of bad case files, result folders that are never
//! overwritten without `--force`, `--quiet`, and `tuft demo`, each in a
//! fresh temporary folder.
#![allow(clippy::unwrap_used, clippy::expect_used)]

mod common;

use std::path::Path;

use common::{cases_dir, entries, tuft};

/// Write `files` (name, contents) into a fresh folder, copying `coupe.stl`
/// from `cases/` when asked, and run `tuft run STEM.toml` there.
/// The run must be refused: exit 2, exactly one error line (the last line
/// on stderr, after any progress lines of the case) naming the case file
/// and every one of `names`, and nothing left in the folder but the inputs.
/// Returns the error line.
fn refused(stem: &str, case: &str, with_stl: bool, names: &[&str]) -> String {
    let dir = tempfile::tempdir().unwrap();
    let file = format!("{stem}.toml");
    std::fs::write(dir.path().join(&file), case).unwrap();
    if with_stl {
        std::fs::copy(cases_dir().join("coupe.stl"), dir.path().join("coupe.stl")).unwrap();
    }
    let before = entries(dir.path());
    let o = tuft(dir.path(), &["run", &file]);
    assert_eq!(o.code, 2, "exit code; stderr: {}", o.stderr);
    let lines: Vec<&str> = o.stderr.lines().collect();
    let errors: Vec<&&str> = lines.iter().filter(|l| l.starts_with("tuft:")).collect();
    assert_eq!(errors.len(), 1, "one error line: {:?}", o.stderr);
    let error = *errors[0];
    assert_eq!(lines.last(), Some(&error), "the error comes last");
    for l in &lines[..lines.len() - 1] {
        assert!(l.starts_with(&format!("{stem}: ")), "progress line: {l}");
    }
    assert!(error.contains(&file), "names the file: {error}");
    for n in names {
        assert!(error.contains(n), "names {n}: {error}");
    }
    assert!(o.stdout.is_empty(), "nothing on stdout: {}", o.stdout);
    // No result folder and no half-written staging folder.
    assert_eq!(entries(dir.path()), before);
    error.to_string()
}

const SPHERE: &str = "[geometry]\nshape = \"sphere\"\n";

#[test]
fn negative_speed_is_refused() {
    refused(
        "negative-speed",
        &format!("{SPHERE}[flow]\nspeed = -40.0\n"),
        false,
        &["flow.speed"],
    );
}

#[test]
fn unknown_key_is_refused() {
    refused(
        "unknown-key",
        &format!("{SPHERE}[flow]\nsped = 40.0\n"),
        false,
        &["sped"],
    );
}

#[test]
fn wrong_type_is_refused() {
    refused(
        "wrong-type",
        &format!("{SPHERE}[flow]\nspeed = \"fast\"\n"),
        false,
        &["speed", "line 4"],
    );
}

#[test]
fn ground_plane_above_the_body_is_refused() {
    // The built-in sphere has radius 0.5 m about z = 0: a ground at
    // z = 0.2 m cuts through it. A built-in shape has no export axes to
    // doubt, so the refusal does not ask about them.
    let error = refused(
        "ground-above",
        &format!("{SPHERE}[ground]\nz = 0.2\n"),
        false,
        &["ground.z"],
    );
    assert!(!error.contains("geometry.up"), "{error}");
}

#[test]
fn an_stl_below_the_ground_asks_whether_it_has_y_up() {
    // The coupe's wheels stand on z = 0; a y-up export would put most of
    // the body below such a ground, so the refusal names the setting.
    refused(
        "below-ground",
        "[geometry]\nstl = \"coupe.stl\"\nunits = \"mm\"\n[ground]\nz = 0.3\n",
        true,
        &["ground.z", "below the ground", "geometry.up = \"y\""],
    );
}

/// A ground height typed in millimetres (120 for 0.12 m) puts the whole
/// body below the plane: said so, in metres, rather than as a body
/// reaching "0 mm" below it.
#[test]
fn a_ground_in_millimetres_is_named_as_above_the_whole_body() {
    let error = refused(
        "ground-mm",
        &format!("{SPHERE}[ground]\nz = 120\n"),
        false,
        &[
            "ground.z",
            "the whole body, from z = -0.5",
            "lies below the ground plane z = 120",
        ],
    );
    assert!(!error.contains("0 mm below"), "{error}");
}

#[test]
fn missing_stl_is_refused() {
    refused(
        "missing-stl",
        "[geometry]\nstl = \"nothere.stl\"\n",
        false,
        &["geometry.stl", "nothere.stl"],
    );
}

#[test]
fn malformed_toml_is_refused() {
    refused(
        "malformed",
        "[geometry\nshape = \"sphere\"\n",
        false,
        &["geometry", "line 1"],
    );
}

#[test]
fn bad_units_are_refused() {
    refused(
        "bad-units",
        "[geometry]\nstl = \"coupe.stl\"\nunits = \"furlong\"\n",
        true,
        &["geometry.units", "furlong"],
    );
}

/// The shipped coupe STL is in millimetres (4.5 m long): read as metres it
/// would be a 4.5 km body and the run would report millions of kg of lift.
#[test]
fn a_misread_unit_is_refused() {
    refused(
        "mm-as-m",
        "[geometry]\nstl = \"coupe.stl\"\nunits = \"m\"\n",
        true,
        &["geometry.units", "metres", "4500 m"],
    );
}

/// Axle positions in millimetres lie outside a 4.5 m body.
#[test]
fn an_axle_outside_the_body_is_refused() {
    refused(
        "axles-in-mm",
        "[geometry]\nstl = \"coupe.stl\"\n[reference]\nfront_axle_x = 950\nrear_axle_x = 3650\n",
        true,
        &["reference.front_axle_x", "outside the body"],
    );
}

/// Axles beyond a body whose size says its unit may be wrong (a 4.8 m
/// body exported in inches, read as millimetres: 0.19 m) name the unit
/// first, in the one line of the refusal.
#[test]
fn an_axle_off_a_toy_sized_body_names_the_unit() {
    let dir = tempfile::tempdir().unwrap();
    // An ellipsoid 189 x 73 x 56 units (millimetres as the file is read),
    // written in metres as the unit that would make it 4.8 m long.
    let body = tuft_mesh::generate::ellipsoid(0.0945, 0.0365, 0.028, 400).unwrap();
    let panels = tuft_mesh::PanelMesh::new(body, tuft_mesh::Mirrors::default()).unwrap();
    let mut stl = Vec::new();
    tuft_mesh::export::write_panels_stl(&mut stl, &panels, tuft_mesh::LengthUnit::Mm, None)
        .unwrap();
    std::fs::write(dir.path().join("box.stl"), stl).unwrap();
    std::fs::write(
        dir.path().join("toy.toml"),
        "[geometry]\nstl = \"box.stl\"\n[reference]\nfront_axle_x = 0.95\nrear_axle_x = 3.65\n",
    )
    .unwrap();
    let o = tuft(dir.path(), &["run", "toy.toml"]);
    assert_eq!(o.code, 2, "{}", o.stderr);
    let line = o.stderr.lines().last().unwrap_or_default();
    for part in [
        "toy.toml",
        "reference.front_axle_x",
        "outside the body",
        "but first: the body is 0.19 m across",
        "is geometry.units right (in inches it would be 4.8 m)",
    ] {
        assert!(line.contains(part), "{part}: {line}");
    }
}

/// A region given in millimetres holds no panel: refused before the solve
/// rather than reported "attached" for nothing.
#[test]
fn a_region_off_the_body_is_refused() {
    refused(
        "region-in-mm",
        &format!("{SPHERE}[[region]]\nname = \"rear\"\nx = [150, 500]\n"),
        false,
        &["region \"rear\"", "holds no panel", "optional = true"],
    );
}

/// The same region marked optional (a part only some variants of a sweep
/// have, as a roof box) leaves the run going: the region is left out of
/// the results with a note, on stdout and in summary.json, and `check`
/// says so (a review's sweep over an estate with and without a box
/// failed on every variant without it).
#[test]
fn an_optional_region_off_the_body_is_left_out_with_a_note() {
    let dir = tempfile::tempdir().unwrap();
    let case = format!(
        "{TINY}[[region]]\nname = \"rear\"\nx = [0.2, 1.5]\n\
         [[region]]\nname = \"box\"\nx = [150, 500]\noptional = true\n"
    );
    std::fs::write(dir.path().join("opt.toml"), case).unwrap();
    let o = tuft(dir.path(), &["check", "opt.toml"]);
    assert!(
        o.stdout
            .contains("region     \"box\": no panel of this body (optional"),
        "{}",
        o.stdout
    );
    let o = tuft(dir.path(), &["run", "opt.toml"]);
    assert!(o.code == 0 || o.code == 1, "{}", o.stderr);
    assert!(
        o.stdout
            .contains("note: the optional region \"box\" holds no panel of this body"),
        "{}",
        o.stdout
    );
    let summary: serde_json::Value =
        serde_json::from_slice(&std::fs::read(dir.path().join("opt/summary.json")).unwrap())
            .unwrap();
    let names: Vec<&str> = summary["regions"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["name"].as_str().unwrap())
        .collect();
    assert_eq!(names, ["rear"]);
    assert!(
        summary["notes"]
            .as_array()
            .unwrap()
            .iter()
            .any(|n| n.as_str().unwrap().contains("\"box\" holds no panel")),
        "{}",
        summary["notes"]
    );
}

/// A region whose facing takes nothing in its box says what facing means
/// (the panels seen from that side), so that a face hidden in a pocket
/// is not a puzzle.
#[test]
fn a_region_whose_facing_takes_nothing_says_what_facing_means() {
    refused(
        "region-facing",
        &format!("{SPHERE}[[region]]\nname = \"back\"\nx = [0.3, 0.6]\nfacing = \"front\"\n"),
        false,
        &[
            "region \"back\"",
            "holds no panel",
            "facing \"front\" takes only the panels seen from that side",
            "leave facing out",
        ],
    );
}

#[test]
fn forced_transition_without_its_position_is_refused() {
    refused(
        "forced",
        &format!("{SPHERE}[boundary_layer]\ntransition = \"forced\"\n"),
        false,
        &["boundary_layer.forced_at"],
    );
}

/// A case small enough to run in a second or two: the sphere at its
/// coarsest (80 panels).
const TINY: &str = "[geometry]\nshape = \"sphere\"\npanels = 100\n\
                    [reference]\nfront_axle_x = -0.3\nrear_axle_x = 0.3\n";

fn file_list_and_bytes(dir: &Path) -> Vec<(String, Vec<u8>)> {
    entries(dir)
        .into_iter()
        .map(|e| {
            let bytes = std::fs::read(dir.join(&e)).unwrap();
            (e, bytes)
        })
        .collect()
}

/// The geometry phase says its stages as they start (a review's
/// 1.9-million-facet scan sat 21 s on one line), each as an indented
/// progress line of the case, in order.
#[test]
fn the_geometry_phase_names_its_stages() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::copy(cases_dir().join("coupe.stl"), dir.path().join("coupe.stl")).unwrap();
    std::fs::write(
        dir.path().join("stages.toml"),
        "[geometry]\nstl = \"coupe.stl\"\npanels = 600\n[ground]\nz = 0.0\n",
    )
    .unwrap();
    let o = tuft(dir.path(), &["run", "stages.toml"]);
    assert!(o.code == 0 || o.code == 1, "{}", o.stderr);
    let at = |what: &str| {
        o.stderr
            .find(&format!("stages:   {what}"))
            .unwrap_or_else(|| panic!("{what}: {}", o.stderr))
    };
    assert!(
        at("reading coupe.stl ...") < at("repairing ")
            && at("repairing ") < at("coarsening ")
            && at("coarsening ") < at("  simplifying to 600 panels ...")
            && at("  simplifying to 600 panels ...") < at("checking ")
            && at("checking ") < o.stderr.find("stages: geometry done in").unwrap_or(0),
        "{}",
        o.stderr
    );
}

#[test]
fn existing_results_are_kept_without_force_and_replaced_with_it() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("tiny.toml"), TINY).unwrap();
    // --quiet: nothing on stdout, and on stderr one line only when the
    // run finished with warnings (exit code 1), saying where they are.
    let o = tuft(dir.path(), &["run", "tiny.toml", "--quiet"]);
    assert!(o.code == 0 || o.code == 1, "{}", o.stderr);
    assert!(o.stdout.is_empty(), "quiet: {}", o.stdout);
    if o.code == 0 {
        assert!(o.stderr.is_empty(), "quiet: {}", o.stderr);
    } else {
        assert_eq!(o.stderr.lines().count(), 1, "{}", o.stderr);
        assert!(
            o.stderr.starts_with("tuft: tiny: finished with ")
                && o.stderr.contains("tiny/report.html"),
            "{}",
            o.stderr
        );
    }
    // The default result folder sits beside the case, named after it.
    let out = dir.path().join("tiny");
    assert!(out.join("summary.json").is_file());
    std::fs::write(out.join("notes.txt"), "mine").unwrap();
    let before = file_list_and_bytes(&out);

    let o = tuft(dir.path(), &["run", "tiny.toml", "--quiet"]);
    assert_eq!(o.code, 2);
    assert_eq!(o.stderr.lines().count(), 1, "{}", o.stderr);
    assert!(o.stderr.starts_with("tuft:"), "{}", o.stderr);
    assert!(o.stderr.contains("tiny") && o.stderr.contains("--force"));
    assert_eq!(file_list_and_bytes(&out), before, "untouched");

    // --force deletes only what tuft wrote: the user's notes keep the
    // folder (a review had lost a case and its STL copied into one).
    let o = tuft(dir.path(), &["run", "tiny.toml", "--force", "--quiet"]);
    assert_eq!(o.code, 2);
    assert!(
        o.stderr
            .contains("holds notes.txt, which tuft does not write"),
        "{}",
        o.stderr
    );
    assert_eq!(file_list_and_bytes(&out), before, "untouched");
    std::fs::remove_file(out.join("notes.txt")).unwrap();
    std::fs::write(out.join("old.png"), "stale").unwrap();
    let o = tuft(dir.path(), &["run", "tiny.toml", "--force", "--quiet"]);
    assert!(o.code == 0 || o.code == 1, "{}", o.stderr);
    assert!(!out.join("old.png").exists(), "replaced whole");
    assert!(out.join("summary.json").is_file());
    assert_eq!(
        entries(dir.path()),
        ["tiny", "tiny.toml"],
        "no staging left"
    );
}

/// `--out` through a file: the line says which path is a file, not only
/// that something exists, and nothing is written.
#[test]
fn a_result_folder_under_a_file_is_refused_naming_the_file() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("tiny.toml"), TINY).unwrap();
    std::fs::write(dir.path().join("afile"), "not a folder").unwrap();
    let o = tuft(
        dir.path(),
        &["run", "tiny.toml", "--out", "afile/sub", "--quiet"],
    );
    assert_eq!(o.code, 2, "{}", o.stderr);
    assert_eq!(o.stderr.lines().count(), 1, "{}", o.stderr);
    assert!(
        o.stderr
            .starts_with("tuft: tiny.toml: afile: is a file, not a folder"),
        "{}",
        o.stderr
    );
    assert_eq!(entries(dir.path()), ["afile", "tiny.toml"]);
}

#[test]
fn demo_writes_two_reports() {
    let dir = tempfile::tempdir().unwrap();
    let o = tuft(dir.path(), &["demo", "--out", "demo"]);
    assert!(o.code == 0 || o.code == 1, "{}", o.stderr);
    let demo = dir.path().join("demo");
    let (runs, compared): (Vec<String>, Vec<String>) = entries(&demo)
        .into_iter()
        .partition(|e| e.starts_with("coupe-"));
    assert_eq!(runs.len(), 2, "{runs:?}");
    // And the two set side by side, as `tuft compare` would: its folder
    // beside them and its verdict on stdout after theirs (the slopes
    // reach 25 degrees, so no drag winner is named).
    assert_eq!(compared, ["compare-coupe-22deg-vs-coupe-38deg"]);
    assert!(demo.join(&compared[0]).join("compare.html").is_file());
    let verdict = o
        .stdout
        .lines()
        .find(|l| l.starts_with("coupe-22deg -> coupe-38deg: "))
        .expect("the comparison's verdict");
    assert!(verdict.contains("no winner"), "{verdict}");
    // The loop's drag sits low in its band (README, "How far to trust the
    // numbers"); the headline line says so where it gives the number.
    assert_eq!(
        o.stdout
            .matches("a low estimate: the true drag is more likely above it")
            .count(),
        2,
        "{}",
        o.stdout
    );
    // The drag line gives the force and power beside the coefficient,
    // and the area it is on; its force is C_D q A (q at 40 m/s in the
    // demo's air, 1.204 kg/m^3).
    for line in o
        .stdout
        .lines()
        .filter(|l| l.starts_with("  drag at 40 m/s (144 km/h): "))
    {
        let numbers: Vec<f64> = line
            .split(|c: char| !(c.is_ascii_digit() || c == '.'))
            .filter_map(|w| w.parse().ok())
            .collect();
        // 40, 144, force, its band (2), power, its band (2), area, the 2
        // of m^2, C_D A, its 2.
        assert_eq!(numbers.len(), 12, "{line}");
        let (force, area, cda) = (numbers[2], numbers[8], numbers[10]);
        let q = 0.5 * 1.204 * 40.0 * 40.0;
        assert!((force - q * cda).abs() <= 0.5 + 0.0005 * q, "{line}");
        assert!(area > 1.0 && line.contains("on the frontal area"), "{line}");
    }
    assert_eq!(
        o.stdout.matches("  drag at 40 m/s").count(),
        2,
        "{}",
        o.stdout
    );
    // The lift line says at what speed its kg are, gives the underbody
    // beside the rest of the body (not "of which": it is larger than the
    // whole), and the parts add up to what is printed; the attached first
    // pass's plateau drag is left to the report.
    let lines: Vec<&str> = o
        .stdout
        .lines()
        .filter(|l| l.starts_with("  lift at 40 m/s (144 km/h): "))
        .collect();
    assert_eq!(lines.len(), 2, "{}", o.stdout);
    for line in lines {
        let numbers: Vec<f64> = line
            .split(|c: char| !(c.is_ascii_digit() || c == '-' || c == '+' || c == '.'))
            .filter_map(|w| w.parse().ok())
            .collect();
        // 40, 144, then total, front, rear, how far like runs scatter,
        // underbody, its front, rear, rest.
        let [total, front, rear, noise, under, uf, ur, rest] = numbers[2..10] else {
            panic!("{line}")
        };
        assert!(
            line.contains(&format!("; like runs scatter by about {noise:.1} kg)")) && noise > 0.0,
            "{line}"
        );
        // Each set adds up as shown (a decimal more where it takes one);
        // the rest, rounded on its own, within the whole kg of the total.
        assert!((total - (front + rear)).abs() < 1e-9, "{line}");
        assert!((under - (uf + ur)).abs() < 1e-9, "{line}");
        assert!((total - (under + rest)).abs() <= 0.5 + 1e-9, "{line}");
        assert!(line.contains("rest of the body +"), "{line}");
        assert!(!line.contains("of which"), "{line}");
    }
    assert!(!o.stdout.contains("plateau model"), "{}", o.stdout);
    for run in &runs {
        let report = demo.join(run).join("report.html");
        assert!(report.is_file(), "{run}");
        // The drag rows are in one unit, counts, C_D beside the estimate
        // and its band.
        let html = std::fs::read_to_string(&report).unwrap();
        assert!(
            html.contains("(C_D 0.") && html.contains(" to 0."),
            "{run}: drag rows"
        );
        assert!(html.contains("no drag estimate to quote"), "{run}");
        assert!(html.contains("The dead water holds C_p -0."), "{run}");
        assert!(
            o.stdout.contains(
                &report
                    .strip_prefix(dir.path())
                    .unwrap()
                    .display()
                    .to_string()
            )
        );
        let summary: serde_json::Value = serde_json::from_str(
            &std::fs::read_to_string(demo.join(run).join("summary.json")).unwrap(),
        )
        .unwrap();
        assert!(
            summary["coefficients"]["drag"]
                .as_f64()
                .unwrap()
                .is_finite()
        );
    }
    // The demo names the rear window; the steeper one separates more
    // (rear windows steeper than about 30 degrees lose the flow: Ahmed,
    // Ramm & Faltin 1984 for slants; common practice for cars).
    let window = |run: &str| {
        let s: serde_json::Value = serde_json::from_str(
            &std::fs::read_to_string(demo.join(run).join("summary.json")).unwrap(),
        )
        .unwrap();
        let r = s["regions"]
            .as_array()
            .unwrap()
            .iter()
            .find(|r| r["name"] == "rear window")
            .cloned()
            .expect("the demo names its rear window");
        r["separated_fraction"].as_f64().unwrap()
    };
    let (gentle, steep) = (window("coupe-22deg"), window("coupe-38deg"));
    assert!(
        steep > gentle + 0.1,
        "22 degrees {gentle}, 38 degrees {steep}"
    );
}

#[test]
fn the_readme_case_file_runs() {
    // The README's example case file, with the committed coupe as its STL
    // (both in millimetres, axles at the same places).
    let readme = std::fs::read_to_string(cases_dir().join("../README.md")).unwrap();
    let start = readme.find("```toml\n").expect("a TOML example") + "```toml\n".len();
    let case = &readme[start..start + readme[start..].find("```").unwrap()];
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("my-car.toml"), case).unwrap();
    std::fs::copy(cases_dir().join("coupe.stl"), dir.path().join("my-car.stl")).unwrap();
    let o = tuft(dir.path(), &["run", "my-car.toml", "--quiet"]);
    assert!(o.code == 0 || o.code == 1, "{}", o.stderr);
    let summary: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(dir.path().join("my-car/summary.json")).unwrap(),
    )
    .unwrap();
    assert_eq!(summary["reference"]["front_axle_x_m"].as_f64(), Some(0.95));
    // Its [[slice]] adds a plane across the diffuser's exit, over the
    // window it gives (its z range cut at the box's floor, 1.3 mm over
    // the ground) at 10 mm.
    for f in ["slice-diffuser-exit.png", "slice-diffuser-exit.vti"] {
        assert!(dir.path().join("my-car").join(f).exists(), "{f}");
    }
    let grid = common::vtk_read(
        "r = vtkIOXML.vtkXMLImageDataReader(); r.SetFileName(sys.argv[1]); r.Update()\n\
         g = r.GetOutput(); print(*g.GetDimensions(), *g.GetOrigin(), *g.GetSpacing())\n",
        &dir.path().join("my-car/slice-diffuser-exit.vti"),
    );
    let v: Vec<f64> = grid[0].iter().map(|w| w.parse().unwrap()).collect();
    assert_eq!(v[..3], [201.0, 60.0, 1.0]);
    assert_eq!(v[3..5], [4.3, -1.0]);
    assert!(v[5] > 0.0 && v[5] < 0.002, "z from {}", v[5]);
    assert!((v[6] - 0.01).abs() < 1e-12 && (v[7] - 0.01).abs() < 1e-12);
}

/// The README's sweep example varies the rear window of the built-in coupe
/// (here at 600 panels to keep the test short): every variant runs and
/// the rear-window slope changes the drag.
#[test]
fn the_readme_sweep_example_varies_the_shape() {
    let readme = std::fs::read_to_string(cases_dir().join("../README.md")).unwrap();
    let start = readme
        .find("# rear-window.toml\n")
        .expect("the sweep example");
    let text = &readme[start..start + readme[start..].find("```").unwrap()];
    let text = text.replace("shape = \"coupe\"", "shape = \"coupe\"\npanels = 600");
    let text = text.replace("values = [0.0, 5.0]", "values = [0.0]");
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("rear-window.toml"), text).unwrap();
    let o = tuft(dir.path(), &["sweep", "rear-window.toml", "--quiet"]);
    assert!(o.code == 0 || o.code == 1, "{}", o.stderr);
    let swept = o.code;
    let o = tuft(dir.path(), &["collect", "rear-window", "--quiet"]);
    assert!(o.code == 0 || o.code == 1, "{}", o.stderr);
    let c: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(dir.path().join("rear-window/sweep.json")).unwrap(),
    )
    .unwrap();
    // The sweep exits 1 exactly when a variant carries warnings.
    let warned = c["variants"]
        .as_array()
        .unwrap()
        .iter()
        .any(|v| v["warnings"].as_u64().unwrap_or(0) > 0);
    assert_eq!(swept == 1, warned, "{c}");
    let cds: Vec<f64> = c["variants"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v["cd"].as_f64().unwrap())
        .collect();
    assert_eq!(cds.len(), 3, "{c}");
    assert!(
        cds.windows(2).all(|w| (w[0] - w[1]).abs() > 1e-6),
        "the slope changes the drag: {cds:?}"
    );
}

/// A shape key beside an STL is refused: the run would otherwise ignore it.
#[test]
fn a_shape_key_beside_an_stl_is_refused() {
    refused(
        "slope-on-stl",
        "[geometry]\nstl = \"coupe.stl\"\nrear_window_deg = 30.0\n",
        true,
        &["geometry.rear_window_deg", "built-in shape coupe", "STL"],
    );
}

/// A yawed run says what it cannot give (the side force of a car's lee-side
/// separation) and warns when its panels are fewer than suggested.
#[test]
fn a_yawed_run_says_what_it_cannot_give() {
    let dir = tempfile::tempdir().unwrap();
    let case = "[geometry]\nshape = \"coupe\"\npanels = 600\n[flow]\nyaw = 5.0\n[ground]\nz = 0.0\n\
                [reference]\nfront_axle_x = 0.95\nrear_axle_x = 3.65\n";
    std::fs::write(dir.path().join("yawed.toml"), case).unwrap();
    let o = tuft(dir.path(), &["run", "yawed.toml", "--quiet"]);
    assert_eq!(o.code, 1, "warnings to read: {}", o.stderr);
    let report = std::fs::read_to_string(dir.path().join("yawed/report.html")).unwrap();
    assert!(report.contains("Cross wind") && report.contains("not the side force"));
    let summary: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(dir.path().join("yawed/summary.json")).unwrap(),
    )
    .unwrap();
    let warned = summary["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .any(|w| w.as_str().unwrap().starts_with("a yawed run on"));
    assert!(warned, "{}", summary["warnings"]);
    // summary.json's side-force coefficient carries its words, as stdout
    // does (a script reading it had none).
    let noted = summary["notes"].as_array().unwrap().iter().any(|n| {
        let n = n.as_str().unwrap();
        n.starts_with("cross wind at yaw 5°") && n.contains("is not the side force")
    });
    assert!(noted, "{}", summary["notes"]);
    let o = tuft(dir.path(), &["run", "yawed.toml", "--force"]);
    assert!(o.stdout.contains("  cross wind at yaw 5°"), "{}", o.stdout);
}

/// `tuft run --noise` solves the case again at 8 % fewer and 8 % more
/// panels: summary.json's `panel_noise` holds the three counts (the run's
/// own first, with its own numbers) and the spread of their numbers, the
/// report and stdout give it, and `tuft compare` judges drag against the
/// floor it gives.
#[test]
fn noise_measures_the_spread_over_three_panel_counts() {
    let dir = tempfile::tempdir().unwrap();
    let case = "[geometry]\nshape = \"coupe\"\npanels = 1200\n[ground]\nz = 0.0\n\
                [reference]\nfront_axle_x = 0.95\nrear_axle_x = 3.65\n";
    std::fs::write(dir.path().join("a.toml"), case).unwrap();
    std::fs::write(dir.path().join("b.toml"), case).unwrap();
    let o = tuft(dir.path(), &["run", "a.toml", "--noise"]);
    assert!(o.code == 0 || o.code == 1, "{}", o.stderr);
    assert!(o.stdout.contains("  panel noise: drag "), "{}", o.stdout);
    assert!(o.stderr.contains("a: panel noise done in"), "{}", o.stderr);
    let summary: serde_json::Value =
        serde_json::from_slice(&std::fs::read(dir.path().join("a/summary.json")).unwrap()).unwrap();
    let n = &summary["panel_noise"];
    let list = |key: &str| -> Vec<f64> {
        n[key]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| v.as_f64().unwrap())
            .collect()
    };
    let panels = list("panels");
    assert_eq!(panels.len(), 3);
    assert_eq!(panels[0], summary["mesh"]["panels"].as_f64().unwrap());
    // Three panellings: the coupe's generator steps by whole rows, so
    // 1,104 panels asked make the 1,156 of 1,200 asked, and the count
    // below moves on (to 1,056 asked).
    assert!(
        panels[1] < panels[0] && panels[0] < panels[2] && panels[1] > 950.0 && panels[2] < 1400.0,
        "{panels:?}"
    );
    let cd = list("cd");
    assert_eq!(cd[0], summary["coefficients"]["drag"].as_f64().unwrap());
    let spread = |v: &[f64]| {
        v.iter().copied().fold(f64::NEG_INFINITY, f64::max)
            - v.iter().copied().fold(f64::INFINITY, f64::min)
    };
    let counts = n["drag_counts"].as_f64().unwrap();
    assert!((counts - 1000.0 * spread(&cd)).abs() < 1e-9);
    assert!((n["lift_cl"].as_f64().unwrap() - spread(&list("cl"))).abs() < 1e-12);
    let report = std::fs::read_to_string(dir.path().join("a/report.html")).unwrap();
    assert!(report.contains("Panel noise"));

    // B without the measure: the pair's floor is A's spread with the
    // built-in floor's share for B (6 / sqrt 2 counts), never under 6.
    let o = tuft(dir.path(), &["run", "b.toml", "--quiet"]);
    assert!(o.code == 0 || o.code == 1, "{}", o.stderr);
    let o = tuft(dir.path(), &["compare", "a", "b", "--out", "ab", "--quiet"]);
    assert!(o.code <= 1, "{}", o.stderr);
    let c: serde_json::Value =
        serde_json::from_slice(&std::fs::read(dir.path().join("ab/compare.json")).unwrap())
            .unwrap();
    let floor = c["drag"]["noise_counts"].as_f64().unwrap();
    let expected = (counts.max(18.0_f64.sqrt()).powi(2) + 18.0).sqrt();
    assert!((floor - expected).abs() < 1e-9, "{floor} {expected}");
    assert!(c["a"]["panel_noise"].is_object() && c["b"]["panel_noise"].is_null());
}

/// A half model in a cross wind runs whole, mirrored into both sides
/// (a review's half-model export had no way to a yawed run): its summary
/// has no symmetry plane, a note says so, and the wind gives a side force;
/// at zero yaw the same case runs as the half it is.
#[test]
fn a_half_model_in_a_cross_wind_runs_whole() {
    let dir = tempfile::tempdir().unwrap();
    let half = tuft_mesh::generate::coupe_with_params(&tuft_mesh::generate::CoupeParams {
        panels: 1500,
        half: true,
        ..tuft_mesh::generate::CoupeParams::default()
    })
    .unwrap();
    let panels = tuft_mesh::PanelMesh::new(half, tuft_mesh::Mirrors::default()).unwrap();
    let mut stl = Vec::new();
    tuft_mesh::export::write_panels_stl(&mut stl, &panels, tuft_mesh::LengthUnit::Mm, None)
        .unwrap();
    std::fs::write(dir.path().join("half.stl"), stl).unwrap();
    let case = |yaw: f64| {
        format!(
            "[geometry]\nstl = \"half.stl\"\nhalf_model = true\npanels = 700\n[flow]\nyaw = {yaw}\n\
             [ground]\nz = 0.0\n"
        )
    };
    std::fs::write(dir.path().join("yawed.toml"), case(5.0)).unwrap();
    std::fs::write(dir.path().join("straight.toml"), case(0.0)).unwrap();
    let read = |name: &str| -> serde_json::Value {
        let o = tuft(dir.path(), &["run", &format!("{name}.toml"), "--quiet"]);
        assert!(o.code <= 1, "{}", o.stderr);
        serde_json::from_slice(&std::fs::read(dir.path().join(name).join("summary.json")).unwrap())
            .unwrap()
    };
    let yawed = read("yawed");
    assert_eq!(
        yawed["mesh"]["symmetry_plane"],
        serde_json::Value::Bool(false)
    );
    let notes = yawed["notes"].to_string() + &yawed["mesh"].to_string();
    assert!(notes.contains("mirrored into a whole body"), "{notes}");
    assert!(
        yawed["coefficients"]["side"].as_f64().unwrap().abs() > 1e-3,
        "{yawed}"
    );
    let straight = read("straight");
    assert_eq!(
        straight["mesh"]["symmetry_plane"],
        serde_json::Value::Bool(true)
    );
}

/// An interrupt (here SIGINT, as Ctrl-C sends) stops a run with exit code
/// 130 and one line saying so, and leaves neither the result folder nor
/// its hidden partial folder (a review's run had ended without a word).
#[test]
fn an_interrupted_run_says_so_and_leaves_nothing_half_written() {
    let dir = tempfile::tempdir().unwrap();
    let case = common::copy_case("coupe", dir.path());
    let child = std::process::Command::new(common::TUFT)
        .args(["run", &case, "--out", "result", "--threads", "1"])
        .current_dir(dir.path())
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    // Wait for the hidden partial folder: the run is writing.
    let started = std::time::Instant::now();
    let partial = || {
        entries(dir.path())
            .iter()
            .any(|e| e.starts_with(".result.partial-"))
    };
    while !partial() {
        assert!(
            started.elapsed().as_secs() < 60,
            "no partial folder: {:?}",
            entries(dir.path())
        );
        std::thread::sleep(std::time::Duration::from_millis(20));
    }
    let sent = std::process::Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(sent.success());
    let out = child.wait_with_output().unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    // A run that finished before the signal arrived proves nothing.
    assert_eq!(out.status.code(), Some(130), "{stderr}");
    assert!(
        stderr.lines().last().is_some_and(|l| l
            == "tuft: interrupted: the result folder being written, result, was not made; \
                results finished before, and an older result in its place, are kept"),
        "{stderr}"
    );
    let left = entries(dir.path());
    assert!(
        !left
            .iter()
            .any(|e| e.starts_with(".result") || e == "result"),
        "{left:?}"
    );
}

/// A hole the repair filled is outlined on the surface pictures and named
/// there ("filled hole", in dark green): the surface there is the
/// repair's guess, which the report had named in words only.
#[test]
fn a_filled_hole_is_outlined_on_the_pictures() {
    let dir = tempfile::tempdir().unwrap();
    // An ellipsoid 4 x 1.6 x 1.2 m with a hole about 0.3 m across cut in
    // its flank, written in millimetres.
    let body = tuft_mesh::generate::ellipsoid(2.0, 0.8, 0.6, 2000).unwrap();
    let hole = tuft_mesh::Point::new(0.0, -0.8, 0.0);
    let mut stl = vec![0u8; 80];
    let kept: Vec<[u32; 3]> = body
        .triangles
        .iter()
        .copied()
        .filter(|t| {
            let c = t
                .iter()
                .map(|&v| body.vertices[v as usize].coords)
                .sum::<nalgebra::Vector3<f64>>()
                / 3.0;
            (tuft_mesh::Point::from(c) - hole).norm() > 0.15
        })
        .collect();
    assert!(kept.len() < body.triangles.len());
    stl.extend_from_slice(&(kept.len() as u32).to_le_bytes());
    for t in &kept {
        stl.extend_from_slice(&[0u8; 12]);
        for &v in t {
            let p = body.vertices[v as usize];
            for k in 0..3 {
                stl.extend_from_slice(&((1000.0 * p[k]) as f32).to_le_bytes());
            }
        }
        stl.extend_from_slice(&[0u8; 2]);
    }
    std::fs::write(dir.path().join("holed.stl"), stl).unwrap();
    std::fs::write(
        dir.path().join("holed.toml"),
        "[geometry]\nstl = \"holed.stl\"\npanels = 1500\n[ground]\nz = -0.75\n",
    )
    .unwrap();
    let o = tuft(
        dir.path(),
        &["run", "holed.toml", "--quiet", "--threads", "1"],
    );
    assert!(o.code == 0 || o.code == 1, "{}", o.stderr);
    let summary: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(dir.path().join("holed/summary.json")).unwrap(),
    )
    .unwrap();
    let filled = &summary["mesh"]["preparation"]["repair"]["holes"]["filled"];
    assert_eq!(
        filled.as_array().map(Vec::len),
        Some(1),
        "the repair filled it"
    );
    let green = |file: &str| {
        let pic = common::read_png(&std::fs::read(dir.path().join("holed").join(file)).unwrap());
        pic.pixels
            .chunks(pic.channels)
            .filter(|p| p[..3] == [0, 110, 80])
            .count()
    };
    for file in ["pressure.png", "separation-risk.png", "surface-flow.png"] {
        assert!(green(file) > 100, "{file}: {}", green(file));
    }
}

/// A named region reports the forces on its own surface. On a sphere in
/// attached potential flow (Lamb, Hydrodynamics, 6th ed., 1932, section
/// 92: Cp = 1 - 9/4 sin^2 theta, theta from the stagnation point), the
/// upper front quarter (x < 0, z > 0) carries a lift of
/// q pi R^2 (1/2 - 27/32) = 11/32 q pi R^2 upward (integrating Cp n_z
/// over theta in 0..pi/2 and the upper half of the azimuth: the suction
/// round the equator outweighs the stagnation), and the regions of a
/// body that cover it all add up to the run's own loads.
#[test]
fn a_region_carries_its_own_loads() {
    let dir = tempfile::tempdir().unwrap();
    let case = "[geometry]\nshape = \"sphere\"\nradius = 0.5\npanels = 1280\n\
                [flow]\nspeed = 40.0\n[solver]\nwakes = \"attached\"\n\
                [[region]]\nname = \"upper front\"\nx = [-1.0, 1e-6]\nz = [1e-6, 1.0]\n\
                [[region]]\nname = \"lower front\"\nx = [-1.0, 1e-6]\nz = [-1.0, 1e-6]\n\
                [[region]]\nname = \"rear\"\nx = [1e-6, 1.0]\n";
    std::fs::write(dir.path().join("quarter.toml"), case).unwrap();
    let o = tuft(dir.path(), &["run", "quarter.toml", "--out", "q"]);
    assert!(o.code == 0 || o.code == 1, "{}", o.stderr);
    let s: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(dir.path().join("q/summary.json")).unwrap())
            .unwrap();
    let q = s["dynamic_pressure_pa"].as_f64().unwrap();
    let loads = |k: usize| s["regions"][k]["loads"].clone();
    let lift_n = |k: usize| loads(k)["lift_kg"].as_f64().unwrap() * 9.80665;
    let lamb = 11.0 / 32.0 * q * std::f64::consts::PI * 0.25;
    // Lamb's Cp on the very panels the box takes in (by their centroids),
    // which leaves out how the box cuts the panels.
    let panels = std::fs::read_to_string(dir.path().join("q/panels.csv")).unwrap();
    let on_panels: f64 = panels
        .lines()
        .skip(1)
        .map(|l| {
            l.split(',')
                .take(7)
                .map(|v| v.parse::<f64>().unwrap())
                .collect::<Vec<_>>()
        })
        .filter(|v| v[0] <= 1e-6 && v[2] >= 1e-6)
        .map(|v| {
            let sin2 = 1.0 - v[0] * v[0] / (v[0] * v[0] + v[1] * v[1] + v[2] * v[2]);
            -(1.0 - 2.25 * sin2) * q * v[6] * v[5]
        })
        .sum();
    println!(
        "upper front quarter: {:.1} N; Lamb {lamb:.1} N, on its panels {on_panels:.1} N",
        lift_n(0)
    );
    // Tolerance 6 % against the closed form (first-order panels on 1,280
    // facets, taken into the box by their centroids), 3 % against Lamb on
    // the same panels (the skin friction adds a little lift there).
    assert!((lift_n(0) - lamb).abs() < 0.06 * lamb, "{}", lift_n(0));
    assert!(
        (lift_n(0) - on_panels).abs() < 0.03 * on_panels,
        "{}",
        lift_n(0)
    );
    // The lower quarter mirrors it.
    assert!((lift_n(1) + lift_n(0)).abs() < 0.03 * lamb, "{}", lift_n(1));
    // Every panel in one region: the regions add up to the run's loads.
    let sum = |key: &str| (0..3).map(|k| loads(k)[key].as_f64().unwrap()).sum::<f64>();
    let whole_kg = s["lift_kg"]["total"].as_f64().unwrap();
    assert!(
        (sum("lift_kg") - whole_kg).abs() < 0.05,
        "{} {whole_kg}",
        sum("lift_kg")
    );
    let drag = 1000.0 * s["coefficients"]["drag"].as_f64().unwrap();
    assert!(
        (sum("drag_counts") - drag).abs() < 0.05,
        "{} {drag}",
        sum("drag_counts")
    );
    // stdout says it beside each verdict.
    assert!(
        o.stdout.contains("upper front: ") && o.stdout.contains("its own surface carries"),
        "{}",
        o.stdout
    );
}
