//! Shared helpers for the validation suite and the end-to-end tests.

use tuft_mesh::generate::latlong_sphere;
use tuft_mesh::generate::{AhmedParams, ahmed_with_params};
use tuft_mesh::{MeshError, Mirrors, PanelMesh, Point, TriMesh};

/// Mirrors of a half model standing on the ground: the ground plane z = 0
/// and the symmetry plane y = 0.
pub fn ground_and_symmetry() -> Mirrors {
    Mirrors {
        ground: Some(0.0),
        symmetry: true,
    }
}

/// Panels of the half model `half` (the y >= 0 side) on the ground plane
/// z = 0, mirrored in both planes.
///
/// # Errors
/// The mesh errors of [`PanelMesh::new`].
pub fn on_ground_half(half: TriMesh) -> Result<PanelMesh, MeshError> {
    PanelMesh::new(half, ground_and_symmetry())
}

/// The Ahmed-type slant-back body (Ahmed, Ramm & Faltin 1984, dimensions
/// from memory) as a half model on the ground, with `panels` triangles on
/// the full body (the half model holds about half of them).
///
/// # Errors
/// The generator's and [`PanelMesh::new`]'s errors.
pub fn half_ahmed(slant_deg: f64, panels: usize) -> Result<PanelMesh, MeshError> {
    on_ground_half(ahmed_with_params(&AhmedParams {
        slant_deg,
        panels,
        half: true,
        ..AhmedParams::default()
    })?)
}

/// The part of a unit lat-long sphere (poles on x, meridians every
/// 360/`n_lon` degrees, `n_lon` divisible by 4) with y >= 0, cut on
/// meridians, its plane vertices set exactly on y = 0 and its centre
/// raised to `centre_z`.
pub fn half_sphere(n_lat: usize, n_lon: usize, centre_z: f64) -> TriMesh {
    let full = latlong_sphere(1.0, n_lat, n_lon);
    let keep: Vec<[u32; 3]> = full
        .triangles
        .iter()
        .copied()
        .filter(|t| t.iter().map(|&v| full.vertices[v as usize].y).sum::<f64>() > 0.0)
        .collect();
    let vertices = full
        .vertices
        .iter()
        .map(|p| {
            Point::new(
                p.x,
                if p.y.abs() < 1e-12 { 0.0 } else { p.y },
                p.z + centre_z,
            )
        })
        .collect();
    TriMesh {
        vertices,
        triangles: keep,
    }
}

/// A car-like half body as a styling scan would give it (our own shape,
/// not a real car), in millimetres, open on y = 0: a flat nose (the
/// sections shrink to 15 % at x = 0 and a flat plate closes them, so its
/// rim is a sharp front edge), a long bonnet rising to a sharp cowl (the
/// profile's corners rounded over about 70 mm) below a 34-degree
/// windscreen, a roof, a 24-degree rear window and a boot deck, on the
/// ground z = 0. `nx` sections along x, `nt` points round each half
/// section (a few hundred thousand facets at 560 x 320, as a scan).
pub fn scan_like_half_car(nx: usize, nt: usize) -> TriMesh {
    scan_like_half_car_with_screen(nx, nt, (480.0_f64 / 700.0).atan().to_degrees())
}

