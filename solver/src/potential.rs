//! Potential flow about a closed body (with its mirror images): the public
//! entry points of the panel method.
//!
//! Katz & Plotkin, *Low-Speed Aerodynamics*, 2nd ed. (2001), sec. 12.2
//! (Dirichlet formulation with constant-strength sources and doublets):
//! `sigma_j = n_j . V_inf`, the doublet strengths `mu` solve
//! `C mu = -B sigma` ([`mod@crate::assemble`]), and the surface velocity is
//! `V = V_inf - (V_inf . n) n - grad_t mu` ([`surface_velocity`]); `mu` is
//! the inside minus the outside perturbation potential, so on a sphere of
//! radius `a` at speed `U` it tends to `-U x / 2`.
//!
//! Parallelism: assembly (one row per rayon task) and the surface gradient
//! (one panel per task) do each row's and panel's sums in a fixed order, so
//! they do not depend on the thread count; the LU and the matrix-vector
//! products are faer's parallel kernels over all rayon threads (their
//! rounding may depend on the thread count; not checked). Run inside a
//! `rayon::ThreadPool::install` to limit the threads.
//!
//! ```
//! use tuft_mesh::{generate, Mirrors, PanelMesh};
//! use tuft_solver::potential::{solve_potential, Freestream};
//! let mesh = PanelMesh::new(generate::icosphere(1.0, 2), Mirrors::none()).unwrap();
//! let sol = solve_potential(&mesh, &Freestream::new(1.0, 0.0)).unwrap();
//! // Lamb (1932): Cp = 1 - 9/4 sin^2(theta), so at least -1.25 on a sphere.
//! let min_cp = sol.cp.iter().cloned().fold(f64::INFINITY, f64::min);
//! assert!((min_cp + 1.25).abs() < 0.1);
//! ```

use nalgebra::Vector3;
use tuft_mesh::{Mirrors, PanelMesh};

use crate::SolverError;
use crate::assemble::{InfluenceSystem, assemble};
use crate::gradient::{surface_gradient, surface_normals};
use crate::hmatrix::{CompressedParams, CompressedSystem, assemble_compressed, solve_compressed};
use crate::linear::{DenseLu, gmres};

/// Uniform free stream `speed * (cos yaw, sin yaw, 0)`, parallel to the
/// ground.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Freestream {
    /// Speed, m/s.
    pub speed: f64,
    /// Yaw angle about +z, degrees (positive turns the stream toward +y).
    pub yaw_deg: f64,
}

impl Freestream {
    /// A free stream of `speed` m/s at `yaw_deg` degrees.
    pub fn new(speed: f64, yaw_deg: f64) -> Self {
        Self { speed, yaw_deg }
    }

    /// Velocity vector `speed * (cos yaw, sin yaw, 0)`, m/s.
    pub fn velocity(&self) -> Vector3<f64> {
        let y = self.yaw_deg.to_radians();
        Vector3::new(y.cos(), y.sin(), 0.0) * self.speed
    }

    /// Check the free stream against the mirror planes.
    ///
    /// # Errors
    /// [`SolverError::BadSpeed`], [`SolverError::BadYaw`], and
    /// [`SolverError::YawWithSymmetry`] for nonzero yaw on a half model.
    pub fn check(&self, mirrors: &Mirrors) -> Result<(), SolverError> {
        if !(self.speed > 0.0 && self.speed.is_finite()) {
            return Err(SolverError::BadSpeed { speed: self.speed });
        }
        if !self.yaw_deg.is_finite() {
            return Err(SolverError::BadYaw {
                yaw_deg: self.yaw_deg,
            });
        }
        if mirrors.symmetry && self.yaw_deg != 0.0 {
            return Err(SolverError::YawWithSymmetry {
                yaw_deg: self.yaw_deg,
            });
        }
        Ok(())
    }
}

