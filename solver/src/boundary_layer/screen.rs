//! The public 3D entry: trace surface streamlines from the attachment
//! points, march the boundary layer along each, and give every panel a
//! state and a separation risk.
//!
//! Rules beyond the published methods (each is common practice, stated here
//! so a reader can weigh the verdicts):
//!
//! - **Bluff edges.** Where a streamline crosses a sharp convex edge and the
//!   flow direction turns down round it by more than
//!   `params.base_edge_turn_deg` (a bluff base edge; not from a surface
//!   facing upstream, the rim of a flat nose, round which the flow
//!   reattaches; never in a concave corner, where the flow on the
//!   facets of a stagnating corner can run down the face and seem to turn
//!   down: the flow leaves a surface only where it falls away), the flow
//!   is taken to leave the surface at the edge: the line separates at the crossing
//!   whatever the boundary layer says, is traced on, and every panel
//!   downstream along it is separated; its plateau pressure is that of the
//!   last clean panel before the edge. Attached potential flow turns any
//!   corner with a
//!   suction peak that grows without bound as the panels shrink, so no
//!   verdict can rest on it. A gentler turn (a 10-40 degree slant) is left to
//!   the boundary layer.
//! - **Edge peaks.** Where a streamline crosses a sharp convex edge
//!   (dihedral angle of `params.sharp_edge_deg` or more), the speed the
//!   march sees on the two panels either side of the crossing, and at every
//!   station within `params.edge_window_thicknesses` boundary-layer
//!   thicknesses of it, is the linear interpolation between the last
//!   station before and the first station after them (held at the value
//!   before when the edge is a bluff edge), so the edge's mesh-dependent
//!   suction peak and its recovery do not drive `H` further on. The
//!   thickness is the turbulent flat-plate one at the crossing's distance
//!   `x` from the nose, `delta = 0.37 x Re_x^(-1/5)` (Prandtl's 1/7-power
//!   law; Schlichting, *Boundary-Layer Theory*, ch. 21). Why a physical
//!   length and not whole panels: the vertex interpolation carries a
//!   panel's peak onto the next row of panels, and the stations may or may
//!   not fall on the panels beside the edge, so a window of panels leaves a
//!   remnant of the peak that changes with the mesh (on the slant-back body
//!   the slant's shape factor moved by up to 0.05 when the panels doubled).
//!   The integral method assumes an edge flow that varies slowly over a
//!   boundary-layer thickness, and the real layer's displacement smooths a
//!   corner's suction over about that length (viscous-inviscid
//!   interaction), so the march can be given no detail finer than a
//!   couple of thicknesses (a factor 2, the default, is our choice; 0
//!   keeps the window of panels, see the setting's doc). Edges the flow runs
//!   along are left alone.
//! - **Rims.** Where a line from a surface facing upstream turns round a
//!   rim (a sharp edge, chamfer or rounding tighter than [`RIM_RADIUS`]
//!   of the frontal size), the flow leaves the rim and reattaches: the
//!   speed beside it is capped at the free streamline's
//!   ([`BoundaryLayer::rim_zone`], [`RIM_CP`]).
//! - **Short bubbles.** A turbulent separation in a concave corner facing
//!   the stream (the foot of a windscreen) closes again when the edge speed
//!   recovers within a few thicknesses, as does one ahead of a face into
//!   the stream high enough to catch its shear layer (its height taken
//!   from the face round where the line meets it, `FaceRegions`), or one whose line
//!   passes round such a face's side (a pillar); see
//!   [`march::march_line`] and `params.reattach_thicknesses`.
//! - **Wakes behind protuberances.** A line that runs down a face turned
//!   downstream, over a bluff rim or a rounded one, and lands on a wall
//!   (a mirror's back, then the flank) reattaches within a few heights of
//!   that back ([`march::WAKE_REATTACHMENT_HEIGHTS`]), unless it separated
//!   before the back, or meets another such face or bluff edge or ends
//!   first (`LineContext::wake_landings`). A line that passes beside the
//!   protuberance and separates on the wall in the zone between where
//!   those lines landed and where they reattached (within the back's
//!   height across the stream) closes with them (`LineContext::lee_back`):
//!   once every line is marched, it is marched again with that bubble.
//! - **Several lines on a panel.** A panel crossed by several streamlines
//!   keeps the one with the highest risk (the screening errs on the side of
//!   separation).
//! - **Fill.** Panels no line crossed take the state of the nearest crossed
//!   panel within `params.fill_hops` edge steps, never across a sharp convex
//!   edge; the rest are counted as [`FlowState::Unresolved`].
//! - **Stations.** Each line is marched on stations half the median panel
//!   size apart, the speed interpolated linearly from the vertex speeds.
//!
//! Streamlines are traced and marched in parallel; each is independent and
//! the results are combined in seed order, so the output does not depend on
//! the number of threads.

use std::collections::VecDeque;
use std::f64::consts::PI;

use nalgebra::{Point3, Vector3};
use rayon::prelude::*;
use tuft_mesh::PanelMesh;

use super::attachment::{self, Seed};
use super::coverage;
use super::field::{SurfaceField, rise, sharp_convex};
use super::march::{self, LineMarch, LineSample, LineStart, WAKE_FOOT_TURN, WakeBack};
use super::streamlines::{Trace, Tracer};
use super::{BoundaryLayerError, BoundaryLayerParams, FlowState, thwaites};

/// The boundary layer on one panel.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PanelLayer {
    /// Momentum thickness, m.
    pub theta: f64,
    /// Displacement thickness, m.
    pub delta_star: f64,
    /// Shape factor `delta* / theta`.
    pub h: f64,
    /// Skin-friction coefficient on the local edge speed (zero where
    /// separated or unresolved).
    pub cf: f64,
    /// Momentum-thickness Reynolds number.
    pub re_theta: f64,
    /// Laminar, turbulent, separated or unresolved.
    pub state: FlowState,
    /// How close the layer came to its separation criterion, 0..1 (1 where
    /// separated, 0 where unresolved).
    pub risk: f64,
}

impl PanelLayer {
    /// The layer of a panel no streamline reached.
    pub fn unresolved() -> Self {
        Self {
            theta: 0.0,
            delta_star: 0.0,
            h: 0.0,
            cf: 0.0,
            re_theta: 0.0,
            state: FlowState::Unresolved,
            risk: 0.0,
        }
    }
}

/// One traced surface streamline.
#[derive(Debug, Clone, PartialEq)]
pub struct Streamline {
    /// Points on the surface; `points[i]` starts the segment in `panels[i]`.
    pub points: Vec<Point3<f64>>,
    /// Panel of each segment (`points.len() == panels.len() + 1`).
    pub panels: Vec<u32>,
    /// Index into `points` where the line separates, if it does.
    pub separated_at: Option<usize>,
}

/// The screening result.
#[derive(Debug, Clone, PartialEq)]
pub struct BoundaryLayer {
    /// One entry per panel.
    pub panels: Vec<PanelLayer>,
    /// The traced lines.
    pub streamlines: Vec<Streamline>,
    /// Number of panels left [`FlowState::Unresolved`].
    pub unresolved: usize,
    /// Panels where a streamline turned turbulent (sorted, unique).
    pub transition_panels: Vec<u32>,
    /// Panels where a streamline separated (sorted, unique).
    pub separation_panels: Vec<u32>,
    /// For each separated panel, the panel whose pressure holds at its
    /// separation point (the last panel before the separation point that is
    /// not beside a sharp-edge crossing); `None` elsewhere.
    pub separation_source: Vec<Option<u32>>,
    /// The attachment panels the lines started from.
    pub attachments: Vec<u32>,
    /// Panels beside a sharp rim a line turns round from an
    /// upstream-facing surface (the rim of a flat nose, a tyre's
    /// shoulder): the flow leaves the rim and reattaches behind it, so the
    /// speed is at most that on the free streamline leaving the rim, on the
    /// wetted face ahead of it (Kirchhoff's free-streamline flow; Roshko
    /// 1955) and under the separated shear layer behind it. Attached
    /// potential flow exceeds that many times over next to the rim. The
    /// zone is the upstream-facing panels along the line up to the rim, the
    /// panels across it, and the panels after it until the attached speed
    /// falls to the speed at [`RIM_CP`]; the march's speed is capped there
    /// at that speed, and the loads hold the zone's pressure no lower than
    /// the dead water's after the separated-flow loop, [`RIM_CP`] in the
    /// plateau model.
    /// Panels no line crossed take the flag with the state the fill gives
    /// them, and the zone spreads by two edge steps to panels behind it
    /// faster than that speed (`spread_rim_zone`).
    pub rim_zone: Vec<bool>,
}

