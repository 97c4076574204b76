//! Make orientation consistent within each connected part: a flood fill
//! over manifold edges (exactly two facets), flipping a neighbour that runs
//! the shared edge in the same direction. Which of the two orientations a
//! part ends with is decided by the `outward` pass; here each part keeps the
//! orientation most of its facets already had, so a consistent part is left
//! alone.

use std::collections::VecDeque;

use serde::Serialize;

use super::edges::{EdgeUse, edge_groups, sorted_edge_uses};
use crate::TriMesh;

/// What the consistency pass did.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize)]
pub struct OrientReport {
    /// Connected parts (joined across manifold edges).
    pub components: usize,
    /// Facets flipped to agree with their neighbours.
    pub facets_flipped: usize,
    /// Manifold edges whose two facets still disagree (a non-orientable
    /// part, such as a Moebius band).
    pub conflicting_edges: usize,
}

/// Orient consistently in place; returns the report and the part of each facet.
pub fn orient_consistently(mesh: &mut TriMesh) -> (OrientReport, Vec<u32>) {
    let uses = sorted_edge_uses(&mesh.triangles);
    orient_with_uses(mesh, &uses)
}

/// As [`orient_consistently`], given the sorted edge uses (which flipping
/// does not change, apart from their directions).
pub(crate) fn orient_with_uses(mesh: &mut TriMesh, uses: &[EdgeUse]) -> (OrientReport, Vec<u32>) {
    let neighbours = manifold_neighbours(mesh.triangles.len(), uses);
    let n = mesh.triangles.len();
    let mut component = vec![u32::MAX; n];
    let mut flip = vec![false; n];
    let mut report = OrientReport::default();
    for seed in 0..n {
        if component[seed] != u32::MAX {
            continue;
        }
        let id = report.components as u32;
        let members = flood(seed, id, &neighbours, &mut component, &mut flip);
        let flipped = members.iter().filter(|&&t| flip[t as usize]).count();
        if 2 * flipped > members.len() {
            members.iter().for_each(|&t| flip[t as usize] ^= true);
        }
        report.components += 1;
    }
    for (t, tri) in mesh.triangles.iter_mut().enumerate() {
        if flip[t] {
            tri.swap(1, 2);
            report.facets_flipped += 1;
        }
    }
    report.conflicting_edges = count_conflicts(&neighbours, &flip);
    (report, component)
}

/// Each facet's connected part (joined across edges exactly two facets
/// share, numbered in the order of their first facet) and the number of
/// parts: the parts this pass orients, for a pass before it.
pub(crate) fn manifold_parts(facets: usize, uses: &[EdgeUse]) -> (Vec<u32>, usize) {
    let neighbours = manifold_neighbours(facets, uses);
    let mut component = vec![u32::MAX; facets];
    let mut flip = vec![false; facets];
    let mut parts = 0;
    for seed in 0..facets {
        if component[seed] == u32::MAX {
            flood(seed, parts as u32, &neighbours, &mut component, &mut flip);
            parts += 1;
        }
    }
    (component, parts)
}

/// Neighbour across each side through a manifold edge, and whether it runs
/// the edge in the same direction (inconsistent orientation).
type Neighbours = Vec<[Option<(u32, bool)>; 3]>;

fn manifold_neighbours(facets: usize, uses: &[EdgeUse]) -> Neighbours {
    let mut out: Neighbours = vec![[None; 3]; facets];
    for group in edge_groups(uses) {
        if let [a, b] = group
            && a.facet != b.facet
        {
            let same = a.forward == b.forward;
            out[a.facet as usize][a.side as usize] = Some((b.facet, same));
            out[b.facet as usize][b.side as usize] = Some((a.facet, same));
        }
    }
    out
}

/// Breadth-first fill from `seed`, recording each facet's part and whether
/// it must flip relative to the seed; returns the facets reached.
fn flood(
    seed: usize,
    id: u32,
    neighbours: &Neighbours,
    component: &mut [u32],
    flip: &mut [bool],
) -> Vec<u32> {
    let mut members = vec![seed as u32];
    let mut queue = VecDeque::from([seed as u32]);
    component[seed] = id;
    while let Some(t) = queue.pop_front() {
        for &(u, same) in neighbours[t as usize].iter().flatten() {
            if component[u as usize] == u32::MAX {
                component[u as usize] = id;
                flip[u as usize] = flip[t as usize] ^ same;
                members.push(u);
                queue.push_back(u);
            }
        }
    }
    members
}

fn count_conflicts(neighbours: &Neighbours, flip: &[bool]) -> usize {
    neighbours
        .iter()
        .enumerate()
        .flat_map(|(t, sides)| {
            sides
                .iter()
                .flatten()
                .map(move |&(u, same)| (t, u as usize, same))
        })
        .filter(|&(t, u, same)| t < u && (same ^ flip[t] ^ flip[u]))
        .count()
}