/// Which linear solver to use.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LinearSolver {
    /// Dense LU below [`PotentialParams::krylov_from`] panels, Krylov
    /// from there, [`LinearSolver::Compressed`] from
    /// [`PotentialParams::compressed_from`].
    Auto,
    /// Dense LU with partial pivoting, in place.
    DenseLu,
    /// Restarted GMRES with a Jacobi preconditioner.
    Krylov,
    /// For large meshes (`Auto` picks it from
    /// [`PotentialParams::compressed_from`] panels): the matrix compressed as a hierarchical
    /// matrix (near field dense, far field low rank by ACA, see
    /// [`crate::hmatrix`]), solved by GMRES with a block-Jacobi
    /// preconditioner. Never assembles the dense `N x N` matrix. Given an
    /// already assembled dense system ([`solve_system`]) it means
    /// [`LinearSolver::Krylov`].
    Compressed,
}

/// Settings of the potential-flow solve.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PotentialParams {
    /// Beyond this many panel sizes from a panel's centroid its influence
    /// is that of a point source and point doublet (default 6; chosen by
    /// the far-field error test in the validation suite).
    pub far_field_ratio: f64,
    /// Linear solver.
    pub linear_solver: LinearSolver,
    /// Relative residual at which the Krylov solver stops.
    pub krylov_tolerance: f64,
    /// Most Krylov iterations (matrix-vector products).
    pub max_iterations: usize,
    /// GMRES restart length.
    pub krylov_restart: usize,
    /// Panel count from which [`LinearSolver::Auto`] picks Krylov.
    pub krylov_from: usize,
    /// Panel count from which [`LinearSolver::Auto`] picks the compressed
    /// operator (default 20,000: measured faster than the dense Krylov
    /// path there, 8.5 s against 25 s for build and solve of the
    /// Ahmed-type body over the ground, and `8 N^2` bytes stop fitting in
    /// memory beyond about 40,000 panels; see BENCHMARKS.md).
    pub compressed_from: usize,
    /// Settings of [`LinearSolver::Compressed`].
    pub compressed: CompressedParams,
}

impl Default for PotentialParams {
    fn default() -> Self {
        Self {
            far_field_ratio: 6.0,
            linear_solver: LinearSolver::Auto,
            krylov_tolerance: 1e-10,
            max_iterations: 500,
            krylov_restart: 60,
            krylov_from: 2000,
            compressed_from: 20_000,
            compressed: CompressedParams::default(),
        }
    }
}

/// How the linear system was solved.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SolveStats {
    /// The solver actually used (never `Auto`).
    pub method: LinearSolver,
    /// Krylov iterations; `None` for LU.
    pub iterations: Option<usize>,
    /// Relative residual `|b - C mu| / |b|` (largest over right-hand
    /// sides; for [`LinearSolver::Compressed`] with the compressed `C`);
    /// NaN for LU, whose factorisation overwrites `C`.
    pub residual: f64,
}

/// The potential-flow solution on the real panels.
#[derive(Debug, Clone)]
pub struct PotentialSolution {
    /// Doublet strength per panel (inside minus outside perturbation
    /// potential), m^2/s.
    pub mu: Vec<f64>,
    /// Source strength per panel, `n . V_inf`, m/s.
    pub sigma: Vec<f64>,
    /// Surface velocity at each panel centroid, m/s.
    pub velocity: Vec<Vector3<f64>>,
    /// Pressure coefficient `1 - |V|^2 / U^2` per panel.
    pub cp: Vec<f64>,
    /// The free stream solved for.
    pub freestream: Freestream,
    /// How the linear system was solved.
    pub stats: SolveStats,
}

/// Solve with default settings.
///
/// # Errors
/// See [`solve_potential_with_params`].
pub fn solve_potential(
    mesh: &PanelMesh,
    fs: &Freestream,
) -> Result<PotentialSolution, SolverError> {
    solve_potential_with_params(mesh, fs, &PotentialParams::default())
}

