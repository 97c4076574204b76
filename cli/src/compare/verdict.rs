//! Whether a drag difference stands out of the uncertainty.
//!
//! Two tests, both needed before a difference is called one (and none is
//! called when the separated regions of the two runs differ enough for the
//! difference to rest on the separated-flow model, see
//! `compare::separation_note`; a difference that passes both tests then
//! keeps the model's direction in [`DragVerdict::leaning`], but the text
//! leads with "no winner", because through a switch of the separation
//! regime the model's direction is known to be wrong):
//! 1. it is larger than the noise floor, [`NOISE_COUNTS`] (what two runs of
//!    imperceptibly different shapes can differ by, measured), or the
//!    larger floor of the two runs' own panel noise ([`drag_floor`]); when
//!    both runs measured their panel noise, it holds at their three
//!    matched panel counts instead ([`super::matched::holds`]);
//! 2. it keeps its sign and stays above the floor at both ends of the two
//!    runs' sensitivity bands (low end against low end, high end against
//!    high end): the bands re-run the boundary layer with the separation
//!    threshold and transition at the ends of their plausible ranges, so a
//!    difference that changes sign inside them depends on the model more
//!    than on the shape.

use serde::{Deserialize, Serialize};

use crate::output::signed;
use crate::summary::Summary;

/// Noise floor of a drag difference, counts: what the drag of two runs
/// differs by when their shapes differ imperceptibly, about 1 time in 20.
/// Measured (2026-12-03, `bench/drag_noise`): the built-in coupe at its
/// default count (about 3,960 panels), 21 runs with the diffuser at 14.2 to
/// 14.8 degrees by 0.1, the ride height at 117 to 123 mm by 1 and the panel
/// count asked at 3,700 to 4,300 by 100; each family's drag scatters about
/// a straight line by 1.7, 1.9 and 2.4 counts (standard deviation), pooled
/// 2.0; the difference of two runs scatters by 1.41 times that, 2.9 counts,
/// and twice that, 5.7, rounds to 6. The floor had been 3 counts ("a few",
/// common practice), which a review's ride-height sweep of the same coupe
/// passed with a 5.8-count winner while 1 mm steps moved the drag back and
/// forth by up to 5.4 counts. A per-run figure would need extra solves.
pub const NOISE_COUNTS: f64 = 6.0;

/// Noise of the whole body's lift difference, in lift coefficient:
/// measured as [`NOISE_COUNTS`] on the same 21 runs (`bench/drag_noise`
/// prints it), the lift
/// coefficient scatters about each family's line by 0.0064 (pooled
/// standard deviation; the total and the rear axle by 1.1 kg at 40 m/s,
/// the front axle by 0.2 kg), so two runs differ by up to about twice
/// 1.41 times that, 0.018, about 3 kg on the demo coupe at 40 m/s.
pub const LIFT_NOISE_CL: f64 = 0.018;

/// A pair's noise floor from `floor`, the built-in one for a difference of
/// two runs, and each run's own panel noise where it measured one (`tuft
/// run --noise`: the spread of its numbers over three panel counts,
/// [`crate::noise::PanelNoise`]): each run's part is its spread, but never
/// less than the built-in floor's share of one run, `floor / sqrt(2)`, and
/// the parts add as independent errors do. Two runs without a measure get
/// `floor` itself. On the built-in coupe the spread over three counts 8 %
/// apart is about 1.7 standard deviations of the scatter, where the floor
/// gives each run 2 (`bench/drag_noise`), so a measured spread only raises
/// the floor where a shape scatters more than the coupe.
fn pair_floor(floor: f64, spreads: [Option<f64>; 2]) -> f64 {
    if spreads.iter().all(Option::is_none) {
        return floor;
    }
    let share = floor / std::f64::consts::SQRT_2;
    spreads
        .iter()
        .map(|s| s.map_or(share, |v| v.max(share)).powi(2))
        .sum::<f64>()
        .sqrt()
}

/// The drag noise floor of two runs with these panel-noise spreads
/// (counts; `None`: not measured), counts; see [`pair_floor`].
pub fn drag_floor(spreads: [Option<f64>; 2]) -> f64 {
    pair_floor(NOISE_COUNTS, spreads)
}

/// The lift noise of two runs with these panel-noise spreads (lift
/// coefficient; `None`: not measured), in lift coefficient; see
/// [`pair_floor`].
pub fn lift_floor_cl(spreads: [Option<f64>; 2]) -> f64 {
    pair_floor(LIFT_NOISE_CL, spreads)
}

