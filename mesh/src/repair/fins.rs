//! Drop fins: where an edge is shared by an odd number of facets, three or
//! more (a scan's noise folded over a patch of tiny facets, one of them
//! welded onto an edge two others share), drop the smallest until two are
//! left. The holes the dropped facets leave are small and the hole pass
//! fills them; left in place, the extra facet breaks the chain of boundary
//! edges around them and the repair refuses a hole whose rim does not
//! close. An even count (two closed bodies touching along an edge, four
//! facets on it) is a legitimate configuration and is left alone.

use super::edges::{EdgeUse, edge_groups, sorted_edge_uses};
use crate::TriMesh;

/// Drop fins in place, pass after pass until no edge has an odd number of
/// facets above two; returns how many facets were dropped.
pub fn drop_fins(mesh: &mut TriMesh) -> usize {
    drop_fins_with_uses(mesh, None).0
}

/// [`drop_fins`], also handing back the sorted edge uses of the mesh it
/// leaves (its last pass sorted them), for the passes after it. `first`,
/// when given, are the sorted edge uses of `mesh` as it comes.
pub(crate) fn drop_fins_with_uses(
    mesh: &mut TriMesh,
    mut first: Option<Vec<EdgeUse>>,
) -> (usize, Vec<EdgeUse>) {
    let mut dropped = 0;
    loop {
        let uses = first
            .take()
            .unwrap_or_else(|| sorted_edge_uses(&mesh.triangles));
        let mut keep = vec![true; mesh.triangles.len()];
        let mut any = false;
        for group in edge_groups(&uses) {
            if group.len() <= 2 || group.len() % 2 == 0 {
                continue;
            }
            let mut facets: Vec<u32> = group.iter().map(|u| u.facet).collect();
            facets.sort_by(|&a, &b| {
                mesh.area_vector(b as usize)
                    .norm()
                    .total_cmp(&mesh.area_vector(a as usize).norm())
            });
            for &f in &facets[2..] {
                if keep[f as usize] {
                    keep[f as usize] = false;
                    dropped += 1;
                    any = true;
                }
            }
        }
        if !any {
            return (dropped, uses);
        }
        let mut i = 0;
        mesh.triangles.retain(|_| {
            i += 1;
            keep[i - 1]
        });
    }
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;
    use crate::generate;

    /// An icosphere with a small extra facet on one of its edges (a fin
    /// poking inwards): the fin goes, the sphere stays whole.
    #[test]
    fn a_fin_on_a_closed_surface_is_dropped() {
        let mut m = generate::icosphere(1.0, 2);
        let n = m.len();
        let [a, b, _] = m.triangles[0];
        let inside = crate::Point::from(m.vertices[a as usize].coords * 0.9);
        m.vertices.push(inside);
        m.triangles.push([b, a, (m.vertices.len() - 1) as u32]);
        assert_eq!(drop_fins(&mut m), 1);
        assert_eq!(m.len(), n);
        assert_eq!(drop_fins(&mut generate::icosphere(1.0, 2)), 0);
    }
}
