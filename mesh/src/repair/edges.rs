//! Undirected edge uses, sorted so that the facets sharing an edge sit next
//! to each other. Sorting a flat array is faster and leaner than a hash map
//! for millions of edges; every topological pass starts from it.

/// One use of an undirected edge by a facet.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub(crate) struct EdgeUse {
    /// `min << 32 | max` of the two vertex indices.
    pub key: u64,
    /// The facet using the edge.
    pub facet: u32,
    /// Which edge of the facet (from corner `k` to corner `k + 1`).
    pub side: u8,
    /// True when the facet runs the edge from the smaller index to the larger.
    pub forward: bool,
}

impl EdgeUse {
    /// The two vertex indices, smaller first.
    pub fn ends(&self) -> (u32, u32) {
        ((self.key >> 32) as u32, self.key as u32)
    }
}

/// All edge uses of `triangles`, sorted by edge.
pub(crate) fn sorted_edge_uses(triangles: &[[u32; 3]]) -> Vec<EdgeUse> {
    let mut uses = Vec::with_capacity(triangles.len() * 3);
    for (t, tri) in triangles.iter().enumerate() {
        for k in 0..3 {
            let (a, b) = (tri[k], tri[(k + 1) % 3]);
            uses.push(EdgeUse {
                key: (u64::from(a.min(b)) << 32) | u64::from(a.max(b)),
                facet: t as u32,
                side: k as u8,
                forward: a < b,
            });
        }
    }
    uses.sort_unstable_by_key(|u| u.key);
    uses
}

/// The runs of uses that share one edge.
pub(crate) fn edge_groups(uses: &[EdgeUse]) -> impl Iterator<Item = &[EdgeUse]> {
    uses.chunk_by(|a, b| a.key == b.key)
}