/// Screen the boundary layer over `mesh` from one surface velocity per panel
/// (m/s) and the free-stream `speed` (m/s): Thwaites (1949), Michel (1951),
/// Head (1958) with Ludwieg-Tillmann (1949) along surface streamlines with
/// the spreading term of Rott & Crabtree (1952). See the module doc for the
/// rules added to the published methods.
///
/// Use `&BoundaryLayerParams::default()` for the defaults (free transition
/// by Michel, sea-level air).
///
/// # Errors
/// [`BoundaryLayerError::VelocityCount`], [`BoundaryLayerError::NonFiniteVelocity`]
/// (naming the panel), [`BoundaryLayerError::BadSpeed`],
/// [`BoundaryLayerError::BadParameter`], [`BoundaryLayerError::NoAttachment`].
pub fn screen_boundary_layer(
    mesh: &PanelMesh,
    velocity: &[Vector3<f64>],
    speed: f64,
    params: &BoundaryLayerParams,
) -> Result<BoundaryLayer, BoundaryLayerError> {
    check_inputs(mesh, velocity, speed)?;
    params.validate()?;
    let field = SurfaceField::new(mesh, velocity);
    let flow_dir = flow_direction(mesh, velocity, params);
    let tracer = Tracer {
        mesh,
        field: &field,
        stop_speed: params.stop_speed_fraction * speed,
        max_steps: params.max_steps,
    };
    let mut attachments = attachment::find_attachments(
        mesh,
        &field,
        &flow_dir,
        params.attachment_speed_fraction * speed,
    );
    if attachments.is_empty() {
        attachments.extend(attachment::fallback_attachment(mesh, &field, &flow_dir));
    }
    if attachments.is_empty() {
        return Err(BoundaryLayerError::NoAttachment);
    }
    let count = seed_count(mesh, params);
    let seeds: Vec<Seed> = attachments
        .iter()
        .flat_map(|&a| attachment::ring_seeds(&tracer, a, count, 1.5, &flow_dir))
        .collect();
    let ctx = LineContext::new(mesh, &field, &flow_dir, speed, params);
    let mut lines: Vec<LineResult> = seeds
        .par_iter()
        .map(|seed| ctx.run(&tracer, seed))
        .collect();
    let limits = coverage::StartLimits {
        start_speed: coverage::START_SPEED_FRACTION * speed,
        bluff_edge_deg: params.base_edge_turn_deg,
        flow_dir,
    };
    for _ in 0..COVERAGE_ROUNDS {
        let targets = coverage::spread_targets(mesh, &covered(mesh, &lines));
        if targets.is_empty() {
            break;
        }
        let extra: Vec<LineResult> = targets
            .par_iter()
            .filter_map(|&t| coverage::line_through(&tracer, t, &attachments, &limits))
            .map(|(seed, trace)| ctx.run_trace(&seed, trace))
            .collect();
        lines.extend(extra);
    }
    // The lee rule (`LineContext::lee_back`): lines that separated in the
    // wake of a protuberance they passed are marched again, closing where
    // the wake does.
    let zones: Vec<WakeZone> = lines.iter().flat_map(|l| l.wakes.iter().copied()).collect();
    lines.par_iter_mut().for_each(|l| {
        if let Some(lee) = l.lee.take()
            && let Some(back) = ctx.lee_back(&lee, &zones)
        {
            *l = ctx.march_trace(&lee.seed, lee.trace, Some(back));
        }
    });
    let mut layer = combine(mesh, lines, attachments, params);
    spread_rim_zone(
        mesh,
        &mut layer.rim_zone,
        &field.speed,
        rim_speed(speed),
        &flow_dir,
    );
    Ok(layer)
}

/// Edge steps by which the rim zone spreads to panels no rim line crossed
/// ([`spread_rim_zone`]).
const RIM_SPREAD_HOPS: usize = 2;

/// Spread the rim zone to panels within [`RIM_SPREAD_HOPS`] edge steps
/// that do not face upstream and whose attached speed exceeds `cap` (the
/// speed at [`RIM_CP`]): the lines that reach a rim do not cross every
/// panel behind it, and a panel they missed kept the attached flow's
/// suction (a review's flat-nosed coupe: Cp -2.14 behind a corner of the
/// nose face, -0.15 at its mirror image; -1.29 at worst after the spread).
/// Panels facing upstream are left to the lines: spread to them, and four
/// steps instead of two, the zone grew round spurious rims on coarse
/// panels (a van's 200 mm radius at 2,000 panels: C_D 0.38 to 0.55).
fn spread_rim_zone(
    mesh: &PanelMesh,
    zone: &mut [bool],
    speed: &[f64],
    cap: f64,
    flow_dir: &Vector3<f64>,
) {
    let mut depth: Vec<usize> = zone
        .iter()
        .map(|&z| if z { 0 } else { usize::MAX })
        .collect();
    let mut queue: VecDeque<usize> = (0..zone.len()).filter(|&t| zone[t]).collect();
    while let Some(t) = queue.pop_front() {
        if depth[t] >= RIM_SPREAD_HOPS {
            continue;
        }
        for j in mesh.edge_neighbours[t].iter().flatten() {
            let j = *j as usize;
            let behind = !faces_upstream(mesh, j, flow_dir);
            if depth[j] == usize::MAX && speed[j] > cap && behind {
                depth[j] = depth[t] + 1;
                zone[j] = true;
                queue.push_back(j);
            }
        }
    }
}

/// The largest rounding of a rim on `mesh` in a stream along `flow_dir`, m:
/// [`RIM_RADIUS`] of the frontal size `sqrt(w h)` (the body's extents
/// across the stream, horizontal `w` doubled for a half model).
pub fn rim_radius(mesh: &PanelMesh, flow_dir: &Vector3<f64>) -> f64 {
    RIM_RADIUS * frontal_size(mesh, &flow_dir.normalize())
}

/// `sqrt(w h)` of the body's extents across `flow_dir`: `w` horizontal
/// (doubled for a half model), `h` vertical.
fn frontal_size(mesh: &PanelMesh, flow_dir: &Vector3<f64>) -> f64 {
    let side = flow_dir
        .cross(&Vector3::z())
        .try_normalize(1e-9)
        .unwrap_or_else(Vector3::y);
    let up = side.cross(flow_dir).normalize();
    let extent = |axis: &Vector3<f64>| {
        let (lo, hi) = mesh
            .vertices
            .iter()
            .map(|p| p.coords.dot(axis))
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), x| {
                (lo.min(x), hi.max(x))
            });
        (hi - lo).max(0.0)
    };
    (mesh.mirrors.whole_body_factor() * extent(&side) * extent(&up)).sqrt()
}

/// Rounds of upstream seeding for panels the attachment rings missed
/// ([`coverage`]).
const COVERAGE_ROUNDS: usize = 3;

/// Panels crossed by at least one line.
fn covered(mesh: &PanelMesh, lines: &[LineResult]) -> Vec<bool> {
    let mut out = vec![false; mesh.len()];
    for c in lines.iter().flat_map(|l| &l.contributions) {
        out[c.panel as usize] = true;
    }
    out
}

/// Validate the per-panel inputs.
fn check_inputs(
    mesh: &PanelMesh,
    velocity: &[Vector3<f64>],
    speed: f64,
) -> Result<(), BoundaryLayerError> {
    if velocity.len() != mesh.len() {
        return Err(BoundaryLayerError::VelocityCount {
            panels: mesh.len(),
            velocities: velocity.len(),
        });
    }
    if let Some(panel) = velocity
        .iter()
        .position(|v| !v.iter().all(|c| c.is_finite()))
    {
        return Err(BoundaryLayerError::NonFiniteVelocity { panel });
    }
    if !(speed.is_finite() && speed > 0.0) {
        return Err(BoundaryLayerError::BadSpeed { speed });
    }
    Ok(())
}

/// The free-stream direction: given, or the direction of the area-weighted
/// mean surface velocity (along the stream for a closed body).
fn flow_direction(
    mesh: &PanelMesh,
    velocity: &[Vector3<f64>],
    params: &BoundaryLayerParams,
) -> Vector3<f64> {
    let given = params.flow_direction.and_then(|d| d.try_normalize(1e-12));
    given.unwrap_or_else(|| {
        let mean: Vector3<f64> = mesh
            .panels
            .iter()
            .zip(velocity)
            .map(|(p, v)| v * p.area)
            .sum();
        mean.try_normalize(1e-300).unwrap_or_else(Vector3::x)
    })
}

