//! End-to-end tests of `tuft check` on generated STL files in a fresh
//! temporary folder, and on the committed case STL.
#![allow(clippy::unwrap_used, clippy::expect_used)]

mod common;

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use tuft_mesh::{TriMesh, generate};

/// The binary under test, as Cargo built it for these tests (never a
/// stale copy found on disk).
fn tuft() -> PathBuf {
    PathBuf::from(env!("CARGO_BIN_EXE_tuft"))
}

fn write_binary_stl(path: &Path, mesh: &TriMesh, scale: f64) {
    let mut out = vec![0u8; 80];
    out.extend_from_slice(&(mesh.len() as u32).to_le_bytes());
    for t in &mesh.triangles {
        out.extend_from_slice(&[0u8; 12]);
        for &v in t {
            let p = mesh.vertices[v as usize] * scale;
            for c in [p.x, p.y, p.z] {
                out.extend_from_slice(&(c as f32).to_le_bytes());
            }
        }
        out.extend_from_slice(&[0u8; 2]);
    }
    std::fs::File::create(path)
        .unwrap()
        .write_all(&out)
        .unwrap();
}

fn check(args: &[&str]) -> Output {
    Command::new(tuft())
        .arg("check")
        .args(args)
        .output()
        .unwrap()
}

/// `tuft check ARGS`, which must exit 0; its stdout.
fn check_ok(args: &[&str]) -> String {
    let out = check(args);
    let stdout = String::from_utf8_lossy(&out.stdout).into_owned();
    assert_eq!(
        out.status.code(),
        Some(0),
        "{stdout}\n{}",
        String::from_utf8_lossy(&out.stderr)
    );
    stdout
}

#[test]
fn check_reports_a_generated_sphere() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("sphere.stl");
    // A 1 m radius icosphere written in millimetres, 5120 facets.
    write_binary_stl(&path, &generate::icosphere(1.0, 4), 1000.0);
    let stdout = check_ok(&[path.to_str().unwrap(), "--units", "mm", "--panels", "2000"]);
    assert!(stdout.contains("5120 facets"), "{stdout}");
    assert!(stdout.contains("coarsened to"), "{stdout}");
    assert!(stdout.contains("verdict    usable"), "{stdout}");
    // The wind arrives at the low-x end, and the size line says so with the
    // switch for a nose exported at the other end (a review ran a scan
    // backwards with no hint).
    assert!(
        stdout.contains(", the nose, where the wind arrives, to ")
            && stdout.contains(", the tail; ")
            && stdout.contains("geometry.nose = \"+x\" (--nose +x)"),
        "{stdout}"
    );
    let turned = check(&[path.to_str().unwrap(), "--panels", "2000", "--nose", "+x"]);
    let turned = String::from_utf8_lossy(&turned.stdout);
    assert!(!turned.contains("(--nose +x)"), "{turned}");

    let json = check(&[path.to_str().unwrap(), "--panels", "2000", "--json"]);
    // The phase's end on stderr, with its time; stdout is the JSON alone.
    let stderr = String::from_utf8_lossy(&json.stderr);
    assert!(
        stderr
            .lines()
            .last()
            .is_some_and(|l| l.starts_with("tuft check: geometry done in ")),
        "{stderr}"
    );
    let report: serde_json::Value = serde_json::from_slice(&json.stdout).unwrap();
    // Surface 4 pi r^2 = 12.57 m^2 (Archimedes); the inscribed polyhedron,
    // coarsened to 2000 panels, keeps it within 3 %.
    let area = report["area"].as_f64().unwrap();
    assert!(
        (area - 4.0 * std::f64::consts::PI).abs() / (4.0 * std::f64::consts::PI) < 0.03,
        "{area}"
    );
    assert!(report["panels"].as_u64().unwrap() <= 2000);
    assert_eq!(report["verdict"], "usable");
}

#[test]
fn check_accepts_the_committed_coupe() {
    let stl = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases/coupe.stl");
    let stdout = check_ok(&[stl.to_str().unwrap(), "--units", "mm"]);
    assert!(stdout.contains("3956 facets"), "{stdout}");
    assert!(stdout.contains("verdict    usable"), "{stdout}");
}

/// A car-sized body written in centimetres and read as millimetres is a
/// scale model's size: the verdict is doubtful, naming the unit, and the
/// exit code 1 (a review's had read "usable", exit 0, its warning among
/// the quality lines).
#[test]
fn a_car_read_in_the_wrong_unit_is_doubtful() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("cm.stl");
    // A 4.4 m sphere in centimetres.
    write_binary_stl(&path, &generate::icosphere(2.2, 3), 100.0);
    let out = check(&[path.to_str().unwrap(), "--units", "mm", "-q"]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert_eq!(out.status.code(), Some(1), "{stdout}");
    assert!(
        stdout.contains("in centimetres it would be 4.4 m")
            && stdout.contains("verdict    doubtful: as read, the body is a scale model's size"),
        "{stdout}"
    );
    // Read in centimetres: usable.
    let out = check(&[path.to_str().unwrap(), "--units", "cm", "-q"]);
    assert_eq!(out.status.code(), Some(0));
    // An open body read in metres is refused for its size as soon as it
    // is read, not for a hole kilometres round (a review's scan in
    // millimetres read as metres had been).
    let open = dir.path().join("open.stl");
    let cut = tuft_mesh::TriMesh::new(
        generate::icosphere(2200.0, 3).vertices,
        generate::icosphere(2200.0, 3).triangles[1..].to_vec(),
    )
    .unwrap();
    write_binary_stl(&open, &cut, 1.0);
    let out = check(&[open.to_str().unwrap(), "--units", "m", "-q"]);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(
        stderr.contains("the body is 4400 m across at its largest")
            && stderr.contains("in millimetres it would be 4.4 m")
            && !stderr.contains("hole"),
        "{stderr}"
    );
}

