//! `tuft compare A B`: what changed from result A to result B.
//!
//! Reads two finished result folders (their meshes may differ), takes the
//! differences of the headline numbers (B minus A: drag in counts, lift and
//! axle loads in kg, separated area in m^2 and in percentage points of the
//! wetted area), maps A's surface fields onto B's panels by the nearest
//! surface point ([`mapping`]) and draws the Cp difference and the change
//! in separation on B's body. Writes `compare.json`, two sheets and a
//! self-contained `compare.html` into a folder that appears whole or not at
//! all.
//!
//! A drag difference is only called a difference when it exceeds the noise
//! floor of a few counts (common practice) and keeps its sign at both ends
//! of the two runs' sensitivity bands; otherwise the verdict says it is
//! within the uncertainty instead of naming a winner.

mod folder;
mod mapping;
pub mod matched;
mod pictures;
pub mod verdict;

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::{Context, Result};
use serde::{Deserialize, Serialize};

pub use folder::{PanelFields, ResultFolder, read_summary};
use mapping::{Mapping, SourcePanel, map_nearest};
#[cfg(test)]
use verdict::drag_verdict;
pub use verdict::{
    DragVerdict, ModelDoubt, NOISE_COUNTS, area_factor, band_holds, band_shortfall, common_area,
    drag_floor, drag_verdict_named, floor_words, lift_floor_cl,
};

use crate::outdir::Staging;
use crate::output::PanelState;

/// Arguments of `tuft compare`.
#[derive(clap::Args)]
pub struct CompareArgs {
    /// The reference result folder (A).
    pub a: PathBuf,
    /// The variant result folder (B); differences are B minus A, drawn on B.
    pub b: PathBuf,
    /// Folder for the comparison (default: `compare-A-vs-B` beside B).
    #[arg(long)]
    pub out: Option<PathBuf>,
    /// Replace an existing comparison folder.
    #[arg(long)]
    pub force: bool,
    /// Print nothing on success.
    #[arg(long, short)]
    pub quiet: bool,
    /// Worker threads (default: all cores), as for the other commands.
    #[arg(long)]
    pub threads: Option<usize>,
}

/// Differences of the headline numbers, B minus A.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct Deltas {
    /// Drag estimate, counts (1 count = 0.001 C_D, common practice); when
    /// the reference areas differ, B's coefficient is expressed in A's
    /// reference area ([`common_area`]), so that this is a difference of
    /// drag area C_D·A, as are the pressure and friction parts.
    pub drag_counts: f64,
    /// Pressure part of the drag, counts.
    pub drag_pressure_counts: f64,
    /// Friction part of the drag, counts.
    pub drag_friction_counts: f64,
    /// Drag force, N, at B's dynamic pressure (see
    /// [`Deltas::a_loads_scaled_by`]).
    pub drag_force_n: f64,
    /// Lift coefficient.
    pub lift_coefficient: f64,
    /// Side-force coefficient, B's less A's, each in its own wind's axes
    /// (in a cross wind a rough figure, the runs' notes say why).
    #[serde(default)]
    pub side_coefficient: f64,
    /// Lift, whole body, kg at B's dynamic pressure.
    pub lift_kg: f64,
    /// Lift on the front axle, kg at B's dynamic pressure.
    pub front_axle_kg: f64,
    /// Lift on the rear axle, kg at B's dynamic pressure.
    pub rear_axle_kg: f64,
    /// When the runs' dynamic pressures differ (other speeds or air
    /// densities): the factor q_B/q_A A's forces were multiplied by before
    /// the force and kg differences above were taken, so that they compare
    /// like with like at B's dynamic pressure (B at 50 m/s against A at 40
    /// had read -63 kg where like for like it is -10). Coefficient
    /// differences need no such factor.
    #[serde(default)]
    pub a_loads_scaled_by: Option<f64>,
    /// The lift difference two runs of imperceptibly different shapes can
    /// show ([`lift_floor_cl`] of the two runs at B's dynamic pressure and
    /// reference area), kg.
    #[serde(default)]
    pub lift_noise_kg: f64,
    /// With both runs' panel noise measured: the lift difference at their
    /// three matched panel counts, kg at B's dynamic pressure (the runs'
    /// own first, [`matched`]); `lift_noise_kg` is then the larger of the
    /// built-in floor and their spread.
    #[serde(default)]
    pub matched_lift_kg: Option<Vec<f64>>,
    /// The built-in lift floor ([`verdict::LIFT_NOISE_CL`]) at B's dynamic pressure
    /// and reference area, kg: what each matched difference must clear.
    #[serde(default)]
    pub lift_floor_kg: f64,
    /// Without panel noise measured on either run: the larger separated
    /// share of the two, %, where it is over [`BLUNT_LIFT_PERCENT`] (the
    /// built-in floor is then too low to trust; [`lift_noise_words`]).
    #[serde(default)]
    pub blunt_separated_percent: Option<f64>,
    /// Separated area, m^2.
    pub separated_area_m2: f64,
    /// Separated fraction of the wetted area, percentage points.
    pub separated_percent_points: f64,
}

/// The surface fields of A mapped onto B's panels, and what they show.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct SurfaceDeltas {
    /// B's panels.
    pub panels_b: usize,
    /// B's panels that received a value from A (all of them, by design).
    pub mapped: usize,
    /// Largest distance from a B centroid to A's surface, m.
    pub max_distance_m: f64,
    /// Median distance from a B centroid to A's surface, m.
    pub median_distance_m: f64,
    /// Largest distance from an A centroid to B's surface, m: a part A
    /// has and B lacks lies off B's surface, not B's off A's (a review's
    /// body without its wing had read within 24 mm of the winged one).
    #[serde(default)]
    pub max_distance_a_m: f64,
    /// B's surface with no surface of A near it where A's own surface
    /// stayed put ([`new_in_b`]): a part added in B, m^2 (whole body).
    #[serde(default)]
    pub new_m2: f64,
    /// B panels farther than 2 % of the body length from A's surface
    /// (where the shapes differ, the mapped values mean little).
    pub far_panels: usize,
    /// Root mean square of Cp(B) - Cp(A), area-weighted over B.
    pub delta_cp_rms: f64,
    /// Largest |Cp(B) - Cp(A)|.
    pub delta_cp_max_abs: f64,
    /// Area-weighted mean of risk(B) - risk(A) over panels resolved in both.
    pub delta_risk_mean: f64,
    /// Area separated in B but not in A, m^2 (whole body).
    pub separation_appears_m2: f64,
    /// Area separated in A but not in B, m^2 (whole body).
    pub separation_disappears_m2: f64,
    /// Area separated in both, m^2 (whole body).
    pub separated_in_both_m2: f64,
    /// Where separation appears or disappears, that area as the stream
    /// sees it (each panel's area times the magnitude of its normal's
    /// component along B's free stream), m^2 (whole body).
    #[serde(default)]
    pub separation_change_frontal_m2: f64,
    /// Where separation appears or disappears, the net area the stream
    /// sees: the magnitude of the sum of each switched panel's area times
    /// its normal's component along B's free stream, counted positive where
    /// separation appears and negative where it disappears, m^2 (whole
    /// body). The drag that rests on the dead water's pressure moves with
    /// it; a separation line that jitters by a panel back and forth, as a
    /// rerun of the same shape with other scanner noise makes it, cancels
    /// out of it.
    #[serde(default)]
    pub separation_net_frontal_m2: f64,
    /// How far A's panels were moved to meet B's before mapping, m: zero,
    /// or the offset of B's body from A's in their files when that makes
    /// them coincide (`map_a_onto_b`: a ride height, another origin).
    #[serde(default)]
    pub shift_m: [f64; 3],
    /// Share of B's area within [`UNCHANGED_FRACTION`] of the body length
    /// of A's surface: where the shape did not change.
    #[serde(default)]
    pub unchanged_share: f64,
    /// 95th percentile (by area) of |Cp(B) - Cp(A)| on the unchanged
    /// surface: the panels' own noise.
    #[serde(default)]
    pub unchanged_delta_cp_p95: f64,
    /// The part of the drag difference that arises on the unchanged
    /// surface, counts: the flow's answer there to the change (the
    /// pressure field answers a change anywhere) plus panel noise.
    #[serde(default)]
    pub unchanged_drag_counts: f64,
    /// The same for the lift, kg at B's speed.
    #[serde(default)]
    pub unchanged_lift_kg: f64,
    /// B's area farther from A's surface than [`UNCHANGED_FRACTION`] of the
    /// body length and [`CHANGED_EDGES`] of a panel edge: where the shape
    /// changed, m^2 (whole body).
    #[serde(default)]
    pub changed_m2: f64,
    /// Of it, the area separated in A (carried onto B's panels) or in B,
    /// m^2: a change working on dead water. A part added in B counts by
    /// its own state only: A had no surface there (a review's new wing
    /// had taken the separated deck's state from 200 mm below).
    #[serde(default)]
    pub changed_separated_m2: f64,
    /// Of it, the area facing the ground (normal within 60 degrees of
    /// down) in the lowest [`UNDERBODY_HEIGHT`] of the body, m^2: a change
    /// to the underbody.
    #[serde(default)]
    pub changed_underbody_m2: f64,
    /// Of the underbody's part, the area in the front [`NOSE_SHARE`] of
    /// the body's length, m^2: a device under the nose (a lip, a
    /// splitter, an air dam), which this model cannot assess.
    #[serde(default)]
    pub changed_under_nose_m2: f64,
    /// Of the changed area, the part facing along the stream (normal
    /// within 45 degrees of it, either way), m^2: a plate across the flow
    /// (a tailgate) rather than a part along it.
    #[serde(default)]
    pub changed_across_m2: f64,
    /// B's typical panel edge: that of an equilateral triangle of its
    /// median panel area, m.
    #[serde(default)]
    pub panel_edge_m: f64,
    /// How far B's surface must lie from A's to count as unchanged
    /// (within) or changed (beyond), m: the two margins above.
    #[serde(default)]
    pub margins_m: [f64; 2],
    /// The x range of B's changed panels' centroids, m (`None` where none
    /// changed).
    #[serde(default)]
    pub changed_x_m: Option<[f64; 2]>,
}

/// B's panels within this fraction of the body length of A's surface
/// (4.5 mm on a 4.5 m car) count as unchanged: above the sag of a panel's
/// chord on a curved surface (about 1-3 mm for 10 cm panels on car-like
/// curvature), below a design change worth comparing (our choice).
pub const UNCHANGED_FRACTION: f64 = 1e-3;

/// One side of the comparison.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct Side {
    /// Result folder.
    pub folder: String,
    /// Case name.
    pub case_name: String,
    /// Panels.
    pub panels: usize,
    /// Drag estimate C_D with its band.
    pub cd: f64,
    /// Low end of the drag band.
    pub cd_low: f64,
    /// High end of the drag band.
    pub cd_high: f64,
    /// Lift coefficient.
    pub cl: f64,
    /// Lift, kg.
    pub lift_kg: f64,
    /// Separated area, m^2.
    pub separated_area_m2: f64,
    /// Speed, m/s.
    pub speed: f64,
    /// Reference area its coefficients are on, m^2 (the drag difference
    /// in counts is taken on A's, [`Deltas::drag_counts`]: a review could
    /// not rebuild it from the two C_D without it).
    #[serde(default)]
    pub reference_area_m2: f64,
    /// Front- and rear-axle lift, kg (at its own speed, as `lift_kg`).
    #[serde(default)]
    pub front_axle_kg: f64,
    /// Rear-axle lift, kg.
    #[serde(default)]
    pub rear_axle_kg: f64,
    /// Side-force coefficient (the wind's axes, positive to the car's
    /// right; in a cross wind a rough figure, the run's notes say why).
    #[serde(default)]
    pub cs: f64,
    /// Yaw, degrees.
    #[serde(default)]
    pub yaw_deg: f64,
    /// The run's panel noise, when it measured one (`tuft run --noise`).
    #[serde(default)]
    pub panel_noise: Option<crate::noise::PanelNoise>,
}

/// `compare.json`.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct Comparison {
    /// `tuft` and its version.
    pub tool: String,
    /// The reference run.
    pub a: Side,
    /// The variant run.
    pub b: Side,
    /// B minus A.
    pub deltas: Deltas,
    /// Whether the drag difference stands out of the uncertainty.
    pub drag: DragVerdict,
    /// Surface differences on B's panels.
    pub surface: SurfaceDeltas,
    /// Things the reader must know (different speeds, panel counts...).
    pub notes: Vec<String>,
    /// Named regions both runs have (by name), A's and B's separation.
    pub regions: Vec<RegionChange>,
    /// The caution that goes with every number.
    pub caution: String,
}

/// One named region in both runs.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct RegionChange {
    /// The region's name.
    pub name: String,
    /// Separated share in A and in B.
    pub separated_fraction: [f64; 2],
    /// B minus A, percentage points of the region's area.
    pub delta_points: f64,
    /// The verdicts in A and in B.
    pub verdict: [String; 2],
    /// Each run's share, verdict and range over its sensitivity runs in
    /// few words ([`crate::region::RegionResult::short_words`]).
    #[serde(default)]
    pub words: [String; 2],
    /// Each run's slope of the region's surface, degrees below the
    /// horizontal ([`crate::region::RegionResult::slope_deg`]), where it
    /// faces up.
    #[serde(default)]
    pub slope_deg: [Option<f64>; 2],
    /// The region's area in A and in B, m^2.
    #[serde(default)]
    pub area_m2: [f64; 2],
}

impl RegionChange {
    /// Separated area in A and in B, m^2.
    fn separated_m2(&self) -> [f64; 2] {
        [0, 1].map(|k| self.area_m2[k] * self.separated_fraction[k])
    }

    /// Whether the region's own area differs by more than
    /// [`SEPARATED_AREA_SHIFT`] of the larger between the runs.
    fn area_moved(&self) -> bool {
        let [a, b] = self.area_m2;
        (a - b).abs() > SEPARATED_AREA_SHIFT * a.max(b)
    }
}

/// A region whose area differs between the runs by more than this
/// fraction of the larger, or whose separated area moves by as much of
/// it, is named by its separated area ([`largest_region_change`]; our
/// choice, as `VERDICT_NOISE` is for the share).
const SEPARATED_AREA_SHIFT: f64 = 0.05;

/// The regions both runs name, in A's order.
pub fn region_changes(
    a: &crate::summary::Summary,
    b: &crate::summary::Summary,
) -> Vec<RegionChange> {
    a.regions
        .iter()
        .filter_map(|ra| {
            let rb = b.regions.iter().find(|r| r.name == ra.name)?;
            Some(RegionChange {
                name: ra.name.clone(),
                separated_fraction: [ra.separated_fraction, rb.separated_fraction],
                delta_points: 100.0 * (rb.separated_fraction - ra.separated_fraction),
                verdict: [ra.verdict.clone(), rb.verdict.clone()],
                words: [ra.short_words(), rb.short_words()],
                slope_deg: [ra.slope_deg, rb.slope_deg],
                area_m2: [ra.area_m2, rb.area_m2],
            })
        })
        .collect()
}

/// Where two runs' named regions differ most in separated area, in words
/// ("on the boot deck, 66 % separated in A against 85 % in B"), among those whose
/// share moved by at least [`crate::region::VERDICT_NOISE`] (5 points) or
/// whose separated area moved by [`SEPARATED_AREA_SHIFT`] of the larger;
/// `None` when none did. A region whose own area changed is named by its
/// areas (a review's square-cut tail moved forward: the base, separated
/// all over in both, grew from 0.47 to 1.15 m^2, while the verdict named
/// the rear underbody, 26 against 17 %).
/// The two runs are called by `names` (A's, B's): in `collect`'s verdict
/// the leader is named first, and a review read "0.38 against 0.00" as
/// the leader's when it was the runner-up's.
fn largest_region_change(regions: &[RegionChange], [na, nb]: [&str; 2]) -> Option<String> {
    let moved_m2 = |r: &RegionChange| {
        let [a, b] = r.separated_m2();
        (b - a).abs()
    };
    regions
        .iter()
        .filter(|r| {
            r.delta_points.abs() >= 100.0 * crate::region::VERDICT_NOISE
                || moved_m2(r) > SEPARATED_AREA_SHIFT * r.area_m2[0].max(r.area_m2[1])
        })
        .max_by(|x, y| moved_m2(x).total_cmp(&moved_m2(y)))
        .map(|r| {
            let [fa, fb] = r.separated_fraction.map(|f| 100.0 * f);
            if r.area_moved() {
                let [a, b] = r.separated_m2();
                format!(
                    "on the {}, {a:.2} m^2 separated in {na} against {b:.2} m^2 in {nb}, {fa:.0} % \
                     against {fb:.0} % of it",
                    r.name
                )
            } else {
                format!(
                    "on the {}, {fa:.0} % separated in {na} against {fb:.0} % in {nb}",
                    r.name
                )
            }
        })
}

/// `tuft compare`.
pub fn run(args: &CompareArgs) -> Result<ExitCode> {
    crate::run::set_threads(args.threads)?;
    // One folder named twice compares a run with itself: every difference
    // zero, which reads as "no change" rather than as a slip.
    if let (Ok(pa), Ok(pb)) = (args.a.canonicalize(), args.b.canonicalize()) {
        anyhow::ensure!(
            pa != pb,
            "{} and {} are the same result folder: name two runs to compare",
            args.a.display(),
            args.b.display()
        );
    }
    let a = ResultFolder::read(&args.a)?;
    let b = ResultFolder::read(&args.b)?;
    let out = args.out.clone().unwrap_or_else(|| default_out(&a, &b));
    // The folder or, before it exists, its nearest existing parent (a
    // review's `--out A/sub` wrote into run A).
    let existing = crate::outdir::nearest_existing(&out).unwrap_or(Path::new("."));
    if let Ok(po) = existing.canonicalize() {
        for input in [&args.a, &args.b] {
            anyhow::ensure!(
                !input.canonicalize().is_ok_and(|p| po.starts_with(p)),
                "{}: is one of the two results being compared (or lies inside it); choose another \
                 folder with --out",
                out.display()
            );
        }
    }
    let staging = Staging::new(&out, args.force, crate::outdir::Kind::Compare)?;
    let mesh_b = b.mesh()?;
    let mapping = map_a_onto_b(&a, &b);
    let cmp = comparison(&a, &b, &mapping);
    let json = serde_json::to_string_pretty(&cmp)? + "\n";
    std::fs::write(staging.file("compare.json"), json).context("compare.json")?;
    pictures::write(&staging, &a, &b, &mesh_b, &mapping, &cmp)
        .with_context(|| format!("writing pictures for {}", out.display()))?;
    staging.commit()?;
    if !args.quiet {
        print_comparison(&cmp, &out);
    } else if !cmp.notes.is_empty() {
        crate::run::quiet_finish_line(
            &out.display().to_string(),
            &crate::output::plural(cmp.notes.len(), "note", "notes"),
            &out.join("compare.html"),
        );
    }
    // Notes say what makes the two hard to compare: warnings to read.
    Ok(if cmp.notes.is_empty() {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(1)
    })
}

