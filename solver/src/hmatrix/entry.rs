//! One entry of the influence system, images folded in, for the
//! compressed operator: the same numbers [`crate::assemble::assemble`]
//! puts in its matrix and right-hand side, computed one at a time.
//!
//! Katz & Plotkin (2001), sec. 12.2 (from memory): `C_ij = -D_ij / (4 pi)`
//! summed over panel `j` and its images, `C_ii = 1/2` plus the images of
//! panel `i`; `B_ij = S_ij / (4 pi)` likewise (self term exact).

use tuft_mesh::{Panel, PanelMesh};

use crate::assemble::self_influence;
use crate::influence::{self, Influence};

/// Panels, their images and the far-field switch: all an entry needs.
#[derive(Debug, Clone)]
pub struct EntryKernel<'a> {
    panels: &'a [Panel],
    images: Vec<Vec<Panel>>,
    far_field_ratio: f64,
}

impl<'a> EntryKernel<'a> {
    /// Kernel of `mesh` with its mirror images.
    pub fn new(mesh: &'a PanelMesh, far_field_ratio: f64) -> Self {
        Self {
            panels: &mesh.panels,
            images: influence::image_panels(&mesh.panels, &mesh.mirrors.images()),
            far_field_ratio,
        }
    }

    /// Number of panels.
    pub fn len(&self) -> usize {
        self.panels.len()
    }

    /// True without panels.
    pub fn is_empty(&self) -> bool {
        self.panels.is_empty()
    }

    /// The real panels.
    pub fn panels(&self) -> &[Panel] {
        self.panels
    }

    /// Influence of panel `j` and its images at the collocation point of
    /// panel `i` (self term from the inside of the body).
    pub fn influence(&self, i: usize, j: usize) -> Influence {
        let p = &self.panels[i].centroid;
        let ratio = self.far_field_ratio;
        let mut sum = if i == j {
            self_influence(&self.panels[i])
        } else {
            influence::triangle_influence(p, &self.panels[j], ratio)
        };
        for img in &self.images {
            sum += influence::triangle_influence(p, &img[j], ratio);
        }
        sum
    }

    /// Doublet coefficient `C_ij` (dense assembly's matrix entry).
    pub fn doublet(&self, i: usize, j: usize) -> f64 {
        -self.influence(i, j).doublet
    }

    /// Source coefficient `B_ij`: the right-hand side is `-B sigma`.
    pub fn source(&self, i: usize, j: usize) -> f64 {
        self.influence(i, j).source
    }
}
