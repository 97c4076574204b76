//! Tangential surface gradient of a panel-centred field (the doublet
//! strength `mu`), by weighted least squares over neighbouring centroids.
//!
//! Second-order reconstruction: a quadratic
//! `f - f_i = a u + b v + c u^2 + d uv + e v^2` fitted over the vertex
//! neighbourhood of panel `i`, with `(u, v)` the centroid offsets projected
//! on the plane normal to the area-weighted vertex-interpolated normal at
//! the centroid; weights `1/r^2`. This is the quadratic least-squares
//! gradient of finite-volume practice (Barth & Jespersen 1989; Blazek,
//! *Computational Fluid Dynamics*, 3rd ed., 2015, ch. 5 (from memory)) on a curved
//! surface. On a poor stencil (fewer than six neighbours or a
//! near-singular fit) it falls back to the linear fit `a u + b v` over the
//! same neighbours (first order).
//!
//! The gradient lies in the tangent plane of the smooth normal of
//! [`surface_normals`], not in the flat panel's plane: that keeps the
//! reconstruction second order on curved surfaces.
//!
//! Mirror planes: a panel with a corner on a mirror plane also uses the
//! mirror images of the panels around that corner (the field is mirror-
//! symmetric: images carry the same value), so the stencil is complete
//! there instead of one-sided.

use nalgebra::{DMatrix, DVector, Vector3};
use rayon::prelude::*;
use tuft_mesh::{PanelMesh, Point, Reflection};

/// Settings of the gradient reconstruction.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GradientParams {
    /// Smallest acceptable ratio of the extreme singular values of the
    /// scaled quadratic fit; below it the linear fit is used.
    pub min_singular_ratio: f64,
    /// Use the quadratic fit at all (false: linear everywhere).
    pub quadratic: bool,
}

impl Default for GradientParams {
    fn default() -> Self {
        Self {
            min_singular_ratio: 1e-3,
            quadratic: true,
        }
    }
}

/// Tangential gradient of `f` (one value per panel) at each panel
/// centroid, in the plane normal to [`surface_normals`], with default
/// settings.
///
/// # Panics
/// If `f` is not one value per panel.
#[track_caller]
pub fn surface_gradient(mesh: &PanelMesh, f: &[f64]) -> Vec<Vector3<f64>> {
    surface_gradient_with_params(mesh, f, &GradientParams::default())
}

/// [`surface_gradient`] with explicit settings.
///
/// # Panics
/// If `f` is not one value per panel.
#[track_caller]
pub fn surface_gradient_with_params(
    mesh: &PanelMesh,
    f: &[f64],
    params: &GradientParams,
) -> Vec<Vector3<f64>> {
    assert_eq!(f.len(), mesh.len(), "one value per panel");
    let normals = surface_normals(mesh);
    let points: Vec<Point> = mesh.panels.iter().map(|p| p.centroid).collect();
    let reflections = mesh.mirrors.images();
    (0..mesh.len())
        .into_par_iter()
        .map(|i| {
            let stencil = stencil(mesh, i, &points, &reflections);
            fit(mesh, i, f, &stencil, &points[i], &normals[i], params)
        })
        .collect()
}

/// Largest angle between a panel's normal and a neighbour's for the
/// neighbour to count in the panel's smooth normal (degrees): across a
/// sharper crease each side keeps its own normal.
pub const CREASE_ANGLE_DEG: f64 = 30.0;

/// Estimate of the smooth surface normal at each panel centroid: the mean
/// of the panel's three vertex normals, each the area-weighted mean of the
/// normals of the panels around that vertex that lie within
/// [`CREASE_ANGLE_DEG`] of the panel's own normal. On a smooth surface it
/// is within `O(h^2)` of the true normal where the flat panel's normal is
/// only within `O(h)` (Max, J. Graphics Tools 4, 1999, compares such vertex-normal weightings (from memory)).
pub fn surface_normals(mesh: &PanelMesh) -> Vec<Vector3<f64>> {
    corner_normals(mesh)
        .into_iter()
        .zip(&mesh.panels)
        .map(|(c, p)| {
            let own = p.normal.into_inner();
            (c[0] + c[1] + c[2]).try_normalize(1e-12).unwrap_or(own)
        })
        .collect()
}

/// Crease-aware vertex normals at the three corners of every panel. A
/// corner on a mirror plane also counts the mirror images of the panels
/// around it (the image body continues the surface there).
fn corner_normals(mesh: &PanelMesh) -> Vec<[Vector3<f64>; 3]> {
    let reflections = mesh.mirrors.images();
    (0..mesh.len())
        .into_par_iter()
        .map(|i| {
            let own = mesh.panels[i].normal.into_inner();
            let tol = 1e-6 * mesh.panels[i].size;
            mesh.triangles[i].map(|v| {
                let at = mesh.vertices[v as usize];
                let mut s = fan_normal(mesh, v, &own, None);
                for r in reflections
                    .iter()
                    .filter(|r| (r.point(&at) - at).norm() <= tol)
                {
                    s += fan_normal(mesh, v, &own, Some(r));
                }
                s.try_normalize(1e-300).unwrap_or(own)
            })
        })
        .collect()
}

