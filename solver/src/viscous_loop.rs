//! The viscous-inviscid loop: the separated regions the boundary layer
//! finds act on the outer flow, and the boundary layer is marched again
//! until the separated set stops growing.
//!
//! Pass 1 is the attached potential flow and its boundary layer (the
//! plateau model of [`crate::boundary_layer::plateau_cp`] gives its
//! separated pressure). Attached potential flow turns round a bluff base
//! and down a steep slant as if nothing separated, with a suction peak at
//! every sharp edge it turns round, so the boundary layer ahead of a
//! separated region sees too mild a pressure rise.
//!
//! [`WakeModel::OpenDeadWater`] (the default): every panel separated so far
//! is dead water, and the dead water is opened to the free stream
//! (transpiration through its panels, see `DeadWater`). The separated
//! region and the wake behind it then act on the outer flow as an
//! extension of the body along the stream, the flow leaves the separation
//! line without turning round it (the smooth exit of a free streamline;
//! Roshko 1955, Hoerner 1965 ch. 3), and the boundary layer ahead of the
//! region sees the full pressure rise. Only the right-hand side changes,
//! so the body matrix is factored once. The dead-water set only grows, so
//! the loop ends; it has converged when a pass adds fewer than
//! [`ViscousLoopParams::change_fraction`] of the set (at least one panel).
//! The pressure in the dead water is one value from Hoerner's base-drag
//! correlation ([`dead_water_cp`]): an open wake is Kirchhoff's
//! free-streamline limit, whose own base suction is known to be far too
//! weak (Roshko 1955); see the project's DEVELOPERS.md for the measured
//! figures.
//!
//! [`WakeModel::Sheets`] (kept for comparison only): a flat doublet wake along the free
//! stream from the bluff-base perimeter and from the upstream boundary of
//! every separated region ([`crate::wake::separated`]), with the Kutta-type
//! strength `mu_attached - mu_separated` folded into the columns of the
//! body matrix ([`crate::wake::add_wake_columns`]; the wake panels as in
//! Katz & Plotkin, 2001, sec. 12.3). A constant-strength sheet carries no
//! velocity jump along the stream, so the dead water moves as fast as the
//! outer flow; the model misses the validation the open dead water meets
//! and is kept for comparison only.
//!
//! Either way the loop stops after [`ViscousLoopParams::max_passes`]
//! passes at most.

use std::collections::HashSet;

use tuft_mesh::{PanelMesh, Vector};

use crate::assemble::{InfluenceSystem, assemble, source_sum};
use crate::boundary_layer::{
    BoundaryLayer, BoundaryLayerError, BoundaryLayerParams, FlowState, screen_boundary_layer,
};
use crate::hmatrix::{CompressedSystem, assemble_compressed, solve_compressed};
use crate::linear::{DenseLu, gmres};
use crate::potential::{
    Freestream, LinearSolver, PotentialParams, PotentialSolution, SolveStats, post_process,
    solve_system,
};
use crate::wake::separated::{SeparationLineParams, base_edges, separation_edges};
use crate::wake::split_edges;
use crate::wake::{TrailingEdge, Wake, WakeError, add_wake_columns, wake_panels, wake_strengths};

