//! Assemble the compressed system and solve it by preconditioned GMRES.

use nalgebra::Vector3;
use tuft_mesh::PanelMesh;

use super::cluster::ClusterTree;
use super::entry::EntryKernel;
use super::operator::CompressedMatrix;
use super::precondition::BlockJacobi;
use crate::SolverError;
use crate::assemble::check_mesh;
use crate::linear::{KrylovSolution, gmres_operator};
use crate::potential::PotentialParams;

/// The compressed doublet matrix `C` and the right-hand-side basis.
#[derive(Debug, Clone)]
pub struct CompressedSystem {
    /// `C` in hierarchical form.
    pub matrix: CompressedMatrix,
    /// Right-hand side per unit free-stream component, `-B n_k`, images
    /// included (as [`crate::InfluenceSystem::rhs_basis`], to the ACA
    /// tolerance).
    pub rhs_basis: [Vec<f64>; 3],
}

impl CompressedSystem {
    /// Right-hand side `-B sigma` for the free stream `v_inf`.
    pub fn rhs(&self, v_inf: &Vector3<f64>) -> Vec<f64> {
        crate::assemble::rhs_from_basis(&self.rhs_basis, v_inf)
    }
}

/// Build the compressed `C` and the right-hand-side basis for `mesh` and
/// its images with `params.far_field_ratio` and `params.compressed`.
///
/// # Errors
/// [`SolverError::EmptyMesh`], [`SolverError::NonFinite`],
/// [`SolverError::BadParameter`] for a far-field ratio, ACA tolerance or
/// `eta` that is not positive.
pub fn assemble_compressed(
    mesh: &PanelMesh,
    params: &PotentialParams,
) -> Result<CompressedSystem, SolverError> {
    check_mesh(mesh)?;
    let cp = &params.compressed;
    for (name, value) in [
        ("far_field_ratio", params.far_field_ratio),
        ("aca_tolerance", cp.aca_tolerance),
        ("eta", cp.eta),
    ] {
        if !(value > 0.0) {
            return Err(SolverError::BadParameter { name, value });
        }
    }
    let kernel = EntryKernel::new(mesh, params.far_field_ratio);
    let tree = ClusterTree::new(kernel.panels(), cp.leaf_size);
    let reflections = mesh.mirrors.images();
    let normals: Vec<Vec<f64>> = (0..3)
        .map(|k| mesh.panels.iter().map(|p| p.normal[k]).collect())
        .collect();
    let (matrix, products) = CompressedMatrix::build_with_products(
        &tree,
        &reflections,
        cp,
        |i, j| {
            let e = kernel.influence(i, j);
            (-e.doublet, e.source)
        },
        &normals,
    );
    let mut rhs = products.into_iter().map(|mut b| {
        b.iter_mut().for_each(|v| *v = -*v);
        b
    });
    let rhs_basis = std::array::from_fn(|_| rhs.next().unwrap_or_default());
    Ok(CompressedSystem { matrix, rhs_basis })
}

/// Solve `C mu = rhs` by GMRES with the block-Jacobi preconditioner, to
/// `params.krylov_tolerance`.
///
/// # Errors
/// [`SolverError::LengthMismatch`] for a right-hand side of the wrong
/// length, [`SolverError::Singular`] for a singular diagonal block,
/// [`SolverError::NotConverged`].
pub fn solve_compressed(
    system: &CompressedSystem,
    rhs: &[f64],
    params: &PotentialParams,
) -> Result<KrylovSolution, SolverError> {
    let n = system.matrix.len();
    if rhs.len() != n {
        return Err(SolverError::LengthMismatch {
            what: "right-hand side",
            expected: n,
            got: rhs.len(),
        });
    }
    let pre = BlockJacobi::new(&system.matrix)?;
    gmres_operator(
        &|v: &[f64], y: &mut [f64]| system.matrix.apply(v, y),
        &|v: &[f64], z: &mut [f64]| pre.apply(v, z),
        rhs,
        params.krylov_tolerance,
        params.max_iterations,
        params.krylov_restart,
    )
}