#[test]
fn check_refuses_a_truncated_file_in_one_line() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("cut.stl");
    write_binary_stl(&path, &generate::icosphere(1.0, 2), 1.0);
    let bytes = std::fs::read(&path).unwrap();
    std::fs::write(&path, &bytes[..bytes.len() - 75]).unwrap();
    let expected = format!(
        "tuft: {}: the binary STL header declares 320 facets",
        path.display()
    );
    // Quiet: the error's one line alone.
    let out = check(&[path.to_str().unwrap(), "--quiet"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(out.stdout.is_empty());
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(stderr.lines().count(), 1, "{stderr}");
    assert!(stderr.starts_with(&expected), "{stderr}");
    // In a log (stderr not a terminal), the phase and its stages as they
    // start, as `tuft run` says them, then the error's one line last.
    let out = check(&[path.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(2));
    let stderr = String::from_utf8_lossy(&out.stderr);
    let lines: Vec<&str> = stderr.lines().collect();
    assert_eq!(
        lines[..2],
        [
            format!(
                "tuft check: reading, repairing and coarsening {} ...",
                path.display()
            ),
            format!("tuft check:   reading {} ...", path.display())
        ],
        "{stderr}"
    );
    assert_eq!(
        lines.iter().filter(|l| l.starts_with("tuft:")).count(),
        1,
        "{stderr}"
    );
    assert!(lines[lines.len() - 1].starts_with(&expected), "{stderr}");
}

/// The facets of a unit sphere (24 by 48) whose corners' `coordinate`
/// sums to more than zero: a half sphere, open along its cut.
fn half_sphere(coordinate: fn(&tuft_mesh::Point) -> f64) -> TriMesh {
    let sphere = generate::latlong_sphere(1.0, 24, 48);
    TriMesh {
        triangles: sphere
            .triangles
            .iter()
            .copied()
            .filter(|t| {
                t.iter()
                    .map(|&v| coordinate(&sphere.vertices[v as usize]))
                    .sum::<f64>()
                    > 0.0
            })
            .collect(),
        vertices: sphere.vertices.clone(),
    }
}

#[test]
fn check_half_model_needs_the_symmetry_flag() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("half.stl");
    let half = half_sphere(|p| p.y);
    write_binary_stl(&path, &half, 1.0);
    let p = path.to_str().unwrap();
    let refused = check(&[p, "--units", "m"]);
    assert_eq!(refused.status.code(), Some(2));
    let stderr = String::from_utf8_lossy(&refused.stderr);
    assert!(
        stderr.contains("open hole") && stderr.contains("perimeter"),
        "{stderr}"
    );
    // With --json a script reads the refusal and its hole, named by place.
    let json = check(&[p, "--units", "m", "--json"]);
    assert_eq!(json.status.code(), Some(2));
    let v: serde_json::Value = serde_json::from_slice(&json.stdout).unwrap();
    assert_eq!(v["verdict"], "refused", "{v}");
    let hole = &v["holes"][0];
    assert!(
        hole["perimeter"].as_f64().is_some_and(|p| p > 6.0) && hole["place"].is_string(),
        "{v}"
    );
    let accepted = check_ok(&[p, "--units", "m", "--half"]);
    assert!(accepted.contains("closed by the symmetry mirror"));

    // The other half (y <= 0, as some exports keep the driver's side) runs
    // as its mirror image: the same panels, and said so.
    let left_path = dir.path().join("left.stl");
    let mut left = half.clone();
    left.map_vertices(|p| tuft_mesh::Point::new(p.x, -p.y, p.z));
    for t in &mut left.triangles {
        t.swap(1, 2);
    }
    write_binary_stl(&left_path, &left, 1.0);
    let stdout = check_ok(&[left_path.to_str().unwrap(), "--units", "m", "--half"]);
    assert!(
        stdout.contains(
            "half model of the left side, y <= 0 in tuft's axes: run as its mirror image"
        ),
        "{stdout}"
    );
    let panels = |out: &str| {
        out.lines()
            .find(|l| l.starts_with("panels "))
            .map(str::to_owned)
    };
    assert!(panels(&accepted).is_some());
    assert_eq!(panels(&stdout), panels(&accepted));
}

/// A whole body checked as a half model (`--half`, or `geometry.half_model
/// = true`) is cut at y = 0 and its y >= 0 half kept, saying so; a whole
/// body off that plane is refused in one line naming the file and how far
/// off it is.
#[test]
fn check_cuts_a_whole_body_given_as_a_half_model() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("whole.stl");
    write_binary_stl(&path, &generate::latlong_sphere(1.0, 24, 48), 1.0);
    let p = path.to_str().unwrap();
    // Checked whole, it is said to be symmetric enough to run as a half.
    let out = check(&[p, "--units", "m"]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        stdout.contains("the halves about y = 0 agree to 0.0 mm: it can run as a half model")
            && stdout.contains(
                "in a cross wind mirrored into a whole body whose two sides are panelled alike"
            ),
        "{stdout}"
    );
    let stdout = check_ok(&[p, "--units", "m", "--half"]);
    assert!(stdout.contains("cut from the whole body"), "{stdout}");
    assert!(
        stdout.contains("cut at y = 0 and its y >= 0 half run mirrored"),
        "{stdout}"
    );
    assert!(stdout.contains("closed by the symmetry mirror"), "{stdout}");
    // Stretched and turned about z, its halves differ: run it whole.
    let mut turned = generate::latlong_sphere(1.0, 24, 48);
    turned.map_vertices(|q| tuft_mesh::Point::new(2.0 * q.x - 0.2 * q.y, 0.4 * q.x + q.y, q.z));
    let path_turned = dir.path().join("turned.stl");
    write_binary_stl(&path_turned, &turned, 1.0);
    let out = check(&[path_turned.to_str().unwrap(), "--units", "m"]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        stdout.contains("the halves about y = 0 differ by up to"),
        "{stdout}"
    );
    assert!(stdout.contains("run it whole"), "{stdout}");
    let mut off = generate::latlong_sphere(1.0, 24, 48);
    off.map_vertices(|q| tuft_mesh::Point::new(q.x, q.y + 0.1, q.z));
    let path = dir.path().join("off.stl");
    write_binary_stl(&path, &off, 1.0);
    let out = check(&[path.to_str().unwrap(), "--units", "m"]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        stdout.contains(
            "its box is centred 100.0 mm off y = 0: if the body is symmetric and only offset"
        ),
        "{stdout}"
    );
    let out = check(&[path.to_str().unwrap(), "--units", "m", "--half", "-q"]);
    assert_eq!(out.status.code(), Some(2));
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(stderr.lines().count(), 1, "{stderr}");
    assert!(stderr.contains(&path.display().to_string()), "{stderr}");
    assert!(
        stderr.contains("centred 100.0 mm off that plane"),
        "{stderr}"
    );
}