/// Seeds per attachment point: the setting, or `2 sqrt(panels)` clamped to
/// 32..=1024 (about one line per panel width round the widest girth of a
/// compact body).
fn seed_count(mesh: &PanelMesh, params: &BoundaryLayerParams) -> usize {
    if params.seeds_per_attachment > 0 {
        return params.seeds_per_attachment;
    }
    ((2.0 * (mesh.len() as f64).sqrt()) as usize).clamp(32, 1024)
}

/// What one line gives each panel it crosses.
#[derive(Debug, Clone, Copy)]
struct Contribution {
    panel: u32,
    layer: PanelLayer,
    source: Option<u32>,
    /// Beside a rim ([`BoundaryLayer::rim_zone`]).
    rim: bool,
}

/// One traced and marched line.
struct LineResult {
    line: Streamline,
    contributions: Vec<Contribution>,
    transition_panel: Option<u32>,
    separation_panel: Option<u32>,
    /// The wakes behind backs this line landed in and reattached from.
    wakes: Vec<WakeZone>,
    /// What the lee rule needs to march the line again, when it separated
    /// on a wall by the boundary layer's criterion ([`LeeLine`]).
    lee: Option<Box<LeeLine>>,
}

/// A wake bubble one line held on the wall behind a protuberance's back
/// (`march::wake_reattachment`), from where it landed to where it
/// reattached.
#[derive(Debug, Clone, Copy)]
struct WakeZone {
    landing: Point3<f64>,
    reattachment: Point3<f64>,
    /// Outward normal of the wall at the landing.
    normal: Vector3<f64>,
    /// The back's height as the line saw it, m.
    height: f64,
}

/// A line that separated on a wall by the boundary layer's criterion (not
/// at a bluff edge), kept to be marched again if its separation lies in
/// the lee of a protuberance ([`LineContext::lee_back`]).
struct LeeLine {
    seed: Seed,
    trace: Trace,
    /// The station where it separated.
    station: usize,
    /// Arc length and position of the separation.
    s: f64,
    point: Point3<f64>,
    normal: Vector3<f64>,
    /// Arc length up to which the wall behind the separation is clear
    /// ([`WakeBack::clear`]).
    clear: f64,
}

/// Shared inputs of the per-line work.
struct LineContext<'a> {
    mesh: &'a PanelMesh,
    field: &'a SurfaceField,
    flow_dir: Vector3<f64>,
    x_range: (f64, f64),
    step: f64,
    /// Free-stream speed, m/s.
    speed: f64,
    params: &'a BoundaryLayerParams,
    /// Panels whose velocity no march should trust ([`crumpled_panels`]).
    crumpled: Vec<bool>,
    /// Largest radius of a rim, m ([`RIM_RADIUS`]).
    rim_radius: f64,
    /// The regions of panels facing into the stream ([`FaceRegions`]).
    faces: FaceRegions,
}

