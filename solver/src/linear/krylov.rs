//! Restarted GMRES with a Jacobi (diagonal) right preconditioner.
//!
//! Saad & Schultz, SIAM J. Sci. Stat. Comput. 7 (1986), (GMRES(m), from memory)
//! with Givens rotations; right preconditioning (Saad, *Iterative Methods
//! for Sparse Linear Systems*, 2nd ed., 2003, sec. 9.3 (from memory)) so the monitored
//! residual is the true one. Matrix-vector products by faer for a dense
//! matrix, or any product closure ([`gmres_operator`]).

use faer::linalg::matmul::matmul;
use faer::{Accum, ColMut, ColRef, MatRef};

use crate::SolverError;

use super::par;

/// Result of an iterative solve.
#[derive(Debug, Clone)]
pub struct KrylovSolution {
    /// The solution.
    pub x: Vec<f64>,
    /// Matrix-vector products (iterations) used.
    pub iterations: usize,
    /// Final relative residual `|b - A x| / |b|`.
    pub residual: f64,
}

/// `y = A v`.
fn apply(a: MatRef<'_, f64>, v: &[f64], y: &mut [f64]) {
    matmul(
        ColMut::from_slice_mut(y).as_mat_mut(),
        Accum::Replace,
        a,
        ColRef::from_slice(v).as_mat(),
        1.0,
        par(),
    );
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

fn norm(a: &[f64]) -> f64 {
    dot(a, a).sqrt()
}

/// Solve `A x = b` by GMRES(`restart`) to relative residual `tol`.
///
/// # Errors
/// [`SolverError::NotConverged`] after `max_iterations` products,
/// [`SolverError::Singular`] for a zero diagonal entry (no Jacobi scaling).
///
/// # Panics
/// If `A` is not square or `b` has the wrong length.
#[track_caller]
pub fn gmres(
    a: MatRef<'_, f64>,
    b: &[f64],
    tol: f64,
    max_iterations: usize,
    restart: usize,
) -> Result<KrylovSolution, SolverError> {
    let n = a.nrows();
    assert!(
        a.ncols() == n && b.len() == n,
        "square system, one rhs entry per row"
    );
    let inv_diag = jacobi(a)?;
    let precondition = |v: &[f64], z: &mut [f64]| {
        z.iter_mut()
            .zip(v)
            .zip(&inv_diag)
            .for_each(|((zi, vi), d)| *zi = vi * d);
    };
    gmres_operator(
        &|v: &[f64], y: &mut [f64]| apply(a, v, y),
        &precondition,
        b,
        tol,
        max_iterations,
        restart,
    )
}

/// `y = A v` for a matrix known only by its product.
pub type Product<'a> = &'a dyn Fn(&[f64], &mut [f64]);

/// GMRES(`restart`) for any operator `apply` (`y = A v`) with the right
/// preconditioner `precondition` (`z = M^-1 v`), to relative residual
/// `tol`.
///
/// # Errors
/// [`SolverError::NotConverged`] after `max_iterations` products.
pub fn gmres_operator(
    apply: Product<'_>,
    precondition: Product<'_>,
    b: &[f64],
    tol: f64,
    max_iterations: usize,
    restart: usize,
) -> Result<KrylovSolution, SolverError> {
    let n = b.len();
    let b_norm = norm(b).max(f64::MIN_POSITIVE);
    let mut x = vec![0.0; n];
    let mut iterations = 0;
    let mut r = vec![0.0; n];
    loop {
        apply(&x, &mut r);
        r.iter_mut().zip(b).for_each(|(ri, bi)| *ri = bi - *ri);
        let residual = norm(&r) / b_norm;
        if residual <= tol || iterations >= max_iterations {
            return if residual <= tol {
                Ok(KrylovSolution {
                    x,
                    iterations,
                    residual,
                })
            } else {
                Err(SolverError::NotConverged {
                    iterations,
                    residual,
                })
            };
        }
        let m = restart.min(max_iterations - iterations).max(1);
        let ops = Ops {
            apply,
            precondition,
        };
        iterations += cycle(&ops, &mut x, &r, m, tol * b_norm);
    }
}

/// The operator and its preconditioner.
struct Ops<'a> {
    apply: Product<'a>,
    precondition: Product<'a>,
}