/// What can go wrong in the loop.
#[derive(Debug, thiserror::Error)]
pub enum ViscousLoopError {
    /// The wake could not be shed or the potential flow not solved.
    #[error(transparent)]
    Wake(#[from] WakeError),
    /// The boundary layer could not be screened.
    #[error(transparent)]
    BoundaryLayer(#[from] BoundaryLayerError),
    /// A loop setting is out of range.
    #[error("viscous-loop setting `{name}` is out of range: {value}")]
    BadParameter {
        /// Name of the field in `ViscousLoopParams`.
        name: &'static str,
        /// The value given.
        value: f64,
    },
}

/// Settings of the loop.
#[derive(Debug, Clone, PartialEq)]
pub struct ViscousLoopParams {
    /// Most passes, the attached pass included. Default 6.
    pub max_passes: usize,
    /// Converged when a pass adds fewer than this fraction of the dead-water
    /// panels so far (at least one panel). Default 0.03.
    pub change_fraction: f64,
    /// Wake length in body lengths. Default 20.
    pub wake_length: f64,
    /// Where the sheets leave the body.
    pub lines: SeparationLineParams,
    /// Potential-flow settings.
    pub potential: PotentialParams,
    /// Boundary-layer settings.
    pub layer: BoundaryLayerParams,
    /// How the separated regions act on the outer flow.
    pub model: WakeModel,
    /// Length, in body lengths, over which the dead water's edge turns from
    /// an inclined surface to the stream (see `DeadWater`). Default 0.1.
    pub ramp_length: f64,
}

/// How a separated region acts on the outer flow.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum WakeModel {
    /// The separated surface is open to the free stream (see `DeadWater`);
    /// no sheets.
    OpenDeadWater,
    /// Doublet sheets with a Kutta-type strength from the separation lines
    /// (kept for comparison only: fails the validation the open dead water
    /// passes).
    Sheets,
}

impl Default for ViscousLoopParams {
    fn default() -> Self {
        Self {
            max_passes: 6,
            change_fraction: 0.03,
            wake_length: 20.0,
            lines: SeparationLineParams::default(),
            potential: PotentialParams::default(),
            layer: BoundaryLayerParams::default(),
            model: WakeModel::OpenDeadWater,
            ramp_length: 0.1,
        }
    }
}

/// One pass: its solution, boundary layer and wake.
#[derive(Debug, Clone)]
pub struct LoopPass {
    /// Potential flow with this pass's wakes (none on the first pass).
    pub solution: PotentialSolution,
    /// Boundary layer on that flow.
    pub layer: BoundaryLayer,
    /// Wake sheets shed in this pass.
    pub wake: Wake,
    /// The edges they leave from, one per wake panel.
    pub edges: Vec<TrailingEdge>,
}

/// The loop's result.
#[derive(Debug, Clone)]
pub struct ViscousLoop {
    /// The attached pass (pass 1).
    pub attached: LoopPass,
    /// The last pass (equal to `attached` when the body sheds no wake).
    pub last: LoopPass,
    /// Passes run, the attached pass included.
    pub passes: usize,
    /// Whether the separated set settled before the pass limit.
    pub converged: bool,
    /// Whether a pass was thrown away because its doublet strengths grew
    /// beyond [`BLOW_UP_RATIO`] times the attached ones (an ill-conditioned
    /// wake system); `last` is then the pass before it.
    pub diverged: bool,
    /// Panels each pass after the first added to the dead water.
    pub changes: Vec<usize>,
}

/// Run the loop with default settings (the boundary layer's flow direction
/// set to the free stream).
///
/// # Errors
/// See [`viscous_loop_with_params`].
pub fn viscous_loop(mesh: &PanelMesh, fs: &Freestream) -> Result<ViscousLoop, ViscousLoopError> {
    let mut params = ViscousLoopParams::default();
    params.layer.flow_direction = Some(fs.velocity().normalize());
    viscous_loop_with_params(mesh, fs, &params)
}

/// Run the viscous-inviscid loop (module doc).
///
/// # Errors
/// [`ViscousLoopError::BadParameter`] for no passes, a change fraction
/// outside 0..1, a wake length that is not positive or a ramp length that
/// is negative; the solver's and the boundary layer's errors.
pub fn viscous_loop_with_params(
    mesh: &PanelMesh,
    fs: &Freestream,
    params: &ViscousLoopParams,
) -> Result<ViscousLoop, ViscousLoopError> {
    // The free stream first: the body's assembly is the costly part.
    fs.check(&mesh.mirrors).map_err(WakeError::from)?;
    let body = LoopBody::build(mesh, params)?;
    viscous_loop_on(mesh, fs, params, &body)
}

/// The body's system for the loop: it depends on the panels and on
/// `params.potential` and `params.model` only, not on the free stream
/// (Katz & Plotkin 2001, sec. 12.2: the free stream enters through the
/// right-hand side), so one serves every free stream on the same panels,
/// as a sweep of speeds or yaw angles wants.
pub struct LoopBody {
    body: Body,
    panels: usize,
    /// [`fingerprint`] of the panels it was built for.
    fingerprint: f64,
    potential: PotentialParams,
    model: WakeModel,
}

impl LoopBody {
    /// Assemble (and below `params.potential.krylov_from` panels, factor)
    /// the body's system.
    ///
    /// # Errors
    /// [`ViscousLoopError::BadParameter`] as [`viscous_loop_with_params`];
    /// the solver's errors.
    pub fn build(mesh: &PanelMesh, params: &ViscousLoopParams) -> Result<Self, ViscousLoopError> {
        check(params)?;
        Ok(Self {
            body: Body::build(mesh, params)?,
            panels: mesh.len(),
            fingerprint: fingerprint(mesh),
            potential: params.potential,
            model: params.model,
        })
    }
}

/// A number that tells two panel sets apart (their centroids and areas
/// summed with weights), so a body system is not used on other panels
/// that happen to be as many.
fn fingerprint(mesh: &PanelMesh) -> f64 {
    mesh.panels
        .iter()
        .map(|p| p.centroid.x + 2.0 * p.centroid.y + 3.0 * p.centroid.z + 5.0 * p.area)
        .sum()
}

/// Run the loop on a body system built by [`LoopBody::build`] for the
/// same panels, potential-flow settings and wake model.
///
/// # Errors
/// [`ViscousLoopError::BadParameter`] for a body built for another panel
/// count or other settings (named `body`), and as
/// [`viscous_loop_with_params`].
pub fn viscous_loop_on(
    mesh: &PanelMesh,
    fs: &Freestream,
    params: &ViscousLoopParams,
    body: &LoopBody,
) -> Result<ViscousLoop, ViscousLoopError> {
    check(params)?;
    if body.panels != mesh.len()
        || body.fingerprint.to_bits() != fingerprint(mesh).to_bits()
        || body.potential != params.potential
        || body.model != params.model
    {
        return Err(ViscousLoopError::BadParameter {
            name: "body",
            value: body.panels as f64,
        });
    }
    fs.check(&mesh.mirrors).map_err(WakeError::from)?;
    let u = fs.velocity().normalize();
    let body = &body.body;
    let base = base_edges(mesh, &u, &params.lines);
    let attached = run_pass(mesh, fs, body, Vec::new(), &Outflow::default(), params)?;
    // The last pass after the attached one (none yet): no copy of the
    // attached pass, whose streamlines are large on a big mesh.
    let mut later: Option<LoopPass> = None;
    let (mut passes, mut converged, mut changes) = (1, false, Vec::new());
    let mut diverged = false;
    let mut dead = DeadWater::new(mesh, fs.velocity(), params);
    dead.grow(&attached.layer, &attached.solution.velocity);
    while passes < params.max_passes {
        let last = later.as_ref().unwrap_or(&attached);
        let states: Vec<FlowState> = last.layer.panels.iter().map(|l| l.state).collect();
        let open = match params.model {
            WakeModel::Sheets => Outflow::default(),
            WakeModel::OpenDeadWater => dead.outflow(),
        };
        let mut edges = Vec::new();
        if params.model != WakeModel::OpenDeadWater {
            edges = base.clone();
            let velocity = &last.solution.velocity;
            edges.extend(separation_edges(
                mesh,
                &states,
                velocity,
                &u,
                &base,
                &params.lines,
            ));
        }
        if edges.is_empty() && open.panels.is_empty() {
            converged = true;
            break;
        }
        let mut next = run_pass(mesh, fs, body, edges, &open, params)?;
        passes += 1;
        if blown_up(&attached.solution.mu, &next.solution.mu) {
            diverged = true;
            break;
        }
        let before = dead.count();
        let grown = dead.grow(&next.layer, &next.solution.velocity);
        dead.impose(&mut next.layer);
        changes.push(grown);
        later = Some(next);
        if (grown as f64) < (params.change_fraction * before as f64).max(1.0) {
            converged = true;
            break;
        }
    }
    let last = later.unwrap_or_else(|| attached.clone());
    Ok(ViscousLoop {
        attached,
        last,
        passes,
        converged,
        diverged,
        changes,
    })
}

/// A pass whose largest `|mu|` exceeds this multiple of the attached
/// pass's is discarded: the sheets made the system (nearly) singular, e.g.
/// a separated patch almost closed by sheets but for a gap the mode pinning
/// of [`pin_dead_water`] does not see.
pub const BLOW_UP_RATIO: f64 = 10.0;

fn blown_up(attached: &[f64], now: &[f64]) -> bool {
    let top = |m: &[f64]| m.iter().fold(0.0f64, |a, b| a.max(b.abs()));
    !(top(now) <= BLOW_UP_RATIO * top(attached))
}

fn check(params: &ViscousLoopParams) -> Result<(), ViscousLoopError> {
    let bad = |name, value: f64| Err(ViscousLoopError::BadParameter { name, value });
    if params.max_passes == 0 {
        return bad("max_passes", 0.0);
    }
    if !(0.0..1.0).contains(&params.change_fraction) {
        return bad("change_fraction", params.change_fraction);
    }
    if !(params.wake_length.is_finite() && params.wake_length > 0.0) {
        return bad("wake_length", params.wake_length);
    }
    if !(params.ramp_length.is_finite() && params.ramp_length >= 0.0) {
        return bad("ramp_length", params.ramp_length);
    }
    Ok(())
}

/// The body's system when only right-hand sides change (the open dead
/// water): factored once below [`PotentialParams::krylov_from`] panels,
/// kept for GMRES (a few dozen products per pass) above, compressed from
/// [`PotentialParams::compressed_from`] (or when asked); kept assembled
/// to add wake columns each pass for the sheets.
enum Body {
    Factored {
        lu: DenseLu,
        rhs_basis: [Vec<f64>; 3],
    },
    Iterative(InfluenceSystem),
    Compressed(CompressedSystem),
    Assembled(InfluenceSystem),
}

impl Body {
    fn build(mesh: &PanelMesh, params: &ViscousLoopParams) -> Result<Self, WakeError> {
        let p = &params.potential;
        let n = mesh.len();
        let (compressed, krylov) = match p.linear_solver {
            LinearSolver::Auto => (n >= p.compressed_from, n >= p.krylov_from),
            LinearSolver::DenseLu => (false, false),
            LinearSolver::Krylov => (false, true),
            LinearSolver::Compressed => (true, true),
        };
        if params.model == WakeModel::OpenDeadWater && compressed {
            return Ok(Self::Compressed(assemble_compressed(mesh, p)?));
        }
        let system = assemble(mesh, p)?;
        Ok(match params.model {
            WakeModel::OpenDeadWater if krylov => Self::Iterative(system),
            WakeModel::OpenDeadWater => Self::Factored {
                rhs_basis: system.rhs_basis().clone(),
                lu: DenseLu::factor(system)?,
            },
            WakeModel::Sheets => Self::Assembled(system),
        })
    }
}

/// Solve with wakes from `edges` (none: the attached flow) and the outflow
/// of the `open` dead water, and march the boundary layer.
fn run_pass(
    mesh: &PanelMesh,
    fs: &Freestream,
    body: &Body,
    edges: Vec<TrailingEdge>,
    open: &Outflow<'_>,
    params: &ViscousLoopParams,
) -> Result<LoopPass, ViscousLoopError> {
    let v_inf = fs.velocity();
    let u: Vector = v_inf / fs.speed;
    let (lo, hi) = mesh.bounds();
    let length = (hi.x - lo.x).max(1e-3 * (hi - lo).amax()) * params.wake_length;
    let panels = wake_panels(mesh, &edges, &u, length);
    let system = match body {
        Body::Assembled(body) => {
            let mut system = body.clone();
            add_wake_columns(&mut system, mesh, &edges, &panels)?;
            pin_dead_water(&mut system, mesh, &edges);
            Some(system)
        }
        Body::Factored { .. } | Body::Iterative(_) | Body::Compressed(_) => None,
    };
    let mut rhs = match (&system, body) {
        (Some(system), _) => system.rhs(&v_inf),
        (None, Body::Factored { rhs_basis, .. }) => {
            crate::assemble::rhs_from_basis(rhs_basis, &v_inf)
        }
        (None, Body::Compressed(c)) => c.rhs(&v_inf),
        (None, Body::Iterative(b) | Body::Assembled(b)) => b.rhs(&v_inf),
    };
    if !open.panels.is_empty() {
        rhs.iter_mut().zip(open.rhs).for_each(|(r, e)| *r += e);
    }
    let (mu, stats) = match (system, body) {
        (Some(system), _) => {
            let (mut mus, stats) =
                solve_system(system, vec![rhs], &params.potential).map_err(WakeError::from)?;
            (mus.pop().unwrap_or_default(), stats)
        }
        (None, Body::Factored { lu, .. }) => (lu.solve(&rhs), lu_stats()),
        (None, Body::Iterative(b)) => {
            let p = &params.potential;
            let s = gmres(
                b.matrix(),
                &rhs,
                p.krylov_tolerance,
                p.max_iterations,
                p.krylov_restart,
            )
            .map_err(WakeError::from)?;
            let stats = SolveStats {
                method: LinearSolver::Krylov,
                iterations: Some(s.iterations),
                residual: s.residual,
            };
            (s.x, stats)
        }
        (None, Body::Compressed(c)) => {
            let s = solve_compressed(c, &rhs, &params.potential).map_err(WakeError::from)?;
            let stats = SolveStats {
                method: LinearSolver::Compressed,
                iterations: Some(s.iterations),
                residual: s.residual,
            };
            (s.x, stats)
        }
        (None, Body::Assembled(_)) => unreachable!("an assembled body always gives a system"),
    };
    let strength = wake_strengths(mesh, &edges, &mu);
    let solution = if edges.is_empty() {
        post_process(mesh, mu, fs, stats)
    } else {
        let cut: Vec<[u32; 2]> = dedup(&edges);
        post_process(
            &split_edges(mesh, &cut).map_err(WakeError::from)?,
            mu,
            fs,
            stats,
        )
    };
    let mut solution = solution;
    for &(j, v) in open.panels {
        solution.sigma[j] -= v;
    }
    let layer = screen_boundary_layer(mesh, &solution.velocity, fs.speed, &params.layer)?;
    Ok(LoopPass {
        solution,
        layer,
        wake: Wake { panels, strength },
        edges,
    })
}

fn lu_stats() -> SolveStats {
    SolveStats {
        method: LinearSolver::DenseLu,
        iterations: None,
        residual: f64::NAN,
    }
}

/// The dead water: every panel the boundary layer has called separated in
/// any pass so far (the set only grows, so the loop ends), with the panel
/// its separation was read from.
///
/// Each dead-water panel facing downstream lets the free stream's normal
/// component through, `v_n = w max(n . V_inf, 0)` (its source strength
/// `n . V_inf` reduced by `v_n`; Lighthill 1958's equivalent sources for a
/// displacement, here the dead water's). The region and the wake behind it
/// then act on the outer flow as an extension of the body along the
/// stream, so the flow leaves the separation line without turning round it
/// (the smooth exit of a free streamline; Roshko 1955; Hoerner 1965,
/// ch. 3). The weight `w` is 1 where the flow at the separation line
/// already runs along the stream (a base edge, a roof edge ahead of a
/// slant); where it leaves a surface inclined to the stream, `w` ramps
/// from 0 at the separation line to 1 at [`ViscousLoopParams::ramp_length`]
/// body lengths downstream, so the dead water's edge leaves tangentially
/// and turns to the stream instead of making a concave corner.
struct DeadWater<'a> {
    mesh: &'a PanelMesh,
    v_inf: Vector,
    /// The ramp's length, m.
    ramp: f64,
    far_field_ratio: f64,
    source: Vec<Option<u32>>,
    dead: Vec<bool>,
    /// Outflow `v_n` of each dead panel, fixed when it joined.
    outflow: Vec<(usize, f64)>,
    /// Right-hand-side change of all of `outflow` so far.
    rhs: Vec<f64>,
    /// How many entries of `outflow` are in `rhs`.
    summed: usize,
}

