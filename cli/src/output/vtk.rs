//! VTK XML files for ParaView and other VTK readers.
//!
//! Format: VTK XML (file format version 1.0) with every data array written
//! `format="binary"`: a little-endian `UInt64` byte count followed by the raw
//! little-endian values, base64-encoded inline. NaN and infinities survive
//! exactly (ASCII would not: C++ streams do not read `NaN`).
//!
//! - `surface.vtu`: the real panels as triangles; cell data `cp`,
//!   `velocity` (m/s), `theta` (m), `shape_factor`, `cf`, `state`, `risk`,
//!   `normal` and `area` (m^2). `state` is an integer code (0 laminar,
//!   1 turbulent, 2 separated, 3 unresolved); the file repeats the key as
//!   field data arrays `state_code_laminar = 0`, and so on.
//! - `streamlines.vtp`: polylines with point scalars (a run writes each
//!   point's panel `cp`, `shape_factor`, `risk` and `separated`).
//! - `wake.vtu`: the wake sheets as quads with cell data `strength` (m^2/s).
//! - `<slice>.vti`: image data (with a `Direction` matrix, so any plane
//!   orientation) with point data `velocity` (m/s), `cp`, `in_body`
//!   (1 inside the body, where velocity and Cp are NaN), `near_surface`
//!   (1 within a panel size of the surface, where a panel's edge can make
//!   the velocity singular) and `dead_water` (1 behind separated surface,
//!   where the separated-flow loop holds one pressure).

use std::fmt::Write as _;
use std::io::Write;

use base64::Engine as _;
use nalgebra::{Point3, Vector3};

use super::{OutputError, PanelState, Slice, Streamlines, SurfaceResult, WakeSheets};

/// VTK cell type code of a triangle.
const VTK_TRIANGLE: u8 = 5;
/// VTK cell type code of a quadrilateral.
const VTK_QUAD: u8 = 9;

/// One data array ready to be written.
struct Array {
    name: String,
    vtk_type: &'static str,
    components: usize,
    bytes: Vec<u8>,
}

impl Array {
    fn f64s(name: &str, v: impl IntoIterator<Item = f64>) -> Self {
        let bytes = v.into_iter().flat_map(f64::to_le_bytes).collect();
        Self::new(name, "Float64", 1, bytes)
    }

    fn vec3s(name: &str, v: impl IntoIterator<Item = [f64; 3]>) -> Self {
        let bytes = v.into_iter().flatten().flat_map(f64::to_le_bytes).collect();
        Self::new(name, "Float64", 3, bytes)
    }

    fn i64s(name: &str, v: impl IntoIterator<Item = i64>) -> Self {
        let bytes = v.into_iter().flat_map(i64::to_le_bytes).collect();
        Self::new(name, "Int64", 1, bytes)
    }

    fn i32s(name: &str, v: impl IntoIterator<Item = i32>) -> Self {
        let bytes = v.into_iter().flat_map(i32::to_le_bytes).collect();
        Self::new(name, "Int32", 1, bytes)
    }

    fn u8s(name: &str, v: impl IntoIterator<Item = u8>) -> Self {
        Self::new(name, "UInt8", 1, v.into_iter().collect())
    }

    fn new(name: &str, vtk_type: &'static str, components: usize, bytes: Vec<u8>) -> Self {
        Self {
            name: name.to_owned(),
            vtk_type,
            components,
            bytes,
        }
    }

    /// The `<DataArray>` element; `tuples` adds `NumberOfTuples` (field data).
    fn xml(&self, tuples: Option<usize>) -> String {
        let mut payload = (self.bytes.len() as u64).to_le_bytes().to_vec();
        payload.extend_from_slice(&self.bytes);
        let data = base64::engine::general_purpose::STANDARD.encode(payload);
        let tuples = tuples.map_or(String::new(), |n| format!(" NumberOfTuples=\"{n}\""));
        format!(
            "<DataArray type=\"{}\" Name=\"{}\" NumberOfComponents=\"{}\"{tuples} format=\"binary\">{data}</DataArray>\n",
            self.vtk_type,
            xml_escape(&self.name),
            self.components
        )
    }
}

