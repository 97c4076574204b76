//! Assembling a generated surface from structured patches: quad grids,
//! zipped strips between point rows of different length, a mirror copy in
//! y = 0, and a weld that merges the coincident seam points.
//!
//! Every generator builds its surface from pieces whose seams repeat the
//! same points; the weld (spatial hash, tolerance far below any panel size)
//! turns them into one indexed mesh and drops the triangles that collapsed
//! at poles or closed edges.

use std::collections::HashMap;

use crate::{Point, TriMesh};

/// A growing set of raw points and triangles (indices into the raw points).
#[derive(Debug, Default)]
pub(crate) struct Builder {
    points: Vec<Point>,
    triangles: Vec<[u32; 3]>,
}

impl Builder {
    /// Add a raw point, returning its raw index.
    pub(crate) fn point(&mut self, p: Point) -> u32 {
        self.points.push(p);
        (self.points.len() - 1) as u32
    }

    /// Add a row of raw points, returning their raw indices.
    pub(crate) fn row(&mut self, row: &[Point]) -> Vec<u32> {
        row.iter().map(|&p| self.point(p)).collect()
    }

    /// Add one triangle, reversed when `flip`.
    fn triangle(&mut self, [a, b, c]: [u32; 3], flip: bool) {
        self.triangles
            .push(if flip { [a, c, b] } else { [a, b, c] });
    }

    /// Triangulate the strip between rows `a` and `b` (raw indices), both
    /// running the same way and starting and ending opposite each other.
    /// Rows may differ in length (a single point makes a fan). The next
    /// triangle advances the row whose next point is nearer the start in
    /// fraction of its row's arc length (the synchronised contour-stitching
    /// rule of Christiansen & Sederberg 1978, "Conversion of complex contour
    /// line definitions into polygonal element mosaics", Computer Graphics
    /// 12(3)), so neither row runs ahead. The normal of an unflipped
    /// triangle is (b - a) x (along the rows).
    pub(crate) fn zip(&mut self, a: &[u32], b: &[u32], flip: bool) {
        let (fa, fb) = (self.fractions(a), self.fractions(b));
        let (mut i, mut j) = (0, 0);
        while i + 1 < a.len() || j + 1 < b.len() {
            let advance_b = if i + 1 == a.len() {
                true
            } else if j + 1 == b.len() {
                false
            } else {
                fb[j + 1] <= fa[i + 1]
            };
            if advance_b {
                self.triangle([a[i], b[j], b[j + 1]], flip);
                j += 1;
            } else {
                self.triangle([a[i], b[j], a[i + 1]], flip);
                i += 1;
            }
        }
    }

    /// Arc length along a row of points as a fraction of its total.
    fn fractions(&self, row: &[u32]) -> Vec<f64> {
        let mut s = vec![0.0];
        for w in row.windows(2) {
            s.push(s[s.len() - 1] + (self.at(w[1]) - self.at(w[0])).norm());
        }
        let total = s[s.len() - 1].max(1e-300);
        s.iter().map(|v| v / total).collect()
    }

    /// Add a structured grid `rows[i][j]` of points (all rows of one
    /// length); each quad is split along its shorter diagonal. The normal
    /// of an unflipped grid is (P[i+1][j] - P[i][j]) x (P[i][j+1] - P[i][j]).
    /// Returns the raw indices of the grid's points.
    pub(crate) fn grid(&mut self, rows: &[Vec<Point>], flip: bool) -> Vec<Vec<u32>> {
        let ids: Vec<Vec<u32>> = rows.iter().map(|r| self.row(r)).collect();
        for pair in ids.windows(2) {
            for (q, r) in pair[0].windows(2).zip(pair[1].windows(2)) {
                self.quad([q[0], r[0], r[1], q[1]], flip);
            }
        }
        ids
    }

    /// Quad a -> b -> c -> d split along its shorter diagonal.
    fn quad(&mut self, [a, b, c, d]: [u32; 4], flip: bool) {
        let ac = (self.at(c) - self.at(a)).norm_squared();
        let bd = (self.at(d) - self.at(b)).norm_squared();
        if ac <= bd {
            self.triangle([a, b, c], flip);
            self.triangle([a, c, d], flip);
        } else {
            self.triangle([a, b, d], flip);
            self.triangle([b, c, d], flip);
        }
    }

    fn at(&self, i: u32) -> Point {
        self.points[i as usize]
    }

    /// Add the mirror image of everything so far in the plane y = 0, with
    /// the triangles reversed so the copy stays outward.
    pub(crate) fn mirror_y(&mut self) {
        let offset = self.points.len() as u32;
        let mirrored: Vec<Point> = self
            .points
            .iter()
            .map(|p| Point::new(p.x, -p.y, p.z))
            .collect();
        self.points.extend(mirrored);
        let copies: Vec<[u32; 3]> = self
            .triangles
            .iter()
            .map(|&[a, b, c]| [a + offset, c + offset, b + offset])
            .collect();
        self.triangles.extend(copies);
    }

