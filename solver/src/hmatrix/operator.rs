//! Hierarchical (H-) matrix: the influence matrix as near-field dense
//! blocks and far-field low-rank blocks `U V^T`.
//!
//! Hackbusch, *Hierarchical Matrices*, 2015, ch. 5-7 (from memory);
//! Rjasanow & Steinbach (2007), sec. 3.2 (from memory). A block of rows
//! (collocation points of cluster `t`) and columns (panels of cluster `s`
//! with their mirror images) is admissible when
//! `min(diam t, diam s) <= eta * dist(t, s)`, the distance taken to the
//! nearest of `s` and its images, since a column's kernel is smooth only
//! where both the panel and its images are far. Admissible blocks are
//! compressed by [`super::aca::aca`]; the others are split along the
//! cluster tree down to the leaves, where they are stored dense.

use rayon::prelude::*;
use tuft_mesh::{Point, Reflection};

use super::aca::{LowRank, aca};
use super::cluster::{BoundingBox, Cluster, ClusterTree};

/// Settings of the compressed operator.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CompressedParams {
    /// Relative tolerance of each ACA block (Frobenius norm), default 1e-6.
    pub aca_tolerance: f64,
    /// Admissibility parameter `eta` in `min(diam) <= eta * dist`
    /// (default 1.5, common practice for ACA: Bebendorf 2008 uses 1-2 (from memory)).
    pub eta: f64,
    /// Largest cluster not split further (default 48).
    pub leaf_size: usize,
}

impl Default for CompressedParams {
    fn default() -> Self {
        Self {
            aca_tolerance: 1e-6,
            eta: 1.5,
            leaf_size: 48,
        }
    }
}

/// Storage of one block.
#[derive(Debug, Clone)]
pub enum BlockData {
    /// Row-major `m x n` entries.
    Dense(Vec<f64>),
    /// `U V^T` from ACA.
    LowRank(LowRank),
}

/// One block: tree positions `rows.0..rows.1` by `cols.0..cols.1`.
#[derive(Debug, Clone)]
pub struct Block {
    /// Row positions (start, end) in the tree's permutation.
    pub rows: (usize, usize),
    /// Column positions (start, end).
    pub cols: (usize, usize),
    /// The entries.
    pub data: BlockData,
}

impl Block {
    /// `y[rows] += A_block x[cols]`, `x` and `y` in tree order.
    fn apply_add(&self, x: &[f64], y: &mut [f64]) {
        let xs = &x[self.cols.0..self.cols.1];
        let ys = &mut y[self.rows.0..self.rows.1];
        match &self.data {
            BlockData::Dense(a) => {
                let n = xs.len();
                for (yi, row) in ys.iter_mut().zip(a.chunks_exact(n)) {
                    *yi += row.iter().zip(xs).map(|(p, q)| p * q).sum::<f64>();
                }
            }
            BlockData::LowRank(lr) => lr.apply_add(xs, ys),
        }
    }

    fn bytes(&self) -> usize {
        match &self.data {
            BlockData::Dense(a) => 8 * a.len(),
            BlockData::LowRank(lr) => lr.bytes(),
        }
    }
}

/// Memory and rank summary of a compressed matrix.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CompressionStats {
    /// Bytes of the dense (near-field) blocks.
    pub dense_bytes: usize,
    /// Bytes of the low-rank factors.
    pub low_rank_bytes: usize,
    /// Number of dense blocks.
    pub dense_blocks: usize,
    /// Number of low-rank blocks.
    pub low_rank_blocks: usize,
    /// Largest ACA rank.
    pub max_rank: usize,
    /// Bytes of the dense `N x N` matrix, `8 N^2`.
    pub full_bytes: usize,
}

/// An `N x N` matrix in hierarchical form over a cluster tree.
#[derive(Debug, Clone)]
pub struct CompressedMatrix {
    perm: Vec<usize>,
    blocks: Vec<Block>,
}