/// Escape the five XML special characters.
fn xml_escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
        .replace('\'', "&apos;")
}

/// A group element (`<CellData>`, `<Points>`, ...) holding arrays.
fn group(tag: &str, attrs: &str, arrays: &[Array], tuples: bool) -> String {
    let mut out = format!("<{tag}{attrs}>\n");
    for a in arrays {
        out.push_str(&a.xml(tuples.then(|| field_tuples(a))));
    }
    let _ = writeln!(out, "</{tag}>");
    out
}

/// Tuples in a field-data array.
fn field_tuples(a: &Array) -> usize {
    let width = match a.vtk_type {
        "Float64" | "Int64" => 8,
        "Int32" => 4,
        _ => 1,
    };
    a.bytes.len() / (width * a.components)
}

/// The XML prologue and the opening of the dataset element.
fn header(kind: &str, dataset_attrs: &str) -> String {
    format!(
        "<?xml version=\"1.0\"?>\n<VTKFile type=\"{kind}\" version=\"1.0\" \
         byte_order=\"LittleEndian\" header_type=\"UInt64\">\n<{kind}{dataset_attrs}>\n"
    )
}

/// Closing tags of a dataset.
fn footer(kind: &str) -> String {
    format!("</Piece>\n</{kind}>\n</VTKFile>\n")
}

fn coords(p: &Point3<f64>) -> [f64; 3] {
    [p.x, p.y, p.z]
}

fn vcoords(v: &Vector3<f64>) -> [f64; 3] {
    [v.x, v.y, v.z]
}

/// Write `surface.vtu`: the real panels with every surface field.
///
/// # Errors
/// [`OutputError::LengthMismatch`] for a field of the wrong length;
/// [`OutputError::Write`] when writing fails.
pub fn write_surface<W: Write>(w: &mut W, s: &SurfaceResult<'_>) -> Result<(), OutputError> {
    s.validate()?;
    let m = s.mesh;
    let key: Vec<Array> = PanelState::ALL
        .iter()
        .map(|st| Array::i32s(&format!("state_code_{}", st.as_str()), [st.code()]))
        .collect();
    let mut out = header("UnstructuredGrid", "");
    out.push_str(&group("FieldData", "", &key, true));
    let _ = writeln!(
        out,
        "<Piece NumberOfPoints=\"{}\" NumberOfCells=\"{}\">",
        m.vertices.len(),
        m.len()
    );
    out.push_str(&points(m.vertices.iter()));
    let conn = m.triangles.iter().flatten().map(|&v| i64::from(v));
    out.push_str(&cells(conn, 3, m.len(), VTK_TRIANGLE));
    out.push_str(&group(
        "CellData",
        " Scalars=\"cp\" Vectors=\"velocity\" Normals=\"normal\"",
        &surface_arrays(s),
        false,
    ));
    out.push_str(&footer("UnstructuredGrid"));
    w.write_all(out.as_bytes())?;
    Ok(())
}

/// The cell arrays of `surface.vtu`.
fn surface_arrays(s: &SurfaceResult<'_>) -> Vec<Array> {
    let panels = &s.mesh.panels;
    vec![
        Array::f64s("cp", s.cp.iter().copied()),
        Array::vec3s("velocity", s.velocity.iter().map(vcoords)),
        // NaN where separated (SurfaceResult::theta_at).
        Array::f64s("theta", (0..s.len()).map(|i| s.theta_at(i))),
        Array::f64s("shape_factor", (0..s.len()).map(|i| s.shape_factor_at(i))),
        Array::f64s("cf", s.cf.iter().copied()),
        Array::i32s("state", s.state.iter().map(|st| st.code())),
        Array::f64s("risk", s.risk.iter().copied()),
        Array::vec3s("normal", panels.iter().map(|p| vcoords(&p.normal))),
        Array::f64s("area", panels.iter().map(|p| p.area)),
    ]
}

