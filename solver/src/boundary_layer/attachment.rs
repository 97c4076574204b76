//! The front attachment (stagnation) region and the streamline seeds
//! round it.
//!
//! An attachment point is a panel whose speed is a local minimum over its
//! vertex neighbourhood, below a fraction of the free-stream speed, on the
//! upstream-facing side (`n . d < 0`, `d` the free-stream direction). The
//! search is over the whole surface, so a stagnation point moved by ground
//! effect or yaw is found where the velocities put it, and a body may have
//! several (a nose and an underbody lip, say). Candidates closer than
//! [`separation_distance`] to a slower one are dropped, unless their
//! speeds agree within [`TWIN_SPEED`] (mirror-image twins, both kept), and
//! "local minimum" allows the same margin.

use nalgebra::{Point3, Vector3};
use tuft_mesh::PanelMesh;

use super::field::SurfaceField;
use super::streamlines::Tracer;

/// A streamline seed near an attachment point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Seed {
    /// Panel holding the seed.
    pub panel: u32,
    /// Seed position on the surface.
    pub point: Point3<f64>,
    /// Distance walked from the attachment point, m.
    pub distance: f64,
    /// The attachment panel it came from.
    pub attachment: u32,
}

/// Smallest distance between two attachment points: three panel sizes.
pub fn separation_distance(mesh: &PanelMesh, t: usize) -> f64 {
    3.0 * mesh.panels[t].size
}

/// Attachment panels, slowest first (see the module doc).
pub fn find_attachments(
    mesh: &PanelMesh,
    field: &SurfaceField,
    flow_dir: &Vector3<f64>,
    max_speed: f64,
) -> Vec<u32> {
    let mut candidates: Vec<u32> = (0..mesh.len())
        .filter(|&t| field.speed[t] < max_speed && mesh.panels[t].normal.dot(flow_dir) < 0.0)
        .filter(|&t| {
            mesh.vertex_neighbourhood(t)
                .iter()
                .all(|&j| field.speed[t] <= field.speed[j as usize] * (1.0 + TWIN_SPEED))
        })
        .map(|t| t as u32)
        .collect();
    candidates.sort_by(|&a, &b| field.speed[a as usize].total_cmp(&field.speed[b as usize]));
    let mut chosen: Vec<u32> = Vec::new();
    for c in candidates {
        let pc = mesh.panels[c as usize].centroid;
        let near = chosen.iter().any(|&o| {
            let po = mesh.panels[o as usize].centroid;
            let twin = (field.speed[c as usize] - field.speed[o as usize]).abs()
                <= TWIN_SPEED * field.speed[o as usize].max(f64::MIN_POSITIVE);
            (pc - po).norm() < separation_distance(mesh, o as usize) && !twin
        });
        if !near {
            chosen.push(c);
        }
    }
    chosen
}

/// Relative difference of speed under which two attachment panels close
/// together are twins, each seeded: on a body symmetric about its centre
/// plane the slowest panels at the nose come in mirror pairs whose speeds
/// differ by rounding, and one ring round one of them seeds the two sides
/// unevenly (the demo coupe's attached flow had 40 panels whose state
/// differed from their mirror image's).
pub const TWIN_SPEED: f64 = 1e-6;

/// When no panel qualifies: the slowest panel facing upstream
/// (`n . d < -0.5`), if any.
pub fn fallback_attachment(
    mesh: &PanelMesh,
    field: &SurfaceField,
    flow_dir: &Vector3<f64>,
) -> Option<u32> {
    (0..mesh.len())
        .filter(|&t| mesh.panels[t].normal.dot(flow_dir) < -0.5)
        .min_by(|&a, &b| field.speed[a].total_cmp(&field.speed[b]))
        .map(|t| t as u32)
}

/// `count` seeds on a ring of geodesic radius `radius_sizes` panel sizes
/// round the attachment panel's centroid, evenly spaced in angle from the
/// stream's direction projected on the panel (so that the rings of two
/// mirror-image panels mirror each other). Seeds whose walk leaves the mesh (a mirror plane) are
/// dropped.
pub fn ring_seeds(
    tracer: &Tracer,
    attachment: u32,
    count: usize,
    radius_sizes: f64,
    flow_dir: &Vector3<f64>,
) -> Vec<Seed> {
    let panel = &tracer.mesh.panels[attachment as usize];
    let radius = radius_sizes * panel.size;
    let n = panel.normal.into_inner();
    let l = (flow_dir - n * n.dot(flow_dir))
        .try_normalize(1e-9)
        .unwrap_or_else(|| panel.l.into_inner());
    let m = n.cross(&l);
    (0..count)
        .filter_map(|i| {
            let a = std::f64::consts::TAU * (i as f64 + 0.5) / count as f64;
            let dir = l * a.cos() + m * a.sin();
            let (t, p) = tracer.walk(attachment, panel.centroid, dir, radius)?;
            Some(Seed {
                panel: t,
                point: p,
                distance: radius,
                attachment,
            })
        })
        .collect()
}
