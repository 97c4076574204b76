//! Influence coefficients of constant-strength source and doublet panels.
//!
//! Formulation of Katz & Plotkin, *Low-Speed Aerodynamics*, 2nd ed. (2001),
//! ch. 10 (from memory): on a closed body with outward normals the
//! perturbation potential at `P` is
//!
//! ```text
//! phi(P) = sum_j [ sigma_j S_j(P) - mu_j D_j(P) ] / (4 pi)
//! S_j(P) = \int_j 1/|P - Q| dS        D_j(P) = \int_j n.(P - Q)/|P - Q|^3 dS
//! ```
//!
//! with `sigma_j = n_j . V_inf` and `mu` the inside minus outside
//! perturbation potential. [`Influence`] holds `S/(4 pi)` and `D/(4 pi)`, so
//! `phi = sigma * source - mu * doublet` for one panel.

pub mod point;
pub mod triangle;

use tuft_mesh::{Panel, Point, Reflection};

/// Potential induced at a point per unit strength of one panel:
/// `phi = sigma * source - mu * doublet`.
///
/// `source = S / (4 pi)` (always positive) and `doublet = D / (4 pi)`, with
/// `D` the solid angle the panel subtends, positive on the side its normal
/// points to. In the Dirichlet system of Katz & Plotkin (2001, sec. 12.2 (from memory))
/// the doublet coefficient is `C = -doublet` and the source coefficient is
/// `B = source`.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Influence {
    /// Potential per unit source strength, `S / (4 pi)`, metres.
    pub source: f64,
    /// Solid angle over `4 pi`: minus the potential per unit doublet strength.
    pub doublet: f64,
}

impl std::ops::AddAssign for Influence {
    fn add_assign(&mut self, o: Self) {
        self.source += o.source;
        self.doublet += o.doublet;
    }
}

/// Influence of `panel` at `p`: exact (Newman 1986; van Oosterom &
/// Strackee 1983) within `far_field_ratio` panel sizes of the centroid,
/// point source and point doublet beyond (Katz & Plotkin 2001, ch. 10 (from memory)).
///
/// A point in the panel plane inside the triangle gets the limit from the
/// inside of the body (`doublet = -1/2`): that is the self-influence used
/// for collocation at the centroid. A `far_field_ratio` of infinity means
/// exact everywhere.
pub fn triangle_influence(p: &Point, panel: &Panel, far_field_ratio: f64) -> Influence {
    let dist2 = (p - panel.centroid).norm_squared();
    let limit = far_field_ratio * panel.size;
    let raw = if dist2 > limit * limit {
        point::far(p, panel)
    } else {
        triangle::exact(p, panel)
    };
    let k = 1.0 / (4.0 * std::f64::consts::PI);
    Influence {
        source: raw.source * k,
        doublet: raw.doublet * k,
    }
}

/// The mirror image of a panel in `reflection`: corners reflected, their
/// order reversed when the reflection reverses orientation, so the image
/// normal points out of the image body. `None` only if the panel is
/// degenerate (it then was not a [`Panel`] in the first place).
pub fn image_panel(panel: &Panel, reflection: &Reflection) -> Option<Panel> {
    let [a, b, c] = panel.vertices.map(|v| reflection.point(&v));
    let corners = if reflection.reverses_orientation() {
        [a, c, b]
    } else {
        [a, b, c]
    };
    Panel::new(corners)
}

/// Image panels of a whole panel list, one list per reflection, in the
/// order of `reflections`.
pub fn image_panels(panels: &[Panel], reflections: &[Reflection]) -> Vec<Vec<Panel>> {
    reflections
        .iter()
        .map(|r| {
            panels
                .iter()
                .map(|p| image_panel(p, r).unwrap_or_else(|| p.clone()))
                .collect()
        })
        .collect()
}

/// Influence at `p` of a panel together with all its images (same
/// strengths): `own` is the real panel, `images[k]` its image in the
/// `k`-th reflection. This is what one column of the system sees.
pub fn influence_with_images(
    p: &Point,
    own: &Panel,
    images: &[&Panel],
    far_field_ratio: f64,
) -> Influence {
    let mut sum = triangle_influence(p, own, far_field_ratio);
    for img in images {
        sum += triangle_influence(p, img, far_field_ratio);
    }
    sum
}