fn default_out(a: &ResultFolder, b: &ResultFolder) -> PathBuf {
    let parent = b.path.parent().unwrap_or(Path::new("."));
    parent.join(format!("compare-{}-vs-{}", a.label(), b.label()))
}

/// A's panels mapped onto B's centroids: where they lie, or moved by the
/// offset of B's least corner (nose end, left side, bottom) from A's when that makes the
/// two bodies coincide better (half or less of the area-weighted median
/// distance, our choice). A body raised by its ride height, or exported
/// from another origin, had been compared panel by panel with the surface
/// 20 mm below it, and the difference drawn over its nose; a change of
/// shape that moves the lowest point (a deeper splitter) leaves the rest
/// of the body in place, so its unshifted mapping stays the closer.
/// A half model mapped onto a whole body brings its mirror image, each
/// image panel standing for its own (a review's half-model run against
/// the whole body of the same file had read the other half as reshaped,
/// 52 % of B).
pub fn map_a_onto_b(a: &ResultFolder, b: &ResultFolder) -> Mapping {
    let mirrored = a_mirrored(a, b);
    let n = a.panels.len();
    let map = |shift: nalgebra::Vector3<f64>| {
        let src: Vec<SourcePanel> = source_panels(&a.panels, mirrored)
            .into_iter()
            .map(|p| SourcePanel {
                centroid: p.centroid + shift,
                ..p
            })
            .collect();
        let targets: Vec<_> = b.panels.iter().map(|p| (p.centroid, p.normal)).collect();
        // ResultFolder::read refuses a folder without panels, so A is not empty.
        let mut m = map_nearest(&src, &targets).unwrap_or(Mapping {
            source: Vec::new(),
            distance: Vec::new(),
            weights: Vec::new(),
            shift,
        });
        m.shift = shift;
        // An image panel's values are its own panel's.
        for j in &mut m.source {
            *j %= n;
        }
        for w in &mut m.weights {
            for (j, _) in w.iter_mut() {
                *j %= n;
            }
        }
        m
    };
    let in_place = map(nalgebra::Vector3::zeros());
    let (mut a_low, a_high) = centroid_bounds(a);
    if mirrored {
        a_low.y = -a_high.y;
    }
    let shift = centroid_bounds(b).0 - a_low;
    if shift.norm() <= 1e-9 * b.summary.reference.length_m.max(1.0) {
        return in_place;
    }
    let moved = map(shift);
    let median = |m: &Mapping| {
        let pairs = m
            .distance
            .iter()
            .copied()
            .zip(b.panels.iter().map(|p| p.area));
        area_quantile(pairs.collect(), 0.5)
    };
    if median(&moved) <= 0.5 * median(&in_place) {
        moved
    } else {
        in_place
    }
}

/// A note when one run is a half model and the other a whole body: the
/// same shape solved both ways differs beyond the panel noise (a review's
/// pickup: 9 to 22 counts, half against whole, tailgate up and off), and
/// nothing had said one was a half model.
fn half_and_whole_note(a: &crate::summary::Summary, b: &crate::summary::Summary) -> Option<String> {
    let (ha, hb) = (a.mesh.symmetry_plane, b.mesh.symmetry_plane);
    (ha != hb).then(|| {
        let [half, whole] = if ha { ["A", "B"] } else { ["B", "A"] };
        format!(
            "{half} was solved as a half model and {whole} as a whole body ({half}'s mirror image stands \
             for the other half here): the two solves differ in how the centre plane is panelled, and \
             a whole body's separated flow can drift to one side, so the same shape run both ways \
             differs by more than the panel noise (a test pickup: 9 to 22 counts); compare \
             variants run the same way"
        )
    })
}

/// Whether A is a half model and B a whole body: A's mirror image then
/// stands for B's other half.
pub fn a_mirrored(a: &ResultFolder, b: &ResultFolder) -> bool {
    a.summary.mesh.symmetry_plane && !b.summary.mesh.symmetry_plane
}

/// The least and the greatest corner of a run's panel centroids.
fn centroid_bounds(r: &ResultFolder) -> (nalgebra::Vector3<f64>, nalgebra::Vector3<f64>) {
    r.panels.iter().fold(
        (
            nalgebra::Vector3::repeat(f64::INFINITY),
            nalgebra::Vector3::repeat(f64::NEG_INFINITY),
        ),
        |(lo, hi), p| (lo.inf(&p.centroid.coords), hi.sup(&p.centroid.coords)),
    )
}

/// The area-weighted `q` quantile of (value, area) pairs (0 for none).
fn area_quantile(mut pairs: Vec<(f64, f64)>, q: f64) -> f64 {
    pairs.sort_by(|x, y| x.0.total_cmp(&y.0));
    let total: f64 = pairs.iter().map(|p| p.1).sum();
    let mut seen = 0.0;
    pairs
        .iter()
        .find(|(_, a)| {
            seen += a;
            seen >= q * total
        })
        .map_or(0.0, |(v, _)| *v)
}

fn side(r: &ResultFolder) -> Side {
    let s = &r.summary;
    Side {
        folder: r.path.display().to_string(),
        case_name: s.case_name.clone(),
        panels: s.mesh.panels,
        cd: s.coefficients.drag,
        cd_low: s.drag_estimate.cd_low,
        cd_high: s.drag_estimate.cd_high,
        cl: s.coefficients.lift,
        lift_kg: s.lift_kg.total,
        separated_area_m2: s.separation.area_m2,
        speed: speed_of(s),
        reference_area_m2: s.reference.area_m2,
        front_axle_kg: s.lift_kg.front_axle,
        rear_axle_kg: s.lift_kg.rear_axle,
        cs: s.coefficients.side,
        yaw_deg: yaw_of(s),
        panel_noise: s.panel_noise.clone(),
    }
}

/// Free-stream speed of a run, from its case.
/// A run's speed, m/s (NaN when not recorded).
pub fn speed_of(s: &crate::summary::Summary) -> f64 {
    s.flow("speed").unwrap_or(f64::NAN)
}

/// A run's yaw angle, degrees (0 when not recorded).
pub fn yaw_of(s: &crate::summary::Summary) -> f64 {
    s.flow("yaw").unwrap_or(0.0)
}

/// The unit vector along a run's wind, `(cos yaw, sin yaw, 0)`.
fn wind_direction(s: &crate::summary::Summary) -> nalgebra::Vector3<f64> {
    let (sin, cos) = yaw_of(s).to_radians().sin_cos();
    nalgebra::Vector3::new(cos, sin, 0.0)
}

/// Whether two runs are at different speeds (beyond rounding).
pub fn speeds_differ(a: &crate::summary::Summary, b: &crate::summary::Summary) -> bool {
    let (va, vb) = (speed_of(a), speed_of(b));
    (va - vb).abs() > 1e-9 * va.abs().max(1.0)
}

/// Whether two runs are at different yaw angles (beyond rounding).
pub fn yaws_differ(a: &crate::summary::Summary, b: &crate::summary::Summary) -> bool {
    (yaw_of(a) - yaw_of(b)).abs() > 1e-9
}

/// q_B/q_A when the two runs' dynamic pressures differ by more than a
/// part in a million (other speeds or densities), `None` otherwise or
/// when either is unknown.
pub fn pressure_factor(a: &crate::summary::Summary, b: &crate::summary::Summary) -> Option<f64> {
    let (qa, qb) = (a.dynamic_pressure_pa, b.dynamic_pressure_pa);
    (qa > 0.0 && qb > 0.0 && (qa - qb).abs() > 1e-6 * qa).then_some(qb / qa)
}

/// Headline differences, B minus A: coefficients as they are (B's drag on
/// A's reference area when the areas differ, [`common_area`]), forces and
/// kg with A's taken at B's dynamic pressure ([`pressure_factor`]).
pub fn deltas(a: &crate::summary::Summary, b: &crate::summary::Summary) -> Deltas {
    let (ka, kb) = (&a.coefficients, &b.coefficients);
    let k = area_factor(a, b);
    let scaled = pressure_factor(a, b);
    let q = scaled.unwrap_or(1.0);
    let kg_per_cl =
        b.dynamic_pressure_pa * b.reference.area_m2 / tuft_solver::loads::STANDARD_GRAVITY;
    let builtin_kg = verdict::LIFT_NOISE_CL * kg_per_cl;
    let paired = matched::matched(a, b).map(|m| m.lift_kg);
    Deltas {
        drag_counts: 1000.0 * (k * kb.drag - ka.drag),
        drag_pressure_counts: 1000.0 * (k * kb.drag_pressure - ka.drag_pressure),
        drag_friction_counts: 1000.0 * (k * kb.drag_friction - ka.drag_friction),
        drag_force_n: b.drag_estimate.force_n - q * a.drag_estimate.force_n,
        lift_coefficient: kb.lift - ka.lift,
        side_coefficient: kb.side - ka.side,
        lift_kg: b.lift_kg.total - q * a.lift_kg.total,
        front_axle_kg: b.lift_kg.front_axle - q * a.lift_kg.front_axle,
        rear_axle_kg: b.lift_kg.rear_axle - q * a.lift_kg.rear_axle,
        a_loads_scaled_by: scaled,
        lift_noise_kg: match &paired {
            Some(d) => builtin_kg.max(crate::noise::spread(d.iter().copied())),
            None => lift_floor_cl([a.lift_spread(), b.lift_spread()]) * kg_per_cl,
        },
        lift_floor_kg: builtin_kg,
        blunt_separated_percent: {
            let most = 100.0 * a.separation.fraction.max(b.separation.fraction);
            (paired.is_none()
                && a.lift_spread().is_none()
                && b.lift_spread().is_none()
                && most > BLUNT_LIFT_PERCENT)
                .then_some(most)
        },
        matched_lift_kg: paired,
        separated_area_m2: b.separation.area_m2 - a.separation.area_m2,
        separated_percent_points: 100.0 * (b.separation.fraction - a.separation.fraction),
    }
}

/// Everything `compare.json` holds.
pub fn comparison(a: &ResultFolder, b: &ResultFolder, mapping: &Mapping) -> Comparison {
    comparison_named(a, b, mapping, ["A", "B"])
}

/// [`comparison`] with the drag verdict's text calling the two runs by
/// `names` (A's, B's; [`drag_verdict_named`]).
pub fn comparison_named(
    a: &ResultFolder,
    b: &ResultFolder,
    mapping: &Mapping,
    names: [&str; 2],
) -> Comparison {
    let surface = surface_deltas(a, b, mapping);
    // The notes that say the drag difference rests on the separation
    // model: the separated regions, or the underbody's share, moved (a
    // diffuser's stall moves the base pressure).
    let separation: Vec<String> = [
        sides_note(&a.summary, &b.summary),
        corner_note(&a.summary, &b.summary),
        separation_note(&a.summary, &b.summary, &surface),
        underbody_note(&a.summary, &b.summary, &surface),
        dead_water_change_note(&surface),
    ]
    .into_iter()
    .flatten()
    .collect();
    let slope = slope_note(&a.summary, &b.summary, surface.changed_x_m);
    let rims = rim_note(&a.summary, &b.summary, &surface);
    let doubt = if !separation.is_empty() {
        Some(ModelDoubt::Separation)
    } else if rims.is_some() {
        Some(match rim_place(&a.summary, &b.summary, &surface) {
            RimPlace::Reaches(_) => ModelDoubt::RimsMoved,
            RimPlace::Clear(..) | RimPlace::Unknown => ModelDoubt::Rims,
        })
    } else {
        slope.as_ref().map(|_| ModelDoubt::RearSlope)
    };
    let model_notes: Vec<String> = separation.into_iter().chain(rims).chain(slope).collect();
    let regions = region_changes(&a.summary, &b.summary);
    let place = largest_region_change(&regions, names);
    let mut drag = drag_verdict_named(
        &a.summary,
        &b.summary,
        (
            doubt,
            place.as_deref(),
            (surface.changed_m2 > 0.0).then_some(surface.unchanged_drag_counts),
        ),
        names,
    );
    dead_change_verdict(&surface, &mut drag);
    let scale = scale_note(&a.summary, &b.summary);
    if let Some(n) = &scale {
        withhold(&mut drag, format!("{NOT_COMPARABLE_WORDS}: {n}"));
    }
    // A run whose loads rest on a surface defect (a review's rear spats:
    // +196.1 counts, 1,024 of them the hold's) is no side of a comparison.
    let broken: Vec<&str> = [(&a.summary, names[0]), (&b.summary, names[1])]
        .into_iter()
        .filter(|(s, _)| crate::pipeline::loads_broken(&s.warnings))
        .map(|(_, n)| n)
        .collect();
    if !broken.is_empty() {
        let whose: Vec<String> = broken.iter().map(|n| format!("{n}'s")).collect();
        withhold(
            &mut drag,
            format!(
                "{NOT_USABLE_WORDS}: {} loads are not usable, resting on a defect of the surface (see {} \
                 warning: a fin or a slot thinner than the panels); neither the drag nor the lift \
                 difference means anything",
                whose.join(" and "),
                if broken.len() == 1 { "its" } else { "their" }
            ),
        );
    }
    // Two ride heights as well as the change: said in the verdict itself
    // (a review's variant exported 20 mm higher read "24.2 counts lower",
    // the clearance in the second of five notes).
    // Not where the ride height is the whole change (B's body, moved onto
    // A's, changed nowhere: a ride-height study).
    if scale.is_some() {
        // Another size: its ride height is the scale's, not a change.
    } else if let Some(words) =
        floors_apart_words(&a.summary, &b.summary, names[1]).filter(|_| surface.changed_m2 > 0.0)
    {
        drag.text += &format!("; {words}, so the difference mixes the ride height with the change");
    } else if let Some((ca, cb)) = clearances_apart(&a.summary, &b.summary)
        && surface.changed_m2 > 0.0
    {
        drag.text += &format!(
            "; {} also stands {:.0} mm {} than {} ({:.0} against {:.0} mm of ground clearance), so the \
             difference mixes the ride height with the change",
            names[1],
            1000.0 * (cb - ca).abs(),
            if cb > ca { "higher" } else { "lower" },
            names[0],
            1000.0 * cb,
            1000.0 * ca
        );
    }
    let mut notes = notes(a, b, &surface, model_notes);
    notes.splice(0..0, scale);
    Comparison {
        tool: format!("tuft {}", env!("CARGO_PKG_VERSION")),
        a: side(a),
        b: side(b),
        deltas: deltas(&a.summary, &b.summary),
        drag,
        notes,
        surface,
        regions,
        caution: crate::summary::CAUTION.into(),
    }
}

/// How the verdict of two runs of another size begins.
const NOT_COMPARABLE_WORDS: &str = "not comparable as two shapes";

/// How the verdict of a pair with a run whose loads are not usable begins.
const NOT_USABLE_WORDS: &str = "not assessable, a run's loads unusable";

/// Name no winner, for the reason `text` gives in place of the verdict's.
fn withhold(drag: &mut DragVerdict, text: String) {
    drag.resolved = false;
    drag.leaning.clear();
    drag.doubt.clear();
    drag.text = text;
}

/// Length ratio between two runs' reference lengths beyond which they are
/// not two shapes of one car but another size, a scale model against the
/// car (our choice: variants of one car differ by far less).
pub const SCALE_RATIO: f64 = 1.5;

/// A note when the two runs' reference lengths differ by more than
/// [`SCALE_RATIO`]: their forces, drag areas and kg differ by the size,
/// and the panel-by-panel differences set one body on the other (a
/// review's 1:4 coupe against the car at the same Reynolds number, equal
/// coefficients, read +2351.9 counts, separation disappearing on 14 m^2
/// and B 90 mm higher).
pub fn scale_note(a: &crate::summary::Summary, b: &crate::summary::Summary) -> Option<String> {
    let (la, lb) = (a.reference.length_m, b.reference.length_m);
    let ratio = la.max(lb) / la.min(lb).max(f64::MIN_POSITIVE);
    (ratio > SCALE_RATIO).then(|| {
        format!(
            "B's reference length is {:.2} times A's ({} against {} m), a scale model against a car or \
             two different bodies: compare their coefficients at their Reynolds numbers (A {:.2} million, \
             B {:.2} million: C_D {:.3} against {:.3}, C_L {:.3} against {:.3}), not their forces, drag \
             areas, kg or the pictures' differences, which set one body on the other",
            lb / la.max(f64::MIN_POSITIVE),
            crate::output::html::significant(lb, 3),
            crate::output::html::significant(la, 3),
            a.reynolds_number / 1e6,
            b.reynolds_number / 1e6,
            a.coefficients.drag,
            b.coefficients.drag,
            a.coefficients.lift,
            b.coefficients.lift
        )
    })
}

/// Per-panel values of B and of A mapped onto B.
pub struct MappedFields {
    /// Cp(B) - Cp(A) per B panel (A interpolated to first order).
    pub delta_cp: Vec<f64>,
    /// risk(B) - risk(A), NaN where either is unresolved.
    pub delta_risk: Vec<f64>,
    /// A's state at each B panel.
    pub state_a: Vec<PanelState>,
    /// B's panels that A has no surface for ([`new_in_b`]).
    pub new_in_b: Vec<bool>,
    /// Largest distance from an A centroid to B's surface, m
    /// ([`a_to_b_distance`]).
    pub max_distance_a_m: f64,
}

/// A's fields on B's panels and their differences.
pub fn mapped_fields(a: &ResultFolder, b: &ResultFolder, mapping: &Mapping) -> MappedFields {
    let on_b = mapping.pull(&a.panels);
    let field = |f: fn(&folder::PanelRow) -> f64| {
        mapping.interpolate(&a.panels.iter().map(f).collect::<Vec<_>>())
    };
    let (cp_a, risk_a) = (field(|p| p.cp), field(|p| p.risk));
    let delta_cp = b
        .panels
        .iter()
        .zip(&cp_a)
        .map(|(pb, ca)| pb.cp - ca)
        .collect();
    let resolved = |s: PanelState| s != PanelState::Unresolved;
    let delta_risk = b
        .panels
        .iter()
        .zip(on_b.iter().zip(&risk_a))
        .map(|(pb, (pa, ra))| {
            if resolved(pb.state) && resolved(pa.state) {
                pb.risk - ra
            } else {
                f64::NAN
            }
        })
        .collect();
    let a_off_b = a_to_b_distance(a, b, mapping);
    MappedFields {
        delta_cp,
        delta_risk,
        state_a: on_b.iter().map(|p| p.state).collect(),
        new_in_b: new_in_b(mapping, &a_off_b, changed_margin(b).1),
        max_distance_a_m: a_off_b.iter().copied().fold(0.0, f64::max),
    }
}