/// Area-weighted sum of the normals of the panels around vertex `v` (or of
/// their images in `reflection`) within the crease angle of `own`.
fn fan_normal(
    mesh: &PanelMesh,
    v: u32,
    own: &Vector3<f64>,
    reflection: Option<&Reflection>,
) -> Vector3<f64> {
    let cos_crease = CREASE_ANGLE_DEG.to_radians().cos();
    mesh.vertex_panels[v as usize]
        .iter()
        .map(|&j| &mesh.panels[j as usize])
        .map(|p| {
            let n = p.normal.into_inner();
            (reflection.map_or(n, |r| r.vector(&n)), p.area)
        })
        .filter(|(n, _)| n.dot(own) >= cos_crease)
        .map(|(n, a)| n * a)
        .sum()
}

/// One stencil member: a centroid and the panel whose value it carries.
#[derive(Debug, Clone, Copy)]
struct Member {
    at: Point,
    panel: usize,
}

/// Vertex neighbourhood of panel `i`, plus mirror images of the panels
/// around any corner of `i` that lies on a mirror plane.
fn stencil(
    mesh: &PanelMesh,
    i: usize,
    points: &[Point],
    reflections: &[Reflection],
) -> Vec<Member> {
    let mut out: Vec<Member> = mesh
        .vertex_neighbourhood(i)
        .into_iter()
        .map(|j| Member {
            at: points[j as usize],
            panel: j as usize,
        })
        .collect();
    let tol = 1e-6 * mesh.panels[i].size;
    for r in reflections {
        let on_plane = mesh.triangles[i].iter().filter(|&&v| {
            (r.point(&mesh.vertices[v as usize]) - mesh.vertices[v as usize]).norm() <= tol
        });
        let mut around: Vec<u32> = on_plane
            .flat_map(|&v| mesh.vertex_panels[v as usize].iter().copied())
            .collect();
        around.sort_unstable();
        around.dedup();
        out.extend(around.into_iter().map(|j| Member {
            at: r.point(&points[j as usize]),
            panel: j as usize,
        }));
    }
    out
}

/// Weighted least-squares gradient at panel `i` in the plane normal to
/// `normal`, as a 3-D vector.
fn fit(
    mesh: &PanelMesh,
    i: usize,
    f: &[f64],
    stencil: &[Member],
    c: &Point,
    normal: &Vector3<f64>,
    params: &GradientParams,
) -> Vector3<f64> {
    let c = *c;
    let e1 = mesh.panels[i].l.into_inner();
    let e1 = (e1 - normal * e1.dot(normal))
        .try_normalize(1e-12)
        .unwrap_or(e1);
    let e2 = normal.cross(&e1);
    let h = stencil
        .iter()
        .map(|m| (m.at - c).norm())
        .fold(0.0, f64::max)
        .max(f64::MIN_POSITIVE);
    let rows: Vec<(f64, f64, f64, f64)> = stencil
        .iter()
        .map(|m| {
            let d = m.at - c;
            let w = h / d.norm().max(1e-12 * h);
            (d.dot(&e1) / h, d.dot(&e2) / h, f[m.panel] - f[i], w)
        })
        .collect();
    let quad = params.quadratic && rows.len() >= 6;
    let ab = quad
        .then(|| least_squares(&rows, 5, params.min_singular_ratio))
        .flatten()
        .or_else(|| least_squares(&rows, 2, 1e-9));
    match ab {
        Some((a, b)) => (e1 * a + e2 * b) / h,
        None => Vector3::zeros(),
    }
}

/// Weighted fit of `df` on the first `k` monomials `u, v, u^2, uv, v^2`
/// (coordinates already scaled to order one); returns the linear
/// coefficients, or `None` when the fit is too close to singular.
fn least_squares(rows: &[(f64, f64, f64, f64)], k: usize, min_ratio: f64) -> Option<(f64, f64)> {
    if rows.len() < k {
        return None;
    }
    let a = DMatrix::from_fn(rows.len(), k, |r, col| {
        let (u, v, _, w) = rows[r];
        w * [u, v, u * u, u * v, v * v][col]
    });
    let b = DVector::from_iterator(rows.len(), rows.iter().map(|&(_, _, df, w)| w * df));
    let svd = a.svd(true, true);
    let s = &svd.singular_values;
    let (smax, smin) = (s.max(), s.min());
    if smin.is_nan() || smin <= min_ratio * smax {
        return None;
    }
    let x = svd.solve(&b, 0.0).ok()?;
    Some((x[0], x[1]))
}
