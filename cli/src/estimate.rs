//! Before solving: how long the run will take and how much memory it needs,
//! from the panel count and this machine's measured speed; and a refusal,
//! before anything large is allocated, when it would not fit.

use std::time::Instant;

use anyhow::{Result, bail};
use tuft_mesh::PanelMesh;

use crate::case::MIN_PANELS;
use tuft_solver::influence::triangle_influence;

/// Bytes per entry of the dense influence matrix (f64).
const ENTRY: f64 = 8.0;
/// Working memory beyond the matrix: the solver holds the N x N matrix
/// plus O(N) vectors, the run's meshes, fields and pictures. Measured peak
/// resident memory of whole `tuft run`s of the built-in coupe over a
/// ground plane (`/usr/bin/time -v`, see BENCHMARKS.md): 56 MB at 1,980
/// panels (matrix 31 MB), 203 MB at 4,920 (194 MB), 821 MB at 10,048
/// (808 MB), 3,170 MB at 19,844 (3,150 MB): the matrix plus 10-25 MB. The
/// constants below keep the estimate 4-65 % above every measurement.
const OVERHEAD: f64 = 1.03;
/// Fixed part of the working memory, bytes (see `OVERHEAD`).
const FIXED_BYTES: f64 = 60e6;

/// Bytes per panel of a whole run on the compressed (hierarchical)
/// operator, above the fixed part. The operator alone measured 21 KB per
/// panel at 9,938 panels and 30.6 KB at 99,840 (slant-back body over the
/// ground, `solver/examples/compressed_scaling.rs`; the low-rank blocks
/// grow about as N log N); a whole `tuft run` of the concept coupe at
/// 99,696 panels over the ground peaked at 5.59 GB resident (56 KB per
/// panel: the operator plus the boundary-layer streamlines, slices and
/// pictures). 60 KB keeps the estimate above that.
const COMPRESSED_BYTES_PER_PANEL: f64 = 60e3;
/// Bytes per panel the separated-flow loop adds to a run on the
/// compressed operator: the boundary layer is marched (and its
/// streamlines kept for the attached and the last pass) while the
/// operator is still held. The concept coupe over the ground with the
/// loop peaked at 9.41 GB at 99,696 compressed panels (3.35 GB above the
/// attached-run estimate: 34 KB per panel; the attached run peaked at
/// 5.72 GB). 40 KB keeps the estimate above it.
const LOOP_BYTES_PER_PANEL: f64 = 40e3;
/// The same on the dense operator, where the loop's fields are small
/// beside the matrix. Measured peaks with the loop (BENCHMARKS.md): 66 MB
/// at 1,980 panels, 257 MB at 4,920, 935-951 MB at 10,048 (up to 59 MB
/// above the attached-run estimate), 3,430-3,519 MB at 19,844 (up to 214
/// MB above: 10.8 KB per panel). 16 KB keeps the estimate above every one
/// (40 KB had put a review's 4,112-panel run at 0.47 GB against 222 MB
/// measured, and refused it under a 300 MB limit).
const LOOP_DENSE_BYTES_PER_PANEL: f64 = 16e3;
/// Right-hand sides the loop solves on the dense operator (the attached
/// pass and up to five more; the matrix is assembled once).
const LOOP_SOLVES: f64 = 6.0;
/// The loop's cost over the attached build and solve on the compressed
/// operator (measured 3.4 times at 99,696 panels with five passes, each a
/// boundary-layer march and a preconditioned solve; the loop may take six).
const LOOP_COMPRESSED_FACTOR: f64 = 4.0;

/// Seconds per `N log2 N` of the compressed build and solve on the 2-core
/// reference machine (45 s at 99,840 panels with a ground image, loaded by
/// other builds: an upper bound).
const COMPRESSED_SECONDS_PER_NLOGN: f64 = 2.8e-5;

/// How the influence matrix is held.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Operator {
    /// Dense N x N matrix.
    Dense,
    /// Hierarchical matrix with low-rank far-field blocks.
    Compressed,
}

