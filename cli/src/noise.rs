//! Panel noise of one case (`tuft run --noise`): the case solved again at
//! two other panel counts, and how far its drag and lift moved.
//!
//! `tuft compare` and `tuft collect` judge a difference against a noise
//! floor measured on the built-in coupe ([`crate::compare::NOISE_COUNTS`],
//! [`crate::compare::lift_floor_cl`]). A scan wrapped round its gaps, or
//! one with a separated tail, can scatter more: a review's wrapped
//! hatchback moved by 14 drag counts between 3,500 and 4,000 panels. With
//! this measure a run carries its own figure, and the comparisons use it
//! where it is larger.

use anyhow::Result;
use serde::{Deserialize, Serialize};
use tuft_mesh::PanelMesh;

use crate::case::{Case, GeometrySource};
use crate::geometry::{self, Geometry};
use crate::pipeline::{self, Computed};
use crate::progress::Progress;

/// The other panel counts are the run's own times `1 - STEP` and
/// `1 + STEP` (or `1 - 2 STEP` when the body cannot be given more panels:
/// an STL run on every facet it has). 8 % keeps within the span the
/// built-in coupe's floor was measured over (3,700 to 4,300 panels about
/// 4,000, `bench/drag_noise`), where the drag shows no trend beyond its
/// scatter.
pub const STEP: f64 = 0.08;

/// A count that gives a panelling with as many panels as one already
/// solved (a built-in shape's generator steps its grid by whole rows: the
/// coupe asked for 1,104 and 1,200 panels makes the same 1,156) is moved
/// on by half a [`STEP`] at a time, at most this many times.
pub const MORE_TRIES: usize = 2;

/// What one solve gave.
#[derive(Debug, Clone, PartialEq)]
pub struct Sample {
    /// Panels solved (real panels: the modelled half's on a half model).
    pub panels: usize,
    /// Drag estimate.
    pub cd: f64,
    /// Lift coefficient.
    pub cl: f64,
    /// Lift on the front and rear axle, kg.
    pub axles_kg: [f64; 2],
    /// Separated fraction of the wetted area.
    pub separated: f64,
    /// Separated fraction of the underbody (the ground-facing panels; 0
    /// with no ground).
    pub underbody: f64,
    /// Area beside sharp front edges the flow leaves (the rim zone), m^2,
    /// whole body.
    pub rim_m2: f64,
    /// Each named region's name and separated share, in the case's order
    /// (an optional region holding no panel at this count is absent).
    pub regions: Vec<(String, f64)>,
}

impl Sample {
    /// The numbers of one computed run.
    pub fn of(mesh: &PanelMesh, c: &Computed) -> Self {
        let k = &c.estimate.total.coefficients;
        Self {
            panels: mesh.len(),
            cd: k.drag,
            cl: k.lift,
            axles_kg: [c.estimate.axles.front_kg, c.estimate.axles.rear_kg],
            separated: c.separated_area / mesh.area(),
            underbody: c.underbody_fraction(),
            rim_m2: c.rim_m2(mesh),
            regions: c
                .regions
                .iter()
                .map(|r| (r.name.clone(), r.separated_fraction))
                .collect(),
        }
    }
}

/// The case's numbers at three panel counts and how far they spread
/// (summary.json's `panel_noise`).
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct PanelNoise {
    /// Panels solved, the run's own count first (the modelled half's on a
    /// half model).
    pub panels: Vec<usize>,
    /// Drag estimate at each count.
    pub cd: Vec<f64>,
    /// Lift coefficient at each count.
    pub cl: Vec<f64>,
    /// Lift on the front axle at each count, kg.
    pub front_axle_kg: Vec<f64>,
    /// Lift on the rear axle at each count, kg.
    pub rear_axle_kg: Vec<f64>,
    /// Separated fraction of the wetted area at each count.
    pub separated_fraction: Vec<f64>,
    /// Separated fraction of the underbody at each count (empty in
    /// summaries written before it was kept).
    #[serde(default)]
    pub underbody_fraction: Vec<f64>,
    /// Area beside sharp front edges at each count, m^2 (empty in
    /// summaries written before it was kept).
    #[serde(default)]
    pub rim_m2: Vec<f64>,
    /// Each named region's separated share at each count, in the case's
    /// order (empty in summaries written before it was kept).
    #[serde(default)]
    pub region_fractions: Vec<Vec<f64>>,
    /// Largest less smallest drag, counts.
    pub drag_counts: f64,
    /// Largest less smallest lift coefficient.
    pub lift_cl: f64,
    /// Largest less smallest lift on the front and on the rear axle, kg.
    pub axles_kg: [f64; 2],
}

