//! Assembly of the Dirichlet influence system, mirror images folded in.
//!
//! Katz & Plotkin (2001), eqs. 12.14-12.16 with constant-strength panels:
//! at each collocation point (panel centroid, just inside the body)
//!
//! ```text
//! sum_j C_ij mu_j = - sum_j B_ij sigma_j,   C_ij = -D_ij / (4 pi),  C_ii = +1/2,
//!                                           B_ij =  S_ij / (4 pi),  sigma_j = n_j . V_inf
//! ```
//!
//! Every mirror image of panel `j` carries the same `mu_j` and `sigma_j`
//! (valid for a free stream parallel to every mirror plane), so its
//! influence is added to column `j`. Rows are computed in parallel (rayon);
//! the source matrix `B` is never stored: the right-hand side is
//! accumulated on the fly, once per Cartesian component of `V_inf`, so any
//! free stream (yaw angle) gets its right-hand side as a combination of
//! three stored vectors.

use faer::{Mat, MatMut, MatRef};
use nalgebra::Vector3;
use rayon::prelude::*;
use tuft_mesh::{Panel, PanelMesh, Point};

use crate::SolverError;
use crate::influence::{self, Influence, triangle};
use crate::potential::PotentialParams;

/// Influence of a panel on its own centroid, from the inside of the body:
/// the exact source integral and the doublet limit `-1/2` (Katz & Plotkin
/// 2001, eq. 10.8: the jump of a doublet sheet is `mu`, half on each side).
pub fn self_influence(panel: &Panel) -> Influence {
    let raw = triangle::exact(&panel.centroid, panel);
    Influence {
        source: raw.source / (4.0 * std::f64::consts::PI),
        doublet: -0.5,
    }
}

/// The assembled doublet matrix `C` and the source right-hand sides.
///
/// `C` is stored transposed (column `i` of the storage holds row `i` of
/// `C`) so rows can be filled in parallel in contiguous memory; use
/// [`Self::matrix`] and [`Self::matrix_mut`] for views of `C` itself.
#[derive(Debug, Clone)]
pub struct InfluenceSystem {
    transposed: Mat<f64>,
    rhs_basis: [Vec<f64>; 3],
    /// Far-field ratio the system was assembled with.
    pub far_field_ratio: f64,
}

impl InfluenceSystem {
    /// Number of unknowns (real panels).
    pub fn len(&self) -> usize {
        self.transposed.nrows()
    }

    /// True for an empty system.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The doublet matrix `C` (row `i`: collocation point of panel `i`).
    pub fn matrix(&self) -> MatRef<'_, f64> {
        self.transposed.as_ref().transpose()
    }

    /// Mutable view of `C`, e.g. to fold wake doublets into its columns.
    pub fn matrix_mut(&mut self) -> MatMut<'_, f64> {
        self.transposed.as_mut().transpose_mut()
    }

    /// Add `values[i]` to `C[i][col]` for every row `i` (a wake panel whose
    /// strength is `+-mu_col` adds its doublet influence here).
    ///
    /// # Panics
    /// If `values.len() != self.len()` or `col >= self.len()`.
    #[track_caller]
    pub fn add_to_column(&mut self, col: usize, values: &[f64]) {
        assert_eq!(values.len(), self.len(), "one value per row");
        let mut c = self.matrix_mut();
        for (i, v) in values.iter().enumerate() {
            c[(i, col)] += v;
        }
    }

    /// Right-hand side per unit free-stream component: `rhs_basis()[k][i]
    /// = -sum_j B_ij n_jk`, images included.
    pub fn rhs_basis(&self) -> &[Vec<f64>; 3] {
        &self.rhs_basis
    }

    /// Right-hand side `-B sigma` for a free stream `v_inf` (parallel to
    /// every mirror plane, which the caller checks).
    pub fn rhs(&self, v_inf: &Vector3<f64>) -> Vec<f64> {
        let [x, y, z] = &self.rhs_basis;
        (0..self.len())
            .map(|i| v_inf.x * x[i] + v_inf.y * y[i] + v_inf.z * z[i])
            .collect()
    }

    /// The transposed storage `C^T` (column-major), for the solvers.
    pub fn transposed(&self) -> MatRef<'_, f64> {
        self.transposed.as_ref()
    }

    /// Give up the system, keeping only `C^T` (for an in-place LU).
    pub fn into_transposed(self) -> Mat<f64> {
        self.transposed
    }
}

