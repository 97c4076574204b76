//! Block-Jacobi preconditioner from the leaf diagonal blocks of a
//! compressed matrix.
//!
//! Saad, *Iterative Methods for Sparse Linear Systems*, 2nd ed., 2003,
//! sec. 10.2 (from memory): `M = blockdiag(A_tt)` over the leaf clusters
//! `t`, each block LU-factorised with partial pivoting (Golub & Van Loan
//! 2013, alg. 3.4.1 (from memory); faer's implementation, one block per
//! rayon task, each factorisation and solve sequential). On a second-kind
//! panel system the diagonal leaf blocks hold the self term and the
//! nearest neighbours, the largest entries of each row.

use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::lu::partial_pivoting::{factor, solve};
use faer::perm::PermRef;
use faer::{Mat, MatMut, Par};
use rayon::prelude::*;

use super::operator::{BlockData, CompressedMatrix};
use crate::SolverError;

/// LU factors of one diagonal block: `P A = L U` stored in one matrix,
/// with the row permutation and its inverse.
#[derive(Debug, Clone)]
struct BlockLu {
    start: usize,
    lu: Mat<f64>,
    perm: Vec<usize>,
    perm_inv: Vec<usize>,
}

impl BlockLu {
    /// Factorise the `m x m` row-major block `d` whose first row is tree
    /// position `start`; `None` for a zero or non-finite pivot.
    fn new(start: usize, m: usize, d: &[f64]) -> Option<Self> {
        let mut lu = Mat::from_fn(m, m, |i, j| d[i * m + j]);
        let (mut perm, mut perm_inv) = (vec![0usize; m], vec![0usize; m]);
        let params = Default::default();
        let req = factor::lu_in_place_scratch::<usize, f64>(m, m, Par::Seq, params);
        let mut buf = MemBuffer::new(req);
        let stack = MemStack::new(&mut buf);
        factor::lu_in_place(
            lu.as_mut(),
            &mut perm,
            &mut perm_inv,
            Par::Seq,
            stack,
            params,
        );
        let pivots_ok = (0..m).all(|i| lu[(i, i)].abs() > 0.0 && lu[(i, i)].is_finite());
        pivots_ok.then_some(Self {
            start,
            lu,
            perm,
            perm_inv,
        })
    }

    /// Overwrite `x` (the block's rows of the right-hand side) by the
    /// solution.
    fn solve_in_place(&self, x: &mut [f64]) {
        let m = self.lu.nrows();
        let req = solve::solve_in_place_scratch::<usize, f64>(m, 1, Par::Seq);
        let mut buf = MemBuffer::new(req);
        let lu = self.lu.as_ref();
        let perm = PermRef::new_checked(&self.perm, &self.perm_inv, m);
        let rhs = MatMut::from_column_major_slice_mut(x, m, 1);
        solve::solve_in_place(lu, lu, perm, rhs, Par::Seq, MemStack::new(&mut buf));
    }
}

/// The factorised leaf diagonal blocks.
#[derive(Debug, Clone)]
pub struct BlockJacobi {
    perm: Vec<usize>,
    blocks: Vec<BlockLu>,
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
                BlockLu::new(start, m, d).ok_or(SolverError::Singular { row: perm[start] })
            })
            .collect::<Result<Vec<_>, _>>()?;
        Ok(Self { perm, blocks })
    }

    /// `z = M^-1 v` (original panel order). Positions not covered by a
    /// diagonal block are copied unchanged.
    pub fn apply(&self, v: &[f64], z: &mut [f64]) {
        let mut zp: Vec<f64> = self.perm.iter().map(|&i| v[i]).collect();
        let solved: Vec<(usize, Vec<f64>)> = self
            .blocks
            .par_iter()
            .map(|b| {
                let mut x = zp[b.start..b.start + b.lu.nrows()].to_vec();
                b.solve_in_place(&mut x);
                (b.start, x)
            })
            .collect();
        for (start, x) in solved {
            zp[start..start + x.len()].copy_from_slice(&x);
        }
        for (k, &i) in self.perm.iter().enumerate() {
            z[i] = zp[k];
        }
    }
}
