//! End-to-end: every ready-to-run case in `cases/` through the built `tuft`
//! binary, each in a fresh folder of its own (the case and its STL copied
//! there, so nothing is written into the repository), and every output
//! read back with a reader that is not ours.
//!
//! Each case runs once, at its committed size; the tests that read its
//! results share the folder through a `OnceLock`.
#![allow(clippy::unwrap_used, clippy::expect_used)]

mod common;

use std::path::{Path, PathBuf};
use std::sync::OnceLock;

use base64::Engine as _;
use common::{copy_case, entries, read_png, tuft, vtk_read};
use serde_json::Value;

/// The cases in `cases/`, in the order of [`RUNS`].
const CASES: [&str; 4] = ["coupe", "ahmed-25", "ahmed-35", "sphere"];

/// Every file a run writes, sorted.
const OUTPUTS: [&str; 14] = [
    "centreline-cp.png",
    "mesh.json",
    "panels.csv",
    "pressure.png",
    "report.html",
    "separation-risk.png",
    "slice-centre-plane.png",
    "slice-centre-plane.vti",
    "slice-horizontal-plane.png",
    "slice-horizontal-plane.vti",
    "streamlines.vtp",
    "summary.json",
    "surface-flow.png",
    "surface.vtu",
];

/// Pictures with their sizes in pixels (the writers' defaults) and the
/// least fraction of pixels drawn on: the surface sheets and slices fill
/// much of the frame, the line plot only its curves, axes and labels.
const PICTURES: [(&str, u32, u32, f64); 6] = [
    ("pressure.png", 1600, 1000, 0.10),
    ("separation-risk.png", 1600, 1000, 0.10),
    ("surface-flow.png", 1600, 1000, 0.10),
    ("centreline-cp.png", 1400, 800, 0.02),
    ("slice-centre-plane.png", 1600, 1000, 0.10),
    ("slice-horizontal-plane.png", 1600, 1000, 0.10),
];

/// The underbody plane's files, written over the ground.
const UNDERBODY_SLICE: [&str; 2] = ["slice-underbody-plane.png", "slice-underbody-plane.vti"];

/// Whether a run stands over the ground, so that it slices the underbody
/// (every shipped case over the ground stands clear of it).
fn underbody(r: &Run) -> bool {
    !r.summary["mesh"]["ground_z"].is_null()
}

/// The pictures of a run: [`PICTURES`], and the underbody plane's over
/// the ground.
fn pictures(r: &Run) -> Vec<(&'static str, u32, u32, f64)> {
    let mut all = PICTURES.to_vec();
    if underbody(r) {
        all.push((UNDERBODY_SLICE[0], 1600, 1000, 0.10));
    }
    all
}

/// A finished run of one case.
struct Run {
    /// Folder holding the case, its STL and the result folder.
    root: PathBuf,
    /// The result folder.
    out: PathBuf,
    code: i32,
    stdout: String,
    stderr: String,
    summary: Value,
}

static RUNS: [OnceLock<Run>; 4] = [const { OnceLock::new() }; 4];

/// Run `case` once per test process (later callers wait and share it).
fn run(case: &str) -> &'static Run {
    let k = CASES.iter().position(|c| *c == case).unwrap();
    RUNS[k].get_or_init(|| {
        // A fresh folder under Cargo's scratch space for integration tests
        // (inside target/, never in the sources).
        let root = Path::new(env!("CARGO_TARGET_TMPDIR")).join(format!("e2e-{case}"));
        if root.exists() {
            std::fs::remove_dir_all(&root).unwrap();
        }
        std::fs::create_dir_all(&root).unwrap();
        let file = copy_case(case, &root);
        let o = tuft(&root, &["run", &file, "--out", "result"]);
        assert!(
            o.code == 0 || o.code == 1,
            "{case}: exit {} ({})",
            o.code,
            o.stderr
        );
        let out = root.join("result");
        let text = std::fs::read_to_string(out.join("summary.json")).unwrap();
        Run {
            root,
            out,
            code: o.code,
            stdout: o.stdout,
            stderr: o.stderr,
            summary: serde_json::from_str(&text).expect("summary.json is JSON"),
        }
    })
}