fn surface_deltas(a: &ResultFolder, b: &ResultFolder, mapping: &Mapping) -> SurfaceDeltas {
    let f = mapped_fields(a, b, mapping);
    let area: Vec<f64> = b.panels.iter().map(|p| p.area).collect();
    let total: f64 = area.iter().sum();
    let halves = b.halves();
    let sep = |s: PanelState| s == PanelState::Separated;
    let mut out = SurfaceDeltas {
        panels_b: b.panels.len(),
        mapped: mapping.source.len(),
        shift_m: mapping.shift.into(),
        ..SurfaceDeltas::default()
    };
    let mut dist = mapping.distance.clone();
    dist.sort_by(f64::total_cmp);
    out.max_distance_m = dist.last().copied().unwrap_or(0.0);
    out.median_distance_m = dist.get(dist.len() / 2).copied().unwrap_or(0.0);
    out.max_distance_a_m = f.max_distance_a_m;
    // A part added in B has no A state to set against its own.
    let new = &f.new_in_b;
    let far = 0.02 * b.summary.reference.length_m.max(f64::MIN_POSITIVE);
    out.far_panels = mapping.distance.iter().filter(|&&d| d > far).count();
    let (mut sq, mut risk, mut risk_area) = (0.0, 0.0, 0.0);
    let mut net = 0.0;
    let stream = wind_direction(&b.summary);
    for (i, pb) in b.panels.iter().enumerate() {
        let d = f.delta_cp[i];
        sq += area[i] * d * d;
        out.delta_cp_max_abs = out.delta_cp_max_abs.max(d.abs());
        if f.delta_risk[i].is_finite() {
            risk += area[i] * f.delta_risk[i];
            risk_area += area[i];
        }
        if new[i] {
            continue;
        }
        if sep(f.state_a[i]) != sep(pb.state) {
            let along = halves * area[i] * pb.normal.dot(&stream);
            out.separation_change_frontal_m2 += along.abs();
            net += if sep(pb.state) { along } else { -along };
        }
        let slot = match (sep(f.state_a[i]), sep(pb.state)) {
            (false, true) => &mut out.separation_appears_m2,
            (true, false) => &mut out.separation_disappears_m2,
            (true, true) => &mut out.separated_in_both_m2,
            (false, false) => continue,
        };
        *slot += halves * area[i];
    }
    out.separation_net_frontal_m2 = net.abs();
    out.delta_cp_rms = if total > 0.0 {
        (sq / total).sqrt()
    } else {
        0.0
    };
    out.delta_risk_mean = if risk_area > 0.0 {
        risk / risk_area
    } else {
        0.0
    };
    // Drag counts on the area the headline's are on (A's when the areas
    // differ, [`common_area`]).
    let reference = common_area(&a.summary, &b.summary).unwrap_or(b.summary.reference.area_m2);
    let stream_a = wind_direction(&a.summary);
    unchanged_noise(
        b,
        reference,
        mapping,
        &f.delta_cp,
        [&stream_a, &stream],
        &mut out,
    );
    changed_surface(b, mapping, &f.state_a, new, &mut out);
    out
}

/// B's typical panel edge and the distance from A's surface beyond which
/// a B panel counts as changed (the larger of [`UNCHANGED_FRACTION`] of
/// the length and [`CHANGED_EDGES`] of an edge), m.
fn changed_margin(b: &ResultFolder) -> (f64, f64) {
    let edge = tuft_mesh::quality::typical_edge(b.panels.iter().map(|p| p.area)).unwrap_or(0.0);
    let near = (UNCHANGED_FRACTION * b.summary.reference.length_m).max(CHANGED_EDGES * edge);
    (edge, near)
}

/// Distance from each of A's panels (moved as `mapping` moved them) to
/// B's surface, m: the other way round from [`Mapping::distance`], so
/// that a part A has and B lacks shows (B's mirror images stand for its
/// other half where B is a half model and A a whole body).
fn a_to_b_distance(a: &ResultFolder, b: &ResultFolder, mapping: &Mapping) -> Vec<f64> {
    let images = b.summary.mesh.symmetry_plane && !a.summary.mesh.symmetry_plane;
    let src = source_panels(&b.panels, images);
    let targets: Vec<_> = a
        .panels
        .iter()
        .map(|p| (p.centroid + mapping.shift, p.normal))
        .collect();
    map_nearest(&src, &targets).map_or_else(|| vec![0.0; a.panels.len()], |m| m.distance)
}

/// A run's panels as sources of a mapping, followed by their mirror
/// images in y = 0 when `mirrored` (a half model standing for a whole
/// body's other half).
fn source_panels(panels: &[folder::PanelRow], mirrored: bool) -> Vec<SourcePanel> {
    let real = panels.iter().map(|p| SourcePanel {
        centroid: p.centroid,
        normal: p.normal,
        area: p.area,
    });
    let images = panels.iter().filter(|_| mirrored).map(|p| SourcePanel {
        centroid: nalgebra::Point3::new(p.centroid.x, -p.centroid.y, p.centroid.z),
        normal: nalgebra::Vector3::new(p.normal.x, -p.normal.y, p.normal.z),
        area: p.area,
    });
    real.chain(images).collect()
}

/// B's panels beyond `near` of A's surface whose nearest panel of A lies
/// within `near` of B's own (`a_off_b`, [`a_to_b_distance`]): a part added
/// in B, where A had no surface, rather than A's surface moved (a raised
/// lid's panels find A's lid, itself off B's surface). A's values carried
/// there belong to the surface beside it (a wing over a deck took the
/// deck's).
fn new_in_b(mapping: &Mapping, a_off_b: &[f64], near: f64) -> Vec<bool> {
    mapping
        .distance
        .iter()
        .zip(&mapping.source)
        .map(|(&d, &j)| d > near && a_off_b.get(j).is_some_and(|&e| e <= near))
        .collect()
}

/// Distance from A's surface, in B's typical panel edges, beyond which a
/// B panel counts as changed for [`SurfaceDeltas::changed_m2`] (when it
/// exceeds [`UNCHANGED_FRACTION`] of the length): two panellings of one
/// curved surface differ by their chords' sag, so at 4.3 mm a review's
/// two wrapped scans differing only in a roof spoiler read 4 to 9 % of
/// their surface changed, the underbody among it (our choice).
pub const CHANGED_EDGES: f64 = 0.25;

/// Share of the body's height, from its lowest panel, within which a
/// changed panel facing down counts as a change to the underbody (a
/// car's floor and diffuser ramp lie in the lowest third; our choice).
pub const UNDERBODY_HEIGHT: f64 = 0.3;

/// Share of the body's length, from its front, within which a changed
/// underbody panel counts as under the nose
/// ([`SurfaceDeltas::changed_under_nose_m2`]; our choice: a bumper and
/// its lip lie in the first tenth of a car, 0.15 leaves room for a long
/// overhang).
pub const NOSE_SHARE: f64 = 0.15;

/// Share of the changed area under the nose from which the change is
/// taken for a device there ([`nose_device_note`]; our choice: a lip's
/// underside is about a third of its surface).
pub const NOSE_DEVICE_SHARE: f64 = 0.25;

/// Where the shape changed ([`SurfaceDeltas::changed_m2`]): how much of it
/// lies in dead water or faces the ground, and B's typical panel edge.
fn changed_surface(
    b: &ResultFolder,
    mapping: &Mapping,
    state_a: &[PanelState],
    new: &[bool],
    out: &mut SurfaceDeltas,
) {
    let (edge, near) = changed_margin(b);
    out.panel_edge_m = edge;
    out.margins_m = [UNCHANGED_FRACTION * b.summary.reference.length_m, near];
    let halves = b.halves();
    let sep = |s: PanelState| s == PanelState::Separated;
    // The underbody: facing down in the lowest [`UNDERBODY_HEIGHT`] of the
    // body (a spoiler's underside faces down too).
    let (low, high) = b
        .panels
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), p| {
            (l.min(p.centroid.z), h.max(p.centroid.z))
        });
    let floor_top = low + UNDERBODY_HEIGHT * (high - low);
    let front = b
        .panels
        .iter()
        .map(|p| p.centroid.x)
        .fold(f64::INFINITY, f64::min);
    let nose_end = front + NOSE_SHARE * b.summary.reference.length_m;
    let centroids: Vec<nalgebra::Point3<f64>> = b.panels.iter().map(|p| p.centroid).collect();
    let changed = clustered(
        &changed_panels(mapping, b.panels.len(), near),
        &centroids,
        LONE_REACH_EDGES * out.panel_edge_m,
    );
    for (i, pb) in b.panels.iter().enumerate() {
        if !changed[i] {
            continue;
        }
        let is_new = new.get(i).copied().unwrap_or(false);
        if is_new {
            out.new_m2 += halves * pb.area;
        }
        let x = pb.centroid.x;
        out.changed_x_m = Some(
            out.changed_x_m
                .map_or([x, x], |[lo, hi]| [lo.min(x), hi.max(x)]),
        );
        let area = halves * pb.area;
        out.changed_m2 += area;
        if sep(pb.state) || (!is_new && state_a.get(i).copied().is_some_and(sep)) {
            out.changed_separated_m2 += area;
        }
        if pb.normal.z < -crate::region::FACING_COS && pb.centroid.z < floor_top {
            out.changed_underbody_m2 += area;
            if pb.centroid.x < nose_end {
                out.changed_under_nose_m2 += area;
            }
        }
        if pb.normal.x.abs() > std::f64::consts::FRAC_1_SQRT_2 {
            out.changed_across_m2 += area;
        }
    }
}

/// A changed panel with no other changed panel's centroid within this
/// many panel edges of its own is the two panellings' difference, not a
/// change of shape (neighbours' centroids lie about 0.6 of an edge apart;
/// our choice). A review's two wrapped scans differing only in a roof
/// spoiler at the tail read "changed from x 0.81 m", lone panels re-cut
/// by the wrap along the body, some on the floor.
pub const LONE_REACH_EDGES: f64 = 1.5;

/// `changed` without its lone panels (see [`LONE_REACH_EDGES`]; `reach`
/// in metres; `centroids`, one per panel): the surface deltas and the
/// comparison sheets' outline both take the change from it.
pub(crate) fn clustered(
    changed: &[bool],
    centroids: &[nalgebra::Point3<f64>],
    reach: f64,
) -> Vec<bool> {
    // Changed centroids binned on a grid of `reach`: a neighbour within it
    // lies in the same cell or one of the 26 round it (two bodies apart
    // everywhere change every panel, up to 200,000).
    let cell = |p: &nalgebra::Point3<f64>| {
        let r = reach.max(f64::MIN_POSITIVE);
        [p.x, p.y, p.z].map(|v| (v / r).floor() as i64)
    };
    let mut grid: std::collections::HashMap<[i64; 3], Vec<usize>> =
        std::collections::HashMap::new();
    for (i, _) in changed.iter().enumerate().filter(|(_, c)| **c) {
        grid.entry(cell(&centroids[i])).or_default().push(i);
    }
    let mut out = vec![false; changed.len()];
    for (i, _) in changed.iter().enumerate().filter(|(_, c)| **c) {
        let p = centroids[i];
        let [x, y, z] = cell(&p);
        out[i] = (-1..=1).any(|dx| {
            (-1..=1).any(|dy| {
                (-1..=1).any(|dz| {
                    grid.get(&[x + dx, y + dy, z + dz]).is_some_and(|near| {
                        near.iter()
                            .any(|&j| j != i && (centroids[j] - p).norm() <= reach)
                    })
                })
            })
        });
    }
    out
}

/// B's panels that lie farther than `near` from A's surface (the changed
/// margin, [`SurfaceDeltas::margins_m`]'s second): where the shape changed.
pub fn changed_panels(mapping: &Mapping, panels: usize, near: f64) -> Vec<bool> {
    (0..panels)
        .map(|i| mapping.distance.get(i).is_some_and(|&d| d > near))
        .collect()
}

/// The differences on the surface that did not change (see
/// [`UNCHANGED_FRACTION`]): the flow's answer there to the change plus the
/// two panellings' noise (the two cannot be told apart from two runs).
/// Forces from
/// `-Cp n dA` (outward normals), on the reference area `reference` and
/// B's dynamic pressure, whole body; each run's drag along its own wind
/// (`streams`, A's and B's: a review's runs at 8 and -8 degrees, all
/// surface unchanged, read +11.4 counts there, each run's Cp taken along
/// B's wind, against the headline's 0.0).
fn unchanged_noise(
    b: &ResultFolder,
    reference: f64,
    mapping: &Mapping,
    delta_cp: &[f64],
    [stream_a, stream_b]: [&nalgebra::Vector3<f64>; 2],
    out: &mut SurfaceDeltas,
) {
    let s = &b.summary;
    let near = UNCHANGED_FRACTION * s.reference.length_m;
    let halves = b.halves();
    let (mut area, mut total, mut drag, mut lift) = (0.0, 0.0, 0.0, 0.0);
    let mut spread = Vec::new();
    for (i, pb) in b.panels.iter().enumerate() {
        total += pb.area;
        if mapping.distance.get(i).is_none_or(|&d| d > near) || !delta_cp[i].is_finite() {
            continue;
        }
        area += pb.area;
        // B's Cp along B's wind less A's (mapped here) along A's.
        let cp_a = pb.cp - delta_cp[i];
        drag -=
            halves * (pb.cp * pb.normal.dot(stream_b) - cp_a * pb.normal.dot(stream_a)) * pb.area;
        lift -= halves * delta_cp[i] * pb.normal.z * pb.area;
        spread.push((delta_cp[i].abs(), pb.area));
    }
    let reference = reference.max(f64::MIN_POSITIVE);
    out.unchanged_share = if total > 0.0 { area / total } else { 0.0 };
    out.unchanged_drag_counts = 1000.0 * drag / reference;
    out.unchanged_lift_kg = lift * s.dynamic_pressure_pa / tuft_solver::loads::STANDARD_GRAVITY;
    out.unchanged_delta_cp_p95 = area_quantile(spread, 0.95);
}

/// Warnings about what makes the two runs hard to compare; `model_notes`
/// (the separation and underbody notes) come after the run settings'.
fn notes(
    a: &ResultFolder,
    b: &ResultFolder,
    surface: &SurfaceDeltas,
    model_notes: Vec<String>,
) -> Vec<String> {
    let (sa, sb) = (&a.summary, &b.summary);
    let mut notes = Vec::new();
    let (va, vb) = (speed_of(sa), speed_of(sb));
    if speeds_differ(sa, sb) {
        notes.push(format!(
            "the runs are at different speeds ({} and {}): loads in kg scale with the square of the \
             speed, so the force and kg differences take A's at B's dynamic pressure (A's times {:.3}); \
             the coefficient differences need no such factor",
            crate::output::speed_words(va),
            crate::output::speed_words(vb),
            pressure_factor(sa, sb).unwrap_or(1.0)
        ));
    }
    let (ya, yb) = (yaw_of(sa), yaw_of(sb));
    if yaws_differ(sa, sb) {
        notes.push(format!(
            "the runs are at different yaw angles ({ya} and {yb} degrees)"
        ));
    }
    if let Some(n) = half_and_whole_note(sa, sb) {
        notes.push(n);
    }
    // A half model's panels stand for twice as many on the whole body.
    let whole = |s: &crate::summary::Summary| {
        s.mesh.panels as f64 * if s.mesh.symmetry_plane { 2.0 } else { 1.0 }
    };
    let (na, nb) = (whole(sa), whole(sb));
    if (na - nb).abs() > 0.05 * na.max(nb) {
        // In the case's own terms (geometry.panels is the modelled half's)
        // when both are half models, as `collect` gives them.
        let counts = if sa.mesh.symmetry_plane && sb.mesh.symmetry_plane {
            format!(
                "{} and {} panels of the modelled half",
                sa.mesh.panels, sb.mesh.panels
            )
        } else {
            format!("{na:.0} and {nb:.0} on the whole body")
        };
        let settled: Vec<String> = [("A", sa), ("B", sb)]
            .iter()
            .filter_map(|(which, s)| {
                Some(crate::pipeline::solved_on_words(
                    which,
                    s.mesh.panels,
                    &s.panels_instead()?,
                ))
            })
            .collect();
        let advice = if settled.is_empty() {
            "compare variants at about the same panel count".to_owned()
        } else {
            settled.join("; ")
        };
        notes.push(format!(
            "the panel counts differ ({counts}): part of every difference is discretisation error; {advice}"
        ));
    }
    notes.extend(resolution_note(
        surface,
        sa.panel_noise.is_some() && sb.panel_noise.is_some(),
        ["A", "B"],
    ));
    notes.extend(short_change_note(surface, ["A", "B"]));
    notes.extend(nose_device_note(surface));
    if let Some(n) = clearance_note(sa, sb) {
        notes.push(n);
    }
    notes.extend(edge_hold_note(sa, sb));
    notes.extend(region_cover_notes(sa, sb));
    if let Some(n) = reference_note(sa, sb) {
        notes.push(n);
    }
    if let Some(n) = wrap_note(sa, sb) {
        notes.push(n);
    }
    if let Some(n) = coarse_note(sa, sb) {
        notes.push(n);
    }
    notes.extend(model_notes);
    // First: it says how far to trust the notes after it.
    if let Some(n) = offset_note(a, b, surface) {
        notes.insert(0, n);
    }
    notes
}

/// A note when B's body lies elsewhere in its file than A's. When moving
/// A onto B made them coincide (`SurfaceDeltas::shift_m`: a ride height,
/// an STL exported from another origin), it says by how much; otherwise,
/// when B's body is A's size but lies elsewhere and little of it meets
/// A's surface (the two STLs were exported in different axes, one from the
/// nose and one from the front axle, say), every difference would compare
/// unrelated panels, and it says so. Same size: the panel centroids'
/// extents agree within 5 % on every axis; elsewhere: their centres lie
/// more than 2 % of the length apart; little: under half of B's surface
/// unchanged (our choices).
fn offset_note(a: &ResultFolder, b: &ResultFolder, surface: &SurfaceDeltas) -> Option<String> {
    // To the millimetre shown, without a "-0.000".
    let [dx, dy, dz] = surface.shift_m.map(|d| (d * 1000.0).round() / 1000.0 + 0.0);
    if surface.shift_m != [0.0; 3] {
        return Some(format!(
            "B's body lies ({dx:+.3}, {dy:+.3}, {dz:+.3}) m from A's in its file: compare moved A's by \
             as much, where the two coincide ({:.0} % of B's surface then meets A's), so the pictures \
             and the separation notes compare the same places on the body",
            100.0 * surface.unchanged_share
        ));
    }
    let ((la, ha), (lb, hb)) = (centroid_bounds(a), centroid_bounds(b));
    let size = |k: usize, lo: &nalgebra::Vector3<f64>, hi: &nalgebra::Vector3<f64>| hi[k] - lo[k];
    let same_size = (0..3).all(|k| {
        let (sa, sb) = (size(k, &la, &ha), size(k, &lb, &hb));
        (sa - sb).abs() <= 0.05 * sa.max(sb)
    });
    let shift: Vec<f64> = (0..3)
        .map(|k| 0.5 * (lb[k] + hb[k]) - 0.5 * (la[k] + ha[k]))
        .collect();
    let apart = shift.iter().map(|d| d * d).sum::<f64>().sqrt() > 0.02 * size(0, &la, &ha);
    (same_size && apart && surface.unchanged_share < 0.5).then(|| {
        format!(
            "B's body is the size of A's but lies ({:+.3}, {:+.3}, {:+.3}) m from it, and only {:.0} % of \
             B's surface meets A's: compare maps A onto B by position, so its pictures and the separation \
             notes compare unrelated panels (the coefficients do not depend on where a body lies); export \
             both STLs in the same axes (the same origin) and run them again",
            shift[0],
            shift[1],
            shift[2],
            100.0 * surface.unchanged_share
        )
    })
}

