//! Adaptive cross approximation with partial pivoting.
//!
//! Bebendorf, Numer. Math. 86 (2000), "Approximation of boundary element
//! matrices" (from memory); Rjasanow & Steinbach, *The Fast Solution of
//! Boundary Integral Equations*, 2007, alg. 3.9 (from memory). A block
//! `A` (`m x n`, known only entry by entry) is approximated by
//! `S_k = sum_l u_l v_l^T`, built one row and one column of the residual
//! at a time; the iteration stops when
//! `|u_k| |v_k| <= tol |S_k|_F`, with `|S_k|_F` updated recursively
//! (Rjasanow & Steinbach 2007, eq. 3.59 (from memory)).

/// A low-rank factorisation `A ~ U V^T`, the factors column by column.
#[derive(Debug, Clone, Default)]
pub struct LowRank {
    /// Rows of the block.
    pub m: usize,
    /// Columns of the block.
    pub n: usize,
    /// `u_l`, each of length `m`.
    pub u: Vec<Vec<f64>>,
    /// `v_l`, each of length `n`.
    pub v: Vec<Vec<f64>>,
}

impl LowRank {
    /// Rank `k`.
    pub fn rank(&self) -> usize {
        self.u.len()
    }

    /// `y += U V^T x`.
    pub fn apply_add(&self, x: &[f64], y: &mut [f64]) {
        for (u, v) in self.u.iter().zip(&self.v) {
            let t: f64 = v.iter().zip(x).map(|(a, b)| a * b).sum();
            y.iter_mut().zip(u).for_each(|(yi, ui)| *yi += t * ui);
        }
    }

    /// Bytes of the factors.
    pub fn bytes(&self) -> usize {
        8 * self.rank() * (self.m + self.n)
    }
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

/// Entries sampled to check an approximation (see [`aca`]).
const CHECK_SAMPLES: usize = 32;

/// ACA of the `m x n` block with entries `entry(i, j)` to relative
/// tolerance `tol`. Returns `None` when the rank would reach `max_rank`
/// (the block is then cheaper stored dense), or when the result fails a
/// check on [`CHECK_SAMPLES`] entries spread over the block (seeded): ACA
/// with partial pivoting can stop early on blocks whose first rows vanish,
/// such as panels coplanar with a flat face, whose doublet influence on
/// each other is zero (a known weakness of partial pivoting; Rjasanow &
/// Steinbach 2007, sec. 3.4 (from memory)), so such a block is stored
/// dense instead.
pub fn aca(
    m: usize,
    n: usize,
    entry: impl Fn(usize, usize) -> f64,
    tol: f64,
    max_rank: usize,
) -> Option<LowRank> {
    let lr = aca_partial(m, n, &entry, tol, max_rank)?;
    checked(&lr, &entry, tol).then_some(lr)
}

/// True when the sampled residual of `lr` is within ten times `tol` of the
/// sampled entries' size (root mean squares).
fn checked(lr: &LowRank, entry: &impl Fn(usize, usize) -> f64, tol: f64) -> bool {
    let mut state = 0x9e37_79b9_7f4a_7c15_u64 ^ ((lr.m as u64) << 32 | lr.n as u64);
    let mut next = |bound: usize| {
        state = state
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        ((state >> 33) as usize) % bound
    };
    let (mut sum_a, mut sum_r) = (0.0, 0.0);
    for _ in 0..CHECK_SAMPLES {
        let (i, j) = (next(lr.m), next(lr.n));
        let a = entry(i, j);
        let approx: f64 = lr.u.iter().zip(&lr.v).map(|(u, v)| u[i] * v[j]).sum();
        sum_a += a * a;
        sum_r += (a - approx) * (a - approx);
    }
    sum_r.sqrt() <= 10.0 * tol * sum_a.sqrt() + f64::MIN_POSITIVE
}

fn aca_partial(
    m: usize,
    n: usize,
    entry: &impl Fn(usize, usize) -> f64,
    tol: f64,
    max_rank: usize,
) -> Option<LowRank> {
    let mut lr = LowRank {
        m,
        n,
        ..LowRank::default()
    };
    let mut used_row = vec![false; m];
    let mut norm2 = 0.0;
    let mut i_star = 0;
    let mut zero_rows = 0;
    while lr.rank() < max_rank {
        used_row[i_star] = true;
        let mut row: Vec<f64> = (0..n).map(|j| entry(i_star, j)).collect();
        for (u, v) in lr.u.iter().zip(&lr.v) {
            row.iter_mut()
                .zip(v)
                .for_each(|(r, vj)| *r -= u[i_star] * vj);
        }
        let j_star = argmax(&row, |_| true);
        let pivot = row[j_star];
        if !(pivot.abs() > 0.0) {
            // A zero residual row: try another one, give up after a few.
            zero_rows += 1;
            match (0..m).find(|&i| !used_row[i]) {
                Some(i) if zero_rows < 8 => {
                    i_star = i;
                    continue;
                }
                _ => return Some(lr),
            }
        }
        let v: Vec<f64> = row.iter().map(|r| r / pivot).collect();
        let mut u: Vec<f64> = (0..m).map(|i| entry(i, j_star)).collect();
        for (ul, vl) in lr.u.iter().zip(&lr.v) {
            u.iter_mut().zip(ul).for_each(|(x, y)| *x -= vl[j_star] * y);
        }
        let (nu2, nv2) = (dot(&u, &u), dot(&v, &v));
        let cross: f64 =
            lr.u.iter()
                .zip(&lr.v)
                .map(|(ul, vl)| dot(ul, &u) * dot(vl, &v))
                .sum();
        norm2 += 2.0 * cross + nu2 * nv2;
        lr.u.push(u);
        lr.v.push(v);
        if (nu2 * nv2).sqrt() <= tol * norm2.abs().sqrt() {
            return Some(lr);
        }
        let last = &lr.u[lr.rank() - 1];
        if used_row.iter().all(|&b| b) {
            return Some(lr);
        }
        i_star = argmax(last, |i| !used_row[i]);
    }
    None
}

/// Index of the entry of largest magnitude among those `ok` admits.
fn argmax(x: &[f64], ok: impl Fn(usize) -> bool) -> usize {
    let mut best = None;
    for (i, v) in x.iter().enumerate() {
        if ok(i) && best.is_none_or(|(_, b): (usize, f64)| v.abs() > b) {
            best = Some((i, v.abs()));
        }
    }
    best.map_or(0, |(i, _)| i)
}
