//! Velocity and pressure at points off the body (flow slices, streamline
//! seeds) from the solved singularities: the real panels, their mirror
//! images and the wake (with its images) when there is one.
//!
//! `V(P) = V_inf + sum_j [sigma_j v_s,j(P) + mu_j v_d,j(P)] + sum_w mu_w v_ring,w(P)`
//! over all panels and their images, with the kernels of [`kernels`]
//! (Katz & Plotkin, *Low-Speed Aerodynamics*, 2nd ed., 2001, sec. 10.4 and
//! eq. 12.1: the velocity is the gradient of the panel potential).
//!
//! Points in no fluid get no velocity: inside the body or an image body
//! (the solid angle of all body panels, images included, is `-4 pi` there
//! and zero outside: Gauss's theorem for the closed surface), and below the
//! ground plane. On the symmetry plane's far side (`y < 0` of a half model)
//! the velocity is that of the mirrored half, which is the real flow of the
//! full body.
//!
//! The body sum is either direct (every panel and image at every point,
//! `O(points x panels)`) or a treecode over the panels' cluster tree with
//! multipole expansions of far clusters ([`treecode`], [`multipole`]);
//! [`OffBodyMethod::Auto`] picks the treecode from
//! [`OffBodyParams::tree_from`] panels. The wake is always summed
//! directly (a few hundred rings at most).
//!
//! Evaluation is parallel over points (rayon); each point's sum runs in a
//! fixed order, so results do not depend on the thread count.

pub mod kernels;
pub mod multipole;
pub mod treecode;

use std::f64::consts::PI;

use rayon::prelude::*;
use thiserror::Error;
use tuft_mesh::{Panel, PanelMesh, Point, Vector};

use crate::influence::image_panels;
use crate::wake::{Wake, WakeSolution};

use kernels::{panel_velocity, ring_velocity};
use treecode::{Treecode, TreecodeParams};

/// How the body panels' velocity is summed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum OffBodyMethod {
    /// [`OffBodyMethod::Direct`] below [`OffBodyParams::tree_from`] real
    /// panels, [`OffBodyMethod::Tree`] from there.
    Auto,
    /// Every panel and image at every point: the reference.
    Direct,
    /// The treecode of [`treecode`].
    Tree,
}

/// Settings of the off-body evaluation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct OffBodyParams {
    /// In the direct sum, beyond this many panel sizes a panel acts as a
    /// point source and a point doublet (default 6, as in the surface
    /// solve); `f64::INFINITY` for the exact kernels everywhere. The
    /// treecode uses the exact kernels for every panel it does not expand.
    pub far_field_ratio: f64,
    /// Direct sum or treecode.
    pub method: OffBodyMethod,
    /// Real panel count from which [`OffBodyMethod::Auto`] uses the
    /// treecode (default 2,000: from about 1,000 panels up the treecode
    /// was measured faster than the direct sum, see BENCHMARKS.md; small
    /// meshes keep the direct sum).
    pub tree_from: usize,
    /// Settings of the treecode.
    pub treecode: TreecodeParams,
}

impl Default for OffBodyParams {
    fn default() -> Self {
        Self {
            far_field_ratio: 6.0,
            method: OffBodyMethod::Auto,
            tree_from: 2000,
            treecode: TreecodeParams::default(),
        }
    }
}

/// Inputs that do not fit the mesh.
#[derive(Debug, Error, PartialEq)]
pub enum OffBodyError {
    /// A strength vector does not have one value per panel.
    #[error("{what} has {got} entries, the mesh has {expected} panels")]
    LengthMismatch {
        /// Which vector.
        what: &'static str,
        /// Number of panels.
        expected: usize,
        /// Length given.
        got: usize,
    },
    /// The wake has a different number of panels and strengths.
    #[error("the wake has {panels} panels but {strengths} strengths")]
    WakeMismatch {
        /// Wake panels.
        panels: usize,
        /// Wake strengths.
        strengths: usize,
    },
    /// A far-field ratio that is not positive.
    #[error("far-field ratio {0} is not a positive number")]
    BadFarFieldRatio(f64),
    /// A treecode opening ratio outside (0, 1).
    #[error("treecode opening ratio {0} is not between 0 and 1")]
    BadOpening(f64),
}