/// "the noise floor of 6 counts", or with a floor raised by measured panel
/// noise, "the noise floor of 11 counts (from the runs' panel noise)".
pub fn floor_words(floor: f64) -> String {
    if floor > NOISE_COUNTS {
        // To a tenth unless whole, as the differences set against it are
        // given (a review read "within 26.4 counts, under the noise floor
        // of 26 counts").
        let shown = if (floor - floor.round()).abs() < 0.05 {
            format!("{floor:.0}")
        } else {
            format!("{floor:.1}")
        };
        format!("the noise floor of {shown} counts (from the runs' measured panel noise)")
    } else {
        format!("the noise floor of {NOISE_COUNTS} counts")
    }
}

/// The least share of a drag difference that must arise on the changed
/// surface for the separated-flow model's direction to be given when its
/// ranking is in doubt ([`drag_verdict_named`]; our choice: the larger
/// part).
pub const CHANGED_PART_SHARE: f64 = 0.5;

/// The verdict on a drag difference.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct DragVerdict {
    /// The difference stands out of the uncertainty.
    pub resolved: bool,
    /// B minus A at the central estimate, counts.
    pub delta_counts: f64,
    /// B minus A at the low and the high ends of the bands, counts.
    pub band_deltas_counts: [f64; 2],
    /// Noise floor used, counts.
    pub noise_counts: f64,
    /// "lower", "higher" or "undecided": B's drag against A's.
    pub direction: String,
    /// "lower" or "higher" when the difference passes the noise and band
    /// tests but the separated regions differ, so that it rests on the
    /// separated-flow model: the model's direction, no verdict (the model
    /// ranks the slant-back body's 25 and 35 degree slants the wrong way
    /// round); otherwise empty.
    #[serde(default)]
    pub leaning: String,
    /// With `leaning`: why the model's direction is no verdict ("the
    /// separated regions differ", "a rear slope differs and reaches 25
    /// degrees").
    #[serde(default)]
    pub doubt: String,
    /// One sentence for people.
    pub text: String,
    /// When the two runs' reference areas differ (by more than
    /// [`crate::compare::REFERENCE_AREA_SHIFT`]): the area both drag
    /// coefficients are put on, A's, m^2, so that the counts above compare
    /// drag areas C_D·A (the drag forces at one dynamic pressure) rather
    /// than coefficients on different areas.
    #[serde(default)]
    pub common_area_m2: Option<f64>,
    /// With both runs' panel noise measured: the difference at their three
    /// matched panel counts, counts (the runs' own first,
    /// [`super::matched`]), which then decides whether it stands out.
    #[serde(default)]
    pub matched_counts: Option<Vec<f64>>,
}

/// A's reference area when the two runs' reference areas differ by more
/// than [`crate::compare::REFERENCE_AREA_SHIFT`]: drag is then ranked on
/// drag area C_D·A, B's coefficients expressed in A's area (a coupe with
/// `reference.area = 2.1` against its own frontal area of 1.86 m^2 had been
/// called 16.8 counts lower at the same drag force). `None` when they
/// agree.
pub fn common_area(a: &Summary, b: &Summary) -> Option<f64> {
    let (ra, rb) = (a.reference.area_m2, b.reference.area_m2);
    (ra > 0.0 && crate::compare::areas_differ(ra, rb)).then_some(ra)
}

/// The factor that puts B's force coefficients on A's reference area,
/// whenever the areas are known, not only where they differ by more than
/// [`crate::compare::REFERENCE_AREA_SHIFT`] (which decides only the
/// words): so the counts and the newtons tell one story (a review's camera
/// pods, 0.46 % more frontal area, read "+1.8 counts ... +5 N", where 5 N
/// is 2.6 counts).
pub fn area_factor(a: &Summary, b: &Summary) -> f64 {
    let (ra, rb) = (a.reference.area_m2, b.reference.area_m2);
    if ra > 0.0 && rb > 0.0 { rb / ra } else { 1.0 }
}

/// Why a drag difference rests on the part of the separated-flow model
/// whose drag ranking is known to fail.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ModelDoubt {
    /// The separated regions (or the underbody's share) differ.
    Separation,
    /// A named rear region's slope differs and reaches
    /// [`crate::compare::SLOPE_CAUTION_DEG`].
    RearSlope,
    /// The area beside sharp front edges differs
    /// ([`crate::compare::RIM_CHANGE_SHARE`]), away from where the shape
    /// changed, or where that is not known: the call on an edge's rounding.
    Rims,
    /// The same, where the change reaches those edges: the area held at
    /// their bound moves with the shape, no rounding need be in question
    /// (a review's nose raised 60 mm, no radius changed, had read of
    /// roundings near the rim radius at the head of its verdict).
    RimsMoved,
}

/// Judge B's drag against A's; `doubt` when the difference rests on the
/// separated-flow model where its drag ranking is known to fail (no winner
/// is named then, nor when either run's drag is the plateau model's,
/// [`Summary::plateau_drag`], nor when either stood on the ground with
/// wheels on, [`Summary::wheels_on`]).
#[cfg(test)]
pub fn drag_verdict(a: &Summary, b: &Summary, doubt: Option<ModelDoubt>) -> DragVerdict {
    drag_verdict_named(a, b, (doubt, None, None), ["A", "B"])
}