/// A finite number at `path` (keys separated by '/').
fn number(v: &Value, path: &str) -> f64 {
    let x = path
        .split('/')
        .fold(v, |v, k| {
            v.get(k).unwrap_or_else(|| panic!("missing key {path}"))
        })
        .as_f64()
        .unwrap_or_else(|| panic!("{path} is not a number"));
    assert!(x.is_finite(), "{path} = {x} is not finite");
    x
}

// ---- checks applied to every case ----

fn exits_with_progress_and_summary(r: &Run) {
    let warnings = r.summary["warnings"].as_array().expect("warnings list");
    // Exit 1 exactly when the run left warnings to read.
    assert_eq!(r.code, i32::from(!warnings.is_empty()), "{}", r.stdout);
    for w in warnings {
        assert!(r.stdout.contains(w.as_str().unwrap()), "warning printed");
    }
    // Progress: one line per finished phase on stderr.
    for phase in ["geometry", "potential flow", "boundary layer", "loads"] {
        assert!(
            r.stderr.contains(&format!("{phase} done in")),
            "progress for {phase}: {}",
            r.stderr
        );
    }
    assert!(r.stdout.contains("report.html"), "{}", r.stdout);
    // wake.vtu is written when the separated-wake loop shed sheets.
    let sheds = r.summary["separated_wakes"]["wake_panels"]
        .as_u64()
        .is_some_and(|n| n > 0);
    let mut expected: Vec<&str> = OUTPUTS.to_vec();
    if sheds {
        expected.push("wake.vtu");
    }
    if underbody(r) {
        expected.extend(UNDERBODY_SLICE);
    }
    expected.sort_unstable();
    assert_eq!(entries(&r.out), expected, "exactly the documented files");
    // The staging folder is gone once the results are in place.
    assert!(
        entries(&r.root).iter().all(|e| !e.contains("partial")),
        "{:?}",
        entries(&r.root)
    );
}

fn summary_is_complete(r: &Run) {
    let s = &r.summary;
    for k in common::COEFFICIENTS {
        number(s, &format!("coefficients/{k}"));
    }
    // Drag is its pressure and friction parts.
    let cd = number(s, "coefficients/drag");
    let parts = number(s, "coefficients/drag_pressure") + number(s, "coefficients/drag_friction");
    assert!(
        (cd - parts).abs() <= 1e-12 * cd.abs().max(1.0),
        "{cd} vs {parts}"
    );
    let total = number(s, "lift_kg/total");
    let front = number(s, "lift_kg/front_axle");
    let rear = number(s, "lift_kg/rear_axle");
    // The axle loads are a split of the total (moment balance about the
    // axles), so they add up to it; tolerance: round-off.
    assert!(
        (front + rear - total).abs() <= 1e-9 * (front.abs() + rear.abs()).max(1.0),
        "{front} + {rear} != {total}"
    );
    let area = number(s, "separation/area_m2");
    let fraction = number(s, "separation/fraction");
    assert!(area >= 0.0 && (0.0..=1.0).contains(&fraction));
    let timings = s["timings_s"].as_object().expect("timings_s");
    for phase in ["geometry", "potential flow", "boundary layer", "loads"] {
        let t = number(&s["timings_s"], phase);
        assert!(t >= 0.0, "{phase} took {t} s");
    }
    assert!(!timings.is_empty());
    assert!(s["warnings"].is_array());
    assert_eq!(
        s["tool"].as_str(),
        Some(format!("tuft {}", env!("CARGO_PKG_VERSION")).as_str())
    );
    assert!(
        s["caution"]
            .as_str()
            .unwrap()
            .contains("Screening estimate")
    );
    assert!(number(s, "mesh/panels") > 0.0);
}

