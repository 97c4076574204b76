//! Block-Jacobi preconditioner from the leaf diagonal blocks of a
//! compressed matrix.
//!
//! Saad, *Iterative Methods for Sparse Linear Systems*, 2nd ed., 2003,
//! sec. 10.2 (from memory): `M = blockdiag(A_tt)` over the leaf clusters
//! `t`, each block LU-factorised with partial pivoting (Golub & Van Loan
//! 2013, alg. 3.4.1 (from memory)). On a second-kind panel system the
//! diagonal leaf blocks hold the self term and the nearest neighbours, the
//! largest entries of each row.

use nalgebra::{DMatrix, DVector, LU, dimension::Dyn};
use rayon::prelude::*;

use super::operator::{BlockData, CompressedMatrix};
use crate::SolverError;

/// The factorised leaf diagonal blocks.
#[derive(Debug, Clone)]
pub struct BlockJacobi {
    perm: Vec<usize>,
    blocks: Vec<(usize, LU<f64, Dyn, Dyn>)>,
}

impl BlockJacobi {
    /// Factorise every diagonal dense block of `a`.
    ///
    /// # Errors
    /// [`SolverError::Singular`] (with the panel of the first row of the
    /// block) for a singular diagonal block.
    pub fn new(a: &CompressedMatrix) -> Result<Self, SolverError> {
        let perm = a.perm().to_vec();
        let blocks = a
            .blocks()
            .par_iter()
            .filter(|b| b.rows == b.cols)
            .filter_map(|b| match &b.data {
                BlockData::Dense(d) => Some((b.rows.0, b.rows.1 - b.rows.0, d)),
                BlockData::LowRank(_) => None,
            })
            .map(|(start, m, d)| {
                let lu = DMatrix::from_row_slice(m, m, d).lu();
                if lu.is_invertible() {
                    Ok((start, lu))
                } else {
                    Err(SolverError::Singular { row: perm[start] })
                }
            })
            .collect::<Result<Vec<_>, _>>()?;
        Ok(Self { perm, blocks })
    }

    /// `z = M^-1 v` (original panel order). Positions not covered by a
    /// diagonal block are copied unchanged.
    pub fn apply(&self, v: &[f64], z: &mut [f64]) {
        let mut zp: Vec<f64> = self.perm.iter().map(|&i| v[i]).collect();
        let solved: Vec<(usize, DVector<f64>)> = self
            .blocks
            .par_iter()
            .map(|(start, lu)| {
                let m = lu.l().nrows();
                let b = DVector::from_column_slice(&zp[*start..*start + m]);
                (*start, lu.solve(&b).unwrap_or(b))
            })
            .collect();
        for (start, x) in solved {
            zp[start..start + x.len()].copy_from_slice(x.as_slice());
        }
        for (k, &i) in self.perm.iter().enumerate() {
            z[i] = zp[k];
        }
    }
}
