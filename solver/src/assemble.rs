//! Assembly of the Dirichlet influence system, mirror images folded in.
//!
//! Katz & Plotkin (2001), sec. 12.2 (from memory) with constant-strength panels:
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
/// 2001, ch. 10 (from memory): the jump of a doublet sheet is `mu`, half
/// on each side).
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
        rhs_from_basis(&self.rhs_basis, v_inf)
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

/// The right-hand side `-B sigma` for the free stream `v_inf` from a
/// basis `[-B n_x, -B n_y, -B n_z]` (sigma = n . V_inf is linear in it).
pub(crate) fn rhs_from_basis([x, y, z]: &[Vec<f64>; 3], v_inf: &Vector3<f64>) -> Vec<f64> {
    x.iter()
        .zip(y)
        .zip(z)
        .map(|((x, y), z)| v_inf.x * x + v_inf.y * y + v_inf.z * z)
        .collect()
}

/// Every panel's images, one list per reflection of `mesh.mirrors`.
fn mesh_images(mesh: &PanelMesh) -> Vec<Vec<Panel>> {
    influence::image_panels(&mesh.panels, &mesh.mirrors.images())
}

/// Check that every panel is finite before assembling.
pub(crate) fn check_mesh(mesh: &PanelMesh) -> Result<(), SolverError> {
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
        real: (&mesh.panels, pack(&mesh.panels, far_field_ratio)),
        images: images
            .iter()
            .map(|img| (img.as_slice(), pack(img, far_field_ratio)))
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
/// set of panels, as separate arrays so the far-field pass over a row is a
/// branch-free loop the compiler can vectorise.
#[derive(Debug, Clone, Default)]
struct Packed {
    centroid: [Vec<f64>; 3],
    normal: [Vec<f64>; 3],
    area: Vec<f64>,
    limit2: Vec<f64>,
}

fn pack(panels: &[Panel], ratio: f64) -> Packed {
    let col = |f: &dyn Fn(&Panel) -> f64| panels.iter().map(f).collect::<Vec<f64>>();
    Packed {
        centroid: [
            col(&|p| p.centroid.x),
            col(&|p| p.centroid.y),
            col(&|p| p.centroid.z),
        ],
        normal: [
            col(&|p| p.normal.x),
            col(&|p| p.normal.y),
            col(&|p| p.normal.z),
        ],
        area: col(&|p| p.area),
        limit2: col(&|p| (ratio * p.size).powi(2)),
    }
}

/// The real panels and each image set, with their packed copies.
struct Layers<'a> {
    real: (&'a [Panel], Packed),
    images: Vec<(&'a [Panel], Packed)>,
}

/// Add the point-singularity `S` to `s` and `D` to `d` for every panel of
/// `q` farther from `p` than its far-field limit (the same switch and the
/// same formulas as [`influence::triangle_influence`], before `1/(4 pi)`);
/// nearer panels add nothing here.
fn far_pass(p: &[f64; 3], q: &Packed, s: &mut [f64], d: &mut [f64]) {
    let [cx, cy, cz] = &q.centroid;
    let [nx, ny, nz] = &q.normal;
    for j in 0..s.len() {
        let (dx, dy, dz) = (p[0] - cx[j], p[1] - cy[j], p[2] - cz[j]);
        let r2 = dx * dx + dy * dy + dz * dz;
        let far = r2 > q.limit2[j];
        // Selects rather than branches; near panels (r2 possibly 0) give 0.
        let inv = if far { 1.0 / r2.sqrt() } else { 0.0 };
        let a = if far { q.area[j] } else { 0.0 };
        s[j] += a * inv;
        d[j] += a * (dx * nx[j] + dy * ny[j] + dz * nz[j]) * inv * inv * inv;
    }
}

/// Add the exact `S` and `D` of every panel of `q` within its far-field
/// limit of `p`, except panel `skip` (the self term).
fn near_pass(
    p: &[f64; 3],
    panels: &[Panel],
    q: &Packed,
    skip: Option<usize>,
    s: &mut [f64],
    d: &mut [f64],
) {
    let [cx, cy, cz] = &q.centroid;
    let at = Point::new(p[0], p[1], p[2]);
    for j in 0..s.len() {
        let (dx, dy, dz) = (p[0] - cx[j], p[1] - cy[j], p[2] - cz[j]);
        if dx * dx + dy * dy + dz * dz > q.limit2[j] || skip == Some(j) {
            continue;
        }
        let e = triangle::exact(&at, &panels[j]);
        s[j] += e.source;
        d[j] += e.doublet;
    }
}

/// Row `i` of `C` into `row`; returns row `i` of `-B n_k` for `k = x, y, z`.
fn fill_row(i: usize, layers: &Layers<'_>, row: &mut [f64]) -> [f64; 3] {
    let (panels, packed) = (layers.real.0, &layers.real.1);
    let p: [f64; 3] = panels[i].centroid.coords.into();
    let k = 1.0 / (4.0 * std::f64::consts::PI);
    let mut s = vec![0.0; panels.len()];
    let d = row;
    d.fill(0.0);
    let own = self_influence(&panels[i]);
    s[i] = own.source / k;
    d[i] = own.doublet / k;
    far_pass(&p, packed, &mut s, d);
    near_pass(&p, panels, packed, Some(i), &mut s, d);
    for (img, q) in &layers.images {
        far_pass(&p, q, &mut s, d);
        near_pass(&p, img, q, None, &mut s, d);
    }
    let mut rhs = [0.0; 3];
    for j in 0..s.len() {
        d[j] *= -k;
        for (r, n) in rhs.iter_mut().zip(&packed.normal) {
            *r -= s[j] * k * n[j];
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

/// Potential at every collocation point induced by sources of the given
/// strengths on some panels of `mesh` (images included, self terms from
/// [`self_influence`]): `out[i] = sum_(j, s) B_ij s`. A change `ds_j` of
/// the source strengths changes the right-hand side `-B sigma` by `-out`.
pub fn source_sum(mesh: &PanelMesh, strengths: &[(usize, f64)], far_field_ratio: f64) -> Vec<f64> {
    let images = mesh_images(mesh);
    mesh.panels
        .par_iter()
        .enumerate()
        .map(|(i, q)| {
            let mut sum = 0.0;
            for &(j, s) in strengths {
                let own = if i == j {
                    self_influence(&mesh.panels[j]).source
                } else {
                    influence::triangle_influence(&q.centroid, &mesh.panels[j], far_field_ratio)
                        .source
                };
                let imaged: f64 = images
                    .iter()
                    .map(|img| {
                        influence::triangle_influence(&q.centroid, &img[j], far_field_ratio).source
                    })
                    .sum();
                sum += s * (own + imaged);
            }
            sum
        })
        .collect()
}

/// Potential at an arbitrary point from given strengths, images included:
/// `phi(P) = sum_j [sigma_j source_j(P) - mu_j doublet_j(P)]` (Katz &
/// Plotkin 2001, ch. 10). Exact at points off the surface.
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

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;
    use tuft_mesh::{Mirrors, generate};

    /// `source_sum` with every panel at `sigma_j = n_j . V` is the source
    /// part `B sigma` the assembly folds into the right-hand side `-B
    /// sigma` (Katz & Plotkin 2001, sec. 12.2), images included: the two
    /// are computed by separate code paths and must agree to round-off.
    #[test]
    fn source_sum_reproduces_the_assembled_right_hand_side() {
        let mirrors = Mirrors {
            ground: Some(-1.3),
            symmetry: false,
        };
        let mesh = PanelMesh::new(generate::icosphere(1.0, 2), mirrors).unwrap();
        let params = PotentialParams::default();
        let system = assemble(&mesh, &params).unwrap();
        let v = Vector3::new(1.0, 0.3, 0.0);
        let sigma: Vec<(usize, f64)> = mesh
            .panels
            .iter()
            .enumerate()
            .map(|(j, p)| (j, p.normal.dot(&v)))
            .collect();
        let sum = source_sum(&mesh, &sigma, params.far_field_ratio);
        for (a, b) in sum.iter().zip(system.rhs(&v)) {
            assert!((a + b).abs() < 1e-12, "{a} vs {}", -b);
        }
    }
}
