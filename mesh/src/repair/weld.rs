//! Merge vertices closer than a tolerance (spatial hashing).
//!
//! Vertices are visited in order; each either joins the first kept vertex
//! within `tol` or is kept itself. Kept vertices are therefore more than
//! `tol` apart, so welding again merges nothing. Cells are `2 tol` wide, so
//! every kept vertex within `tol` lies in one of the 8 cells on the near
//! side of the vertex in each axis (the standard uniform-grid neighbour
//! search; Ericson 2005, *Real-Time Collision Detection*, sec. 7.1).

use crate::fasthash::FastMap;
use crate::{Point, TriMesh};

/// Weld vertices of `mesh` within `tol` metres; returns how many vertices
/// were merged into another. Triangles are re-indexed; vertices are not
/// removed (see `compact`).
pub fn weld(mesh: &mut TriMesh, tol: f64) -> usize {
    if tol.is_nan() || tol <= 0.0 {
        return 0;
    }
    let mut grid = KeptGrid::new(2.0 * tol, mesh.vertices.len());
    let mut map: Vec<u32> = Vec::with_capacity(mesh.vertices.len());
    let mut merged = 0;
    for (i, p) in mesh.vertices.iter().enumerate() {
        match grid.nearby(&mesh.vertices, p, tol) {
            Some(k) => {
                map.push(k);
                merged += 1;
            }
            None => {
                grid.insert(p, i as u32);
                map.push(i as u32);
            }
        }
    }
    for t in &mut mesh.triangles {
        *t = t.map(|v| map[v as usize]);
    }
    merged
}

/// Kept vertices by cell: the first in each cell in `head`, the rest
/// chained through `next` (no allocation per cell).
struct KeptGrid {
    cell: f64,
    head: FastMap<u64, u32>,
    next: Vec<u32>,
}

impl KeptGrid {
    fn new(cell: f64, capacity: usize) -> Self {
        let mut head = FastMap::default();
        head.reserve(capacity);
        Self {
            cell,
            head,
            next: vec![u32::MAX; capacity],
        }
    }

    fn cell_of(&self, p: &Point) -> [i64; 3] {
        [p.x, p.y, p.z].map(|c| (c / self.cell).floor() as i64)
    }

    /// 21 bits per axis; distant cells that share a key only add candidates
    /// that the distance test then rejects.
    fn key(c: [i64; 3]) -> u64 {
        let m = (1u64 << 21) - 1;
        (c[0] as u64 & m) | ((c[1] as u64 & m) << 21) | ((c[2] as u64 & m) << 42)
    }

    fn insert(&mut self, p: &Point, i: u32) {
        let key = Self::key(self.cell_of(p));
        if let Some(old) = self.head.insert(key, i) {
            self.next[i as usize] = old;
        }
    }

    /// The smallest-index kept vertex within `tol` of `p`, looking in the 8
    /// cells that can hold one.
    fn nearby(&self, vertices: &[Point], p: &Point, tol: f64) -> Option<u32> {
        let base = self.cell_of(p);
        let side: [i64; 3] = std::array::from_fn(|k| {
            let frac = p[k] / self.cell - base[k] as f64;
            if frac < 0.5 { -1 } else { 1 }
        });
        let mut best: Option<u32> = None;
        for corner in 0..8u8 {
            let c: [i64; 3] =
                std::array::from_fn(|k| base[k] + side[k] * i64::from((corner >> k) & 1));
            let mut j = self.head.get(&Self::key(c)).copied().unwrap_or(u32::MAX);
            while j != u32::MAX {
                if (vertices[j as usize] - p).norm() <= tol && best.is_none_or(|b| j < b) {
                    best = Some(j);
                }
                j = self.next[j as usize];
            }
        }
        best
    }
}
