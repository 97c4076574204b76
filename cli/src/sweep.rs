//! `tuft sweep SWEEP.toml`: run the variants of a base case.
//!
//! Each variant writes a normal run folder `DIR/<variant>/` (plus its
//! `variant.json`); variants sharing a geometry share one assembled and
//! factorised matrix ([`group`]). A variant whose case a run would refuse
//! stops the whole sweep before anything runs ([`plan`]); one that fails in
//! its run (on the prepared body) is reported and the rest go on. Finished variant folders are kept (a sweep that stopped
//! overnight picks up where it was) unless `--force`. `--shard K/N` runs
//! the K-th of N contiguous slices of the variant list; `--slurm` writes a
//! Slurm job array for the shards instead of running.
//!
//! Exit codes: 0 every variant of this process finished (warnings are in
//! each report and in `tuft collect`), 2 some variant failed or bad input.

pub mod group;
pub mod plan;

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::{Context, Result};

use crate::EXIT_FAILURE;
use crate::run::{RunOptions, set_threads};
use group::{Member, Outcome, run_group};
use plan::{Plan, parse_shard, shard_range};

/// File listing every variant of the sweep, at the top of the sweep folder.
pub const PLAN_FILE: &str = "sweep-plan.json";

/// The folder in a sweep's result folder that keeps each failed variant's
/// reason, one `<variant>.txt` per variant (one file each, so that shards
/// running at once never write the same file), removed when the variant
/// later finishes: a review's overnight batch had its reasons on the
/// terminal only, and `collect` listed the variants as "missing or
/// failed" with none.
pub const FAILURES_DIR: &str = "failures";

/// Keep (`Some`) or clear (`None`) `variant`'s failure reason under
/// `root`. Best effort: the sweep's own line has said it already.
fn record_failure(root: &Path, variant: &str, why: Option<&str>) {
    let file = root.join(FAILURES_DIR).join(format!("{variant}.txt"));
    match why {
        Some(why) => {
            let _ = std::fs::create_dir_all(root.join(FAILURES_DIR));
            let _ = crate::outdir::write_whole(&file, format!("{why}\n").as_bytes());
        }
        None => {
            let _ = std::fs::remove_file(&file);
            // The folder goes with its last file.
            let _ = std::fs::remove_dir(root.join(FAILURES_DIR));
        }
    }
}

/// `variant`'s failure reason kept under `root`, if any.
pub fn failure_reason(root: &Path, variant: &str) -> Option<String> {
    std::fs::read_to_string(root.join(FAILURES_DIR).join(format!("{variant}.txt")))
        .ok()
        .map(|t| t.trim().to_owned())
        .filter(|t| !t.is_empty())
}

/// Arguments of `tuft sweep`.
#[derive(clap::Args)]
pub struct SweepArgs {
    /// The sweep file (TOML).
    pub sweep: PathBuf,
    /// Folder for the variants (default: beside the sweep file, named after it).
    #[arg(long)]
    pub out: Option<PathBuf>,
    /// Run only shard K of N (1 <= K <= N): a contiguous slice of the variants.
    #[arg(long, value_name = "K/N")]
    pub shard: Option<String>,
    /// Write a Slurm job array (one task per shard) and a collect job instead of running.
    #[arg(long)]
    pub slurm: bool,
    /// Number of shards for --slurm (default: one per geometry).
    #[arg(long, requires = "slurm")]
    pub shards: Option<usize>,
    /// Extra `#SBATCH` option for every job, e.g. `--slurm-option=--partition=long` (repeatable).
    #[arg(long = "slurm-option", requires = "slurm", allow_hyphen_values = true)]
    pub slurm_options: Vec<String>,
    #[command(flatten)]
    pub options: RunOptions,
}

/// The sweep's result folder.
pub fn out_dir(args_out: Option<&Path>, plan: &Plan) -> PathBuf {
    args_out.map_or_else(
        || {
            plan.path
                .parent()
                .unwrap_or(Path::new("."))
                .join(&plan.name)
        },
        Path::to_path_buf,
    )
}

