//! Analytic test bodies and demo shapes, all closed and outward-oriented,
//! in metres, with x downstream (nose at small x) and z up.
//!
//! - [`icosphere`], [`latlong_sphere`]: spheres.
//! - [`ellipsoid`]: tri-axial ellipsoid, poles on the x axis.
//! - [`wing`]: rectangular wing with a NACA 4-digit section and a sharp
//!   trailing edge, at incidence and height above the ground.
//! - [`ahmed`]: slant-back bluff body of the Ahmed type.
//! - [`coupe`]: a parametric concept coupe of our own.
//!
//! The bluff bodies can be made as the y >= 0 half alone, open exactly on
//! y = 0, for half-model runs with a symmetry plane.

mod ahmed;
mod builder;
mod coupe;
mod ellipsoid;
mod loft;
mod sphere;
mod wing;

#[cfg(test)]
pub(crate) mod check;

pub use ahmed::{AhmedParams, ahmed, ahmed_with_params};
pub use coupe::{CoupeParams, coupe, coupe_with_params};
pub use ellipsoid::{EllipsoidParams, ellipsoid, ellipsoid_with_params};
pub use sphere::{icosphere, latlong_sphere};
pub use wing::{WingMesh, WingParams, wing, wing_with_params};

use crate::MeshError;

/// Largest panel count a generator accepts (memory stays near a gigabyte;
/// far beyond what a dense panel solve on one machine can use).
pub const MAX_PANELS: usize = 10_000_000;

/// A target panel count must lie in [1, [`MAX_PANELS`]].
fn panel_count(name: &'static str, n: usize) -> Result<(), MeshError> {
    require(
        name,
        n as f64,
        (1..=MAX_PANELS).contains(&n),
        "must lie between 1 and 10,000,000",
    )
}

/// `value` must be a positive finite number.
fn positive(name: &'static str, value: f64) -> Result<(), MeshError> {
    require(
        name,
        value,
        value.is_finite() && value > 0.0,
        "must be positive and finite",
    )
}

/// `value` must lie in [0, 1].
fn unit_interval(name: &'static str, value: f64) -> Result<(), MeshError> {
    require(
        name,
        value,
        (0.0..=1.0).contains(&value),
        "must lie between 0 and 1",
    )
}

/// An [`MeshError::InvalidParameter`] unless `ok`.
fn require(
    name: &'static str,
    value: f64,
    ok: bool,
    reason: impl Into<std::borrow::Cow<'static, str>>,
) -> Result<(), MeshError> {
    if ok {
        Ok(())
    } else {
        Err(MeshError::InvalidParameter {
            name,
            value,
            reason: reason.into(),
        })
    }
}