/// [`drag_verdict`] with the two runs called by `names` (A's, B's) in its
/// text: `tuft collect` names the variants, where "A" and "B" mean
/// nothing. `(doubt, place, unchanged)`: the doubt; for separated
/// regions that differ, where they differ most in words ("on the boot
/// deck, 66 % against 85 % separated"), so that the reason fits the pair;
/// and the part of the drag difference arising where the shape did not
/// change, counts ([`crate::compare::SurfaceDeltas::unchanged_drag_counts`]),
/// where known: when the doubt holds and under [`CHANGED_PART_SHARE`] of
/// the difference arises on the changed surface, the model gives no
/// direction either (a review's two mirror heads leaned 11.8 counts lower
/// on the half model and 22.3 higher on the whole, the unchanged surface
/// carrying -7.9 and +23.6 of them).
pub fn drag_verdict_named(
    a: &Summary,
    b: &Summary,
    (doubt, place, unchanged): (Option<ModelDoubt>, Option<&str>, Option<f64>),
    names: [&str; 2],
) -> DragVerdict {
    let [na, nb] = names;
    let separation_differs = doubt.is_some();
    let why = match doubt {
        Some(ModelDoubt::RearSlope) => format!(
            "a rear slope differs and reaches {:.0} degrees or more",
            crate::compare::SLOPE_CAUTION_DEG
        ),
        Some(ModelDoubt::Rims | ModelDoubt::RimsMoved) => {
            "the sharp front edges the flow leaves differ".to_owned()
        }
        _ => match place {
            Some(p) => format!("the separated regions differ (most {p})"),
            None => "the separated regions differ".to_owned(),
        },
    };
    let known = match doubt {
        Some(ModelDoubt::Rims) => {
            "flat-faced bodies come out 13-30 % below their handbook drag, and a rounding near the \
             rim radius reads either way"
        }
        Some(ModelDoubt::RimsMoved) => {
            "flat-faced bodies come out 13-30 % below their handbook drag, and the area it holds at \
             the edges' bound moves with the changed shape"
        }
        Some(ModelDoubt::RearSlope) => {
            "it ranks the slant-back research body's 25 and 35 degree slants the wrong way round"
        }
        _ => {
            "the drag of separated flow is its weakest part: on the slant-back research body it reads \
             0.07-0.21 below the measured drag and ranks the 25 and 35 degree slants the wrong way round"
        }
    };
    // B's coefficients on A's reference area when the areas differ: a
    // difference of drag areas, not of coefficients on different areas.
    let common = common_area(a, b);
    let k = area_factor(a, b);
    let counts = |x: f64, y: f64| 1000.0 * (k * y - x);
    let delta = counts(a.coefficients.drag, b.coefficients.drag);
    let low = counts(a.drag_estimate.cd_low, b.drag_estimate.cd_low);
    let high = counts(a.drag_estimate.cd_high, b.drag_estimate.cd_high);
    // With both runs' panel noise measured, the difference at the three
    // matched counts decides (`matched::holds`), its spread the floor;
    // otherwise the floor of the two runs' spreads taken as independent.
    let paired = super::matched::matched(a, b).map(|m| m.drag_counts);
    let (noise, above_noise) = match &paired {
        Some(d) => (
            NOISE_COUNTS.max(crate::noise::spread(d.iter().copied())),
            super::matched::holds(d, NOISE_COUNTS),
        ),
        None => {
            let n = drag_floor([a.drag_spread(), b.drag_spread()]);
            (n, delta.abs() >= n)
        }
    };
    let same_way = |d: f64| d.signum() == delta.signum() && d.abs() >= noise;
    let banded = above_noise && same_way(low) && same_way(high);
    // The plateau model's drag (an attached-only run that separates)
    // ranks nothing.
    let plateau = a.plateau_drag() || b.plateau_drag();
    let wheels = a.wheels_on() || b.wheels_on();
    let floor = a.floor_on_ground() || b.floor_on_ground();
    // Two yaw angles are two tests of one design, not two designs (a
    // review's yaw 0 against 10 had been judged as variants).
    let yaws = crate::compare::yaws_differ(a, b);
    // Two speeds too (as `tuft collect` ranks within one wind condition).
    let speeds = crate::compare::speeds_differ(a, b);
    let apart = yaws || speeds;
    let resolved = banded && !separation_differs && !plateau && !wheels && !apart && !floor;
    let way = if delta < 0.0 { "lower" } else { "higher" };
    // The drag difference arising mostly where the shape did not change:
    // the flow's answer there in this model, plus panel noise. Not where
    // the runs' matched panel counts hold the difference: then it is no
    // panelling's (a review's raised nose, blended into the bonnet, read
    // +27.7, +30.8 and +25.7 counts at three counts, most of it on
    // surface within 4 mm of A's).
    let settled = paired
        .as_ref()
        .is_some_and(|d| super::matched::holds(d, NOISE_COUNTS));
    let elsewhere = unchanged
        .filter(|u| (delta - u) * delta.signum() < CHANGED_PART_SHARE * delta.abs())
        .filter(|_| !settled);
    // Dead water behind a part that meets more of the body (a pickup's
    // bed, a gap before a deflector) in either run: the model holds it at
    // one pressure where a trapped flow sets the drag, so its direction is
    // none (a review's tailgate-up pickup leaned 84 to 188 counts above
    // the other beds, where tunnels find it a little below).
    let pockets: Vec<&str> = [(na, a), (nb, b)]
        .into_iter()
        .filter(|(_, s)| {
            s.warnings
                .iter()
                .any(|w| w.contains(crate::pipeline::SHADOWED_WORDS))
        })
        .map(|(n, _)| n)
        .collect();
    let leaning = if banded
        && separation_differs
        && elsewhere.is_none()
        && pockets.is_empty()
        && !plateau
        && !wheels
        && !apart
        && !floor
    {
        way
    } else {
        ""
    };
    let direction = if resolved { way } else { "undecided" };
    let text = if plateau {
        format!(
            "no winner: drag from the attached flow's plateau model (solver.wakes = \"attached\"), \
             which is no basis for ranking drag; in this model {nb}'s drag is {} counts against \
             {na}'s: run both with the separated-flow loop (the default) to rank them",
            signed(delta, 1)
        )
    } else if wheels {
        format!(
            "no winner: {}; in this model {nb}'s drag is {} counts against {na}'s",
            crate::pipeline::WHEELS_DRAG,
            signed(delta, 1)
        )
    } else if floor {
        format!(
            "no winner: a body's floor stands on the ground (its ground is set too high for it, and \
             the floor was cut off there), so the body solved is not the one drawn; in this model \
             {nb}'s drag is {} counts against {na}'s",
            signed(delta, 1)
        )
    } else if yaws {
        format!(
            "no winner: the runs are at different yaw angles ({} and {} degrees), two tests of a \
             design rather than two designs (rank drag at one yaw); in this model {nb}'s drag is {} \
             counts against {na}'s",
            crate::compare::yaw_of(a),
            crate::compare::yaw_of(b),
            signed(delta, 1)
        )
    } else if speeds {
        format!(
            "no winner: the runs are at different speeds ({} and {}), two tests of a design rather \
             than two designs (rank drag at one speed); in this model {nb}'s drag is {} counts against \
             {na}'s",
            crate::output::speed_words(crate::compare::speed_of(a)),
            crate::output::speed_words(crate::compare::speed_of(b)),
            signed(delta, 1)
        )
    } else if let (false, Some(d)) = (above_noise, &paired) {
        format!(
            "no winner: at the runs' three matched panel counts the drag differs by {} counts, {} \
             (within the panel noise)",
            super::matched::values_words(d, 1),
            super::matched::failure_words(d, NOISE_COUNTS, "counts", 0)
        )
    } else if !above_noise {
        format!(
            "no winner: the drag difference, {} counts, is within {}",
            signed(delta, 1),
            floor_words(noise)
        )
    } else if let (true, true, Some(u)) = (banded, separation_differs, elsewhere) {
        format!(
            "no winner: {why}, where the model's drag ranking is not reliable ({known}); and of the \
             {} counts between them, {} arise where the shape did not change (the flow's answer there \
             in this model, plus panel noise), so the model gives no direction either: confirm any \
             ranking with validated CFD or a tunnel",
            signed(delta, 1),
            signed(u, 1)
        )
    } else if banded && separation_differs && !pockets.is_empty() {
        format!(
            "no winner: {why}, where the model's drag ranking is not reliable ({known}); and {} \
             dead water behind a part that meets more of the body (a pickup's bed, a gap), which the \
             model holds at one pressure where a trapped flow sets the drag, so it gives no direction \
             either: confirm any ranking with validated CFD or a tunnel",
            match pockets.as_slice() {
                [one] => format!("{one} has"),
                _ => "both have".to_owned(),
            }
        )
    } else if banded && separation_differs {
        format!(
            "no winner: {why}, where the model's drag ranking is not reliable ({known}); in this \
             model {nb}'s drag is {:.1} counts {way} ({}): confirm any ranking with validated CFD or a \
             tunnel",
            delta.abs(),
            band_ends(low, high)
        )
    } else if !banded {
        format!(
            "no winner, within the model uncertainty: the drag difference is {} counts between the \
             central estimates, but {}",
            signed(delta, 1),
            band_shortfall(delta, [low, high], noise)
        )
    } else {
        let held = paired.as_ref().map_or(String::new(), |d| {
            format!(
                "; it holds at the runs' three matched panel counts: {} counts",
                super::matched::values_words(d, 1)
            )
        });
        format!(
            "{nb} has {direction} drag by {:.1} counts between the central estimates ({}){held}",
            delta.abs(),
            band_ends(low, high)
        )
    };
    // The matched counts' differences, where the text above has not
    // given them (a review's pair failed the band test and the page never
    // showed the three numbers it had passed).
    let text = match &paired {
        Some(d) if !text.contains("matched panel counts") => format!(
            "{text}; at the runs' three matched panel counts the drag differs by {} counts",
            super::matched::values_words(d, 1)
        ),
        _ => text,
    };
    let text = match common {
        Some(ra) => format!(
            "{text} (the reference areas differ, so drag is ranked on drag area C_D·A: {nb}'s \
             coefficient expressed in {na}'s reference area of {ra:.3} m^2)"
        ),
        None => text,
    };
    DragVerdict {
        resolved,
        delta_counts: delta,
        band_deltas_counts: [low, high],
        noise_counts: noise,
        direction: direction.into(),
        leaning: leaning.into(),
        doubt: if leaning.is_empty() {
            String::new()
        } else {
            why
        },
        text,
        common_area_m2: common,
        matched_counts: paired,
    }
}

