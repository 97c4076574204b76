//! The viscous-inviscid loop: separated wakes from the separation lines the
//! boundary layer finds, solved again until the lines stop moving.
//!
//! Pass 1 is the attached potential flow and its boundary layer (the
//! plateau model of [`crate::boundary_layer::plateau_cp`] gives its
//! separated pressure). Each later pass sheds a flat doublet wake along the
//! free stream from the bluff-base perimeter and from the upstream boundary
//! of every separated region ([`crate::wake::separated`]), with the
//! Kutta-type strength `mu_attached - mu_separated` folded into the columns
//! of the assembled body matrix ([`crate::wake::add_wake_columns`]; the body
//! matrix is assembled once and copied each pass), solves, and marches the
//! boundary layer again on the new surface velocity. The pressure in the
//! separated regions then comes from the solution with its wakes. This is
//! the displacement-free, fixed-wake form of the free-streamline wake models
//! for bluff bodies (Hoerner, *Fluid-Dynamic Drag*, 1965, ch. 3; the wake
//! panels as in Katz & Plotkin, 2001, sec. 12.3); the wake does not roll
//! up and carries no displacement thickness.
//!
//! The loop stops when fewer than [`ViscousLoopParams::change_fraction`] of
//! the previously separated panels change state between two passes (less
//! than one panel row on the meshes this tool uses), or after
//! [`ViscousLoopParams::max_passes`] passes.

use std::collections::HashSet;

use tuft_mesh::{PanelMesh, Vector};

use crate::assemble::{InfluenceSystem, assemble};
use crate::boundary_layer::{
    BoundaryLayer, BoundaryLayerError, BoundaryLayerParams, FlowState, screen_boundary_layer,
};
use crate::potential::{
    Freestream, PotentialParams, PotentialSolution, post_process, solve_system,
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
    /// Most passes, the attached pass included. Default 4.
    pub max_passes: usize,
    /// Converged when fewer than this fraction of the previously separated
    /// panels (at least one panel) change state. Default 0.03.
    pub change_fraction: f64,
    /// Wake length in body lengths. Default 20.
    pub wake_length: f64,
    /// Where the sheets leave the body.
    pub lines: SeparationLineParams,
    /// Potential-flow settings.
    pub potential: PotentialParams,
    /// Boundary-layer settings.
    pub layer: BoundaryLayerParams,
}

impl Default for ViscousLoopParams {
    fn default() -> Self {
        Self {
            max_passes: 4,
            change_fraction: 0.03,
            wake_length: 20.0,
            lines: SeparationLineParams::default(),
            potential: PotentialParams::default(),
            layer: BoundaryLayerParams::default(),
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
    /// Panels whose separated/not-separated state changed at each pass
    /// after the first.
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
/// outside 0..1 or a wake length that is not positive; the solver's and the
/// boundary layer's errors.
pub fn viscous_loop_with_params(
    mesh: &PanelMesh,
    fs: &Freestream,
    params: &ViscousLoopParams,
) -> Result<ViscousLoop, ViscousLoopError> {
    check(params)?;
    fs.check(&mesh.mirrors).map_err(WakeError::from)?;
    let body = assemble(mesh, &params.potential).map_err(WakeError::from)?;
    let u = fs.velocity().normalize();
    let base = base_edges(mesh, &u, &params.lines);
    let attached = run_pass(mesh, fs, &body, Vec::new(), params)?;
    let mut last = attached.clone();
    let (mut passes, mut converged, mut changes) = (1, false, Vec::new());
    let mut diverged = false;
    while passes < params.max_passes {
        let mut edges = base.clone();
        let states: Vec<FlowState> = last.layer.panels.iter().map(|l| l.state).collect();
        let velocity = &last.solution.velocity;
        edges.extend(separation_edges(
            mesh,
            &states,
            velocity,
            &u,
            &base,
            &params.lines,
        ));
        if edges.is_empty() {
            converged = true;
            break;
        }
        let next = run_pass(mesh, fs, &body, edges, params)?;
        passes += 1;
        if blown_up(&attached.solution.mu, &next.solution.mu) {
            diverged = true;
            break;
        }
        let (moved, before) = moved(&last.layer, &next.layer);
        changes.push(moved);
        last = next;
        if (moved as f64) < (params.change_fraction * before as f64).max(1.0) {
            converged = true;
            break;
        }
    }
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
    Ok(())
}

/// Panels whose separated state differs between two layers, and the number
/// separated in the first.
fn moved(before: &BoundaryLayer, after: &BoundaryLayer) -> (usize, usize) {
    let sep = |l: &crate::boundary_layer::PanelLayer| l.state == FlowState::Separated;
    let changed = before
        .panels
        .iter()
        .zip(&after.panels)
        .filter(|(a, b)| sep(a) != sep(b))
        .count();
    (changed, before.panels.iter().filter(|l| sep(l)).count())
}

/// Solve with wakes from `edges` (none: the attached flow) and march the
/// boundary layer.
fn run_pass(
    mesh: &PanelMesh,
    fs: &Freestream,
    body: &InfluenceSystem,
    edges: Vec<TrailingEdge>,
    params: &ViscousLoopParams,
) -> Result<LoopPass, ViscousLoopError> {
    let v_inf = fs.velocity();
    let u: Vector = v_inf / fs.speed;
    let (lo, hi) = mesh.bounds();
    let length = (hi.x - lo.x).max(1e-3 * (hi - lo).amax()) * params.wake_length;
    let panels = wake_panels(mesh, &edges, &u, length);
    let mut system = body.clone();
    add_wake_columns(&mut system, mesh, &edges, &panels)?;
    pin_dead_water(&mut system, mesh, &edges);
    let rhs = system.rhs(&v_inf);
    let (mut mus, stats) =
        solve_system(system, vec![rhs], &params.potential).map_err(WakeError::from)?;
    let mu = mus.pop().unwrap_or_default();
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
    let layer = screen_boundary_layer(mesh, &solution.velocity, fs.speed, &params.layer)?;
    Ok(LoopPass {
        solution,
        layer,
        wake: Wake { panels, strength },
        edges,
    })
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
