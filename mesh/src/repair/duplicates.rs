//! Drop duplicate facets: the same three vertices, in either orientation.
//! The first occurrence is kept.

use crate::TriMesh;

/// Drop duplicates in place; returns how many facets were dropped.
pub fn drop_duplicates(mesh: &mut TriMesh) -> usize {
    let mut keyed: Vec<([u32; 3], u32)> = mesh
        .triangles
        .iter()
        .enumerate()
        .map(|(i, t)| {
            let mut k = *t;
            k.sort_unstable();
            (k, i as u32)
        })
        .collect();
    keyed.sort_unstable();
    let mut keep = vec![true; mesh.triangles.len()];
    let mut dropped = 0;
    for pair in keyed.windows(2) {
        if pair[0].0 == pair[1].0 {
            keep[pair[1].1 as usize] = false;
            dropped += 1;
        }
    }
    let mut i = 0;
    mesh.triangles.retain(|_| {
        i += 1;
        keep[i - 1]
    });
    dropped
}