/// The dead water's outflow for one pass: `(panel, v_n)` and the
/// right-hand-side change it makes.
#[derive(Debug, Clone, Copy, Default)]
struct Outflow<'b> {
    panels: &'b [(usize, f64)],
    rhs: &'b [f64],
}

/// The flow at the separation line runs along the stream when within this
/// angle of it (degrees).
const ALONG_STREAM_DEG: f64 = 10.0;

/// A panel whose outward normal is within this angle of the stream faces
/// downstream (a base); its outflow is never ramped (degrees).
const BASE_NORMAL_DEG: f64 = 45.0;

impl<'a> DeadWater<'a> {
    fn new(mesh: &'a PanelMesh, v_inf: Vector, params: &ViscousLoopParams) -> Self {
        let (lo, hi) = mesh.bounds();
        let along = (hi - lo).dot(&v_inf.normalize()).abs().max(1e-9);
        Self {
            mesh,
            v_inf,
            ramp: params.ramp_length * along,
            far_field_ratio: params.potential.far_field_ratio,
            source: vec![None; mesh.len()],
            dead: vec![false; mesh.len()],
            outflow: Vec::new(),
            rhs: vec![0.0; mesh.len()],
            summed: 0,
        }
    }

    fn count(&self) -> usize {
        self.dead.iter().filter(|&&d| d).count()
    }