/// Assemble, solve and post-process one free stream.
///
/// # Errors
/// Free-stream errors of [`Freestream::check`], assembly errors of
/// [`assemble`], [`SolverError::Singular`] and
/// [`SolverError::NotConverged`] from the linear solvers.
pub fn solve_potential_with_params(
    mesh: &PanelMesh,
    fs: &Freestream,
    params: &PotentialParams,
) -> Result<PotentialSolution, SolverError> {
    fs.check(&mesh.mirrors)?;
    if chosen_solver(params, mesh.len()) == LinearSolver::Compressed {
        return solve_compressed_path(mesh, fs, params);
    }
    let system = assemble(mesh, params)?;
    let v_inf = fs.velocity();
    let rhs = system.rhs(&v_inf);
    let (mut mus, stats) = solve_system(system, vec![rhs], params)?;
    let mu = mus.pop().unwrap_or_default();
    Ok(post_process(mesh, mu, fs, stats))
}

/// Assemble once and solve several free streams on the same panels (the
/// matrix depends on the panels only; Katz & Plotkin 2001, sec. 12.2), on
/// the path [`solve_potential_with_params`] would take for one: each
/// solution equals that function's for its free stream.
///
/// # Errors
/// As [`solve_potential_with_params`], for the first free stream that
/// fails.
pub fn solve_potential_many(
    mesh: &PanelMesh,
    streams: &[Freestream],
    params: &PotentialParams,
) -> Result<Vec<PotentialSolution>, SolverError> {
    for fs in streams {
        fs.check(&mesh.mirrors)?;
    }
    if streams.is_empty() {
        return Ok(Vec::new());
    }
    if chosen_solver(params, mesh.len()) == LinearSolver::Compressed {
        let system = assemble_compressed(mesh, params)?;
        return streams
            .iter()
            .map(|fs| solve_on_compressed(mesh, &system, fs, params))
            .collect();
    }
    let system = assemble(mesh, params)?;
    let rhs = streams
        .iter()
        .map(|fs| system.rhs(&fs.velocity()))
        .collect();
    let (mus, stats) = solve_system(system, rhs, params)?;
    Ok(mus
        .into_iter()
        .zip(streams)
        .map(|(mu, fs)| post_process(mesh, mu, fs, stats))
        .collect())
}

/// The [`LinearSolver::Compressed`] path: compressed assembly, GMRES,
/// the same post-processing.
fn solve_compressed_path(
    mesh: &PanelMesh,
    fs: &Freestream,
    params: &PotentialParams,
) -> Result<PotentialSolution, SolverError> {
    solve_on_compressed(mesh, &assemble_compressed(mesh, params)?, fs, params)
}

/// Solve one free stream on an assembled compressed system and
/// post-process it.
fn solve_on_compressed(
    mesh: &PanelMesh,
    system: &CompressedSystem,
    fs: &Freestream,
    params: &PotentialParams,
) -> Result<PotentialSolution, SolverError> {
    let sol = solve_compressed(system, &system.rhs(&fs.velocity()), params)?;
    let stats = SolveStats {
        method: LinearSolver::Compressed,
        iterations: Some(sol.iterations),
        residual: sol.residual,
    };
    Ok(post_process(mesh, sol.x, fs, stats))
}

/// Sigma, surface velocity and Cp from a solved `mu`.
pub fn post_process(
    mesh: &PanelMesh,
    mu: Vec<f64>,
    fs: &Freestream,
    stats: SolveStats,
) -> PotentialSolution {
    let v_inf = fs.velocity();
    let sigma = mesh.panels.iter().map(|p| p.normal.dot(&v_inf)).collect();
    let velocity = surface_velocity(mesh, &mu, &v_inf);
    let cp = pressure_coefficients(&velocity, fs.speed);
    PotentialSolution {
        mu,
        sigma,
        velocity,
        cp,
        freestream: *fs,
        stats,
    }
}

