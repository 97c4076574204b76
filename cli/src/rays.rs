//! Rays along one direction through a set of triangles: which triangles a
//! ray may meet (binned in the plane across the direction) and where it
//! meets one. The flow slices use them to tell the dead water behind a
//! separated surface, the named regions to tell which panels are seen
//! from the side they face.

use nalgebra::{Point3, Vector3};

/// Triangles sorted into square cells of the plane across a ray
/// direction, so that a ray meets only the triangles of its cell (those
/// whose projection's bounding box overlaps it).
pub struct RayBins {
    /// Two unit axes across the direction.
    axes: (Vector3<f64>, Vector3<f64>),
    /// Lower corner of the grid in those axes, and the cell size.
    origin: (f64, f64),
    cell: f64,
    /// Cells along each axis.
    dims: (usize, usize),
    /// Triangle indices per cell.
    cells: Vec<Vec<u32>>,
    /// What a point outside the grid meets.
    none: Vec<u32>,
}

impl RayBins {
    /// Bins for rays along `dir` (unit) through the triangles `tris`.
    pub fn new(tris: &[[Point3<f64>; 3]], dir: &Vector3<f64>) -> Self {
        let a = dir
            .cross(&Vector3::z())
            .try_normalize(1e-9)
            .unwrap_or_else(|| dir.cross(&Vector3::x()).normalize());
        let b = dir.cross(&a);
        let boxes: Vec<[f64; 4]> = tris
            .iter()
            .map(|c| {
                c.iter().fold(
                    [
                        f64::INFINITY,
                        f64::INFINITY,
                        f64::NEG_INFINITY,
                        f64::NEG_INFINITY,
                    ],
                    |m, p| {
                        let (u, v) = (p.coords.dot(&a), p.coords.dot(&b));
                        [m[0].min(u), m[1].min(v), m[2].max(u), m[3].max(v)]
                    },
                )
            })
            .collect();
        let mut sizes: Vec<f64> = boxes
            .iter()
            .map(|b| (b[2] - b[0]).max(b[3] - b[1]))
            .collect();
        sizes.sort_by(f64::total_cmp);
        let cell = sizes
            .get(sizes.len() / 2)
            .copied()
            .filter(|c| *c > 0.0)
            .unwrap_or(1.0)
            * 2.0;
        let lo = boxes.iter().fold((f64::INFINITY, f64::INFINITY), |m, b| {
            (m.0.min(b[0]), m.1.min(b[1]))
        });
        let hi = boxes
            .iter()
            .fold((f64::NEG_INFINITY, f64::NEG_INFINITY), |m, b| {
                (m.0.max(b[2]), m.1.max(b[3]))
            });
        // At most 1,024 cells a side: a wider body takes larger cells.
        let cell = cell.max((hi.0 - lo.0).max(hi.1 - lo.1) / 1023.0);
        let count = |span: f64| (span / cell).floor().max(0.0) as usize + 1;
        let dims = (count(hi.0 - lo.0), count(hi.1 - lo.1));
        let mut cells = vec![Vec::new(); dims.0 * dims.1];
        let index =
            |x: f64, lo: f64, n: usize| (((x - lo) / cell).floor().max(0.0) as usize).min(n - 1);
        for (k, bx) in boxes.iter().enumerate() {
            for i in index(bx[0], lo.0, dims.0)..=index(bx[2], lo.0, dims.0) {
                for j in index(bx[1], lo.1, dims.1)..=index(bx[3], lo.1, dims.1) {
                    cells[i + j * dims.0].push(k as u32);
                }
            }
        }
        Self {
            axes: (a, b),
            origin: lo,
            cell,
            dims,
            cells,
            none: Vec::new(),
        }
    }

    /// The triangles a ray through `q` along the direction may meet.
    pub fn along(&self, q: &Point3<f64>) -> &[u32] {
        let (u, v) = (q.coords.dot(&self.axes.0), q.coords.dot(&self.axes.1));
        let (i, j) = (
            ((u - self.origin.0) / self.cell).floor(),
            ((v - self.origin.1) / self.cell).floor(),
        );
        if i < 0.0 || j < 0.0 || i >= self.dims.0 as f64 || j >= self.dims.1 as f64 {
            return &self.none;
        }
        &self.cells[i as usize + j as usize * self.dims.0]
    }

    /// The nearest of the triangles `tris` (those the bins were made of)
    /// that a ray from `q` along `dir` (unit, the bins' direction or its
    /// opposite) meets, leaving out those `skip` names: its distance and
    /// index, the first listed of equally near ones.
    pub fn first_hit(
        &self,
        tris: &[[Point3<f64>; 3]],
        q: &Point3<f64>,
        dir: &Vector3<f64>,
        skip: impl Fn(u32) -> bool,
    ) -> Option<(f64, u32)> {
        let mut nearest: Option<(f64, u32)> = None;
        for &k in self.along(q) {
            if skip(k) {
                continue;
            }
            if let Some(t) = ray_hits(q, dir, &tris[k as usize])
                && nearest.is_none_or(|(d, _)| t < d)
            {
                nearest = Some((t, k));
            }
        }
        nearest
    }
}

/// Distance along the ray from `origin` in direction `dir` (unit) to the
/// triangle `corners`, if it meets it ahead of the origin (Moller &
/// Trumbore 1997).
pub fn ray_hits(
    origin: &Point3<f64>,
    dir: &Vector3<f64>,
    corners: &[Point3<f64>; 3],
) -> Option<f64> {
    let e1 = corners[1] - corners[0];
    let e2 = corners[2] - corners[0];
    let p = dir.cross(&e2);
    let det = e1.dot(&p);
    if det.abs() < 1e-14 * e1.norm_squared().max(e2.norm_squared()) {
        return None;
    }
    let inv = 1.0 / det;
    let t0 = origin - corners[0];
    let u = t0.dot(&p) * inv;
    if !(0.0..=1.0).contains(&u) {
        return None;
    }
    let qv = t0.cross(&e1);
    let v = dir.dot(&qv) * inv;
    if v < 0.0 || u + v > 1.0 {
        return None;
    }
    let t = e2.dot(&qv) * inv;
    (t > 0.0).then_some(t)
}