/// `panels.csv` parsed: numeric columns and the state word per row.
fn panels_csv(r: &Run) -> (Vec<[f64; 15]>, Vec<String>) {
    let text = std::fs::read_to_string(r.out.join("panels.csv")).unwrap();
    let mut lines = text.lines();
    let header = lines.next().unwrap();
    assert!(
        header.starts_with("x,y,z,nx,ny,nz,area,cp,vx,vy,vz,theta,shape_factor,cf,state,risk"),
        "{header}"
    );
    let mut numbers = Vec::new();
    let mut states = Vec::new();
    for (i, line) in lines.enumerate() {
        let f: Vec<&str> = line.split(',').collect();
        assert_eq!(f.len(), 16, "row {i}");
        let mut row = [0.0; 15];
        for (k, v) in f.iter().enumerate().filter(|(k, _)| *k != 14) {
            // Theta and H are empty on separated panels, and only there.
            if k == 11 || k == 12 {
                assert_eq!(v.is_empty(), f[14] == "separated", "row {i} col {k}: {v}");
                if v.is_empty() {
                    row[k] = f64::NAN;
                    continue;
                }
            }
            let x: f64 = v.parse().unwrap_or_else(|_| panic!("row {i} col {k}: {v}"));
            assert!(x.is_finite(), "row {i} col {k}: {v}");
            row[if k < 14 { k } else { 14 }] = x;
        }
        numbers.push(row);
        states.push(f[14].to_owned());
    }
    (numbers, states)
}

fn panels_csv_matches_summary(r: &Run) {
    regions_match_the_table(r);
    let (rows, states) = panels_csv(r);
    assert_eq!(rows.len() as f64, number(&r.summary, "mesh/panels"));
    for (i, s) in states.iter().enumerate() {
        assert!(
            ["laminar", "turbulent", "separated", "unresolved"].contains(&s.as_str()),
            "row {i}: state {s}"
        );
    }
    let unresolved = states.iter().filter(|s| *s == "unresolved").count();
    assert_eq!(
        unresolved as f64,
        number(&r.summary, "solver/unresolved_panels")
    );
    for (i, row) in rows.iter().enumerate() {
        let n = (row[3] * row[3] + row[4] * row[4] + row[5] * row[5]).sqrt();
        assert!((n - 1.0).abs() < 1e-9, "row {i}: unit normal");
        assert!(row[6] > 0.0, "row {i}: positive area");
        assert!((0.0..=1.0).contains(&row[14]), "row {i}: risk in 0..1");
    }
    // Panel areas add up to the wetted area (no half models among the cases).
    let area: f64 = rows.iter().map(|r| r[6]).sum();
    let wetted = number(&r.summary, "mesh/wetted_area_m2");
    assert!((area - wetted).abs() < 1e-9 * wetted, "{area} vs {wetted}");
    // The underbody's lift from the table: the gauge pressure Cp q on the
    // ground-facing panels (normal z below -0.5), lift along +z, in kg at
    // standard gravity; the table rounds its columns, so 1e-6 relative.
    // Only with the separated-flow loop does the table's Cp carry the
    // separated regions' pressure that the loads integrate (an attached
    // run's table keeps the potential-flow Cp there).
    if r.summary["separated_wakes"].is_null() {
        return;
    }
    let q = number(&r.summary, "dynamic_pressure_pa");
    let under: f64 = rows
        .iter()
        .filter(|r| r[5] < -0.5)
        .map(|r| -r[7] * q * r[6] * r[5] / 9.80665)
        .sum();
    let reported = number(&r.summary, "lift_kg/underbody");
    assert!(
        (under - reported).abs() <= 1e-6 * under.abs().max(1.0),
        "underbody lift {reported} kg, table gives {under} kg"
    );
}