/// A case file is checked as the run reads its STL: the committed coupe
/// case gives its unit and ground; a case of a built-in shape is checked
/// as the run generates it.
#[test]
fn check_reads_a_case_files_stl_as_the_run_does() {
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let stdout = check_ok(&[cases.join("coupe.toml").to_str().unwrap()]);
    assert!(stdout.starts_with("case       "), "{stdout}");
    assert!(stdout.contains("unit mm"), "{stdout}");
    assert!(stdout.contains("ground plane: z = 0 m"), "{stdout}");
    // Where the case puts the axles and its regions, as the run will.
    assert!(
        stdout.contains("axles      front x 0.950 m, rear x 3.650 m"),
        "{stdout}"
    );
    assert!(stdout.contains("region     \"rear window\": "), "{stdout}");
    // A built-in shape's case is checked as the run generates it.
    let stdout = check_ok(&[cases.join("ahmed-25.toml").to_str().unwrap()]);
    assert!(
        stdout.contains("ahmed-25.toml: the built-in shape")
            && stdout.contains("verdict    usable"),
        "{stdout}"
    );
}

/// `--save-panels` writes the panels a run would use, in the input's unit:
/// read back, it holds the reported panel count and the body's size.
#[test]
fn saved_panels_read_back_as_the_reported_mesh() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("sphere.stl");
    write_binary_stl(&path, &generate::icosphere(1.0, 4), 1000.0);
    let saved = dir.path().join("panels.stl");
    let out = check(&[
        path.to_str().unwrap(),
        "--panels",
        "1000",
        "--save-panels",
        saved.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(0));
    let stdout = String::from_utf8_lossy(&out.stdout);
    let (mesh, _) = tuft_mesh::import::read_stl(&saved).unwrap();
    assert!(
        stdout.contains(&format!("coarsened to {}", mesh.len())),
        "{stdout}"
    );
    let (lo, hi) = mesh.bounds().unwrap();
    // Millimetres, as written: a 1 m sphere spans about 2000 (inscribed).
    assert!((hi.x - lo.x - 2000.0).abs() < 40.0, "{lo:?} {hi:?}");
}