/// A sweep writes into `root` beside what an earlier start of it left (a
/// rerun keeps the variants finished), so `root` must be new, empty or a
/// sweep's folder (holding [`PLAN_FILE`]): a review's sweep had mixed its
/// variants into a folder of the user's notes and into a single run's
/// results. Hidden entries (another shard's plan being written), the
/// scheduler's scripts and the failure records do not count.
fn sweep_folder(root: &Path) -> Result<()> {
    let Ok(entries) = std::fs::read_dir(root) else {
        return Ok(());
    };
    if root.join(PLAN_FILE).is_file() {
        return Ok(());
    }
    let mut names: Vec<String> = entries
        .flatten()
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| !n.starts_with('.') && n != crate::slurm::SCRIPTS_DIR && n != FAILURES_DIR)
        .collect();
    names.sort();
    if let Some(named) = crate::outdir::first_and_more(&names) {
        use crate::outdir::Kind;
        let what = if names
            .iter()
            .any(|n| Kind::ALL.iter().any(|k| n == k.marker()))
        {
            "holds a single run's or a comparison's results"
        } else {
            "holds other files"
        };
        anyhow::bail!(
            "{}: the folder {what} ({named}) and no sweep ({PLAN_FILE}), so the sweep will not write \
             into it; choose another with --out",
            root.display()
        );
    }
    Ok(())
}

/// `tuft sweep`.
pub fn run(args: &SweepArgs) -> Result<ExitCode> {
    let plan = Plan::load(&args.sweep)?;
    let root = out_dir(args.out.as_deref(), &plan);
    sweep_folder(&root)?;
    if args.slurm {
        if args.shard.is_some() {
            anyhow::bail!("--slurm and --shard do not go together: the job array runs the shards");
        }
        return crate::slurm::write_scripts(args, &plan, &root);
    }
    set_threads(args.options.threads)?;
    let memory_limit = args.options.memory_limit_bytes()?;
    let mut plan = plan;
    let dir = plan.path.parent().unwrap_or(Path::new(".")).to_path_buf();
    if let Some(n) = plan.one_panel_count(&dir) {
        say(
            args.options.quiet,
            &format!(
                "every variant at {n} panels, the first variant's default (set geometry.panels in the \
                 base case to choose)"
            ),
        );
    }
    let (k, n) = match &args.shard {
        Some(s) => parse_shard(s)?,
        None => (1, 1),
    };
    crate::outdir::create_folder(&root)?;
    write_plan(&root, &plan)?;
    let range = shard_range(plan.variants.len(), k, n);
    let (failed, warned) = run_range(&plan, &root, range.clone(), (&args.options, memory_limit));
    if !args.options.quiet {
        let finished = range.len() - failed;
        say!(
            "{}: {finished} of {} variants finished{} in {}{}{}",
            plan.name,
            range.len(),
            match warned {
                0 => String::new(),
                w => format!(" ({w} with warnings to read)"),
            },
            root.display(),
            if n > 1 {
                format!(" (shard {k} of {n})")
            } else {
                String::new()
            },
            if finished > 0 {
                format!("; rank them with: tuft collect {}", root.display())
            } else {
                String::new()
            }
        );
    }
    // As `tuft run` does for one: a variant's warnings are the user's to
    // read (a review's sweep exited 0 with two warnings on every variant).
    Ok(if failed == 0 && warned == 0 {
        ExitCode::SUCCESS
    } else if failed == 0 {
        ExitCode::from(crate::EXIT_WARNINGS)
    } else {
        eprintln!(
            "tuft: {} of {} failed",
            crate::output::plural(failed, "variant", "variants"),
            plan.name
        );
        ExitCode::from(EXIT_FAILURE)
    })
}