    /// Add the separated panels of `layer` (on the flow `velocity`), each
    /// with its outflow; returns how many were new.
    fn grow(&mut self, layer: &BoundaryLayer, velocity: &[Vector]) -> usize {
        let mut added = 0;
        for (t, l) in layer.panels.iter().enumerate() {
            if l.state == FlowState::Separated && !self.dead[t] {
                self.dead[t] = true;
                self.source[t] = layer.separation_source[t];
                let v = self.weight(t, velocity) * self.mesh.panels[t].normal.dot(&self.v_inf);
                if v > 0.0 {
                    self.outflow.push((t, v));
                }
                added += 1;
            }
        }
        added
    }

    /// Every outflow so far, its right-hand side brought up to date with
    /// the panels added since the last call (the influence of each panel
    /// is summed once).
    fn outflow(&mut self) -> Outflow<'_> {
        let new = &self.outflow[self.summed..];
        if !new.is_empty() {
            let extra = source_sum(self.mesh, new, self.far_field_ratio);
            self.rhs.iter_mut().zip(extra).for_each(|(r, e)| *r += e);
            self.summed = self.outflow.len();
        }
        Outflow {
            panels: &self.outflow,
            rhs: &self.rhs,
        }
    }

    /// Mark every dead-water panel separated in `layer`, with its source
    /// (the panels no streamline reached among them then count as
    /// resolved: the dead water holds them).
    fn impose(&self, layer: &mut BoundaryLayer) {
        for (t, &d) in self.dead.iter().enumerate() {
            if d {
                // As a separated station holds it: no wall friction.
                layer.panels[t].state = FlowState::Separated;
                layer.panels[t].risk = 1.0;
                layer.panels[t].cf = 0.0;
                if layer.separation_source[t].is_none() {
                    layer.separation_source[t] = self.source[t];
                }
            }
        }
        layer.unresolved = layer
            .panels
            .iter()
            .filter(|p| p.state == FlowState::Unresolved)
            .count();
    }

    /// The weight `w` of dead panel `t` (see the type's doc).
    fn weight(&self, t: usize, velocity: &[Vector]) -> f64 {
        let mesh = self.mesh;
        let stream = self.v_inf.normalize();
        let Some(s) = self.source[t].map(|s| s as usize) else {
            return 1.0;
        };
        if mesh.panels[t].normal.dot(&stream) > BASE_NORMAL_DEG.to_radians().cos() {
            return 1.0;
        }
        let along = velocity[s]
            .try_normalize(1e-12)
            .is_none_or(|d| d.dot(&stream) > ALONG_STREAM_DEG.to_radians().cos());
        if along {
            return 1.0;
        }
        let d = (mesh.panels[t].centroid - mesh.panels[s].centroid).norm();
        (d / self.ramp).min(1.0)
    }
}