/// `--save-panels` writes in the file's own axes, so the panels lie over
/// the scan (a review's nose-at-+x file came back at x -4.5..0 m), says
/// where it wrote, and never writes over the STL or the case file it
/// checks (a review's named the scan and replaced it).
#[test]
fn saved_panels_lie_over_the_file_and_never_replace_it() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("pointy.stl");
    // An ellipsoid 2 m long, the nose at +x (ISO 8855) with x 0..2000 mm.
    let mut body = generate::icosphere(1.0, 4);
    body.map_vertices(|p| tuft_mesh::Point::new(1.0 + p.x, 0.4 * p.y, 0.5 + 0.3 * p.z));
    write_binary_stl(&path, &body, 1000.0);
    let saved = dir.path().join("panels.stl");
    let out = check(&[
        path.to_str().unwrap(),
        "--nose",
        "+x",
        "--panels",
        "1000",
        "--save-panels",
        saved.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        stdout.contains("saved      ") && stdout.contains("in the STL's own axes"),
        "{stdout}"
    );
    let (mesh, _) = tuft_mesh::import::read_stl(&saved).unwrap();
    let (lo, hi) = mesh.bounds().unwrap();
    assert!(
        lo.x > -10.0 && (hi.x - 2000.0).abs() < 30.0,
        "{lo:?} {hi:?}"
    );
    // Outward, as the file: positive volume.
    assert!(mesh.signed_volume() > 0.0);
    let before = std::fs::read(&path).unwrap();
    let out = check(&[
        path.to_str().unwrap(),
        "--panels",
        "500",
        "--save-panels",
        path.to_str().unwrap(),
    ]);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(
        stderr.contains("that is the file being checked"),
        "{stderr}"
    );
    assert_eq!(std::fs::read(&path).unwrap(), before);
    // Nor under another name (a hard link), nor over another file that is
    // not a panels file (another scan, a picture); an earlier panels file
    // is replaced.
    let other = dir.path().join("scan-v2.stl");
    std::fs::hard_link(&path, &other).unwrap();
    let picture = dir.path().join("front.png");
    std::fs::write(&picture, "a picture").unwrap();
    for (target, words) in [
        (&other, "that is the file being checked"),
        (&picture, "is not a panels file tuft wrote"),
    ] {
        let out = check(&[
            path.to_str().unwrap(),
            "--panels",
            "500",
            "--save-panels",
            target.to_str().unwrap(),
        ]);
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{stderr}");
        assert!(stderr.contains(words), "{stderr}");
    }
    assert_eq!(std::fs::read(&path).unwrap(), before);
    assert_eq!(std::fs::read(&picture).unwrap(), b"a picture");
    let out = check(&[
        path.to_str().unwrap(),
        "--nose",
        "+x",
        "--panels",
        "500",
        "--save-panels",
        saved.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(0), "{out:?}");
}

/// A ground set into the floor is warned about by check as by the run (a
/// review's ground 10 mm into the coupe's floor: check had said only
/// "usable", the run warned).
#[test]
fn a_floor_on_the_ground_is_warned_about_before_running() {
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let stl = cases.join("coupe.stl");
    let out = check(&[
        stl.to_str().unwrap(),
        "--ground",
        "0.13",
        "--panels",
        "2000",
    ]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        stdout.contains("warning: the body meets the ground over"),
        "{stdout}"
    );
    // Doubtful, exit 1 (a review's had read "usable"); so is a ground at
    // the floor's height (the coupe's floor is 0.12 m up), which the wrap
    // leaves open; the coupe at its own ground is usable.
    assert!(
        stdout.contains("verdict    doubtful: the body's floor stands on the ground"),
        "{stdout}"
    );
    assert_eq!(out.status.code(), Some(1));
    let at_floor = check(&[
        stl.to_str().unwrap(),
        "--ground",
        "0.12",
        "--panels",
        "2000",
    ]);
    let text = String::from_utf8_lossy(&at_floor.stdout);
    assert!(
        text.contains("warning: the body's underside lies within"),
        "{text}"
    );
    assert_eq!(at_floor.status.code(), Some(1), "{text}");
    // The same as a half model, whose cut's foot then runs along the
    // ground (a review's half model had read as cut at its floor, usable).
    let half = check(&[
        stl.to_str().unwrap(),
        "--ground",
        "0.12",
        "--half",
        "--panels",
        "1500",
    ]);
    let text = String::from_utf8_lossy(&half.stdout);
    assert!(
        text.contains("verdict    doubtful: the body's floor stands on the ground"),
        "{text}"
    );
    assert_eq!(half.status.code(), Some(1), "{text}");
    let own = check(&[stl.to_str().unwrap(), "--ground", "0.0", "--panels", "2000"]);
    let text = String::from_utf8_lossy(&own.stdout);
    assert!(text.contains("verdict    usable"), "{text}");
}

/// A body read back to front (the demo coupe's file with its nose taken
/// to be at +x) is doubtful, exit 1, naming the nose setting: a review's
/// SUV read "usable", exit 0, and its run stopped on an unphysical flow.
#[test]
fn a_body_read_back_to_front_is_doubtful() {
    let stl = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases/coupe.stl");
    let stl = stl.to_str().unwrap();
    let args = |nose| [stl, "--units", "mm", "--nose", nose, "--panels", "1500"];
    let out = check(&args("+x"));
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        text.contains("warning: the end meeting the wind is the flatter one")
            && text.contains("verdict    doubtful: the end meeting the wind is the flatter one")
            && text.contains("geometry.nose = \"-x\""),
        "{text}"
    );
    assert_eq!(out.status.code(), Some(1), "{text}");
    let out = check(&args("-x"));
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(!text.contains("flatter one"), "{text}");
}

