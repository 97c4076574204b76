//! Surface streamlines traced over the triangulated surface.
//!
//! Within a panel the path follows the vertex velocities interpolated
//! linearly over the triangle ([`SurfaceField::direction_at`]), in midpoint
//! (second-order Runge-Kutta) steps of [`STEP_SIZES`] panel sizes, each step
//! cut at the exit edge; it then crosses into the neighbour across that
//! edge. A continuous field keeps neighbouring lines apart (a piecewise
//! constant one makes them merge on the edges where directions converge).
//! Robustness rules:
//!
//! - when the direction at the entry point points back across the entry
//!   edge (directions converge on the edge), the path slides along the edge
//!   in the direction of the sum of the two, nudged just inside the panel;
//! - zero-length steps at a vertex are allowed a few times in a row, then
//!   the line stops as stalled;
//! - a panel visited more than [`MAX_VISITS`] times ends the line (loop);
//! - the line ends at an open edge (a mirror-plane boundary), where the
//!   speed falls below the stop speed (rear stagnation), or after the step
//!   limit.

use std::collections::HashMap;

use nalgebra::{Point3, Vector3};
use tuft_mesh::PanelMesh;

use super::field::SurfaceField;

/// Step length of the in-panel integration, in panel sizes.
pub const STEP_SIZES: f64 = 0.5;

/// Visits of one panel by one line before the line is declared a loop.
pub const MAX_VISITS: u32 = 4;

/// Steps one line may take inside one panel without leaving it before it
/// is declared stalled: a crossing takes a few steps of [`STEP_SIZES`];
/// a line turning on the spot where the flow's direction folds over (a
/// review's lines at a base rim had run 20,000 steps, over a kilometre,
/// inside a few panels, and made their streamline file five times the
/// size of their neighbours').
pub const MAX_STEPS_IN_PANEL: usize = 32;

/// Why a traced line ended.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TraceEnd {
    /// Reached an open edge (a mirror-plane boundary).
    OpenEdge,
    /// Reached a panel slower than the stop speed (a stagnation area).
    Stagnation,
    /// Could not move on (converging directions or a degenerate step).
    Stalled,
    /// Came back to the same panels again and again.
    Loop,
    /// Hit the step limit.
    MaxSteps,
}

/// A traced polyline: `points[i]` starts segment `i`, which lies in panel
/// `panels[i]`; `points.len() == panels.len() + 1`.
#[derive(Debug, Clone, PartialEq)]
pub struct Trace {
    /// Polyline points on the surface.
    pub points: Vec<Point3<f64>>,
    /// Panel of each segment.
    pub panels: Vec<u32>,
    /// Why the line ended.
    pub end: TraceEnd,
}

/// Traces lines over one mesh and field.
#[derive(Debug, Clone, Copy)]
pub struct Tracer<'a> {
    /// The surface.
    pub mesh: &'a PanelMesh,
    /// The flow on it.
    pub field: &'a SurfaceField,
    /// Speed below which a line ends (stagnation), m/s.
    pub stop_speed: f64,
    /// Most segments per line.
    pub max_steps: usize,
}