/// Why a difference of `delta` counts between the central estimates does
/// not hold across the sensitivity bands, whose ends differ by `ends`
/// (low, high; each one run's end minus the other's): each end that turns
/// the other way or falls within the noise floor `noise` (counts), then
/// the other end.
pub fn band_shortfall(delta: f64, ends: [f64; 2], noise: f64) -> String {
    let mut fails = Vec::new();
    let mut holds = Vec::new();
    for (d, end) in ends.into_iter().zip(["low", "high"]) {
        if d.signum() != delta.signum() {
            fails.push(format!(
                "{} between the bands' {end} ends, the other way",
                signed(d, 1)
            ));
        } else if d.abs() < noise {
            fails.push(format!(
                "only {} between the bands' {end} ends, within {}",
                signed(d, 1),
                floor_words(noise)
            ));
        } else {
            holds.push(format!("{} between their {end} ends", signed(d, 1)));
        }
    }
    match (fails.is_empty(), holds.first()) {
        // Nothing fails (not a call `drag_verdict` makes): both ends.
        (true, _) => band_ends(ends[0], ends[1]),
        (false, Some(h)) => format!("{} ({h})", fails.join(" and ")),
        (false, None) => fails.join(" and "),
    }
}

/// Whether a difference of `delta` counts holds at both band ends
/// (`ends`, as [`band_shortfall`] takes them): the same way and beyond
/// the noise floor `noise`.
pub fn band_holds(delta: f64, ends: [f64; 2], noise: f64) -> bool {
    delta != 0.0
        && ends
            .iter()
            .all(|d| *d != 0.0 && d.signum() == delta.signum() && d.abs() >= noise)
}