/// On a half model a region whose y range leaves out the mirror image is
/// said to cover one side only (a review's A-pillar box had read "both
/// sides" and was missing from the side view); one without a y range
/// covers both.
#[test]
fn a_one_sided_region_on_a_half_model_is_named_so() {
    let dir = tempfile::tempdir().unwrap();
    let stl = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases/coupe.stl");
    let case = dir.path().join("half.toml");
    std::fs::write(
        &case,
        format!(
            "[geometry]\nstl = {:?}\nunits = \"mm\"\nhalf_model = true\npanels = 1500\n\
             [ground]\nz = 0.0\n[reference]\nfront_axle_x = 0.95\nrear_axle_x = 3.65\n\
             [[region]]\nname = \"flank\"\nx = [1.5, 3.0]\ny = [0.5, 1.0]\nfacing = \"side\"\n\
             [[region]]\nname = \"roof\"\nx = [1.5, 3.0]\nfacing = \"up\"\n",
            stl.to_str().unwrap()
        ),
    )
    .unwrap();
    let out = check(&[case.to_str().unwrap()]);
    let text = String::from_utf8_lossy(&out.stdout);
    let line = |name: &str| {
        text.lines()
            .find(|l| l.contains(&format!("\"{name}\"")))
            .unwrap_or_default()
            .to_owned()
    };
    assert!(line("flank").contains("(the modelled side only"), "{text}");
    assert!(line("roof").ends_with("(both sides)"), "{text}");
}

