//! Far-field influence: the panel replaced by a point source and a point
//! doublet of the same total strength at its centroid.
//!
//! Katz & Plotkin (2001), ch. 10 (from memory) (far-field approximations of
//! the constant-strength panel): `S ~ A / r`, `D ~ A n.(P - c) / r^3`.
//! The relative error falls as `(size / r)^2`; the switch-over distance is
//! [`crate::potential::PotentialParams::far_field_ratio`] panel sizes.

use tuft_mesh::{Panel, Point};

use super::triangle::RawIntegrals;

/// Point-singularity approximation of [`super::triangle::exact`].
pub fn far(p: &Point, panel: &Panel) -> RawIntegrals {
    let d = p - panel.centroid;
    let r2 = d.norm_squared();
    let r = r2.sqrt();
    RawIntegrals {
        source: panel.area / r,
        doublet: panel.area * d.dot(&panel.normal) / (r2 * r),
    }
}