impl<'a> LineContext<'a> {
    fn new(
        mesh: &'a PanelMesh,
        field: &'a SurfaceField,
        flow_dir: &Vector3<f64>,
        speed: f64,
        params: &'a BoundaryLayerParams,
    ) -> Self {
        let xs = mesh.vertices.iter().map(|p| p.coords.dot(flow_dir));
        let x_range = xs.fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), x| {
            (lo.min(x), hi.max(x))
        });
        let mut sizes: Vec<f64> = mesh.panels.iter().map(|p| p.size).collect();
        sizes.sort_by(f64::total_cmp);
        let median_size = sizes[sizes.len() / 2];
        let faces = FaceRegions::new(mesh, |t| faces_stream(mesh, t, flow_dir));
        Self {
            mesh,
            field,
            flow_dir: *flow_dir,
            x_range,
            step: 0.5 * median_size,
            speed,
            params,
            crumpled: crumpled_panels(mesh),
            rim_radius: rim_radius(mesh, flow_dir),
            faces,
        }
    }

    /// Trace from a seed, march, and split the result over the panels.
    fn run(&self, tracer: &Tracer, seed: &Seed) -> LineResult {
        self.run_trace(seed, tracer.trace(seed.panel, seed.point, 1.0))
    }

    /// March along an already traced line that starts at `seed`.
    fn run_trace(&self, seed: &Seed, trace: Trace) -> LineResult {
        self.march_trace(seed, trace, None)
    }

    /// March along a traced line, with a wake bubble from the lee rule
    /// opened at a station when `lee` says so ([`Self::lee_back`]).
    fn march_trace(&self, seed: &Seed, trace: Trace, lee: Option<(usize, WakeBack)>) -> LineResult {
        let arc = arc_lengths(&trace.points);
        let peak = self.peak_segments(&trace);
        let (mut samples, segments) = self.samples(&trace, &arc);
        let (rim, trips) = self.rim_segments(&trace, &arc);
        let cap = rim_speed(self.speed);
        for (sample, &seg) in samples.iter_mut().zip(&segments) {
            if rim[seg] {
                sample.speed = sample.speed.min(cap);
            }
        }
        // The layer behind a rim is tripped where the zone ends (the flow
        // has reattached there).
        for t in trips {
            if let Some(k) = segments.iter().position(|&seg| seg >= t) {
                samples[k].trip = true;
            }
        }
        let windows = self.edge_windows(&trace, &arc);
        let clipped: Vec<bool> = samples
            .iter()
            .zip(&segments)
            .map(|(sample, &seg)| {
                peak[seg] || windows.iter().any(|&(c, w)| (sample.s - c).abs() < w)
            })
            .collect();
        clip_edge_peaks(&mut samples, |k| clipped[k]);
        if let Some((k, back)) = lee
            && let Some(sample) = samples.get_mut(k)
        {
            sample.wake_back = Some(back);
        }
        let start = self.start(seed, samples.first().map_or(0.0, |s| s.speed));
        let marched = march::march_line(&samples, &start, self.params);
        let wakes = marched
            .wakes
            .iter()
            .filter_map(|&(landing, until)| {
                let (a, b) = (samples.get(landing)?, samples.get(until)?);
                Some(WakeZone {
                    landing: a.point,
                    reattachment: b.point,
                    normal: a.normal,
                    height: a.wake_back?.height,
                })
            })
            .collect();
        let lee = match lee {
            None => self.lee_line(seed, &trace, &arc, (&samples, &segments), &marched),
            Some(_) => None,
        };
        let mut out = self.split(trace, arc, &peak, rim, &samples, &marched);
        out.wakes = wakes;
        out.lee = lee;
        out
    }

    /// The line kept for the lee rule ([`LeeLine`]): it separated for good
    /// by the boundary layer's criterion (not at a bluff edge) on a wall
    /// (a panel turned from the stream by less than [`WAKE_FOOT_TURN`],
    /// not crumpled), turbulent.
    fn lee_line(
        &self,
        seed: &Seed,
        trace: &Trace,
        arc: &[f64],
        (samples, segments): (&[LineSample], &[usize]),
        marched: &LineMarch,
    ) -> Option<Box<LeeLine>> {
        let k = marched.separation?;
        let sample = samples.get(k)?;
        let before = marched.states.get(k.checked_sub(1)?)?;
        // The segment the station was sampled on (`Self::samples`).
        let seg = *segments.get(k)?;
        let panel = *trace.panels.get(seg)? as usize;
        if sample.forced_separation || !self.wall(panel) || before.state != FlowState::Turbulent {
            return None;
        }
        let forced = self.bluff_crossings(trace);
        let end = arc.last().copied().unwrap_or(0.0);
        let clear = self.clear_end(trace, &forced, seg).map_or(end, |j| arc[j]);
        Some(Box::new(LeeLine {
            seed: *seed,
            trace: trace.clone(),
            station: k,
            s: sample.s,
            point: sample.point,
            normal: *self.mesh.panels[panel].normal,
            clear,
        }))
    }

    /// The lee rule: a line that passes beside a protuberance and separates
    /// on the wall behind it, between where the lines off its back landed
    /// and where they reattached (`zones`), and within the back's height of
    /// such a landing across the stream, on a wall turned like the
    /// landing's by less than [`WAKE_FOOT_TURN`], lies in that back's wake:
    /// its bubble closes where the wake's does, abreast of the nearest such
    /// landing's reattachment along the stream. `None` when no wake holds
    /// the separation or the wall is not clear up to there.
    ///
    /// Behind a wall-mounted obstacle the separated region is one closed
    /// bubble across the obstacle's width and a little beyond it (a
    /// wall-mounted cube, Martinuzzi & Tropea 1993, from memory); the lines
    /// beside the obstacle's corners meet the attached flow's recompression
    /// behind it and separate by Head's criterion without ever running down
    /// its back (on a 6.5 cm block on a flank, 2.6 cm behind its back), so
    /// alone they would leave the flank separated to the tail. One height
    /// across the stream is our choice.
    fn lee_back(&self, lee: &LeeLine, zones: &[WakeZone]) -> Option<(usize, WakeBack)> {
        let d = self.flow_dir;
        let wall_cos = WAKE_FOOT_TURN.cos();
        let (_, remaining) = zones
            .iter()
            .filter(|z| z.height > 0.0 && z.normal.dot(&lee.normal) >= wall_cos)
            .filter_map(|z| {
                let r = lee.point - z.landing;
                let along = r.dot(&d);
                let length = (z.reattachment - z.landing).dot(&d);
                let across = (r - along * d).norm();
                (along >= 0.0 && along < length && across <= z.height)
                    .then_some((across, length - along))
            })
            .min_by(|a, b| a.0.total_cmp(&b.0))?;
        let closes_at = lee.s + remaining;
        (closes_at < lee.clear).then_some((
            lee.station,
            WakeBack {
                start: lee.s,
                foot: lee.s,
                height: 0.0,
                clear: lee.clear,
                closes_at: Some(closes_at),
            },
        ))
    }

    /// Stagnation start at distance `r` from the attachment point with
    /// `U = a s` and a point attachment (`h ~ s`, Mangler):
    /// `theta^2 = lambda0 nu r / U0`, `lambda0 = 0.05625`
    /// ([`thwaites::stagnation_lambda`] with `m = 1`).
    fn start(&self, seed: &Seed, u0: f64) -> LineStart {
        let lambda0 = thwaites::stagnation_lambda(1.0);
        let theta = if u0 > 0.0 {
            (lambda0 * self.params.nu * seed.distance / u0).sqrt()
        } else {
            0.0
        };
        LineStart {
            theta: Some(theta),
            x0: seed.distance,
            spreading_exponent: 1.0,
        }
    }

    /// Segments on the panels either side of each crossing of a sharp convex
    /// edge (the runs of segments in the panel before and after it), and
    /// segments on crumpled panels ([`crumpled_panels`]).
    fn peak_segments(&self, trace: &Trace) -> Vec<bool> {
        let p = &trace.panels;
        let mut peak: Vec<bool> = p.iter().map(|&t| self.crumpled(t as usize)).collect();
        for j in 1..p.len() {
            let (a, b) = (p[j - 1] as usize, p[j] as usize);
            if a == b || !sharp_convex(self.mesh, a, b, self.params.sharp_edge_deg) {
                continue;
            }
            let mut i = j;
            while i > 0 && p[i - 1] as usize == a {
                i -= 1;
                peak[i] = true;
            }
            let mut i = j;
            while i < p.len() && p[i] as usize == b {
                peak[i] = true;
                i += 1;
            }
        }
        peak
    }

    /// `(arc length, half-width)` of the window round each crossing of a
    /// sharp convex edge: `params.edge_window_thicknesses` turbulent
    /// flat-plate thicknesses `0.37 x Re_x^(-1/5)` (Schlichting,
    /// *Boundary-Layer Theory*, ch. 21) at the crossing's distance `x` from
    /// the nose (module doc).
    fn edge_windows(&self, trace: &Trace, arc: &[f64]) -> Vec<(f64, f64)> {
        let p = &trace.panels;
        let length = self.x_range.1 - self.x_range.0;
        (1..p.len())
            .filter(|&j| {
                let (a, b) = (p[j - 1] as usize, p[j] as usize);
                a != b && sharp_convex(self.mesh, a, b, self.params.sharp_edge_deg)
            })
            .map(|j| {
                let x = self.body_fraction(&trace.points[j]) * length;
                let re_x = self.speed * x / self.params.nu;
                let delta = if re_x > 0.0 {
                    0.37 * x * re_x.powf(-0.2)
                } else {
                    0.0
                };
                (arc[j], self.params.edge_window_thicknesses * delta)
            })
            .collect()
    }

    /// Evenly spaced stations along the trace (half the median panel size
    /// apart), with the segment holding each.
    fn samples(&self, trace: &Trace, arc: &[f64]) -> (Vec<LineSample>, Vec<usize>) {
        let total = arc.last().copied().unwrap_or(0.0);
        let n = (total / self.step).ceil().max(1.0) as usize;
        let forced = self.bluff_crossings(trace);
        let landings = self.wake_landings(trace, arc, &forced);
        let mut next_landing = 0;
        let (concave, tops) = self.concave_turns(trace);
        let mut out = Vec::with_capacity(n + 1);
        let mut segments = Vec::with_capacity(n + 1);
        let mut seg = 0;
        let mut next_forced = 0;
        for k in 0..=n {
            let s = total * k as f64 / n as f64;
            while seg + 1 < trace.panels.len() && arc[seg + 1] < s {
                seg += 1;
            }
            let Some(&panel) = trace.panels.get(seg) else {
                break;
            };
            let p = point_at(trace, arc, seg, s);
            let mut forced_here = false;
            let mut wake_back = None;
            while next_forced < forced.len() && forced[next_forced] <= seg {
                forced_here = true;
                next_forced += 1;
            }
            while next_landing < landings.len() && landings[next_landing].0 <= seg {
                wake_back = Some(landings[next_landing].1);
                next_landing += 1;
            }
            out.push(LineSample {
                s,
                speed: self.field.speed_at(self.mesh, panel as usize, &p),
                spreading: self.field.spreading[panel as usize],
                body_fraction: self.body_fraction(&p),
                forced_separation: forced_here,
                trip: false,
                concave_turn: concave[seg],
                faces_stream: self.faces_stream(panel as usize),
                wake_back,
                point: p,
                normal: *self.mesh.panels[panel as usize].normal,
                face_top: tops[seg],
            });
            segments.push(seg);
        }
        (out, segments)
    }

    fn body_fraction(&self, p: &Point3<f64>) -> f64 {
        let (lo, hi) = self.x_range;
        ((p.coords.dot(&self.flow_dir) - lo) / (hi - lo).max(1e-300)).clamp(0.0, 1.0)
    }

    /// Concave turning of the surface into the stream (radians) from the
    /// start of the line to each segment: the angle between the panels'
    /// normals at every crossing onto a panel whose centroid lies above the
    /// previous panel's plane and which faces upstream by at least
    /// [`march::BUBBLE_CONCAVE_TURN`] (the foot of a windscreen, the face
    /// of a step: the stream is pushed back onto the surface there; at the
    /// foot of a rear window the boot deck faces up, not into the stream).
    /// Also the top of the face the line last climbed onto by such a
    /// crossing ([`LineSample::face_top`]), taken where it entered that
    /// face's region, above the plane of the panel it came from.
    fn concave_turns(&self, trace: &Trace) -> (Vec<f64>, Vec<Option<Point3<f64>>>) {
        let mut acc = 0.0;
        let mut out = Vec::with_capacity(trace.panels.len());
        let mut tops = Vec::with_capacity(trace.panels.len());
        // The top of the last face climbed onto, and the region the line is
        // on while it stays on that face.
        let (mut top, mut on) = (None, None);
        for (j, &b) in trace.panels.iter().enumerate() {
            if let Some(&a) = j.checked_sub(1).and_then(|i| trace.panels.get(i))
                && a != b
            {
                let (pa, pb) = (&self.mesh.panels[a as usize], &self.mesh.panels[b as usize]);
                let region = self.faces.label[b as usize];
                if region.is_none() {
                    on = None;
                } else if rise(self.mesh, a as usize, b as usize) > 0.0 {
                    acc += pa.normal.dot(&pb.normal).clamp(-1.0, 1.0).acos();
                    if on != region {
                        top = self.faces.top(b as usize, &trace.points[j], &pa.normal);
                        on = region;
                    }
                }
            }
            out.push(acc);
            tops.push(top);
        }
        (out, tops)
    }

    /// True when panel `t` faces into the stream ([`faces_stream`]).
    fn faces_stream(&self, t: usize) -> bool {
        faces_stream(self.mesh, t, &self.flow_dir)
    }

    /// True when panel `t` faces downstream: the flow along the stream
    /// would turn down by more than the bluff-edge limit to follow it (the
    /// back of a mirror, a step or a base; not a slant of up to 50
    /// degrees, at the default limit). A crumpled panel ([`crumpled_panels`]) does not.
    fn faces_downstream(&self, t: usize) -> bool {
        let limit = self.params.base_edge_turn_deg.to_radians();
        !self.crumpled(t) && self.mesh.panels[t].normal.dot(&self.flow_dir) >= limit.sin()
    }

    /// Where the line comes off the back of a protuberance onto the wall
    /// behind it, as the line sees it ([`WakeBack`], with the segment of
    /// the landing). A wall is a panel turned from the stream by less than
    /// [`WAKE_FOOT_TURN`] either way (a flank, a roof, a bonnet), not
    /// crumpled. A back is entered on a panel facing downstream
    /// ([`Self::faces_downstream`]) after the line has left a wall, and
    /// starts where it left it (so that facets turned 20 to 50 degrees at
    /// the rim are the back's); it goes on over panels that are no wall (a
    /// mirror's housing curls under and in on its back, some facets turned
    /// only 40 degrees between steeper ones) and over the bluff edges on
    /// it, and lands on the first wall panel. A sliver of wall between two
    /// stretches of back (shorter than a station or the back's height,
    /// ended by another panel facing downstream) is part of the back. The
    /// height is how far the line's points on the back rise above the
    /// plane of the landing's panel; the wall is clear up to the next panel
    /// facing downstream or bluff crossing after the landing, or the line's
    /// end. A line that lands over a bluff edge, or whose sliver ends at
    /// one, does not land.
    fn wake_landings(
        &self,
        trace: &Trace,
        arc: &[f64],
        forced: &[usize],
    ) -> Vec<(usize, WakeBack)> {
        let p = &trace.panels;
        let down = |m: usize| self.faces_downstream(p[m] as usize);
        let wall = |m: usize| self.wall(p[m] as usize);
        let end = arc.last().copied().unwrap_or(0.0);
        let mut out = Vec::new();
        // The first segment after the last wall segment, while off a wall.
        let mut left_wall: Option<usize> = None;
        // The start of the back the line is on.
        let mut entry: Option<usize> = None;
        for m in 0..p.len() {
            if !wall(m) {
                if down(m) && entry.is_none() {
                    entry = left_wall;
                }
                continue;
            }
            let Some(j) = entry else {
                left_wall = Some(m + 1);
                continue;
            };
            let next_forced = first_after(forced, m);
            let ends = self.clear_end(trace, forced, m);
            let clear = ends.map_or(end, |k| arc[k]);
            let normal = self.mesh.panels[p[m] as usize].normal;
            let at = trace.points[m];
            let height = trace.points[j..=m]
                .iter()
                .map(|q| (q - at).dot(&normal))
                .fold(0.0, f64::max);
            let sliver = clear - arc[m] < self.step.max(height);
            if sliver && ends.is_some_and(|k| k < next_forced) {
                // A sliver of wall on the back (a facet where the housing
                // meets its stalk): the line goes on down the back.
                continue;
            }
            entry = None;
            left_wall = Some(m + 1);
            if forced.binary_search(&m).is_ok() || sliver {
                continue;
            }
            out.push((
                m,
                WakeBack {
                    start: arc[j],
                    foot: arc[m],
                    height,
                    clear,
                    closes_at: None,
                },
            ));
        }
        out
    }

    /// True when panel `t` is a wall a protuberance's wake lands on: turned
    /// from the stream by less than [`WAKE_FOOT_TURN`] either way (a flank,
    /// a roof, a bonnet), not crumpled.
    fn wall(&self, t: usize) -> bool {
        !self.crumpled(t)
            && self.mesh.panels[t].normal.dot(&self.flow_dir).abs() < WAKE_FOOT_TURN.sin()
    }

    /// The first segment after segment `m` on a face turned downstream
    /// ([`Self::faces_downstream`]) or after a bluff crossing (`forced`,
    /// sorted): the surface behind `m` is clear up to there (`None`: to
    /// the line's end).
    fn clear_end(&self, trace: &Trace, forced: &[usize], m: usize) -> Option<usize> {
        let next_forced = first_after(forced, m);
        (m + 1..trace.panels.len())
            .find(|&k| k >= next_forced || self.faces_downstream(trace.panels[k] as usize))
    }

    /// See [`crumpled_panels`].
    fn crumpled(&self, t: usize) -> bool {
        self.crumpled[t]
    }

    /// Segment indices `j` (the crossing into segment `j`) where the flow
    /// turns down round a convex edge by more than the bluff-edge limit,
    /// except from a surface that faces upstream ([`FRONT_FACING_COS`]):
    /// round such a front edge (the rim of
    /// a flat nose) the flow reattaches behind a small bubble (common
    /// practice), so the layer goes on, the edge's suction peak
    /// interpolated out. Nor next to a crumpled panel
    /// ([`crumpled_panels`]), whose normal flips with no edge of the shape
    /// there.
    fn bluff_crossings(&self, trace: &Trace) -> Vec<usize> {
        let limit = self.params.base_edge_turn_deg.to_radians();
        (1..trace.panels.len())
            .filter(|&j| {
                let (a, b) = (trace.panels[j - 1] as usize, trace.panels[j] as usize);
                self.edge_turn(trace, j).is_some_and(|t| t > limit)
                    && !self.faces_upstream(a)
                    && self.falls_away(a, b)
            })
            .collect()
    }

    /// How far the flow turns down round a convex edge at the crossing
    /// into segment `j` (radians; negative round a concave one); `None`
    /// within a panel or next to a crumpled panel ([`crumpled_panels`]).
    fn edge_turn(&self, trace: &Trace, j: usize) -> Option<f64> {
        let (a, b) = (trace.panels[j - 1] as usize, trace.panels[j] as usize);
        if a == b || self.crumpled(a) || self.crumpled(b) {
            return None;
        }
        Some(self.turn_between(a, b))
    }

    /// How far the flow turns down from panel `a` onto panel `b` (radians,
    /// negative when it turns up), from their flow directions and `a`'s
    /// normal.
    fn turn_between(&self, a: usize, b: usize) -> f64 {
        let (da, db) = (self.field.direction[a], self.field.direction[b]);
        let na = self.mesh.panels[a].normal.into_inner();
        (-db.dot(&na)).atan2(db.dot(&da))
    }

    /// True when the surface falls away from panel `a` onto panel `b`:
    /// `b`'s centroid lies below `a`'s plane, so the edge between is convex.
    fn falls_away(&self, a: usize, b: usize) -> bool {
        rise(self.mesh, a, b) < 0.0
    }

    /// True when panel `t` faces upstream ([`faces_upstream`]).
    fn faces_upstream(&self, t: usize) -> bool {
        faces_upstream(self.mesh, t, &self.flow_dir)
    }

    /// Segments beside a rim the line turns round (see
    /// [`BoundaryLayer::rim_zone`]). A rim: from a panel facing upstream,
    /// over a convex edge, the flow's turns (down positive, up negative)
    /// add up to more than the bluff-edge limit round a rounding tighter
    /// than [`RIM_RADIUS`] of the body's frontal size (a sharp edge; edges
    /// close together, each turning less, whose run over the turn between
    /// them is a radius under it), leaving a face the line started on or
    /// crossed for [`RIM_FACE_RADII`] rim radii. Crumpled panels are
    /// stepped over. The zone: from the rim's first
    /// crossing back along the line for as long as the panels face
    /// upstream, the segments across the rim, and on from its last
    /// crossing for as long as the attached flow is faster than [`RIM_CP`]
    /// allows. Also returns, for each rim, the segment where its zone ends:
    /// the flow has reattached there, and the layer is tripped.
    fn rim_segments(&self, trace: &Trace, arc: &[f64]) -> (Vec<bool>, Vec<usize>) {
        let p = &trace.panels;
        let mut out = vec![false; p.len()];
        let mut trips = Vec::new();
        let cap = rim_speed(self.speed);
        let limit = self.params.base_edge_turn_deg.to_radians();
        // Crossings between panels that are not crumpled (a sliver on an
        // edge is stepped over, its two turns taken as one): (segment
        // entered, segment left, turn).
        let mut crossings: Vec<(usize, usize, f64)> = Vec::new();
        let mut last: Option<usize> = None;
        for (k, &t) in p.iter().enumerate() {
            if self.crumpled(t as usize) {
                continue;
            }
            if let Some(a) = last.filter(|&a| p[a] != t) {
                crossings.push((k, a, self.turn_between(p[a] as usize, t as usize)));
            }
            last = Some(k);
        }
        let mut c = 0;
        while c < crossings.len() {
            let (start, before, first) = crossings[c];
            c += 1;
            if first <= 0.0 || !self.faces_upstream(p[before] as usize) {
                continue;
            }
            let (mut turn, mut end) = (0.0, None);
            for (m, &(k, _, here)) in crossings.iter().enumerate().skip(c - 1) {
                let run = arc[k] - arc[start];
                if run > PI * self.rim_radius {
                    break;
                }
                turn += here;
                // The rounding's radius: the run between the first and the
                // last edge over the turn between their midpoints (exact
                // for a circular arc cut into equal chords; zero for one
                // edge).
                let between = turn - 0.5 * (first + here);
                if turn > limit && run <= between * self.rim_radius {
                    end = Some((m, k));
                    break;
                }
            }
            let Some((m, end)) = end else {
                continue;
            };
            // The face the flow leaves: the stretch facing upstream before
            // the rim. A dent facing upstream far down the body (a panel
            // the scan's noise tipped forward, at a rounded tail) is no
            // front face: the line must have started on the face, or
            // crossed [`RIM_FACE_RADII`] rim radii of it.
            let face = (0..=before)
                .rev()
                .take_while(|&i| self.faces_upstream(p[i] as usize) || self.crumpled(p[i] as usize))
                .last()
                .unwrap_or(before);
            if face > 0 && arc[start] - arc[face] < RIM_FACE_RADII * self.rim_radius {
                c = m + 1;
                continue;
            }
            let mut i = before + 1;
            while i > 0 && !out[i - 1] && self.faces_upstream(p[i - 1] as usize) {
                i -= 1;
                out[i] = true;
            }
            out[before + 1..end].iter_mut().for_each(|o| *o = true);
            let mut i = end;
            while i < p.len() && self.field.speed[p[i] as usize] > cap {
                out[i] = true;
                i += 1;
            }
            trips.push(i);
            c = m + 1;
        }
        (out, trips)
    }

    /// Split the marched line over its segments.
    fn split(
        &self,
        mut trace: Trace,
        mut arc: Vec<f64>,
        peak: &[bool],
        mut rim: Vec<bool>,
        samples: &[LineSample],
        marched: &LineMarch,
    ) -> LineResult {
        let mark = self.separation_mark(&trace, &arc, peak, samples, marched);
        let before = trace.panels.len();
        let separated_at = mark.map(|(s, _)| insert_point(&mut trace, &mut arc, s));
        if let Some(k) = separated_at.filter(|_| trace.panels.len() > before) {
            // The split segment's two halves lie on the same panel.
            rim.insert(k, rim[k - 1]);
        }
        let contributions = contributions(&trace, &arc, samples, marched, mark, &rim);
        let panel_at = |k: Option<usize>| {
            let (k, last) = (k?, trace.panels.len().checked_sub(1)?);
            let j = arc
                .partition_point(|&a| a <= samples[k].s)
                .saturating_sub(1);
            Some(trace.panels[j.min(last)])
        };
        LineResult {
            transition_panel: panel_at(marched.transition),
            separation_panel: panel_at(marched.separation),
            contributions,
            wakes: Vec::new(),
            lee: None,
            line: Streamline {
                points: trace.points,
                panels: trace.panels,
                separated_at,
            },
        }
    }

    /// Where the line separates (arc length) and the panel whose pressure
    /// holds there. At a bluff edge the line separates at the edge crossing
    /// itself and the pressure is that of the last clean panel before it.
    fn separation_mark(
        &self,
        trace: &Trace,
        arc: &[f64],
        peak: &[bool],
        samples: &[LineSample],
        marched: &LineMarch,
    ) -> Option<(f64, u32)> {
        let k = marched.separation?;
        let s = samples[k].s;
        let seg = arc.partition_point(|&a| a <= s).saturating_sub(1);
        let bluff = self.bluff_crossings(trace);
        let crossing = bluff.iter().rev().find(|&&j| j <= seg).copied();
        match crossing.filter(|_| samples[k].forced_separation) {
            Some(j) => Some((
                arc[j],
                clean_panel_before(trace, arc, peak, arc[j.saturating_sub(1)]),
            )),
            None => Some((s, clean_panel_before(trace, arc, peak, s))),
        }
    }
}