/// Smallest and largest of `values` (infinite, and the wrong way round,
/// for none).
pub fn range(values: impl IntoIterator<Item = f64>) -> [f64; 2] {
    values
        .into_iter()
        .fold([f64::INFINITY, f64::NEG_INFINITY], |[lo, hi], v| {
            [lo.min(v), hi.max(v)]
        })
}

/// Largest less smallest of `values` (0 for none).
pub fn spread(values: impl IntoIterator<Item = f64>) -> f64 {
    let [lo, hi] = range(values);
    if hi >= lo { hi - lo } else { 0.0 }
}

impl PanelNoise {
    /// The spread of `samples` (the run's own first).
    pub fn from_samples(samples: &[Sample]) -> Self {
        let all = |f: fn(&Sample) -> f64| samples.iter().map(f).collect::<Vec<_>>();
        let cd = all(|s| s.cd);
        let cl = all(|s| s.cl);
        let front = all(|s| s.axles_kg[0]);
        let rear = all(|s| s.axles_kg[1]);
        Self {
            panels: samples.iter().map(|s| s.panels).collect(),
            drag_counts: 1000.0 * spread(cd.iter().copied()),
            lift_cl: spread(cl.iter().copied()),
            axles_kg: [spread(front.iter().copied()), spread(rear.iter().copied())],
            cd,
            cl,
            front_axle_kg: front,
            rear_axle_kg: rear,
            separated_fraction: all(|s| s.separated),
            underbody_fraction: all(|s| s.underbody),
            rim_m2: all(|s| s.rim_m2),
            region_fractions: samples.first().map_or(Vec::new(), |own| {
                own.regions
                    .iter()
                    .map(|(name, _)| {
                        samples
                            .iter()
                            .filter_map(|s| s.regions.iter().find(|g| &g.0 == name).map(|g| g.1))
                            .collect()
                    })
                    .collect()
            }),
        }
    }

    /// The panel counts in words: "3680, 4000 and 4320 panels".
    pub fn counts_words(&self) -> String {
        let mut sorted = self.panels.clone();
        sorted.sort_unstable();
        let words: Vec<String> = sorted.iter().map(usize::to_string).collect();
        match words.as_slice() {
            [] => "no panel counts".to_owned(),
            [one] => format!("{one} panels"),
            [rest @ .., last] => format!("{} and {last} panels", rest.join(", ")),
        }
    }

    /// The spread in words, for the report and stdout: "drag 14 counts,
    /// lift C_L 0.021 (front axle 2.1 kg, rear 4.0 kg) over 3680, 4000 and
    /// 4320 panels".
    pub fn words(&self, axles: bool) -> String {
        let [f, r] = self.axles_kg;
        let axles = if axles {
            let [f, r] = crate::output::kg_set([f, r]);
            format!(" (front axle {f} kg, rear {r} kg)")
        } else {
            String::new()
        };
        format!(
            "drag {:.1} counts, lift C_L {:.3}{axles} over {}",
            self.drag_counts,
            self.lift_cl,
            self.counts_words()
        )
    }
}

/// The two other panel counts to solve at: `target` (the count the run's
/// coarsening aimed at, or the panels it ran on) times `1 - STEP` and `1 +
/// STEP`, or `1 - STEP` and `1 - 2 STEP` when it cannot be given more.
pub fn other_counts(target: usize, more_possible: bool) -> [usize; 2] {
    let at = |f: f64| (f * target as f64).round() as usize;
    if more_possible {
        [at(1.0 - STEP), at(1.0 + STEP)]
    } else {
        [at(1.0 - STEP), at(1.0 - 2.0 * STEP)]
    }
}