/// A case with a built-in shape is checked as the run generates it, and
/// its panels saved in metres: a variant to take into a modeller.
#[test]
fn a_built_in_shape_is_checked_and_saved() {
    let dir = tempfile::tempdir().unwrap();
    let case = dir.path().join("c30.toml");
    std::fs::write(
        &case,
        "[geometry]\nshape = \"coupe\"\nrear_window_deg = 30\npanels = 1500\n[ground]\nz = 0.0\n",
    )
    .unwrap();
    let saved = dir.path().join("c30.stl");
    let out = check(&[
        case.to_str().unwrap(),
        "--save-panels",
        saved.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        stdout.contains("the built-in shape \"coupe\" as the run generates it"),
        "{stdout}"
    );
    let (mesh, _) = tuft_mesh::import::read_stl(&saved).unwrap();
    assert!(
        stdout.contains(&format!("panels     {} ", mesh.len())),
        "{stdout}"
    );
    let (lo, hi) = mesh.bounds().unwrap();
    assert!((hi.x - lo.x - 4.5).abs() < 0.01, "metres: {lo:?} {hi:?}");
}

/// A unit slip is refused by check as by run: the committed coupe (in mm)
/// read as metres is 4.5 km long. An STL given to run is refused with a
/// pointer to the case file.
#[test]
fn a_unit_slip_is_refused_and_run_wants_a_case_file() {
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let stl = cases.join("coupe.stl");
    let out = check(&[stl.to_str().unwrap(), "--units", "m"]);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(
        stderr.contains("--units") && stderr.contains("4500 m"),
        "{stderr}"
    );
    let out = Command::new(tuft())
        .args(["run", stl.to_str().unwrap()])
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(stderr.contains("case file (.toml)"), "{stderr}");
}

/// A vertex of a sphere moved along it past its ring of neighbours folds
/// its fan of facets over theirs, crossing them (a scan's noisy apex does
/// this). The check finds the crossing pairs, calls the mesh doubtful and
/// exits 1: a review's run on such a scan failed as unphysical at every
/// panel count while the check had said "usable".
#[test]
fn a_surface_folded_through_itself_is_doubtful_and_exits_1() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("folded.stl");
    let mut sphere = generate::icosphere(1.0, 3);
    let v = 0;
    let p = sphere.vertices[v];
    // Neighbours' spacing on a level-3 icosphere: about 0.15 m. Moved
    // 0.3 m along the sphere and 5 mm above it, the far side of its fan
    // sags below the sphere and rises through the facets beyond the ring.
    let tangent = p.coords.cross(&nalgebra::Vector3::z()).normalize();
    let moved = (p.coords + tangent * 0.3).normalize() * 1.005;
    sphere.vertices[v] = nalgebra::Point3::from(moved);
    write_binary_stl(&path, &sphere, 1.0);
    let out = check(&[path.to_str().unwrap(), "--units", "m", "--panels", "5000"]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(stdout.contains("cross each other"), "{stdout}");
    assert!(stdout.contains("verdict    doubtful"), "{stdout}");
    assert_eq!(out.status.code(), Some(1), "{stdout}");
}

/// A closed cylinder along y (a wheel): radius `r`, width `w`, centre `c`,
/// outward facets.
fn wheel(c: [f64; 3], r: f64, w: f64) -> TriMesh {
    let n = 48;
    let mut vertices = vec![
        tuft_mesh::Point::new(c[0], c[1] - w / 2.0, c[2]),
        tuft_mesh::Point::new(c[0], c[1] + w / 2.0, c[2]),
    ];
    for side in [-0.5, 0.5] {
        for k in 0..n {
            let a = 2.0 * std::f64::consts::PI * k as f64 / n as f64;
            vertices.push(tuft_mesh::Point::new(
                c[0] + r * a.cos(),
                c[1] + side * w,
                c[2] + r * a.sin(),
            ));
        }
    }
    let (near, far) = (
        |k: usize| 2 + (k % n) as u32,
        |k: usize| (2 + n + k % n) as u32,
    );
    let mut triangles = Vec::new();
    for k in 0..n {
        triangles.push([near(k), near(k + 1), far(k + 1)]);
        triangles.push([near(k), far(k + 1), far(k)]);
        triangles.push([0, near(k + 1), near(k)]);
        triangles.push([1, far(k), far(k + 1)]);
    }
    TriMesh {
        vertices,
        triangles,
    }
}

#[test]
fn a_coupe_with_wheels_through_its_body_standing_on_the_ground_is_wrapped_and_runs() {
    // The demo coupe's STL (millimetres, 120 mm above the ground) with four
    // wheels of 320 mm radius standing on the ground and running up into
    // the body: five parts, four of them crossing the body. Unwrapped, the
    // run stopped as "not physical" (drag -1552 counts).
    let dir = tempfile::tempdir().unwrap();
    let cases = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let (mut car, _) = tuft_mesh::import::read_stl(&cases.join("coupe.stl")).unwrap();
    for x in [950.0, 3650.0] {
        for y in [795.0, -795.0] {
            let w = wheel([x, y, 320.0], 320.0, 215.0);
            let offset = car.vertices.len() as u32;
            car.vertices.extend(&w.vertices);
            car.triangles
                .extend(w.triangles.iter().map(|t| t.map(|v| v + offset)));
        }
    }
    write_binary_stl(&dir.path().join("wheels.stl"), &car, 1.0);
    let case = dir.path().join("wheels.toml");
    std::fs::write(
        &case,
        "[geometry]\nstl = \"wheels.stl\"\nunits = \"mm\"\npanels = 2500\n[flow]\nspeed = 40.0\n\
         [ground]\nz = 0.0\n[reference]\nfront_axle_x = 0.95\nrear_axle_x = 3.65\n",
    )
    .unwrap();
    let out = check(&[case.to_str().unwrap()]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        stdout.contains("wrap       parts of the surface pass into each other")
            && stdout.contains("the body touches the ground")
            && stdout.contains("standing on the ground over"),
        "{stdout}"
    );
    let run = Command::new(tuft())
        .current_dir(dir.path())
        .args(["run", "wheels.toml", "--quiet"])
        .output()
        .unwrap();
    assert_eq!(
        run.status.code(),
        Some(1),
        "finished with warnings to read: {}",
        String::from_utf8_lossy(&run.stderr)
    );
    let summary: serde_json::Value = serde_json::from_slice(
        &std::fs::read(dir.path().join("wheels").join("summary.json")).unwrap(),
    )
    .unwrap();
    let warnings = summary["warnings"].to_string();
    assert!(
        warnings.contains("the body stands on the ground"),
        "{warnings}"
    );
    let wrap = &summary["mesh"]["preparation"]["wrap"];
    assert!(wrap["contact_area"].as_f64().unwrap() > 0.1, "{wrap}");
    // The run's own soundness check passed (it stops on a negative drag or
    // a surface flow many times the free stream); the estimate is printed
    // for the record, since no reference holds wheels' drag in this model.
    let cd = summary["drag_estimate"]["cd"].as_f64().unwrap();
    println!("wrapped coupe with wheels: C_D {cd:.3}");
    assert!(cd.is_finite() && cd > 0.0, "{cd}");
    // The tyres' shoulders are rims the flow leaves: the summary gives
    // the area held at the free-streamline bound, and the report says so.
    let rim = summary["separation"]["rim_m2"].as_f64().unwrap();
    assert!(rim > 0.05, "{rim}");
    let report = std::fs::read_to_string(dir.path().join("wheels").join("report.html")).unwrap();
    assert!(report.contains("Sharp front edges"));
}

#[test]
fn a_case_file_takes_panels_from_the_command_line_and_refuses_other_flags() {
    let case = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../cases/coupe.toml");
    let case = case.to_str().unwrap();
    let out = check(&[case, "--panels", "1500"]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(stdout.contains("(target 1500)"), "{stdout}");
    let out = check(&[case, "--ground", "0.1", "--half"]);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(
        stderr.contains("--half, --ground apply only to an STL given alone"),
        "{stderr}"
    );
}

/// A reader that stops reading (`tuft check case.toml | head -20`) closes
/// the pipe: the command had panicked ("failed printing to stdout: Broken
/// pipe", exit 101). It now ends quietly with its usual exit code.
#[test]
fn a_closed_stdout_ends_quietly() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("sphere.stl");
    write_binary_stl(&path, &generate::icosphere(1.0, 3), 1000.0);
    for args in [
        vec!["check", path.to_str().unwrap(), "--units", "mm"],
        vec!["--help"],
    ] {
        let (code, stderr) = common::with_closed_stdout(dir.path(), &args);
        assert_eq!(code, Some(0), "{args:?}: {stderr}");
    }
}

/// A body below the ground given to `tuft check` as an STL alone gets the
/// same hint as `tuft run` (a y-up export), in the flags' words; it had
/// said only that the body reaches below the ground plane.
#[test]
fn an_stl_below_the_ground_gets_the_y_up_hint() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("sphere.stl");
    write_binary_stl(&path, &generate::icosphere(1.0, 3), 1000.0);
    let out = check(&[path.to_str().unwrap(), "--ground", "0"]);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(
        stderr.contains("--ground 0: ")
            && stderr.contains("below the ground plane")
            && stderr.contains("is --ground right, or has the STL y up")
            && stderr.contains("(then pass --up y)"),
        "{stderr}"
    );
    // Told the STL's up axis, no such hint.
    let out = check(&[path.to_str().unwrap(), "--ground", "0", "--up", "y"]);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(!stderr.contains("has the STL y up"), "{stderr}");
}