/// Fix the level of the dead-water potential.
///
/// A wake tube shed from a closed line (a base perimeter) with the strength
/// `mu_attached - mu_separated` and the separated panels inside the line
/// enclose a region no collocation point lies in: adding a constant `c` to
/// the separated panels and `-c` to the tube leaves every boundary
/// condition unchanged (a closed doublet surface of uniform strength
/// induces no potential outside it; Katz & Plotkin 2001, sec. 3.5 (from
/// memory)), so the Dirichlet matrix is singular. That constant changes no
/// velocity anywhere; it is pinned by a rank-one term per separated region
/// (see [`dead_water_regions`]): `C_ij += 1/2 A_j / A_K` for `i, j` in region `K`,
/// which asks the area-mean `mu` of the region to vanish.
fn pin_dead_water(system: &mut InfluenceSystem, mesh: &PanelMesh, edges: &[TrailingEdge]) {
    for region in dead_water_regions(mesh, edges) {
        let total: f64 = region.iter().map(|&p| mesh.panels[p].area).sum();
        for &j in &region {
            let mut column = vec![0.0; mesh.len()];
            for &i in &region {
                column[i] = 0.5 * mesh.panels[j].area / total;
            }
            system.add_to_column(j, &column);
        }
    }
}

/// The patches of panels that, with their sheets, close a region: the
/// components of the mesh cut along the sheet edges that lie on the
/// separated (lower) side of every sheet on their boundary. Only those
/// carry the constant mode; a patch on the attached side of a sheet does
/// not.
fn dead_water_regions(mesh: &PanelMesh, edges: &[TrailingEdge]) -> Vec<Vec<usize>> {
    let cut: HashSet<[u32; 2]> = dedup(edges).into_iter().collect();
    let mut label = vec![usize::MAX; mesh.len()];
    let mut regions: Vec<Vec<usize>> = Vec::new();
    for seed in edges.iter().flat_map(|e| [e.lower, e.upper]) {
        if label[seed] != usize::MAX {
            continue;
        }
        let id = regions.len();
        label[seed] = id;
        let (mut region, mut stack) = (Vec::new(), vec![seed]);
        while let Some(t) = stack.pop() {
            region.push(t);
            let tri = mesh.triangles[t];
            for k in 0..3 {
                let Some(o) = mesh.edge_neighbours[t][k].map(|o| o as usize) else {
                    continue;
                };
                let (a, b) = (tri[k], tri[(k + 1) % 3]);
                if label[o] == usize::MAX && !cut.contains(&[a.min(b), a.max(b)]) {
                    label[o] = id;
                    stack.push(o);
                }
            }
        }
        regions.push(region);
    }
    group_modes(mesh, edges, &label, regions)
}

