//! Named regions of the surface (`[[region]]` in a case): how much of each
//! the boundary layer calls separated, so "does the rear window keep the
//! flow?" gets a number beside the pictures.
//!
//! A region is every panel whose centroid lies in the given coordinate
//! ranges (metres, the body as solved: after `geometry.units`) and whose
//! outward normal faces the given way, seen from that way (nothing of the
//! body stands in front of it there). On a half model the mirror half's
//! panels count too (each real panel is tested as itself and as its
//! image), so a region means the same on a half and on a whole body.

use anyhow::{Result, bail};
use serde::{Deserialize, Serialize};
use tuft_mesh::{PanelMesh, Point, Vector};
use tuft_solver::boundary_layer::{BoundaryLayer, FlowState};

/// `[[region]]` as written.
#[derive(Debug, Clone, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct RegionSection {
    /// Name shown in the summary, the report and comparisons.
    pub name: String,
    /// Range of x, m (absent: any).
    pub x: Option<[f64; 2]>,
    /// Range of y, m.
    pub y: Option<[f64; 2]>,
    /// Range of z, m.
    pub z: Option<[f64; 2]>,
    /// Which way the panels face: `up`, `down`, `front`, `rear` or `side`
    /// (absent: any).
    pub facing: Option<String>,
    /// The region may hold no panel (a part only some variants of a sweep
    /// have, as a roof box): such a body leaves it out of its results,
    /// with a note, instead of refusing the case.
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub optional: bool,
}

/// A panel faces a direction when its outward normal's component along
/// it exceeds this (about 60 degrees from it at most). Our choice.
pub const FACING_COS: f64 = 0.5;

/// How near a regime line ([`VERDICT_LINES`]) a region's separated share
/// may lie before its verdict is called provisional, measured by
/// `bench/drag_noise` (2026-12-03): over runs of the built-in coupe at 40
/// m/s with 3,808 to 4,428 panels, a region's share scattered about its
/// trend by 2.15 points (boot deck) and 1.48 (rear window), twice that
/// about 4.3; rounded up to 5 because a review's coupe at 130 km/h swung
/// further, its boot deck 12, 24 and 17 % separated at 3,700, 4,000 and
/// 4,300 panels, attached and partly separated by turns.
pub const VERDICT_NOISE: f64 = 0.05;

/// Share of a region's area separated below which it is called attached,
/// and from which it is called separated; between them, partly
/// separated. The same lines the slant-back validation draws between the
/// published regimes (`tests/tests/separated_wakes.rs`); our choice.
pub const VERDICT_LINES: [f64; 2] = [0.2, 0.6];

/// One region's result.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct RegionResult {
    /// Its name.
    pub name: String,
    /// Panels in it (mirror images counted).
    pub panels: usize,
    /// Its area, m^2.
    pub area_m2: f64,
    /// Share of its area the boundary layer calls separated.
    pub separated_fraction: f64,
    /// Area-mean separation risk (0 far from separating, 1 separated).
    pub mean_risk: f64,
    /// "attached", "partly separated" or "separated" (see
    /// [`VERDICT_LINES`]).
    pub verdict: String,
    /// The least and the most separated share over this run and its
    /// sensitivity runs (the boundary layer marched again with the
    /// separation threshold at H 1.8 and 2.8 and fully turbulent, as for
    /// the drag band).
    #[serde(default)]
    pub separated_band: [f64; 2],
    /// For a region whose surface faces up (a rear window, a slant, a
    /// boot deck, a roof): its slope below the horizontal, degrees,
    /// positive where it falls toward the tail, negative where it rises
    /// (see [`surface_slope`]); null for one that does not face up (a
    /// base, a floor, a flank).
    #[serde(default)]
    pub slope_deg: Option<f64>,
    /// How firm the verdict is ([`RegionResult::firmness`]): "firm",
    /// "provisional" (within [`VERDICT_NOISE`] of a regime line) or
    /// "uncertain" (the sensitivity runs' range crosses a line), for a
    /// script reading the summary.
    #[serde(default)]
    pub standing: String,
    /// On a whole body centred on y = 0 at zero yaw, the separated share
    /// of the region's left (y < 0) and right half when the two give
    /// different verdicts: on a symmetric body the separated-flow model
    /// has drifted to one side (a review's notchback read its diffuser
    /// "partly separated, 28 %, firm" from a strip along one sill), and
    /// the verdict is uncertain.
    #[serde(default)]
    pub sides: Option<[f64; 2]>,
    /// With `--noise`, the separated share at the run's own panel count
    /// and at the two others (`noise::PanelNoise::region_fractions`); the
    /// verdict is uncertain when they give two verdicts.
    #[serde(default)]
    pub at_counts: Option<Vec<f64>>,
    /// The run was solved on under half of the panels suggested for its
    /// body ([`crate::summary::Summary::under_half_suggested`]): its
    /// verdict is at best provisional, wherever its share lies (a review's
    /// mirror-flank box read 32 % separated, "firm", on a whole body at
    /// 3,500 of 8,000 suggested panels, and 2 % as a half model).
    #[serde(default)]
    pub coarse_mesh: bool,
    /// Share of the region's area beside sharp front edges the flow
    /// leaves (the rim zone), where the pressure is held at the free
    /// streamline's bound rather than computed: from
    /// [`RIM_REGION_SHARE`] on, its verdict rests on that rule and is
    /// provisional at best (a review's bonnet read "attached" with its
    /// leading edge's suction replaced by the dead water's pressure).
    #[serde(default)]
    pub rim_fraction: f64,
    /// The forces on the region's own surface: its panels' pressure (the
    /// dead water's on separated panels, gauge on the free stream's) and
    /// skin friction, as the run's loads take them; on a half model, with
    /// its mirror image. `None` in a result read from an older summary.
    #[serde(default)]
    pub loads: Option<RegionLoads>,
}

/// The forces on a region's own surface ([`RegionResult::loads`]): what a
/// part (a spoiler, a diffuser, a window) carries of the run's drag and
/// lift (a review had summed a wing's force from panels.csv by hand).
#[derive(Debug, Clone, Copy, Serialize, Deserialize, PartialEq, Default)]
pub struct RegionLoads {
    /// Drag on it, counts on the run's reference area.
    pub drag_counts: f64,
    /// Lift on it, kg at the run's speed (negative: downforce).
    pub lift_kg: f64,
    /// Its lift's share on the front and the rear axle, kg.
    pub front_axle_kg: f64,
    /// As `front_axle_kg`, rear.
    pub rear_axle_kg: f64,
}

impl RegionLoads {
    /// "carries 12 drag counts and -8 kg of lift (front +1, rear -9)", the
    /// axles only when `axles` (a run with them).
    pub fn words(&self, axles: bool) -> String {
        let [lift, front, rear] =
            crate::output::lift_set([self.lift_kg, self.front_axle_kg, self.rear_axle_kg]);
        let split = if axles {
            format!(" (front {front}, rear {rear})")
        } else {
            String::new()
        };
        format!(
            "its own surface carries {:.0} drag counts and {lift} kg of lift{split}",
            self.drag_counts
        )
    }
}

/// Share of a region's area in the rim zone from which its verdict is
/// provisional at best ([`RegionResult::rim_fraction`]; our choice: a
/// quarter, more than an edge strip of a large panel).
pub const RIM_REGION_SHARE: f64 = 0.25;

