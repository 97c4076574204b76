//! Distance from points to a triangle surface: closest point on a triangle
//! (Ericson 2005, *Real-Time Collision Detection*, sec. 5.1.5, by Voronoi
//! regions) and a uniform grid of triangle boxes searched in growing shells.

use crate::{Point, TriMesh};

/// Closest point to `p` on triangle `abc` (Ericson 2005, sec. 5.1.5).
pub fn closest_point_on_triangle(p: &Point, a: &Point, b: &Point, c: &Point) -> Point {
    let (ab, ac, ap) = (b - a, c - a, p - a);
    let (d1, d2) = (ab.dot(&ap), ac.dot(&ap));
    if d1 <= 0.0 && d2 <= 0.0 {
        return *a;
    }
    let bp = p - b;
    let (d3, d4) = (ab.dot(&bp), ac.dot(&bp));
    if d3 >= 0.0 && d4 <= d3 {
        return *b;
    }
    let vc = d1 * d4 - d3 * d2;
    if vc <= 0.0 && d1 >= 0.0 && d3 <= 0.0 {
        return a + ab * (d1 / (d1 - d3));
    }
    let cp = p - c;
    let (d5, d6) = (ab.dot(&cp), ac.dot(&cp));
    if d6 >= 0.0 && d5 <= d6 {
        return *c;
    }
    let vb = d5 * d2 - d1 * d6;
    if vb <= 0.0 && d2 >= 0.0 && d6 <= 0.0 {
        return a + ac * (d2 / (d2 - d6));
    }
    let va = d3 * d6 - d5 * d4;
    if va <= 0.0 && (d4 - d3) >= 0.0 && (d5 - d6) >= 0.0 {
        return b + (c - b) * ((d4 - d3) / ((d4 - d3) + (d5 - d6)));
    }
    let denom = 1.0 / (va + vb + vc);
    a + ab * (vb * denom) + ac * (vc * denom)
}

/// Triangles binned by bounding box into a uniform grid.
pub struct SurfaceGrid<'a> {
    mesh: &'a TriMesh,
    origin: Point,
    cell: f64,
    dims: [usize; 3],
    start: Vec<u32>,
    items: Vec<u32>,
}

impl<'a> SurfaceGrid<'a> {
    /// A grid over `mesh` covering at least the box `lo..hi`, with about
    /// two triangles per occupied cell (at most 128 cells a side).
    pub fn new(mesh: &'a TriMesh, lo: Point, hi: Point) -> Self {
        let (mlo, mhi) = mesh.bounds().unwrap_or((lo, hi));
        let mut grid = Self::sized(mesh, lo.inf(&mlo), hi.sup(&mhi), mesh.len());
        grid.bin(0..mesh.len() as u32);
        grid
    }

    /// An empty grid over the box `lo..hi` for `count` triangles: about two
    /// per occupied cell, at most 128 cells a side.
    fn sized(mesh: &'a TriMesh, lo: Point, hi: Point, count: usize) -> Self {
        let ext = (hi - lo).map(|e| e.max(1e-12));
        let cell =
            (ext.x * ext.y + ext.y * ext.z + ext.z * ext.x).sqrt() / (count.max(1) as f64).sqrt();
        let cell = cell.max(ext.max() / 128.0);
        let dims = [0, 1, 2].map(|k| ((ext[k] / cell).ceil() as usize).clamp(1, 128));
        Self {
            mesh,
            origin: lo,
            cell,
            dims,
            start: Vec::new(),
            items: Vec::new(),
        }
    }

    /// A grid over the facets `facets` of `mesh` only (ids into it), sized
    /// as [`SurfaceGrid::new`] sizes one over their box; binned in two
    /// passes, so that a grid over a few of a scan's millions of facets,
    /// or over all of them, holds no more than its cells and ids.
    pub fn over(mesh: &'a TriMesh, facets: &[u32]) -> Self {
        let boxes = facets.iter().map(|&t| mesh.facet_box(t as usize));
        let (lo, hi) = boxes.fold(
            (
                Point::from(crate::Vector::repeat(f64::INFINITY)),
                Point::from(crate::Vector::repeat(f64::NEG_INFINITY)),
            ),
            |(lo, hi), (a, b)| (lo.inf(&a), hi.sup(&b)),
        );
        let (lo, hi) = if facets.is_empty() {
            (Point::origin(), Point::origin())
        } else {
            (lo, hi)
        };
        let mut grid = Self::sized(mesh, lo, hi, facets.len());
        grid.bin(facets.iter().copied());
        grid
    }