/// Axles off the body: `tuft check` still prints the body's extent (what
/// the axles must be set against) before the error, with a verdict that
/// says the case cannot run (it said "usable", then failed), and the error
/// has one parenthesis on the case file's lengths (it had two in a row).
#[test]
fn axles_off_the_body_still_show_the_extent_in_one_sentence() {
    let dir = tempfile::tempdir().unwrap();
    write_binary_stl(
        &dir.path().join("sphere.stl"),
        &generate::icosphere(1.0, 3),
        1000.0,
    );
    let case = dir.path().join("sphere.toml");
    std::fs::write(
        &case,
        "[geometry]\nstl = \"sphere.stl\"\nup = \"y\"\n[reference]\nfront_axle_x = 950\nrear_axle_x = 3650\n",
    )
    .unwrap();
    let out = check(&[case.to_str().unwrap()]);
    let (stdout, stderr) = (
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr),
    );
    assert_eq!(out.status.code(), Some(2), "{stdout}\n{stderr}");
    assert!(stdout.contains("size       2.0"), "{stdout}");
    assert!(!stdout.contains("axles "), "{stdout}");
    // The verdict does not call the run usable when the case cannot run.
    assert!(
        stdout.contains("verdict    the case cannot run as written (below); the STL alone: usable"),
        "{stdout}"
    );
    // With --json (a script's reading) and --save-panels, nothing is
    // written: no report that reads as a clean one, no panels file.
    let panels = dir.path().join("panels.stl");
    let out = check(&[
        case.to_str().unwrap(),
        "--json",
        "--save-panels",
        panels.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(2));
    // Only the verdict, "refused", and the error's line: nothing a script
    // could read as a clean report (a review's script had read nothing).
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(json["verdict"], "refused", "{json}");
    assert!(
        json["error"]
            .as_str()
            .is_some_and(|e| e.contains("reference.front_axle_x = 950 m")),
        "{json}"
    );
    assert_eq!(
        json.as_object().map(serde_json::Map::len),
        Some(2),
        "{json}"
    );
    assert!(!panels.exists());
    assert!(
        stderr.contains(
            "reference.front_axle_x = 950 m and reference.rear_axle_x = 3650 m lie outside the body"
        ) && stderr.contains("; front_axle_x: in millimetres it would be 0.950 m, on the body")
            && stderr.contains("(lengths in the case file are metres, and, for axles")
            && stderr.matches("(lengths").count() == 1
            && !stderr.contains(") ("),
        "{stderr}"
    );
}

/// Stdout that fails for another reason than a closed pipe (a file on a
/// full disk, here Linux's `/dev/full`) cuts the output short: the command
/// says so and exits 2 rather than end as if all had been written.
#[cfg(target_os = "linux")]
#[test]
fn a_failing_stdout_is_reported() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("sphere.stl");
    write_binary_stl(&path, &generate::icosphere(1.0, 3), 1000.0);
    let full = std::fs::OpenOptions::new()
        .write(true)
        .open("/dev/full")
        .unwrap();
    let out = Command::new(tuft())
        .args(["check", path.to_str().unwrap(), "--units", "mm"])
        .stdout(full)
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(
        stderr.contains("writing to stdout failed")
            && stderr.contains("the command itself finished"),
        "{stderr}"
    );
}