/// Share of a region's area in the rim zone from which its words say so
/// (our choice: a review's bonnet, 12 % beside its leading edge, read
/// "attached" with nothing said of the held pressure).
pub const RIM_REGION_WORDS: f64 = 0.05;

/// Why a verdict on a coarse mesh is provisional ([`RegionResult::coarse_mesh`]).
pub const COARSE_WORDS: &str = "solved on under half of the panels suggested for the body, where a verdict can still move with the count";

impl RegionResult {
    /// A region result for tests: `fraction` separated (the band that
    /// alone), its verdict, and `slope_deg`.
    #[cfg(test)]
    pub fn example(name: &str, fraction: f64, slope_deg: Option<f64>) -> Self {
        Self {
            name: name.into(),
            panels: 40,
            area_m2: 0.4,
            separated_fraction: fraction,
            mean_risk: 0.2,
            verdict: verdict(fraction).into(),
            separated_band: [fraction, fraction],
            slope_deg,
            standing: String::new(),
            sides: None,
            at_counts: None,
            coarse_mesh: false,
            rim_fraction: 0.0,
            loads: None,
        }
    }

    /// The sensitivity runs' range in percent, low and high, and whether it
    /// crosses a regime line; `None` when it shows as one number ([`percent`]
    /// writes shares on either side of a line apart, so a range that
    /// crosses one always shows).
    fn band_words(&self) -> Option<(String, String, bool)> {
        let [lo, hi] = self.separated_band;
        let (l, h) = (percent(lo), percent(hi));
        (l != h).then(|| (l, h, verdict(lo) != verdict(hi)))
    }

    /// How firm the verdict is: "uncertain" when the sensitivity runs'
    /// range reaches another verdict (the words say it rests on the
    /// model), else "provisional" within [`VERDICT_NOISE`] of a regime
    /// line or on a coarse mesh ([`RegionResult::coarse_mesh`]), else
    /// "firm".
    pub fn firmness(&self) -> &'static str {
        let [lo, hi] = self.separated_band;
        if verdict(lo) != verdict(hi) || self.sides.is_some() || self.counts_differ() {
            "uncertain"
        } else if self.near_line().is_some() || self.coarse_mesh || self.rim_held() {
            "provisional"
        } else {
            "firm"
        }
    }

    /// Whether [`RIM_REGION_SHARE`] or more of the region lies beside
    /// sharp front edges, its pressure held there.
    pub fn rim_held(&self) -> bool {
        self.rim_fraction >= RIM_REGION_SHARE
    }

    /// Whether the shares at the panel-noise counts give two verdicts.
    pub fn counts_differ(&self) -> bool {
        self.at_counts.as_ref().is_some_and(|shares| {
            shares
                .iter()
                .any(|&f| verdict(f) != verdict(self.separated_fraction))
        })
    }

    /// The regime line the share lies within [`VERDICT_NOISE`] of, if any.
    pub fn near_line(&self) -> Option<f64> {
        VERDICT_LINES
            .into_iter()
            .find(|line| (self.separated_fraction - line).abs() < VERDICT_NOISE)
    }

    /// Share and verdict in words, with the sensitivity runs' range when
    /// it reaches another verdict: "attached (0 % separated; 0 to 35 %
    /// across the sensitivity runs: verdict uncertain, it rests on the
    /// model)",
    /// or with the line it lies near ("partly separated (24 % separated,
    /// within 5 points of the 20 % line, which a panel count 10 % off can
    /// cross: a provisional verdict)").
    pub fn words(&self) -> String {
        let range = match self.band_words() {
            Some((lo, hi, true)) => format!(
                "; {lo} to {hi} % across the sensitivity runs: verdict uncertain, it rests on the model"
            ),
            Some((lo, hi, false)) => format!("; {lo} to {hi} % across the sensitivity runs"),
            None => String::new(),
        };
        let near = match (self.band_words(), self.near_line()) {
            (Some((_, _, true)), _) => String::new(),
            _ if self.sides.is_some() => String::new(),
            (_, None) if self.coarse_mesh && !self.counts_differ() => {
                format!("; {COARSE_WORDS}: a provisional verdict")
            }
            (_, None) => String::new(),
            (_, Some(line)) => format!(
                "; within {:.0} points of the {:.0} % line, which a panel count 10 % off can cross: \
                 a provisional verdict",
                100.0 * VERDICT_NOISE,
                100.0 * line
            ),
        };
        let sides = self.sides.map_or(String::new(), |[l, r]| {
            format!(
                "; left {} %, right {} %: the two sides differ, the model drifting to one side on a \
                 symmetric body: verdict uncertain",
                percent(l),
                percent(r)
            )
        });
        let rim = if self.rim_fraction >= RIM_REGION_WORDS {
            format!(
                "; {:.0} % of it lies beside sharp front edges, where the boundary layer sees the \
                 speed capped at the free streamline's bound and the loads a pressure no lower than \
                 the dead water's, so its verdict rests on that rule{}",
                100.0 * self.rim_fraction,
                if self.rim_held() {
                    ": a provisional verdict"
                } else {
                    ""
                }
            )
        } else {
            String::new()
        };
        let counts = match &self.at_counts {
            Some(shares) if self.counts_differ() => {
                let each: Vec<String> = shares.iter().map(|&f| percent(f)).collect();
                format!(
                    "; {} % at the three panel counts: verdict uncertain, it moves with the panelling",
                    each.join(", ")
                )
            }
            _ => String::new(),
        };
        // Said when firm too: a review reading the report had met
        // "provisional" and "uncertain" beside verdicts and "firm" only in
        // the definition, and could not tell what no word meant.
        let firm = if self.firmness() == "firm" && rim.is_empty() {
            "; a firm verdict"
        } else {
            ""
        };
        format!(
            "{} ({} % separated{range}{near}{rim}{sides}{counts}{firm})",
            self.verdict,
            percent(self.separated_fraction)
        )
    }

    /// The share, verdict and range in few words, for tables: "21 %
    /// partly separated (21 to 41 %)", "17 % attached (17 to 28 %,
    /// verdict uncertain)" when the range would change the verdict.
    pub fn short_words(&self) -> String {
        let tag = if self.near_line().is_some() {
            Some("near a line: provisional")
        } else if self.coarse_mesh {
            Some("few panels: provisional")
        } else if self.rim_held() {
            Some("beside sharp edges: provisional")
        } else {
            None
        };
        let range = match (self.band_words(), tag) {
            (Some((lo, hi, true)), _) => format!(" ({lo} to {hi} %, verdict uncertain)"),
            (Some((lo, hi, false)), Some(tag)) => format!(" ({lo} to {hi} %, {tag})"),
            (Some((lo, hi, false)), None) => format!(" ({lo} to {hi} %)"),
            (None, Some(tag)) => format!(" ({tag})"),
            (None, None) => String::new(),
        };
        let range = match self.sides {
            Some([l, r]) => format!(
                " (left {} %, right {} %: the sides differ, verdict uncertain)",
                percent(l),
                percent(r)
            ),
            None => range,
        };
        let range = match &self.at_counts {
            Some(shares) if self.counts_differ() && self.sides.is_none() => {
                let [lo, hi] = crate::noise::range(shares.iter().copied());
                format!(
                    " ({} to {} % over the panel counts, verdict uncertain)",
                    percent(lo),
                    percent(hi)
                )
            }
            _ => range,
        };
        format!(
            "{} % {}{range}",
            percent(self.separated_fraction),
            self.verdict
        )
    }
}

