//! Linear solvers for the dense influence system `C mu = rhs`.
//!
//! [`lu`]: dense LU with partial pivoting, in place (faer), one
//! factorisation for any number of right-hand sides. [`krylov`]: restarted
//! GMRES (Saad & Schultz 1986) with a Jacobi preconditioner over faer
//! matrix-vector products, which needs only the matrix and converges in a
//! few tens of iterations on these second-kind systems.

pub mod krylov;
pub mod lu;

pub use krylov::{KrylovSolution, gmres, gmres_operator};
pub use lu::DenseLu;

/// faer parallelism over all rayon threads.
pub(crate) fn par() -> faer::Par {
    faer::Par::rayon(0)
}