/// Pressure coefficient on the free streamline leaving a rim, as the
/// march sees it beside the rim ([`BoundaryLayer::rim_zone`]): -0.46, the
/// strongest dead-water suction the separated-flow loop allows (Hoerner's
/// base-drag correlation at its friction floor; the loads use the dead
/// water's own pressure). Free-streamline theory bounds the speed there
/// by the free streamline's (Roshko 1955); the value is the bound's, not a
/// fit.
pub const RIM_CP: f64 = -0.46;

/// Largest radius of a rim, as a share of the body's frontal size
/// `sqrt(w h)` (its width and height across the stream): a turn of more
/// than the bluff-edge limit (50 degrees) round a tighter rounding (a
/// sharp edge, a chamfer, whose run over the turn is shorter than that
/// radius times the turn) is a rim. Round a bluff vehicle's front edges
/// the drag falls steeply as the radius grows to about 0.04 of the
/// frontal size and little beyond it (Cooper, SAE 850288, 1985, from
/// memory; the knee moves with the Reynolds number): a smaller rounding
/// lets the flow separate, a larger one keeps it on.
pub const RIM_RADIUS: f64 = 0.04;

/// The free-streamline speed bound beside a rim in a free stream of
/// `speed`: the speed at [`RIM_CP`].
fn rim_speed(speed: f64) -> f64 {
    speed * (1.0 - RIM_CP).sqrt()
}

