//! Typed errors of the solver. Each variant names the bad element.

use thiserror::Error;

/// Everything that can go wrong between a panel mesh and a flow solution.
#[derive(Debug, Error)]
pub enum SolverError {
    /// The free stream speed is zero, negative or not finite.
    #[error("free-stream speed {speed} m/s is not a positive finite number")]
    BadSpeed {
        /// The speed given.
        speed: f64,
    },
    /// The yaw angle is not finite.
    #[error("yaw angle {yaw_deg} degrees is not a finite number")]
    BadYaw {
        /// The yaw angle given, degrees.
        yaw_deg: f64,
    },
    /// A half model (symmetry plane) cannot be yawed: the image half would
    /// see a mirrored free stream.
    #[error(
        "yaw {yaw_deg} degrees with a symmetry plane: a half model is only valid at zero yaw; use the full model"
    )]
    YawWithSymmetry {
        /// The yaw angle given, degrees.
        yaw_deg: f64,
    },
    /// The mesh has no panels.
    #[error("the panel mesh is empty")]
    EmptyMesh,
    /// A panel position or normal is not finite.
    #[error("panel {panel} has a coordinate that is not a finite number")]
    NonFinite {
        /// Index of the panel.
        panel: usize,
    },
    /// The influence matrix is singular (exactly zero pivot) at this row.
    #[error("the influence matrix is singular at row {row} (is the mesh closed and outward?)")]
    Singular {
        /// Row (panel) of the zero pivot.
        row: usize,
    },
    /// The iterative solver stopped before reaching its tolerance.
    #[error(
        "the iterative solver stopped after {iterations} iterations with relative residual {residual:e}"
    )]
    NotConverged {
        /// Iterations done.
        iterations: usize,
        /// Relative residual reached.
        residual: f64,
    },
    /// A parameter is out of its valid range.
    #[error("parameter {name} = {value} is out of range")]
    BadParameter {
        /// Name of the parameter.
        name: &'static str,
        /// Value given.
        value: f64,
    },
    /// A vector has the wrong length for this mesh.
    #[error("{what} has {got} entries, the mesh has {expected} panels")]
    LengthMismatch {
        /// Which vector.
        what: &'static str,
        /// Number of panels.
        expected: usize,
        /// Length given.
        got: usize,
    },
    /// The boundary-layer screening failed (its error names the panel or
    /// setting).
    #[error(transparent)]
    BoundaryLayer(#[from] crate::boundary_layer::BoundaryLayerError),
}
