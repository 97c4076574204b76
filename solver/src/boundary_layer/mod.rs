//! Integral boundary-layer screening along surface streamlines.
//!
//! The data walk, one file per step:
//!
//! ```text
//! panel velocities --attachment--> front stagnation points and seeds
//!   --streamlines--> surface streamlines traced over the triangles
//!   --march--> Thwaites (laminar), Michel (transition), Head with
//!              Ludwieg-Tillmann (turbulent) along each line, with the
//!              streamline spreading term
//!   --screen--> theta, H, c_f, state and risk per panel
//!   --plateau--> separated panels hold the Cp of their separation point
//! ```
//!
//! The entry point is [`screen_boundary_layer`]; the 1D march
//! [`march::march_line`] is public too, so that the methods can be checked on
//! prescribed edge velocities.

pub mod attachment;
pub mod coverage;
pub mod field;
pub mod head;
pub mod march;
pub mod michel;
pub mod plateau;
pub mod screen;
pub mod streamlines;
pub mod thwaites;

pub use plateau::plateau_cp;
pub use screen::{BoundaryLayer, PanelLayer, Streamline, screen_boundary_layer};

use thiserror::Error;

/// Where the laminar boundary layer turns turbulent.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Transition {
    /// Free transition by Michel's criterion ([`michel`]).
    Free,
    /// Laminar everywhere: a laminar separation ends the attached layer.
    Laminar,
    /// Turbulent from the attachment line on.
    Turbulent,
    /// Forced (tripped) at a fraction of the body length from the nose,
    /// measured along the flow direction.
    Forced {
        /// Trip position as a fraction of the body length, 0..1.
        x_fraction: f64,
    },
}

/// Settings of the boundary-layer screening.
#[derive(Debug, Clone, PartialEq)]
pub struct BoundaryLayerParams {
    /// Kinematic viscosity, m^2/s. Default 1.46e-5 (ISO 2533 sea level).
    pub nu: f64,
    /// Transition model. Default [`Transition::Free`] (Michel).
    pub transition: Transition,
    /// Turbulent separation when Head's shape factor `H` reaches this value.
    /// Default 2.4: separation is "very likely when H exceeds 2.2 to 2.4"
    /// and Cebeci & Bradshaw (1977) use 1.8 to 2.4.
    pub separation_h: f64,
    /// Flat-plate turbulent shape factor, the zero of the turbulent risk
    /// scale. Default 1.35 (1/7-power law 1.286, Head's flat plate about 1.4;
    /// Schlichting ch. 21).
    pub flat_plate_h: f64,
    /// Shape factor at the start of the turbulent march. Default 1.4
    /// (common practice), with `theta` continuous.
    pub turbulent_start_h: f64,
    /// Flow turning (degrees) round a sharp convex edge beyond which the flow
    /// is taken to leave the surface at the edge (a bluff base edge; common
    /// practice: the flow does not turn a sharp corner). Default 50.
    pub base_edge_turn_deg: f64,
    /// Dihedral angle (degrees) from which on an edge counts as sharp: on the
    /// panels that touch it the attached-flow suction peak is replaced by an
    /// interpolation across it (see [`screen`]). Default 20 (an edge of
    /// exactly this angle counts as sharp).
    pub sharp_edge_deg: f64,
    /// Half-width of the window round a sharp convex edge crossing over
    /// which the speed is interpolated across the edge, in turbulent
    /// flat-plate boundary-layer thicknesses at the edge's distance from the
    /// nose (see [`screen`]). Default 2, which makes the shape factor on a
    /// slant behind a sharp edge converge under mesh refinement; 0 keeps
    /// the interpolation to the panels either side of the edge, whose
    /// remnant of the edge's mesh-dependent suction peak reaches the march
    /// (DEVELOPERS.md).
    pub edge_window_thicknesses: f64,
    /// Longest turbulent separation bubble, in boundary-layer thicknesses
    /// at its separation point: a turbulent separation after which the
    /// edge speed regains its value at separation within this distance (the
    /// flow into a concave corner such as the foot of a windscreen, which
    /// speeds up again along the screen, or round the side of such a face)
    /// reattaches there, and the layer
    /// marches on from `H` = [`REATTACHMENT_H`] with `theta` held through
    /// the bubble. Default 10 (our choice); 0 makes every turbulent
    /// separation final, and turns off the other bubbles too (ahead of a
    /// step, beside a face, behind a protuberance's back).
    pub reattach_thicknesses: f64,
    /// Streamline seeds round each attachment point; 0 chooses
    /// `2 sqrt(panels)`, clamped to 32..=1024.
    pub seeds_per_attachment: usize,
    /// Attachment points are upstream-facing local minima of `|V|` below this
    /// fraction of the free-stream speed. Default 0.3.
    pub attachment_speed_fraction: f64,
    /// A streamline ends at a rear stagnation area where `|V|` drops below
    /// this fraction of the free-stream speed. Default 0.02.
    pub stop_speed_fraction: f64,
    /// Most panel crossings along one streamline. Default 20,000.
    pub max_steps: usize,
    /// Panels no streamline crossed take the state of the nearest crossed
    /// panel at most this many edge steps away; the rest are
    /// [`FlowState::Unresolved`]. Default 3.
    pub fill_hops: usize,
    /// Free-stream direction; `None` estimates it from the area-weighted mean
    /// surface velocity.
    pub flow_direction: Option<nalgebra::Vector3<f64>>,
}