    /// Distance from `p` to the nearest binned triangle for which `keep`
    /// holds, if one lies within `reach` (only the cells the box
    /// `p +- reach` touches are searched).
    pub fn distance_within(
        &self,
        p: &Point,
        reach: f64,
        keep: impl Fn(u32) -> bool,
    ) -> Option<f64> {
        let r = crate::Vector::repeat(reach);
        let (lo, hi) = (self.cell_index(&(p - r)), self.cell_index(&(p + r)));
        let mut best = f64::INFINITY;
        for_block(lo, hi, |c| {
            let f = self.flat(c);
            for &t in &self.items[self.start[f] as usize..self.start[f + 1] as usize] {
                if !keep(t) {
                    continue;
                }
                let [a, b, c] = self.mesh.corners(t as usize);
                best = best.min((closest_point_on_triangle(p, &a, &b, &c) - p).norm());
            }
        });
        (best <= reach).then_some(best)
    }

    fn cell_index(&self, p: &Point) -> [usize; 3] {
        [0, 1, 2].map(|k| {
            (((p[k] - self.origin[k]) / self.cell).floor().max(0.0) as usize).min(self.dims[k] - 1)
        })
    }

    fn flat(&self, c: [usize; 3]) -> usize {
        (c[2] * self.dims[1] + c[1]) * self.dims[0] + c[0]
    }

    /// Counting sort of the triangle ids `facets` into the cells their
    /// boxes overlap, in two passes (no per-facet ranges kept).
    fn bin(&mut self, facets: impl Iterator<Item = u32> + Clone) {
        let n = self.dims.iter().product::<usize>();
        let cells_of = |t: u32| {
            let (lo, hi) = self.mesh.facet_box(t as usize);
            (self.cell_index(&lo), self.cell_index(&hi))
        };
        let mut count = vec![0u32; n + 1];
        for t in facets.clone() {
            let (a, b) = cells_of(t);
            for_block(a, b, |c| count[self.flat(c) + 1] += 1);
        }
        for i in 0..n {
            count[i + 1] += count[i];
        }
        let mut fill = count.clone();
        let mut items = vec![0u32; count[n] as usize];
        for t in facets {
            let (a, b) = cells_of(t);
            for_block(a, b, |c| {
                let f = self.flat(c);
                items[fill[f] as usize] = t;
                fill[f] += 1;
            });
        }
        self.start = count;
        self.items = items;
    }