/// Run the variants in `range`, group by group; returns how many failed
/// and how many finished (here or before) with warnings.
fn run_range(
    plan: &Plan,
    root: &Path,
    range: std::ops::Range<usize>,
    (opt, memory_limit): (&RunOptions, Option<f64>),
) -> (usize, usize) {
    let dir = plan.path.parent().unwrap_or(Path::new("."));
    let total = range.len();
    let mut done = 0;
    let mut failed = 0;
    let mut warned = 0;
    let mut todo: Vec<Member<'_>> = Vec::new();
    for index in range {
        let variant = &plan.variants[index];
        let summary = root.join(&variant.name).join("summary.json");
        let mut replace = false;
        if !opt.force && summary.exists() {
            match stale(&summary, variant, dir, opt.noise) {
                None => {
                    done += 1;
                    relabel(&root.join(&variant.name), variant);
                    let kept = crate::compare::read_summary(&root.join(&variant.name))
                        .map_or(0, |k| k.warnings.len());
                    warned += usize::from(kept > 0);
                    say(
                        opt.quiet,
                        &format!(
                            "[{done}/{total}] {}: already finished, kept{}",
                            variant.name,
                            warning_words(kept)
                        ),
                    );
                    continue;
                }
                Some(why) => {
                    // A folder tuft wrote (it holds summary.json), replaced
                    // as --force would.
                    replace = true;
                    say(
                        opt.quiet,
                        &format!("{}: {why}, so it runs again", variant.name),
                    );
                }
            }
        }
        todo.push(Member {
            index,
            variant,
            stale: replace,
        });
    }
    // The first variant refused for memory, with what its need depends
    // on: later variants alike are not prepared only to be refused again.
    let refused: std::cell::RefCell<Option<(String, String)>> = std::cell::RefCell::new(None);
    let kept = done;
    // The time the variants run here took, for what is left (a review's
    // overnight log gave no estimate).
    let (mut spent, mut runs) = (0.0, 0);
    let mut report = |m: &Member<'_>, outcome: &Outcome, secs: f64| {
        done += 1;
        if matches!(outcome, Outcome::Done(..)) {
            spent += secs;
            runs += 1;
        }
        if let (Outcome::Failed(why), Some(key)) = (outcome, memory_key(m.variant))
            && crate::estimate::is_memory_refusal(why)
        {
            refused
                .borrow_mut()
                .get_or_insert((key, m.variant.name.clone()));
        }
        if let Outcome::Done(s, _) = outcome {
            warned += usize::from(!s.warnings.is_empty());
        }
        record_failure(
            root,
            &m.variant.name,
            match outcome {
                Outcome::Failed(why) => Some(why),
                Outcome::Done(..) => None,
            },
        );
        let line = match outcome {
            Outcome::Done(s, matrix) => {
                format!(
                    "C_D {:.3} (band {:.3} to {:.3}), lift {} kg, separated {:.1} % ({secs:.1} s, {}){}",
                    s.coefficients.drag,
                    s.drag_estimate.cd_low,
                    s.drag_estimate.cd_high,
                    s.lift_kg.axle_words()[0],
                    100.0 * s.separation.fraction,
                    if matrix.reused {
                        "flow solver set up by an earlier variant of this shape".to_string()
                    } else if matrix.variants_sharing > 1 {
                        format!(
                            "flow solver set up here, shared by {} variants of this shape",
                            matrix.variants_sharing
                        )
                    } else {
                        "flow solver set up for this variant".to_string()
                    },
                    warning_words(s.warnings.len())
                ) + &s.panel_noise.as_ref().map_or_else(String::new, |n| {
                    format!("; panel noise: {}", n.words(s.axle_split_shown()))
                })
            }
            Outcome::Failed(why) => {
                failed += 1;
                format!("FAILED: {why}")
            }
        };
        let left = match total - done {
            n if n > 0 && runs > 0 => format!(
                " [about {} left]",
                crate::progress::duration_words(spent / f64::from(runs) * n as f64)
            ),
            _ => String::new(),
        };
        say(
            opt.quiet && matches!(outcome, Outcome::Done(..)),
            &format!("[{done}/{total}] {}: {line}{left}", m.variant.name),
        );
    };
    let mut start = 0;
    while start < todo.len() {
        let key = &todo[start].variant.geometry_key;
        let end = start
            + todo[start..]
                .iter()
                .take_while(|m| &m.variant.geometry_key == key)
                .count();
        // Variants whose memory need is one already refused: said, not
        // prepared (a review's batch repeated the same refusal for each of
        // nine variants of a 1.26-million-facet scan, each after reading it).
        let same = refused.borrow().clone().filter(|(key, _)| {
            todo[start..end]
                .iter()
                .all(|m| memory_key(m.variant).as_ref() == Some(key))
        });
        if let Some((_, first)) = same {
            for m in &todo[start..end] {
                report(
                    m,
                    &Outcome::Failed(format!(
                        "not run: it needs the memory {first}'s run was refused for (above), at the \
                         same panel count and solver settings"
                    )),
                    0.0,
                );
            }
            start = end;
            continue;
        }
        // Said as it starts, so that a log shows what runs (a review's
        // overnight log stayed silent until the first variant finished).
        say(
            opt.quiet,
            &format!(
                "{}: running{}, variant {} of {total} ...",
                todo[start].variant.name,
                match end - start {
                    1 => String::new(),
                    n => format!(" with {} more of this shape", n - 1),
                },
                kept + start + 1
            ),
        );
        run_group(
            &plan.name,
            dir,
            root,
            &todo[start..end],
            (opt.force, memory_limit, opt.noise, opt.quiet),
            &mut report,
        );
        start = end;
    }
    (failed, warned)
}