/// `<Points>` from an iterator of points.
fn points<'p>(pts: impl Iterator<Item = &'p Point3<f64>>) -> String {
    group(
        "Points",
        "",
        &[Array::vec3s("points", pts.map(coords))],
        false,
    )
}

/// `<Cells>` for `n` cells of `per_cell` points each, all of one type.
fn cells(conn: impl Iterator<Item = i64>, per_cell: i64, n: usize, vtk_type: u8) -> String {
    let arrays = [
        Array::i64s("connectivity", conn),
        Array::i64s("offsets", (1..=n as i64).map(|k| k * per_cell)),
        Array::u8s("types", std::iter::repeat_n(vtk_type, n)),
    ];
    group("Cells", "", &arrays, false)
}

/// Write `streamlines.vtp`: polylines with their point scalars.
///
/// # Errors
/// [`OutputError::StreamlineScalars`] when a scalar does not have one value
/// per point; [`OutputError::Write`] when writing fails.
pub fn write_streamlines<W: Write>(w: &mut W, s: &Streamlines<'_>) -> Result<(), OutputError> {
    check_streamline_scalars(s)?;
    let n_points: usize = s.lines.iter().map(Vec::len).sum();
    let mut out = header("PolyData", "");
    let _ = writeln!(
        out,
        "<Piece NumberOfPoints=\"{n_points}\" NumberOfVerts=\"0\" NumberOfLines=\"{}\" \
         NumberOfStrips=\"0\" NumberOfPolys=\"0\">",
        s.lines.len()
    );
    out.push_str(&points(s.lines.iter().flatten()));
    let offsets = s.lines.iter().scan(0i64, |acc, l| {
        *acc += l.len() as i64;
        Some(*acc)
    });
    let lines = [
        Array::i64s("connectivity", 0..n_points as i64),
        Array::i64s("offsets", offsets),
    ];
    out.push_str(&group("Lines", "", &lines, false));
    let scalars: Vec<Array> = s
        .scalars
        .iter()
        .map(|sc| Array::f64s(sc.name, sc.values.iter().flatten().copied()))
        .collect();
    out.push_str(&group("PointData", "", &scalars, false));
    out.push_str(&footer("PolyData"));
    w.write_all(out.as_bytes())?;
    Ok(())
}

/// Every scalar must have one value per point on every line.
fn check_streamline_scalars(s: &Streamlines<'_>) -> Result<(), OutputError> {
    for sc in s.scalars {
        for (line, pts) in s.lines.iter().enumerate() {
            let found = sc.values.get(line).map_or(0, Vec::len);
            if found != pts.len() {
                return Err(OutputError::StreamlineScalars {
                    line,
                    name: sc.name.to_owned(),
                    expected: pts.len(),
                    found,
                });
            }
        }
    }
    Ok(())
}

/// Write `wake.vtu`: the wake quads with their doublet strength.
///
/// # Errors
/// [`OutputError::LengthMismatch`] when `strength` does not have one value
/// per quad; [`OutputError::Write`] when writing fails.
pub fn write_wake<W: Write>(w: &mut W, wake: &WakeSheets<'_>) -> Result<(), OutputError> {
    let n = wake.quads.len();
    super::check_lengths(&[("wake strength", wake.strength.len())], n)?;
    let mut out = header("UnstructuredGrid", "");
    let _ = writeln!(
        out,
        "<Piece NumberOfPoints=\"{}\" NumberOfCells=\"{n}\">",
        4 * n
    );
    out.push_str(&points(wake.quads.iter().flatten()));
    out.push_str(&cells(0..4 * n as i64, 4, n, VTK_QUAD));
    let strength = [Array::f64s("strength", wake.strength.iter().copied())];
    out.push_str(&group(
        "CellData",
        " Scalars=\"strength\"",
        &strength,
        false,
    ));
    out.push_str(&footer("UnstructuredGrid"));
    w.write_all(out.as_bytes())?;
    Ok(())
}

