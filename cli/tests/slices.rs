//! Flow slices on planes a case names (`[[slice]]`): the plane lands where
//! it is asked for, within the window and at the spacing asked for, carries
//! the flow an analytic solution gives there, and a plane that cannot be
//! drawn is refused before any work.
#![allow(clippy::unwrap_used, clippy::expect_used)]

mod common;

use std::path::{Path, PathBuf};

use common::{copy_case, entries, read_png, tuft, vtk_read};

/// A fresh folder holding the shipped sphere case with `extra` appended.
fn sphere_with(name: &str, extra: &str) -> (PathBuf, String) {
    let root = Path::new(env!("CARGO_TARGET_TMPDIR")).join(format!("slices-{name}"));
    if root.exists() {
        std::fs::remove_dir_all(&root).unwrap();
    }
    std::fs::create_dir_all(&root).unwrap();
    let file = copy_case("sphere", &root);
    let text = std::fs::read_to_string(root.join(&file)).unwrap();
    std::fs::write(root.join(&file), format!("{text}\n{extra}")).unwrap();
    (root, file)
}

/// Every sample of a slice's VTK file with its position, as VTK places it
/// (origin, spacing and direction matrix): x y z cp vx vy vz near in_body.
const SAMPLES: &str = r"
r = vtkIOXML.vtkXMLImageDataReader(); r.SetFileName(sys.argv[1]); r.Update()
g = r.GetOutput(); pd = g.GetPointData()
cp = pd.GetArray('cp'); v = pd.GetArray('velocity')
near = pd.GetArray('near_surface'); inside = pd.GetArray('in_body')
for k in range(g.GetNumberOfPoints()):
    p = g.GetPoint(k); u = v.GetTuple3(k)
    print(*p, cp.GetValue(k), *u, near.GetValue(k), inside.GetValue(k))
";

/// Lamb, Hydrodynamics (6th ed., 1932), section 92: potential flow past a
/// sphere of radius R; on the plane through its centre square to the
/// stream the velocity runs along the stream with speed
/// U (1 + R^3 / (2 r^3)).
fn lamb_speed_ratio(r: f64, radius: f64) -> f64 {
    1.0 + radius.powi(3) / (2.0 * r.powi(3))
}

#[test]
fn a_plane_across_the_stream_through_a_sphere_follows_lamb() {
    let (root, file) = sphere_with("equator", "[[slice]]\nname = \"Equator\"\nx = 0.0\n");
    // tuft check says where the plane lies and which file it writes.
    let o = tuft(&root, &["check", &file]);
    assert!(
        o.stdout.contains(
            "slice      \"Equator\": plane x = 0 m, seen from behind, y -1 to 1 m, z -1.1 to 1.3 m, \
             92 x 111 samples 0.0218 m apart, slice-equator.png\n"
        ),
        "{}",
        o.stdout
    );
    let o = tuft(&root, &["run", &file, "--out", "result", "--threads", "1"]);
    assert!(o.code <= 1, "exit {}: {}", o.code, o.stderr);
    let out = root.join("result");
    let files = entries(&out);
    for f in ["slice-equator.png", "slice-equator.vti"] {
        assert!(files.contains(&f.to_owned()), "{f} in {files:?}");
    }
    drawn_within_the_canvas(&out.join("slice-equator.png"));
    let report = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(report.contains("Flow slice: Equator"));

    let rows = vtk_read(SAMPLES, &out.join("slice-equator.vti"));
    let radius = 0.5;
    let (mut compared, mut worst, mut cross) = (0, 0.0_f64, 0.0_f64);
    for row in &rows {
        let v: Vec<f64> = row.iter().map(|w| w.parse().unwrap()).collect();
        // Every sample lies on the plane x = 0 asked for.
        assert!(v[0].abs() < 1e-12, "sample at x = {}", v[0]);
        let r = v[1].hypot(v[2]);
        // Inside the body exactly where the sphere is (the panels are
        // flat, so within a few millimetres of the radius).
        if r < 0.97 * radius || r > 1.03 * radius {
            assert_eq!(v[8] == 1.0, r < radius, "in_body at r = {r}");
        }
        // Compared from 1.2 radii out, clear of the panels' near field.
        if r < 1.2 * radius || v[7] == 1.0 {
            continue;
        }
        let want = 1.0 - lamb_speed_ratio(r, radius).powi(2);
        worst = worst.max((v[3] - want).abs());
        // The velocity runs along the stream: its components in the
        // plane are small against the free stream (40 m/s).
        cross = cross.max(v[5].hypot(v[6]) / 40.0);
        compared += 1;
    }
    assert!(compared > 3000, "{compared} samples compared");
    // Tolerance 0.01 in Cp, 0.01 of U across: first-order panels on the
    // 1,280-facet sphere, whose surface Cp is within 0.03 of Lamb's
    // (cases.rs); the field a few panel sizes out is closer.
    assert!(worst < 0.01, "largest Cp difference from Lamb {worst}");
    assert!(cross < 0.01, "largest cross-stream speed {cross} U");
}

/// VTK's image data: dimensions, origin and spacing.
const GRID: &str = r"
r = vtkIOXML.vtkXMLImageDataReader(); r.SetFileName(sys.argv[1]); r.Update()
g = r.GetOutput()
print(*g.GetDimensions(), *g.GetOrigin(), *g.GetSpacing())
";