/// A region's area may differ between the runs by this share of the
/// larger before the note that the region covers other surface (our
/// choice: the demo's rear window, sloped 22 and 38 degrees in one box,
/// differs by about 15 %, a change of slope of the same part).
pub const REGION_AREA_SHIFT: f64 = 0.3;

/// Whether one region's areas in two runs lie more than
/// [`REGION_AREA_SHIFT`] of the larger apart: its box covers other
/// surface (`compare`'s note for two runs, `collect`'s across variants).
pub fn region_areas_differ(a: f64, b: f64) -> bool {
    areas_apart(a, b, REGION_AREA_SHIFT)
}

/// Whether `a` and `b` lie more than `share` of the larger apart.
pub fn areas_apart(a: f64, b: f64, share: f64) -> bool {
    let larger = a.max(b);
    larger > 0.0 && (a - b).abs() > share * larger
}

/// A region whose slope reads another kind of surface is taken as
/// covering other surface when its area also moves by more than this
/// share of the larger; within it, the part in the box may have turned
/// ([`KIND_ONLY_WORDS`]; our choice: the coupe's boot-deck box with the
/// deck 0.2 m shorter gains 11 %, a review's spoiler box from 0 to 16
/// degrees of kick-up 3 %).
pub const KIND_AREA_SHIFT: f64 = 0.1;

/// What a region whose slope reads another kind of surface on about the
/// same area may be: the part in its box turned (the study itself: a
/// review's spoiler swept from 0 to 16 degrees of kick-up, its box drawn
/// round every angle, had been told to move the box), or another part
/// moved under the box (the coupe's deck 0.2 m shorter puts the window's
/// foot in the "boot deck" box, 11 % more area).
pub const KIND_ONLY_WORDS: &str = "if the part in the box is what the change turned, that is the \
     change itself; if another part moved under the box (the foot of a rear window into a boot deck's \
     box), the shares compare different parts of the body, and the box should move with the part";

/// What a region whose area alone moved (its surface of one kind) may be:
/// the part in its box grown or shrunk by the change (the study itself: a
/// review's saloon tail cut square further forward grew its base from
/// 0.47 to 1.15 m^2, in a box round every cut, and was told to move the
/// box), or other surface moved under the box.
pub const SIZE_ONLY_WORDS: &str = "if the part in the box grew or shrank with the change (a base as \
     the tail is cut shorter), that is the change itself; if other surface moved under the box, the \
     shares compare different parts of the body, and the box should move with the part";

/// A note for each named region that covers other surface in B than in A:
/// a region is a box fixed in x, y and z, and a change of shape can move
/// another part of the body under it (a review's shorter boot deck put the
/// foot of the rear window into the "boot deck" box, and compare reported
/// its share as the deck's change). Its area differs by more than
/// [`REGION_AREA_SHIFT`], or its slope reads another kind of surface
/// ([`crate::region::SurfaceKind`]: none, a deck, a slant) in each run
/// (the built-in coupe's "boot deck" box, with a 25-degree window and the
/// deck 0.2 m shorter, takes in the window's foot and reads a 24.5-degree
/// slant against 1.6; 0.1 m shorter it reads 4.1, still a deck, and is
/// not noted); a slope that changes within its kind is the design change
/// a rear-window or boot-lid study makes (a review's notchback deck read
/// 3.1, 1.6 and 0.3 degrees at three lid heights).
fn region_cover_notes(a: &crate::summary::Summary, b: &crate::summary::Summary) -> Vec<String> {
    let slope = |s: Option<f64>| s.map_or("none".to_owned(), |d| format!("{d:.0} degrees"));
    a.regions
        .iter()
        .filter_map(|ra| {
            let rb = b.regions.iter().find(|r| r.name == ra.name)?;
            let area = region_areas_differ(ra.area_m2, rb.area_m2);
            let kind = crate::region::SurfaceKind::of;
            let slopes = kind(ra.slope_deg) != kind(rb.slope_deg);
            if area && !slopes {
                Some(format!(
                    "the region \"{}\" covers {} surface in B than in A (area {:.2} against {:.2} m^2, \
                     slope {} in both): {SIZE_ONLY_WORDS}",
                    ra.name,
                    if rb.area_m2 > ra.area_m2 { "more" } else { "less" },
                    ra.area_m2,
                    rb.area_m2,
                    slope(ra.slope_deg),
                ))
            } else if area || (slopes && areas_apart(ra.area_m2, rb.area_m2, KIND_AREA_SHIFT)) {
                Some(format!(
                    "the region \"{}\" covers other surface in B than in A (area {:.2} against {:.2} m^2, \
                     slope {} against {}): its box stays where it is while the shape changes under it, \
                     so its change compares different parts of the body; move the box with the part",
                    ra.name,
                    ra.area_m2,
                    rb.area_m2,
                    slope(ra.slope_deg),
                    slope(rb.slope_deg)
                ))
            } else {
                slopes.then(|| {
                    format!(
                        "the region \"{}\" reads another kind of surface in B than in A on about the same \
                         area (slope {} against {}, area {:.2} against {:.2} m^2): {KIND_ONLY_WORDS}",
                        ra.name,
                        slope(ra.slope_deg),
                        slope(rb.slope_deg),
                        ra.area_m2,
                        rb.area_m2,
                    )
                })
            }
        })
        .collect()
}

/// What a change of ground clearance does to the lift in this model (after
/// "the lift across ride heights"; `collect` says it of a ride-height
/// sweep, `compare` of two clearances).
pub const UNDERBODY_LIFT_WORDS: &str = "moves mostly with the smooth underbody's suction, the least \
     certain part of the lift (a real underbody, with its wheels, roughness and cooling flow, sucks far \
     less): read its trend as this model's, and confirm with validated CFD or a tunnel";

/// A note when the two bodies stand at ground clearances more than
/// [`CLEARANCE_APART_M`] apart: both clearances, and what the lift
/// difference then rests on.
fn clearance_note(a: &crate::summary::Summary, b: &crate::summary::Summary) -> Option<String> {
    if let Some(words) = floors_apart_words(a, b, "B") {
        return Some(format!(
            "the floors stand at other heights ({words}): the lift across ride heights and rake \
             {UNDERBODY_LIFT_WORDS}"
        ));
    }
    clearances_apart(a, b).map(|(ca, cb)| {
        format!(
            "the ground clearances differ ({:.0} and {:.0} mm from the lowest point to the ground): the \
             lift across ride heights {UNDERBODY_LIFT_WORDS}",
            1000.0 * ca,
            1000.0 * cb
        )
    })
}

/// The least change of pitch, degrees, that `compare` names as a rake
/// change, with the floor at each axle (our choice: a 600-panel coupe
/// raised 20 mm without pitching read 0.1 degrees from its panels alone,
/// by an earlier median reading of the floor; 0.2 degrees is 9 mm over a
/// 2.5 m wheelbase).
pub const RAKE_CHANGE_DEG: f64 = 0.2;

/// A note when holding the suction beside sharp edges no surface
/// streamline crossed (`pipeline::hold_edge_spikes`) moved the two runs'
/// drag by amounts that differ by the noise floor or more: the difference
/// then rests on that rule (a review's roof box: nine panels on the bar
/// under it, held from Cp -88, moved its drag by 94 counts, more than the
/// box's whole 78-count increment, and compare had not said so).
fn edge_hold_note(a: &crate::summary::Summary, b: &crate::summary::Summary) -> Option<String> {
    let counts = |s: &crate::summary::Summary| s.edge_hold.as_ref().map_or(0.0, |h| h.drag_counts);
    let (da, db) = (counts(a), counts(b));
    ((db - da).abs() >= verdict::NOISE_COUNTS).then(|| {
        format!(
            "holding the suction beside sharp edges that no surface streamline crossed moved A's drag \
             by {da:+.0} counts and B's by {db:+.0} (each run's warning says where): {:+.0} counts of \
             the difference rest on that rule, not on a computed pressure",
            db - da
        )
    })
}

/// Where B's floor stands against A's at the axles, when both runs give
/// floor heights and their pitch differs by [`RAKE_CHANGE_DEG`] or more:
/// "B's floor 21 mm lower (80 against 101 mm) at the front axle and 22 mm
/// higher (124 against 102 mm) at the rear, pitched 1.0 degrees more nose
/// down" (a review's rake pair had read "26 mm lower" from the lowest
/// points, where the rear had risen).
fn floors_apart_words(
    a: &crate::summary::Summary,
    b: &crate::summary::Summary,
    b_name: &str,
) -> Option<String> {
    let (fa, fb) = (a.reference.floor_heights_m?, b.reference.floor_heights_m?);
    let (ra, rb) = (a.reference.rake_deg()?, b.reference.rake_deg()?);
    if (rb - ra).abs() < RAKE_CHANGE_DEG {
        return None;
    }
    let way = |x: f64, y: f64| {
        let d = 1000.0 * (y - x);
        if d.abs() < 0.5 {
            format!("unchanged ({:.0} mm)", 1000.0 * y)
        } else {
            format!(
                "{:.0} mm {} ({:.0} against {:.0} mm)",
                d.abs(),
                if d > 0.0 { "higher" } else { "lower" },
                1000.0 * y,
                1000.0 * x
            )
        }
    };
    let pitch = format!(
        ", pitched {:.1} degrees more nose {}",
        (rb - ra).abs(),
        if rb > ra { "down" } else { "up" }
    );
    Some(format!(
        "{b_name}'s floor {} at the front axle and {} at the rear{pitch}",
        way(fa[0], fb[0]),
        way(fa[1], fb[1])
    ))
}

/// The two runs' ground clearances, m, when both stand over the ground
/// and they lie more than [`CLEARANCE_APART_M`] apart.
/// A body standing on its tyres is read by its floor's height, not by
/// the tyres' contact ([`crate::summary::Summary::floor_clearance_m`]).
fn clearances_apart(
    a: &crate::summary::Summary,
    b: &crate::summary::Summary,
) -> Option<(f64, f64)> {
    let (ca, cb) = (a.floor_clearance_m()?, b.floor_clearance_m()?);
    ((ca - cb).abs() > CLEARANCE_APART_M).then_some((ca, cb))
}

/// Ground clearances (from the lowest point) closer than this, m, are
/// taken as one (our choice): a scan's noise moves its lowest point (a
/// review's scan with 0.5 mm of noise stood 1 mm lower than the surface
/// it was scanned from, and compare said the difference mixed the ride
/// height with the change), and 2 mm of ride height is worth little in
/// this model (a review's SUV moved by 0.7 to 1.9 counts of drag and 5
/// to 7 kg of lift per 20 mm).
pub const CLEARANCE_APART_M: f64 = 0.002;

/// Reference areas differing by more than this fraction of the larger
/// make the runs' coefficients differ by as much from the area alone, a
/// note's worth; below it the forces and the coefficients tell the same.
pub const REFERENCE_AREA_SHIFT: f64 = 0.01;

/// Whether reference areas `ra` and `rb` differ by more than
/// [`REFERENCE_AREA_SHIFT`] of the larger.
pub fn areas_differ(ra: f64, rb: f64) -> bool {
    (ra - rb).abs() > REFERENCE_AREA_SHIFT * ra.abs().max(rb.abs())
}

/// A note when the reference areas differ by more than
/// [`REFERENCE_AREA_SHIFT`].
fn reference_note(a: &crate::summary::Summary, b: &crate::summary::Summary) -> Option<String> {
    let (ra, rb) = (a.reference.area_m2, b.reference.area_m2);
    let larger = ra.abs().max(rb.abs());
    areas_differ(ra, rb).then(|| {
        format!(
            "the reference areas differ by {:.1} % ({ra:.3} and {rb:.3} m^2): the drag is compared as \
             drag area C_D·A (B's drag coefficient expressed in A's reference area, the drag counts \
             above included); the other coefficients are each on its run's own area, so compare \
             forces (N, kg) rather than those",
            100.0 * (rb - ra).abs() / larger
        )
    })
}

/// What a drag difference between runs that separate differently rests on
/// (see [`separation_note`]).
pub const SEPARATION_CAUTION: &str = "the drag difference rests largely on the separated-flow model, \
     whose drag is least reliable where separation moves (for example, on the slant-back validation \
     body its drag ranking of rear slants between 25 and 35 degrees is the wrong way round against \
     wind-tunnel data); read the separation pictures first and confirm the drag ranking with validated \
     CFD or a tunnel";

/// What a lift difference between runs whose underbodies separate
/// differently rests on (see [`underbody_note`]).
pub const UNDERBODY_CAUTION: &str = "the lift difference, and with it the drag difference, rests \
     largely on the separated-flow model, which does not show the loss of downforce when a diffuser stalls (on the concept coupe \
     the downforce kept growing up to a 20-degree diffuser, whose ramp the boundary layer still \
     called 79 % attached); read the separation pictures first and confirm with validated CFD or \
     a tunnel";

/// A warning when the separated share of the ground-facing panels differs
/// by more than [`SEPARATION_SHIFT`] between two runs over the ground.
/// The diffuser's stall is named only when the shape changed on the
/// underbody ([`SurfaceDeltas::changed_underbody_m2`]): a review's roof
/// spoiler study read it for an underbody whose separated share moved
/// from 4.1 to 5.2 % in answer to the roof.
fn underbody_note(
    a: &crate::summary::Summary,
    b: &crate::summary::Summary,
    surface: &SurfaceDeltas,
) -> Option<String> {
    let (fa, fb) = (
        a.separation.underbody_fraction,
        b.separation.underbody_fraction,
    );
    let ground = a.mesh.ground_z.is_some() && b.mesh.ground_z.is_some();
    let caution = if surface.changed_underbody_m2 > 0.0 || surface.changed_m2 == 0.0 {
        UNDERBODY_CAUTION
    } else {
        UNDERBODY_ELSEWHERE
    };
    // With both runs' panel noise measured, a change that does not hold
    // at the three matched counts is the panelling's, not the shape's (a
    // review's roof-spoiler pair: the underbody's share moved from 10 to
    // 19 %, and the 0-degree car alone from 10 to 18 % at 8 % more panels).
    let paired = matched::matched(a, b)
        .map(|m| m.underbody_points)
        .filter(|d| !d.is_empty());
    (ground && (fb - fa).abs() > SEPARATION_SHIFT).then(|| {
        let moved = format!(
            "the separated share of the underbody changes from {:.1} % to {:.1} %",
            100.0 * fa,
            100.0 * fb
        );
        match &paired {
            Some(d) if !matched::holds(d, 100.0 * SEPARATION_SHIFT) => format!(
                "{moved}, but by {} points at the runs' three matched panel counts, {}: within the \
                 panel noise, not an answer to the change; the verdicts there are uncertain at this \
                 panel count",
                matched::values_words(d, 1),
                matched::failure_words(d, 100.0 * SEPARATION_SHIFT, "points", 0)
            ),
            _ => format!("{moved}: {caution}"),
        }
    })
}

/// [`UNDERBODY_CAUTION`] for a change made elsewhere than the underbody.
pub const UNDERBODY_ELSEWHERE: &str = "the shape did not change there, so the underbody's separation \
     moved in answer to the change elsewhere, and the lift difference, and with it the drag difference, \
     rests partly on the separated-flow model; read the separation pictures first and confirm with \
     validated CFD or a tunnel";

/// Share of the changed surface that may lie in separated flow (in A or B)
/// before the note that the change works on dead water (our choice: a
/// quarter).
pub const DEAD_WATER_CHANGE_SHARE: f64 = 0.25;

/// Share of the changed surface over which the verdict, naming no winner,
/// says the change is not assessable in this model (our choice: most of
/// it).
pub const DEAD_WATER_VERDICT_SHARE: f64 = 0.5;

/// A change working mostly on dead water ([`DEAD_WATER_VERDICT_SHARE`]),
/// no winner named: the verdict leads with the model's blindness, not
/// with a null (a review's roof spoiler and tailgate rake on a squareback
/// read "within the noise floor", -1.5 and -0.7 counts, the reason in a
/// note at the bottom).
fn dead_change_verdict(surface: &SurfaceDeltas, drag: &mut DragVerdict) {
    if let Some(share) = dead_change_share(surface).filter(|s| *s >= DEAD_WATER_VERDICT_SHARE)
        && !drag.resolved
        && drag.leaning.is_empty()
    {
        drag.text = format!(
            "not assessable in this model: {:.0} % of the surface that changed (measured on B's \
             panels: surface A has and B lacks is not counted) lies in separated flow, which the \
             model holds at one pressure whatever the change does there, so what the change does to \
             the flow there is not in these numbers ({}); judge the change with validated CFD or a \
             tunnel",
            100.0 * share,
            drag.text
        );
    }
}

/// The share of the surface that changed lying in separated flow in
/// either run; `None` when nothing changed.
fn dead_change_share(surface: &SurfaceDeltas) -> Option<f64> {
    (surface.changed_m2 > 0.0).then(|| surface.changed_separated_m2 / surface.changed_m2)
}

/// A note when much of the surface that changed lies in separated flow:
/// the model holds the dead water at one pressure, so a spoiler, a lip or
/// a diffuser's end working there acts only through that pressure (a
/// review's 120 mm roof-spoiler extension over a separated tailgate cost
/// 4.4 kg of rear downforce in this model, where a tunnel would usually
/// show a gain).
fn dead_water_change_note(surface: &SurfaceDeltas) -> Option<String> {
    let share = dead_change_share(surface)?;
    (share > DEAD_WATER_CHANGE_SHARE).then(|| {
        let [unchanged, changed] = surface.margins_m;
        let margin = if changed > unchanged {
            "a quarter of a panel edge, clear of two panellings' chord sag"
        } else {
            "a thousandth of the body's length"
        };
        format!(
            "{:.0} % of the surface that moved by more than {} ({:.3} of {:.3} m^2; {margin}) lies in \
             separated flow in either run: \
             there the model holds the dead water's one pressure, so it misses most of what the change \
             does to the lift and drag (a spoiler, a lip or a diffuser's end working on separated flow); \
             read the difference as this model's and confirm with validated CFD or a tunnel",
            100.0 * share,
            mm(changed),
            surface.changed_separated_m2,
            surface.changed_m2
        )
    })
}

/// A note when the change is a device under the nose (a lip, a splitter,
/// an air dam): [`NOSE_DEVICE_SHARE`] or more of the changed area faces
/// the ground in the front [`NOSE_SHARE`] of the body. The model cannot
/// assess one (README): a review's 40 mm chin lip read 12 kg more front
/// lift and +58 counts, its underbody 4 to 89 % separated, and was told
/// to give the lip more panels before judging it.
fn nose_device_note(surface: &SurfaceDeltas) -> Option<String> {
    (surface.changed_m2 > 0.0
        && surface.changed_under_nose_m2 >= NOSE_DEVICE_SHARE * surface.changed_m2)
        .then(|| {
            format!(
                "the shape changed under the nose ({:.3} of the {:.3} m^2 that moved faces the ground in \
                 the front {:.0} % of the body): a lip, a splitter or an air dam there is beyond this \
                 model, which separates the floor behind such an edge and never lets it reattach, so \
                 its lift and drag here can run opposite to a tunnel's (a chin spoiler raised the front \
                 lift in this model, where a tunnel cuts it), at any panel count; judge it with \
                 validated CFD or a tunnel",
                surface.changed_under_nose_m2,
                surface.changed_m2,
                100.0 * NOSE_SHARE
            )
        })
}