/// Which patches carry a constant mode together: start from every patch
/// but the largest (the live body), drop any patch on the attached side of
/// a sheet whose separated side is not kept, until none is dropped; then
/// join the kept patches that share a sheet (a sheet with both sides in
/// the mode carries no strength change, e.g. a slant's rear edge between a
/// separated slant and the base).
fn group_modes(
    mesh: &PanelMesh,
    edges: &[TrailingEdge],
    label: &[usize],
    regions: Vec<Vec<usize>>,
) -> Vec<Vec<usize>> {
    let area = |r: &Vec<usize>| r.iter().map(|&p| mesh.panels[p].area).sum::<f64>();
    let live = (0..regions.len()).max_by(|&x, &y| area(&regions[x]).total_cmp(&area(&regions[y])));
    let mut keep: Vec<bool> = (0..regions.len()).map(|r| Some(r) != live).collect();
    let side = |p: usize| (label[p] != usize::MAX).then_some(label[p]);
    loop {
        let mut dropped = false;
        for e in edges {
            let (Some(up), low) = (side(e.upper), side(e.lower)) else {
                continue;
            };
            if keep[up] && !low.is_some_and(|l| keep[l]) {
                keep[up] = false;
                dropped = true;
            }
        }
        if !dropped {
            break;
        }
    }
    let mut parent: Vec<usize> = (0..regions.len()).collect();
    let find = |parent: &Vec<usize>, mut x: usize| {
        while parent[x] != x {
            x = parent[x];
        }
        x
    };
    for e in edges {
        if let (Some(up), Some(low)) = (side(e.upper), side(e.lower))
            && keep[up]
            && keep[low]
        {
            let (ru, rl) = (find(&parent, up), find(&parent, low));
            parent[ru] = rl;
        }
    }
    let mut groups: Vec<Vec<usize>> = vec![Vec::new(); regions.len()];
    for (r, region) in regions.into_iter().enumerate() {
        if keep[r] {
            groups[find(&parent, r)].extend(region);
        }
    }
    groups.into_iter().filter(|g| !g.is_empty()).collect()
}