/// Every panel's images, one list per reflection of `mesh.mirrors`.
fn mesh_images(mesh: &PanelMesh) -> Vec<Vec<Panel>> {
    influence::image_panels(&mesh.panels, &mesh.mirrors.images())
}

/// Check that every panel is finite before assembling.
fn check_mesh(mesh: &PanelMesh) -> Result<(), SolverError> {
    if mesh.is_empty() {
        return Err(SolverError::EmptyMesh);
    }
    let bad = mesh.panels.iter().position(|p| {
        !(p.vertices
            .iter()
            .all(|v| v.coords.iter().all(|c| c.is_finite()))
            && p.area.is_finite())
    });
    match bad {
        Some(panel) => Err(SolverError::NonFinite { panel }),
        None => Ok(()),
    }
}

/// Assemble `C` and the right-hand-side basis for `mesh` and its images,
/// with the far-field ratio of `params`.
///
/// # Errors
/// [`SolverError::EmptyMesh`], [`SolverError::NonFinite`] for a panel with
/// a non-finite coordinate, [`SolverError::BadParameter`] for a far-field
/// ratio that is not positive.
pub fn assemble(
    mesh: &PanelMesh,
    params: &PotentialParams,
) -> Result<InfluenceSystem, SolverError> {
    check_mesh(mesh)?;
    let far_field_ratio = params.far_field_ratio;
    if far_field_ratio.is_nan() || far_field_ratio <= 0.0 {
        return Err(SolverError::BadParameter {
            name: "far_field_ratio",
            value: far_field_ratio,
        });
    }
    let n = mesh.len();
    let images = mesh_images(mesh);
    let layers = Layers {
        real: (&mesh.panels, compact(&mesh.panels, far_field_ratio)),
        images: images
            .iter()
            .map(|img| (img.as_slice(), compact(img, far_field_ratio)))
            .collect(),
    };
    let mut transposed = Mat::<f64>::zeros(n, n);
    let rhs: Vec<[f64; 3]> = transposed
        .as_mut()
        .par_col_iter_mut()
        .enumerate()
        .map(|(i, col)| {
            let row = col.try_as_col_major_mut().map(|c| c.as_slice_mut());
            match row {
                Some(row) => fill_row(i, &layers, row),
                None => unreachable!("owned faer columns are contiguous"),
            }
        })
        .collect();
    let rhs_basis = std::array::from_fn(|k| rhs.iter().map(|r| r[k]).collect());
    Ok(InfluenceSystem {
        transposed,
        rhs_basis,
        far_field_ratio,
    })
}

/// What the far-field test and the point-singularity kernel need of a
/// panel, packed (64 bytes) so a row streams through memory quickly.
#[derive(Debug, Clone, Copy)]
struct Compact {
    centroid: [f64; 3],
    normal: [f64; 3],
    area: f64,
    limit2: f64,
}

fn compact(panels: &[Panel], ratio: f64) -> Vec<Compact> {
    panels
        .iter()
        .map(|p| Compact {
            centroid: p.centroid.coords.into(),
            normal: p.normal.into_inner().into(),
            area: p.area,
            limit2: (ratio * p.size).powi(2),
        })
        .collect()
}