/// The differences at the band ends in words. Each is one run's band end
/// minus the other's (low with low, high with high), not an end of a band
/// of the difference: the bands sit unevenly about their estimates, so the
/// central difference need not lie between the two.
fn band_ends(low: f64, high: f64) -> String {
    format!(
        "{} between the sensitivity bands' low ends, {} between their high ends",
        signed(low, 1),
        signed(high, 1)
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    fn summary(cd: f64, lo: f64, hi: f64) -> Summary {
        let mut s = Summary::default();
        s.coefficients.drag = cd;
        s.drag_estimate.cd = cd;
        s.drag_estimate.cd_low = lo;
        s.drag_estimate.cd_high = hi;
        s
    }

    /// A run with its panel noise measured: drag `cd` at its own count
    /// and the two others, `panels` the three counts.
    fn with_noise(cd: [f64; 3], panels: [usize; 3]) -> Summary {
        let mut s = summary(cd[0], cd[0] - 0.01, cd[0] + 0.01);
        s.panel_noise = Some(crate::noise::PanelNoise {
            panels: panels.to_vec(),
            cd: cd.to_vec(),
            cl: vec![0.0; 3],
            front_axle_kg: vec![0.0; 3],
            rear_axle_kg: vec![0.0; 3],
            drag_counts: 1000.0 * crate::noise::spread(cd),
            ..Default::default()
        });
        s
    }

    /// A measured floor is written to a tenth unless whole.
    #[test]
    fn a_measured_floor_is_written_as_finely_as_the_gap() {
        assert!(floor_words(26.46).contains("of 26.5 counts"));
        assert!(floor_words(11.0).contains("of 11 counts"));
        assert_eq!(floor_words(3.0), "the noise floor of 6 counts");
    }

    /// With both runs' panel noise measured, the difference at the three
    /// matched counts decides: one that passes the floor of the two
    /// spreads at the runs' own count but not at the others is no winner,
    /// and one that holds at all three is, though the spreads taken as
    /// independent would have buried it.
    #[test]
    fn matched_counts_decide_when_both_runs_measured_their_noise() {
        let with = |cd: [f64; 3]| with_noise(cd, [4000, 3680, 4320]);
        // +20 counts at the own count, +2 and +3 at the others.
        let v = drag_verdict(&with([0.300; 3]), &with([0.320, 0.302, 0.303]), None);
        assert!(v.delta_counts > drag_floor([Some(0.0), Some(18.0)]));
        assert!(!v.resolved, "{}", v.text);
        assert!(
            v.text.contains("at the runs' three matched panel counts"),
            "{}",
            v.text
        );
        assert!(v.text.contains("+20.0, +2.0 and +3.0 counts"), "{}", v.text);
        // +12, +11 and +13 with spreads of 20 and 18 counts.
        let (a, b) = (with([0.300, 0.310, 0.290]), with([0.312, 0.321, 0.303]));
        let v = drag_verdict(&a, &b, None);
        assert!(v.delta_counts < drag_floor([Some(20.0), Some(18.0)]));
        assert!(v.resolved, "{}", v.text);
        assert_eq!(v.direction, "higher");
        assert!(
            v.text
                .contains("it holds at the runs' three matched panel counts"),
            "{}",
            v.text
        );
        assert_eq!(v.matched_counts.as_ref().map(Vec::len), Some(3));
        // Held at every count but not at a band's end: no winner, and the
        // three differences are still given.
        let mut narrow = b.clone();
        narrow.drag_estimate.cd_low = a.drag_estimate.cd_low + 0.002;
        let v = drag_verdict(&a, &narrow, None);
        assert!(!v.resolved, "{}", v.text);
        assert!(
            v.text.starts_with("no winner, within the model uncertainty")
                && v.text.ends_with(
                    "; at the runs' three matched panel counts the drag differs by +12.0, +11.0 and +13.0 counts"
                ),
            "{}",
            v.text
        );
    }

    /// A run's own panel noise raises the pair's floor where it is larger
    /// than its share of the built-in one, and never lowers it.
    #[test]
    fn measured_panel_noise_raises_the_floor_only() {
        assert_eq!(drag_floor([None, None]), NOISE_COUNTS);
        // Spreads under the built-in share (6 / sqrt 2 = 4.24) keep it.
        assert!((drag_floor([Some(1.0), Some(3.0)]) - NOISE_COUNTS).abs() < 1e-12);
        // 14 counts on one, nothing measured on the other: sqrt(14^2 + 18).
        assert!((drag_floor([Some(14.0), None]) - 214.0_f64.sqrt()).abs() < 1e-12);
        assert!((drag_floor([Some(8.0), Some(6.0)]) - 10.0).abs() < 1e-12);
        assert_eq!(lift_floor_cl([None, None]), LIFT_NOISE_CL);
        assert!((lift_floor_cl([Some(0.03), Some(0.04)]) - 0.05).abs() < 1e-12);
        // A difference of 10 counts passes the built-in floor and not the
        // floor of two runs that each spread over 8 counts.
        let a = summary(0.300, 0.290, 0.320);
        let b = summary(0.290, 0.278, 0.308);
        assert!(drag_verdict(&a, &b, None).resolved);
        let noisy = |mut s: Summary| {
            s.panel_noise = Some(crate::noise::PanelNoise {
                drag_counts: 8.0,
                ..Default::default()
            });
            s
        };
        let v = drag_verdict(&noisy(a), &noisy(b), None);
        assert!(!v.resolved, "{v:?}");
        assert!((v.noise_counts - 8.0 * 2.0_f64.sqrt()).abs() < 1e-12);
        assert_eq!(
            v.text,
            "no winner: the drag difference, -10.0 counts, is within the noise floor of 11.3 counts \
             (from the runs' measured panel noise)"
        );
    }

    #[test]
    fn small_or_model_dependent_differences_name_no_winner() {
        let a = summary(0.300, 0.290, 0.320);
        // 2 counts: under the noise floor (6 counts, measured).
        let v = drag_verdict(&a, &summary(0.302, 0.292, 0.322), None);
        assert!(!v.resolved && v.direction == "undecided", "{v:?}");
        // 10 counts lower at the centre but higher at the top of the band;
        // the verdict names the end that fails, and why.
        let v = drag_verdict(&a, &summary(0.290, 0.280, 0.325), None);
        assert!(!v.resolved, "{v:?}");
        assert!(
            v.text.ends_with(
                "but +5.0 between the bands' high ends, the other way (-10.0 between their low ends)"
            ),
            "{}",
            v.text
        );
        // Lower at both ends, but within the noise floor at the top.
        let v = drag_verdict(&a, &summary(0.290, 0.280, 0.317), None);
        assert!(
            !v.resolved
                && v.text.ends_with(
                    "but only -3.0 between the bands' high ends, within the noise floor of 6 counts \
                     (-10.0 between their low ends)"
                ),
            "{}",
            v.text
        );
        // Two speeds are two tests of one design: no winner.
        let at = |speed: f64, cd: f64| {
            let mut s = summary(cd, cd - 0.01, cd + 0.01);
            s.case = serde_json::json!({"flow": {"speed": speed}});
            s
        };
        let v = drag_verdict(&at(40.0, 0.300), &at(30.0, 0.280), None);
        assert!(
            !v.resolved
                && v.text
                    .starts_with("no winner: the runs are at different speeds"),
            "{}",
            v.text
        );
        // 10 counts lower everywhere.
        let v = drag_verdict(&a, &summary(0.290, 0.280, 0.310), None);
        assert!(v.resolved && v.direction == "lower", "{v:?}");
        assert!(
            v.text
                .starts_with("B has lower drag by 10.0 counts between the central estimates"),
            "{}",
            v.text
        );
        assert!((v.delta_counts + 10.0).abs() < 1e-9);
        assert!(v.leaning.is_empty(), "{v:?}");
        // The same, but the separated regions differ: no winner first,
        // then the model's direction, and the text says why.
        let v = drag_verdict(
            &a,
            &summary(0.290, 0.280, 0.310),
            Some(ModelDoubt::Separation),
        );
        assert!(!v.resolved && v.direction == "undecided", "{v:?}");
        assert_eq!(v.leaning, "lower");
        assert!(
            v.text
                .starts_with("no winner: the separated regions differ")
                && v.text
                    .contains("in this model B's drag is 10.0 counts lower"),
            "{}",
            v.text
        );
        // Within the band, a separated region that moves gives no lead.
        let v = drag_verdict(
            &a,
            &summary(0.290, 0.280, 0.325),
            Some(ModelDoubt::Separation),
        );
        assert!(v.leaning.is_empty(), "{v:?}");
        // 10 counts lower everywhere, but B ran attached-only and separates:
        // its drag is the plateau model's, which ranks nothing.
        let mut b = summary(0.290, 0.280, 0.310);
        b.separation.area_m2 = 0.4;
        let v = drag_verdict(&a, &b, None);
        assert!(!v.resolved && v.leaning.is_empty(), "{v:?}");
        assert!(
            v.text
                .starts_with("no winner: drag from the attached flow's plateau model"),
            "{}",
            v.text
        );
        // 10 counts lower everywhere, but A stood on the ground with its
        // wheels on: drag with wheels ranks nothing.
        let mut a_wheels = summary(0.300, 0.290, 0.320);
        a_wheels.mesh.preparation = serde_json::json!({"wrap": {"contact_area": 0.19}});
        let v = drag_verdict(&a_wheels, &summary(0.290, 0.280, 0.310), None);
        assert!(!v.resolved && v.leaning.is_empty(), "{v:?}");
        assert!(
            v.text.starts_with("no winner: with wheels on")
                && v.text.contains("B's drag is -10.0 counts against A's"),
            "{}",
            v.text
        );
        // A floor, not tyres, on the ground (2.74 m^2 of a 4.5 by 1.85 m
        // body): not wheels, and no winner either.
        let mut a_floor = summary(0.300, 0.290, 0.320);
        a_floor.mesh.preparation = serde_json::json!({
            "wrap": {"contact_area": 2.74},
            "bounds": [[0.0, -0.925, 0.0], [4.5, 0.925, 1.3]]
        });
        assert!(a_floor.floor_on_ground() && !a_floor.wheels_on());
        let v = drag_verdict(&a_floor, &summary(0.290, 0.280, 0.310), None);
        assert!(!v.resolved && v.leaning.is_empty(), "{v:?}");
        assert!(
            v.text
                .starts_with("no winner: a body's floor stands on the ground"),
            "{}",
            v.text
        );
        // 10 counts lower everywhere, but B at 10 degrees yaw and A
        // straight ahead: two tests, not two designs.
        let mut b_yawed = summary(0.290, 0.280, 0.310);
        b_yawed.case = serde_json::json!({"flow": {"yaw": 10.0}});
        let v = drag_verdict(&a, &b_yawed, None);
        assert!(!v.resolved && v.leaning.is_empty(), "{v:?}");
        assert!(
            v.text
                .starts_with("no winner: the runs are at different yaw angles (0 and 10 degrees)"),
            "{}",
            v.text
        );
    }

    /// `tuft collect`'s verdict on its leader names the variants: "B's
    /// drag is ... lower" meant nothing in sweep.json, where no A or B is
    /// defined.
    #[test]
    fn a_named_verdict_speaks_of_the_variants() {
        let a = summary(0.300, 0.290, 0.320);
        let b = summary(0.290, 0.280, 0.310);
        let v = drag_verdict_named(
            &a,
            &b,
            (
                Some(ModelDoubt::Separation),
                Some("on the deck, 30 % against 0 % separated"),
                None,
            ),
            ["deck-30", "deck-0"],
        );
        assert!(
            v.text
                .contains("in this model deck-0's drag is 10.0 counts lower")
                && !v.text.contains("B's")
                && !v.text.contains("A's"),
            "{}",
            v.text
        );
        let v = drag_verdict_named(&a, &b, (None, None, None), ["deck-30", "deck-0"]);
        assert!(
            v.text.starts_with("deck-0 has lower drag by 10.0 counts"),
            "{}",
            v.text
        );
        // Within the noise: the verdict first.
        let v = drag_verdict(&a, &summary(0.302, 0.292, 0.322), None);
        assert!(
            v.text
                .starts_with("no winner: the drag difference, +2.0 counts"),
            "{}",
            v.text
        );
    }

    /// Dead water behind a part that meets more of the body (a pickup's
    /// bed behind its cab) in either run: no model direction, and the
    /// verdict names the run that has it.
    #[test]
    fn dead_water_meeting_the_body_gives_no_direction() {
        let a = summary(0.229, 0.217, 0.44);
        let mut b = summary(0.295, 0.280, 0.505);
        b.warnings.push(format!(
            "0.71 m^2 {} (23 % of the frontal area ...)",
            crate::pipeline::SHADOWED_WORDS
        ));
        let doubt = Some(ModelDoubt::Separation);
        let v = drag_verdict_named(&a, &b, (doubt, None, None), ["down", "up"]);
        assert!(v.leaning.is_empty() && v.doubt.is_empty(), "{v:?}");
        assert!(
            v.text
                .contains("and up has dead water behind a part that meets more of the body")
                && v.text.contains("so it gives no direction either")
                && !v.text.contains("in this model up's drag"),
            "{}",
            v.text
        );
        // Without the warning, the model's direction as before.
        b.warnings.clear();
        let v = drag_verdict_named(&a, &b, (doubt, None, None), ["down", "up"]);
        assert_eq!(v.leaning, "higher", "{v:?}");
    }

    /// A review's two mirror heads: the difference rests on the
    /// separated regions and arises mostly where the shape did not change
    /// (-7.9 of -11.8 counts on the half model, +23.6 of +22.3 on the
    /// whole), so the model gives no direction either.
    #[test]
    fn a_difference_arising_off_the_change_gives_no_direction() {
        let a = summary(0.300, 0.290, 0.320);
        let b = summary(0.290, 0.280, 0.310);
        let doubt = Some(ModelDoubt::Separation);
        for unchanged in [-7.9, -10.0, -15.0] {
            let v = drag_verdict_named(&a, &b, (doubt, None, Some(unchanged)), ["A", "B"]);
            assert!(v.leaning.is_empty() && v.doubt.is_empty(), "{v:?}");
            assert!(
                v.text.contains(&format!(
                    "of the -10.0 counts between them, {} arise where the shape did not change",
                    signed(unchanged, 1)
                )) && !v.text.contains("in this model B's drag"),
                "{}",
                v.text
            );
        }
        // Most of it on the changed surface: the model's direction.
        for unchanged in [-2.0, 3.0] {
            let v = drag_verdict_named(&a, &b, (doubt, None, Some(unchanged)), ["A", "B"]);
            assert_eq!(v.leaning, "lower", "{v:?}");
        }
        // Held at three matched panel counts: no panelling's, so the
        // model's direction is given (a review's raised nose).
        let noisy = |cd: [f64; 3]| with_noise(cd, [3000, 2760, 3240]);
        let (a3, b3) = (noisy([0.292, 0.291, 0.293]), noisy([0.320, 0.322, 0.319]));
        let v = drag_verdict_named(&a3, &b3, (doubt, None, Some(34.2)), ["A", "B"]);
        assert_eq!(v.leaning, "higher", "{v:?}");
        // No doubt: the verdict as before, whatever the unchanged surface.
        let v = drag_verdict_named(&a, &b, (None, None, Some(-9.0)), ["A", "B"]);
        assert!(v.resolved, "{v:?}");
    }

    #[test]
    fn band_end_differences_are_not_worded_as_a_range() {
        // The demo's coupes: +39.3 counts at the centre, +42.6 and +45.7
        // between the low and between the high ends. The text must not
        // read "+42.6 to +45.7" (a range that leaves out its own headline).
        let a = summary(0.148, 0.142, 0.364);
        let b = summary(0.1873, 0.1846, 0.4097);
        let v = drag_verdict(&a, &b, Some(ModelDoubt::Separation));
        assert!(!v.text.contains(" to "), "{}", v.text);
        assert!(
            v.text
                .contains("in this model B's drag is 39.3 counts higher")
                && v.text
                    .contains("+42.6 between the sensitivity bands' low ends")
                && v.text.contains("+45.7 between their high ends"),
            "{}",
            v.text
        );
    }
}
