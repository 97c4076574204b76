//! Wake panels and the Kutta condition in the assembled system.
//!
//! Katz & Plotkin, *Low-Speed Aerodynamics*, 2nd ed. (2001), sec. 12.3
//! (eqs. 12.15-12.16, steady Dirichlet method): each trailing-edge edge
//! sheds one flat, constant-strength doublet panel that runs straight
//! downstream along the free stream far behind the body; the Kutta
//! condition fixes its strength to `mu_w = mu_upper - mu_lower`. With the
//! wake normal on the upper side, this makes the potential jump across the
//! wake equal the jump between the two trailing-edge panels. The wake then
//! adds `+C_iw` to the column of the upper panel and `-C_iw` to that of the
//! lower one in row `i` (`C_iw = -D_w(P_i)/4 pi`), mirror images of the
//! wake included; on triangles each side is the weighted pair of
//! [`side_weights`].

use nalgebra::Vector3;
use tuft_mesh::{Panel, PanelMesh, Point, Reflection, Vector};

use super::WakeError;
use super::detect::{
    DetectParams, TrailingEdge, find_trailing_edges_with_params, trailing_edges_from_list,
};
use super::split::{sharp_edges, split_edges};
use crate::assemble::{InfluenceSystem, assemble, doublet_column};
use crate::potential::{
    Freestream, PotentialParams, PotentialSolution, post_process, solve_system,
};

/// The wake sheet: flat quadrilateral doublet panels and their strengths.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Wake {
    /// Corners of each wake panel, `[start, end, end + L u, start + L u]`
    /// for trailing edge `start -> end`, counter-clockwise about the wake
    /// normal (which points to the upper side).
    pub panels: Vec<[Point; 4]>,
    /// Doublet strength of each panel, `mu_upper - mu_lower` (each side as
    /// weighted by [`side_weights`]), m^2/s.
    pub strength: Vec<f64>,
}

impl Wake {
    /// The wake reflected in `r`, corner order reversed when the reflection
    /// reverses orientation; strengths unchanged (the image body carries
    /// the same `mu`).
    pub fn reflected(&self, r: &Reflection) -> Wake {
        let panels = self
            .panels
            .iter()
            .map(|q| {
                let [a, b, c, d] = q.map(|p| r.point(&p));
                if r.reverses_orientation() {
                    [a, d, c, b]
                } else {
                    [a, b, c, d]
                }
            })
            .collect();
        Wake {
            panels,
            strength: self.strength.clone(),
        }
    }

    /// Force on the bound vortices at the trailing edges by the
    /// Kutta-Joukowski theorem, `F = rho sum_k V_inf x (Gamma_k l_k)`, with
    /// `Gamma_k = mu_w,k` and `l_k` the first side of wake panel `k` (the
    /// doublet panel is a vortex ring of circulation `mu` along its corners;
    /// Katz & Plotkin 2001, sec. 10.4.3 and eq. 12.25). The images' induced
    /// velocity at the bound vortex is not included, so in ground effect
    /// this is only an estimate; in free air it checks the pressure
    /// integral. N.
    pub fn kutta_joukowski_force(&self, v_inf: &Vector, density: f64) -> Vector {
        self.panels
            .iter()
            .zip(&self.strength)
            .map(|(q, mu)| v_inf.cross(&((q[1] - q[0]) * *mu)) * density)
            .sum()
    }
}

/// Settings of the wake and of the solve with it.
#[derive(Debug, Clone, PartialEq)]
pub struct WakeParams {
    /// Wake length in body lengths (streamwise extent of the mesh). The
    /// default 50 changes the lift of an aspect-ratio-6 wing by less than
    /// 0.1 % against 100 (checked in the validation suite).
    pub length: f64,
    /// Trailing-edge search, used when `edges` is `None`.
    pub detect: DetectParams,
    /// Trailing edges named as vertex pairs instead of searched for.
    pub edges: Option<Vec<[u32; 2]>>,
    /// Settings of the potential-flow solve.
    pub potential: PotentialParams,
    /// The surface gradient of `mu` is not taken across trailing edges nor
    /// across edges whose normals are more than this many degrees apart
    /// (default 75: a 90-degree wing tip or box corner is cut, a
    /// coarsely panelled curved surface is not; 180 cuts trailing edges
    /// only).
    pub gradient_cut_angle_deg: f64,
}