impl Operator {
    /// The operator's name as the case file and the messages give it.
    pub fn name(self) -> &'static str {
        match self {
            Operator::Dense => "dense",
            Operator::Compressed => "compressed",
        }
    }

    /// The other operator.
    pub fn other(self) -> Self {
        match self {
            Operator::Dense => Operator::Compressed,
            Operator::Compressed => Operator::Dense,
        }
    }
}

/// The operator a run with `n` panels uses: forced, or chosen by size as
/// the solver's `Auto` does (compressed from
/// `PotentialParams::compressed_from` panels on), or compressed when a
/// dense matrix would not fit in `available` bytes.
pub fn operator_for(
    n: usize,
    forced: Option<Operator>,
    available: Option<f64>,
    loop_on: bool,
) -> Operator {
    let too_big = available.is_some_and(|a| memory_for(n, Operator::Dense, loop_on) > a);
    let by_size = n >= tuft_solver::PotentialParams::default().compressed_from;
    forced.unwrap_or(if by_size || too_big {
        Operator::Compressed
    } else {
        Operator::Dense
    })
}

/// What a run is expected to cost.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Estimate {
    /// Peak memory, bytes.
    pub memory_bytes: f64,
    /// Assembly and solve time, seconds.
    pub seconds: f64,
    /// Measured cost of one influence evaluation on this machine, seconds.
    pub seconds_per_pair: f64,
}

/// Expected peak memory of a run with `n` panels on `op`, with or without
/// the separated-flow loop.
pub fn memory_for(n: usize, op: Operator, loop_on: bool) -> f64 {
    let n = n as f64;
    loop_bytes_per_panel(op, loop_on) * n
        + match op {
            Operator::Dense => OVERHEAD * ENTRY * n * n + FIXED_BYTES,
            Operator::Compressed => COMPRESSED_BYTES_PER_PANEL * n + FIXED_BYTES,
        }
}

/// Bytes per panel the separated-flow loop adds on `op` (none when off).
fn loop_bytes_per_panel(op: Operator, loop_on: bool) -> f64 {
    match (loop_on, op) {
        (false, _) => 0.0,
        (true, Operator::Dense) => LOOP_DENSE_BYTES_PER_PANEL,
        (true, Operator::Compressed) => LOOP_BYTES_PER_PANEL,
    }
}

/// The largest panel count whose run on `op` fits in `bytes`.
pub fn panels_fitting(bytes: f64, op: Operator, loop_on: bool) -> usize {
    let room = (bytes - FIXED_BYTES).max(0.0);
    let per = loop_bytes_per_panel(op, loop_on);
    match op {
        // a n^2 + per n = room
        Operator::Dense => {
            let a = OVERHEAD * ENTRY;
            ((-per + (per * per + 4.0 * a * room).sqrt()) / (2.0 * a)) as usize
        }
        Operator::Compressed => (room / (COMPRESSED_BYTES_PER_PANEL + per)) as usize,
    }
}

/// Time a sample of influence evaluations on `mesh` and scale to the
/// whole assembly (N^2 pairs per image) on `threads` cores; the Krylov
/// solve adds about 20 dense matrix-vector products. The compressed
/// operator is scaled from its measured `N log N` cost instead.
pub fn estimate(mesh: &PanelMesh, threads: usize, op: Operator, loop_on: bool) -> Estimate {
    let n = mesh.len();
    let step = (n / 64).max(1);
    let targets: Vec<_> = mesh.panels.iter().step_by(step).collect();
    let start = Instant::now();
    let mut pairs = 0usize;
    for p in &targets {
        for q in mesh.panels.iter().step_by(step.max(1)) {
            let inf = triangle_influence(&p.centroid, q, 6.0);
            std::hint::black_box(inf);
            pairs += 1;
        }
    }
    let per_pair = start.elapsed().as_secs_f64() / pairs.max(1) as f64;
    let images = 1 + mesh.mirrors.images().len();
    let nn = (n * n) as f64;
    let assembly = per_pair * nn * images as f64 / threads.max(1) as f64;
    let solve = 20.0 * 2.0 * nn / 2e9;
    let seconds = match op {
        Operator::Dense if loop_on => assembly + LOOP_SOLVES * solve,
        Operator::Dense => assembly + solve,
        Operator::Compressed => {
            let n = n as f64;
            let factor = if loop_on { LOOP_COMPRESSED_FACTOR } else { 1.0 };
            factor * COMPRESSED_SECONDS_PER_NLOGN * n * n.log2() * images as f64 / 2.0
        }
    };
    Estimate {
        memory_bytes: memory_for(n, op, loop_on),
        seconds,
        seconds_per_pair: per_pair,
    }
}