fn facing_vector(word: &str) -> Option<Vector> {
    Some(match word {
        "up" => Vector::z(),
        "down" => -Vector::z(),
        "front" => -Vector::x(),
        "rear" => Vector::x(),
        "side" => Vector::y(),
        _ => return None,
    })
}

/// Check the regions of a case: names given and distinct, ranges finite
/// and increasing, facing words known.
///
/// # Errors
/// One sentence naming the region and the key.
pub fn check(regions: &[RegionSection]) -> Result<()> {
    for (k, r) in regions.iter().enumerate() {
        if r.name.trim().is_empty() {
            bail!("region {}: give it a name", k + 1);
        }
        if regions[..k].iter().any(|o| o.name == r.name) {
            bail!("region \"{}\" is named twice", r.name);
        }
        for (axis, range) in [("x", r.x), ("y", r.y), ("z", r.z)] {
            if let Some([lo, hi]) = range
                && !(lo.is_finite() && hi.is_finite() && lo < hi)
            {
                bail!(
                    "region \"{}\": {axis} must be [low, high] with low below high (got [{lo}, {hi}])",
                    r.name
                );
            }
        }
        if let Some(f) = &r.facing
            && facing_vector(f).is_none()
        {
            bail!(
                "region \"{}\": facing must be up, down, front, rear or side (got \"{f}\")",
                r.name
            );
        }
    }
    Ok(())
}

fn inside(r: &RegionSection, c: &Point, n: &Vector) -> bool {
    let within = |range: Option<[f64; 2]>, v: f64| range.is_none_or(|[lo, hi]| lo <= v && v <= hi);
    let faces = match r.facing.as_deref() {
        None => true,
        // Either side.
        Some("side") => n.y.abs() > FACING_COS,
        Some(w) => facing_vector(w).is_some_and(|d| n.dot(&d) > FACING_COS),
    };
    within(r.x, c.x) && within(r.y, c.y) && within(r.z, c.z) && faces
}

/// Every panel's centroid and normal, then on a half model every mirror
/// image's (a region means the same on a half and on a whole body): the
/// order of [`crate::output::render::display_triangles`].
pub(crate) fn copies(mesh: &PanelMesh) -> Vec<(Point, Vector)> {
    let real = mesh
        .panels
        .iter()
        .map(|p| (p.centroid, p.normal.into_inner()));
    let images = mesh
        .panels
        .iter()
        .filter(|_| mesh.mirrors.symmetry)
        .map(|p| {
            let (c, n) = (p.centroid, p.normal);
            (Point::new(c.x, -c.y, c.z), Vector::new(n.x, -n.y, n.z))
        });
    real.chain(images).collect()
}

/// Which of [`copies`] belong to region `r`: centroid in its ranges,
/// normal within 60 degrees of its facing ([`FACING_COS`]), and, when it
/// gives a facing, seen from that side: a ray from the centroid that way
/// meets no other panel of the body (mirror images included). A region
/// "facing up" over a rear window is the surface seen from above, not
/// also the tyre tops under the wheel arches' roofs (a review's
/// hatchback) or a deck under a wing.
fn members(r: &RegionSection, mesh: &PanelMesh) -> Vec<bool> {
    use rayon::prelude::*;
    let copies = copies(mesh);
    let mut member: Vec<bool> = copies.iter().map(|(c, n)| inside(r, c, n)).collect();
    let Some(facing) = r.facing.as_deref().and_then(facing_vector) else {
        return member;
    };
    let tris: Vec<[Point; 3]> = crate::output::render::display_triangles(mesh)
        .iter()
        .map(|t| t.corners)
        .collect();
    // "side" looks out of either side: each panel along its own.
    let sides = if r.facing.as_deref() == Some("side") {
        vec![facing, -facing]
    } else {
        vec![facing]
    };
    for dir in sides {
        let bins = crate::rays::RayBins::new(&tris, &dir);
        let hidden: Vec<bool> = copies
            .par_iter()
            .zip(&member)
            .enumerate()
            .map(|(k, ((c, n), &m))| {
                m && n.dot(&dir) > 0.0
                    && bins.along(c).iter().any(|&t| {
                        t as usize != k
                            && crate::rays::ray_hits(c, &dir, &tris[t as usize]).is_some()
                    })
            })
            .collect();
        for (m, h) in member.iter_mut().zip(hidden) {
            *m &= !h;
        }
    }
    member
}

/// How many panels (counting a half model's mirror images, as
/// [`evaluate`] does) and how much area a region holds on `mesh`.
pub fn extent(r: &RegionSection, mesh: &PanelMesh) -> (usize, f64) {
    let n = mesh.len();
    members(r, mesh)
        .iter()
        .enumerate()
        .filter(|(_, m)| **m)
        .fold((0, 0.0), |(k, a), (i, _)| {
            (k + 1, a + mesh.panels[i % n].area)
        })
}

/// Whether a region on a half model holds its real panels only, none of
/// their mirror images (a y range on the modelled side): it then covers
/// one side of the car, and the pictures' side view from -y, which shows
/// the images, does not outline it (a review's A-pillar box on a half
/// model, "both sides" by check, was missing from that view).
pub fn one_side_only(r: &RegionSection, mesh: &PanelMesh) -> bool {
    let n = mesh.len();
    let member = members(r, mesh);
    mesh.mirrors.symmetry
        && member[..n.min(member.len())].iter().any(|m| *m)
        && !member
            .get(n..)
            .is_some_and(|images| images.iter().any(|m| *m))
}

/// Refuse a region that holds no panel of `mesh` (ranges in millimetres,
/// or a facing no panel in the ranges has): its verdict would read
/// "attached" for nothing.
///
/// # Errors
/// One sentence naming the region and the body's extent.
pub fn check_on_body(regions: &[RegionSection], mesh: &PanelMesh) -> Result<()> {
    for r in regions.iter().filter(|r| !r.optional) {
        if extent(r, mesh).0 == 0 {
            let (lo, hi) = mesh.bounds();
            let lo_y = if mesh.mirrors.symmetry { -hi.y } else { lo.y };
            // A face inside a pocket (a tailgate's inside, behind the cab)
            // is hidden from its side: a review's box round one, facing
            // front, held nothing and the message did not say why.
            let hidden = r.facing.as_ref().map_or(String::new(), |f| {
                format!(
                    "; facing \"{f}\" takes only the panels seen from that side, which a ray from \
                     the panel that way leaves without meeting the body, so a face inside a pocket is \
                     hidden: leave facing out to take every panel in the box"
                )
            });
            // Ranges typed in the STL's millimetres (a review's diffuser
            // box, x = [4100, 4700], was told only to check them, where an
            // axle so typed is told the metres it means).
            let longest = [r.x, r.y, r.z]
                .into_iter()
                .flatten()
                .flatten()
                .fold(0.0, |m: f64, v| m.max(v.abs()));
            let in_m = RegionSection {
                x: r.x.map(|v| v.map(|c| c / 1000.0)),
                y: r.y.map(|v| v.map(|c| c / 1000.0)),
                z: r.z.map(|v| v.map(|c| c / 1000.0)),
                ..r.clone()
            };
            let mm = if longest > crate::geometry::BODY_SIZE_LIMITS[1] && extent(&in_m, mesh).0 > 0
            {
                let range = |k: &str, v: Option<[f64; 2]>| {
                    v.map(|[a, b]| format!("{k} = [{:.3}, {:.3}]", a / 1000.0, b / 1000.0))
                };
                let ranges: Vec<String> = [range("x", r.x), range("y", r.y), range("z", r.z)]
                    .into_iter()
                    .flatten()
                    .collect();
                format!(
                    "; in millimetres it would be {} m, on the body (lengths in the case file are \
                     metres)",
                    ranges.join(", ")
                )
            } else {
                String::new()
            };
            bail!(
                "region \"{}\" holds no panel of the body (which spans x {:.3} to {:.3}, y {:.3} to {:.3}, \
                 z {:.3} to {:.3} m): check its ranges (metres) and facing{hidden}{mm}; a part only \
                 some variants of a sweep have takes optional = true",
                r.name,
                lo.x,
                hi.x,
                lo_y,
                hi.y,
                lo.z,
                hi.z
            );
        }
    }
    Ok(())
}