/// [`scan_like_half_car`] with the windscreen at `screen_deg` from the
/// horizontal (34.4 there): the screen keeps its top at the front of the
/// roof and its height of 480 mm, and the bonnet runs on level from
/// x = 1,300 mm to its foot.
pub fn scan_like_half_car_with_screen(nx: usize, nt: usize, screen_deg: f64) -> TriMesh {
    let foot = 2000.0 - 480.0 / screen_deg.to_radians().tan();
    let length = 4500.0;
    let xs: Vec<f64> = (0..nx)
        .map(|i| {
            let u = i as f64 / (nx - 1) as f64;
            length * (0.85 * u + 0.15 * (0.5 - 0.5 * (std::f64::consts::PI * u).cos()))
        })
        .collect();
    let mut top_line = vec![
        (0.0, 520.0),
        (150.0, 700.0),
        (500.0, 790.0),
        (1300.0, 860.0),
    ];
    if foot > 1301.0 {
        top_line.push((foot, 860.0));
    }
    top_line.extend([
        (2000.0, 1340.0),
        (2900.0, 1330.0),
        (3750.0, 950.0),
        (3900.0, 950.0),
        (4500.0, 940.0),
    ]);
    let bottom_line = [
        (0.0, 330.0),
        (200.0, 200.0),
        (700.0, 160.0),
        (3700.0, 160.0),
        (4500.0, 290.0),
    ];
    let width_line = [
        (0.0, 620.0),
        (200.0, 800.0),
        (800.0, 900.0),
        (2500.0, 925.0),
        (4000.0, 900.0),
        (4500.0, 860.0),
    ];
    let top = rounded(&xs, &top_line, 70.0);
    let mut vertices = Vec::with_capacity(nx * nt + 2);
    let thetas = section_angles(nt);
    for (i, &x) in xs.iter().enumerate() {
        let s = if x < 260.0 {
            (1.0 - (1.0 - x / 260.0).powi(2)).max(0.0).sqrt().max(0.15)
        } else {
            1.0
        };
        let bottom = interp(&bottom_line, x);
        let (zc, hz) = (0.5 * (top[i] + bottom), 0.5 * (top[i] - bottom) * s);
        let half_width = interp(&width_line, x) * s;
        for (j, &t) in thetas.iter().enumerate() {
            let z = zc + hz * superellipse(t.sin());
            let belt = ((z - 880.0) / (top[i] - 880.0).max(1.0)).clamp(0.0, 1.0);
            let y = if j == 0 || j == nt - 1 {
                0.0
            } else {
                half_width * superellipse(t.cos()) * (1.0 - 0.28 * belt.powf(1.5))
            };
            vertices.push(Point::new(x, y, z));
        }
    }
    let id = |i: usize, j: usize| (i * nt + j) as u32;
    let mut triangles = Vec::with_capacity(2 * nx * nt);
    for i in 0..nx - 1 {
        for j in 0..nt - 1 {
            let (a, b, c, d) = (id(i, j), id(i + 1, j), id(i + 1, j + 1), id(i, j + 1));
            triangles.push([a, b, d]);
            triangles.push([b, c, d]);
        }
    }
    for (i, outward) in [(0, false), (nx - 1, true)] {
        let ring: Vec<u32> = (0..nt).map(|j| id(i, j)).collect();
        let zc = ring.iter().map(|&v| vertices[v as usize].z).sum::<f64>() / nt as f64;
        let centre = vertices.len() as u32;
        vertices.push(Point::new(xs[i], 0.0, zc));
        for w in ring.windows(2) {
            triangles.push(if outward {
                [centre, w[0], w[1]]
            } else {
                [centre, w[1], w[0]]
            });
        }
    }
    TriMesh {
        vertices,
        triangles,
    }
}

/// `sign(v) |v|^(2/5)`: a superellipse section of exponent 5.
fn superellipse(v: f64) -> f64 {
    v.signum() * v.abs().powf(0.4)
}

/// `nt` angles from -90 to 90 degrees spaced evenly in arc length round
/// the superellipse of a 925 x 590 mm half section.
fn section_angles(nt: usize) -> Vec<f64> {
    let fine = 20_000;
    let angle =
        |k: usize| -std::f64::consts::FRAC_PI_2 + std::f64::consts::PI * k as f64 / fine as f64;
    let point = |t: f64| (925.0 * superellipse(t.cos()), 590.0 * superellipse(t.sin()));
    let mut arc = vec![0.0];
    for k in 1..=fine {
        let (a, b) = (point(angle(k - 1)), point(angle(k)));
        arc.push(arc[k - 1] + (b.0 - a.0).hypot(b.1 - a.1));
    }
    let total = arc[fine];
    (0..nt)
        .map(|j| {
            let want = total * j as f64 / (nt - 1) as f64;
            let k = arc.partition_point(|&a| a < want).clamp(1, fine);
            let f = (want - arc[k - 1]) / (arc[k] - arc[k - 1]).max(1e-300);
            angle(k - 1) + f * (angle(k) - angle(k - 1))
        })
        .collect()
}

/// Piecewise-linear interpolation through `points` (sorted by x), held
/// at the ends.
fn interp(points: &[(f64, f64)], x: f64) -> f64 {
    let k = points
        .partition_point(|p| p.0 < x)
        .clamp(1, points.len() - 1);
    let ((x0, y0), (x1, y1)) = (points[k - 1], points[k]);
    y0 + (y1 - y0) * ((x - x0) / (x1 - x0)).clamp(0.0, 1.0)
}

/// The polyline `points` at `xs`, its corners rounded by a moving average
/// over `width` (in x).
fn rounded(xs: &[f64], points: &[(f64, f64)], width: f64) -> Vec<f64> {
    xs.iter()
        .map(|&x| {
            let n = 8;
            (0..=n)
                .map(|k| interp(points, x + width * (k as f64 / n as f64 - 0.5)))
                .sum::<f64>()
                / (n + 1) as f64
        })
        .collect()
}