impl Default for BoundaryLayerParams {
    fn default() -> Self {
        Self {
            nu: 1.46e-5,
            transition: Transition::Free,
            separation_h: 2.4,
            flat_plate_h: 1.35,
            turbulent_start_h: 1.4,
            base_edge_turn_deg: 50.0,
            sharp_edge_deg: 20.0,
            edge_window_thicknesses: 2.0,
            reattach_thicknesses: 10.0,
            seeds_per_attachment: 0,
            attachment_speed_fraction: 0.3,
            stop_speed_fraction: 0.02,
            max_steps: 20_000,
            fill_hops: 3,
            flow_direction: None,
        }
    }
}

impl BoundaryLayerParams {
    /// Check every setting's range.
    ///
    /// # Errors
    /// [`BoundaryLayerError::BadParameter`] naming the first bad field.
    pub fn validate(&self) -> Result<(), BoundaryLayerError> {
        let bad = |name, value: f64| Err(BoundaryLayerError::BadParameter { name, value });
        if !(self.nu.is_finite() && self.nu > 0.0) {
            return bad("nu", self.nu);
        }
        if !(self.separation_h.is_finite() && self.separation_h > self.flat_plate_h) {
            return bad("separation_h", self.separation_h);
        }
        if self.flat_plate_h.is_nan() || self.flat_plate_h <= 1.1 {
            return bad("flat_plate_h", self.flat_plate_h);
        }
        if !(self.turbulent_start_h > 1.1 && self.turbulent_start_h < self.separation_h) {
            return bad("turbulent_start_h", self.turbulent_start_h);
        }
        if let Transition::Forced { x_fraction } = self.transition
            && !(0.0..=1.0).contains(&x_fraction)
        {
            return bad("transition.x_fraction", x_fraction);
        }
        for (name, v) in [
            ("base_edge_turn_deg", self.base_edge_turn_deg),
            ("sharp_edge_deg", self.sharp_edge_deg),
        ] {
            if !(v > 0.0 && v <= 180.0) {
                return bad(name, v);
            }
        }
        let w = self.edge_window_thicknesses;
        if !(w.is_finite() && w >= 0.0) {
            return bad("edge_window_thicknesses", w);
        }
        let r = self.reattach_thicknesses;
        if !(r.is_finite() && r >= 0.0) {
            return bad("reattach_thicknesses", r);
        }
        if !(self.attachment_speed_fraction > 0.0 && self.stop_speed_fraction >= 0.0) {
            return bad("attachment_speed_fraction", self.attachment_speed_fraction);
        }
        Ok(())
    }
}

/// Shape factor of a turbulent layer just behind the reattachment of a
/// separation bubble: about 2, relaxing towards flat-plate values over tens
/// of thicknesses (Bradshaw & Wong, J. Fluid Mech. 52, 1972; from memory).
pub const REATTACHMENT_H: f64 = 2.0;

/// The state of the boundary layer on a panel.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FlowState {
    /// Attached and laminar.
    Laminar,
    /// Attached and turbulent.
    Turbulent,
    /// Downstream of a separation point on the streamline that reached it.
    Separated,
    /// No streamline reached the panel (nor its close neighbourhood).
    Unresolved,
}

/// What can go wrong in the boundary-layer screening. Each variant names
/// the bad panel or setting.
#[derive(Debug, Error, PartialEq)]
pub enum BoundaryLayerError {
    /// The velocity array does not have one entry per panel.
    #[error("expected one surface velocity per panel ({panels}), got {velocities}")]
    VelocityCount {
        /// Number of panels in the mesh.
        panels: usize,
        /// Number of velocities given.
        velocities: usize,
    },
    /// A panel's velocity is NaN or infinite.
    #[error("panel {panel} has a surface velocity that is not a finite number")]
    NonFiniteVelocity {
        /// Index of the panel.
        panel: usize,
    },
    /// The reference speed is not a positive finite number.
    #[error("the free-stream speed must be positive and finite, got {speed}")]
    BadSpeed {
        /// The speed given, m/s.
        speed: f64,
    },
    /// A setting is out of its range.
    #[error("boundary-layer setting `{name}` is out of range: {value}")]
    BadParameter {
        /// Name of the field in `BoundaryLayerParams`.
        name: &'static str,
        /// The value given.
        value: f64,
    },
    /// No panel qualifies as a front attachment point.
    #[error(
        "no front attachment point found (no upstream-facing panel with a local minimum of speed)"
    )]
    NoAttachment,
}