/// Write a slice as `.vti` image data.
///
/// # Errors
/// [`OutputError::EmptySlice`] or [`OutputError::LengthMismatch`] for a
/// malformed grid; [`OutputError::Write`] when writing fails.
pub fn write_slice<W: Write>(w: &mut W, s: &Slice) -> Result<(), OutputError> {
    s.validate()?;
    let (u, v) = s.axes;
    let normal = u.cross(&v);
    let extent = format!("0 {} 0 {} 0 0", s.dims.0 - 1, s.dims.1 - 1);
    // Direction: row-major 3x3 matrix whose columns are the i, j, k axes.
    let dir = [u.x, v.x, normal.x, u.y, v.y, normal.y, u.z, v.z, normal.z];
    let dir: Vec<String> = dir.iter().map(f64::to_string).collect();
    let o = s.origin;
    let sp = s.spacing;
    let attrs = format!(
        " WholeExtent=\"{extent}\" Origin=\"{} {} {}\" Spacing=\"{sp} {sp} {sp}\" Direction=\"{}\"",
        o.x,
        o.y,
        o.z,
        dir.join(" ")
    );
    let mut out = header("ImageData", &attrs);
    let _ = writeln!(out, "<Piece Extent=\"{extent}\">");
    let nan3 = [f64::NAN; 3];
    let arrays = [
        Array::vec3s(
            "velocity",
            s.velocity.iter().map(|v| v.as_ref().map_or(nan3, vcoords)),
        ),
        Array::f64s("cp", s.cp.iter().map(|c| c.unwrap_or(f64::NAN))),
        Array::u8s("in_body", s.velocity.iter().map(|v| u8::from(v.is_none()))),
        // Samples within a panel size of the surface, where a panel's edge
        // makes the velocity singular: the pictures leave them out of the
        // colour range (and paint those outside it from their neighbours).
        Array::u8s(
            "near_surface",
            (0..s.velocity.len())
                .map(|k| u8::from(s.near_surface.get(k).copied().unwrap_or(false))),
        ),
        // Samples in the dead water behind separated surface, where the
        // flow is the stream the loop lets through, not the dead water's.
        Array::u8s(
            "dead_water",
            (0..s.velocity.len()).map(|k| u8::from(s.dead_water.get(k).copied().unwrap_or(false))),
        ),
    ];
    out.push_str(&group(
        "PointData",
        " Scalars=\"cp\" Vectors=\"velocity\"",
        &arrays,
        false,
    ));
    out.push_str("<CellData>\n</CellData>\n");
    out.push_str(&footer("ImageData"));
    w.write_all(out.as_bytes())?;
    Ok(())
}

#[cfg(test)]
mod tests {
    //! Every file is read back by VTK's own XML readers (the Python `vtk`
    //! package, `pip install vtk`), an implementation independent of ours.
    //! The tests fail, rather than skip, when `python3` or `vtk` is missing.
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use std::path::Path;
    use std::process::Command;

    use super::*;
    use crate::output::fixture::{Fixture, sphere_cp};
    use crate::output::{PointScalars, write_file};

    /// Run a Python script with VTK's readers on `path`; its stdout as
    /// lines of whitespace-separated numbers.
    fn vtk_read(script: &str, path: &Path) -> Vec<Vec<f64>> {
        let prelude = "import sys, math\nfrom vtkmodules import vtkIOXML\n";
        let out = Command::new("python3")
            .arg("-c")
            .arg(format!("{prelude}{script}"))
            .arg(path)
            .output()
            .expect("python3 is needed to read VTK files back (pip install vtk)");
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert!(out.status.success(), "the VTK reader failed: {stderr}");
        assert!(!stderr.contains("ERROR"), "VTK reported: {stderr}");
        String::from_utf8(out.stdout)
            .unwrap()
            .lines()
            .map(|l| l.split_whitespace().map(|x| x.parse().unwrap()).collect())
            .collect()
    }