/// Every named region's separated share and mean risk, recomputed from
/// `panels.csv` with the case's own region definitions (centroid within the
/// ranges, outward normal within 60 degrees of the facing; no half models
/// among the cases).
fn regions_match_the_table(r: &Run) {
    let (rows, states) = panels_csv(r);
    let defs = r.summary["case"]["region"]
        .as_array()
        .cloned()
        .unwrap_or_default();
    let results = r.summary["regions"].as_array().unwrap();
    assert_eq!(defs.len(), results.len());
    for (def, res) in defs.iter().zip(results) {
        let range = |k: &str, v: f64| {
            def[k]
                .as_array()
                .is_none_or(|a| a[0].as_f64().unwrap() <= v && v <= a[1].as_f64().unwrap())
        };
        let faces = |row: &[f64; 15]| match def["facing"].as_str() {
            None => true,
            Some("up") => row[5] > 0.5,
            Some("down") => row[5] < -0.5,
            Some("front") => row[3] < -0.5,
            Some("rear") => row[3] > 0.5,
            Some("side") => row[4].abs() > 0.5,
            Some(other) => panic!("facing {other}"),
        };
        let (mut area, mut sep, mut risk) = (0.0, 0.0, 0.0);
        for (row, state) in rows.iter().zip(&states) {
            if range("x", row[0]) && range("y", row[1]) && range("z", row[2]) && faces(row) {
                area += row[6];
                risk += row[6] * row[14];
                if state == "separated" {
                    sep += row[6];
                }
            }
        }
        let name = res["name"].as_str().unwrap();
        assert!(area > 0.0, "region {name} is empty");
        for (key, want) in [
            ("area_m2", area),
            ("separated_fraction", sep / area),
            ("mean_risk", risk / area),
        ] {
            let got = number(res, key);
            assert!(
                (got - want).abs() <= 1e-6 * want.abs().max(1e-3),
                "{name} {key}: {got} vs {want}"
            );
        }
        // The sensitivity runs' range holds the run's own share; after the
        // separated-flow loop the dead water stays dead in them, so the
        // share is the range's low end.
        let band = &res["separated_band"];
        let (lo, hi) = (band[0].as_f64().unwrap(), band[1].as_f64().unwrap());
        let f = sep / area;
        assert!(
            lo <= f + 1e-9 && f <= hi + 1e-9,
            "{name}: {f} outside {lo}..{hi}"
        );
        if r.summary["separated_wakes"].is_object() {
            assert!(
                (lo - f).abs() < 1e-9,
                "{name}: loop share {f}, band low {lo}"
            );
        }
    }
}

/// Reads every VTK file of a result folder with VTK's XML readers and
/// prints counts and sums to compare with our own tables.
const VTK_SCRIPT: &str = r"
import os
d = sys.argv[1]
r = vtkIOXML.vtkXMLUnstructuredGridReader(); r.SetFileName(d + '/surface.vtu'); r.Update()
g = r.GetOutput(); cd = g.GetCellData()
cp = cd.GetArray('cp'); area = cd.GetArray('area')
tri = all(g.GetCellType(c) == 5 for c in range(g.GetNumberOfCells()))
print('surface', g.GetNumberOfCells(), g.GetNumberOfPoints(), int(tri),
      sum(cp.GetValue(c) for c in range(cp.GetNumberOfTuples())),
      sum(area.GetValue(c) for c in range(area.GetNumberOfTuples())),
      cd.GetArray('velocity').GetNumberOfComponents(), cd.GetArray('state').GetNumberOfTuples())
r = vtkIOXML.vtkXMLPolyDataReader(); r.SetFileName(d + '/streamlines.vtp'); r.Update()
g = r.GetOutput(); pd = g.GetPointData()
names = sorted(pd.GetArrayName(k) for k in range(pd.GetNumberOfArrays()))
cp = pd.GetArray('cp'); sep = pd.GetArray('separated')
vals = [cp.GetValue(k) for k in range(cp.GetNumberOfTuples())]
print('streamlines', g.GetNumberOfLines(), g.GetNumberOfPoints(), '+'.join(names),
      max(v for v in vals if not math.isnan(v)), cp.GetNumberOfTuples(),
      sum(sep.GetValue(k) for k in range(sep.GetNumberOfTuples())))