impl CompressedMatrix {
    /// Build `A` from `entry(i, j).0` and, with the same block structure
    /// but without storing it, the products `B x` of a second matrix with
    /// entries `entry(i, j).1` for every vector of `xs` (original panel
    /// order). Near-field entries of both come from one call of `entry`.
    ///
    /// # Panics
    /// If a vector of `xs` is not of length `N`.
    #[track_caller]
    pub fn build_with_products(
        tree: &ClusterTree,
        reflections: &[Reflection],
        params: &CompressedParams,
        entry: impl Fn(usize, usize) -> (f64, f64) + Sync,
        xs: &[Vec<f64>],
    ) -> (Self, Vec<Vec<f64>>) {
        let n = tree.len();
        assert!(xs.iter().all(|x| x.len() == n), "vectors of length N");
        let mut pairs = Vec::new();
        if !tree.is_empty() {
            block_pairs(tree, reflections, params.eta, 0, 0, &mut pairs);
        }
        let perm = &tree.perm;
        let xp: Vec<Vec<f64>> = xs
            .iter()
            .map(|x| perm.iter().map(|&i| x[i]).collect())
            .collect();
        let empty = || (Vec::new(), vec![vec![0.0; n]; xs.len()]);
        let (blocks, yp) = pairs
            .into_par_iter()
            .with_min_len(16)
            .fold(empty, |(mut blocks, mut ys), (t, s, admissible)| {
                let (t, s) = (&tree.clusters[t], &tree.clusters[s]);
                let at = |i: usize, j: usize| entry(perm[t.start + i], perm[s.start + j]);
                let block = pair_block(t, s, admissible, params, &at, &xp, &mut ys);
                blocks.push(block);
                (blocks, ys)
            })
            .reduce(empty, |(mut b1, mut y1), (b2, y2)| {
                b1.extend(b2);
                for (a, b) in y1.iter_mut().zip(&y2) {
                    a.iter_mut().zip(b).for_each(|(p, q)| *p += q);
                }
                (b1, y1)
            });
        let ys = yp
            .iter()
            .map(|y| {
                let mut out = vec![0.0; n];
                perm.iter().zip(y).for_each(|(&i, v)| out[i] = *v);
                out
            })
            .collect();
        let matrix = Self {
            perm: perm.clone(),
            blocks,
        };
        (matrix, ys)
    }

    /// Size `N`.
    pub fn len(&self) -> usize {
        self.perm.len()
    }

    /// True for an empty matrix.
    pub fn is_empty(&self) -> bool {
        self.perm.is_empty()
    }

    /// The tree permutation (position to panel index).
    pub fn perm(&self) -> &[usize] {
        &self.perm
    }

    /// All blocks.
    pub fn blocks(&self) -> &[Block] {
        &self.blocks
    }

    /// `y = A x` (original panel order), blocks in parallel (rayon).
    ///
    /// # Panics
    /// If `x` or `y` is not of length `N`.
    #[track_caller]
    pub fn apply(&self, x: &[f64], y: &mut [f64]) {
        let n = self.len();
        assert!(x.len() == n && y.len() == n, "vectors of length N");
        let xp: Vec<f64> = self.perm.iter().map(|&i| x[i]).collect();
        // A few contiguous runs of blocks per thread, each into its own
        // accumulator, summed at the end.
        let runs = 4 * rayon::current_num_threads();
        let chunk = self.blocks.len().div_ceil(runs).max(1);
        let yp = self
            .blocks
            .par_chunks(chunk)
            .map(|run| {
                let mut acc = vec![0.0; n];
                run.iter().for_each(|b| b.apply_add(&xp, &mut acc));
                acc
            })
            .reduce_with(|mut a, b| {
                a.iter_mut().zip(&b).for_each(|(p, q)| *p += q);
                a
            })
            .unwrap_or_else(|| vec![0.0; n]);
        for (k, &i) in self.perm.iter().enumerate() {
            y[i] = yp[k];
        }
    }