/// Raw `(S, D)` of one panel at `p`: the same switch and the same far
/// field as [`influence::triangle_influence`] (before the `1/(4 pi)`).
#[inline]
fn raw(p: &[f64; 3], q: &Compact, panel: &Panel) -> (f64, f64) {
    let d = [
        p[0] - q.centroid[0],
        p[1] - q.centroid[1],
        p[2] - q.centroid[2],
    ];
    let r2 = d[0] * d[0] + d[1] * d[1] + d[2] * d[2];
    if r2 > q.limit2 {
        let inv = 1.0 / r2.sqrt();
        let dn = d[0] * q.normal[0] + d[1] * q.normal[1] + d[2] * q.normal[2];
        (q.area * inv, q.area * dn * inv * inv * inv)
    } else {
        let e = triangle::exact(&Point::from(*p), panel);
        (e.source, e.doublet)
    }
}

/// The real panels and each image set, with their packed copies.
struct Layers<'a> {
    real: (&'a [Panel], Vec<Compact>),
    images: Vec<(&'a [Panel], Vec<Compact>)>,
}

/// Row `i` of `C` into `row`; returns row `i` of `-B n_k` for `k = x, y, z`.
fn fill_row(i: usize, layers: &Layers<'_>, row: &mut [f64]) -> [f64; 3] {
    let (panels, packed) = (&layers.real.0, &layers.real.1);
    let p: [f64; 3] = panels[i].centroid.coords.into();
    let k = 1.0 / (4.0 * std::f64::consts::PI);
    let mut rhs = [0.0; 3];
    for (j, (panel, q)) in panels.iter().zip(packed).enumerate() {
        let (mut s, mut d) = if j == i {
            let own = self_influence(panel);
            (own.source / k, own.doublet / k)
        } else {
            raw(&p, q, panel)
        };
        for (img, img_packed) in &layers.images {
            let (si, di) = raw(&p, &img_packed[j], &img[j]);
            s += si;
            d += di;
        }
        row[j] = -d * k;
        for (r, nk) in rhs.iter_mut().zip(&q.normal) {
            *r -= s * k * nk;
        }
    }
    rhs
}

/// Contribution to `C` of an extra panel (e.g. a wake panel) of unit
/// doublet strength, images included, at every collocation point:
/// `out[i] = -(D(P_i) summed over the panel and its images) / (4 pi)`.
/// Add it with [`InfluenceSystem::add_to_column`].
pub fn doublet_column(mesh: &PanelMesh, panel: &Panel, far_field_ratio: f64) -> Vec<f64> {
    let reflections = mesh.mirrors.images();
    let imgs: Vec<Panel> = reflections
        .iter()
        .filter_map(|r| influence::image_panel(panel, r))
        .collect();
    let refs: Vec<&Panel> = imgs.iter().collect();
    mesh.panels
        .par_iter()
        .map(|q| {
            -influence::influence_with_images(&q.centroid, panel, &refs, far_field_ratio).doublet
        })
        .collect()
}

/// Potential at an arbitrary point from given strengths, images included:
/// `phi(P) = sum_j [sigma_j source_j(P) - mu_j doublet_j(P)]` (Katz &
/// Plotkin 2001, eq. 10.8). Exact at points off the surface.
///
/// # Panics
/// If `sigma` or `mu` is not one value per panel.
#[track_caller]
pub fn potential_at(
    mesh: &PanelMesh,
    p: &Point,
    sigma: &[f64],
    mu: &[f64],
    far_field_ratio: f64,
) -> f64 {
    assert!(
        sigma.len() == mesh.len() && mu.len() == mesh.len(),
        "one strength per panel"
    );
    let images = mesh_images(mesh);
    let mut phi = 0.0;
    for (j, panel) in mesh.panels.iter().enumerate() {
        let mut inf = influence::triangle_influence(p, panel, far_field_ratio);
        for img in &images {
            inf += influence::triangle_influence(p, &img[j], far_field_ratio);
        }
        phi += sigma[j] * inf.source - mu[j] * inf.doublet;
    }
    phi
}