/// What a variant's memory need depends on, as `estimate::check_fits`
/// reckons it: its panel count, half model (a half model in a cross wind
/// runs whole), the separated-flow loop and the operator asked for; `None`
/// where the case does not fix the count.
fn memory_key(v: &plan::Variant) -> Option<String> {
    let f = v.file.as_ref().ok()?;
    let g = &f.geometry;
    Some(format!(
        "{}|{}|{}|{}",
        g.panels?,
        g.half_model && f.flow.yaw == 0.0,
        f.solver.wakes,
        f.solver.linear
    ))
}

/// Give a kept variant's record the sweep's settings when they differ
/// only in labels ([`plan::is_label`]): a label sets nothing in the case,
/// so a relabelled sweep keeps its results and `collect` plots the new
/// labels. Best effort: a record that cannot be read or written stays.
fn relabel(folder: &Path, variant: &plan::Variant) {
    let file = folder.join(group::VARIANT_FILE);
    let Some(mut record) = std::fs::read_to_string(&file)
        .ok()
        .and_then(|t| serde_json::from_str::<group::VariantRecord>(&t).ok())
    else {
        return;
    };
    let cases = |s: &[plan::Setting]| -> Vec<plan::Setting> {
        s.iter()
            .filter(|x| !plan::is_label(&x.key))
            .cloned()
            .collect()
    };
    if record.settings != variant.settings && cases(&record.settings) == cases(&variant.settings) {
        record.settings.clone_from(&variant.settings);
        if let Ok(json) = serde_json::to_string_pretty(&record) {
            let _ = std::fs::write(&file, json + "\n");
        }
    }
}

/// A variant's warnings on its progress line: "; 2 warnings (see its
/// report or tuft collect)", nothing for none.
fn warning_words(n: usize) -> String {
    match n {
        0 => String::new(),
        n => format!(
            "; {} (see its report or tuft collect)",
            crate::output::plural(n, "warning", "warnings")
        ),
    }
}

/// Why a finished variant's result no longer answers its inputs, if it
/// does not: its case differs from the one the result was computed for
/// (the base case or the sweep changed), or its STL is not the file the
/// result recorded (a scan re-exported under the same name; by content,
/// or for an older result by the file's time stamp), or `noise` asks for
/// the panel noise it was run without. `None` keeps it.
fn stale(summary: &Path, variant: &plan::Variant, dir: &Path, noise: bool) -> Option<String> {
    let Ok(file) = &variant.file else {
        return None;
    };
    let kept = crate::compare::read_summary(summary.parent()?).ok()?;
    let now = serde_json::to_value(file).ok()?;
    if kept.case != now {
        return Some("its case changed since it was run".into());
    }
    if noise && kept.panel_noise.is_none() {
        return Some("it was run without --noise".into());
    }
    let stl = file.geometry.stl.as_ref().map(|p| dir.join(p))?;
    // The file's content where the result recorded it (a file copied in
    // with its old time stamp, as `cp -p` or an unpacked archive leave it,
    // had kept another geometry's result); its time stamp otherwise.
    if let Some(then) = &kept.mesh.stl_fingerprint {
        return (crate::summary::stl_fingerprint(&stl).as_ref() != Some(then)).then(|| {
            format!(
                "{} is not the file its result was computed from",
                stl.display()
            )
        });
    }
    let modified = |p: &Path| std::fs::metadata(p).and_then(|m| m.modified()).ok();
    match (modified(&stl), modified(summary)) {
        (Some(input), Some(result)) if input > result => {
            Some(format!("{} is newer than its result", stl.display()))
        }
        _ => None,
    }
}

