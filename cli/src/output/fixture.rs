//! Test data: a unit icosphere in a 40 m/s stream along +x with the exact
//! potential-flow surface field (Lamb, *Hydrodynamics*, 6th ed., §92):
//! `V = 3/2 U (e_x - (e_x . n) n)`, so `Cp = 1 - 9/4 sin^2 theta`, theta
//! measured from the stagnation point at `(-1, 0, 0)`.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use nalgebra::Vector3;
use tuft_mesh::{Mirrors, PanelMesh, Point, generate};

use super::{Caption, PanelState, SurfaceResult};

/// Free-stream speed of the fixture, m/s.
pub const SPEED: f64 = 40.0;

/// Lamb's sphere Cp at a point of the unit sphere (direction taken from `p`).
pub fn sphere_cp(p: &Point) -> f64 {
    let nx = p.x / p.coords.norm();
    1.0 - 2.25 * (1.0 - nx * nx)
}

/// Owned fields for a [`SurfaceResult`].
pub struct Fixture {
    pub mesh: PanelMesh,
    pub cp: Vec<f64>,
    pub velocity: Vec<Vector3<f64>>,
    pub theta: Vec<f64>,
    pub shape_factor: Vec<f64>,
    pub cf: Vec<f64>,
    pub state: Vec<PanelState>,
    pub risk: Vec<f64>,
}

impl Fixture {
    /// A unit icosphere with `levels` subdivisions and its exact field. The
    /// boundary-layer fields are made-up smooth functions of x (only their
    /// transport through the writers is tested).
    pub fn sphere(levels: u32) -> Self {
        let mesh = PanelMesh::new(generate::icosphere(1.0, levels), Mirrors::none()).unwrap();
        let c: Vec<Point> = mesh.panels.iter().map(|p| p.centroid).collect();
        let velocity = c
            .iter()
            .map(|p| {
                let n = p.coords.normalize();
                1.5 * SPEED * (Vector3::x() - n.x * n)
            })
            .collect();
        Self {
            cp: c.iter().map(sphere_cp).collect(),
            velocity,
            theta: c.iter().map(|p| 1e-4 * (2.0 + p.x)).collect(),
            shape_factor: c.iter().map(|p| 1.4 + 0.5 * (1.0 + p.x)).collect(),
            cf: c.iter().map(|p| 3e-3 * (1.5 - 0.5 * p.x)).collect(),
            state: c.iter().map(|p| state_at(p.x)).collect(),
            risk: c
                .iter()
                .map(|p| (0.5 * (1.0 + p.x)).clamp(0.0, 1.0))
                .collect(),
            mesh,
        }
    }

    /// The borrowed view the writers take.
    pub fn surface(&self) -> SurfaceResult<'_> {
        SurfaceResult {
            mesh: &self.mesh,
            cp: &self.cp,
            velocity: &self.velocity,
            theta: &self.theta,
            shape_factor: &self.shape_factor,
            cf: &self.cf,
            state: &self.state,
            risk: &self.risk,
            separation_note: None,
            dead_water_cp: None,
            held: &[],
        }
    }
}

/// Made-up state by x: laminar front, turbulent middle, separated rear,
/// unresolved at the very back.
fn state_at(x: f64) -> PanelState {
    match x {
        x if x < -0.3 => PanelState::Laminar,
        x if x < 0.5 => PanelState::Turbulent,
        x if x < 0.93 => PanelState::Separated,
        _ => PanelState::Unresolved,
    }
}

/// The caption used by the picture tests.
pub fn caption() -> Caption {
    Caption {
        case: "sphere".to_owned(),
        speed_ms: SPEED,
        yaw_deg: 0.0,
    }
}