/// The count a case's geometry was asked for, and whether more panels can
/// be had: a built-in shape is generated at any count; an STL is
/// coarsened, never refined, so one run on every facet it has can only go
/// down.
fn target_of(case: &Case, geo: &Geometry) -> (usize, bool) {
    match case.source {
        GeometrySource::Shape { .. } => (geometry::shape_panels(case), true),
        // A half model mirrored whole for a cross wind: the case's count
        // is the half's, the report's the whole's.
        GeometrySource::Stl { .. } => match &geo.report.coarsen {
            Some(c) if geometry::mirrored_whole(case) => (c.target_panels / 2, true),
            Some(c) => (c.target_panels, true),
            None => (geo.mesh.len(), false),
        },
    }
}

/// Solve `case` again at the two other panel counts ([`other_counts`]) and
/// measure the spread of the three runs' numbers; `own` is the run's own
/// result on `geo`. The extra runs are quiet; one phase on `progress`
/// covers them.
///
/// # Errors
/// Whatever stops a run of the case at another count (memory above all:
/// the larger count needs about 17 % more).
pub fn measure(
    case: &Case,
    geo: &Geometry,
    own: &Computed,
    memory_limit: Option<f64>,
    progress: &mut Progress,
) -> Result<PanelNoise> {
    let (target, more) = target_of(case, geo);
    let counts = other_counts(target, more);
    let phase = progress.begin(
        "panel noise",
        &format!(
            "solving again at {} and {} panels to measure the panel noise",
            counts[0], counts[1]
        ),
    );
    let mut samples = vec![Sample::of(&geo.mesh, own)];
    let others = counts.into_iter().try_for_each(|n| {
        let step = (n as f64 - target as f64).signum() * 0.5 * STEP * target as f64;
        let mut tries = 0;
        let (g, other) = loop {
            let mut other = case.clone();
            let asked = (n as f64 + tries as f64 * step).round() as usize;
            other.file.geometry.panels = Some(asked);
            let g = geometry::at_count(&other, geo)?;
            let same = samples.iter().any(|s| s.panels == g.mesh.len());
            // A count the coarsening settled on across the run's own (a
            // try 10 % over the lower count: a review's box car measured
            // "8 % fewer" on 3,542 panels against its own 3,500) does not
            // bracket it: step further out.
            let own = samples[0].panels as f64;
            let wrong_side = (g.mesh.len() as f64 - own) * (n as f64 - target as f64) <= 0.0;
            if !(same || wrong_side) || tries == MORE_TRIES {
                break (g, other);
            }
            tries += 1;
        };
        let mut quiet = Progress::new(true, &case.name);
        let c = pipeline::compute(&g.mesh, &other, memory_limit, &mut quiet)?;
        samples.push(Sample::of(&g.mesh, &c));
        anyhow::Ok(())
    });
    match others {
        Ok(()) => {
            let noise = PanelNoise::from_samples(&samples);
            progress.end(phase, &noise.words(true));
            Ok(noise)
        }
        Err(e) => {
            progress.end(phase, "not measured");
            Err(e)
        }
    }
}

/// Share of the reference area by which the area beside sharp front edges
/// may differ between the panel counts before a run warns that the call
/// flips with the panelling (as `compare`'s rim note, 2 %).
pub const RIM_FLIP_SHARE: f64 = crate::compare::RIM_CHANGE_SHARE;

/// A warning when the area beside sharp front edges differs between the
/// panel counts by more than [`RIM_FLIP_SHARE`] of `reference_m2`: an
/// edge's rounding near the model's rim radius is called sharp at one
/// count and rounded at another, and the drag steps with it (a review's
/// smooth SUV nose read 0.22 m^2 at 3,200 panels and 0.005 and 0.004 at
/// 8 % fewer and more, its drag 10 counts apart).
pub fn rim_flip_warning(n: &PanelNoise, reference_m2: f64) -> Option<String> {
    let spread = spread(n.rim_m2.iter().copied());
    (n.rim_m2.len() == n.panels.len() && spread > RIM_FLIP_SHARE * reference_m2).then(|| {
        let each: Vec<String> = n
            .rim_m2
            .iter()
            .zip(&n.panels)
            .map(|(a, p)| format!("{a:.2} m^2 at {p} panels"))
            .collect();
        format!(
            "the area beside sharp front edges changes with the panel count ({}): an edge's rounding \
             lies near the model's rim radius, so it is called sharp at one count and rounded at \
             another, and the drag steps with the call (the drag spread, {:.1} counts, includes it); \
             compare variants at counts where the call agrees, and read the edge's real radius",
            each.join(", "),
            n.drag_counts
        )
    })
}