impl Default for WakeParams {
    fn default() -> Self {
        Self {
            length: 50.0,
            detect: DetectParams::default(),
            edges: None,
            potential: PotentialParams::default(),
            gradient_cut_angle_deg: 75.0,
        }
    }
}

/// A potential-flow solution with its wake.
#[derive(Debug, Clone)]
pub struct WakeSolution {
    /// Strengths, surface velocity and Cp on the real panels (the velocity
    /// taken one-sided at the trailing edges).
    pub solution: PotentialSolution,
    /// The wake geometry and strengths.
    pub wake: Wake,
    /// The trailing edges the wake leaves from, one per wake panel.
    pub edges: Vec<TrailingEdge>,
}

/// Wake panels of length `length` (m) along the unit stream direction `u`,
/// one per trailing edge.
pub fn wake_panels(
    mesh: &PanelMesh,
    edges: &[TrailingEdge],
    u: &Vector,
    length: f64,
) -> Vec<[Point; 4]> {
    edges
        .iter()
        .map(|e| {
            let a = mesh.vertices[e.start as usize];
            let b = mesh.vertices[e.end as usize];
            [a, b, b + u * length, a + u * length]
        })
        .collect()
}

/// Fold the wake into the assembled system: for each trailing edge, the
/// doublet influence of its wake panel (as two triangles, images included)
/// is added to the columns of the upper side and subtracted from those of
/// the lower side, with the weights of [`side_weights`].
///
/// # Errors
/// [`WakeError::EdgeAlongStream`] when a wake panel has no area.
pub fn add_wake_columns(
    system: &mut InfluenceSystem,
    mesh: &PanelMesh,
    edges: &[TrailingEdge],
    panels: &[[Point; 4]],
) -> Result<(), WakeError> {
    let ratio = system.far_field_ratio;
    for (e, q) in edges.iter().zip(panels) {
        let mut column = vec![0.0; mesh.len()];
        for tri in [[q[0], q[1], q[2]], [q[0], q[2], q[3]]] {
            let panel = Panel::new(tri).ok_or(WakeError::EdgeAlongStream {
                start: e.start,
                end: e.end,
            })?;
            for (c, v) in column.iter_mut().zip(doublet_column(mesh, &panel, ratio)) {
                *c += v;
            }
        }
        let [upper, lower] = side_weights(mesh, e);
        for (p, w) in upper {
            let scaled: Vec<f64> = column.iter().map(|v| w * v).collect();
            system.add_to_column(p, &scaled);
        }
        for (p, w) in lower {
            let scaled: Vec<f64> = column.iter().map(|v| -w * v).collect();
            system.add_to_column(p, &scaled);
        }
    }
    Ok(())
}

/// Solve the potential flow with a Kutta wake, default settings.
///
/// # Errors
/// See [`solve_potential_with_wake_params`].
pub fn solve_potential_with_wake(
    mesh: &PanelMesh,
    fs: &Freestream,
) -> Result<WakeSolution, WakeError> {
    solve_potential_with_wake_params(mesh, fs, &WakeParams::default())
}