fn say(quiet: bool, line: &str) {
    if !quiet {
        eprintln!("{line}");
    }
}

/// Entry of `sweep-plan.json`.
#[derive(serde::Serialize, serde::Deserialize, Debug, Clone, PartialEq)]
pub struct PlanEntry {
    /// Variant (folder) name.
    pub name: String,
    /// What differs from the base case.
    pub settings: Vec<plan::Setting>,
    /// The variant's case as its summary records it, so that `collect`
    /// can tell a result computed for an older case.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub case: Option<serde_json::Value>,
}

/// `sweep-plan.json`: the sweep's name and every variant, written whole
/// (temporary file renamed into place; every shard writes the same bytes).
fn write_plan(root: &Path, plan: &Plan) -> Result<()> {
    let entries: Vec<PlanEntry> = plan
        .variants
        .iter()
        .map(|v| PlanEntry {
            name: v.name.clone(),
            settings: v.settings.clone(),
            case: v
                .file
                .as_ref()
                .ok()
                .and_then(|f| serde_json::to_value(f).ok()),
        })
        .collect();
    let value = serde_json::json!({ "sweep": plan.name, "variants": entries });
    let tmp = root.join(format!(".{PLAN_FILE}.{}", std::process::id()));
    std::fs::write(&tmp, serde_json::to_string_pretty(&value)? + "\n")
        .with_context(|| format!("{}: cannot write", tmp.display()))?;
    std::fs::rename(&tmp, root.join(PLAN_FILE))
        .with_context(|| format!("{}: cannot write", root.join(PLAN_FILE).display()))
}

#[cfg(test)]
mod tests {
    use super::{FAILURES_DIR, PLAN_FILE, failure_reason, record_failure, sweep_folder};

    /// A failed variant's reason is kept until the variant finishes; the
    /// folder goes with the last reason.
    #[test]
    fn a_failure_reason_is_kept_until_the_variant_finishes() {
        let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
        let root = dir.path();
        record_failure(root, "v7", Some("v7.stl: the file is cut short"));
        record_failure(root, "v6", Some("v6.stl: a half model"));
        assert_eq!(
            failure_reason(root, "v7").as_deref(),
            Some("v7.stl: the file is cut short")
        );
        assert_eq!(failure_reason(root, "v1"), None);
        record_failure(root, "v7", None);
        assert_eq!(failure_reason(root, "v7"), None);
        assert!(root.join(FAILURES_DIR).is_dir(), "v6's reason stays");
        record_failure(root, "v6", None);
        assert!(!root.join(FAILURES_DIR).exists());
    }

    /// A sweep writes into a new, empty or sweep folder only (its
    /// scheduler scripts and hidden files do not count), never into a
    /// user's folder or a single run's results.
    #[test]
    fn a_sweep_writes_only_into_its_own_folder() {
        let dir = tempfile::tempdir().unwrap();
        let root = dir.path().join("tails");
        assert!(sweep_folder(&root).is_ok(), "a new folder");
        std::fs::create_dir_all(root.join("slurm")).unwrap();
        std::fs::write(root.join(".sweep-plan.json.7"), "").unwrap();
        assert!(sweep_folder(&root).is_ok(), "scripts written, no plan yet");
        std::fs::write(root.join("notes.txt"), "").unwrap();
        let err = format!("{}", sweep_folder(&root).unwrap_err());
        assert!(err.contains("holds other files (notes.txt)"), "{err}");
        std::fs::write(root.join("summary.json"), "").unwrap();
        let err = format!("{}", sweep_folder(&root).unwrap_err());
        assert!(err.contains("a single run's or a comparison's"), "{err}");
        std::fs::write(root.join(PLAN_FILE), "").unwrap();
        assert!(sweep_folder(&root).is_ok(), "a sweep's folder resumes");
    }
}