/// The solved flow, ready to be evaluated anywhere.
///
/// ```
/// use tuft_mesh::{generate, Mirrors, PanelMesh, Point, Vector};
/// use tuft_solver::offbody::FlowField;
/// use tuft_solver::potential::{solve_potential, Freestream};
/// let mesh = PanelMesh::new(generate::icosphere(1.0, 2), Mirrors::none()).unwrap();
/// let sol = solve_potential(&mesh, &Freestream::new(1.0, 0.0)).unwrap();
/// let field = FlowField::new(&mesh, &sol.sigma, &sol.mu, Vector::x(), None).unwrap();
/// // Inside the sphere: no velocity. Beside it at r = 2: Lamb's 1 + 1/16.
/// assert!(field.velocity(&Point::origin()).is_none());
/// let v = field.velocity(&Point::new(0.0, 2.0, 0.0)).unwrap();
/// assert!((v.x - 17.0 / 16.0).abs() < 5e-3);
/// ```
#[derive(Debug, Clone)]
pub struct FlowField {
    /// Real panels followed by each image's panels.
    bodies: Vec<Vec<Panel>>,
    sigma: Vec<f64>,
    mu: Vec<f64>,
    /// Real wake followed by its images.
    wakes: Vec<Wake>,
    v_inf: Vector,
    ground: Option<f64>,
    params: OffBodyParams,
    /// The treecode, when chosen (then `bodies` is unused).
    tree: Option<Treecode>,
}

impl FlowField {
    /// A flow field from the strengths on `mesh` (one `sigma` and one `mu`
    /// per real panel), the free-stream velocity and the wake, if any;
    /// default settings.
    ///
    /// # Errors
    /// [`OffBodyError`] when the strengths do not fit the mesh or the wake.
    pub fn new(
        mesh: &PanelMesh,
        sigma: &[f64],
        mu: &[f64],
        v_inf: Vector,
        wake: Option<&Wake>,
    ) -> Result<Self, OffBodyError> {
        Self::with_params(mesh, sigma, mu, v_inf, wake, OffBodyParams::default())
    }

    /// [`FlowField::new`] with explicit settings.
    ///
    /// # Errors
    /// As [`FlowField::new`], [`OffBodyError::BadFarFieldRatio`] and
    /// [`OffBodyError::BadOpening`].
    pub fn with_params(
        mesh: &PanelMesh,
        sigma: &[f64],
        mu: &[f64],
        v_inf: Vector,
        wake: Option<&Wake>,
        params: OffBodyParams,
    ) -> Result<Self, OffBodyError> {
        check_lengths(mesh, sigma, mu, wake)?;
        if params.far_field_ratio.is_nan() || params.far_field_ratio <= 0.0 {
            return Err(OffBodyError::BadFarFieldRatio(params.far_field_ratio));
        }
        let opening = params.treecode.opening;
        if !(opening > 0.0 && opening < 1.0) {
            return Err(OffBodyError::BadOpening(opening));
        }
        let reflections = mesh.mirrors.images();
        let use_tree = match params.method {
            OffBodyMethod::Auto => mesh.len() >= params.tree_from,
            OffBodyMethod::Direct => false,
            OffBodyMethod::Tree => true,
        };
        let tree =
            use_tree.then(|| Treecode::new(&mesh.panels, sigma, mu, &reflections, params.treecode));
        let bodies = if use_tree {
            Vec::new()
        } else {
            let mut b = vec![mesh.panels.clone()];
            b.extend(image_panels(&mesh.panels, &reflections));
            b
        };
        let wakes = wake.map_or_else(Vec::new, |w| {
            let mut all = vec![w.clone()];
            all.extend(reflections.iter().map(|r| w.reflected(r)));
            all
        });
        Ok(Self {
            bodies,
            sigma: sigma.to_vec(),
            mu: mu.to_vec(),
            wakes,
            v_inf,
            ground: mesh.mirrors.ground,
            params,
            tree,
        })
    }