    /// Memory and rank summary.
    pub fn stats(&self) -> CompressionStats {
        let mut s = CompressionStats {
            dense_bytes: 0,
            low_rank_bytes: 0,
            dense_blocks: 0,
            low_rank_blocks: 0,
            max_rank: 0,
            full_bytes: 8 * self.len() * self.len(),
        };
        for b in &self.blocks {
            match &b.data {
                BlockData::Dense(_) => {
                    s.dense_bytes += b.bytes();
                    s.dense_blocks += 1;
                }
                BlockData::LowRank(lr) => {
                    s.low_rank_bytes += b.bytes();
                    s.low_rank_blocks += 1;
                    s.max_rank = s.max_rank.max(lr.rank());
                }
            }
        }
        s
    }
}

/// One block of `A` (first entry of `at`) for clusters `t` by `s`; the
/// same block of `B` (second entry) times each `xp[k]` (tree order) is
/// added to `ys[k]`. Admissible blocks are compressed by ACA separately
/// for `A` and `B`; the others are computed dense once for both.
fn pair_block(
    t: &Cluster,
    s: &Cluster,
    admissible: bool,
    params: &CompressedParams,
    at: &(impl Fn(usize, usize) -> (f64, f64) + Sync),
    xp: &[Vec<f64>],
    ys: &mut [Vec<f64>],
) -> Block {
    let (m, n) = (t.len(), s.len());
    let max_rank = (m * n / (m + n)).max(1);
    let tol = params.aca_tolerance;
    let (a_low, b_low) = if admissible {
        (
            aca(m, n, |i, j| at(i, j).0, tol, max_rank),
            aca(m, n, |i, j| at(i, j).1, tol, max_rank),
        )
    } else {
        (None, None)
    };
    let dense: Vec<(f64, f64)> = if a_low.is_none() || b_low.is_none() {
        (0..m * n).map(|k| at(k / n, k % n)).collect()
    } else {
        Vec::new()
    };
    for (x, y) in xp.iter().zip(ys.iter_mut()) {
        let (xs, yt) = (&x[s.start..s.end], &mut y[t.start..t.end]);
        match &b_low {
            Some(lr) => lr.apply_add(xs, yt),
            None => {
                for (yi, row) in yt.iter_mut().zip(dense.chunks_exact(n)) {
                    *yi += row.iter().zip(xs).map(|(e, q)| e.1 * q).sum::<f64>();
                }
            }
        }
    }
    let data = match a_low {
        Some(lr) => BlockData::LowRank(lr),
        None => BlockData::Dense(dense.iter().map(|e| e.0).collect()),
    };
    Block {
        rows: (t.start, t.end),
        cols: (s.start, s.end),
        data,
    }
}

/// Distance from `t` to the nearest of `s` and its images.
fn image_distance(t: &BoundingBox, s: &BoundingBox, reflections: &[Reflection]) -> f64 {
    reflections
        .iter()
        .map(|r| t.distance(&s.mapped(|p: &Point| r.point(p))))
        .fold(t.distance(s), f64::min)
}

/// Collect the leaves of the block tree below `(t, s)`: `(row cluster,
/// column cluster, admissible)`.
fn block_pairs(
    tree: &ClusterTree,
    reflections: &[Reflection],
    eta: f64,
    t: usize,
    s: usize,
    out: &mut Vec<(usize, usize, bool)>,
) {
    let (ct, cs) = (&tree.clusters[t], &tree.clusters[s]);
    let diam = ct.bbox.diameter().min(cs.bbox.diameter());
    let dist = image_distance(&ct.bbox, &cs.bbox, reflections);
    if diam <= eta * dist {
        out.push((t, s, true));
        return;
    }
    match (ct.sons, cs.sons) {
        (None, None) => out.push((t, s, false)),
        (Some((a, b)), None) => {
            block_pairs(tree, reflections, eta, a, s, out);
            block_pairs(tree, reflections, eta, b, s, out);
        }
        (None, Some((a, b))) => {
            block_pairs(tree, reflections, eta, t, a, out);
            block_pairs(tree, reflections, eta, t, b, out);
        }
        (Some((a, b)), Some((c, d))) => {
            for (p, q) in [(a, c), (a, d), (b, c), (b, d)] {
                block_pairs(tree, reflections, eta, p, q, out);
            }
        }
    }
}
