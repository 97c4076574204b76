//! Ear clipping of a hole's rim projected onto its best-fit plane.
//!
//! Every simple polygon with more than three vertices has at least two
//! non-overlapping ears, triangles of three consecutive vertices whose
//! diagonal lies inside the polygon (Meisters, 1975, "Polygons have ears",
//! Amer. Math. Monthly 82, 648-651); cutting one off leaves a simple polygon,
//! so repeating gives `n - 2` triangles covering the polygon exactly. The
//! O(n^3) search is fine for the few dozen edges of a fillable hole.

use crate::{Point, Vector};

/// Triangulate the closed polygon `ring` (vertex indices into `vertices`,
/// counter-clockwise seen from the tip of `normal`) in the plane normal to
/// `normal`. The triangles run counter-clockwise about `normal`. `None` when
/// the projected polygon has no ear left (it is not simple: the rim folds
/// over itself seen along `normal`) or `normal` is zero.
pub(crate) fn ear_clip(vertices: &[Point], ring: &[u32], normal: &Vector) -> Option<Vec<[u32; 3]>> {
    let pts = project(vertices, ring, normal)?;
    let eps = area_tolerance(&pts);
    let mut live: Vec<usize> = (0..ring.len()).collect();
    let mut out = Vec::with_capacity(ring.len().saturating_sub(2));
    while live.len() > 3 {
        let k = (0..live.len()).find(|&k| is_ear(&pts, &live, k, eps))?;
        let m = live.len();
        let (a, b, c) = (live[(k + m - 1) % m], live[k], live[(k + 1) % m]);
        out.push([ring[a], ring[b], ring[c]]);
        live.remove(k);
    }
    match live[..] {
        [a, b, c] if cross(pts[a], pts[b], pts[c]) > eps => {
            out.push([ring[a], ring[b], ring[c]]);
            Some(out)
        }
        _ => None,
    }
}

/// Coordinates in the plane normal to `normal`, in a right-handed frame
/// `(u, v, normal)`.
fn project(vertices: &[Point], ring: &[u32], normal: &Vector) -> Option<Vec<[f64; 2]>> {
    let n = normal.try_normalize(0.0)?;
    let helper = if n.x.abs() < 0.9 {
        Vector::x()
    } else {
        Vector::y()
    };
    let u = n.cross(&helper).normalize();
    let v = n.cross(&u);
    let pts = ring
        .iter()
        .map(|&i| {
            vertices
                .get(i as usize)
                .map(|p| [p.coords.dot(&u), p.coords.dot(&v)])
        })
        .collect::<Option<Vec<_>>>()?;
    Some(pts)
}

/// Areas below this count as zero: `1e-12` of the squared extent.
fn area_tolerance(pts: &[[f64; 2]]) -> f64 {
    let (mut lo, mut hi) = ([f64::MAX; 2], [f64::MIN; 2]);
    for p in pts {
        for k in 0..2 {
            lo[k] = lo[k].min(p[k]);
            hi[k] = hi[k].max(p[k]);
        }
    }
    let extent = (hi[0] - lo[0]).max(hi[1] - lo[1]);
    1e-12 * extent * extent
}

/// Twice the signed area of triangle `a b c` (positive counter-clockwise).
fn cross(a: [f64; 2], b: [f64; 2], c: [f64; 2]) -> f64 {
    (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])
}

/// Live vertex `k` is an ear: convex, and no other live vertex lies in (or
/// on) the triangle it makes with its neighbours, so the new diagonal
/// neither leaves the polygon nor passes through a rim vertex.
fn is_ear(pts: &[[f64; 2]], live: &[usize], k: usize, eps: f64) -> bool {
    let m = live.len();
    let (ia, ib, ic) = (live[(k + m - 1) % m], live[k], live[(k + 1) % m]);
    let (a, b, c) = (pts[ia], pts[ib], pts[ic]);
    if cross(a, b, c) <= eps {
        return false;
    }
    live.iter().all(|&j| {
        let p = pts[j];
        j == ia
            || j == ib
            || j == ic
            || p == a
            || p == b
            || p == c
            || cross(a, b, p) < -eps
            || cross(b, c, p) < -eps
            || cross(c, a, p) < -eps
    })
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;

    fn ring(points: &[(f64, f64)]) -> (Vec<Point>, Vec<u32>) {
        let v = points.iter().map(|&(x, y)| Point::new(x, y, 0.0)).collect();
        (v, (0..points.len() as u32).collect())
    }

    #[test]
    fn crescent_is_covered_exactly() {
        // A crescent (two concentric half-circle arcs, r = 2 outside and 1
        // inside); its area by the shoelace formula (Gauss's area formula).
        let mut p: Vec<(f64, f64)> = (0..=8)
            .map(|k| f64::from(k) * std::f64::consts::PI / 8.0)
            .map(|t| (2.0 * t.cos(), 2.0 * t.sin()))
            .collect();
        p.extend((0..=8).rev().map(|k| {
            let t = f64::from(k) * std::f64::consts::PI / 8.0;
            (t.cos(), 0.5 + 0.5 * t.sin())
        }));
        p.reverse();
        let shoelace: f64 = 0.5
            * (0..p.len())
                .map(|k| {
                    let (a, b) = (p[k], p[(k + 1) % p.len()]);
                    a.0 * b.1 - b.0 * a.1
                })
                .sum::<f64>();
        let (v, r) = ring(&p);
        // Clockwise as listed; seen from -z it is counter-clockwise.
        assert!(shoelace < 0.0);
        let t = ear_clip(&v, &r, &-Vector::z()).unwrap();
        assert_eq!(t.len(), p.len() - 2);
        let mut area = 0.0;
        for tri in &t {
            let [a, b, c] = tri.map(|i| v[i as usize]);
            let n = (b - a).cross(&(c - a)) * 0.5;
            assert!(n.z < 0.0, "{tri:?} faces the wrong way");
            area += n.norm();
        }
        assert!((area + shoelace).abs() < 1e-12, "{area} vs {shoelace}");
    }

    #[test]
    fn bow_tie_has_no_flat_fill() {
        // A figure eight overlaps itself: no triangulation without folding.
        let (v, r) = ring(&[(0.0, 0.0), (2.0, 2.0), (2.0, 0.0), (0.0, 2.0)]);
        assert!(ear_clip(&v, &r, &Vector::z()).is_none());
        assert!(ear_clip(&v, &r, &-Vector::z()).is_none());
    }
}
