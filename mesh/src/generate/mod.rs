//! Analytic test bodies and demo shapes, all closed and outward-oriented,
//! in metres, with x downstream and z up.

mod sphere;

pub use sphere::{icosphere, latlong_sphere};