/// A changed part spanning fewer than this many of B's panel edges
/// along the stream is resolved by one or two rows of panels
/// ([`short_change_note`]; our choice: three panels along a part are the
/// fewest that give it a front, a middle and an end).
pub const SHORT_CHANGE_EDGES: f64 = 3.0;

/// A note when the shape changed over a stretch along the stream shorter
/// than [`SHORT_CHANGE_EDGES`] of B's panel edges: the part (a spoiler's
/// extension, a mirror head, a lip) is one or two rows of panels, so the
/// flow over it and its separation rest on where the panel edges fall (a
/// review's 60 and 120 mm roof-spoiler extensions on 82 mm panels read
/// as dead water with nothing saying the part was under two panels). The
/// part's length is taken as the span of the changed panels' centroids
/// plus one edge. It names the panel count that puts three panels along
/// it (the count goes with the inverse square of the edge). Not for a
/// plate across the flow, over half of its changed area facing along the
/// stream: the panels across it resolve its height and width, which set
/// its pressure, and its thickness is no length to resolve (a review's
/// 60 mm tailgate, up against removed, had been told to take 16,000
/// panels). `names`: the runs, A's and B's.
fn short_change_note(surface: &SurfaceDeltas, [_, b]: [&str; 2]) -> Option<String> {
    let e = surface.panel_edge_m;
    let [lo, hi] = surface.changed_x_m?;
    let length = hi - lo + e;
    let across = surface.changed_across_m2 > 0.5 * surface.changed_m2;
    // A device under the nose has its own note: no panel count makes it
    // assessable.
    let short = surface.changed_m2 > 0.0 && e > 0.0 && length < SHORT_CHANGE_EDGES * e && !across;
    (short && nose_device_note(surface).is_none()).then(|| {
        let target = length / SHORT_CHANGE_EDGES;
        let panels = surface.panels_b as f64 * (e / target).powi(2);
        format!(
            "the shape changed over one or two rows of panels along the stream (their centres from x \
             {lo:.2} to {hi:.2} m: a part about {} long, counting a panel's edge), under \
             {SHORT_CHANGE_EDGES:.0} of {b}'s panel edges ({}): the flow over it, its separation and \
             what it does to the drag and lift rest on where the panel edges fall as much as on the \
             part; give it {SHORT_CHANGE_EDGES:.0} or more panels along the stream (an edge of about \
             {}, about {} panels) before judging it",
            mm(length),
            mm(e),
            mm(target),
            round_panels(panels)
        )
    })
}

/// A suggested panel count, to two significant figures (14,000, not
/// 13,873): the count it comes from is an estimate.
fn round_panels(n: f64) -> String {
    let step = 10f64.powf((n.max(1.0).log10().floor() - 1.0).max(0.0));
    crate::output::grouped((n / step).round() * step)
}

/// The notes on what the surface change between two runs rests on, as
/// `compare` gives them: much of the moved surface in separated flow
/// ([`dead_water_change_note`]), a change under the panels' edge
/// ([`resolution_note`]; not when both runs measured their panel noise,
/// `measured`; `names`: the runs, A's and B's) and a part too short along
/// the stream for the panels ([`short_change_note`]). `collect` gives them
/// for its leader and runner-up.
pub fn surface_notes(surface: &SurfaceDeltas, measured: bool, names: [&str; 2]) -> Vec<String> {
    [
        dead_water_change_note(surface),
        resolution_note(surface, measured, names),
        short_change_note(surface, names),
        nose_device_note(surface),
    ]
    .into_iter()
    .flatten()
    .collect()
}

/// A length in millimetres, to the millimetre ("28 mm"), or to a tenth
/// under 10 mm ("4.5 mm").
pub(crate) fn mm(m: f64) -> String {
    let v = 1000.0 * m;
    if v < 10.0 {
        format!("{v:.1} mm")
    } else {
        format!("{v:.0} mm")
    }
}

/// A note when either run's two sides separate differently at zero yaw
/// ([`crate::summary::Summary::sides_differ`]): a one-sided separation on a symmetric
/// body is the model drifting, not the shape, and the differences it
/// makes read as the change's (a review's notchback carried a strip along
/// one sill only, and compare had put its underbody's separated share
/// moving from 8.0 to 2.7 % down to the change elsewhere).
fn sides_note(a: &crate::summary::Summary, b: &crate::summary::Summary) -> Option<String> {
    let which = match (a.sides_differ(), b.sides_differ()) {
        (true, true) => "both runs",
        (true, false) => "A",
        (false, true) => "B",
        (false, false) => return None,
    };
    Some(format!(
        "in {which} the two sides separate differently at zero yaw (see the run's warning): on a \
         symmetric body that is the separated-flow model drifting to one side, not the shape, so the \
         separation and drag differences here rest partly on it; run both as half models \
         (geometry.half_model = true) for one answer per side"
    ))
}

/// A note when one run of the two carries the stagnation in the corner
/// between a tapering tail and its base's dead water
/// ([`crate::pipeline::base_corner_warning`]): it cannot cancel between
/// them, and it reaches further up the taper than the warning's panels
/// (a review's Kamm tail read Cp +0.14 to +0.51 over the last 0.24 m of
/// its taper, where the uncut tail read about 0, and compare gave -43.7
/// counts on the unchanged surface), so the drag difference rests
/// partly on it and no drag winner is named.
fn corner_note(a: &crate::summary::Summary, b: &crate::summary::Summary) -> Option<String> {
    let carries = |s: &crate::summary::Summary| {
        s.warnings
            .iter()
            .any(|w| w.contains(crate::pipeline::BASE_CORNER_WORDS))
    };
    let which = match (carries(a), carries(b)) {
        (true, false) => "A",
        (false, true) => "B",
        _ => return None,
    };
    Some(format!(
        "only {which} carries the stagnation in the corner between a tapering tail and its base's dead \
         water (see its warning): it does not cancel between the runs and reaches further up the taper \
         than the warning's panels, so the drag difference rests partly on it; set tails cut at the \
         same place against each other"
    ))
}

/// A note when B's surface lies within about a panel's edge of A's
/// everywhere (and changed somewhere): the panels follow so small a change
/// only in part (a review's 60 mm roof-spoiler extension on 80 mm panels
/// moved the drag by 2.8 counts, where the same STL at 3,500 and 4,000
/// panels moved it by 14). It gives the area that moved, so that a large
/// part changed within that distance (a roof box turned round, 1.23 m^2
/// within 99 mm on 100 mm panels) does not read as a small change. Not when both runs measured their panel noise
/// (`measured`): the verdict's floor then holds what the note asks for.
/// `names`: the runs, A's and B's.
fn resolution_note(surface: &SurfaceDeltas, measured: bool, [a, b]: [&str; 2]) -> Option<String> {
    // Both ways: a part only A has lies off B's surface, not B's off A's.
    let (d, e) = (
        surface.max_distance_m.max(surface.max_distance_a_m),
        surface.panel_edge_m,
    );
    // A move beyond the unchanged margin counts though no panel cluster
    // passed the changed one (a review's bumper corner rounded from 40 to
    // 80 mm moved by up to 25 mm on 91 mm panels, changed_m2 0, no note).
    let moved = surface.changed_m2 > 0.0 || d > surface.margins_m[0];
    (moved && d < e && !measured).then(|| {
        let over = if surface.changed_m2 > 0.0 {
            format!("over {:.2} m^2 that moved", surface.changed_m2)
        } else {
            "nowhere by more than a quarter of an edge over more than a lone panel".to_owned()
        };
        format!(
            "{a}'s and {b}'s surfaces lie within {:.0} mm of each other everywhere, under the panels' typical edge ({:.0} mm), \
             {over}: however large the part, the panels follow moves under their own \
             size only in part, so the differences may rest as much on how each surface was cut into \
             panels as on the change; run both again with tuft run --noise, which solves each at two \
             other panel counts, and compare then judges the difference against the spread it measures",
            1000.0 * d,
            1000.0 * e,
        )
    })
}

/// Separated areas differing by more than this fraction of the larger
/// wetted area make the drag difference rest on the separated-flow model.
pub const SEPARATION_SHIFT: f64 = 0.01;

/// Where separation appears or disappears, a net area the stream sees
/// ([`SurfaceDeltas::separation_net_frontal_m2`]) of more than this
/// fraction of the reference area also makes the drag difference rest on
/// the separated-flow model: at the dead water's pressure (Cp about -0.13)
/// against an attached surface's, each such percent is worth a few drag
/// counts, the noise floor. Measured (2026-12-02): the slant-back body from
/// 25 to 35 degrees 12.7 % (while its separated area moves by under 1 % of
/// the wetted area), the demo's rear windows 11.0 %, a review's hatchback
/// backlights 4.9 % from 20 to 30 degrees and 3.2 % from 30 to 40; reruns
/// of a review's car with other scanner noise 0.7 % (2.3 % counted without
/// signs), a 40 mm higher boot lid 1.0 %.
pub const SEPARATION_FRONTAL_SHIFT: f64 = 0.02;

/// Rear slopes from which the separated-flow model's drag ranking is not
/// to be trusted, degrees: the slant-back research body's drag peaks at
/// about 30 degrees and falls by 35 in the tunnel (Ahmed, Ramm & Faltin
/// 1984; values from memory), while the model's keeps rising (0.160 at
/// 25, 0.170 at 30, 0.190 at 35; DEVELOPERS.md), and a review's
/// hatchback backlights from 30 to 40 degrees rose in drag too. The
/// model's ranking holds below the peak (12.5 below 25 and 35, tested),
/// so the line sits at the published regime's 25 degrees, where the peak
/// begins to build.
pub const SLOPE_CAUTION_DEG: f64 = 25.0;

/// How far under the drawn slope a region's slope read on the panels
/// (`RegionResult::slope_deg`) may come out, degrees: the demo coupe's
/// 28-degree window reads 27.6, and a 25-degree one 24.5 at 3,000 panels,
/// which had escaped the caution (a review's 15/20/25 sweep). A slope read
/// within this of [`SLOPE_CAUTION_DEG`] counts as reaching it.
pub const SLOPE_READ_LOW_DEG: f64 = 1.0;

/// Rear slopes above which a surface is a base rather than a slant for
/// [`slopes_in_doubt`], degrees: the slant-back body's fully separated
/// regime, measured to 40 degrees (Ahmed, Ramm & Faltin 1984), is the
/// square back's in kind, and the model's ranking is known wrong only
/// from 25 to 40 (our bound, with a margin; a review's near-upright
/// tailgate, read at 75 to 78 degrees on the panels of variants that did
/// not touch it, drew the caution on every comparison).
pub const SLOPE_CAUTION_TOP_DEG: f64 = 45.0;

/// The least and the steepest of `slopes` (degrees, as read on the
/// panels) when they differ by a degree or more, the steepest reaches
/// [`SLOPE_CAUTION_DEG`] (within [`SLOPE_READ_LOW_DEG`]) and the least is
/// no steeper than [`SLOPE_CAUTION_TOP_DEG`]: a slope change the model's
/// drag cannot rank. Slopes within a degree count as the same, and two
/// base-like slopes are no slant change.
pub fn slopes_in_doubt(slopes: &[f64]) -> Option<(f64, f64)> {
    let lo = slopes.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = slopes.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    (hi - lo >= 1.0 && hi + SLOPE_READ_LOW_DEG >= SLOPE_CAUTION_DEG && lo <= SLOPE_CAUTION_TOP_DEG)
        .then_some((lo, hi))
}

/// A note when a run with named regions was solved on under half of its
/// suggested panels ([`crate::summary::Summary::coarse_note`]): its
/// report says its region verdicts can still move with the panel count,
/// and so can their changes between the runs.
fn coarse_note(a: &crate::summary::Summary, b: &crate::summary::Summary) -> Option<String> {
    if a.regions.is_empty() && b.regions.is_empty() {
        return None;
    }
    let (ca, cb) = (a.coarse_note().is_some(), b.coarse_note().is_some());
    let which = match (ca, cb) {
        (true, true) => "both runs were",
        (true, false) => "A was",
        (false, true) => "B was",
        (false, false) => return None,
    };
    // Only a finer export helps runs on every facet of their STLs.
    let finer = (!ca || a.all_facets()) && (!cb || b.all_facets());
    let advice = if finer {
        "export the STL finer (the runs use all its facets, and tuft does not refine) and run both again"
    } else {
        "run both at the suggested count"
    };
    Some(format!(
        "{which} solved on under half of the panels suggested for the body: a region's verdict, and \
         so its change between the runs, can still move with the panel count there (see the run's \
         report); before acting on a change near a verdict's line, {advice}"
    ))
}

/// A note when one run's surface was wrapped and the other's was not: the
/// wrap re-meshes the whole body, and that alone moves the results (a
/// review's demo coupe, wrapped only because of a block buried inside it:
/// boot deck 26 to 36 % separated, C_D 0.149 to 0.152).
fn wrap_note(a: &crate::summary::Summary, b: &crate::summary::Summary) -> Option<String> {
    (a.wrapped() != b.wrapped()).then(|| {
        let (w, n) = if b.wrapped() { ("B", "A") } else { ("A", "B") };
        format!(
            "{w}'s surface was wrapped into one (its parts run into each other or stand on the ground) \
             and {n}'s was not: the wrap re-meshes the whole body, which alone moves the results (the \
             demo coupe wrapped: boot deck 26 to 36 % separated); to compare an add-on, give {n} the \
             same treatment: geometry.wrap = true in its case wraps it too"
        )
    })
}

/// Share of the reference area by which the area beside sharp front edges
/// (rims, `separation.rim_m2`) may differ between two runs before their
/// drag difference rests on the sharp-edge model (as the separated area's
/// 2 %; our choice).
pub const RIM_CHANGE_SHARE: f64 = 0.02;

/// A note when the area beside rims the flow leaves differs by more than
/// [`RIM_CHANGE_SHARE`] of the reference area: the free-streamline bound
/// there is checked only on flat-faced cylinders and a cube, and it calls
/// an edge sharp or rounded with a step where the measured drag falls over
/// a range of radii (a review's flat-nosed coupe had been called 22 counts
/// worse with no word of it).
fn rim_note(
    a: &crate::summary::Summary,
    b: &crate::summary::Summary,
    surface: &SurfaceDeltas,
) -> Option<String> {
    let (ra, rb) = (a.separation.rim_m2 + 0.0, b.separation.rim_m2 + 0.0);
    let area = a.reference.area_m2.max(b.reference.area_m2);
    ((rb - ra).abs() > RIM_CHANGE_SHARE * area).then(|| {
        let why = match rim_place(a, b, surface) {
            RimPlace::Clear(zone, [lo, hi]) => {
                format!(
                "; the shape did not change there (x {:.2} to {:.2} m; it changed from x {lo:.2} to \
                 {hi:.2} m), so the call flipped with the panelling: the edge's rounding lies near the \
                 model's rim radius (runs with --noise show the call at three counts)",
                    zone[0], zone[1]
                )
            }
            RimPlace::Reaches(zone) => format!(
                "; the change reaches the edges there (x {:.2} to {:.2} m), so the area held at the \
                 edges' bound moves with the shape itself",
                zone[0], zone[1]
            ),
            RimPlace::Unknown => String::new(),
        };
        format!(
            "the area beside sharp front edges the flow leaves (rims) is {ra:.2} m^2 on A and {rb:.2} \
             m^2 on B: the drag difference rests on the sharp-edge model, which calls an edge sharp or \
             rounded with a step where the measured drag falls over a range of radii{why}"
        )
    })
}

/// Where the larger rim zone (x range, m) lies against where the shape
/// changed ([`rim_place`]).
#[derive(Debug, Clone, Copy, PartialEq)]
enum RimPlace {
    /// Clear of the change by a tenth of the body's length: the shape did
    /// not change there, so the call flipped with the panelling (a
    /// review's diffuser variants, their noses identical, read 0.02, 0
    /// and 0.22 m^2). The zone, then the change.
    Clear([f64; 2], [f64; 2]),
    /// The change reaches the zone: the held area moves with the shape,
    /// no rounding need be near the rim radius (a review's nose raised 60
    /// mm, no radius changed).
    Reaches([f64; 2]),
    /// Neither: no change found, no zone, or near without reaching it.
    Unknown,
}

/// [`RimPlace`] of the larger of the two runs' rim zones.
fn rim_place(
    a: &crate::summary::Summary,
    b: &crate::summary::Summary,
    surface: &SurfaceDeltas,
) -> RimPlace {
    let zone = if b.separation.rim_m2 >= a.separation.rim_m2 {
        b.separation.rim_x_m
    } else {
        a.separation.rim_x_m
    };
    let reach = 0.1 * b.reference.length_m;
    match surface.changed_x_m {
        Some([lo, hi]) if zone[0] <= zone[1] && (zone[1] < lo - reach || zone[0] > hi + reach) => {
            RimPlace::Clear(zone, [lo, hi])
        }
        Some([lo, hi]) if zone[0] <= zone[1] && zone[0] <= hi && zone[1] >= lo => {
            RimPlace::Reaches(zone)
        }
        _ => RimPlace::Unknown,
    }
}

/// A note when a named rear-facing region (a rear window, a slant) has a
/// different slope in the two runs, and the steeper reaches
/// [`SLOPE_CAUTION_DEG`]: the drag difference then rests on the part of
/// the model known to rank it wrongly, whatever the separated areas do
/// (two slopes either side of 30 degrees can separate alike in the model
/// and differ in the tunnel; [`slopes_in_doubt`]).
fn slope_note(
    a: &crate::summary::Summary,
    b: &crate::summary::Summary,
    changed_x: Option<[f64; 2]>,
) -> Option<String> {
    a.regions.iter().find_map(|ra| {
        let rb = b.regions.iter().find(|r| r.name == ra.name)?;
        let (sa, sb) = (ra.slope_deg?, rb.slope_deg?);
        if !region_reaches_change(b, &ra.name, changed_x) {
            return None;
        }
        slopes_in_doubt(&[sa, sb]).map(|_| {
            format!(
                "the slope of \"{}\" differs ({sa:.0} degrees in A, {sb:.0} in B) and reaches \
                 about {SLOPE_CAUTION_DEG:.0} degrees, where the separated-flow model's drag is known to rank \
                 rear slopes wrongly: in the tunnel the drag of a slant-back body peaks near 30 degrees \
                 and falls beyond, while the model's keeps rising with the slope; no drag winner is \
                 named (confirm with validated CFD or a tunnel)",
                ra.name
            )
        })
    })
}