fn dedup(edges: &[TrailingEdge]) -> Vec<[u32; 2]> {
    let set: HashSet<[u32; 2]> = edges
        .iter()
        .map(|e| [e.start.min(e.end), e.start.max(e.end)])
        .collect();
    set.into_iter().collect()
}

/// Hoerner's base-drag correlation for three-dimensional bodies,
/// `C_DB = 0.029 / sqrt(C_Df)` with `C_Df` the forebody skin-friction drag
/// on the base area (Hoerner, *Fluid-Dynamic Drag*, 1965, ch. 3 (from
/// memory)): a thicker boundary layer arriving at the base feeds a weaker
/// base suction. Here the base is the dead water's area projected on the
/// plane normal to `stream` (separated panels facing downstream) and the
/// friction is `friction` (on the free-stream dynamic pressure, see
/// [`crate::loads::friction_vectors`]) over the attached panels; the
/// result is the dead water's pressure coefficient `-C_DB`. `None` when
/// there is no dead water facing downstream or no friction.
pub fn hoerner_base_cp(
    mesh: &PanelMesh,
    layer: &BoundaryLayer,
    friction: &[Vector],
    stream: &Vector,
) -> Option<f64> {
    let u = stream.normalize();
    let (mut base, mut drag) = (0.0, 0.0);
    for ((p, l), f) in mesh.panels.iter().zip(&layer.panels).zip(friction) {
        if l.state == FlowState::Separated {
            base += p.area * p.normal.dot(&u).max(0.0);
        } else {
            drag += p.area * f.dot(&u);
        }
    }
    (base > 0.0 && drag > 0.0)
        .then(|| -HOERNER_BASE_DRAG / (drag / base).max(HOERNER_MIN_FRICTION).sqrt())
}