/// Memory this process may use: `limit` if given, else the system's
/// available memory (Linux `MemAvailable`), else `None` (no check).
pub fn available_memory(limit: Option<f64>) -> Option<f64> {
    limit.or_else(|| {
        let text = std::fs::read_to_string("/proc/meminfo").ok()?;
        let line = text.lines().find(|l| l.starts_with("MemAvailable:"))?;
        let kb: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
        Some(kb * 1024.0)
    })
}

/// Refuse a run that would not fit, suggesting a panel count that does
/// (and saying so when that count is under a third of the `suggested`
/// count for the body, where the loop's drag is not converged; 0 when not
/// known). `asked` is the count the case asked for (0 when it asked
/// none): when the coarsening left well more than that and the count
/// asked would fit, the refusal says so instead of suggesting a count the
/// coarsening has just shown it cannot reach (a review's estate with roof
/// bars asked 3,500, got 14,000 and was told "set geometry.panels to 9700
/// or fewer").
pub fn check_fits(
    n: usize,
    (op, forced): (Operator, bool),
    (half_model, loop_on, suggested, asked): (bool, bool, usize, usize),
    available: Option<f64>,
) -> Result<()> {
    let Some(avail) = available else {
        return Ok(());
    };
    let need = memory_for(n, op, loop_on);
    // What the count needs, on the operator that needs less when that is
    // the other one and `forced` is false (an "auto" run that would not fit dense had quoted
    // the compressed operator's 0.87 GB where a run that fits announces
    // the dense 0.72).
    let other_op = op.other();
    let other = memory_for(n, other_op, loop_on);
    // Not when the case chose the operator: the run would never use the
    // other one.
    let need_words = if other < need && !forced {
        format!(
            "about {:.2} GB on the {} matrix ({:.2} GB on the {})",
            other / 1e9,
            other_op.name(),
            need / 1e9,
            op.name()
        )
    } else {
        format!("about {:.2} GB", need / 1e9)
    };
    if need > avail {
        // The smallest run a case may ask for, on the operator that needs
        // less, with the loop or without.
        let smallest = |with_loop: bool| {
            memory_for(MIN_PANELS, Operator::Compressed, with_loop).min(memory_for(
                MIN_PANELS,
                Operator::Dense,
                with_loop,
            ))
        };
        if smallest(loop_on) > avail {
            let attached = if loop_on && smallest(false) <= avail {
                ", or set solver.wakes = \"attached\" (no separated-flow loop, less memory)"
            } else {
                ""
            };
            bail!(
                "{n} panels need {need_words} but only {:.2} GB is available, less than even the \
                 smallest run takes ({MIN_PANELS} panels, about {:.2} GB): free memory or raise \
                 --memory-limit{attached}",
                avail / 1e9,
                smallest(loop_on) / 1e9
            );
        }
        if op == Operator::Dense && memory_for(n, Operator::Compressed, loop_on) <= avail {
            bail!(
                "{n} panels need about {:.2} GB with a dense matrix but only {:.2} GB is available: \
                 set solver.linear = \"compressed\" (or \"auto\"), which fits, or set geometry.panels to {} or fewer",
                need / 1e9,
                avail / 1e9,
                (panels_fitting(avail, op, loop_on) / 100 * 100).max(MIN_PANELS)
            );
        }
        // The larger count that fits on either operator (the run picks the
        // operator that fits).
        let most = panels_fitting(avail, Operator::Dense, loop_on).max(panels_fitting(
            avail,
            Operator::Compressed,
            loop_on,
        ));
        let fit = (most / 100 * 100).max(MIN_PANELS);
        let coarse = if loop_on && 3 * fit < suggested {
            format!(
                " (under a third of the {suggested} panels suggested for this body, where the drag is not \
                 converged)"
            )
        } else {
            String::new()
        };
        let half = if half_model {
            String::new()
        } else {
            " (or, for a body symmetric about y = 0, a half model with geometry.half_model = true, \
               which solves half the panels in a quarter of the memory)"
                .to_string()
        };
        let attached = if loop_on {
            ", or solver.wakes = \"attached\" (no separated-flow loop, less memory)"
        } else {
            ""
        };
        if asked > 0 && n as f64 > UNREACHED * asked as f64 && fit >= asked {
            bail!(
                "{n} panels need {need_words} but only {:.2} GB is available, and the case asked \
                 for {asked}, which would fit: the coarsening could not reach that count (tuft check \
                 says why; parts nearly touching or thinner than the panels usually cause this){half}",
                avail / 1e9
            );
        }
        bail!(
            "{n} panels need {need_words} but only {:.2} GB is available: set geometry.panels to \
             {fit} or fewer{coarse}{half}{attached}",
            avail / 1e9
        );
    }
    Ok(())
}