for name in ['centre-plane', 'horizontal-plane', 'underbody-plane']:
    if not os.path.exists(d + '/slice-' + name + '.vti'):
        continue
    r = vtkIOXML.vtkXMLImageDataReader(); r.SetFileName(d + '/slice-' + name + '.vti'); r.Update()
    g = r.GetOutput(); pd = g.GetPointData()
    cp = pd.GetArray('cp'); inside = pd.GetArray('in_body'); near = pd.GetArray('near_surface')
    n = g.GetNumberOfPoints()
    finite = sum(1 for k in range(n) if not math.isnan(cp.GetValue(k)))
    print('slice', *g.GetDimensions(), n, finite, sum(inside.GetValue(k) for k in range(n)),
          sum(near.GetValue(k) for k in range(n)),
          sum(1 for k in range(n) if near.GetValue(k) and inside.GetValue(k)))
";

fn vtk_files_read_back(r: &Run) {
    let rows = vtk_read(VTK_SCRIPT, &r.out);
    let f = |row: &[String], k: usize| -> f64 { row[k].parse().unwrap() };
    let (csv, _) = panels_csv(r);
    let surface = &rows[0];
    assert_eq!(surface[0], "surface");
    assert_eq!(f(surface, 1), csv.len() as f64, "one cell per panel");
    assert!(f(surface, 2) >= 3.0);
    assert_eq!(surface[3], "1", "every cell a VTK triangle");
    // The same numbers as panels.csv, summed (tolerance: round-off of the
    // sums over a few thousand panels).
    let cp_sum: f64 = csv.iter().map(|r| r[7]).sum();
    let area_sum: f64 = csv.iter().map(|r| r[6]).sum();
    assert!((f(surface, 4) - cp_sum).abs() < 1e-9 * csv.len() as f64);
    assert!((f(surface, 5) - area_sum).abs() < 1e-9 * area_sum);
    assert_eq!(surface[6], "3", "velocity is a vector");
    assert_eq!(f(surface, 7), csv.len() as f64);
    let lines = &rows[1];
    assert_eq!(lines[0], "streamlines");
    assert_eq!(f(lines, 1), number(&r.summary, "solver/streamlines"));
    assert!(
        f(lines, 2) >= 2.0 * f(lines, 1),
        "at least two points a line"
    );
    // Each point carries its panel's Cp, shape factor and risk and
    // whether its line has separated: Cp no higher than the stagnation
    // value 1 (a few hundredths of discretisation error allowed), one
    // value per point.
    assert_eq!(lines[3], "cp+risk+separated+shape_factor");
    assert!(f(lines, 4) <= 1.05, "Cp along the lines up to {}", lines[4]);
    assert_eq!(f(lines, 5), f(lines, 2), "one value per point");
    assert_eq!(
        f(lines, 6) > 0.0,
        number(&r.summary, "separation/area_m2") > 0.0,
        "points past a separation where the run found one"
    );
    assert_eq!(rows.len(), if underbody(r) { 5 } else { 4 });
    for slice in &rows[2..] {
        assert_eq!(slice[0], "slice");
        let (nx, ny, nz) = (f(slice, 1), f(slice, 2), f(slice, 3));
        let (n, finite, inside) = (f(slice, 4), f(slice, 5), f(slice, 6));
        assert_eq!(nz, 1.0, "a plane");
        assert!(nx >= 50.0 && ny >= 20.0, "{nx} x {ny}");
        assert_eq!(n, nx * ny);
        // NaN exactly at the samples inside the body, and most samples
        // are in the flow (the slices reach well beyond the body).
        assert_eq!(finite + inside, n);
        assert!(finite > 0.5 * n, "{finite} of {n} samples in the flow");
        // The plane cuts the body, so some samples lie within a panel size
        // of its surface and are marked; most do not.
        let near = f(slice, 7);
        assert!(
            near > 0.0 && near < 0.5 * n,
            "{near} of {n} samples near the surface"
        );
    }
}