/// Inverse diagonal of `A` (Jacobi preconditioner).
fn jacobi(a: MatRef<'_, f64>) -> Result<Vec<f64>, SolverError> {
    (0..a.nrows())
        .map(|i| {
            let d = a[(i, i)];
            if d.abs() > 0.0 && d.is_finite() {
                Ok(1.0 / d)
            } else {
                Err(SolverError::Singular { row: i })
            }
        })
        .collect()
}

/// One GMRES cycle of at most `m` steps from residual `r0`; updates `x`
/// and returns the number of steps taken.
fn cycle(ops: &Ops<'_>, x: &mut [f64], r0: &[f64], m: usize, abs_tol: f64) -> usize {
    let n = x.len();
    let beta = norm(r0);
    let mut basis: Vec<Vec<f64>> = vec![r0.iter().map(|v| v / beta).collect()];
    let mut h = vec![vec![0.0; m]; m + 1];
    let (mut cs, mut sn) = (vec![0.0; m], vec![0.0; m]);
    let mut g = vec![0.0; m + 1];
    g[0] = beta;
    let mut z = vec![0.0; n];
    let mut steps = 0;
    for j in 0..m {
        (ops.precondition)(&basis[j], &mut z);
        let mut w = vec![0.0; n];
        (ops.apply)(&z, &mut w);
        for (i, v) in basis.iter().enumerate() {
            h[i][j] = dot(&w, v);
            w.iter_mut().zip(v).for_each(|(wi, vi)| *wi -= h[i][j] * vi);
        }
        h[j + 1][j] = norm(&w);
        givens(&mut h, &mut cs, &mut sn, &mut g, j);
        steps = j + 1;
        if g[j + 1].abs() <= abs_tol || h[j + 1][j] == 0.0 {
            break;
        }
        let hn = h[j + 1][j];
        basis.push(w.iter().map(|v| v / hn).collect());
    }
    let y = back_substitute(&h, &g, steps);
    let mut combo = vec![0.0; n];
    for (k, yk) in y.iter().enumerate() {
        combo
            .iter_mut()
            .zip(&basis[k])
            .for_each(|(c, v)| *c += yk * v);
    }
    (ops.precondition)(&combo, &mut z);
    x.iter_mut().zip(&z).for_each(|(xi, zi)| *xi += zi);
    steps
}

/// Apply the previous rotations to column `j` of `h`, then a new one that
/// zeroes `h[j+1][j]`, and rotate `g` along.
fn givens(h: &mut [Vec<f64>], cs: &mut [f64], sn: &mut [f64], g: &mut [f64], j: usize) {
    for i in 0..j {
        let t = cs[i] * h[i][j] + sn[i] * h[i + 1][j];
        h[i + 1][j] = -sn[i] * h[i][j] + cs[i] * h[i + 1][j];
        h[i][j] = t;
    }
    let (p, q) = (h[j][j], h[j + 1][j]);
    let r = p.hypot(q);
    let (c, s) = if r == 0.0 { (1.0, 0.0) } else { (p / r, q / r) };
    cs[j] = c;
    sn[j] = s;
    h[j][j] = r;
    g[j + 1] = -s * g[j];
    g[j] *= c;
}

/// Solve the `k x k` upper-triangular system `h y = g`.
fn back_substitute(h: &[Vec<f64>], g: &[f64], k: usize) -> Vec<f64> {
    let mut y = vec![0.0; k];
    for i in (0..k).rev() {
        let s: f64 = (i + 1..k).map(|l| h[i][l] * y[l]).sum();
        y[i] = (g[i] - s) / h[i][i];
    }
    y
}
