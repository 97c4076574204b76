//! Differences at matched panel counts: when both runs measured their
//! panel noise (`tuft run --noise`), each was solved at its own count and
//! at 8 % fewer and more panels, so B less A can be taken at each of the
//! three matched counts.
//!
//! The floors built from each run's own spread ([`super::drag_floor`])
//! treat the two runs' noise as independent. For a change made in one
//! place it is not: at one panel count the unchanged surface is panelled
//! alike in both runs, and much of the noise cancels in the difference,
//! while the difference at the run's own count can still be the odd one
//! out (a review's roof-spoiler pair: -4.9, -20.1 and -8.6 kg of lift at
//! the three counts, the compare having read -20 kg as a gain). The
//! difference at the three counts is the direct measure: a difference is
//! taken as real only when it holds at all three ([`holds`]).

use serde::{Deserialize, Serialize};

use crate::noise::{PanelNoise, spread};
use crate::summary::Summary;

/// How far the two runs' other counts may lie apart, as fractions of each
/// run's own count, to be matched (our choice: both runs take the same
/// steps, [`crate::noise::STEP`], so their ratios agree to the rounding
/// and the half steps a generator's rows force).
pub const MATCH_TOLERANCE: f64 = 0.03;

/// B less A at the matched counts, the runs' own counts first.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct Matched {
    /// A's and B's panel counts.
    pub panels: [Vec<usize>; 2],
    /// Drag, counts (B's coefficient on A's reference area where the areas
    /// differ, as the headline's).
    pub drag_counts: Vec<f64>,
    /// Whole-body lift, kg at B's dynamic pressure.
    pub lift_kg: Vec<f64>,
    /// Rear-axle lift, kg at B's dynamic pressure.
    pub rear_axle_kg: Vec<f64>,
    /// Separated share of the surface, percentage points.
    pub separated_points: Vec<f64>,
    /// Separated share of the underbody, percentage points (empty when a
    /// run's summary predates it).
    pub underbody_points: Vec<f64>,
}

/// The two runs' panel-noise samples, matched count by count, or `None`
/// when either run lacks the measure or their counts do not match
/// ([`MATCH_TOLERANCE`]).
pub fn matched(a: &Summary, b: &Summary) -> Option<Matched> {
    let (na, nb) = (a.panel_noise.as_ref()?, b.panel_noise.as_ref()?);
    if !counts_match(na, nb) {
        return None;
    }
    let k = super::area_factor(a, b);
    let q = super::pressure_factor(a, b).unwrap_or(1.0);
    let per_cl = |s: &Summary| {
        b.dynamic_pressure_pa * s.reference.area_m2 / tuft_solver::loads::STANDARD_GRAVITY
    };
    let each = |f: &dyn Fn(usize) -> f64| (0..na.panels.len()).map(f).collect::<Vec<f64>>();
    let points = |fa: &[f64], fb: &[f64]| {
        if fa.len() == na.panels.len() && fb.len() == fa.len() {
            each(&|i| 100.0 * (fb[i] - fa[i]))
        } else {
            Vec::new()
        }
    };
    Some(Matched {
        panels: [na.panels.clone(), nb.panels.clone()],
        drag_counts: each(&|i| 1000.0 * (k * nb.cd[i] - na.cd[i])),
        lift_kg: each(&|i| nb.cl[i] * per_cl(b) - na.cl[i] * per_cl(a)),
        rear_axle_kg: each(&|i| nb.rear_axle_kg[i] - q * na.rear_axle_kg[i]),
        separated_points: points(&na.separated_fraction, &nb.separated_fraction),
        underbody_points: points(&na.underbody_fraction, &nb.underbody_fraction),
    })
}

/// Whether two runs' samples were taken at matching counts: as many, and
/// each in the same proportion to its run's own count.
fn counts_match(a: &PanelNoise, b: &PanelNoise) -> bool {
    let (pa, pb) = (&a.panels, &b.panels);
    let lengths = [
        a.cd.len(),
        a.cl.len(),
        a.rear_axle_kg.len(),
        b.cd.len(),
        b.cl.len(),
        b.rear_axle_kg.len(),
    ];
    pa.len() >= 2
        && pa.len() == pb.len()
        && lengths.iter().all(|&n| n == pa.len())
        && pa[0] > 0
        && pb[0] > 0
        && pa.iter().zip(pb).all(|(&x, &y)| {
            (x as f64 / pa[0] as f64 - y as f64 / pb[0] as f64).abs() <= MATCH_TOLERANCE
        })
}

/// Whether a difference holds at every matched count: each keeps one
/// sign, each clears `floor` (the built-in floor: what two runs of
/// imperceptibly different shapes differ by at one count), and their mean
/// is larger than their spread (the spread of three samples is about 1.7
/// of their standard deviations, so the mean then lies some three of its
/// own standard errors from zero; our choice). False for no samples.
pub fn holds(d: &[f64], floor: f64) -> bool {
    let Some(&first) = d.first() else {
        return false;
    };
    let mean = d.iter().sum::<f64>() / d.len() as f64;
    first != 0.0
        && d.iter()
            .all(|v| v.signum() == first.signum() && v.abs() >= floor)
        && mean.abs() > spread(d.iter().copied())
}