fn pictures_have_size_and_content(r: &Run) {
    for (file, w, h, least) in pictures(r) {
        let pic = read_png(&std::fs::read(r.out.join(file)).unwrap());
        // A slice picture ends under its fields' axes: its height is at
        // most the canvas's.
        if file.starts_with("slice-") {
            assert!(
                pic.width == w && pic.height <= h && pic.height >= h / 2,
                "{file}: {} x {}",
                pic.width,
                pic.height
            );
        } else {
            assert_eq!((pic.width, pic.height), (w, h), "{file}");
        }
        // Not blank: colour scales and anti-aliased text give many colours,
        // and a fair part of the picture is drawn on.
        assert!(pic.colours() > 50, "{file}: {} colours", pic.colours());
        let drawn = pic.drawn_fraction();
        assert!(drawn > least, "{file}: {:.1} % drawn", 100.0 * drawn);
        // The data are drawn in colour (axes, grid and text are grey): the
        // plot's two curves alone colour more than 0.3 % of its pixels,
        // its legend alone about 0.03 %.
        let coloured = pic.coloured_fraction();
        assert!(
            coloured > 0.003,
            "{file}: {:.2} % in colour",
            100.0 * coloured
        );
    }
}

fn report_is_self_contained(r: &Run) {
    let html = std::fs::read_to_string(r.out.join("report.html")).unwrap();
    assert!(html.starts_with("<!DOCTYPE html>"));
    assert!(html.contains("Screening estimate only"), "the caution");
    assert!(html.contains("validated CFD or wind-tunnel tests"));
    // Every picture inlined, byte for byte, and nothing fetched from outside.
    let marker = "src=\"data:image/png;base64,";
    let inlined: Vec<Vec<u8>> = html
        .split(marker)
        .skip(1)
        .map(|rest| {
            let b64 = &rest[..rest.find('"').unwrap()];
            base64::engine::general_purpose::STANDARD
                .decode(b64)
                .unwrap()
        })
        .collect();
    assert_eq!(inlined.len(), pictures(r).len());
    for (file, _, _, _) in pictures(r) {
        let bytes = std::fs::read(r.out.join(file)).unwrap();
        assert!(inlined.contains(&bytes), "{file} inlined");
    }
    assert!(!html.contains("src=\"http") && !html.contains("href=\"http"));
    assert!(!html.contains("<script"));
}

macro_rules! case_tests {
    ($module:ident, $case:literal) => {
        mod $module {
            use super::*;

            #[test]
            fn exits_0_or_1_with_progress_and_every_file() {
                exits_with_progress_and_summary(run($case));
            }

            #[test]
            fn summary_json_is_complete() {
                summary_is_complete(run($case));
            }

            #[test]
            fn panels_csv_matches_the_summary() {
                panels_csv_matches_summary(run($case));
            }

            #[test]
            fn vtk_files_read_back_in_vtk() {
                vtk_files_read_back(run($case));
            }

            #[test]
            fn pictures_have_their_size_and_are_not_blank() {
                pictures_have_size_and_content(run($case));
            }

            #[test]
            fn report_carries_the_caution_and_inlines_the_pictures() {
                report_is_self_contained(run($case));
            }
        }
    };
}

case_tests!(coupe, "coupe");
case_tests!(ahmed_25, "ahmed-25");
case_tests!(ahmed_35, "ahmed-35");
case_tests!(sphere, "sphere");

#[test]
fn every_case_in_the_folder_is_run_here() {
    let mut found: Vec<String> = entries(&common::cases_dir())
        .into_iter()
        .filter_map(|e| e.strip_suffix(".toml").map(str::to_owned))
        .collect();
    found.sort();
    let mut tested: Vec<String> = CASES.iter().map(|c| (*c).to_owned()).collect();
    tested.sort();
    assert_eq!(found, tested);
}

#[test]
fn committed_stl_files_stay_small() {
    for e in entries(&common::cases_dir()) {
        if e.ends_with(".stl") {
            let len = std::fs::metadata(common::cases_dir().join(&e))
                .unwrap()
                .len();
            assert!(len < 500_000, "{e}: {len} bytes");
        }
    }
}

// ---- physics sanity on the sphere ----

/// Lamb, Hydrodynamics (6th ed., 1932), section 92: on a sphere in uniform
/// potential flow Cp = 1 - 9/4 sin^2(theta), theta from the front
/// stagnation point.
fn lamb_cp(theta: f64) -> f64 {
    1.0 - 2.25 * theta.sin().powi(2)
}