/// Whether `why`, a run's failure, is [`check_fits`]'s refusal for memory
/// at the count asked (not the one blaming a coarsening that could not
/// reach it, which depends on the geometry).
pub fn is_memory_refusal(why: &str) -> bool {
    why.contains(" GB is available") && !why.contains("the coarsening could not reach")
}

/// How far over the count asked the coarsening must have gone for
/// [`check_fits`] to blame it (its tries reach 10 % over the count).
const UNREACHED: f64 = 1.15;

/// Parse a memory size such as `512M`, `2G`, `1.5GB` or a number of bytes.
pub fn parse_size(text: &str) -> Result<f64> {
    let t = text.trim().to_ascii_uppercase();
    let t = t.trim_end_matches('B');
    let (num, mult) = match t.chars().last() {
        Some('K') => (&t[..t.len() - 1], 1e3),
        Some('M') => (&t[..t.len() - 1], 1e6),
        Some('G') => (&t[..t.len() - 1], 1e9),
        Some('T') => (&t[..t.len() - 1], 1e12),
        _ => (t, 1.0),
    };
    match num.trim().parse::<f64>() {
        Ok(v) if v.is_finite() && v > 0.0 => Ok(v * mult),
        _ => bail!("--memory-limit must be a size such as 512M or 2G (got \"{text}\")"),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sizes_parse() {
        assert_eq!(parse_size("512M").unwrap(), 512e6);
        assert_eq!(parse_size("2g").unwrap(), 2e9);
        assert_eq!(parse_size("1.5GB").unwrap(), 1.5e9);
        assert!(parse_size("lots").is_err());
        assert!(parse_size("-1G").is_err());
    }

    /// The estimate stays above every measured peak (BENCHMARKS.md, whole
    /// runs of the concept coupe over the ground) and within twice it, so
    /// a refusal is safe and its suggested count not far too low.
    #[test]
    fn the_estimate_covers_the_measured_peaks() {
        let measured = [
            (1_980, Operator::Dense, true, 66e6),
            (4_920, Operator::Dense, true, 257e6),
            (10_048, Operator::Dense, true, 951e6),
            (19_844, Operator::Dense, true, 3_519e6),
            (19_844, Operator::Dense, false, 3_170e6),
            (99_696, Operator::Compressed, true, 9_410e6),
            (99_696, Operator::Compressed, false, 5_720e6),
        ];
        for (n, op, loop_on, peak) in measured {
            let e = memory_for(n, op, loop_on);
            assert!(
                e >= peak && e <= 2.0 * peak,
                "{n} {op:?} loop {loop_on}: {e} vs {peak}"
            );
        }
    }

    #[test]
    fn refusal_suggests_a_count_that_fits() {
        let err = check_fits(
            20_000,
            (Operator::Compressed, false),
            (false, true, 0, 0),
            Some(0.5e9),
        )
        .unwrap_err()
        .to_string();
        assert!(
            err.contains("geometry.panels")
                && err.contains("half model")
                && err.contains("attached"),
            "{err}"
        );
        for op in [Operator::Dense, Operator::Compressed] {
            for loop_on in [false, true] {
                let fit = panels_fitting(1e9, op, loop_on);
                assert!(
                    memory_for(fit, op, loop_on) <= 1e9 && memory_for(fit + 10, op, loop_on) > 1e9
                );
                assert!(check_fits(fit, (op, false), (false, loop_on, 0, 0), Some(1e9)).is_ok());
            }
        }
        // A dense run that would fit on the compressed operator says so.
        let err = check_fits(
            15_000,
            (Operator::Dense, false),
            (false, false, 0, 0),
            Some(1e9),
        )
        .unwrap_err()
        .to_string();
        assert!(err.contains("compressed"), "{err}");
        // A count that fits but is under a third of the body's suggested
        // count says its drag would not be converged (a review's 100 MB
        // limit gave "800 or fewer" of a suggested 6,500 without a word).
        let coarse = |suggested: usize| {
            check_fits(
                4_000,
                (Operator::Dense, false),
                (false, true, suggested, 0),
                Some(100e6),
            )
            .unwrap_err()
            .to_string()
        };
        assert!(
            coarse(6_500).contains("under a third of the 6500 panels suggested"),
            "{}",
            coarse(6_500)
        );
        assert!(!coarse(0).contains("under a third"), "{}", coarse(0));
        // A case that asked for a count that fits, where the coarsening
        // left four times as many, is not told to ask for fewer (a
        // review's estate with roof bars: 3,500 asked, 14,000 made).
        let fits = panels_fitting(1e9, Operator::Dense, true);
        let unreached = |asked: usize| {
            check_fits(
                4 * asked,
                (Operator::Dense, false),
                (false, true, 0, asked),
                Some(1e9),
            )
            .unwrap_err()
            .to_string()
        };
        let words = unreached(fits / 2);
        assert!(
            words.contains(&format!("the case asked for {}, which would fit", fits / 2))
                && words.contains("could not reach")
                && !words.contains("or fewer")
                && words.contains("half model"),
            "{words}"
        );
        // Asking for more than fits keeps the usual advice.
        assert!(unreached(fits + 100).contains("or fewer"));
        // Where the other operator needs less, the refusal quotes that
        // (the figure a run that fits announces) beside the one it chose.
        let (dense, compressed) = (
            memory_for(8_060, Operator::Dense, true),
            memory_for(8_060, Operator::Compressed, true),
        );
        assert!(dense < compressed, "{dense} {compressed}");
        let err = check_fits(
            8_060,
            (Operator::Compressed, false),
            (false, true, 0, 0),
            Some(0.3e9),
        )
        .unwrap_err()
        .to_string();
        assert!(
            err.contains(&format!(
                "need about {:.2} GB on the dense matrix ({:.2} GB on the compressed)",
                dense / 1e9,
                compressed / 1e9
            )),
            "{err}"
        );
        // With the operator chosen in the case, only its own figure.
        let err = check_fits(
            8_060,
            (Operator::Compressed, true),
            (false, true, 0, 0),
            Some(0.3e9),
        )
        .unwrap_err()
        .to_string();
        assert!(
            err.contains(&format!("need about {:.2} GB but", compressed / 1e9)),
            "{err}"
        );
    }

    #[test]
    fn the_size_picks_the_operator_unless_forced() {
        assert_eq!(operator_for(5_000, None, None, true), Operator::Dense);
        assert_eq!(operator_for(50_000, None, None, true), Operator::Compressed);
        assert_eq!(
            operator_for(50_000, Some(Operator::Dense), None, true),
            Operator::Dense
        );
        // 15,000 panels dense need 1.9 GB: with 1 GB free, compressed.
        assert_eq!(
            operator_for(15_000, None, Some(1e9), false),
            Operator::Compressed
        );
        assert_eq!(operator_for(15_000, None, Some(4e9), true), Operator::Dense);
    }
}