/// Find (or take) the trailing edges, shed the wake, assemble and solve
/// with the Kutta condition, then compute the surface velocity on the mesh
/// cut open along the trailing edges and the sharp edges
/// ([`WakeParams::gradient_cut_angle_deg`]). A body without trailing edges
/// gets an empty wake and the strengths of the plain solve (its surface
/// velocity still comes from the gradient cut at sharp edges).
///
/// # Errors
/// [`WakeError::BadParameter`] for a wake length that is not positive,
/// trailing-edge errors of [`trailing_edges_from_list`], and the solver's
/// errors as [`WakeError::Solver`] ([`WakeError::Mesh`] cannot occur for a
/// mesh that already formed a [`PanelMesh`]).
pub fn solve_potential_with_wake_params(
    mesh: &PanelMesh,
    fs: &Freestream,
    params: &WakeParams,
) -> Result<WakeSolution, WakeError> {
    if !(params.length.is_finite() && params.length > 0.0) {
        return Err(WakeError::BadParameter {
            name: "length",
            value: params.length,
        });
    }
    fs.check(&mesh.mirrors)?;
    let v_inf: Vector3<f64> = fs.velocity();
    let u = v_inf / fs.speed;
    let edges = match &params.edges {
        Some(list) => trailing_edges_from_list(mesh, list, &u)?,
        None => find_trailing_edges_with_params(mesh, &u, &params.detect),
    };
    let (lo, hi) = mesh.bounds();
    let body_length = (hi.x - lo.x).max(1e-3 * (hi - lo).amax());
    let panels = wake_panels(mesh, &edges, &u, params.length * body_length);
    let mut system: InfluenceSystem = assemble(mesh, &params.potential)?;
    add_wake_columns(&mut system, mesh, &edges, &panels)?;
    let rhs = system.rhs(&v_inf);
    let (mut mus, stats) = solve_system(system, vec![rhs], &params.potential)?;
    let mu = mus.pop().unwrap_or_default();
    let strength = wake_strengths(mesh, &edges, &mu);
    let mut cut_edges = sharp_edges(mesh, params.gradient_cut_angle_deg);
    cut_edges.extend(edges.iter().map(|e| [e.start, e.end]));
    let cut = split_edges(mesh, &cut_edges)?;
    Ok(WakeSolution {
        solution: post_process(&cut, mu, fs, stats),
        wake: Wake { panels, strength },
        edges,
    })
}

/// Panels and weights (summing to one) whose weighted doublet strength is
/// taken as the value on each side of a trailing edge: `[upper, lower]`.
///
/// On a mesh of triangles the panel on the edge has its centroid off the
/// edge's midpoint along the span (by a sixth of the edge length for a
/// split quadrilateral), in opposite directions on the two sides, and near
/// a wing tip, where `mu` changes fast along the span, that offset alone
/// changed the tip wake strength by a factor of two between the two tips
/// of a symmetric wing. So each side is the area-weighted mean of the edge
/// panel and of its neighbour (across a non-trailing edge, on the same
/// face) whose centroid is closest to the midpoint along the edge and
/// within the edge's span: for a split quadrilateral, the two halves of
/// the quadrilateral, centred on the midpoint like the single quadrilateral
/// panel of Katz & Plotkin (2001, sec. 12.3). Without such a neighbour the
/// edge panel alone is used.
pub fn side_weights(mesh: &PanelMesh, e: &TrailingEdge) -> [Vec<(usize, f64)>; 2] {
    [e.upper, e.lower].map(|panel| {
        let a = mesh.vertices[e.start as usize];
        let b = mesh.vertices[e.end as usize];
        let half = 0.5 * (b - a).norm();
        let along = (b - a) / (2.0 * half);
        let mid = Point::from((a.coords + b.coords) / 2.0);
        let own = &mesh.panels[panel];
        let tri = mesh.triangles[panel];
        let partner = (0..3)
            .filter(|&k| {
                let ends = [tri[k], tri[(k + 1) % 3]];
                !(ends.contains(&e.start) && ends.contains(&e.end))
            })
            .filter_map(|k| mesh.edge_neighbours[panel][k].map(|o| o as usize))
            .filter(|&o| mesh.panels[o].normal.dot(&own.normal) > 0.5)
            .map(|o| (o, (mesh.panels[o].centroid - mid).dot(&along).abs()))
            .filter(|&(_, s)| s < 0.9 * half)
            .min_by(|x, y| x.1.total_cmp(&y.1));
        match partner {
            Some((o, _)) => {
                let (wa, wb) = (own.area, mesh.panels[o].area);
                vec![(panel, wa / (wa + wb)), (o, wb / (wa + wb))]
            }
            None => vec![(panel, 1.0)],
        }
    })
}

/// Wake strengths `mu_upper - mu_lower` from a solved `mu`, each side
/// weighted as in [`side_weights`].
pub fn wake_strengths(mesh: &PanelMesh, edges: &[TrailingEdge], mu: &[f64]) -> Vec<f64> {
    edges
        .iter()
        .map(|e| {
            let [upper, lower] = side_weights(mesh, e);
            let side = |w: &[(usize, f64)]| w.iter().map(|&(p, x)| x * mu[p]).sum::<f64>();
            side(&upper) - side(&lower)
        })
        .collect()
}
