//! Running the variants that share one geometry: the mesh is prepared, the
//! influence matrix assembled and factorised once, and every variant's
//! free stream is a right-hand side of that one factorisation
//! (Katz & Plotkin 2001, sec. 12.2: the doublet matrix depends on the
//! panels only; the free stream enters through `sigma = n . V_inf`). Yaw
//! changes only the right-hand side as long as no symmetry plane is used
//! (a half model is refused at yaw).

use std::path::Path;
use std::time::Instant;

use anyhow::{Context, Result};
use serde::{Deserialize, Serialize};
use tuft_solver::potential::{PotentialParams, post_process, solve_system};
use tuft_solver::{Freestream, assemble};

use super::plan::{Setting, Variant};
use crate::case::Case;
use crate::geometry::{self, Geometry};
use crate::outdir::Staging;
use crate::pipeline;
use crate::progress::Progress;
use crate::summary::Summary;
use crate::write;

/// File name of a variant's sweep record, inside its run folder.
pub const VARIANT_FILE: &str = "variant.json";

/// How a variant's potential flow was solved.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct MatrixUse {
    /// Variants (of this process) that shared the assembled, factorised matrix.
    pub variants_sharing: usize,
    /// Assemblies and factorisations made for them: 1.
    pub factorisations: usize,
    /// The variant that paid for the factorisation.
    pub factorised_for: String,
    /// True when this variant used a matrix factorised for another.
    pub reused: bool,
    /// True when the variant ran the separated-flow loop (the default on
    /// the dense operator), which assembles and solves its own system: the
    /// shared solve then gave only the free stream.
    #[serde(default)]
    pub own_loop: bool,
}

/// `variant.json`: what a sweep set for this run folder.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct VariantRecord {
    /// Sweep name.
    pub sweep: String,
    /// Variant (folder) name.
    pub name: String,
    /// Position in the sweep's list (0-based).
    pub index: usize,
    /// What differs from the base case.
    pub settings: Vec<Setting>,
    /// The matrix it was solved with.
    pub matrix: MatrixUse,
}

/// What became of one variant.
pub enum Outcome {
    /// Finished: its summary.
    Done(Box<Summary>, MatrixUse),
    /// Failed, with the reason.
    Failed(String),
}

/// A variant of the group, with its index in the sweep.
pub struct Member<'a> {
    /// Position in the sweep's list.
    pub index: usize,
    /// The variant.
    pub variant: &'a Variant,
}

/// Run the members of one geometry group into `root/<name>/`; calls
/// `report` once per member as it finishes.
pub fn run_group(
    sweep: &str,
    dir: &Path,
    root: &Path,
    members: &[Member<'_>],
    force: bool,
    report: &mut dyn FnMut(&Member<'_>, &Outcome, f64),
) {
    let start = Instant::now();
    let mut cases = Vec::new();
    for m in members {
        match checked_case(dir, m.variant) {
            Ok(c) => cases.push((m, c)),
            Err(e) => report(m, &Outcome::Failed(e), 0.0),
        }
    }
    let Some((_, first)) = cases.first() else {
        return;
    };
    let geo = match geometry::load(first) {
        Ok(g) => g,
        Err(e) => {
            let why = format!("{e:#}");
            for (m, _) in &cases {
                report(m, &Outcome::Failed(why.clone()), 0.0);
            }
            return;
        }
    };
    let mut ok = Vec::new();
    for (m, c) in cases {
        let fs = Freestream::new(c.file.flow.speed, c.file.flow.yaw);
        match fs.check(&geo.mesh.mirrors) {
            Ok(()) => ok.push((m, c, fs)),
            Err(e) => report(m, &Outcome::Failed(e.to_string()), 0.0),
        }
    }
    let shared = shared_solve(&geo, &ok.iter().map(|x| x.2).collect::<Vec<_>>());
    let mut clock = start.elapsed().as_secs_f64();
    match shared {
        Err(e) => {
            for (m, _, _) in &ok {
                report(
                    m,
                    &Outcome::Failed(format!("potential-flow solve: {e:#}")),
                    clock,
                );
            }
        }
        Ok(solutions) => {
            let first_name = ok
                .first()
                .map(|x| x.0.variant.name.clone())
                .unwrap_or_default();
            for (k, ((m, case, _), potential)) in ok.iter().zip(solutions).enumerate() {
                let t = Instant::now();
                let own_loop = pipeline::loop_wanted(case);
                let matrix = MatrixUse {
                    variants_sharing: ok.len(),
                    factorisations: 1,
                    factorised_for: first_name.clone(),
                    reused: k > 0,
                    own_loop,
                };
                let record = VariantRecord {
                    sweep: sweep.into(),
                    name: m.variant.name.clone(),
                    index: m.index,
                    settings: m.variant.settings.clone(),
                    matrix: matrix.clone(),
                };
                let out = root.join(&m.variant.name);
                let outcome = match run_one(case, &geo, potential, &out, &record, force) {
                    Ok(s) => Outcome::Done(Box::new(s), matrix),
                    Err(e) => Outcome::Failed(format!("{e:#}")),
                };
                report(m, &outcome, clock + t.elapsed().as_secs_f64());
                clock = 0.0;
            }
        }
    }
}

/// The checked case of a variant, named after it; STL paths are absolute.
fn checked_case(dir: &Path, v: &Variant) -> Result<Case, String> {
    let file = v.file.clone()?;
    Case::from_file(&dir.join(format!("{}.toml", v.name)), file).map_err(|e| format!("{e:#}"))
}

/// Assemble and factorise once, solve every free stream.
fn shared_solve(
    geo: &Geometry,
    streams: &[Freestream],
) -> Result<Vec<tuft_solver::PotentialSolution>> {
    if streams.is_empty() {
        return Ok(Vec::new());
    }
    let params = PotentialParams::default();
    let system = assemble(&geo.mesh, &params)?;
    let rhs = streams
        .iter()
        .map(|fs| system.rhs(&fs.velocity()))
        .collect();
    let (mus, stats) = solve_system(system, rhs, &params)?;
    Ok(mus
        .into_iter()
        .zip(streams)
        .map(|(mu, fs)| post_process(&geo.mesh, mu, fs, stats))
        .collect())
}

/// Boundary layer, loads and every output of one variant, into `out`.
fn run_one(
    case: &Case,
    geo: &Geometry,
    potential: tuft_solver::PotentialSolution,
    out: &Path,
    record: &VariantRecord,
    force: bool,
) -> Result<Summary> {
    let staging = Staging::new(out, force)?;
    let mut progress = Progress::new(true, &case.name);
    let computed = pipeline::compute_from_potential(&geo.mesh, case, potential, &mut progress)?;
    let summary = write::write_all(case, geo, &computed, &staging, &mut progress)
        .with_context(|| format!("writing results for {}", out.display()))?;
    let json = serde_json::to_string_pretty(record)? + "\n";
    std::fs::write(staging.file(VARIANT_FILE), json).context(VARIANT_FILE)?;
    staging.commit()?;
    Ok(summary)
}