/// How the note on an optional region left out begins.
pub const LEFT_OUT: &str = "the optional region";

/// The regions that hold panels of `mesh`: every one but an optional
/// region holding none ([`RegionSection::optional`]), and a note for each
/// of those, saying when its box holds panels that its facing hides (a
/// review's tailgate inside, facing front behind the cab, had been told
/// its box held no panel, with 26 in it).
pub fn on_body(regions: &[RegionSection], mesh: &PanelMesh) -> (Vec<RegionSection>, Vec<String>) {
    let (mut kept, mut notes) = (Vec::new(), Vec::new());
    for r in regions {
        if r.optional && extent(r, mesh).0 == 0 {
            let in_box = r.facing.as_ref().map_or(0, |_| {
                let unfaced = RegionSection {
                    facing: None,
                    ..r.clone()
                };
                extent(&unfaced, mesh).0
            });
            let why = match (in_box, &r.facing) {
                (k, Some(f)) if k > 0 => format!(
                    " seen from its facing side (\"{f}\"): {} in its box, hidden that way (a face \
                     inside a pocket: leave facing out to take them)",
                    crate::output::plural(k, "panel lies", "panels lie")
                ),
                _ => String::new(),
            };
            notes.push(format!(
                "{LEFT_OUT} \"{}\" holds no panel of this body{why} and is left out of its results",
                r.name
            ));
        } else {
            notes.extend(past_the_body(r, mesh));
            kept.push(r.clone());
        }
    }
    (kept, notes)
}

/// How far past the body a region's box may reach, along any axis, as a
/// share of the body's length, before it is noted (our choice: a box
/// drawn a little past the tail to be sure of the edge is common and
/// says nothing).
pub const PAST_THE_BODY_SHARE: f64 = 0.05;

/// A note when `r`'s box reaches past the body by more than
/// [`PAST_THE_BODY_SHARE`] of its length: what it takes in is then less
/// than it seems (a review's diffuser box, x 4.4 to 5.2 on a tail at 4.7,
/// read the flat floor's last 0.3 m "partly separated (31 %)" with no
/// word that most of the box held nothing).
fn past_the_body(r: &RegionSection, mesh: &PanelMesh) -> Option<String> {
    let (lo, hi) = mesh.bounds();
    let lo_y = if mesh.mirrors.symmetry { -hi.y } else { lo.y };
    let length = hi.x - lo.x;
    let ranges = [
        ("x", r.x, lo.x, hi.x),
        ("y", r.y, lo_y, hi.y),
        ("z", r.z, lo.z, hi.z),
    ];
    let past: Vec<String> = ranges
        .iter()
        .filter_map(|&(k, range, a, b)| {
            let [from, to] = range?;
            let beyond = (a - from).max(0.0) + (to - b).max(0.0);
            (beyond > PAST_THE_BODY_SHARE * length).then(|| {
                format!("{k} {from:.3} to {to:.3} m against the body's {a:.3} to {b:.3} m")
            })
        })
        .collect();
    (!past.is_empty()).then(|| {
        format!(
            "region \"{}\" reaches well past the body ({}): its share is of the panels the box holds, \
             which may be less of the part than the box suggests",
            r.name,
            past.join("; ")
        )
    })
}

/// Each region's panels as the pictures draw them: the real panels, then
/// on a half model their mirror images (the order of
/// [`crate::output::render::display_triangles`]).
pub fn marks(
    regions: &[RegionSection],
    mesh: &PanelMesh,
) -> Vec<crate::output::outline::RegionMark> {
    regions
        .iter()
        .map(|r| {
            let member = members(r, mesh);
            crate::output::outline::RegionMark {
                name: r.name.clone(),
                member,
            }
        })
        .collect()
}

/// Each region's panels ([`members`]), computed once for the runs of one
/// mesh: the sight test casts rays, and the drag band's sensitivity runs
/// evaluate the same regions again.
pub fn memberships(regions: &[RegionSection], mesh: &PanelMesh) -> Vec<Vec<bool>> {
    regions.iter().map(|r| members(r, mesh)).collect()
}

/// Each region's separated share and mean risk on `mesh` with `layer`,
/// its panels `member` ([`memberships`]).
pub fn evaluate(
    regions: &[RegionSection],
    member: &[Vec<bool>],
    mesh: &PanelMesh,
    layer: &BoundaryLayer,
) -> Vec<RegionResult> {
    regions
        .iter()
        .zip(member)
        .map(|(r, member)| {
            let (mut panels, mut area, mut separated, mut risk) = (0, 0.0, 0.0, 0.0);
            let mut rim = 0.0;
            // Area and separated area of the left (y < 0) and right half.
            let mut halves = [[0.0; 2]; 2];
            let mut normals: Vec<(Vector, f64)> = Vec::new();
            let n_real = mesh.len();
            for ((k, (_, n)), _) in copies(mesh)
                .into_iter()
                .enumerate()
                .zip(member)
                .filter(|(_, m)| **m)
            {
                let (p, l) = (&mesh.panels[k % n_real], &layer.panels[k % n_real]);
                panels += 1;
                area += p.area;
                normals.push((n, p.area));
                risk += p.area * l.risk;
                if layer.rim_zone.get(k % n_real).copied().unwrap_or(false) {
                    rim += p.area;
                }
                let half = &mut halves[usize::from(p.centroid.y > 0.0)];
                half[0] += p.area;
                if l.state == FlowState::Separated {
                    separated += p.area;
                    half[1] += p.area;
                }
            }
            let share = |x: f64| if area > 0.0 { x / area } else { 0.0 };
            let fraction = share(separated);
            RegionResult {
                name: r.name.clone(),
                panels,
                area_m2: area,
                separated_fraction: fraction,
                mean_risk: share(risk),
                verdict: verdict(fraction).into(),
                separated_band: [fraction, fraction],
                slope_deg: surface_slope(&normals),
                standing: String::new(),
                sides: one_sided(mesh, halves),
                at_counts: None,
                coarse_mesh: false,
                rim_fraction: share(rim),
                loads: None,
            }
        })
        .map(|mut r| {
            r.standing = r.firmness().into();
            r
        })
        .collect()
}