/// Solve `C mu = rhs` for every right-hand side with the solver `params`
/// asks for (one LU factorisation serves them all).
///
/// # Errors
/// [`SolverError::LengthMismatch`] for a right-hand side of the wrong
/// length, [`SolverError::Singular`], [`SolverError::NotConverged`].
pub fn solve_system(
    system: InfluenceSystem,
    rhs: Vec<Vec<f64>>,
    params: &PotentialParams,
) -> Result<(Vec<Vec<f64>>, SolveStats), SolverError> {
    let n = system.len();
    if let Some(bad) = rhs.iter().find(|b| b.len() != n) {
        return Err(SolverError::LengthMismatch {
            what: "right-hand side",
            expected: n,
            got: bad.len(),
        });
    }
    match chosen_solver(params, n) {
        LinearSolver::Krylov | LinearSolver::Compressed => solve_krylov(&system, &rhs, params),
        _ => solve_lu(system, rhs),
    }
}

/// The solver `Auto` stands for at `n` panels.
fn chosen_solver(params: &PotentialParams, n: usize) -> LinearSolver {
    match params.linear_solver {
        LinearSolver::Auto if n >= params.compressed_from => LinearSolver::Compressed,
        LinearSolver::Auto if n >= params.krylov_from => LinearSolver::Krylov,
        LinearSolver::Auto => LinearSolver::DenseLu,
        other => other,
    }
}

fn solve_lu(
    system: InfluenceSystem,
    rhs: Vec<Vec<f64>>,
) -> Result<(Vec<Vec<f64>>, SolveStats), SolverError> {
    let n = system.len();
    let lu = DenseLu::factor(system)?;
    let mut b = faer::Mat::from_fn(n, rhs.len(), |i, k| rhs[k][i]);
    lu.solve_in_place(b.as_mut());
    let mus = (0..rhs.len())
        .map(|k| (0..n).map(|i| b[(i, k)]).collect())
        .collect();
    let stats = SolveStats {
        method: LinearSolver::DenseLu,
        iterations: None,
        residual: f64::NAN,
    };
    Ok((mus, stats))
}

fn solve_krylov(
    system: &InfluenceSystem,
    rhs: &[Vec<f64>],
    params: &PotentialParams,
) -> Result<(Vec<Vec<f64>>, SolveStats), SolverError> {
    let mut stats = SolveStats {
        method: LinearSolver::Krylov,
        iterations: Some(0),
        residual: 0.0,
    };
    let mut mus = Vec::with_capacity(rhs.len());
    for b in rhs {
        let s = gmres(
            system.matrix(),
            b,
            params.krylov_tolerance,
            params.max_iterations,
            params.krylov_restart,
        )?;
        stats.iterations = stats.iterations.map(|it| it.max(s.iterations));
        stats.residual = stats.residual.max(s.residual);
        mus.push(s.x);
    }
    Ok((mus, stats))
}

/// Surface velocity at each panel centroid from the doublet strengths:
/// `V = V_inf - (V_inf . n) n - grad_t mu` (Katz & Plotkin 2001, eq.
/// 12.33, with their sign convention for `mu` = inside minus outside).
/// `n` is the smooth surface normal of
/// [`crate::gradient::surface_normals`] (the panel normal across creases),
/// so the velocity is tangent to the underlying smooth surface.
///
/// # Panics
/// If `mu` is not one value per panel.
#[track_caller]
pub fn surface_velocity(mesh: &PanelMesh, mu: &[f64], v_inf: &Vector3<f64>) -> Vec<Vector3<f64>> {
    let grad = surface_gradient(mesh, mu);
    surface_normals(mesh)
        .into_iter()
        .zip(grad)
        .map(|(n, g)| v_inf - n * n.dot(v_inf) - g)
        .collect()
}

/// Pressure coefficient from the steady Bernoulli equation,
/// `Cp = 1 - |V|^2 / U^2` (Katz & Plotkin 2001, ch. 2 and sec. 12.2 (from memory)).
pub fn pressure_coefficients(velocity: &[Vector3<f64>], speed: f64) -> Vec<f64> {
    velocity
        .iter()
        .map(|v| 1.0 - v.norm_squared() / (speed * speed))
        .collect()
}