/// [`measure`] into `computed`, or, when a count does not fit (the larger
/// needs about 17 % more memory) or fails, a warning saying so: that costs
/// the measure, not the run.
pub fn add_to(
    computed: &mut Computed,
    case: &Case,
    geo: &Geometry,
    memory_limit: Option<f64>,
    progress: &mut Progress,
) {
    match measure(case, geo, computed, memory_limit, progress) {
        Ok(n) => {
            computed
                .warnings
                .extend(rim_flip_warning(&n, computed.reference.area));
            // Each region's share at the three counts: a verdict that
            // changes between them is uncertain (a review's pickup bed
            // read 36 % "firm" at its own count and 73 and 67 % at others).
            for (r, shares) in computed.regions.iter_mut().zip(&n.region_fractions) {
                if shares.len() == n.panels.len() {
                    r.at_counts = Some(shares.clone());
                    r.standing = r.firmness().into();
                }
            }
            computed.panel_noise = Some(n);
        }
        Err(e) => computed.warnings.push(format!(
            "the panel noise (--noise) could not be measured: {e:#}; compare and collect use the \
             built-in noise floor for this run"
        )),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_other_counts_bracket_the_run_or_go_down_only() {
        assert_eq!(other_counts(4000, true), [3680, 4320]);
        assert_eq!(other_counts(4000, false), [3680, 3360]);
    }

    /// A review's SUV nose: 0.22 m^2 beside "sharp" edges at its own count,
    /// next to nothing at the others, is warned about; 0.02 against 0 on a
    /// 2.7 m^2 frontal area is not.
    #[test]
    fn a_rim_call_that_flips_with_the_count_is_warned_about() {
        let n = |rim: [f64; 3]| PanelNoise {
            panels: vec![3200, 2944, 3456],
            rim_m2: rim.to_vec(),
            drag_counts: 10.0,
            ..PanelNoise::default()
        };
        let w = rim_flip_warning(&n([0.215, 0.005, 0.004]), 2.7).unwrap();
        assert!(
            w.contains(
                "(0.21 m^2 at 3200 panels, 0.01 m^2 at 2944 panels, 0.00 m^2 at 3456 panels)"
            ) && w.contains("the drag spread, 10.0 counts, includes it"),
            "{w}"
        );
        assert!(rim_flip_warning(&n([0.02, 0.0, 0.0]), 2.7).is_none());
        // A summary written before the rim areas were kept: no word.
        let mut old = n([0.0; 3]);
        old.rim_m2.clear();
        assert!(rim_flip_warning(&old, 2.7).is_none());
    }

    #[test]
    fn the_spread_is_largest_less_smallest() {
        let s = |panels, cd, cl, f, r| Sample {
            panels,
            cd,
            cl,
            axles_kg: [f, r],
            separated: 0.1,
            underbody: 0.05,
            rim_m2: 0.0,
            regions: vec![("deck".into(), f), ("window".into(), 0.5)],
        };
        let n = PanelNoise::from_samples(&[
            s(4000, 0.300, -0.10, 5.0, -20.0),
            s(3680, 0.314, -0.12, 4.0, -16.0),
            s(4320, 0.306, -0.09, 6.5, -21.0),
        ]);
        assert!((n.drag_counts - 14.0).abs() < 1e-9, "{}", n.drag_counts);
        assert!((n.lift_cl - 0.03).abs() < 1e-12);
        assert!((n.axles_kg[0] - 2.5).abs() < 1e-12);
        assert!((n.axles_kg[1] - 5.0).abs() < 1e-12);
        assert_eq!(n.counts_words(), "3680, 4000 and 4320 panels");
        assert_eq!(
            n.words(true),
            "drag 14.0 counts, lift C_L 0.030 (front axle 2.5 kg, rear 5.0 kg) over 3680, 4000 and \
             4320 panels"
        );
    }
}