/// Shortest stretch of a face the flow leaves round a rim, in rim radii
/// ([`rim_radius`]), when the line did not start on that face: shorter,
/// it is a dent in a surface facing elsewhere (a review's scan had rims at
/// its tail from one panel the noise tipped forward; our choice).
const RIM_FACE_RADII: f64 = 2.0;

/// True when panel `t` faces upstream of `flow_dir` ([`FRONT_FACING_COS`]).
fn faces_upstream(mesh: &PanelMesh, t: usize, flow_dir: &Vector3<f64>) -> bool {
    mesh.panels[t].normal.dot(flow_dir) <= -FRONT_FACING_COS
}

/// True when panel `t` faces into a stream along `flow_dir`, inclined by
/// at least [`march::BUBBLE_CONCAVE_TURN`] against it (a windscreen, the
/// face of a step).
fn faces_stream(mesh: &PanelMesh, t: usize, flow_dir: &Vector3<f64>) -> bool {
    mesh.panels[t].normal.dot(flow_dir) <= -march::BUBBLE_CONCAVE_TURN.sin()
}

/// The connected regions (over shared edges) of the panels that face into
/// the stream, for the height of the face a line meets
/// ([`LineSample::face_top`]): a label per panel and the vertices of each
/// region, found once per screening pass.
struct FaceRegions {
    /// The region of each panel; `None` for a panel that does not face
    /// into the stream.
    label: Vec<Option<u32>>,
    /// The vertices of each region's panels, each once.
    points: Vec<Vec<Point3<f64>>>,
}

impl FaceRegions {
    /// The regions of the panels for which `faces` holds.
    fn new(mesh: &PanelMesh, faces: impl Fn(usize) -> bool) -> Self {
        let mut label = vec![None; mesh.len()];
        let mut points = Vec::new();
        let mut stamp = vec![u32::MAX; mesh.vertices.len()];
        let mut queue = VecDeque::new();
        for seed in 0..mesh.len() {
            if label[seed].is_some() || !faces(seed) {
                continue;
            }
            let region = points.len() as u32;
            let mut here = Vec::new();
            label[seed] = Some(region);
            queue.push_back(seed);
            while let Some(t) = queue.pop_front() {
                for &v in &mesh.triangles[t] {
                    if stamp[v as usize] != region {
                        stamp[v as usize] = region;
                        here.push(mesh.vertices[v as usize]);
                    }
                }
                for &j in mesh.edge_neighbours[t].iter().flatten() {
                    let j = j as usize;
                    if label[j].is_none() && faces(j) {
                        label[j] = Some(region);
                        queue.push_back(j);
                    }
                }
            }
            points.push(here);
        }
        Self { label, points }
    }

    /// The top of panel `t`'s region as a line that meets it at `foot`
    /// from a surface with outward normal `up` sees it: of the region's
    /// points that lie within [`march::STEP_FACE_REACH`] times their rise
    /// above that surface's plane of `foot`, the one that rises highest.
    /// `None` when `t` does not face the stream or no point rises so.
    fn top(&self, t: usize, foot: &Point3<f64>, up: &Vector3<f64>) -> Option<Point3<f64>> {
        let region = self.label[t]? as usize;
        let reach = march::STEP_FACE_REACH * march::STEP_FACE_REACH;
        self.points[region]
            .iter()
            .filter_map(|p| {
                let d = p - foot;
                let rise = d.dot(up);
                (rise > 0.0 && d.norm_squared() <= reach * rise * rise).then_some((rise, *p))
            })
            .max_by(|a, b| a.0.total_cmp(&b.0))
            .map(|(_, p)| p)
    }
}

/// A surface whose normal points against the flow by more than this
/// cosine (inclined about 15 degrees or more into the stream) faces
/// upstream: the flow round a sharp edge at its rear reattaches behind it
/// (the rim of a flat nose, where the panels of a coarsened scan slope
/// part-way between the face and the sides; our choice).
const FRONT_FACING_COS: f64 = 0.25;