/// Why `d` does not hold ([`holds`]), in words: "they change sign", "none
/// clears the floor of 6 counts", "not all clear the floor of 6 counts", "they spread by 15.2 kg, more than
/// their mean of -11.2".
pub fn failure_words(d: &[f64], floor: f64, unit: &str, decimals: usize) -> String {
    let first = d.first().copied().unwrap_or(0.0);
    let mean = d.iter().sum::<f64>() / d.len().max(1) as f64;
    // "a floor of 1 point", not "1 points".
    let unit = if crate::output::fixed(floor, decimals) == "1" {
        unit.strip_suffix('s').unwrap_or(unit)
    } else {
        unit
    };
    if d.iter().any(|v| v.signum() != first.signum() || *v == 0.0) {
        "which change sign".to_owned()
    } else if d.iter().all(|v| v.abs() < floor) {
        // A review read "not all" where none did.
        format!(
            "none of which clears the floor of {} {unit}",
            crate::output::fixed(floor, decimals)
        )
    } else if d.iter().any(|v| v.abs() < floor) {
        format!(
            "not all of which clear the floor of {} {unit}",
            crate::output::fixed(floor, decimals)
        )
    } else {
        format!(
            "which spread by {} {unit}, more than their mean of {}",
            crate::output::fixed(spread(d.iter().copied()), decimals),
            crate::output::signed(mean, decimals)
        )
    }
}

/// The values in words: "+16.7, +17.2 and +11.6".
pub fn values_words(d: &[f64], decimals: usize) -> String {
    let words: Vec<String> = d
        .iter()
        .map(|v| crate::output::signed(*v, decimals))
        .collect();
    crate::output::and_list(&words)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The review's roof-spoiler pair: drag +16.7, +17.2 and +11.6 counts
    /// holds; lift -4.9, -20.1 and -8.6 kg does not (its spread, 15.2,
    /// passes its mean, -11.2); a sign change or a sample under the floor
    /// does not either.
    #[test]
    fn a_difference_holds_only_at_every_count() {
        assert!(holds(&[16.7, 17.2, 11.6], 6.0));
        let lift = [-20.1, -4.9, -8.6];
        assert!(!holds(&lift, 3.0));
        assert!(
            failure_words(&lift, 3.0, "kg", 1)
                .contains("spread by 15.2 kg, more than their mean of -11.2")
        );
        assert!(!holds(&[8.0, -2.0, 9.0], 1.0));
        assert_eq!(
            failure_words(&[8.0, -2.0, 9.0], 1.0, "counts", 1),
            "which change sign"
        );
        assert!(!holds(&[8.0, 5.0, 9.0], 6.0));
        assert!(
            failure_words(&[8.0, 5.0, 9.0], 6.0, "counts", 0)
                .contains("clear the floor of 6 counts")
        );
        // None clears it (a review's spoiler against none: -3.8, -4.4 and
        // -3.2 counts had read "not all of which clear").
        assert_eq!(
            failure_words(&[-3.8, -4.4, -3.2], 6.0, "counts", 0),
            "none of which clears the floor of 6 counts"
        );
        // A floor of one point (the underbody's share) in the singular.
        assert_eq!(
            failure_words(&[1.1, 1.1, 0.8], 1.0, "points", 0),
            "not all of which clear the floor of 1 point"
        );
        assert!(!holds(&[], 1.0));
        assert_eq!(
            values_words(&[16.7, 17.2, 11.6], 1),
            "+16.7, +17.2 and +11.6"
        );
    }

    fn noise(panels: [usize; 3], cd: [f64; 3]) -> PanelNoise {
        PanelNoise {
            panels: panels.to_vec(),
            cd: cd.to_vec(),
            cl: vec![0.1; 3],
            front_axle_kg: vec![1.0; 3],
            rear_axle_kg: vec![2.0; 3],
            separated_fraction: vec![0.1; 3],
            ..PanelNoise::default()
        }
    }

    /// Counts in the same proportions match, and the differences are B
    /// less A count by count; counts in other proportions, or a run
    /// without the measure, give none.
    #[test]
    fn runs_are_matched_count_by_count() {
        let summary = |n: Option<PanelNoise>| {
            let mut s = Summary {
                panel_noise: n,
                dynamic_pressure_pa: 980.0,
                ..Summary::default()
            };
            s.reference.area_m2 = 2.0;
            s
        };
        let a = summary(Some(noise([3500, 3219, 3780], [0.300, 0.302, 0.299])));
        let b = summary(Some(noise([3502, 3220, 3781], [0.310, 0.311, 0.312])));
        let m = matched(&a, &b).unwrap();
        for (d, want) in m.drag_counts.iter().zip([10.0, 9.0, 13.0]) {
            assert!((d - want).abs() < 1e-9, "{:?}", m.drag_counts);
        }
        assert!(m.lift_kg.iter().all(|d| d.abs() < 1e-9));
        assert_eq!(m.separated_points.len(), 3);
        assert!(m.underbody_points.is_empty());
        let other = summary(Some(noise([3500, 3000, 4000], [0.3; 3])));
        assert_eq!(matched(&a, &other), None);
        assert_eq!(matched(&a, &summary(None)), None);
    }
}