#[test]
fn a_narrowed_window_at_a_finer_spacing_keeps_to_it_and_follows_lamb() {
    // A window beside the sphere, out to nearly twice its radius, sampled
    // every 10 mm (the whole box's spacing is 21.8 mm); its z range
    // reaches past the box's top (1.3 m) and is cut there.
    let (root, file) = sphere_with(
        "narrowed",
        "[[slice]]\nname = \"Beside\"\nx = 0.0\ny = [0.2, 0.95]\nz = [-0.4, 2.0]\nspacing = 0.01\n",
    );
    let o = tuft(&root, &["check", &file]);
    assert!(
        o.stdout.contains(
            "slice      \"Beside\": plane x = 0 m, seen from behind, y 0.2 to 0.95 m, z -0.4 to 1.3 m \
             (asked -0.4 to 2, cut to the box the slices span), 76 x 171 samples 0.01 m apart, \
             slice-beside.png\n           The samples lie closer together than the panels (median \
             size 0.0806 m): nearer the surface than about a panel's size the panels do not resolve \
             the flow"
        ),
        "{}",
        o.stdout
    );
    let o = tuft(&root, &["run", &file, "--out", "result", "--threads", "1"]);
    assert!(o.code <= 1, "exit {}: {}", o.code, o.stderr);
    let out = root.join("result");
    drawn_within_the_canvas(&out.join("slice-beside.png"));

    let vti = out.join("slice-beside.vti");
    let grid: Vec<f64> = vtk_read(GRID, &vti)[0]
        .iter()
        .map(|w| w.parse().unwrap())
        .collect();
    // 0.75 / 0.01 + 1 across, 1.7 / 0.01 + 1 up, one sample deep; the
    // spacing as asked along both axes of the plane.
    assert_eq!(grid[..3], [76.0, 171.0, 1.0]);
    assert_eq!(grid[3..6], [0.0, 0.2, -0.4]);
    assert!((grid[6] - 0.01).abs() < 1e-12 && (grid[7] - 0.01).abs() < 1e-12);

    let rows = vtk_read(SAMPLES, &vti);
    assert_eq!(rows.len(), 76 * 171);
    let radius = 0.5;
    let (mut compared, mut worst) = (0, 0.0_f64);
    for row in &rows {
        let v: Vec<f64> = row.iter().map(|w| w.parse().unwrap()).collect();
        // Every sample on the plane and inside the window asked for (cut
        // to the box).
        assert!(v[0].abs() < 1e-12, "sample at x = {}", v[0]);
        assert!((0.2 - 1e-9..=0.95 + 1e-9).contains(&v[1]), "y = {}", v[1]);
        assert!((-0.4 - 1e-9..=1.3 + 1e-9).contains(&v[2]), "z = {}", v[2]);
        // On the grid the spacing asked for lays from the window's corner.
        for (at, from) in [(v[1], 0.2), (v[2], -0.4)] {
            let steps = (at - from) / 0.01;
            assert!((steps - steps.round()).abs() < 1e-6, "{at} off the grid");
        }
        let r = v[1].hypot(v[2]);
        if r < 1.2 * radius || v[7] == 1.0 {
            continue;
        }
        let want = 1.0 - lamb_speed_ratio(r, radius).powi(2);
        worst = worst.max((v[3] - want).abs());
        compared += 1;
    }
    assert!(compared > 8000, "{compared} samples compared");
    // The same tolerance as across the whole box (above).
    assert!(worst < 0.01, "largest Cp difference from Lamb {worst}");
}

#[test]
fn a_plane_that_cannot_be_drawn_is_refused_before_the_run() {
    for (name, extra, words) in [
        (
            "outside",
            "[[slice]]\nname = \"far\"\nz = 9.0\n",
            "slice \"far\": z = 9 m lies outside the box the flow slices span",
        ),
        (
            "two-axes",
            "[[slice]]\nx = 0.0\ny = 0.2\n",
            "give exactly one of x, y or z",
        ),
        (
            "built-in",
            "[[slice]]\nname = \"centre plane\"\ny = 0.2\n",
            "built-in slice's file",
        ),
        (
            "reversed",
            "[[slice]]\nname = \"gap\"\nx = 0.0\ny = [0.6, -0.6]\n",
            "slice \"gap\": its y range [0.6, -0.6] runs backwards",
        ),
        (
            "range-outside",
            "[[slice]]\nname = \"gap\"\nx = 0.0\nz = [2.0, 3.0]\n",
            "slice \"gap\": its z range 2 to 3 m lies outside the box the flow slices span round \
             this body (z -1.1 to 1.3 m)",
        ),
        (
            "spacing",
            "[[slice]]\nname = \"gap\"\nx = 0.0\nspacing = 0\n",
            "slice \"gap\": its spacing must be a length above zero",
        ),
        (
            "budget",
            "[[slice]]\nname = \"gap\"\nx = 0.0\nspacing = 0.002\n",
            "slice \"gap\": a spacing of 0.002 m takes 1,202,201 samples over its window \
             (y -1 to 1, z -1.1 to 1.3 m), more than the 250,000 a slice may take; the smallest \
             spacing that fits this window is 0.0044 m",
        ),
    ] {
        let (root, file) = sphere_with(name, extra);
        let o = tuft(&root, &["run", &file, "--out", "result", "--threads", "1"]);
        assert_eq!(o.code, 2, "{name}: {}", o.stderr);
        assert!(o.stderr.contains(words), "{name}: {}", o.stderr);
        assert!(o.stderr.contains("sphere.toml"), "{name}: {}", o.stderr);
        assert!(!root.join("result").exists(), "{name}: no result folder");
    }
}

/// A slice picture ends under its fields' axes, within the 1600 x 1000
/// canvas, and is drawn on.
fn drawn_within_the_canvas(png: &Path) {
    let pic = read_png(&std::fs::read(png).unwrap());
    assert!(
        pic.width == 1600 && (500..=1000).contains(&pic.height),
        "{}: {} x {}",
        png.display(),
        pic.width,
        pic.height
    );
    assert!(pic.drawn_fraction() > 0.10);
}