/// Whether the shape changed within reach of the named region's box in
/// B's case: its x range widened by a fiftieth of the length on each
/// side meets the changed surface's x range. A region with no x range is
/// taken to reach it; with no surface changed, none does. A review's rear
/// deck, the same in both STLs, read 38 and 40 degrees on two panellings
/// while only the windscreen moved, and the rear-slope caution had held
/// back the windscreens' drag.
fn region_reaches_change(
    b: &crate::summary::Summary,
    name: &str,
    changed_x: Option<[f64; 2]>,
) -> bool {
    let Some([lo, hi]) = changed_x else {
        return false;
    };
    let range = b.case["region"].as_array().and_then(|rs| {
        rs.iter()
            .find(|r| r["name"].as_str() == Some(name))
            .and_then(|r| Some([r["x"][0].as_f64()?, r["x"][1].as_f64()?]))
    });
    let Some([x0, x1]) = range else {
        return true;
    };
    let m = 0.02 * b.reference.length_m;
    x0 - m <= hi && lo <= x1 + m
}

/// A warning when the separated regions of the two runs differ by more
/// than [`SEPARATION_SHIFT`] of the wetted area, or where they differ the
/// stream sees more than [`SEPARATION_FRONTAL_SHIFT`] of the reference
/// area: the drag of a separated region is the least certain part of the
/// estimate. On the slant-back validation body the separated-flow loop
/// ranks the drag of 25 and 35 degree slants the other way round from the
/// wind tunnel (Ahmed, Ramm & Faltin 1984; the project's BENCHMARKS.md),
/// because the vortices off a slant's side edges are not modelled.
fn separation_note(
    a: &crate::summary::Summary,
    b: &crate::summary::Summary,
    surface: &SurfaceDeltas,
) -> Option<String> {
    let wetted = a.mesh.wetted_area_m2.max(b.mesh.wetted_area_m2);
    let shift = (b.separation.area_m2 - a.separation.area_m2).abs();
    let net = surface.separation_net_frontal_m2;
    // One area for both runs (A's), so that reference areas that differ
    // do not move the share.
    let reference = a.reference.area_m2;
    let by_area = wetted > 0.0 && shift > SEPARATION_SHIFT * wetted;
    let by_stream = reference > 0.0 && net > SEPARATION_FRONTAL_SHIFT * reference;
    let percent = |x: f64| 100.0 * x / reference.max(f64::MIN_POSITIVE);
    // With both runs' panel noise measured: whether the change holds at
    // the three matched counts (a review's roof-spoiler pair moved its
    // sills' separation at one count and not at the others).
    let noise = matched::matched(a, b)
        .map(|m| m.separated_points)
        .filter(|d| !d.is_empty() && !matched::holds(d, 100.0 * SEPARATION_SHIFT))
        .map_or(String::new(), |d| {
            format!(
                "; at the runs' three matched panel counts the separated share changes by {} points, \
                 {}: the change is within the panel noise, so read the separation pictures of both \
                 runs as uncertain at this count, not as an answer to the change",
                matched::values_words(&d, 1),
                matched::failure_words(&d, 100.0 * SEPARATION_SHIFT, "points", 0)
            )
        });
    (by_area || by_stream).then(|| {
        format!(
            "the separated area goes from {:.3} m^2 ({:.2} % of A's surface) to {:.3} m^2 ({:.2} % of \
             B's surface, {:+.2} points), and where separation appears or disappears the surface \
             projected along the stream adds up to {:.1} % of A's reference area ({:.1} % counting where it \
             appears and where it disappears alike): {}{noise}",
            a.separation.area_m2,
            100.0 * a.separation.fraction,
            b.separation.area_m2,
            100.0 * b.separation.fraction,
            100.0 * (b.separation.fraction - a.separation.fraction),
            percent(net),
            percent(surface.separation_change_frontal_m2),
            SEPARATION_CAUTION
        )
    })
}

/// A's separated area as carried onto B's panels, m^2 (whole body): where
/// both separate and where separation disappears in B.
pub fn a_separated_on_b(s: &SurfaceDeltas) -> f64 {
    s.separated_in_both_m2 + s.separation_disappears_m2
}

/// Where separation appears and disappears, and why their difference is
/// not the separated area difference (a review read "0.858 - 0.056 =
/// 0.802" beside +0.657): the first counts A's states carried onto B's
/// panels, the second each run's own panels.
pub fn separation_change_words(c: &Comparison) -> String {
    let s = &c.surface;
    format!(
        "separation appears on {:.3} m^2 and disappears on {:.3} m^2 of B's surface (net {}): A's states \
         carried onto B's panels, where A's separated area reads {:.3} m^2 against {:.3} on its own \
         panels, so the net differs from the separated area difference ({} m^2, each run on its own panels)",
        s.separation_appears_m2,
        s.separation_disappears_m2,
        crate::output::signed(s.separation_appears_m2 - s.separation_disappears_m2, 3),
        a_separated_on_b(s),
        c.a.separated_area_m2,
        crate::output::signed(c.deltas.separated_area_m2, 3),
    )
}

/// One region's change in words, after its name.
pub fn region_text(r: &RegionChange) -> String {
    format!(
        "A {}, B {}: {} {}",
        r.words[0],
        r.words[1],
        crate::output::signed(r.delta_points, 0),
        if r.delta_points.abs().round() == 1.0 {
            "point"
        } else {
            "points"
        }
    )
}

/// The separated share of the surface, %, above which the built-in lift
/// floor (measured on the demo coupe, 8.8 % separated) is no guide without
/// the runs' own panel noise: about twice the coupe's (our choice; a
/// review's pickup, 24 % separated, moved its rear-axle lift from 17.5 to
/// 28.3 kg between panel counts 8 % apart, against a floor of 2.6 kg).
pub const BLUNT_LIFT_PERCENT: f64 = 15.0;

/// Whether the whole body's lift difference stands out of the noise, in
/// words ([`Deltas::lift_noise_kg`]; measured on the total, whose scatter
/// the rear axle's matches and the front axle's is a fifth of, so it says
/// nothing of an axle).
pub fn lift_noise_words(d: &Deltas) -> String {
    let [noise] = crate::output::kg_set([d.lift_noise_kg]);
    if let Some(m) = &d.matched_lift_kg {
        let values = matched::values_words(m, 1);
        return if matched::holds(m, d.lift_floor_kg) {
            format!("the whole body's holds at the runs' three matched panel counts: {values} kg")
        } else {
            format!(
                "the whole body's within the panel noise: {values} kg at the runs' three matched panel \
                 counts, {}",
                matched::failure_words(m, d.lift_floor_kg, "kg", 1)
            )
        };
    }
    let blunt = d.blunt_separated_percent.map_or(String::new(), |p| {
        format!(
            "; that floor is the demo coupe's, 8.8 % separated, and {p:.0} % of this surface is: its lift \
             moves more with the panel count (a test pickup by up to 11 kg at the rear), so run both \
             with --noise before reading a lift difference"
        )
    });
    // The total within the noise can hide a shift between the axles (a
    // review's half and whole runs of one car: +1 kg in all, front -58
    // and rear +59).
    let shift = d.front_axle_kg.abs().max(d.rear_axle_kg.abs());
    let split = if shift > d.lift_noise_kg {
        let [s] = crate::output::kg_set([shift]);
        format!(", but the split between the axles moves by about {s} kg, beyond it")
    } else {
        String::new()
    };
    if d.lift_kg.abs() < d.lift_noise_kg {
        format!("the whole body's within the noise of about {noise} kg{split}{blunt}")
    } else {
        format!("whole-body differences under about {noise} kg are noise{blunt}")
    }
}

/// The drag difference as a share of A's drag (on A's reference area, as
/// the counts are), in newtons and in the power it takes at B's speed:
/// " (+24 % of A's, +130 N, +4.7 kW at 36.1 m/s)" (a review adding a roof
/// box had the counts only, and worked out the rest by hand); empty when
/// A has no drag to take a share of.
fn drag_share_words(c: &Comparison) -> String {
    let d = &c.deltas;
    let a_counts = 1000.0 * c.a.cd;
    if !(a_counts.abs() > 1e-9 && d.drag_force_n.is_finite()) {
        return String::new();
    }
    // In a cross wind the power is the force along the body at the car's
    // speed, which the drag difference along the wind is not (a review
    // read -0.2 kW here against -0.12 between the runs' own figures).
    if c.a.yaw_deg != 0.0 || c.b.yaw_deg != 0.0 {
        return format!(
            " ({} % of A's, {} N along the wind; each run gives its power)",
            crate::output::signed(100.0 * d.drag_counts / a_counts, 0),
            crate::output::signed(d.drag_force_n, 0)
        );
    }
    format!(
        " ({} % of A's, {} N, {} kW at {})",
        crate::output::signed(100.0 * d.drag_counts / a_counts, 0),
        crate::output::signed(d.drag_force_n, 0),
        crate::output::signed(d.drag_force_n * c.b.speed / 1000.0, 1),
        crate::output::speed_words(c.b.speed)
    )
}

