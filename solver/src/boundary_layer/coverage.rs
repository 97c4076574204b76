//! Seeds for panels the attachment rings missed.
//!
//! Lines from rings round the attachment points fan out, and on a long body
//! they leave whole strips between them (a car's sides are reached only by
//! the few lines that start almost sideways at the nose). For each panel no
//! line crossed, the streamline through its centroid is traced upstream to
//! where it comes from (a stagnation area, a mirror plane or a dead end) and
//! downstream to where it leaves, and the boundary layer is marched along
//! the whole of it, so the panel gets the layer that actually arrives at
//! it. Targets are spread out (no two within a few edge steps) and the pass
//! is repeated a few times.

use std::collections::VecDeque;

use tuft_mesh::PanelMesh;

use super::attachment::Seed;
use super::field::sharp_convex;
use super::streamlines::{Trace, Tracer};

/// Upstream lines start where the surface speed is at least this fraction of
/// the free stream.
pub const START_SPEED_FRACTION: f64 = 0.1;

/// Edge steps kept between two targets of one round.
pub const TARGET_SPACING_HOPS: usize = 2;

/// Uncovered panels, spread so that no two lie within
/// [`TARGET_SPACING_HOPS`] edge steps of each other (lowest index first,
/// so the choice is deterministic).
pub fn spread_targets(mesh: &PanelMesh, covered: &[bool]) -> Vec<u32> {
    let mut blocked = covered.to_vec();
    let mut targets = Vec::new();
    for t in 0..mesh.len() {
        if blocked[t] {
            continue;
        }
        targets.push(t as u32);
        block_around(mesh, t, &mut blocked);
    }
    targets
}

/// Mark every panel within [`TARGET_SPACING_HOPS`] edge steps of `start`.
fn block_around(mesh: &PanelMesh, start: usize, blocked: &mut [bool]) {
    let mut queue = VecDeque::from([(start, 0usize)]);
    blocked[start] = true;
    while let Some((t, d)) = queue.pop_front() {
        if d == TARGET_SPACING_HOPS {
            continue;
        }
        for n in mesh.edge_neighbours[t].iter().flatten() {
            let n = *n as usize;
            if !blocked[n] {
                blocked[n] = true;
                queue.push_back((n, d + 1));
            }
        }
    }
}

/// The streamline through panel `target`: traced against the flow from its
/// centroid to where it comes from, reversed, then on downstream from the
/// centroid. (Tracing downstream from the upstream end instead would not
/// come back: lines leaving a stagnation area diverge, so any error sends
/// them elsewhere.) The seed is the upstream end; its distance from the
/// nearest attachment point (at least one panel size) starts the march as a
/// stagnation-point layer; behind a bluff edge the layer starts afresh.
/// `None` when there are no attachments.
pub fn line_through(
    tracer: &Tracer,
    target: u32,
    attachments: &[u32],
    limits: &StartLimits,
) -> Option<(Seed, Trace)> {
    let mesh = tracer.mesh;
    let centroid = mesh.panels[target as usize].centroid;
    let back = tracer.trace(target, centroid, -1.0);
    let (back, at_edge) = trim_upstream(tracer, back, attachments, limits);
    let ahead = tracer.trace(target, centroid, 1.0);
    let point = *back.points.last()?;
    let panel = back.panels.last().copied().unwrap_or(target);
    let (attachment, from_attachment) = attachments
        .iter()
        .map(|&a| (a, (mesh.panels[a as usize].centroid - point).norm()))
        .min_by(|a, b| a.1.total_cmp(&b.1))?;
    let size = mesh.panels[panel as usize].size;
    // Behind a bluff edge the layer starts afresh, as from a leading edge
    // (the flow reattaches behind the edge's separation bubble; common
    // practice), one and a half panel sizes from its start as the ring seeds.
    let distance = if at_edge {
        1.5 * size
    } else {
        from_attachment.max(size)
    };
    let mut points: Vec<_> = back.points.into_iter().rev().collect();
    points.extend(ahead.points.into_iter().skip(1));
    let mut panels: Vec<u32> = back.panels.into_iter().rev().collect();
    panels.extend(ahead.panels);
    let seed = Seed {
        panel,
        point,
        distance,
        attachment,
    };
    Some((
        seed,
        Trace {
            points,
            panels,
            end: ahead.end,
        },
    ))
}

/// Where an upstream line may begin.
#[derive(Debug, Clone, Copy)]
pub struct StartLimits {
    /// Lowest surface speed, m/s, at which a line may start.
    pub start_speed: f64,
    /// Sharp convex edges with a dihedral angle above this (degrees) are
    /// bluff edges.
    pub bluff_edge_deg: f64,
    /// Free-stream direction (unit).
    pub flow_dir: nalgebra::Vector3<f64>,
}

/// Cosine of the largest angle between a surface's outward normal and the
/// free stream for which it counts as facing downstream (60 degrees): a
/// base, where flow that left a bluff edge does not come back.
const LEEWARD_COS: f64 = 0.5;

/// Cut an upstream trace where it first comes within the seed ring of an
/// attachment point (1.5 panel sizes, as the ring seeds), where it first
/// comes back to a panel it crossed (it circles a stagnation vertex there),
/// where the surface speed first drops below the start speed (the slow flow
/// of a stagnation area, where a march would start from a layer of
/// unbounded thickness), or at a bluff edge behind which the surface does
/// not face downstream (a side face behind a sharp front corner, where the
/// flow reattaches; behind a base edge the trace goes on, so that the march
/// crosses the edge and separates there), whichever comes first. Also says
/// whether the cut was at a bluff edge.
fn trim_upstream(
    tracer: &Tracer,
    mut back: Trace,
    attachments: &[u32],
    limits: &StartLimits,
) -> (Trace, bool) {
    let mesh = tracer.mesh;
    let near = |p: &tuft_mesh::Point| {
        attachments.iter().any(|&a| {
            let panel = &mesh.panels[a as usize];
            (panel.centroid - p).norm() <= 1.5 * panel.size
        })
    };
    let mut seen = std::collections::HashSet::new();
    let mut previous: Option<u32> = None;
    let mut cut = None;
    for (j, &panel) in back.panels.iter().enumerate() {
        let revisit = previous != Some(panel) && !seen.insert(panel);
        let slow = tracer.field.speed[panel as usize] < limits.start_speed;
        let edge = previous.is_some_and(|p| {
            p != panel
                && sharp_convex(mesh, panel as usize, p as usize, limits.bluff_edge_deg)
                && mesh.panels[p as usize].normal.dot(&limits.flow_dir) < LEEWARD_COS
        });
        if (j > 0 && (near(&back.points[j]) || slow || edge)) || revisit {
            cut = Some((j, edge));
            break;
        }
        previous = Some(panel);
    }
    match cut {
        Some((j, edge)) => {
            back.points.truncate(j + 1);
            back.panels.truncate(j);
            (back, edge)
        }
        None => (back, false),
    }
}
