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
    let cell = 2.0 * tol;
    let mut grid: FastMap<[i64; 3], Vec<u32>> = FastMap::default();
    let mut map: Vec<u32> = Vec::with_capacity(mesh.vertices.len());
    let mut merged = 0;
    for (i, p) in mesh.vertices.iter().enumerate() {
        let found = nearby_kept(&grid, &mesh.vertices, p, cell, tol);
        match found {
            Some(k) => {
                map.push(k);
                merged += 1;
            }
            None => {
                grid.entry(cell_of(p, cell)).or_default().push(i as u32);
                map.push(i as u32);
            }
        }
    }
    for t in &mut mesh.triangles {
        *t = t.map(|v| map[v as usize]);
    }
    merged
}

fn cell_of(p: &Point, cell: f64) -> [i64; 3] {
    [p.x, p.y, p.z].map(|c| (c / cell).floor() as i64)
}

/// The first kept vertex within `tol` of `p`, looking in the 8 cells that
/// can hold one.
fn nearby_kept(
    grid: &FastMap<[i64; 3], Vec<u32>>,
    vertices: &[Point],
    p: &Point,
    cell: f64,
    tol: f64,
) -> Option<u32> {
    let base = cell_of(p, cell);
    let side: [i64; 3] = std::array::from_fn(|k| {
        let frac = p[k] / cell - base[k] as f64;
        if frac < 0.5 { -1 } else { 1 }
    });
    let mut best: Option<u32> = None;
    for corner in 0..8u8 {
        let key: [i64; 3] = std::array::from_fn(|k| base[k] + side[k] * i64::from((corner >> k) & 1));
        let Some(list) = grid.get(&key) else { continue };
        for &j in list {
            if (vertices[j as usize] - p).norm() <= tol && best.is_none_or(|b| j < b) {
                best = Some(j);
            }
        }
    }
    best
}