    /// The flow field of a solve with a Kutta wake, default settings.
    ///
    /// # Errors
    /// As [`FlowField::new`] (only for a solution of another mesh).
    pub fn from_wake_solution(mesh: &PanelMesh, sol: &WakeSolution) -> Result<Self, OffBodyError> {
        let s = &sol.solution;
        Self::new(
            mesh,
            &s.sigma,
            &s.mu,
            s.freestream.velocity(),
            Some(&sol.wake),
        )
    }

    /// Velocity at `p`, or `None` inside the body, inside an image body or
    /// below the ground plane.
    pub fn velocity(&self, p: &Point) -> Option<Vector> {
        if self.ground.is_some_and(|h| p.z < h) {
            return None;
        }
        let (body, solid) = self.body_sum(p);
        if solid < -2.0 * PI {
            return None;
        }
        let mut v = self.v_inf + body;
        for wake in &self.wakes {
            for (q, m) in wake.panels.iter().zip(&wake.strength) {
                v += ring_velocity(p, q) * *m;
            }
        }
        Some(v)
    }

    /// True when `p` is inside the body or one of its images (total solid
    /// angle of the body panels below `-2 pi`; it is `-4 pi` inside and
    /// zero outside a closed surface).
    pub fn is_inside(&self, p: &Point) -> bool {
        self.body_sum(p).1 < -2.0 * PI
    }

    /// True when the body sum runs on the treecode.
    pub fn uses_tree(&self) -> bool {
        self.tree.is_some()
    }

    /// Velocity of the body panels and images (free stream and wake left
    /// out) and their total solid angle at `p`.
    fn body_sum(&self, p: &Point) -> (Vector, f64) {
        if let Some(tree) = &self.tree {
            let f = tree.evaluate(p);
            return (f.velocity, f.solid_angle);
        }
        let mut v = Vector::zeros();
        let mut solid = 0.0;
        for body in &self.bodies {
            for ((panel, s), m) in body.iter().zip(&self.sigma).zip(&self.mu) {
                let k = panel_velocity(p, panel, self.params.far_field_ratio);
                v += k.source * *s + k.doublet * *m;
                solid += k.solid_angle;
            }
        }
        (v, solid)
    }

    /// Velocities at many points, in parallel.
    pub fn velocities(&self, points: &[Point]) -> Vec<Option<Vector>> {
        points.par_iter().map(|p| self.velocity(p)).collect()
    }

    /// Pressure coefficients `1 - |V|^2 / |V_inf|^2` (steady Bernoulli,
    /// Katz & Plotkin 2001, eq. 2.65) at many points, in parallel.
    pub fn pressure_coefficients(&self, points: &[Point]) -> Vec<Option<f64>> {
        let u2 = self.v_inf.norm_squared();
        self.velocities(points)
            .into_iter()
            .map(|v| v.map(|v| 1.0 - v.norm_squared() / u2))
            .collect()
    }
}

fn check_lengths(
    mesh: &PanelMesh,
    sigma: &[f64],
    mu: &[f64],
    wake: Option<&Wake>,
) -> Result<(), OffBodyError> {
    for (what, v) in [("sigma", sigma), ("mu", mu)] {
        if v.len() != mesh.len() {
            return Err(OffBodyError::LengthMismatch {
                what,
                expected: mesh.len(),
                got: v.len(),
            });
        }
    }
    match wake {
        Some(w) if w.panels.len() != w.strength.len() => Err(OffBodyError::WakeMismatch {
            panels: w.panels.len(),
            strengths: w.strength.len(),
        }),
        _ => Ok(()),
    }
}