    /// The triangle ids binned in each cell, cell by cell.
    pub(crate) fn cells(&self) -> impl Iterator<Item = (usize, &[u32])> + '_ {
        self.start
            .windows(2)
            .enumerate()
            .map(|(f, w)| (f, &self.items[w[0] as usize..w[1] as usize]))
    }

    /// The (flat) cell holding `p` (clamped to the grid).
    pub(crate) fn cell_of(&self, p: &Point) -> usize {
        self.flat(self.cell_index(p))
    }

    /// Distance from `p` to the nearest triangle.
    pub fn distance(&self, p: &Point) -> f64 {
        (self.closest(p) - p).norm()
    }

    /// The nearest point of the surface to `p` (`p` itself for an empty
    /// mesh).
    pub fn closest(&self, p: &Point) -> Point {
        let centre = self.cell_index(p);
        let (mut best, mut at) = (f64::INFINITY, *p);
        let max_ring = *self.dims.iter().max().unwrap_or(&1);
        for ring in 0..=max_ring {
            self.visit_ring(centre, ring, |t| {
                let [a, b, c] = self.mesh.corners(t as usize);
                let q = closest_point_on_triangle(p, &a, &b, &c);
                let d = (q - p).norm();
                if d < best {
                    best = d;
                    at = q;
                }
            });
            if best <= self.clearance(p, centre, ring) {
                break;
            }
        }
        at
    }

    /// Distance from `p` to the outside of the block of cells within `ring`
    /// of `centre`: nothing unvisited can be nearer (a block edge at the
    /// grid's border counts as infinitely far).
    fn clearance(&self, p: &Point, centre: [usize; 3], ring: usize) -> f64 {
        (0..3)
            .map(|k| {
                let lo = centre[k] as f64 - ring as f64;
                let hi = (centre[k] + ring + 1) as f64;
                let x = (p[k] - self.origin[k]) / self.cell;
                let below = if lo <= 0.0 { f64::INFINITY } else { x - lo };
                let above = if hi >= self.dims[k] as f64 {
                    f64::INFINITY
                } else {
                    hi - x
                };
                below.min(above).max(0.0) * self.cell
            })
            .fold(f64::INFINITY, f64::min)
    }

    fn visit_ring(&self, c: [usize; 3], ring: usize, mut f: impl FnMut(u32)) {
        let r = ring as i64;
        let lo = c.map(|x| x as i64 - r);
        let hi = c.map(|x| x as i64 + r);
        for z in lo[2].max(0)..=hi[2].min(self.dims[2] as i64 - 1) {
            for y in lo[1].max(0)..=hi[1].min(self.dims[1] as i64 - 1) {
                for x in lo[0].max(0)..=hi[0].min(self.dims[0] as i64 - 1) {
                    let on_shell = [x, y, z]
                        .iter()
                        .zip(lo.iter().zip(hi.iter()))
                        .any(|(v, (l, h))| v == l || v == h);
                    if ring == 0 || on_shell {
                        let f_idx = self.flat([x as usize, y as usize, z as usize]);
                        let (s, e) = (self.start[f_idx] as usize, self.start[f_idx + 1] as usize);
                        self.items[s..e].iter().for_each(|&t| f(t));
                    }
                }
            }
        }
    }
}

/// Every cell of the block `lo..=hi`.
fn for_block(lo: [usize; 3], hi: [usize; 3], mut f: impl FnMut([usize; 3])) {
    for z in lo[2]..=hi[2] {
        for y in lo[1]..=hi[1] {
            for x in lo[0]..=hi[0] {
                f([x, y, z]);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;
    use crate::generate;

    /// A unit sphere's facets: a point 0.1 out from a vertex is within
    /// 0.1 of the surface (the vertex lies on the sphere, the facets
    /// inside it), found within a reach of 0.2 as the full search finds
    /// it, and not within 0.05; a grid over the facets of one half only
    /// finds a point beside the other half no nearer than the cut.
    #[test]
    fn distance_within_reach_agrees_with_the_full_search() {
        let sphere = generate::icosphere(1.0, 3);
        let all: Vec<u32> = (0..sphere.len() as u32).collect();
        let (lo, hi) = sphere.bounds().unwrap();
        let full = SurfaceGrid::new(&sphere, lo, hi);
        let over = SurfaceGrid::over(&sphere, &all);
        let p = Point::from(sphere.vertices[0].coords * 1.1);
        let d = full.distance(&p);
        assert!(d <= 0.1 + 1e-12 && d > 0.09);
        assert_eq!(over.distance_within(&p, 0.2, |_| true), Some(d));
        assert_eq!(over.distance_within(&p, 0.05, |_| true), None);
        let upper: Vec<u32> = all
            .iter()
            .copied()
            .filter(|&t| sphere.corners(t as usize).iter().all(|c| c.z > 0.0))
            .collect();
        let half = SurfaceGrid::over(&sphere, &upper);
        let below = Point::new(0.0, 0.0, -1.0);
        assert_eq!(half.distance_within(&below, 0.5, |_| true), None);
        // Leaving out every facet finds nothing.
        assert_eq!(over.distance_within(&p, 0.2, |_| false), None);
    }
}
