//! Cluster tree of panel centroids by bounding-box bisection.
//!
//! Hackbusch, *Hierarchical Matrices*, 2015, sec. 5.4 (from memory); Rjasanow
//! & Steinbach, *The Fast Solution of Boundary Integral Equations*, 2007,
//! sec. 3.1 (from memory): a cluster is split across the longest side of
//! the bounding box of its points, at the median, until it holds at most
//! `leaf_size` points. The boxes here bound the panels' corners, so the
//! distance between two boxes is a lower bound of the distance between any
//! two points of their panels.

use tuft_mesh::{Panel, Point};

/// Axis-aligned box.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BoundingBox {
    /// Smallest corner.
    pub lo: [f64; 3],
    /// Largest corner.
    pub hi: [f64; 3],
}

impl BoundingBox {
    fn empty() -> Self {
        Self {
            lo: [f64::INFINITY; 3],
            hi: [f64::NEG_INFINITY; 3],
        }
    }

    fn add(&mut self, p: &Point) {
        for k in 0..3 {
            self.lo[k] = self.lo[k].min(p[k]);
            self.hi[k] = self.hi[k].max(p[k]);
        }
    }

    /// Length of the diagonal.
    pub fn diameter(&self) -> f64 {
        (0..3)
            .map(|k| (self.hi[k] - self.lo[k]).powi(2))
            .sum::<f64>()
            .sqrt()
    }

    /// Euclidean distance between two boxes (0 when they overlap).
    pub fn distance(&self, o: &Self) -> f64 {
        (0..3)
            .map(|k| {
                let gap = (self.lo[k] - o.hi[k]).max(o.lo[k] - self.hi[k]).max(0.0);
                gap * gap
            })
            .sum::<f64>()
            .sqrt()
    }

    /// The box mapped by `f` (corners mapped, then bounded again); exact
    /// for reflections in coordinate planes.
    pub fn mapped(&self, f: impl Fn(&Point) -> Point) -> Self {
        let mut b = Self::empty();
        for c in [self.lo, self.hi] {
            b.add(&f(&Point::new(c[0], c[1], c[2])));
        }
        b
    }

    fn longest_axis(&self) -> usize {
        let ext = |k: usize| self.hi[k] - self.lo[k];
        (0..3).fold(0, |best, k| if ext(k) > ext(best) { k } else { best })
    }
}

/// One cluster: panels `perm[start..end]` of the tree's permutation.
#[derive(Debug, Clone)]
pub struct Cluster {
    /// First position in the permutation.
    pub start: usize,
    /// One past the last position.
    pub end: usize,
    /// Box around the cluster's panels (corners included).
    pub bbox: BoundingBox,
    /// Indices of the two sons in [`ClusterTree::clusters`], if split.
    pub sons: Option<(usize, usize)>,
}

impl Cluster {
    /// Number of panels.
    pub fn len(&self) -> usize {
        self.end - self.start
    }

    /// True for an empty cluster.
    pub fn is_empty(&self) -> bool {
        self.end == self.start
    }
}

/// Binary cluster tree over a panel list; cluster 0 is the root.
#[derive(Debug, Clone)]
pub struct ClusterTree {
    /// `perm[k]` is the panel index at tree position `k`; every cluster is
    /// a contiguous range of positions.
    pub perm: Vec<usize>,
    /// All clusters, parents before sons.
    pub clusters: Vec<Cluster>,
}

impl ClusterTree {
    /// Build the tree; clusters of at most `leaf_size` panels (at least 1)
    /// are not split.
    pub fn new(panels: &[Panel], leaf_size: usize) -> Self {
        let mut tree = Self {
            perm: (0..panels.len()).collect(),
            clusters: Vec::new(),
        };
        tree.split(panels, 0, panels.len(), leaf_size.max(1));
        tree
    }

    /// Number of panels.
    pub fn len(&self) -> usize {
        self.perm.len()
    }

    /// True for a tree over no panels.
    pub fn is_empty(&self) -> bool {
        self.perm.is_empty()
    }

    /// Build the cluster of `perm[start..end]` and its sons; returns its
    /// index.
    fn split(&mut self, panels: &[Panel], start: usize, end: usize, leaf: usize) -> usize {
        let mut bbox = BoundingBox::empty();
        for &p in &self.perm[start..end] {
            panels[p].vertices.iter().for_each(|v| bbox.add(v));
        }
        let id = self.clusters.len();
        self.clusters.push(Cluster {
            start,
            end,
            bbox,
            sons: None,
        });
        if end - start <= leaf {
            return id;
        }
        let axis = bbox.longest_axis();
        let mid = start + (end - start) / 2;
        self.perm[start..end].select_nth_unstable_by(mid - start, |&a, &b| {
            panels[a].centroid[axis].total_cmp(&panels[b].centroid[axis])
        });
        let left = self.split(panels, start, mid, leaf);
        let right = self.split(panels, mid, end, leaf);
        self.clusters[id].sons = Some((left, right));
        id
    }
}
