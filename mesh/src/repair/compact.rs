//! Remove vertices no facet uses, keeping the order of the rest.

use crate::TriMesh;

/// Drop unreferenced vertices; returns how many were removed.
pub fn remove_unused_vertices(mesh: &mut TriMesh) -> usize {
    let mut new_index = vec![u32::MAX; mesh.vertices.len()];
    for t in &mesh.triangles {
        for &v in t {
            new_index[v as usize] = 0;
        }
    }
    let mut next = 0u32;
    for slot in &mut new_index {
        if *slot == 0 {
            *slot = next;
            next += 1;
        }
    }
    let before = mesh.vertices.len();
    let mut i = 0;
    mesh.vertices.retain(|_| {
        i += 1;
        new_index[i - 1] != u32::MAX
    });
    for t in &mut mesh.triangles {
        *t = t.map(|v| new_index[v as usize]);
    }
    before - mesh.vertices.len()
}