/// Panels smaller than this share of the median panel size count as
/// crumpled (our choice; see [`crumpled_panels`]).
const CRUMPLED_SIZE: f64 = 0.25;

/// Panels a coarsened scan crumpled (at the apex of a fan of facets, say):
/// smaller than [`CRUMPLED_SIZE`] of the median size (as `sqrt(2 area)`, so
/// a sliver counts as small), or folded over, their
/// normal turned more than 90 degrees from the mean normal of their edge
/// neighbours, or turned against all their neighbours
/// ([`tuft_mesh::quality::turned_panels`]: a sliver bridging two regions
/// of a coarsened scan). Their velocities jump from panel to panel with no feature
/// of the shape behind them, so they take no part in a bluff edge and the
/// speed on them is interpolated like an edge's suction peak (our choice).
fn crumpled_panels(mesh: &PanelMesh) -> Vec<bool> {
    // Sizes from the areas, which a sliver's long edge does not hide.
    let side = |t: usize| (2.0 * mesh.panels[t].area).sqrt();
    let mut sides: Vec<f64> = (0..mesh.len()).map(side).collect();
    sides.sort_by(f64::total_cmp);
    let median = sides.get(sides.len() / 2).copied().unwrap_or(0.0);
    let turned = tuft_mesh::quality::turned_panels(mesh);
    (0..mesh.len())
        .map(|t| {
            let p = &mesh.panels[t];
            let around: Vector3<f64> = mesh.edge_neighbours[t]
                .iter()
                .flatten()
                .map(|&j| {
                    mesh.panels[j as usize].normal.into_inner() * mesh.panels[j as usize].area
                })
                .sum();
            side(t) < CRUMPLED_SIZE * median || p.normal.dot(&around) < 0.0 || turned[t]
        })
        .collect()
}

/// What each segment of a marched line gives its panel: the state of the
/// station nearest the segment's middle, never an attached state past the
/// separation point nor a separated one before it.
fn contributions(
    trace: &Trace,
    arc: &[f64],
    samples: &[LineSample],
    marched: &LineMarch,
    mark: Option<(f64, u32)>,
    rim: &[bool],
) -> Vec<Contribution> {
    let spacing = match samples {
        [a, b, ..] => b.s - a.s,
        _ => f64::INFINITY,
    };
    let last = samples.len().saturating_sub(1);
    let station_of = |s: f64| -> usize {
        let k = ((s / spacing).round() as usize).min(last);
        match (marched.separation, mark) {
            (Some(ks), Some((ss, _))) if s > ss => k.max(ks),
            (Some(ks), Some(_)) => k.min(ks.saturating_sub(1)),
            _ => k,
        }
    };
    trace
        .panels
        .iter()
        .enumerate()
        .filter_map(|(j, &panel)| {
            let st = marched
                .states
                .get(station_of(0.5 * (arc[j] + arc[j + 1])))?;
            let separated = st.state == FlowState::Separated;
            Some(Contribution {
                panel,
                layer: PanelLayer {
                    theta: st.theta,
                    delta_star: st.delta_star,
                    h: st.h,
                    cf: st.cf,
                    re_theta: st.re_theta,
                    state: st.state,
                    risk: st.risk,
                },
                source: mark.filter(|_| separated).map(|(_, src)| src),
                rim: rim[j],
            })
        })
        .collect()
}

/// The panel of the last segment at or before arc length `s` that is not on
/// either side of a sharp-edge crossing (the segment at `s` when all are).
fn clean_panel_before(trace: &Trace, arc: &[f64], peak: &[bool], s: f64) -> u32 {
    let last = trace.panels.len().saturating_sub(1);
    let j = arc.partition_point(|&a| a <= s).saturating_sub(1).min(last);
    let clean = (0..=j)
        .rev()
        .find(|&i| !peak.get(i).copied().unwrap_or(false));
    trace.panels.get(clean.unwrap_or(j)).copied().unwrap_or(0)
}

/// Replace the speed on the stations flagged by `peak` by the linear
/// interpolation between the nearest clean stations (module doc).
fn clip_edge_peaks(samples: &mut [LineSample], peak: impl Fn(usize) -> bool) {
    let mut k = 0;
    while k < samples.len() {
        if !peak(k) {
            k += 1;
            continue;
        }
        let first = k;
        while k < samples.len() && peak(k) {
            k += 1;
        }
        interpolate_run(samples, first, k);
    }
}

/// Linear interpolation of the speed over stations `first..end` between
/// stations `first - 1` and `end`; held at the value of `first - 1` when the
/// run ends at a bluff edge (the flow leaves there, so the speeds beyond it
/// must not reach back) or at the end of the line.
fn interpolate_run(samples: &mut [LineSample], first: usize, end: usize) {
    let before = first.checked_sub(1).map(|i| samples[i]);
    let bluff = samples[first..(end + 1).min(samples.len())]
        .iter()
        .any(|s| s.forced_separation);
    let after = if bluff {
        None
    } else {
        samples.get(end).copied()
    };
    for sample in &mut samples[first..end] {
        sample.speed = match (before, after) {
            (Some(a), Some(b)) => {
                let t = (sample.s - a.s) / (b.s - a.s).max(1e-300);
                a.speed + (b.speed - a.speed) * t
            }
            (Some(a), None) => a.speed,
            (None, Some(b)) => b.speed,
            (None, None) => sample.speed,
        };
    }
}

/// The first of the sorted segment indices `forced` after `m`
/// (`usize::MAX` when none is).
fn first_after(forced: &[usize], m: usize) -> usize {
    forced
        .iter()
        .copied()
        .find(|&f| f > m)
        .unwrap_or(usize::MAX)
}

/// Cumulative arc length at each point of a polyline.
fn arc_lengths(points: &[Point3<f64>]) -> Vec<f64> {
    let mut acc = 0.0;
    let mut out = Vec::with_capacity(points.len());
    for (i, p) in points.iter().enumerate() {
        if i > 0 {
            acc += (p - points[i - 1]).norm();
        }
        out.push(acc);
    }
    out
}

/// Point at arc length `s` on segment `seg`.
fn point_at(trace: &Trace, arc: &[f64], seg: usize, s: f64) -> Point3<f64> {
    let (a, b) = (trace.points[seg], trace.points[seg + 1]);
    let len = arc[seg + 1] - arc[seg];
    let t = if len > 0.0 {
        ((s - arc[seg]) / len).clamp(0.0, 1.0)
    } else {
        0.0
    };
    a + (b - a) * t
}

/// Insert a point at arc length `s`, splitting its segment; returns its
/// index in `points`.
fn insert_point(trace: &mut Trace, arc: &mut Vec<f64>, s: f64) -> usize {
    if trace.panels.is_empty() {
        return 0;
    }
    let j = arc
        .partition_point(|&a| a <= s)
        .saturating_sub(1)
        .min(trace.panels.len() - 1);
    if (arc[j] - s).abs() <= 1e-12 * arc.last().copied().unwrap_or(1.0) {
        return j;
    }
    let p = point_at(trace, arc, j, s);
    trace.points.insert(j + 1, p);
    trace.panels.insert(j + 1, trace.panels[j]);
    arc.insert(j + 1, s);
    j + 1
}

/// Risks closer than this are a tie ([`outranks`]).
const RISK_TIE: f64 = 1e-9;

/// True when line contribution `a` should replace `b` on a panel: the
/// higher risk, and on a tie (within [`RISK_TIE`]: mirror-image lines on a
/// symmetric body differ by rounding only) the layer further on
/// (separated over turbulent over laminar), then the thicker one. Taking
/// the first line on a tie made a symmetric body's two sides differ, as
/// the lines reach a panel and its mirror image in opposite orders (the
/// demo coupe: 40 panels whose state differed from their mirror image's
/// in attached flow).
fn outranks(a: &PanelLayer, b: &PanelLayer) -> bool {
    let rank = |l: &PanelLayer| match l.state {
        FlowState::Unresolved => 0,
        FlowState::Laminar => 1,
        FlowState::Turbulent => 2,
        FlowState::Separated => 3,
    };
    if (a.risk - b.risk).abs() > RISK_TIE {
        return a.risk > b.risk;
    }
    match rank(a).cmp(&rank(b)) {
        std::cmp::Ordering::Equal => a.theta > b.theta * (1.0 + RISK_TIE),
        order => order.is_gt(),
    }
}