/// The separated shares of a region's two halves ([`RegionResult::sides`])
/// on a whole body centred on y = 0, `halves` the (area, separated area)
/// of its left and right, when they give different verdicts.
fn one_sided(mesh: &PanelMesh, halves: [[f64; 2]; 2]) -> Option<[f64; 2]> {
    let (lo, hi) = mesh.bounds();
    let whole = !mesh.mirrors.symmetry && tuft_mesh::cut::centred(lo.y, hi.y);
    let [l, r] = halves.map(|[a, s]| if a > 0.0 { s / a } else { f64::NAN });
    (whole && l.is_finite() && r.is_finite() && verdict(l) != verdict(r)).then_some([l, r])
}

/// A panel faces up, for a region's slope, when its normal's upward
/// part exceeds this (steeper than about 84 degrees it is a base or a
/// flank). Our choice, as the slope's reading before it.
const UP_NZ: f64 = 0.1;

/// A region whose surface as a whole ([`surface_slope`]'s mean normal)
/// slopes by this much or more, degrees, is a slant (a rear window, a
/// fastback), read by its steepest tenth; a flatter one (a boot deck, a
/// roof) by its mean. Measured on the regions' mean normals: boot decks
/// read 0.3 to 3.7 (a review's notchback at three lid heights, 3.1, 1.6
/// and 0.3; the demo coupe's, 1.4 and 3.7), and 4.1 on the built-in
/// coupe with a 25-degree window and its deck 0.1 m shorter, whose box
/// then takes in the window's foot; rear windows 13.5 to 28.4 (the demo
/// coupe's of 22 and 38 degrees, whose boxes take in the roof's and the
/// deck's edges and the flat shoulders beside the glass; the notchback's
/// of 25 degrees 18.1); 8 lies between.
pub const SLANT_DEG: f64 = 8.0;

/// The kind of surface a region's slope ([`RegionResult::slope_deg`])
/// says its box covers: a box that covers another kind in one run than in
/// another has had another part of the body moved under it
/// (`compare::region_cover_notes`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SurfaceKind {
    /// No slope: under half its area faces up (a base, a floor, a flank).
    NotUp,
    /// Sloping under [`SLANT_DEG`] either way: a deck, a roof.
    Deck,
    /// Sloping [`SLANT_DEG`] or more: a rear window, a slant.
    Slant,
}

impl SurfaceKind {
    /// The kind a slope reads as.
    pub fn of(slope_deg: Option<f64>) -> Self {
        match slope_deg {
            None => Self::NotUp,
            Some(s) if s.abs() < SLANT_DEG => Self::Deck,
            Some(_) => Self::Slant,
        }
    }
}

/// A region's slope below the horizontal, degrees, from the (normal,
/// area) of its panels; positive falls toward the tail (+x), negative
/// rises. `None` when under half its area faces up ([`UP_NZ`]): a base,
/// a floor or a flank has no slope.
///
/// The slope is first read from the mean normal of the panels that face
/// up (their area-weighted sum, the surface's vector area): that is the
/// line from where the box takes in the surface to where it leaves it
/// (a surface's vector area depends only on its edge: that of z = f(x)
/// from x = a to b across a width w is w (f(a) - f(b), 0, b - a)),
/// whatever the surface does between, so neither a deck's rounded tail
/// edge nor the window's foot in its box can set it alone, and a level
/// or slightly raised deck has a slope too (a review's notchback deck read 17.6 degrees, from the
/// steepest tenth alone, where its mean normal falls 3.1, and no slope at
/// all once its lid was raised 30 or 60 mm, where it falls 1.6 and 0.3).
/// A surface sloping [`SLANT_DEG`] or more that way is a slant, read by
/// [`steepest_tenth`] of its panels facing that way: a box drawn round a
/// rear window takes in the roof's and the deck's edges and the flat
/// shoulders beside the glass, whose mean reads the demo's 22 and
/// 38-degree windows as 13.5 and 28.4, where their steepest tenth reads
/// 21.6 and 37.7 (and the compare and collect cautions from 25 degrees
/// need the window's own slope).
fn surface_slope(normals: &[(Vector, f64)]) -> Option<f64> {
    let area: f64 = normals.iter().map(|p| p.1).sum();
    let up: Vec<&(Vector, f64)> = normals.iter().filter(|(n, _)| n.z > UP_NZ).collect();
    let up_area: f64 = up.iter().map(|p| p.1).sum();
    if !(up_area > 0.0 && up_area >= 0.5 * area) {
        return None;
    }
    let sum = up.iter().fold(Vector::zeros(), |s, (n, a)| s + n * *a);
    let mean = sum.x.atan2(sum.z).to_degrees();
    if mean.abs() < SLANT_DEG {
        return Some(mean);
    }
    // The slant's side: its panels facing rearward (or forward, for one
    // that rises), with their slope that way.
    let side = mean.signum();
    let mut slopes: Vec<(f64, f64)> = up
        .iter()
        .filter(|(n, _)| side * n.x > 0.05)
        .map(|(n, a)| ((side * n.x).atan2(n.z).to_degrees(), *a))
        .collect();
    Some(steepest_tenth(&mut slopes, area).map_or(mean, |s| side * s))
}

/// The slope a slant's steepest tenth of area reaches, degrees, from the
/// `slopes` (slope, area) of its panels facing its way: a box drawn round
/// a rear window takes in the rounded roof and deck edges, and the
/// steepest tenth reads 27.6, 29.7 and 33.8 for the demo coupe's windows
/// of 28, 30 and 34 degrees, where a single stray panel of a scan cannot
/// set it. `None` when those panels hold under a quarter of the region's
/// `area`.
fn steepest_tenth(slopes: &mut [(f64, f64)], area: f64) -> Option<f64> {
    let facing: f64 = slopes.iter().map(|s| s.1).sum();
    if !(facing >= 0.25 * area && facing > 0.0) {
        return None;
    }
    slopes.sort_by(|a, b| a.0.total_cmp(&b.0));
    let mut below = 0.0;
    slopes
        .iter()
        .find(|(_, a)| {
            below += a;
            below >= 0.9 * facing
        })
        .map(|s| s.0)
}

/// A share in percent for people: whole, or to a tenth where the whole
/// number would put it on the other side of a regime line (59.92 % of a
/// region is not "60 %, partly separated").
pub fn percent(fraction: f64) -> String {
    let whole = (100.0 * fraction).round();
    if verdict(whole / 100.0) == verdict(fraction) {
        format!("{whole:.0}")
    } else {
        format!("{:.1}", (1000.0 * fraction).floor() / 10.0)
    }
}

