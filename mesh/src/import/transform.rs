//! A rigid motion `p -> R p + t` applied after the unit conversion.

use nalgebra::{Rotation3, UnitQuaternion};

use crate::{Point, TriMesh, Vector};

/// Rotation followed by translation (metres). Keeps lengths, areas, volumes
/// and orientation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RigidTransform {
    /// The rotation.
    pub rotation: UnitQuaternion<f64>,
    /// The translation, applied after the rotation, metres.
    pub translation: Vector,
}

impl Default for RigidTransform {
    fn default() -> Self {
        Self::identity()
    }
}

impl RigidTransform {
    /// No motion.
    pub fn identity() -> Self {
        Self {
            rotation: UnitQuaternion::identity(),
            translation: Vector::zeros(),
        }
    }

    /// Rotation by roll (about x), pitch (about y) and yaw (about z), in
    /// degrees, applied in that order, then the translation.
    pub fn from_euler_deg(roll: f64, pitch: f64, yaw: f64, translation: Vector) -> Self {
        let r =
            Rotation3::from_euler_angles(roll.to_radians(), pitch.to_radians(), yaw.to_radians());
        Self {
            rotation: UnitQuaternion::from_rotation_matrix(&r),
            translation,
        }
    }

    /// Image of one point.
    pub fn point(&self, p: Point) -> Point {
        self.rotation * p + self.translation
    }

    /// Move every vertex of `mesh`.
    pub fn apply(&self, mesh: &mut TriMesh) {
        mesh.map_vertices(|p| self.point(p));
    }
}