/// Combine the lines: highest risk per panel, then fill and count.
fn combine(
    mesh: &PanelMesh,
    lines: Vec<LineResult>,
    attachments: Vec<u32>,
    params: &BoundaryLayerParams,
) -> BoundaryLayer {
    let mut best: Vec<Option<Contribution>> = vec![None; mesh.len()];
    let mut transition_panels = Vec::new();
    let mut separation_panels = Vec::new();
    let mut streamlines = Vec::with_capacity(lines.len());
    let mut rim = vec![false; mesh.len()];
    for line in lines {
        for c in line.contributions {
            rim[c.panel as usize] |= c.rim;
            let slot = &mut best[c.panel as usize];
            if slot.is_none_or(|b| outranks(&c.layer, &b.layer)) {
                *slot = Some(c);
            }
        }
        transition_panels.extend(line.transition_panel);
        separation_panels.extend(line.separation_panel);
        streamlines.push(line.line);
    }
    // Any line's rim flag, not only the kept one's, spreads with the fill.
    for (b, &r) in best.iter_mut().zip(&rim) {
        if let Some(c) = b {
            c.rim = r;
        }
    }
    fill(mesh, &mut best, params);
    transition_panels.sort_unstable();
    transition_panels.dedup();
    separation_panels.sort_unstable();
    separation_panels.dedup();
    let unresolved = best.iter().filter(|b| b.is_none()).count();
    BoundaryLayer {
        panels: best
            .iter()
            .map(|b| b.map_or_else(PanelLayer::unresolved, |c| c.layer))
            .collect(),
        separation_source: best.iter().map(|b| b.and_then(|c| c.source)).collect(),
        streamlines,
        unresolved,
        transition_panels,
        separation_panels,
        attachments,
        rim_zone: best.iter().map(|b| b.is_some_and(|c| c.rim)).collect(),
    }
}

/// Breadth-first fill of panels without a line from the nearest panel with
/// one, at most `params.fill_hops` edge steps away, never across a sharp
/// convex edge (the state may jump there: a bluff base edge).
fn fill(mesh: &PanelMesh, best: &mut [Option<Contribution>], params: &BoundaryLayerParams) {
    let hops = params.fill_hops;
    let mut depth: Vec<usize> = best
        .iter()
        .map(|b| if b.is_some() { 0 } else { usize::MAX })
        .collect();
    let mut queue: VecDeque<usize> = (0..best.len()).filter(|&t| best[t].is_some()).collect();
    while let Some(t) = queue.pop_front() {
        if depth[t] >= hops {
            continue;
        }
        for j in mesh.edge_neighbours[t].iter().flatten() {
            let j = *j as usize;
            if sharp_convex(mesh, t, j, params.sharp_edge_deg) {
                continue;
            }
            let copy = best[t].map(|c| Contribution {
                panel: j as u32,
                ..c
            });
            if depth[j] == usize::MAX {
                depth[j] = depth[t] + 1;
                best[j] = copy;
                queue.push_back(j);
            } else if depth[j] == depth[t] + 1
                && let (Some(new), Some(old)) = (&copy, &best[j])
                && outranks(&new.layer, &old.layer)
            {
                // Of the neighbours equally near, the one that outranks
                // (not the first in panel order, which made a symmetric
                // body's two sides differ); `j` has not spread yet.
                best[j] = copy;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use tuft_mesh::{Mirrors, TriMesh};

    /// A surface swept across the stream (along y): `profile(y)` gives its
    /// section in the x-z plane at each y of `ys`, each with the same number
    /// of points, in the stream's direction (+x); the outward normals point
    /// up on level parts and upstream on rising ones.
    fn swept(ys: &[f64], profile: impl Fn(f64) -> Vec<(f64, f64)>) -> PanelMesh {
        let sections: Vec<Vec<(f64, f64)>> = ys.iter().map(|&y| profile(y)).collect();
        let n = sections[0].len();
        let vertices = ys
            .iter()
            .zip(&sections)
            .flat_map(|(&y, s)| s.iter().map(move |&(x, z)| Point3::new(x, y, z)))
            .collect();
        let at = |k: usize, i: usize| (k * n + i) as u32;
        let mut triangles = Vec::new();
        for k in 0..ys.len() - 1 {
            for i in 0..n - 1 {
                triangles.push([at(k, i), at(k, i + 1), at(k + 1, i + 1)]);
                triangles.push([at(k, i), at(k + 1, i + 1), at(k + 1, i)]);
            }
        }
        PanelMesh::new(TriMesh::new(vertices, triangles).unwrap(), Mirrors::none()).unwrap()
    }

    /// A level floor to x = 1, then a face rising `height` at `deg` degrees
    /// (in four panels' rows), then a level top to x = 3.
    fn step(height: f64, deg: f64) -> Vec<(f64, f64)> {
        let run = height / deg.to_radians().tan();
        let mut s = vec![(0.0, 0.0), (0.5, 0.0), (1.0, 0.0)];
        s.extend((1..=4).map(|k| (1.0 + run * k as f64 / 4.0, height * k as f64 / 4.0)));
        s.extend([(2.0 + run, height), (3.0 + run, height)]);
        s
    }

    fn step_mesh(ys: &[f64], height: f64, deg: f64) -> PanelMesh {
        swept(ys, |_| step(height, deg))
    }

    fn regions(mesh: &PanelMesh) -> FaceRegions {
        FaceRegions::new(mesh, |t| faces_stream(mesh, t, &Vector3::x()))
    }

    /// The panel of `mesh` whose centroid lies nearest `p` among those
    /// facing the stream.
    fn face_panel(mesh: &PanelMesh, p: Point3<f64>) -> usize {
        (0..mesh.len())
            .filter(|&t| faces_stream(mesh, t, &Vector3::x()))
            .min_by(|&a, &b| {
                let d = |t: usize| (mesh.panels[t].centroid - p).norm();
                d(a).total_cmp(&d(b))
            })
            .unwrap()
    }

    fn rise(top: Option<Point3<f64>>, foot: Point3<f64>) -> f64 {
        top.map_or(0.0, |p| (p - foot).dot(&Vector3::z()))
    }

    /// A windscreen-like face (0.48 m at 55 degrees, 1.2 m wide) is as high
    /// seen from its foot's middle as from its outboard end, where a line
    /// that crosses a few centimetres of it and turns round its side meets
    /// it.
    #[test]
    fn a_face_is_as_high_from_its_side_as_from_its_middle() {
        let ys: Vec<f64> = (0..=8).map(|k| -0.6 + 0.15 * k as f64).collect();
        let mesh = step_mesh(&ys, 0.48, 55.0);
        let faces = regions(&mesh);
        for y in [0.0, 0.6] {
            let foot = Point3::new(1.0, y, 0.0);
            let t = face_panel(&mesh, Point3::new(1.02, y, 0.02));
            let h = rise(faces.top(t, &foot, &Vector3::z()), foot);
            assert!((h - 0.48).abs() < 1e-9, "from y = {y}: {h}");
        }
    }

    /// A ramp rising at 20 degrees has no point within twice its rise of
    /// its foot (`march::STEP_FACE_REACH`): it is no step, whatever its
    /// height.
    #[test]
    fn a_shallow_ramp_is_no_step() {
        let mesh = step_mesh(&[-0.5, 0.0, 0.5], 0.5, 20.0);
        let faces = regions(&mesh);
        let foot = Point3::new(1.0, 0.0, 0.0);
        let t = face_panel(&mesh, Point3::new(1.1, 0.0, 0.03));
        assert_eq!(faces.top(t, &foot, &Vector3::z()), None);
    }

    /// A face whose height grows along its foot, from 3 cm to 1 m over
    /// 3 m, is as high as it rises near where a line meets it: from the
    /// low end, the high end's metre lies more than twice its rise away.
    /// And a second face further down the stream, not joined to the first
    /// by faces into the stream, does not count.
    #[test]
    fn only_the_face_near_the_foot_counts() {
        let ys: Vec<f64> = (0..=30).map(|k| 0.1 * k as f64).collect();
        let mesh = swept(&ys, |y| {
            let mut s = step(0.03 + (1.0 - 0.03) * y / 3.0, 60.0);
            s.truncate(s.len() - 1);
            s.extend([(4.0, s[s.len() - 1].1), (4.2, 2.0), (5.0, 2.0)]);
            s
        });
        let faces = regions(&mesh);
        let foot = Point3::new(1.0, 0.0, 0.0);
        let t = face_panel(&mesh, Point3::new(1.005, 0.01, 0.01));
        let h = rise(faces.top(t, &foot, &Vector3::z()), foot);
        println!("face rising from 3 cm to 1 m along its foot: {h:.3} m seen from its low end");
        assert!(h > 0.03 && h < 0.15, "{h}");
        let far = Point3::new(1.0, 3.0, 0.0);
        let t = face_panel(&mesh, Point3::new(1.3, 3.0, 0.5));
        assert!((rise(faces.top(t, &far, &Vector3::z()), far) - 1.0).abs() < 1e-9);
    }
}
