//! Running the variants that share one geometry: the mesh is prepared, the
//! influence matrix assembled once (and factorised, below 2,000 panels),
//! and every variant's free stream is a right-hand side of that one matrix,
//! in the separated-flow loop's passes as in the attached flow
//! (Katz & Plotkin 2001, sec. 12.2: the doublet matrix depends on the
//! panels only; the free stream enters through `sigma = n . V_inf`). Yaw
//! changes only the right-hand side as long as no symmetry plane is used
//! (a half model is refused at yaw).

use std::path::Path;
use std::time::Instant;

use anyhow::{Context, Result};
use serde::{Deserialize, Serialize};
use tuft_solver::{Freestream, PotentialSolution, solve_potential_many};

use super::plan::{Setting, Variant};
use crate::case::Case;
use crate::geometry::{self, Geometry};
use crate::outdir::Staging;
use crate::pipeline::{self, SharedBody};
use crate::progress::Progress;
use crate::summary::Summary;
use crate::write;

/// File name of a variant's sweep record, inside its run folder.
pub const VARIANT_FILE: &str = "variant.json";

/// How a variant's potential flow was solved.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct MatrixUse {
    /// Variants (of this process) that shared the assembled matrix.
    pub variants_sharing: usize,
    /// Assemblies (and factorisations, below 2,000 panels) made for them: 1.
    #[serde(alias = "factorisations")]
    pub assemblies: usize,
    /// The variant that paid for the assembly.
    #[serde(alias = "factorised_for")]
    pub assembled_for: String,
    /// True when this variant used a matrix assembled for another.
    pub reused: bool,
    /// True when the variant ran the separated-flow loop (the default) on
    /// the shared matrix; false when it ran the attached flow only, whose
    /// solve the group shared.
    #[serde(default, alias = "own_loop")]
    pub separated_loop: bool,
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
    /// Its finished folder answers an older case or STL and is replaced.
    pub stale: bool,
}