    #[test]
    fn surface_vtu_reads_back_in_vtk() {
        let f = Fixture::sphere(2);
        let s = f.surface();
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("surface.vtu");
        write_file(&path, |w| write_surface(w, &s)).unwrap();
        let script = r"
r = vtkIOXML.vtkXMLUnstructuredGridReader(); r.SetFileName(sys.argv[1]); r.Update()
g = r.GetOutput(); cd = g.GetCellData(); fd = g.GetFieldData()
print(g.GetNumberOfCells(), g.GetNumberOfPoints(), fd.GetArray('state_code_separated').GetValue(0))
for c in range(g.GetNumberOfCells()):
    ids = g.GetCell(c).GetPointIds()
    pts = [g.GetPoint(ids.GetId(k)) for k in range(ids.GetNumberOfIds())]
    cen = [sum(p[a] for p in pts) / 3 for a in range(3)]
    v = cd.GetArray('velocity').GetTuple3(c)
    print(g.GetCellType(c), *cen, cd.GetArray('cp').GetValue(c), cd.GetArray('state').GetValue(c), v[1], cd.GetArray('risk').GetValue(c),
          cd.GetArray('theta').GetValue(c), cd.GetArray('shape_factor').GetValue(c))
";
        let rows = vtk_read(script, &path);
        assert_eq!(
            rows[0],
            vec![s.len() as f64, f.mesh.vertices.len() as f64, 2.0]
        );
        for (c, r) in rows[1..].iter().enumerate() {
            assert_eq!(r[0], 5.0, "cell {c} is a VTK triangle");
            // Lamb's sphere Cp at the centroid VTK computes from the points
            // it read: checks points, connectivity and the cp array together.
            // Tolerance: round-off of the centroid sum.
            let centroid = tuft_mesh::Point::new(r[1], r[2], r[3]);
            assert!((r[4] - sphere_cp(&centroid)).abs() < 1e-12, "cell {c}");
            assert_eq!(r[5], f64::from(s.state[c].code()));
            assert_eq!(r[6], s.velocity[c].y);
            assert_eq!(r[7], s.risk[c]);
            // Theta and H are NaN where the panel is separated, the
            // march's values elsewhere.
            if s.state[c] == PanelState::Separated {
                assert!(r[8].is_nan() && r[9].is_nan(), "cell {c}: {r:?}");
            } else {
                assert_eq!((r[8], r[9]), (s.theta[c], s.shape_factor[c]), "cell {c}");
            }
        }
    }

    #[test]
    fn streamlines_vtp_reads_back_in_vtk() {
        let lines = vec![
            (0..5)
                .map(|k| Point3::new(k as f64, 0.5, 0.0))
                .collect::<Vec<_>>(),
            (0..3).map(|k| Point3::new(0.0, k as f64, 1.0)).collect(),
        ];
        let speed = vec![vec![1.0, 1.1, 1.2, 1.3, 1.4], vec![0.5, 0.6, 0.7]];
        let scalars = [PointScalars {
            name: "speed_ratio",
            values: &speed,
        }];
        let s = Streamlines {
            lines: &lines,
            scalars: &scalars,
        };
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("streamlines.vtp");
        write_file(&path, |w| write_streamlines(w, &s)).unwrap();
        let script = r"
r = vtkIOXML.vtkXMLPolyDataReader(); r.SetFileName(sys.argv[1]); r.Update()
g = r.GetOutput()
print(g.GetNumberOfLines(), g.GetNumberOfPoints())
for c in range(g.GetNumberOfCells()):
    ids = g.GetCell(c).GetPointIds()
    last = ids.GetId(ids.GetNumberOfIds() - 1)
    print(ids.GetNumberOfIds(), *g.GetPoint(last), g.GetPointData().GetArray('speed_ratio').GetValue(last))
";
        let rows = vtk_read(script, &path);
        assert_eq!(rows[0], vec![2.0, 8.0]);
        assert_eq!(rows[1], vec![5.0, 4.0, 0.5, 0.0, 1.4]);
        assert_eq!(rows[2], vec![3.0, 0.0, 2.0, 1.0, 0.7]);
    }