fn print_comparison(c: &Comparison, out: &Path) {
    let d = &c.deltas;
    say!("{} -> {}: {}", c.a.case_name, c.b.case_name, c.drag.text);
    // Withheld whole (another size, loads not usable): the differences
    // would only be read against the verdict (a review read "+2330.0
    // counts" on the line after "not comparable").
    if [NOT_COMPARABLE_WORDS, NOT_USABLE_WORDS]
        .iter()
        .any(|w| c.drag.text.starts_with(w))
    {
        say!(
            "  the differences of forces, counts, kg, separated areas and pictures mean nothing for these two \
             runs; compare.json keeps them"
        );
        say!("  report: {}", out.join("compare.html").display());
        return;
    }
    let [lift, front, rear] =
        crate::output::kg_set_signed([d.lift_kg, d.front_axle_kg, d.rear_axle_kg]);
    let at_b = if d.a_loads_scaled_by.is_some() {
        " at B's dynamic pressure"
    } else {
        ""
    };
    say!(
        "  drag {} counts{}, lift {lift} kg{at_b} (front {front}, rear {rear}; negative: more downforce in B; {}), \
         separated area {} m^2 \
         (separated share of the surface {} points)",
        crate::output::signed(d.drag_counts, 1),
        drag_share_words(c),
        lift_noise_words(d),
        crate::output::signed(d.separated_area_m2, 3),
        crate::output::signed(d.separated_percent_points, 2)
    );
    if c.surface.separation_appears_m2 + c.surface.separation_disappears_m2 > 0.0 {
        say!("  {}", separation_change_words(c));
    }
    // In a cross wind the side force is what the study is about, a rough
    // figure (the runs' notes say why): a review's yawed comparison had
    // no word of it.
    if c.a.yaw_deg != 0.0 || c.b.yaw_deg != 0.0 {
        say!(
            "  side-force coefficient {:.3} in A, {:.3} in B ({}; a rough figure in a cross wind, not the \
             car's side force: see the runs' notes)",
            c.a.cs,
            c.b.cs,
            crate::output::signed(d.side_coefficient, 3)
        );
    }
    for r in &c.regions {
        say!("  {}: {}", r.name, region_text(r));
    }
    let s = &c.surface;
    if s.unchanged_share > 0.0 {
        say!(
            "  where the shape did not change (within {} of A's: {:.0} % of B): |Cp difference| under {:.3} on 95 % of it, giving \
             {} drag counts and {} kg of lift: the flow's answer there to the change, plus panel noise \
             (largest at sharp edges and corners)",
            mm(s.margins_m[0]),
            100.0 * s.unchanged_share,
            s.unchanged_delta_cp_p95,
            crate::output::signed(s.unchanged_drag_counts, 1),
            crate::output::kg_set_signed([s.unchanged_lift_kg])[0]
        );
    }
    for n in &c.notes {
        say!("  note: {n}");
    }
    say!("  report: {}", out.join("compare.html").display());
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::summary::Summary;

    fn with_area(area: f64) -> Summary {
        let mut s = Summary::default();
        s.reference.area_m2 = area;
        s
    }

    /// A change working mostly on dead water, or smaller than a panel, is
    /// noted; one on attached flow, or larger than a panel, is not. The
    /// diffuser's stall is named only for a change to the underbody.
    /// Lone changed panels are the panellings' (a review's spoiler pair
    /// read "changed from x 0.81 m" off a wrap's re-cut panels); two side
    /// by side are a change.
    #[test]
    fn lone_changed_panels_are_not_a_change() {
        let centres = |rows: &[folder::PanelRow]| -> Vec<nalgebra::Point3<f64>> {
            rows.iter().map(|p| p.centroid).collect()
        };
        let row = |x: f64| folder::PanelRow {
            centroid: nalgebra::Point3::new(x, 0.0, 1.0),
            normal: nalgebra::Vector3::z(),
            area: 0.004,
            cp: 0.0,
            state: PanelState::Turbulent,
            risk: 0.0,
        };
        let panels: Vec<_> = [0.81, 2.0, 4.22, 4.28, 4.3].into_iter().map(row).collect();
        let changed = [true, false, true, true, false];
        assert_eq!(
            clustered(&changed, &centres(&panels), LONE_REACH_EDGES * 0.093),
            [false, false, true, true, false]
        );
        // Another body altogether: every panel changed, each beside
        // others, on the grid the search bins them in (within a cell and
        // across cells), in one pass.
        let many: Vec<_> = (0..20_000).map(|k| row(0.05 * f64::from(k))).collect();
        let all = clustered(&vec![true; many.len()], &centres(&many), 0.06);
        assert!(all.iter().all(|c| *c));
    }

    #[test]
    fn a_part_short_along_the_stream_is_noted() {
        // A review's roof-spoiler extension: changed panels' centroids
        // 50 mm apart along the stream on 82 mm panels, 3,000 of them.
        let surface = |x: Option<[f64; 2]>| SurfaceDeltas {
            panels_b: 3000,
            changed_m2: 0.12,
            panel_edge_m: 0.082,
            changed_x_m: x,
            ..SurfaceDeltas::default()
        };
        let note = short_change_note(&surface(Some([3.95, 4.0])), ["A", "B"]).unwrap_or_default();
        assert!(
            note.starts_with(
                "the shape changed over one or two rows of panels along the stream (their centres \
                 from x 3.95 to 4.00 m: a part about 132 mm long, counting a panel's edge), under 3 \
                 of B's panel edges (82 mm)"
            ),
            "{note}"
        );
        // Three panels along 132 mm: 44 mm edges, 3,000 x (82/44)^2.
        assert!(
            note.ends_with("(an edge of about 44 mm, about 10,000 panels) before judging it"),
            "{note}"
        );
        assert!(
            surface_notes(&surface(Some([3.95, 4.0])), true, ["v0", "v1"])
                .iter()
                .any(|n| n.contains("under 3 of v1's panel edges")),
        );
        // A boot lid raised over its whole deck, and no change at all.
        assert_eq!(
            short_change_note(&surface(Some([3.6, 4.3])), ["A", "B"]),
            None
        );
        assert_eq!(short_change_note(&surface(None), ["A", "B"]), None);
        // A lip under the nose: its own note, and no panel count offered
        // (a review's chin lip).
        let mut lip = surface(Some([-0.02, 0.04]));
        lip.changed_underbody_m2 = 0.05;
        lip.changed_under_nose_m2 = 0.05;
        assert_eq!(short_change_note(&lip, ["A", "B"]), None);
        // A plate across the flow (a review's 60 mm tailgate, up against
        // removed): its faces meet the stream, no note; a mirror head,
        // 44 % of its area facing along the stream, keeps it.
        let mut plate = surface(Some([5.2, 5.26]));
        plate.changed_across_m2 = 0.9 * plate.changed_m2;
        assert_eq!(short_change_note(&plate, ["A", "B"]), None);
        plate.changed_across_m2 = 0.44 * plate.changed_m2;
        assert!(short_change_note(&plate, ["A", "B"]).is_some());
        let note = nose_device_note(&lip).unwrap_or_default();
        assert!(
            note.starts_with("the shape changed under the nose (0.050 of the 0.120 m^2 that moved")
                && note.contains("at any panel count"),
            "{note}"
        );
        assert_eq!(nose_device_note(&surface(Some([3.95, 4.0]))), None);
        assert_eq!(round_panels(13_873.0), "14,000");
        assert_eq!(round_panels(950.0), "950");
    }

    #[test]
    fn changes_on_dead_water_or_under_a_panel_are_noted() {
        let surface = |changed: f64, separated: f64, far: f64| SurfaceDeltas {
            changed_m2: changed,
            changed_separated_m2: separated,
            max_distance_m: far,
            panel_edge_m: 0.08,
            margins_m: [0.0045, 0.02],
            ..SurfaceDeltas::default()
        };
        let note = dead_water_change_note(&surface(0.235, 0.220, 0.1)).unwrap_or_default();
        assert!(
            note.starts_with(
                "94 % of the surface that moved by more than 20 mm (0.220 of 0.235 m^2; a quarter \
                 of a panel edge, clear of two panellings' chord sag)"
            ),
            "{note}"
        );
        assert_eq!(dead_water_change_note(&surface(0.235, 0.05, 0.1)), None);
        assert_eq!(dead_water_change_note(&surface(0.0, 0.0, 0.0)), None);
        // Most of it on dead water and no winner: the verdict leads with
        // the model's blindness; a quarter, or a resolved verdict, keeps
        // its words.
        let null = || DragVerdict {
            text:
                "no winner: the drag difference, -1.5 counts, is within the noise floor of 6 counts"
                    .into(),
            ..DragVerdict::default()
        };
        let mut v = null();
        dead_change_verdict(&surface(0.235, 0.235, 0.1), &mut v);
        assert!(
            v.text.starts_with(
                "not assessable in this model: 100 % of the surface that changed (measured on B's \
                 panels: surface A has and B lacks is not counted) lies in separated flow"
            ) && v
                .text
                .contains("(no winner: the drag difference, -1.5 counts"),
            "{}",
            v.text
        );
        let mut v = null();
        dead_change_verdict(&surface(0.235, 0.07, 0.1), &mut v);
        assert_eq!(v, null());
        let mut v = DragVerdict {
            resolved: true,
            ..null()
        };
        dead_change_verdict(&surface(0.235, 0.235, 0.1), &mut v);
        assert!(v.text.starts_with("no winner"), "{}", v.text);
        // A run whose two sides separate differently names the drift.
        let mut one_sided = Summary::default();
        one_sided.warnings.push(format!(
            "{}: 0.00 m^2 on the left (y < 0) against 0.38 m^2 on the right",
            crate::pipeline::SIDES_DIFFER
        ));
        assert_eq!(sides_note(&Summary::default(), &Summary::default()), None);
        // The base corner's stagnation in one run only.
        let mut cornered = Summary::default();
        cornered.warnings.push(format!(
            "8 attached panels {} 0.77 (near x 4.213, y 0.280, z 0.244 m), ...",
            crate::pipeline::BASE_CORNER_WORDS
        ));
        let note = corner_note(&Summary::default(), &cornered).unwrap_or_default();
        assert!(note.starts_with("only B carries the stagnation"), "{note}");
        assert_eq!(corner_note(&cornered, &cornered), None);
        let note = sides_note(&one_sided, &Summary::default()).unwrap_or_default();
        assert!(
            note.starts_with("in A the two sides separate differently"),
            "{note}"
        );
        let note =
            resolution_note(&surface(0.04, 0.0, 0.03), false, ["A", "B"]).unwrap_or_default();
        assert!(note.starts_with("A's and B's surfaces lie within 30 mm of each other everywhere, under the panels' typical edge (80 mm), over 0.04 m^2 that moved"), "{note}");
        assert!(note.contains("tuft run --noise"), "{note}");
        // collect's leader (B) and runner-up (A) by name.
        let named = surface_notes(&surface(0.04, 0.0, 0.03), false, ["v1", "v0"]);
        assert!(
            named.iter().any(|n| n
                .starts_with("v1's and v0's surfaces lie within 30 mm of each other everywhere")),
            "{named:?}"
        );
        assert_eq!(
            resolution_note(&surface(0.04, 0.0, 0.03), true, ["A", "B"]),
            None
        );
        assert_eq!(
            resolution_note(&surface(0.04, 0.0, 0.1), false, ["A", "B"]),
            None
        );
        // A part only A has (a wing, 250 mm off B's deck): B's surface
        // lies within 30 mm of A's, but not A's of B's, so no note (a
        // review's collect had called the wing a change under a panel).
        let wing_in_a = SurfaceDeltas {
            max_distance_a_m: 0.25,
            ..surface(0.04, 0.0, 0.03)
        };
        assert_eq!(resolution_note(&wing_in_a, false, ["A", "B"]), None);
        assert_eq!(
            resolution_note(&surface(0.0, 0.0, 0.003), false, ["A", "B"]),
            None
        );
        // Moved beyond the unchanged margin, though no cluster of panels
        // passed the changed one: still noted (a review's bumper corner).
        let note =
            resolution_note(&surface(0.0, 0.0, 0.025), false, ["A", "B"]).unwrap_or_default();
        assert!(
            note.starts_with("A's and B's surfaces lie within 25 mm of each other everywhere, under the panels' typical edge (80 mm), nowhere by more"),
            "{note}"
        );
        let mut a = Summary::default();
        a.mesh.ground_z = Some(0.0);
        let mut b = a.clone();
        b.separation.underbody_fraction = 0.05;
        let roof = surface(0.235, 0.0, 0.1);
        let floor = SurfaceDeltas {
            changed_underbody_m2: 0.1,
            ..roof.clone()
        };
        let words = |s: &SurfaceDeltas| underbody_note(&a, &b, s).unwrap_or_default();
        assert!(
            words(&roof).contains(UNDERBODY_ELSEWHERE),
            "{}",
            words(&roof)
        );
        assert!(
            words(&floor).contains(UNDERBODY_CAUTION),
            "{}",
            words(&floor)
        );
    }

    /// The verdict's reason names the region that moved most, from 5
    /// points up (a review's boot-height pair read only "the separated
    /// regions differ", beside a sentence about slants it did not have).
    #[test]
    fn the_region_that_moves_most_is_named() {
        let sized = |name: &str, (a, b): (f64, f64), area_m2: [f64; 2]| RegionChange {
            name: name.to_owned(),
            separated_fraction: [a, b],
            delta_points: 100.0 * (b - a),
            verdict: Default::default(),
            words: Default::default(),
            slope_deg: [None, None],
            area_m2,
        };
        let change = |name: &str, a: f64, b: f64| sized(name, (a, b), [1.0, 1.0]);
        let regions = [
            change("rear window", 0.12, 0.10),
            change("boot deck", 0.66, 0.85),
        ];
        assert_eq!(
            largest_region_change(&regions, ["A", "B"]).as_deref(),
            Some("on the boot deck, 66 % separated in A against 85 % in B")
        );
        assert_eq!(largest_region_change(&regions[..1], ["A", "B"]), None);
        // A tail cut shorter: the base grows, separated all over in both,
        // by more separated area than the underbody's share moves.
        let cut = [
            sized("rear underbody", (0.26, 0.17), [1.5, 1.3]),
            sized("base", (1.0, 1.0), [0.47, 1.15]),
        ];
        assert_eq!(
            largest_region_change(&cut, ["long", "cut"]).as_deref(),
            Some(
                "on the base, 0.47 m^2 separated in long against 1.15 m^2 in cut, 100 % against 100 % of it"
            )
        );
    }

    /// A lift difference is set against the noise of the whole body's
    /// lift (the demo coupe's at 40 m/s, 0.018 in C_L, 3.3 kg), whatever
    /// the axles do; an axle moving beyond it is said beside it.
    #[test]
    fn lift_differences_are_set_against_the_noise() {
        let d = |lift: f64, rear: f64| Deltas {
            lift_kg: lift,
            front_axle_kg: lift - rear,
            rear_axle_kg: rear,
            lift_noise_kg: 3.3,
            ..Deltas::default()
        };
        assert_eq!(
            lift_noise_words(&d(2.0, 1.0)),
            "the whole body's within the noise of about 3.3 kg"
        );
        // Within it in all, but an axle moves beyond it.
        assert_eq!(
            lift_noise_words(&d(1.0, 59.0)),
            "the whole body's within the noise of about 3.3 kg, but the split between the axles moves \
             by about 59 kg, beyond it"
        );
        assert_eq!(
            lift_noise_words(&d(-4.0, 1.0)),
            "whole-body differences under about 3.3 kg are noise"
        );
        // A blunt body, no panel noise measured: the floor is no guide.
        let blunt = Deltas {
            blunt_separated_percent: Some(24.4),
            ..d(-4.0, 1.0)
        };
        assert!(
            lift_noise_words(&blunt).ends_with(
                "are noise; that floor is the demo coupe's, 8.8 % separated, and 24 % of this surface \
                 is: its lift moves more with the panel count (a test pickup by up to 11 kg at the \
                 rear), so run both with --noise before reading a lift difference"
            ),
            "{}",
            lift_noise_words(&blunt)
        );
        let mut bluff = with_area(1.8622);
        bluff.separation.fraction = 0.244;
        assert_eq!(deltas(&bluff, &bluff).blunt_separated_percent, Some(24.4));
        bluff.separation.fraction = 0.088;
        assert_eq!(deltas(&bluff, &bluff).blunt_separated_percent, None);
        let mut s = with_area(1.8622);
        s.dynamic_pressure_pa = 963.2;
        let noise = deltas(&s, &s).lift_noise_kg;
        assert!((noise - 3.29).abs() < 0.01, "{noise}");
        // With the difference at three matched panel counts (a review's
        // roof-spoiler pair), those decide.
        let matched = |m: [f64; 3]| Deltas {
            matched_lift_kg: Some(m.to_vec()),
            lift_floor_kg: 5.0,
            ..d(m[0], m[0])
        };
        let w = lift_noise_words(&matched([-20.1, -4.9, -8.6]));
        assert!(
            w.starts_with("the whole body's within the panel noise: -20.1, -4.9 and -8.6 kg")
                && w.contains("not all of which clear the floor of 5.0 kg"),
            "{w}"
        );
        let w = lift_noise_words(&matched([-20.1, -16.0, -18.6]));
        assert!(
            w.starts_with("the whole body's holds at the runs' three matched"),
            "{w}"
        );
    }

    /// A region whose box takes in other surface in B is noted; one that
    /// keeps its surface is not.
    #[test]
    fn a_region_covering_other_surface_is_noted() {
        use crate::region::RegionResult;
        let with = |area: f64, slope: Option<f64>| {
            let mut s = with_area(1.9);
            let mut r = RegionResult::example("boot deck", 0.3, slope);
            r.area_m2 = area;
            s.regions = vec![r];
            s
        };
        let n = region_cover_notes(&with(0.95, None), &with(0.70, Some(18.2)));
        assert_eq!(n.len(), 1);
        assert!(
            n[0].starts_with(
                "the region \"boot deck\" covers other surface in B than in A (area 0.95 against 0.70 m^2, \
                 slope none against 18 degrees)"
            ),
            "{}",
            n[0]
        );
        assert!(region_cover_notes(&with(0.95, None), &with(0.90, None)).is_empty());
        // A slope that changes (the demo's rear windows, a review's boot
        // lid raised 30 mm) is the design.
        assert!(region_cover_notes(&with(0.5, Some(22.0)), &with(0.57, Some(38.0))).is_empty());
        assert!(region_cover_notes(&with(1.55, Some(3.1)), &with(1.59, Some(1.6))).is_empty());
        // A deck box that the window's foot moved into reads a slant.
        let n = region_cover_notes(&with(0.94, Some(1.6)), &with(0.92, Some(24.52)));
        assert!(n[0].contains("slope 2 degrees against 25 degrees"), "{n:?}");
        // On about the same area it may be the part turning in its box (a
        // review's spoiler kick-up): said as either.
        assert!(
            n[0].contains("reads another kind of surface") && n[0].ends_with(KIND_ONLY_WORDS),
            "{n:?}"
        );
        // Its area alone: the part may have grown with the change.
        let n = region_cover_notes(&with(0.47, None), &with(1.15, None));
        assert_eq!(n.len(), 1);
        assert!(
            n[0].starts_with(
                "the region \"boot deck\" covers more surface in B than in A (area 0.47 against 1.15 m^2, \
                 slope none in both)"
            ) && n[0].ends_with(SIZE_ONLY_WORDS),
            "{n:?}"
        );
    }

    /// Two ride heights: both clearances named, with what the lift then
    /// rests on; one clearance (within 2 mm), or free air, raises no note.
    #[test]
    fn two_clearances_are_named() {
        let at = |lowest: f64, ground: Option<f64>| {
            let mut s = with_area(1.9);
            s.mesh.ground_z = ground;
            s.mesh.preparation =
                serde_json::json!({"bounds": [[0.0, -0.9, lowest], [4.5, 0.9, 1.3]]});
            s
        };
        let n = clearance_note(&at(0.12, Some(0.0)), &at(0.14, Some(0.0))).unwrap();
        assert!(
            n.starts_with(
                "the ground clearances differ (120 and 140 mm from the lowest point to the ground): the \
                 lift across ride heights moves mostly with the smooth underbody's suction"
            ),
            "{n}"
        );
        assert_eq!(
            clearance_note(&at(0.12, Some(0.0)), &at(0.1202, Some(0.0))),
            None
        );
        // A scan's noise at its lowest point: one millimetre is one height.
        assert_eq!(
            clearance_note(&at(0.150, Some(0.0)), &at(0.149, Some(0.0))),
            None
        );
        assert!(clearance_note(&at(0.150, Some(0.0)), &at(0.147, Some(0.0))).is_some());
        assert_eq!(clearance_note(&at(0.12, None), &at(0.14, None)), None);
    }

    /// The drag difference is also given as a share of A's drag, in
    /// newtons and in kilowatts at B's speed (the roof-box review: 69.1
    /// counts on A's 2.325 m^2 at 785 Pa).
    #[test]
    fn the_drag_difference_reads_in_percent_newtons_and_kilowatts() {
        let mut c = Comparison::default();
        c.a.cd = 0.164;
        c.b.speed = 36.11;
        c.deltas.drag_counts = 69.1;
        c.deltas.drag_force_n = 0.0691 * 2.325 * 785.0;
        assert_eq!(
            drag_share_words(&c),
            " (+42 % of A's, +126 N, +4.6 kW at 36.11 m/s (130 km/h))"
        );
        c.a.cd = 0.0;
        assert_eq!(drag_share_words(&c), "");
    }

    /// Edge holds that move the two runs' drag alike say nothing; apart
    /// by the noise floor or more, a note gives both.
    #[test]
    fn a_difference_resting_on_the_edge_hold_is_noted() {
        let held = |counts: f64| {
            let mut s = with_area(2.3);
            s.edge_hold = Some(crate::summary::EdgeHold {
                panels: 9,
                drag_counts: counts,
                ..Default::default()
            });
            s
        };
        assert_eq!(edge_hold_note(&held(20.0), &held(23.0)), None);
        assert_eq!(
            edge_hold_note(&with_area(2.3), &held(94.0)).unwrap(),
            "holding the suction beside sharp edges that no surface streamline crossed moved A's \
             drag by +0 counts and B's by +94 (each run's warning says where): +94 counts of the \
             difference rest on that rule, not on a computed pressure"
        );
    }

    /// A rake pair is told by the floor at each axle, not by the lowest
    /// point (a review's 1-degree rake read "26 mm lower" where the rear
    /// had risen 22 mm).
    #[test]
    fn floors_at_the_axles_tell_a_rake() {
        let at = |front: f64, rear: f64| {
            let mut s = with_area(1.9);
            s.mesh.ground_z = Some(0.0);
            s.reference.front_axle_x_m = 0.85;
            s.reference.rear_axle_x_m = 3.35;
            s.reference.floor_heights_m = Some([front, rear]);
            s
        };
        let (level, raked) = (at(0.101, 0.102), at(0.080, 0.124));
        assert_eq!(
            raked.reference.floor_words().unwrap(),
            "front axle 80 mm, rear 124 mm (1.01 degrees nose down)"
        );
        let n = clearance_note(&level, &raked).unwrap();
        assert!(
            n.starts_with(
                "the floors stand at other heights (B's floor 21 mm lower (80 against 101 mm) at the \
                 front axle and 22 mm higher (124 against 102 mm) at the rear, pitched 1.0 degrees \
                 more nose down)"
            ),
            "{n}"
        );
        // A raise without a rake is told by the lowest points, as before.
        assert_eq!(clearance_note(&level, &at(0.121, 0.122)), None);
    }

    #[test]
    fn reference_areas_a_fraction_of_a_percent_apart_raise_no_note() {
        // The demo's two coupes: 1.8745 and 1.8702 m^2, 0.2 % apart, move
        // every coefficient by 0.2 %, under a drag count at C_D 0.2.
        assert_eq!(reference_note(&with_area(1.8745), &with_area(1.8702)), None);
        // 2 % apart: noted, with the difference.
        let n = reference_note(&with_area(2.0), &with_area(1.96)).unwrap();
        assert!(n.contains("differ by 2.0 %"), "{n}");
    }

    /// B at 50 m/s against A at 40: the kg and N differences take A's at
    /// B's dynamic pressure (the review's -157.66 against -94.53 kg had
    /// read -63 kg; like for like -9.96), the coefficients' as they are.
    #[test]
    fn loads_at_different_speeds_are_compared_at_b_s_dynamic_pressure() {
        let side = |speed: f64, lift: f64, cl: f64| {
            let mut s = with_area(1.86);
            s.dynamic_pressure_pa = 0.5 * 1.204 * speed * speed;
            s.lift_kg.total = lift;
            s.lift_kg.front_axle = 0.25 * lift;
            s.lift_kg.rear_axle = 0.75 * lift;
            s.drag_estimate.force_n = 100.0 * speed * speed / 1600.0;
            s.coefficients.lift = cl;
            s
        };
        let (a, b) = (side(40.0, -94.53, -0.10), side(50.0, -157.66, -0.11));
        let d = deltas(&a, &b);
        let like = -157.66 - (-94.53) * (50.0f64 / 40.0).powi(2);
        assert!(
            (d.lift_kg - like).abs() < 1e-9 && (d.lift_kg + 9.96).abs() < 0.01,
            "{d:?}"
        );
        assert!((d.rear_axle_kg - 0.75 * like).abs() < 1e-9, "{d:?}");
        assert!(d.drag_force_n.abs() < 1e-9, "{d:?}");
        assert!((d.lift_coefficient + 0.01).abs() < 1e-12, "{d:?}");
        assert!((d.a_loads_scaled_by.unwrap() - 1.5625).abs() < 1e-12);
        // The same speed: nothing scaled.
        let d = deltas(&a, &side(40.0, -100.0, -0.1));
        assert!(
            d.a_loads_scaled_by.is_none() && (d.lift_kg + 5.47).abs() < 1e-9,
            "{d:?}"
        );
    }

    /// The review's coupe with `reference.area = 2.1` against its own
    /// frontal area of 1.862 m^2: the same drag force had been "B has lower
    /// drag by 16.8 counts", resolved. On drag area it is no difference,
    /// and the verdict says how it ranked.
    #[test]
    fn reference_areas_that_differ_compare_drag_areas() {
        let side = |area: f64, force: f64| {
            let mut s = with_area(area);
            let cd = 0.15 * force / area;
            s.coefficients.drag = cd;
            s.coefficients.drag_pressure = 0.8 * cd;
            s.coefficients.drag_friction = 0.2 * cd;
            s.drag_estimate.cd = cd;
            s.drag_estimate.cd_low = cd - 0.005;
            s.drag_estimate.cd_high = cd + 0.03;
            s
        };
        let (a, b) = (side(1.862, 1.862), side(2.1, 1.862));
        assert!(1000.0 * (a.coefficients.drag - b.coefficients.drag) > 16.0);
        let v = drag_verdict(&a, &b, None);
        assert!(!v.resolved && v.delta_counts.abs() < 1e-9, "{v:?}");
        assert_eq!(v.common_area_m2, Some(1.862));
        assert!(
            v.text.contains("within the noise floor")
                && v.text.contains("drag area C_D·A")
                && v.text.contains("A's reference area of 1.862 m^2"),
            "{}",
            v.text
        );
        let d = deltas(&a, &b);
        assert!(
            d.drag_counts.abs() < 1e-9 && d.drag_pressure_counts.abs() < 1e-9,
            "{d:?}"
        );
        // 10 % less drag force on B's larger area: 15 counts lower on A's.
        let b = side(2.1, 0.9 * 1.862);
        let v = drag_verdict(&a, &b, None);
        assert!(v.resolved && (v.delta_counts + 15.0).abs() < 1e-9, "{v:?}");
        assert!(
            v.text.starts_with("B has lower drag by 15.0 counts"),
            "{}",
            v.text
        );
        // Areas within 1 %: coefficients as they are.
        let v = drag_verdict(&side(1.862, 1.862), &side(1.87, 1.862), None);
        assert_eq!(v.common_area_m2, None);
    }

    /// The wrap note: one run wrapped and the other not is noted, naming
    /// which; both or neither are not.
    #[test]
    fn one_run_wrapped_and_the_other_not_is_noted() {
        let wrapped = |w: bool| {
            let mut s = with_area(1.86);
            if w {
                s.mesh.preparation = serde_json::json!({"wrap": {"contact_area": 0.0}});
            }
            s
        };
        let n = wrap_note(&wrapped(false), &wrapped(true)).unwrap();
        assert!(n.starts_with("B's surface was wrapped"), "{n}");
        assert!(wrap_note(&wrapped(true), &wrapped(true)).is_none());
        assert!(wrap_note(&wrapped(false), &wrapped(false)).is_none());
    }

    /// The rim note: a flat nose's 0.31 m^2 beside sharp front edges
    /// against none on a 1.86 m^2 reference area is noted (it had been a
    /// 22-count win with no word); a few hundredths either way are not.
    #[test]
    fn rims_that_differ_are_noted() {
        let with_rims = |rim: f64| {
            let mut s = with_area(1.86);
            s.separation.rim_m2 = rim;
            s
        };
        let none = SurfaceDeltas::default();
        let n = rim_note(&with_rims(0.0), &with_rims(0.31), &none).unwrap();
        assert!(n.contains("0.00 m^2 on A and 0.31 m^2 on B"), "{n}");
        assert!(!n.contains("did not change there"), "{n}");
        assert!(rim_note(&with_rims(0.02), &with_rims(0.03), &none).is_none());
        // Rims at the nose where only the tail changed: the panelling's.
        let mut nose = with_rims(0.22);
        nose.separation.rim_x_m = [0.0, 0.28];
        nose.reference.length_m = 4.4;
        let tail = SurfaceDeltas {
            changed_x_m: Some([3.7, 4.4]),
            ..SurfaceDeltas::default()
        };
        let n = rim_note(&with_rims(0.0), &nose, &tail).unwrap();
        assert!(
            n.contains("the shape did not change there (x 0.00 to 0.28 m; it changed from x 3.70 to 4.40 m)"),
            "{n}"
        );
        // The change reaching the edges: the held area moves with it (a
        // review's raised nose).
        let front = SurfaceDeltas {
            changed_x_m: Some([0.0, 0.9]),
            ..SurfaceDeltas::default()
        };
        let n = rim_note(&with_rims(0.0), &nose, &front).unwrap();
        assert!(
            n.ends_with("; the change reaches the edges there (x 0.00 to 0.28 m), so the area held at the edges' bound moves with the shape itself"),
            "{n}"
        );
        // Which reason heads the verdict: the held area moving, or an
        // edge's rounding (away from the change, or no change found).
        assert_eq!(
            rim_place(&with_rims(0.0), &nose, &front),
            RimPlace::Reaches([0.0, 0.28])
        );
        assert!(matches!(
            rim_place(&with_rims(0.0), &nose, &tail),
            RimPlace::Clear(..)
        ));
        assert_eq!(rim_place(&with_rims(0.0), &nose, &none), RimPlace::Unknown);
        // A clear 20-count difference is then no win, and says why.
        let drag = |s: &mut Summary, cd: f64| {
            s.coefficients.drag = cd;
            s.drag_estimate.cd = cd;
            s.drag_estimate.cd_low = cd - 0.01;
            s.drag_estimate.cd_high = cd + 0.2;
        };
        let (mut a, mut b) = (with_rims(0.0), with_rims(0.31));
        drag(&mut a, 0.150);
        drag(&mut b, 0.170);
        let v = drag_verdict(&a, &b, Some(ModelDoubt::Rims));
        assert!(!v.resolved && v.leaning == "higher", "{v:?}");
        assert!(
            v.text
                .starts_with("no winner: the sharp front edges the flow leaves differ")
                && v.text.contains("13-30 %")
                && v.text.contains("a rounding near the rim radius"),
            "{}",
            v.text
        );
        // The change reaches the edges (a nose raised, no radius
        // changed): the reason says the held area moves with the shape,
        // not that a rounding reads either way.
        let v = drag_verdict(&a, &b, Some(ModelDoubt::RimsMoved));
        assert!(
            v.text
                .starts_with("no winner: the sharp front edges the flow leaves differ")
                && v.text.contains("moves with the changed shape")
                && !v.text.contains("rim radius"),
            "{}",
            v.text
        );
    }

    /// The slope note: a rear window whose slope changes and reaches 25
    /// degrees (28 against 30, the demo's 22 against 38, and 15 against a
    /// 25-degree window read as 24.48 on 3,000 panels) is noted; slopes
    /// below it (12 against 20, 15 against 23.9) or the same within a
    /// degree are not.
    #[test]
    fn a_rear_slope_reaching_the_critical_range_is_noted() {
        let with_slope = |slope: f64| {
            let mut s = Summary::default();
            s.regions.push(crate::region::RegionResult::example(
                "rear window",
                0.1,
                Some(slope),
            ));
            s
        };
        let note = |a: f64, b: f64| slope_note(&with_slope(a), &with_slope(b), Some([0.0, 5.0]));
        assert!(
            note(28.0, 30.0)
                .is_some_and(|n| n.contains("\"rear window\" differs (28 degrees in A, 30 in B)"))
        );
        assert!(note(22.0, 38.0).is_some());
        assert!(note(15.0, 24.48).is_some());
        assert!(note(15.0, 23.9).is_none());
        assert!(note(12.0, 20.0).is_none());
        assert!(note(30.0, 30.4).is_none());
        // Two base-like slopes (a near-upright tailgate read on two
        // panellings) are no slant change; a slant becoming one is.
        assert!(note(75.0, 78.0).is_none());
        assert!(note(35.0, 60.0).is_some());
        // Where the shape changed clear of the region's box (a windscreen
        // ahead of a rear deck read 38 and 40 degrees on two panellings),
        // or nowhere, the slopes differ by the panelling alone.
        let mut boxed = with_slope(40.0);
        boxed.reference.length_m = 4.0;
        boxed.case = serde_json::json!({"region": [{"name": "rear window", "x": [3.3, 4.0]}]});
        let far = slope_note(&with_slope(38.0), &boxed, Some([1.5, 2.1]));
        assert!(far.is_none());
        assert!(slope_note(&with_slope(38.0), &boxed, None).is_none());
        assert!(slope_note(&with_slope(38.0), &boxed, Some([1.5, 3.25])).is_some());
    }

    /// Two runs 4 times apart in length (a 1:4 model against the car) get
    /// the scale note with both Reynolds numbers; variants of one car do
    /// not.
    #[test]
    fn another_size_is_not_compared_as_a_shape() {
        let run = |length: f64, re: f64| {
            let mut s = Summary::default();
            s.reference.length_m = length;
            s.reynolds_number = re;
            s.coefficients.drag = 0.157;
            s
        };
        let note = scale_note(&run(1.125, 3.36e6), &run(4.5, 3.36e6)).unwrap();
        assert!(
            note.starts_with("B's reference length is 4.00 times A's (4.50 against 1.12 m)")
                && note.contains("(A 3.36 million, B 3.36 million: C_D 0.157 against 0.157"),
            "{note}"
        );
        assert!(scale_note(&run(4.5, 1e7), &run(1.125, 1e7)).is_some());
        assert!(scale_note(&run(4.5, 1e7), &run(4.7, 1e7)).is_none());
    }

    /// A run with regions on under half of its suggested panels (2,992 of
    /// 6,500, the demo coupe's case whose boot deck read attached) is
    /// noted, naming which; at the suggested count, or without regions,
    /// it is not.
    #[test]
    fn a_coarse_run_with_regions_is_noted() {
        let run = |panels: usize, regions: bool| {
            let mut s = Summary::default();
            s.mesh.panels = panels;
            s.mesh.preparation = serde_json::json!({ "suggested_panels": 6500 });
            s.separated_wakes = Some(crate::summary::SeparatedWakes::default());
            if regions {
                s.regions
                    .push(crate::region::RegionResult::example("boot deck", 0.0, None));
            }
            s
        };
        assert!(
            coarse_note(&run(2992, true), &run(6456, true))
                .is_some_and(|n| n.starts_with("A was solved on under half"))
        );
        assert!(
            coarse_note(&run(2992, true), &run(2992, true))
                .is_some_and(|n| n.starts_with("both runs were"))
        );
        assert!(coarse_note(&run(6456, true), &run(6456, true)).is_none());
        assert!(coarse_note(&run(2992, false), &run(2992, false)).is_none());
    }

    /// The review's car compared with the same car exported from its nose
    /// (0.881 m along x): noted, first; a variant in place is not.
    #[test]
    fn a_body_in_other_axes_is_noted() {
        let folder = |dx: f64| ResultFolder {
            path: PathBuf::from("r"),
            summary: with_area(1.9),
            panels: [[0.0, -0.9, 0.2], [4.6, 0.9, 1.35], [2.0, 0.0, 0.8]]
                .iter()
                .map(|c| folder::PanelRow {
                    centroid: nalgebra::Point3::new(c[0] + dx, c[1], c[2]),
                    normal: nalgebra::Vector3::z(),
                    area: 1.0,
                    cp: 0.0,
                    state: PanelState::Turbulent,
                    risk: 0.0,
                })
                .collect(),
        };
        let (a, b) = (folder(0.0), folder(0.881));
        let mut surface = SurfaceDeltas {
            unchanged_share: 0.2,
            ..SurfaceDeltas::default()
        };
        let notes = notes(&a, &b, &surface, Vec::new());
        assert!(
            notes[0].starts_with("B's body is the size of A's but lies (+0.881, +0.000, +0.000) m"),
            "{notes:?}"
        );
        surface.unchanged_share = 0.85;
        assert_eq!(offset_note(&a, &b, &surface), None);
        surface.unchanged_share = 0.2;
        assert_eq!(offset_note(&a, &folder(0.0), &surface), None);
        // Moved onto each other, the bodies coincide, and the note says by
        // how much they were moved instead.
        let mapping = map_a_onto_b(&a, &b);
        assert_eq!(mapping.shift, nalgebra::Vector3::new(0.881, 0.0, 0.0));
        assert!(mapping.distance.iter().all(|&d| d < 1e-12));
        let surface = surface_deltas(&a, &b, &mapping);
        assert_eq!(
            offset_note(&a, &b, &surface).as_deref(),
            Some(
                "B's body lies (+0.881, +0.000, +0.000) m from A's in its file: compare moved A's by as \
                 much, where the two coincide (100 % of B's surface then meets A's), so the pictures and \
                 the separation notes compare the same places on the body"
            )
        );
    }

    /// A body raised by 20 mm (a ride-height variant of a built-in shape)
    /// is compared with itself where it now lies (a review's ride-height
    /// compare had drawn a difference over the nose); a shape change that
    /// lowers the lowest point (a splitter) keeps the rest of the body in
    /// place.
    #[test]
    fn a_raised_body_is_mapped_where_it_lies() {
        let grid: Vec<[f64; 3]> = (0..10)
            .flat_map(|i| (0..4).map(move |j| [0.45 * i as f64, -0.9 + 0.6 * j as f64, 0.12]))
            .collect();
        let folder = |points: &[[f64; 3]], dz: f64| ResultFolder {
            path: PathBuf::from("r"),
            summary: with_area(1.9),
            panels: points
                .iter()
                .map(|c| folder::PanelRow {
                    centroid: nalgebra::Point3::new(c[0], c[1], c[2] + dz),
                    normal: -nalgebra::Vector3::z(),
                    area: 0.05,
                    cp: c[0],
                    state: PanelState::Turbulent,
                    risk: 0.0,
                })
                .collect(),
        };
        let a = folder(&grid, 0.0);
        let m = map_a_onto_b(&a, &folder(&grid, 0.02));
        assert!((m.shift - nalgebra::Vector3::new(0.0, 0.0, 0.02)).norm() < 1e-12);
        assert!(m.distance.iter().all(|&d| d < 1e-12));
        let mut splitter = grid.clone();
        splitter.push([0.2, 0.0, 0.07]);
        let m = map_a_onto_b(&a, &folder(&splitter, 0.0));
        assert_eq!(m.shift, nalgebra::Vector3::zeros());
        assert!(m.distance[..grid.len()].iter().all(|&d| d < 1e-12));
    }

    /// A part B adds (a plate 0.25 m over a deck, as a rear wing) is new
    /// surface: A's deck stayed where it was, so A's state is not carried
    /// up onto it, and a part only A has shows in the distance measured
    /// the other way; a deck raised by 0.25 m is A's surface moved, which
    /// keeps A's state (a review's new wing had read 90 % "in separated
    /// flow" from the deck below it, and collect had called the body
    /// without it within 24 mm of the winged one).
    #[test]
    fn a_part_added_in_b_is_new_surface() {
        let deck: Vec<[f64; 3]> = (0..10)
            .flat_map(|i| (0..4).map(move |j| [0.1 * f64::from(i), 0.1 * f64::from(j), 1.0]))
            .collect();
        let wing: Vec<[f64; 3]> = (0..4)
            .flat_map(|i| (0..4).map(move |j| [0.3 + 0.1 * f64::from(i), 0.1 * f64::from(j), 1.25]))
            .collect();
        let folder = |points: &[[f64; 3]], state: PanelState| ResultFolder {
            path: PathBuf::from("r"),
            summary: with_area(1.9),
            panels: points
                .iter()
                .map(|c| folder::PanelRow {
                    centroid: nalgebra::Point3::new(c[0], c[1], c[2]),
                    normal: nalgebra::Vector3::z(),
                    area: 0.01,
                    cp: 0.0,
                    state,
                    risk: 0.0,
                })
                .collect(),
        };
        let bare = folder(&deck, PanelState::Separated);
        let winged = folder(&[deck.clone(), wing].concat(), PanelState::Turbulent);
        let near = 0.02;
        let m = map_a_onto_b(&bare, &winged);
        let a_off_b = a_to_b_distance(&bare, &winged, &m);
        let new = new_in_b(&m, &a_off_b, near);
        assert_eq!(new.iter().filter(|&&n| n).count(), 16, "{new:?}");
        assert!(new[..deck.len()].iter().all(|&n| !n));
        // The other way round: the wing is A's, off B's surface by 0.25 m.
        let m = map_a_onto_b(&winged, &bare);
        let back = a_to_b_distance(&winged, &bare, &m);
        assert!(m.distance.iter().all(|&d| d < 1e-9));
        assert!((back.iter().copied().fold(0.0, f64::max) - 0.25).abs() < 1e-9);
        assert!(new_in_b(&m, &back, near).iter().all(|&n| !n));
        // A deck raised whole: its panels find A's deck, itself off B's.
        let raised: Vec<[f64; 3]> = deck.iter().map(|&[x, y, z]| [x, y, z + 0.25]).collect();
        let mut b = folder(&raised, PanelState::Turbulent);
        // Raised, not shifted onto it: a taller part beside the deck keeps
        // the least corner where it was.
        let post = [[0.0, 0.0, 0.5]];
        b.panels.extend(folder(&post, PanelState::Turbulent).panels);
        let mut a = folder(&deck, PanelState::Separated);
        a.panels.extend(folder(&post, PanelState::Separated).panels);
        let m = map_a_onto_b(&a, &b);
        assert_eq!(m.shift, nalgebra::Vector3::zeros());
        let new = new_in_b(&m, &a_to_b_distance(&a, &b, &m), near);
        assert!(new.iter().all(|&n| !n), "{new:?}");
    }

    /// A half model against the whole body of the same shape: A's mirror
    /// image stands for B's other half, its panels' values their own (a
    /// review's pickup had read B's other half as reshaped), and a note
    /// says one is a half model; a whole body against a half needs no
    /// image.
    #[test]
    fn a_half_model_is_mirrored_onto_a_whole_body() {
        let grid = |ys: &[f64]| -> Vec<[f64; 3]> {
            (0..10)
                .flat_map(|i| ys.iter().map(move |&y| [0.45 * f64::from(i), y, 0.12]))
                .collect()
        };
        let folder = |points: &[[f64; 3]], half: bool| {
            let mut summary = with_area(1.9);
            summary.mesh.symmetry_plane = half;
            ResultFolder {
                path: PathBuf::from("r"),
                summary,
                panels: points
                    .iter()
                    .map(|c| folder::PanelRow {
                        centroid: nalgebra::Point3::new(c[0], c[1], c[2]),
                        normal: -nalgebra::Vector3::z(),
                        area: 0.05,
                        cp: c[0] + c[1].abs(),
                        state: PanelState::Turbulent,
                        risk: 0.0,
                    })
                    .collect(),
            }
        };
        let half = folder(&grid(&[0.15, 0.45, 0.75]), true);
        let whole = folder(&grid(&[-0.75, -0.45, -0.15, 0.15, 0.45, 0.75]), false);
        let m = map_a_onto_b(&half, &whole);
        assert_eq!(m.shift, nalgebra::Vector3::zeros());
        assert!(m.distance.iter().all(|&d| d < 1e-12), "{:?}", m.distance);
        assert!(m.source.iter().all(|&j| j < half.panels.len()));
        let f = mapped_fields(&half, &whole, &m);
        assert!(
            f.delta_cp.iter().all(|d| d.abs() < 1e-12),
            "{:?}",
            f.delta_cp
        );
        let note = half_and_whole_note(&half.summary, &whole.summary).unwrap_or_default();
        assert!(
            note.starts_with("A was solved as a half model and B as a whole body"),
            "{note}"
        );
        assert!(half_and_whole_note(&whole.summary, &whole.summary).is_none());
        // The other way round: B's half lies on A's whole body as it is.
        assert!(!a_mirrored(&whole, &half));
        let back = map_a_onto_b(&whole, &half);
        assert!(back.distance.iter().all(|&d| d < 1e-12));
    }

    #[test]
    fn the_separation_note_gives_one_share_and_says_what_the_stream_sees() {
        // The demo's figures: 1.987 m^2 of 22.28 m^2 and 2.616 m^2 of
        // 21.87 m^2; the changed surface projected along the stream 0.26 m^2 of
        // 1.87 m^2, 0.206 m^2 net.
        let side = |area: f64, wetted: f64| {
            let mut s = with_area(1.87);
            s.mesh.wetted_area_m2 = wetted;
            s.separation.area_m2 = area;
            s.separation.fraction = area / wetted;
            s
        };
        let (a, b) = (side(1.987, 22.28), side(2.616, 21.87));
        let surface = SurfaceDeltas {
            separation_change_frontal_m2: 0.26,
            separation_net_frontal_m2: 0.206,
            ..SurfaceDeltas::default()
        };
        let n = separation_note(&a, &b, &surface).unwrap();
        // The points are those of the headline (B's share minus A's).
        let points = 100.0 * (b.separation.fraction - a.separation.fraction);
        assert!(n.contains(&format!("{points:+.2} points")), "{n}");
        assert!(!n.contains("wetted area"), "{n}");
        assert!(
            n.contains(
                "projected along the stream adds up to 11.0 % of A's reference area (13.9 % counting"
            ),
            "{n}"
        );
        assert!(n.contains("least reliable where separation moves"), "{n}");
    }

    /// Where separation appears and disappears, and the separated area
    /// difference, reconcile in words (the demo's comparison: 0.858 -
    /// 0.056 = 0.802 beside +0.657, since A's 1.954 m^2 read 1.809 on B's
    /// panels).
    #[test]
    fn appearing_and_disappearing_separation_reconcile_with_the_area_difference() {
        let mut c = Comparison::default();
        c.a.separated_area_m2 = 1.954;
        c.b.separated_area_m2 = 2.611;
        c.deltas.separated_area_m2 = 2.611 - 1.954;
        c.surface.separation_appears_m2 = 0.858;
        c.surface.separation_disappears_m2 = 0.056;
        // B's own separated area is where both separate and where it appears.
        c.surface.separated_in_both_m2 = 2.611 - 0.858;
        let w = separation_change_words(&c);
        assert!(
            w.starts_with(
                "separation appears on 0.858 m^2 and disappears on 0.056 m^2 of B's surface (net +0.802)"
            ),
            "{w}"
        );
        assert!(
            w.contains("A's separated area reads 1.809 m^2 against 1.954 on its own"),
            "{w}"
        );
        assert!(
            w.contains("(+0.657 m^2, each run on its own panels)"),
            "{w}"
        );
        // B's separated area less A's carried onto B's panels is the net.
        let net = c.b.separated_area_m2 - a_separated_on_b(&c.surface);
        assert!((net - 0.802).abs() < 1e-9, "{net}");
    }
}