/// Run the members of one geometry group into `root/<name>/`; calls
/// `report` once per member as it finishes.
pub fn run_group(
    sweep: &str,
    dir: &Path,
    root: &Path,
    members: &[Member<'_>],
    (force, memory_limit, noise, quiet): (bool, Option<f64>, bool, bool),
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
    // Each phase said as `tuft run` says it (a review's sweep sat silent
    // for 25 to 35 s a variant after its "running" line).
    let mut progress = Progress::new(quiet, &first.name);
    let what = "reading and preparing the geometry";
    let phase = progress.begin("geometry", what);
    let stages = progress.stages(&phase, what);
    let loaded = geometry::load_keeping(first, noise);
    drop(stages);
    let geo = match loaded {
        Ok(g) => {
            progress.end(phase, &crate::run::panels_note(&g));
            g
        }
        Err(e) => {
            phase.clear();
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
        // Each member's axles and regions, as `tuft run` checks them (a
        // sweep may move an axle off the body; the geometry was checked
        // with the first member's).
        let checked = fs
            .check(&geo.mesh.mirrors)
            .map_err(|e| e.to_string())
            .and_then(|()| geometry::check_placement(&geo.mesh, &c).map_err(|e| format!("{e:#}")));
        match checked {
            Ok(()) => ok.push((m, c, fs)),
            Err(e) => report(m, &Outcome::Failed(e), 0.0),
        }
    }
    let Some((_, first_case, _)) = ok.first() else {
        return;
    };
    // The wakes setting is part of the geometry key, so the members agree.
    let loop_on = pipeline::loop_wanted(first_case);
    // What the members share: the loop's body system, or the attached
    // flow of each (one solve of one matrix for every free stream).
    let phase = progress.begin(
        "assembly",
        &format!(
            "assembling the matrix the {} share, {} panels",
            crate::output::plural(ok.len(), "variant", "variants"),
            geo.mesh.len()
        ),
    );
    let shared = if loop_on {
        SharedBody::build(&geo.mesh, first_case, memory_limit).map(|b| (Some(b), Vec::new()))
    } else {
        shared_solve(
            &geo,
            first_case,
            &ok.iter().map(|x| x.2).collect::<Vec<_>>(),
            memory_limit,
        )
        .map(|s| (None, s))
    };
    let mut clock = start.elapsed().as_secs_f64();
    let (body, solutions) = match shared {
        Ok(s) => {
            progress.end(phase, "");
            s
        }
        Err(e) => {
            phase.clear();
            for (m, _, _) in &ok {
                report(
                    m,
                    &Outcome::Failed(format!("potential-flow solve: {e:#}")),
                    clock,
                );
            }
            return;
        }
    };
    let inputs: Vec<Input<'_>> = match &body {
        Some(b) => ok.iter().map(|_| Input::Loop(b)).collect(),
        None => solutions.into_iter().map(Input::Potential).collect(),
    };
    let first_name = ok[0].0.variant.name.clone();
    for ((k, (m, case, _)), input) in ok.iter().enumerate().zip(inputs) {
        let t = Instant::now();
        let matrix = MatrixUse {
            variants_sharing: ok.len(),
            assemblies: 1,
            assembled_for: first_name.clone(),
            reused: k > 0,
            separated_loop: loop_on,
        };
        let record = VariantRecord {
            sweep: sweep.into(),
            name: m.variant.name.clone(),
            index: m.index,
            settings: m.variant.settings.clone(),
            matrix: matrix.clone(),
        };
        let out = root.join(&m.variant.name);
        let outcome = match run_one(
            case,
            &geo,
            input,
            (&out, force || m.stale),
            &record,
            noise.then_some(memory_limit),
            quiet,
        ) {
            Ok(s) => Outcome::Done(Box::new(s), matrix),
            Err(e) => Outcome::Failed(format!("{e:#}")),
        };
        report(m, &outcome, clock + t.elapsed().as_secs_f64());
        clock = 0.0;
    }
}

/// One member's share.
enum Input<'a> {
    Loop(&'a SharedBody),
    Potential(PotentialSolution),
}

/// The checked case of a variant, named after it; STL paths are absolute.
fn checked_case(dir: &Path, v: &Variant) -> Result<Case, String> {
    let file = v.file.clone()?;
    Case::from_file(&dir.join(format!("{}.toml", v.name)), file).map_err(|e| format!("{e:#}"))
}

/// Assemble (and factorise, when small) once, solve every free stream, on
/// the operator `tuft run` would choose for the case (refused, as there,
/// when it does not fit under `memory_limit`).
fn shared_solve(
    geo: &Geometry,
    case: &Case,
    streams: &[Freestream],
    memory_limit: Option<f64>,
) -> Result<Vec<PotentialSolution>> {
    if streams.is_empty() {
        return Ok(Vec::new());
    }
    let operator = pipeline::attached_operator(&geo.mesh, case, memory_limit)?;
    Ok(solve_potential_many(
        &geo.mesh,
        streams,
        &pipeline::potential_params(operator),
    )?)
}

/// Boundary layer, loads and every output of one variant, into `out`
/// (replacing a folder tuft wrote when `force`); `noise`: measure its
/// panel noise too, within this memory limit (each of its two other panel
/// counts on a system of its own: the group's is for its own panels);
/// `quiet`: no progress lines.
fn run_one(
    case: &Case,
    geo: &Geometry,
    input: Input<'_>,
    (out, force): (&Path, bool),
    record: &VariantRecord,
    noise: Option<Option<f64>>,
    quiet: bool,
) -> Result<Summary> {
    let staging = Staging::new(out, force, crate::outdir::Kind::Run)?;
    let mut progress = Progress::new(quiet, &case.name);
    let mut computed = match input {
        Input::Loop(body) => pipeline::compute_on_body(&geo.mesh, case, body, &mut progress)?,
        Input::Potential(p) => pipeline::compute_from_potential(&geo.mesh, case, p, &mut progress)?,
    };
    if let Some(memory_limit) = noise {
        crate::noise::add_to(&mut computed, case, geo, memory_limit, &mut progress);
    }
    let summary = write::write_all(case, geo, &computed, &staging, &mut progress)
        .with_context(|| format!("writing results for {}", out.display()))?;
    let json = serde_json::to_string_pretty(record)? + "\n";
    std::fs::write(staging.file(VARIANT_FILE), json).context(VARIANT_FILE)?;
    staging.commit()?;
    Ok(summary)
}