/// A dome cut at the floor, in millimetres, its floor at -12.4 mm and the
/// ground declared at -0.0124 m: single precision puts the cut 0.4
/// nanometres above the ground, and the border is moved onto it (the
/// wrap's grid lines in the ground would otherwise pass under the body),
/// which check says.
#[test]
fn a_floor_cut_a_hair_off_the_ground_is_moved_onto_it_and_said() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("dome.stl");
    let mut dome = half_sphere(|p| p.z);
    dome.map_vertices(|p| tuft_mesh::Point::new(p.x, p.y, p.z - 0.0124));
    write_binary_stl(&path, &dome, 1000.0);
    let stdout = check_ok(&[path.to_str().unwrap(), "--ground", "-0.0124"]);
    assert!(stdout.contains("closed by the ground mirror"), "{stdout}");
    assert!(
        stdout.contains(
            "48 vertices of the border on the ground moved onto it (largest move 3.8e-10 m, round-off)"
        ),
        "{stdout}"
    );
}

/// A case file whose STL is missing: `tuft check` names the case file and
/// its key, as `tuft run` does (it named only the STL).
#[test]
fn a_missing_stl_is_named_with_its_case_key() {
    let dir = tempfile::tempdir().unwrap();
    let case = dir.path().join("gone.toml");
    std::fs::write(&case, "[geometry]\nstl = \"nothere.stl\"\n").unwrap();
    let out = check(&[case.to_str().unwrap()]);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(
        stderr.contains("gone.toml: geometry.stl = \"") && stderr.contains("nothere.stl\": "),
        "{stderr}"
    );
    assert!(out.stdout.is_empty());
}

/// `geometry.wrap = true` wraps a closed one-part sphere that nothing
/// else would wrap, and check says the case asked for it (the baseline
/// of an add-on study, whose add-on runs are wrapped).
#[test]
fn a_case_may_ask_for_the_wrap() {
    let dir = tempfile::tempdir().unwrap();
    write_binary_stl(
        &dir.path().join("sphere.stl"),
        &generate::icosphere(1.0, 4),
        1000.0,
    );
    for (wrap, wrapped) in [("", false), ("wrap = true\n", true)] {
        let case = dir.path().join("case.toml");
        std::fs::write(
            &case,
            format!("[geometry]\nstl = \"sphere.stl\"\nunits = \"mm\"\npanels = 1500\n{wrap}"),
        )
        .unwrap();
        let stdout = check_ok(&[case.to_str().unwrap()]);
        assert_eq!(
            stdout.contains("wrap       the case asks for it (geometry.wrap = true)"),
            wrapped,
            "{stdout}"
        );
    }
}

/// `tuft run` on `body` (an STL in metres, nose at x = 0) with `nose`
/// set as given: the warnings of its summary.json.
fn run_warnings(dir: &Path, stem: &str, body: &TriMesh, nose: &str) -> String {
    write_binary_stl(&dir.join(format!("{stem}.stl")), body, 1.0);
    let case = dir.join(format!("{stem}.toml"));
    std::fs::write(
        &case,
        format!(
            "[geometry]\nstl = \"{stem}.stl\"\nunits = \"m\"\nnose = \"{nose}\"\npanels = 900\n\
             [flow]\nspeed = 40.0\n[ground]\nz = 0.0\n"
        ),
    )
    .unwrap();
    let run = Command::new(tuft())
        .current_dir(dir)
        .args(["run", &format!("{stem}.toml"), "--quiet"])
        .output()
        .unwrap();
    assert!(
        matches!(run.status.code(), Some(0 | 1)),
        "{}",
        String::from_utf8_lossy(&run.stderr)
    );
    let summary: serde_json::Value =
        serde_json::from_slice(&std::fs::read(dir.join(stem).join("summary.json")).unwrap())
            .unwrap();
    summary["warnings"].to_string()
}

/// A body run tail first is asked whether its nose is at the other end;
/// the same body the right way round is not, and neither is a body blunt
/// and sharp-edged at both ends (a box van: a review's van, the right way
/// round, was asked on 8 of 21 runs, its blunt front's sharp lower edge
/// showing the stream 31 to 46 % of the frontal area). The slant-back
/// research body's square back (Ahmed, Ramm & Faltin 1984 dimensions) is
/// a flat face with sharp edges all round; its nose is rounded with a
/// 100 mm radius, which is no rim.
#[test]
fn a_flat_tail_upstream_asks_for_the_nose() {
    let dir = tempfile::tempdir().unwrap();
    let square_back = generate::ahmed_with_params(&generate::AhmedParams {
        slant_deg: 0.0,
        panels: 2000,
        ..Default::default()
    })
    .unwrap();
    let asks = "set geometry.nose = ";
    let w = run_warnings(dir.path(), "backwards", &square_back, "+x");
    assert!(
        w.contains(asks)
            && w.contains("would leave them round 0 % at the other end")
            && w.contains("geometry.nose = \\\"-x\\\" (or leave it out)"),
        "{w}"
    );
    let w = run_warnings(dir.path(), "forwards", &square_back, "-x");
    assert!(!w.contains(asks), "{w}");
    // The same box with its nose edges sharp too: blunt at both ends.
    let sharp_box = generate::ahmed_with_params(&generate::AhmedParams {
        slant_deg: 0.0,
        nose_radius: 0.002,
        panels: 2000,
        ..Default::default()
    })
    .unwrap();
    let w = run_warnings(dir.path(), "box", &sharp_box, "+x");
    assert!(!w.contains(asks), "{w}");
}
