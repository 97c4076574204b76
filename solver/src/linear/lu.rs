//! Dense LU factorisation with partial pivoting, in place.
//!
//! Golub & Van Loan, *Matrix Computations*, 4th ed. (2013), alg. 3.4.1 (from memory),
//! as implemented by faer (blocked, recursive, parallel).

use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::lu::partial_pivoting::{factor, solve};
use faer::perm::PermRef;
use faer::{Mat, MatMut};

use crate::SolverError;
use crate::assemble::InfluenceSystem;

use super::par;

/// LU factors of the influence matrix `C`, kept for repeated solves.
///
/// The system stores `C^T` column-major; factoring that in place
/// (`C^T = P^T L U`) and solving with the transposed factors gives
/// `C x = b` without ever copying the matrix.
#[derive(Debug)]
pub struct DenseLu {
    lu: Mat<f64>,
    perm: Vec<usize>,
    perm_inv: Vec<usize>,
}

impl DenseLu {
    /// Factor the system's matrix in place (consumes the system).
    ///
    /// # Errors
    /// [`SolverError::Singular`] when a pivot is exactly zero or not finite.
    pub fn factor(system: InfluenceSystem) -> Result<Self, SolverError> {
        let mut lu = system.into_transposed();
        let n = lu.nrows();
        let mut perm = vec![0usize; n];
        let mut perm_inv = vec![0usize; n];
        let params = Default::default();
        let req = factor::lu_in_place_scratch::<usize, f64>(n, n, par(), params);
        let mut buf = MemBuffer::new(req);
        factor::lu_in_place(
            lu.as_mut(),
            &mut perm,
            &mut perm_inv,
            par(),
            MemStack::new(&mut buf),
            params,
        );
        if let Some(row) = (0..n).find(|&i| !(lu[(i, i)].abs() > 0.0 && lu[(i, i)].is_finite())) {
            return Err(SolverError::Singular { row });
        }
        Ok(Self { lu, perm, perm_inv })
    }

    /// Number of unknowns.
    pub fn len(&self) -> usize {
        self.lu.nrows()
    }

    /// True for an empty system.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Solve `C X = B` in place for every column of `rhs` (several
    /// free-stream directions at the cost of one factorisation).
    ///
    /// # Panics
    /// If `rhs` does not have [`Self::len`] rows.
    #[track_caller]
    pub fn solve_in_place(&self, rhs: MatMut<'_, f64>) {
        let n = self.len();
        assert_eq!(rhs.nrows(), n, "one right-hand-side row per panel");
        let req = solve::solve_transpose_in_place_scratch::<usize, f64>(n, rhs.ncols(), par());
        let mut buf = MemBuffer::new(req);
        let lu = self.lu.as_ref();
        // SAFETY-free: the permutation came from faer's own factorisation.
        let perm = PermRef::new_checked(&self.perm, &self.perm_inv, n);
        solve::solve_transpose_in_place(lu, lu, perm, rhs, par(), MemStack::new(&mut buf));
    }

    /// Solve `C x_k = b_k` for several right-hand sides at once.
    ///
    /// # Panics
    /// If a right-hand side does not have [`Self::len`] entries.
    #[track_caller]
    pub fn solve_many(&self, rhs: &[Vec<f64>]) -> Vec<Vec<f64>> {
        let n = self.len();
        assert!(
            rhs.iter().all(|b| b.len() == n),
            "one right-hand-side row per panel"
        );
        let mut x = Mat::from_fn(n, rhs.len(), |i, k| rhs[k][i]);
        self.solve_in_place(x.as_mut());
        (0..rhs.len())
            .map(|k| (0..n).map(|i| x[(i, k)]).collect())
            .collect()
    }

    /// Solve `C x = b` for one right-hand side.
    ///
    /// # Panics
    /// If `b` does not have [`Self::len`] entries.
    #[track_caller]
    pub fn solve(&self, b: &[f64]) -> Vec<f64> {
        let mut x = Mat::from_fn(b.len(), 1, |i, _| b[i]);
        self.solve_in_place(x.as_mut());
        (0..b.len()).map(|i| x[(i, 0)]).collect()
    }
}