/// The word for a separated share (see [`VERDICT_LINES`]).
pub fn verdict(fraction: f64) -> &'static str {
    if fraction < VERDICT_LINES[0] {
        "attached"
    } else if fraction < VERDICT_LINES[1] {
        "partly separated"
    } else {
        "separated"
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A region a quarter or more of which lies beside sharp front edges
    /// (its pressure held there) says so and is provisional (a review's
    /// bonnet read "attached" with its leading edge held).
    #[test]
    fn a_region_beside_sharp_edges_is_provisional() {
        let mut r = RegionResult::example("bonnet", 0.0, None);
        r.rim_fraction = 0.02;
        assert_eq!(r.words(), "attached (0 % separated; a firm verdict)");
        r.rim_fraction = 0.12;
        assert_eq!(r.firmness(), "firm");
        assert!(
            r.words().ends_with("12 % of it lies beside sharp front edges, where the boundary layer sees the speed capped at the free streamline's bound and the loads a pressure no lower than the dead water's, so its verdict rests on that rule)"),
            "{}",
            r.words()
        );
        r.rim_fraction = 0.45;
        assert_eq!(r.firmness(), "provisional");
        assert!(
            r.words().contains(
                "45 % of it lies beside sharp front edges, where the boundary layer sees"
            ),
            "{}",
            r.words()
        );
        assert!(
            r.short_words().contains("beside sharp edges: provisional"),
            "{}",
            r.short_words()
        );
    }

    /// On under half of the suggested panels no verdict is firm, wherever
    /// its share lies (a review's mirror-flank box: 32 %, "firm", at 3,500
    /// of 8,000 suggested panels, 2 % as a half model).
    #[test]
    fn a_verdict_on_a_coarse_mesh_is_provisional() {
        let mut r = RegionResult::example("flank", 0.32, None);
        assert_eq!(r.firmness(), "firm");
        r.coarse_mesh = true;
        assert_eq!(r.firmness(), "provisional");
        assert!(
            r.words().ends_with(&format!(
                "(32 % separated; {COARSE_WORDS}: a provisional verdict)"
            )),
            "{}",
            r.words()
        );
        assert!(
            r.short_words().contains("(few panels: provisional)"),
            "{}",
            r.short_words()
        );
        // Uncertain stays uncertain.
        r.separated_band = [0.1, 0.32];
        assert_eq!(r.firmness(), "uncertain");
    }

    /// The words say the sensitivity runs' range, and that the verdict
    /// rests on the model when the range crosses a regime line (the demo
    /// coupe's STL at 200 km/h: its boot deck 0 % separated, 34 % with the
    /// earlier threshold).
    /// With --noise, a share that gives two verdicts over the three panel
    /// counts makes the verdict uncertain and says so (a review's pickup
    /// bed: 36 % at its own count, 73 and 67 % at the others, had read
    /// "firm"); three shares with one verdict change nothing.
    #[test]
    fn a_verdict_that_moves_with_the_panel_count_is_uncertain() {
        let mut r = RegionResult::example("bed floor", 0.36, None);
        assert_eq!(r.firmness(), "firm");
        r.at_counts = Some(vec![0.36, 0.73, 0.67]);
        assert_eq!(r.firmness(), "uncertain");
        assert_eq!(
            r.words(),
            "partly separated (36 % separated; 36, 73, 67 % at the three panel counts: verdict \
             uncertain, it moves with the panelling)"
        );
        assert_eq!(
            r.short_words(),
            "36 % partly separated (36 to 73 % over the panel counts, verdict uncertain)"
        );
        r.at_counts = Some(vec![0.36, 0.41, 0.32]);
        assert_eq!(r.firmness(), "firm");
        assert!(!r.words().contains("panel counts"));
    }

    #[test]
    fn a_verdict_the_sensitivity_runs_would_change_says_so() {
        let result = |f: f64, band: [f64; 2]| RegionResult {
            separated_band: band,
            ..RegionResult::example("boot deck", f, None)
        };
        assert_eq!(
            result(0.0, [0.0, 0.34]).words(),
            "attached (0 % separated; 0 to 34 % across the sensitivity runs: verdict uncertain, it rests on the model)"
        );
        assert_eq!(
            result(0.31, [0.31, 0.41]).words(),
            "partly separated (31 % separated; 31 to 41 % across the sensitivity runs; a firm verdict)"
        );
        assert_eq!(
            result(0.8, [0.8, 0.8]).words(),
            "separated (80 % separated; a firm verdict)"
        );
        // The same three in one word for a script (summary.json, sweep.csv).
        assert_eq!(result(0.0, [0.0, 0.34]).firmness(), "uncertain");
        assert_eq!(result(0.24, [0.24, 0.44]).firmness(), "provisional");
        assert_eq!(result(0.31, [0.31, 0.41]).firmness(), "firm");
        // Within 5 points of a line: provisional (a review's boot deck read
        // 24 % at 4,000 panels and 17 % at 4,300).
        assert_eq!(
            result(0.24, [0.24, 0.44]).words(),
            "partly separated (24 % separated; 24 to 44 % across the sensitivity runs; within 5 points \
             of the 20 % line, which a panel count 10 % off can cross: a provisional verdict)"
        );
        assert_eq!(
            result(0.57, [0.57, 0.57]).short_words(),
            "57 % partly separated (near a line: provisional)"
        );
        assert_eq!(
            result(0.17, [0.17, 0.28]).short_words(),
            "17 % attached (17 to 28 %, verdict uncertain)"
        );
        // 59.92 % is not written as 60 % beside "partly separated".
        assert_eq!(
            result(0.5992, [0.5992, 0.5992]).short_words(),
            "59.9 % partly separated (near a line: provisional)"
        );
    }

    /// A region whose two halves give different verdicts on a whole
    /// symmetric body says so and is uncertain; halves with one verdict,
    /// or a region on one side only, are not split.
    #[test]
    fn a_region_separated_on_one_side_only_is_uncertain() {
        let r = RegionResult {
            sides: Some([0.02, 0.54]),
            ..RegionResult::example("diffuser", 0.28, None)
        };
        assert_eq!(r.firmness(), "uncertain");
        assert_eq!(
            r.words(),
            "partly separated (28 % separated; left 2 %, right 54 %: the two sides differ, the model \
             drifting to one side on a symmetric body: verdict uncertain)"
        );
        assert_eq!(
            r.short_words(),
            "28 % partly separated (left 2 %, right 54 %: the sides differ, verdict uncertain)"
        );
        let whole = PanelMesh::new(
            tuft_mesh::generate::icosphere(1.0, 2),
            tuft_mesh::Mirrors {
                ground: None,
                symmetry: false,
            },
        )
        .unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(
            one_sided(&whole, [[1.0, 0.0], [1.0, 0.6]]),
            Some([0.0, 0.6])
        );
        assert_eq!(one_sided(&whole, [[1.0, 0.3], [1.0, 0.35]]), None);
        assert_eq!(one_sided(&whole, [[0.0, 0.0], [1.0, 0.6]]), None);
    }

    /// A slant's slope is read from its steepest tenth: a box drawn round
    /// a 28-degree window that also takes in the rounded roof and boot
    /// edges (half its area sloping 5 to 20 degrees) still reads about
    /// 28; with little area facing its way it has none.
    #[test]
    fn a_slant_reads_the_slope_of_its_steepest_tenth() {
        let mut slopes: Vec<(f64, f64)> =
            (0..10).map(|k| (5.0 + 1.5 * f64::from(k), 0.05)).collect();
        slopes.extend((0..10).map(|_| (28.0, 0.05)));
        let s = steepest_tenth(&mut slopes, 1.0).unwrap();
        assert!((s - 28.0).abs() < 1e-9, "{s}");
        let mut few = vec![(30.0, 0.1)];
        assert_eq!(steepest_tenth(&mut few, 1.0), None);
    }

    /// The (normal, area) of a surface z = `f`(x) from `x0` to `x1`,
    /// 1.6 m across, panelled in `n` strips of two triangles each way
    /// (normals and areas from the triangles' corners).
    fn panelled(f: impl Fn(f64) -> f64, x0: f64, x1: f64, n: usize) -> Vec<(Vector, f64)> {
        let corner = |i: usize, j: usize| {
            let x = x0 + (x1 - x0) * i as f64 / n as f64;
            Point::new(x, -0.8 + 1.6 * j as f64 / 8.0, f(x))
        };
        let mut out = Vec::new();
        for i in 0..n {
            for j in 0..8 {
                let [a, b, c, d] = [
                    corner(i, j),
                    corner(i + 1, j),
                    corner(i + 1, j + 1),
                    corner(i, j + 1),
                ];
                for [p, q, r] in [[a, b, c], [a, c, d]] {
                    let cross = (q - p).cross(&(r - p));
                    out.push((cross.normalize(), 0.5 * cross.norm()));
                }
            }
        }
        out
    }

    /// The slope of a surface is what a designer reads off its side view:
    /// a plane panelled at a known angle reads that angle, a deck (with
    /// its rounded tail edge and the window's foot in its box, or a lid
    /// raised at its trailing edge) reads the line from where its box
    /// takes it in to where it leaves it, and a rear window in a box that
    /// takes in the roof's and the deck's edges reads the glass. The
    /// independent check is the geometry: a plane's angle, and for a deck
    /// the line between its ends, which its mean normal must equal (the
    /// vector area of a surface depends only on its edge).
    #[test]
    fn a_region_reads_the_slope_of_its_surface() {
        let plane = |deg: f64| move |x: f64| 1.0 - x * deg.to_radians().tan();
        for deg in [-20.0, -3.0, 0.0, 1.6, 3.0, 7.5, 12.0, 25.0, 38.0] {
            let s = surface_slope(&panelled(plane(deg), 3.0, 3.8, 20)).unwrap();
            assert!((s - deg).abs() < 1e-6, "{deg}: {s}");
        }
        let chord =
            |f: &dyn Fn(f64) -> f64, a: f64, b: f64| ((f(a) - f(b)) / (b - a)).atan().to_degrees();
        // A deck falling 20 mm over 0.7 m (1.6 degrees), after the foot of
        // a 25-degree window (3.0 to 3.05) and before a tail edge rounded
        // at 80 mm radius down to 60 degrees, where a region facing up
        // ends: the edges' panels slope up to 60 degrees (their steepest
        // tenth of the area reads 25), the line from end to end 4.4.
        let deck = |x: f64| {
            let window = 1.0 + (3.05 - x).max(0.0) * 25f64.to_radians().tan();
            let deck = 1.0 - 0.02 * (x - 3.05) / 0.7;
            let r = 0.08;
            let edge = (x - 3.75).max(0.0);
            let round = r - (r * r - edge * edge).max(0.0).sqrt();
            window.max(deck) - round
        };
        let end = 3.75 + 0.08 * 60f64.to_radians().sin();
        let panels = panelled(deck, 3.0, end, 120);
        let s = surface_slope(&panels).unwrap();
        let want = chord(&deck, 3.0, end);
        assert!(
            (s - want).abs() < 1e-6 && s < SLANT_DEG,
            "{s} against {want}"
        );
        let mut slopes: Vec<(f64, f64)> = panels
            .iter()
            .filter(|(n, _)| n.x > 0.05)
            .map(|(n, a)| (n.x.atan2(n.z).to_degrees(), *a))
            .collect();
        let tenth = steepest_tenth(&mut slopes, 0.0).unwrap();
        assert!(tenth > 20.0, "{tenth}");
        // The lid's trailing part raised 60 mm in a smooth step: it rises.
        let lid = |x: f64| {
            let u = ((x - 3.1) / 0.62).clamp(0.0, 1.0);
            1.05 - 0.02 * (x - 3.0) + 0.06 * u * u * (3.0 - 2.0 * u)
        };
        let s = surface_slope(&panelled(lid, 3.0, 3.85, 60)).unwrap();
        let want = chord(&lid, 3.0, 3.85);
        assert!((s - want).abs() < 1e-6 && s < 0.0, "{s} against {want}");
        // A 25-degree window between a roof and a deck, each 0.15 m of the
        // box: their mean reads 16.2, the glass 25.
        let window = |x: f64| 1.4 - (x - 3.15).clamp(0.0, 0.5) * 25f64.to_radians().tan();
        let s = surface_slope(&panelled(window, 3.0, 3.8, 80)).unwrap();
        assert!((s - 25.0).abs() < 1e-6, "{s}");
        assert!((chord(&window, 3.0, 3.8) - 16.2).abs() < 0.1);
        // A base and a floor have none.
        let turn = |v: Vec<(Vector, f64)>, m: nalgebra::Matrix3<f64>| {
            v.into_iter().map(|(n, a)| (m * n, a)).collect::<Vec<_>>()
        };
        let flat = panelled(|_| 1.0, 3.0, 3.8, 10);
        let base = nalgebra::Matrix3::new(0.0, 0.0, 1.0, 0.0, 1.0, 0.0, -1.0, 0.0, 0.0);
        let floor = nalgebra::Matrix3::new(1.0, 0.0, 0.0, 0.0, -1.0, 0.0, 0.0, 0.0, -1.0);
        assert_eq!(surface_slope(&turn(flat.clone(), base)), None);
        assert_eq!(surface_slope(&turn(flat, floor)), None);
    }

    fn region(toml_text: &str) -> Vec<RegionSection> {
        #[derive(Deserialize)]
        struct File {
            region: Vec<RegionSection>,
        }
        toml::from_str::<File>(toml_text)
            .map(|f| f.region)
            .unwrap_or_else(|e| panic!("{e}"))
    }

    #[test]
    fn bad_regions_are_refused_by_name() {
        let cases = [
            ("[[region]]\nname = \"\"\n", "give it a name"),
            (
                "[[region]]\nname = \"a\"\n[[region]]\nname = \"a\"\n",
                "named twice",
            ),
            (
                "[[region]]\nname = \"w\"\nx = [2.0, 1.0]\n",
                "region \"w\": x must be [low, high]",
            ),
            (
                "[[region]]\nname = \"w\"\nfacing = \"sideways\"\n",
                "facing must be up, down",
            ),
        ];
        for (text, want) in cases {
            let err = check(&region(text)).err().map(|e| e.to_string());
            assert!(err.as_deref().is_some_and(|e| e.contains(want)), "{err:?}");
        }
        let good = "[[region]]\nname = \"rear window\"\nx = [3.0, 3.8]\nfacing = \"up\"\n";
        assert!(check(&region(good)).is_ok());
    }

    /// A box reaching well past the body is noted with its range and the
    /// body's; one a little past it is not.
    #[test]
    fn a_box_well_past_the_body_is_noted() {
        use tuft_mesh::{Mirrors, generate::icosphere};
        let mesh =
            PanelMesh::new(icosphere(1.0, 3), Mirrors::none()).unwrap_or_else(|e| panic!("{e}"));
        let (_, notes) = on_body(
            &region("[[region]]\nname = \"tail\"\nx = [0.5, 1.6]\nfacing = \"rear\"\n"),
            &mesh,
        );
        assert_eq!(notes.len(), 1, "{notes:?}");
        assert!(
            notes[0].starts_with(
                "region \"tail\" reaches well past the body (x 0.500 to 1.600 m against"
            ) && notes[0].contains("to 1.000 m)"),
            "{notes:?}"
        );
        let (_, notes) = on_body(
            &region("[[region]]\nname = \"tail\"\nx = [0.5, 1.05]\nfacing = \"rear\"\n"),
            &mesh,
        );
        assert!(notes.is_empty(), "{notes:?}");
    }

    /// A region typed in millimetres is told the metres it means, when
    /// they hold panels (as an axle so typed is); one off the body in
    /// metres gets no such hint.
    #[test]
    fn a_region_in_millimetres_is_told_its_metres() {
        use tuft_mesh::{Mirrors, generate::icosphere};
        let mesh =
            PanelMesh::new(icosphere(1.0, 3), Mirrors::none()).unwrap_or_else(|e| panic!("{e}"));
        let refused = |text: &str| match check_on_body(&region(text), &mesh) {
            Ok(()) => panic!("{text} was taken"),
            Err(e) => e.to_string(),
        };
        let mm = refused("[[region]]\nname = \"diffuser\"\nx = [500, 900]\nfacing = \"down\"\n");
        assert!(
            mm.contains("in millimetres it would be x = [0.500, 0.900] m, on the body"),
            "{mm}"
        );
        let off = refused("[[region]]\nname = \"air\"\nx = [5.0, 6.0]\n");
        assert!(!off.contains("millimetres"), "{off}");
    }

    /// A region means the same on a half model (mirror half counted) as on
    /// the whole body: the generated coupe's rear window, with a made-up
    /// layer separated behind x = 3.4 m and a risk growing along x.
    /// "Facing up" is the surface seen from above: a small sphere (a tyre
    /// in its arch) under a large one (the body) adds nothing to an
    /// upward region, whose area is then the large sphere's cap within 60
    /// degrees of the vertical, 2 pi R^2 (1 - cos 60) = pi R^2
    /// (Archimedes' zone area, to the facets' share). From below, the
    /// small sphere's lower cap is seen and hides the middle of the large
    /// one's.
    #[test]
    fn facing_counts_what_is_seen_from_that_side() {
        use tuft_mesh::generate::icosphere;
        use tuft_mesh::{Mirrors, TriMesh};
        let (big, small) = (icosphere(1.0, 4), icosphere(0.3, 4));
        let mut vertices: Vec<Point> = big
            .vertices
            .iter()
            .map(|p| Point::new(p.x, p.y, p.z + 2.0))
            .collect();
        let offset = vertices.len() as u32;
        vertices.extend(small.vertices.iter().copied());
        let mut triangles = big.triangles.clone();
        triangles.extend(small.triangles.iter().map(|t| t.map(|k| k + offset)));
        let body = TriMesh::new(vertices, triangles).unwrap_or_else(|e| panic!("{e}"));
        let mirrors = Mirrors {
            ground: None,
            symmetry: false,
        };
        let mesh = PanelMesh::new(body, mirrors).unwrap_or_else(|e| panic!("{e}"));
        let cap = |r: f64| std::f64::consts::PI * r * r;
        let area = |text: &str| extent(&region(text)[0], &mesh);
        let (_, up) = area("[[region]]\nname = \"roof\"\nfacing = \"up\"\n");
        assert!(
            (up / cap(1.0) - 1.0).abs() < 0.03,
            "{up} against {}",
            cap(1.0)
        );
        // The small sphere's upper cap alone (9 % more) is hidden whole.
        let tyre = area("[[region]]\nname = \"tyre\"\nz = [-1.0, 1.0]\nfacing = \"up\"\n");
        assert_eq!(tyre, (0, 0.0));
        // Optional, it is left out with a note that its box holds panels
        // its facing hides; a box round nothing says only that it is empty.
        let (kept, notes) = on_body(
            &region(
                "[[region]]\nname = \"tyre\"\nz = [-1.0, 1.0]\nfacing = \"up\"\noptional = true\n",
            ),
            &mesh,
        );
        assert!(kept.is_empty());
        assert!(
            notes[0].starts_with(
                "the optional region \"tyre\" holds no panel of this body seen from its facing side \
                 (\"up\"):"
            ) && notes[0].contains("panels lie in its box, hidden that way"),
            "{notes:?}"
        );
        let (_, notes) = on_body(
            &region(
                "[[region]]\nname = \"air\"\nz = [5.0, 6.0]\nfacing = \"up\"\noptional = true\n",
            ),
            &mesh,
        );
        assert_eq!(
            notes,
            [
                "the optional region \"air\" holds no panel of this body and is left out of its results"
            ]
        );
        // From below: the small sphere's lower cap, pi 0.3^2, and the large
        // one's less its zone within 0.3 of the axis, 2 pi (1 - cos(asin 0.3)).
        let (_, down) = area("[[region]]\nname = \"floor\"\nfacing = \"down\"\n");
        let hidden = 2.0 * std::f64::consts::PI * (1.0 - 0.3_f64.asin().cos());
        let expected = cap(1.0) - hidden + cap(0.3);
        assert!(
            (down / expected - 1.0).abs() < 0.03,
            "{down} against {expected}"
        );
    }

    #[test]
    fn half_and_whole_bodies_agree() {
        use tuft_mesh::Mirrors;
        use tuft_mesh::generate::{CoupeParams, coupe_with_params};
        let regions =
            region("[[region]]\nname = \"rear window\"\nx = [3.15, 3.7]\nfacing = \"up\"\n");
        let result = |half: bool| {
            let body = coupe_with_params(&CoupeParams {
                panels: 3000,
                half,
                ..CoupeParams::default()
            })
            .unwrap_or_else(|e| panic!("{e}"));
            let mirrors = Mirrors {
                ground: Some(0.0),
                symmetry: half,
            };
            let mesh = PanelMesh::new(body, mirrors).unwrap_or_else(|e| panic!("{e}"));
            let behind: Vec<bool> = mesh.panels.iter().map(|p| p.centroid.x > 3.4).collect();
            let mut layer = crate::pipeline::tests::layer_with(&mesh, &behind);
            for (l, p) in layer.panels.iter_mut().zip(&mesh.panels) {
                l.risk = (p.centroid.x / 4.5).clamp(0.0, 1.0);
            }
            evaluate(&regions, &memberships(&regions, &mesh), &mesh, &layer).remove(0)
        };
        let (whole, half) = (result(false), result(true));
        assert_eq!(whole.panels, half.panels);
        for (a, b) in [
            (whole.area_m2, half.area_m2),
            (whole.separated_fraction, half.separated_fraction),
            (whole.mean_risk, half.mean_risk),
        ] {
            assert!((a - b).abs() <= 1e-9 * a.abs().max(1.0), "{a} vs {b}");
        }
        // About half the window lies behind x = 3.4 m.
        assert!((0.3..0.7).contains(&whole.separated_fraction), "{whole:?}");
        assert_eq!(whole.verdict, "partly separated");
    }

    #[test]
    fn verdict_lines() {
        assert_eq!(verdict(0.19), "attached");
        assert_eq!(verdict(0.2), "partly separated");
        assert_eq!(verdict(0.59), "partly separated");
        assert_eq!(verdict(0.6), "separated");
    }
}