/// Smallest forebody friction coefficient (on the base area) the
/// correlation is applied with: it grows without bound as the friction
/// vanishes (a large dead water behind a short laminar forebody), so the
/// base suction is capped at `0.029 / sqrt(0.004)`, Cp -0.46. The value is
/// our choice, not Hoerner's.
pub const HOERNER_MIN_FRICTION: f64 = 0.004;

/// The constant of [`hoerner_base_cp`] (Hoerner 1965, ch. 3 (from memory)).
pub const HOERNER_BASE_DRAG: f64 = 0.029;

/// Pressure with the dead water at one pressure: every separated panel
/// holds [`hoerner_base_cp`], attached panels keep `cp`, but no lower than
/// the dead water's beside a rim the flow leaves
/// ([`BoundaryLayer::rim_zone`]: the speed there is at most the free
/// streamline's, whose pressure is the dead water's). An open wake
/// (the loop's dead water) is Kirchhoff's free-streamline limit, whose own
/// base suction is known to be far too weak (Roshko 1955), so the dead
/// water's pressure is taken from the correlation instead. Falls back to
/// the plateau model ([`crate::boundary_layer::plateau_cp`]) when the
/// correlation has no base to act on.
///
/// # Panics
/// If `cp`, `layer` or `friction` do not have one entry per panel (a
/// programmer mistake).
#[track_caller]
pub fn dead_water_cp(
    mesh: &PanelMesh,
    cp: &[f64],
    layer: &BoundaryLayer,
    friction: &[Vector],
    stream: &Vector,
) -> Vec<f64> {
    assert_eq!(friction.len(), mesh.len(), "one friction vector per panel");
    assert_eq!(cp.len(), mesh.len(), "one Cp per panel");
    assert_eq!(layer.panels.len(), mesh.len(), "one layer per panel");
    assert_eq!(layer.rim_zone.len(), mesh.len(), "one rim flag per panel");
    let Some(cpb) = hoerner_base_cp(mesh, layer, friction, stream) else {
        return crate::boundary_layer::plateau_cp(mesh, cp, layer);
    };
    // Attached panels keep `cp`, but no lower than the dead water's beside
    // a rim the flow leaves (the free streamline's bound).
    layer
        .panels
        .iter()
        .zip(cp)
        .zip(&layer.rim_zone)
        .map(|((l, &c), &rim)| {
            if l.state == FlowState::Separated {
                cpb
            } else if rim {
                c.max(cpb)
            } else {
                c
            }
        })
        .collect()
}

/// Base pressure coefficient: the area-weighted mean Cp over the panels
/// facing downstream (outward normal within `base_normal_deg` of the free
/// stream `stream`); `None` for a body without such panels.
pub fn base_pressure(
    mesh: &PanelMesh,
    cp: &[f64],
    stream: &Vector,
    base_normal_deg: f64,
) -> Option<f64> {
    let u = stream.normalize();
    let cos = base_normal_deg.to_radians().cos();
    let (sum, area) = mesh
        .panels
        .iter()
        .zip(cp)
        .filter(|(p, _)| p.normal.dot(&u) > cos)
        .fold((0.0, 0.0), |(s, a), (p, c)| (s + c * p.area, a + p.area));
    (area > 0.0).then(|| sum / area)
}