#[test]
fn sphere_cp_follows_lamb() {
    let r = run("sphere");
    let (rows, _) = panels_csv(r);
    // The sphere is centred at the origin; the free stream runs along +x,
    // so the front stagnation point is at -x.
    let theta = |row: &[f64; 15]| {
        let rad = (row[0] * row[0] + row[1] * row[1] + row[2] * row[2]).sqrt();
        (-row[0] / rad).clamp(-1.0, 1.0).acos()
    };
    let front = rows.iter().min_by(|a, b| a[0].total_cmp(&b[0])).unwrap();
    // (Lamb) Cp = 1 at the stagnation point; the panel centroid sits a few
    // degrees off it, so compare with Lamb at the centroid's angle.
    // Tolerance 0.03: first-order panels on 1,280 facets.
    assert!(front[7] > 0.95, "stagnation Cp {}", front[7]);
    assert!((front[7] - lamb_cp(theta(front))).abs() < 0.03);
    // (Lamb) minimum Cp = 1 - 9/4 = -1.25 on the equator; tolerance 0.05
    // for the discretisation at this size.
    let min = rows.iter().map(|r| r[7]).fold(f64::INFINITY, f64::min);
    assert!((min - -1.25).abs() < 0.05, "minimum Cp {min}");
    // (Lamb) everywhere: RMS difference at the panel centroids.
    let rms = (rows
        .iter()
        .map(|r| (r[7] - lamb_cp(theta(r))).powi(2))
        .sum::<f64>()
        / rows.len() as f64)
        .sqrt();
    assert!(rms < 0.03, "RMS Cp error {rms}");
}

#[test]
fn sphere_has_no_lift_or_side_force() {
    // By symmetry of a sphere in free air about every plane through the
    // free stream, lift and side force vanish (in attached potential flow
    // all forces do: d'Alembert). Tolerance 0.01: the facets are not
    // exactly symmetric about the planes y = 0 and z = 0, and the boundary
    // layer's streamlines are seeded on them.
    let s = &run("sphere").summary;
    for k in [
        "coefficients/lift",
        "coefficients/side",
        "coefficients_attached/lift",
        "coefficients_attached/side",
        "coefficients_attached/drag",
    ] {
        let c = number(s, k);
        assert!(c.abs() < 0.01, "{k} = {c}");
    }
}

/// The slant regions of the two slant-back cases against the published
/// regimes (Ahmed, Ramm & Faltin 1984): at 25 degrees a separation bubble
/// on a slant the flow still follows (partly separated), at 35 the flow
/// leaves the roof edge (separated). The verdict's lines are the regime
/// test's (`tuft_tests` separated_wakes): under 20 % attached, from 60 %
/// separated.
#[test]
fn slant_regions_match_the_published_regimes() {
    for (case, want) in [("ahmed-25", "partly separated"), ("ahmed-35", "separated")] {
        let r = run(case);
        let slant = &r.summary["regions"][0];
        assert_eq!(slant["name"], "slant");
        assert_eq!(
            slant["verdict"].as_str(),
            Some(want),
            "{case}: {:.2} of the slant separated",
            number(slant, "separated_fraction")
        );
    }
}

/// The slant-back body's square base (its base is most of the frontal
/// area) is noted as held at the model's one dead-water pressure, with
/// the drag the measured range of square-back base pressures (-0.15 to
/// -0.35, from memory) would add; the sphere, with no base, is not.
#[test]
fn a_bluff_base_is_noted_with_the_drag_its_pressure_range_would_add() {
    let r = run("ahmed-25");
    let notes: Vec<&str> = r.summary["notes"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(|n| n.as_str())
        .filter(|n| n.starts_with("the base's dead water faces the stream over"))
        .collect();
    assert_eq!(notes.len(), 1, "{}", r.summary["notes"]);
    assert!(
        notes[0].contains("square-back bodies near the ground measure about -0.15 to -0.35"),
        "{}",
        notes[0]
    );
    let s = &run("sphere").summary;
    assert!(
        !s["notes"]
            .as_array()
            .unwrap()
            .iter()
            .any(|n| n.as_str().unwrap().starts_with("the base's dead water")),
        "{}",
        s["notes"]
    );
}