    /// Weld points closer than `tol` and drop the triangles that collapse.
    /// Returns the mesh and, for every raw point, its welded vertex index.
    pub(crate) fn finish(self, tol: f64) -> (TriMesh, Vec<u32>) {
        let mut cells: HashMap<[i64; 3], Vec<u32>> = HashMap::new();
        let mut vertices: Vec<Point> = Vec::new();
        let mut remap = Vec::with_capacity(self.points.len());
        for p in &self.points {
            let key = p.coords.map(|c| (c / tol).floor() as i64);
            let found = neighbour_keys(key).find_map(|k| {
                cells.get(&k)?.iter().copied().find(|&v| {
                    let q: &Point = &vertices[v as usize];
                    (q - p).amax() <= tol
                })
            });
            let v = found.unwrap_or_else(|| {
                vertices.push(*p);
                let v = (vertices.len() - 1) as u32;
                cells.entry([key.x, key.y, key.z]).or_default().push(v);
                v
            });
            remap.push(v);
        }
        let triangles = self
            .triangles
            .iter()
            .map(|t| t.map(|i| remap[i as usize]))
            .filter(|[a, b, c]| a != b && b != c && c != a)
            .collect();
        (
            TriMesh {
                vertices,
                triangles,
            },
            remap,
        )
    }
}

/// The 27 hash cells around (and including) `key`.
fn neighbour_keys(key: nalgebra::Vector3<i64>) -> impl Iterator<Item = [i64; 3]> {
    (-1..=1).flat_map(move |dx| {
        (-1..=1).flat_map(move |dy| (-1..=1).map(move |dz| [key.x + dx, key.y + dy, key.z + dz]))
    })
}

/// Stretch a uniform parameter `t` in [0, 1] towards both ends: a blend
/// of uniform and cosine ("full cosine") spacing, `kappa` = 0 uniform,
/// 1 pure cosine (as used for panel methods, Katz & Plotkin 2001, sec. 11.1).
pub(crate) fn cluster_both(t: f64, kappa: f64) -> f64 {
    (1.0 - kappa) * t + kappa * 0.5 * (1.0 - (std::f64::consts::PI * t).cos())
}

/// Stretch `t` in [0, 1] towards t = 1 only ("half cosine"), blended with
/// uniform spacing by `kappa`.
pub(crate) fn cluster_end(t: f64, kappa: f64) -> f64 {
    (1.0 - kappa) * t + kappa * (std::f64::consts::FRAC_PI_2 * t).sin()
}

/// Stretch `t` in [0, 1] towards t = 0 only, blended with uniform spacing.
pub(crate) fn cluster_start(t: f64, kappa: f64) -> f64 {
    1.0 - cluster_end(1.0 - t, kappa)
}

/// Stations on [x0, x1] whose spacing follows `size(x)` (metres): the
/// count n is the integral of dx / size rounded up (at least `min_n`), and
/// station i sits where that integral reaches i/n of its total. The ends
/// are returned exactly.
pub(crate) fn stations(x0: f64, x1: f64, min_n: usize, size: impl Fn(f64) -> f64) -> Vec<f64> {
    const SAMPLES: usize = 2000;
    let dx = (x1 - x0) / SAMPLES as f64;
    let mut cumulative = vec![0.0];
    for k in 0..SAMPLES {
        let xm = x0 + (k as f64 + 0.5) * dx;
        let last = cumulative[k];
        cumulative.push(last + dx / size(xm).max(1e-12));
    }
    let total = cumulative[SAMPLES];
    let n = (total.round() as usize).max(min_n).max(1);
    let mut out = vec![x0];
    let mut k = 0;
    for i in 1..n {
        let target = total * i as f64 / n as f64;
        while cumulative[k + 1] < target {
            k += 1;
        }
        let f = (target - cumulative[k]) / (cumulative[k + 1] - cumulative[k]);
        out.push(x0 + (k as f64 + f) * dx);
    }
    out.push(x1);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn zipped_rows_of_different_length_close_a_flat_strip() {
        // A unit square strip split as rows of 3 and 5 points: the area of
        // the triangles must be the strip's area, 1 (exact geometry).
        let mut b = Builder::default();
        let lower: Vec<Point> = (0..3)
            .map(|k| Point::new(k as f64 / 2.0, 0.0, 0.0))
            .collect();
        let upper: Vec<Point> = (0..5)
            .map(|k| Point::new(k as f64 / 4.0, 1.0, 0.0))
            .collect();
        let (lo, up) = (b.row(&lower), b.row(&upper));
        b.zip(&lo, &up, false);
        let (mesh, _) = b.finish(1e-9);
        assert_eq!(mesh.len(), 6, "n_a + n_b - 2 triangles");
        let area: f64 = (0..mesh.len()).map(|t| mesh.area_vector(t).z).sum();
        assert!((area + 1.0).abs() < 1e-12, "signed area {area}");
    }

    #[test]
    fn stations_follow_the_size_function() {
        // Constant size 0.1 on [0, 1]: ten equal intervals (exact).
        let s = stations(0.0, 1.0, 1, |_| 0.1);
        assert_eq!(s.len(), 11);
        assert!(s.windows(2).all(|w| ((w[1] - w[0]) - 0.1).abs() < 1e-9));
    }
}