    #[test]
    fn wake_vtu_reads_back_in_vtk() {
        let quads: Vec<[Point3<f64>; 4]> = (0..3)
            .map(|k| {
                let x = k as f64;
                [
                    Point3::new(x, 0.0, 0.0),
                    Point3::new(x + 1.0, 0.0, 0.0),
                    Point3::new(x + 1.0, 1.0, 0.0),
                    Point3::new(x, 1.0, 0.0),
                ]
            })
            .collect();
        let strength = [0.25, -0.5, 1.0];
        let wake = WakeSheets {
            quads: &quads,
            strength: &strength,
        };
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("wake.vtu");
        write_file(&path, |w| write_wake(w, &wake)).unwrap();
        let script = r"
r = vtkIOXML.vtkXMLUnstructuredGridReader(); r.SetFileName(sys.argv[1]); r.Update()
g = r.GetOutput()
for c in range(g.GetNumberOfCells()):
    print(g.GetCellType(c), g.GetCell(c).GetNumberOfPoints(), g.GetCellData().GetArray('strength').GetValue(c))
";
        let rows = vtk_read(script, &path);
        assert_eq!(rows.len(), 3);
        for (r, s) in rows.iter().zip(strength) {
            assert_eq!(r[..2], [9.0, 4.0], "a VTK quad");
            assert_eq!(r[2], s);
        }
    }

    #[test]
    fn slice_vti_reads_back_in_vtk_with_nan_inside() {
        // A 4 x 3 grid on the centre plane y = 0, axes x and z.
        let dims = (4, 3);
        let n = dims.0 * dims.1;
        let mut slice = Slice {
            name: "centre-plane".to_owned(),
            title: "centre plane".to_owned(),
            origin: Point3::new(-1.0, 0.0, 0.25),
            axes: (Vector3::x(), Vector3::z()),
            spacing: 0.5,
            dims,
            velocity: (0..n)
                .map(|k| Some(Vector3::new(k as f64, 0.0, -1.0)))
                .collect(),
            cp: (0..n).map(|k| Some(0.1 * k as f64)).collect(),
            near_surface: vec![],
            dead_water: vec![],
            note: String::new(),
            resolution: String::new(),
        };
        slice.velocity[5] = None;
        slice.cp[5] = None;
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("centre-plane.vti");
        write_file(&path, |w| write_slice(w, &slice)).unwrap();
        let script = r"
r = vtkIOXML.vtkXMLImageDataReader(); r.SetFileName(sys.argv[1]); r.Update()
g = r.GetOutput(); pd = g.GetPointData()
print(*g.GetDimensions())
for k in range(g.GetNumberOfPoints()):
    cp = pd.GetArray('cp').GetValue(k)
    print(*g.GetPoint(k), 1 if math.isnan(cp) else 0, 0 if math.isnan(cp) else cp, pd.GetArray('velocity').GetTuple3(k)[0] if not math.isnan(cp) else 0, pd.GetArray('in_body').GetValue(k))
";
        let rows = vtk_read(script, &path);
        assert_eq!(rows[0], vec![4.0, 3.0, 1.0]);
        for (k, r) in rows[1..].iter().enumerate() {
            let p = slice.point(k % dims.0, k / dims.0);
            // VTK places the point through Origin, Spacing and Direction.
            assert!(
                (Vector3::new(r[0], r[1], r[2]) - p.coords).norm() < 1e-12,
                "sample {k}"
            );
            let inside = k == 5;
            assert_eq!(
                r[3],
                f64::from(u8::from(inside)),
                "NaN exactly inside the body"
            );
            assert_eq!(r[6], f64::from(u8::from(inside)));
            if !inside {
                assert!((r[4] - 0.1 * k as f64).abs() < 1e-15);
                assert_eq!(r[5], k as f64);
            }
        }
    }
}
