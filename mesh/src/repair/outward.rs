//! Turn each connected part outward: its signed volume (divergence theorem,
//! `V = 1/6 sum (a - r) . ((b - r) x (c - r))`, e.g. Zhang & Chen 2001,
//! "Efficient feature extraction for 2D/3D objects in mesh representation",
//! from memory) must be positive. The reference point `r` lies on every declared
//! mirror plane, so the missing cap of a part cut by a plane adds nothing
//! and a half model is judged like the whole body.

use serde::Serialize;

use crate::{Mirrors, Point, TriMesh};

/// What the outward pass did.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize)]
pub struct OutwardReport {
    /// Parts reversed because their volume was negative.
    pub components_reversed: usize,
    /// Facets flipped with them.
    pub facets_flipped: usize,
    /// Parts enclosing (numerically) no volume, left as they were.
    pub flat_components: usize,
}

/// Reverse every part of `mesh` (ids in `component`, `parts` of them) whose
/// signed volume is negative.
pub fn orient_outward(
    mesh: &mut TriMesh,
    component: &[u32],
    parts: usize,
    mirrors: &Mirrors,
) -> OutwardReport {
    let r = reference_point(mesh, mirrors);
    let mut volume = vec![0.0; parts];
    let mut scale = vec![0.0f64; parts];
    for (t, tri) in mesh.triangles.iter().enumerate() {
        let [a, b, c] = tri.map(|v| mesh.vertices[v as usize] - r);
        let part = component[t] as usize;
        volume[part] += a.dot(&b.cross(&c)) / 6.0;
        scale[part] = scale[part].max(a.norm().max(b.norm()).max(c.norm()));
    }
    let mut report = OutwardReport::default();
    let reverse: Vec<bool> = (0..parts)
        .map(|p| {
            let flat = volume[p].abs() <= 1e-9 * scale[p].powi(3);
            report.flat_components += usize::from(flat);
            !flat && volume[p] < 0.0
        })
        .collect();
    report.components_reversed = reverse.iter().filter(|&&r| r).count();
    for (t, tri) in mesh.triangles.iter_mut().enumerate() {
        if reverse[component[t] as usize] {
            tri.swap(1, 2);
            report.facets_flipped += 1;
        }
    }
    report
}

/// A point on every declared plane: `(x, 0, h)` with the body's mid `x`.
fn reference_point(mesh: &TriMesh, mirrors: &Mirrors) -> Point {
    let mid = mesh
        .bounds()
        .map_or(Point::origin(), |(lo, hi)| nalgebra::center(&lo, &hi));
    Point::new(
        mid.x,
        if mirrors.symmetry { 0.0 } else { mid.y },
        mirrors.ground.unwrap_or(mid.z),
    )
}