impl Tracer<'_> {
    /// Trace from `start` in panel `panel` along the flow (`sign = 1`) or
    /// against it (`sign = -1`).
    pub fn trace(&self, panel: u32, start: Point3<f64>, sign: f64) -> Trace {
        let mut line = Trace {
            points: vec![start],
            panels: Vec::new(),
            end: TraceEnd::MaxSteps,
        };
        let mut visits: HashMap<u32, u32> = HashMap::new();
        let (mut t, mut p, mut entry) = (panel as usize, start, None::<usize>);
        let mut prev_dir = Vector3::zeros();
        let mut zero_steps = 0;
        let mut inside = 0;
        for _ in 0..self.max_steps {
            if self.field.speed[t] < self.stop_speed {
                line.end = TraceEnd::Stagnation;
                return line;
            }
            let Some((d, q0)) = self.direction_in(t, p, entry, prev_dir, sign) else {
                line.end = TraceEnd::Stalled;
                return line;
            };
            let Some((k, tau, d)) = self.step(t, q0, d, entry, sign) else {
                line.end = TraceEnd::Stalled;
                return line;
            };
            let q = q0 + d * tau;
            line.panels.push(t as u32);
            line.points.push(q);
            let Some(k) = k else {
                inside += 1;
                if inside > MAX_STEPS_IN_PANEL {
                    line.end = TraceEnd::Stalled;
                    return line;
                }
                (entry, prev_dir, p) = (None, d, q);
                continue;
            };
            inside = 0;
            zero_steps = if tau < 1e-9 * self.mesh.panels[t].size {
                zero_steps + 1
            } else {
                0
            };
            let Some(next) = self.mesh.edge_neighbours[t][k] else {
                line.end = TraceEnd::OpenEdge;
                return line;
            };
            let count = visits.entry(next).or_insert(0);
            *count += 1;
            if *count > MAX_VISITS || zero_steps > 8 {
                line.end = if zero_steps > 8 {
                    TraceEnd::Stalled
                } else {
                    TraceEnd::Loop
                };
                return line;
            }
            entry = self.mesh.edge_neighbours[next as usize]
                .iter()
                .position(|&o| o == Some(t as u32));
            (prev_dir, t, p) = (d, next as usize, q);
        }
        line
    }

    /// One midpoint step from `p` in panel `t` with start direction `d`:
    /// `(exit edge or None when the step ends inside, length, direction)`.
    /// A sliding step (entry edge set and `d` along it) goes straight to the
    /// exit edge.
    fn step(
        &self,
        t: usize,
        p: Point3<f64>,
        d: Vector3<f64>,
        entry: Option<usize>,
        sign: f64,
    ) -> Option<(Option<usize>, f64, Vector3<f64>)> {
        let size = self.mesh.panels[t].size;
        let sliding = entry.is_some_and(|k| d.dot(&self.field.inward[t][k]) <= 1e-6);
        let h = STEP_SIZES * size;
        let dm = if sliding {
            d
        } else {
            self.field
                .direction_at(self.mesh, t, &(p + d * (0.5 * h)))
                .map_or(d, |m| m * sign)
        };
        let (k, tau) = self.exit(t, &p, &dm)?;
        if !sliding && tau > h {
            return Some((None, h, dm));
        }
        Some((Some(k), tau, dm))
    }

    /// The direction to follow in panel `t` entered through edge `entry`,
    /// and the (possibly nudged) start point. Slides along the entry edge
    /// when the panel's own direction points back across it.
    fn direction_in(
        &self,
        t: usize,
        p: Point3<f64>,
        entry: Option<usize>,
        prev_dir: Vector3<f64>,
        sign: f64,
    ) -> Option<(Vector3<f64>, Point3<f64>)> {
        let d = self.field.direction_at(self.mesh, t, &p)? * sign;
        let Some(k) = entry else {
            return Some((d, p));
        };
        let inward = self.field.inward[t][k];
        if d.dot(&inward) > 1e-6 {
            return Some((d, p));
        }
        let panel = &self.mesh.panels[t];
        let e = (panel.vertices[(k + 1) % 3] - panel.vertices[k]).normalize();
        let along = (prev_dir + d).dot(&e);
        if along.abs() < 1e-9 {
            return None;
        }
        Some((e * along.signum(), p + inward * (1e-7 * panel.size)))
    }

    /// Exit edge and distance along `d` from `p` inside panel `t`.
    fn exit(&self, t: usize, p: &Point3<f64>, d: &Vector3<f64>) -> Option<(usize, f64)> {
        let panel = &self.mesh.panels[t];
        let mut best: Option<(usize, f64)> = None;
        for k in 0..3 {
            let n = self.field.inward[t][k];
            let rate = d.dot(&n);
            if rate >= -1e-12 {
                continue;
            }
            let dist = (p - panel.vertices[k]).dot(&n).max(0.0);
            let tau = dist / -rate;
            if best.is_none_or(|(_, b)| tau < b) {
                best = Some((k, tau));
            }
        }
        best
    }

    /// Walk a geodesic-like straight path of length `distance` from `start`
    /// in panel `panel`, keeping the direction `dir` projected onto each
    /// panel's plane. `None` when the walk leaves the mesh.
    pub fn walk(
        &self,
        panel: u32,
        start: Point3<f64>,
        dir: Vector3<f64>,
        distance: f64,
    ) -> Option<(u32, Point3<f64>)> {
        let (mut t, mut p, mut left) = (panel as usize, start, distance);
        for _ in 0..self.max_steps.min(10_000) {
            let n = self.mesh.panels[t].normal.into_inner();
            let d = (dir - n * dir.dot(&n)).try_normalize(1e-12)?;
            let (k, tau) = self.exit(t, &p, &d)?;
            if tau >= left {
                return Some((t as u32, p + d * left));
            }
            p += d * tau.max(1e-9 * self.mesh.panels[t].size);
            left -= tau;
            t = self.mesh.edge_neighbours[t][k]? as usize;
        }
        None
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use tuft_mesh::{Mirrors, Point, TriMesh};

    /// A line in a panel whose flow converges on a point inside it (every
    /// vertex's velocity aimed at its centroid) turns on the spot: it is
    /// declared stalled after [`MAX_STEPS_IN_PANEL`] steps instead of
    /// running to the line's step limit.
    #[test]
    fn a_line_turning_on_the_spot_stalls() {
        // An equilateral panel; the flow converges on its centre `c`. The
        // line starts just past `c` towards the top corner and steps half
        // an edge back and forth through `c` along that line, which stays
        // inside the panel (the corner is 0.58 edges from `c`).
        let h = 3f64.sqrt() / 2.0;
        let triangle = TriMesh {
            vertices: vec![
                Point::new(0.0, 0.0, 0.0),
                Point::new(1.0, 0.0, 0.0),
                Point::new(0.5, h, 0.0),
            ],
            triangles: vec![[0, 1, 2]],
        };
        let mesh = PanelMesh::new(triangle, Mirrors::none()).unwrap();
        let mut field = SurfaceField::new(&mesh, &[Vector3::x()]);
        let centre = mesh.panels[0].centroid;
        for (v, p) in field.vertex_velocity.iter_mut().zip(&mesh.vertices) {
            *v = centre - p;
        }
        let tracer = Tracer {
            mesh: &mesh,
            field: &field,
            stop_speed: 1e-6,
            max_steps: 20_000,
        };
        let start = centre + 0.05 * Vector3::y();
        let line = tracer.trace(0, start, 1.0);
        assert_eq!(line.end, TraceEnd::Stalled);
        assert!(
            line.points.len() <= MAX_STEPS_IN_PANEL + 2,
            "{}",
            line.points.len()
        );
    }
}
