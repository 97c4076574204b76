//! `summary.json`: the numbers of one run, for people and scripts.
//!
//! The same struct is read back by `compare` and `collect`, so the field
//! names are part of tuft's interface; add fields, rename none.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

/// Force and moment coefficients on the reference area and length.
#[derive(Debug, Clone, Copy, Serialize, Deserialize, PartialEq, Default)]
pub struct CoefficientSet {
    /// Lift coefficient (+z).
    pub lift: f64,
    /// Drag coefficient (along the free stream): pressure plus friction.
    pub drag: f64,
    /// Friction part of the drag coefficient.
    pub drag_friction: f64,
    /// Pressure part of the drag coefficient.
    pub drag_pressure: f64,
    /// Side-force coefficient.
    pub side: f64,
    /// Pitching-moment coefficient about the body's lateral axis (y)
    /// through the moment point (the wheelbase's middle on the ground), the
    /// axis the axle split uses, also at yaw (nose up +).
    pub pitch: f64,
}

impl CoefficientSet {
    /// The drag and side-force coefficients turned into the body's axes
    /// at `yaw_deg`: `[along +x (nose to tail, rearward), along +y]`. The
    /// wind runs along `(cos yaw, sin yaw, 0)` and the side force along
    /// `(-sin yaw, cos yaw, 0)` (`tuft_solver::loads`), so in a cross wind
    /// the drag along the wind takes in `sin yaw` of the side force.
    pub fn body_axes(&self, yaw_deg: f64) -> [f64; 2] {
        let (s, c) = yaw_deg.to_radians().sin_cos();
        [self.drag * c - self.side * s, self.drag * s + self.side * c]
    }
}

/// The force coefficients in the body's axes (what a cross wind's drag
/// and side force are made of).
#[derive(Debug, Clone, Copy, Serialize, Deserialize, PartialEq, Default)]
pub struct BodyAxes {
    /// Along +x, nose to tail (rearward), on the reference area.
    pub axial: f64,
    /// Along +y, to the car's right, on the reference area.
    pub lateral: f64,
}

/// Vertical loads in kilograms-force at the run speed (trade habit).
#[derive(Debug, Clone, Copy, Serialize, Deserialize, PartialEq, Default)]
pub struct LiftKg {
    /// Whole body.
    pub total: f64,
    /// On the front axle.
    pub front_axle: f64,
    /// On the rear axle.
    pub rear_axle: f64,
    /// Of the total, the pressure on the ground-facing panels (the
    /// underbody; see `pipeline::underbody_lift`).
    #[serde(default)]
    pub underbody: f64,
    /// The underbody's part on the front axle.
    #[serde(default)]
    pub underbody_front_axle: f64,
    /// The underbody's part on the rear axle.
    #[serde(default)]
    pub underbody_rear_axle: f64,
    /// How far the whole body's lift scatters between like runs, kg: the
    /// built-in noise floor in C_L (or the run's own panel noise where
    /// larger, `--noise`) at this run's dynamic pressure and reference
    /// area ([`Summary::lift_noise_kg`]); a review found the lift, the
    /// least certain number, printed with no uncertainty beside it.
    #[serde(default)]
    pub noise: f64,
}

/// Where the boundary layer separated.
#[derive(Debug, Clone, Copy, Serialize, Deserialize, PartialEq, Default)]
pub struct Separation {
    /// Separated area, m^2 (whole body: both halves of a half model).
    pub area_m2: f64,
    /// Fraction of the wetted area.
    pub fraction: f64,
    /// Separated fraction of the ground-facing panels' area (the
    /// underbody; zero for a body without them).
    #[serde(default)]
    pub underbody_fraction: f64,
    /// Separated area as the stream sees it (area times the magnitude of
    /// the normal's component along the stream), m^2, whole body.
    #[serde(default)]
    pub frontal_m2: f64,
    /// Area beside sharp front edges the flow leaves (rims), where the
    /// pressure is held at the free-streamline bound, m^2, whole body.
    #[serde(default)]
    pub rim_m2: f64,
    /// The largest rounding of a front edge that counts as a rim, m.
    #[serde(default)]
    pub rim_radius_m: f64,
    /// Where the area beside rims lies: the x range of its panels'
    /// centroids, m (empty, `[inf, -inf]` in memory, when there is none).
    #[serde(default)]
    pub rim_x_m: [f64; 2],
    /// The z range of the same, m.
    #[serde(default)]
    pub rim_z_m: [f64; 2],
}

/// The drag estimate with its sensitivity band.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct DragEstimate {
    /// Central estimate of the drag coefficient.
    pub cd: f64,
    /// Lowest drag coefficient of the sensitivity runs.
    pub cd_low: f64,
    /// Highest drag coefficient of the sensitivity runs.
    pub cd_high: f64,
    /// What the sensitivity runs varied.
    pub band: String,
    /// Drag force, N.
    pub force_n: f64,
}

/// Mesh facts.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct MeshFacts {
    /// Facets read from the file (or generated).
    pub input_facets: usize,
    /// Real panels solved.
    pub panels: usize,
    /// Ground plane height, m.
    pub ground_z: Option<f64>,
    /// Half model mirrored in y = 0.
    pub symmetry_plane: bool,
    /// Wetted area of the whole body, m^2.
    pub wetted_area_m2: f64,
    /// Preparation report (reading, repair passes, coarsening, quality).
    pub preparation: serde_json::Value,
    /// The STL's size and content hash ([`stl_fingerprint`]), so that a
    /// sweep can tell a file replaced under its name whatever its time
    /// stamp; null for a built-in shape.
    #[serde(default)]
    pub stl_fingerprint: Option<String>,
}

/// A file's size and a hash of its bytes, `"SIZE:HASH"` (hash: the Fx
/// multiply-rotate step over little-endian 8-byte words, fixed here so
/// that it stays the same across builds; not cryptographic: it tells a
/// re-exported scan from the one a result was computed for). `None` when
/// the file cannot be read.
pub fn stl_fingerprint(path: &std::path::Path) -> Option<String> {
    let bytes = std::fs::read(path).ok()?;
    let mut hash: u64 = 0;
    for chunk in bytes.chunks(8) {
        let mut word = [0u8; 8];
        word[..chunk.len()].copy_from_slice(chunk);
        hash = (hash.rotate_left(5) ^ u64::from_le_bytes(word)).wrapping_mul(0x517c_c1b7_2722_0a95);
    }
    Some(format!("{}:{hash:016x}", bytes.len()))
}

/// Reference values.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct ReferenceValues {
    /// Reference area, m^2.
    pub area_m2: f64,
    /// Reference length, m.
    pub length_m: f64,
    /// Moment point, m.
    pub moment_point_m: [f64; 3],
    /// Front axle x, m.
    pub front_axle_x_m: f64,
    /// Rear axle x, m.
    pub rear_axle_x_m: f64,
    /// Which of these the case gave (the rest were computed or assumed).
    pub given: BTreeMap<String, bool>,
    /// The floor's height above the ground at the front and the rear axle,
    /// m (the lowest surface facing down on the centre line within a
    /// fortieth of the length of each axle, `write::floor_heights`);
    /// null in free air or with no surface facing down there.
    #[serde(default)]
    pub floor_heights_m: Option<[f64; 2]>,
}

/// A pitch under this many degrees reads "level" (a millimetre over a
/// wheelbase is 0.02 degrees, and the floor heights are read from panels
/// a few millimetres apart; our choice).
pub const LEVEL_DEG: f64 = 0.05;

impl ReferenceValues {
    /// The pitch the floor heights give, degrees, positive nose down
    /// (the rear floor higher than the front).
    pub fn rake_deg(&self) -> Option<f64> {
        let [f, r] = self.floor_heights_m?;
        let wheelbase = self.rear_axle_x_m - self.front_axle_x_m;
        (wheelbase > 0.0).then(|| (r - f).atan2(wheelbase).to_degrees())
    }

    /// The floor heights in words: "front axle 100 mm, rear 122 mm (0.50
    /// degrees nose down)"; `None` without them.
    pub fn floor_words(&self) -> Option<String> {
        let [f, r] = self.floor_heights_m?;
        let rake = self.rake_deg().map_or(String::new(), |d| {
            let way = if d > 0.0 { "nose down" } else { "nose up" };
            if d.abs() < LEVEL_DEG {
                " (level)".to_owned()
            } else {
                format!(" ({:.2} degrees {way})", d.abs())
            }
        });
        Some(format!(
            "front axle {:.0} mm, rear {:.0} mm{rake}",
            1000.0 * f,
            1000.0 * r
        ))
    }
}

/// The panels beside sharp edges whose attached suction was held at the
/// dead water's pressure, and what that moved.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct EdgeHold {
    /// Panels held.
    pub panels: usize,
    /// The strongest attached suction held, Cp.
    pub worst_cp: f64,
    /// Where it lies, m.
    pub worst_at_m: [f64; 3],
    /// The pressure they were held at, Cp.
    pub held_cp: f64,
    /// Drag moved by holding them, counts (held less unheld).
    pub drag_counts: f64,
    /// Lift moved by holding them, kg.
    pub lift_kg: f64,
    /// Lift coefficient moved by holding them.
    pub lift_cl: f64,
}

/// Solver facts.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct SolverFacts {
    /// Linear solver used.
    pub method: String,
    /// Krylov iterations, if iterative.
    pub iterations: Option<usize>,
    /// Relative residual of an iterative solve (null for a direct LU
    /// solve, which overwrites the matrix it would be checked against).
    pub residual: Option<f64>,
    /// Surface streamlines traced.
    pub streamlines: usize,
    /// Panels no streamline reached.
    pub unresolved_panels: usize,
}

/// The whole summary.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq, Default)]
pub struct Summary {
    /// `tuft` and its version.
    pub tool: String,
    /// Case name.
    pub case_name: String,
    /// The resolved case.
    pub case: serde_json::Value,
    /// Mesh facts.
    pub mesh: MeshFacts,
    /// Reference values.
    pub reference: ReferenceValues,
    /// Dynamic pressure, Pa.
    pub dynamic_pressure_pa: f64,
    /// Reynolds number on the reference length.
    pub reynolds_number: f64,
    /// Coefficients of the drag estimate: pressure (the dead water at its
    /// pressure after the separated-flow loop, the plateau model with
    /// attached flow only) plus friction.
    pub coefficients: CoefficientSet,
    /// Coefficients of the attached potential flow: pressure only, no
    /// separation model, no friction. Its drag is the panel method's
    /// residual (zero in exact potential flow: d'Alembert), no estimate;
    /// the attached flow's drag estimate with the plateau model is
    /// `separated_wakes.cd_plateau`.
    pub coefficients_attached: CoefficientSet,
    /// The estimate's drag and side force in the body's axes (equal to
    /// them straight ahead; in a cross wind the drag along the wind takes
    /// in part of the side force, [`CoefficientSet::body_axes`]).
    #[serde(default)]
    pub coefficients_body_axes: BodyAxes,
    /// Drag estimate with its band.
    pub drag_estimate: DragEstimate,
    /// Lift in kg at the run speed.
    pub lift_kg: LiftKg,
    /// Separation.
    pub separation: Separation,
    /// Solver facts.
    pub solver: SolverFacts,
    /// The separated-flow loop (null when the case asked for attached
    /// flow only).
    #[serde(default)]
    pub separated_wakes: Option<SeparatedWakes>,
    /// The case's named regions and how much of each separated.
    #[serde(default)]
    pub regions: Vec<crate::region::RegionResult>,
    /// What holding the suction beside sharp edges no surface streamline
    /// crossed did to the loads (`pipeline::hold_edge_spikes`; null when
    /// no panel was held).
    #[serde(default)]
    pub edge_hold: Option<EdgeHold>,
    /// The same case solved at two other panel counts (`tuft run
    /// --noise`; null without it).
    #[serde(default)]
    pub panel_noise: Option<crate::noise::PanelNoise>,
    /// Seconds per phase.
    pub timings_s: BTreeMap<String, f64>,
    /// Warnings the user must read.
    pub warnings: Vec<String>,
    /// Remarks that call for no action (the grading of a mesh tuft
    /// coarsened).
    #[serde(default)]
    pub notes: Vec<String>,
    /// The caution that goes with every number here.
    pub caution: String,
}

impl LiftKg {
    /// The lift, its underbody's part and the rest of the body's, each
    /// with its front and rear axle shares, in words
    /// ([`crate::output::lift_family`]: one set of decimals at which every
    /// figure is its value rounded and every sum reads as shown).
    fn family(&self) -> [[String; 3]; 3] {
        crate::output::lift_family(
            [self.total, self.front_axle, self.rear_axle],
            [
                self.underbody,
                self.underbody_front_axle,
                self.underbody_rear_axle,
            ],
        )
    }

    /// Total, front and rear axle in words, the axles adding up to the
    /// total, each signed (lift `+`, downforce `-`, zero unsigned; a
    /// review read "15 kg (front -40, rear 55)" beside "+161 kg" for the
    /// rest of the body), to the decimals of [`Self::family`].
    pub fn axle_words(&self) -> [String; 3] {
        let [t, _, _] = self.family();
        t
    }

    /// The underbody's part, front and rear, in words as
    /// [`Self::axle_words`].
    pub fn underbody_axle_words(&self) -> [String; 3] {
        let [_, u, _] = self.family();
        u
    }

    /// The rest of the body's lift (the total less the underbody's), whole
    /// body, front and rear axle, signed, adding up with
    /// [`Self::axle_words`] and [`Self::underbody_axle_words`] as shown.
    pub fn rest_axle_words(&self) -> [String; 3] {
        let [_, _, r] = self.family();
        r
    }

    /// The rest of the body's lift, whole body, as
    /// [`Self::rest_axle_words`].
    pub fn rest_words(&self) -> String {
        let [_, _, [r, _, _]] = self.family();
        r
    }
}

impl Summary {
    /// A number of the run's `[flow]` section as its case records it
    /// (`speed`, `yaw`, `density`, ...).
    pub fn flow(&self, key: &str) -> Option<f64> {
        self.case
            .get("flow")?
            .get(key)
            .and_then(serde_json::Value::as_f64)
    }

    /// The run warned that its two sides separate differently at zero yaw
    /// ([`crate::pipeline::side_difference_warning`]).
    pub fn sides_differ(&self) -> bool {
        crate::pipeline::sides_differ(&self.warnings)
    }

    /// The spread of the drag over the run's panel counts, counts (`tuft
    /// run --noise`; `None` without it).
    pub fn drag_spread(&self) -> Option<f64> {
        self.panel_noise.as_ref().map(|n| n.drag_counts)
    }

    /// The spread of the lift coefficient over the run's panel counts
    /// (`None` without `--noise`).
    pub fn lift_spread(&self) -> Option<f64> {
        self.panel_noise.as_ref().map(|n| n.lift_cl)
    }

    /// The whole body's lift noise, kg: the built-in floor in C_L, or the
    /// run's own panel noise where larger, at its dynamic pressure and
    /// reference area.
    pub fn lift_noise_kg(&self) -> f64 {
        crate::compare::lift_floor_cl([self.lift_spread(); 2])
            * self.dynamic_pressure_pa
            * self.reference.area_m2
            / tuft_solver::loads::STANDARD_GRAVITY
    }

    /// Whether the drag comes from the attached flow's plateau model: the
    /// run had the separated-flow loop off (`wakes = "attached"`) and the
    /// boundary layer separated somewhere. That model's drag is no basis
    /// for a ranking (see [`crate::pipeline::PLATEAU_DRAG_WARNING`]).
    pub fn plateau_drag(&self) -> bool {
        self.separated_wakes.is_none() && self.separation.area_m2 > 0.0
    }

    /// The note of a separated-flow run on at least a third but under
    /// half of the panels suggested for its body, that a region's verdict
    /// can still change with the panel count
    /// ([`crate::pipeline::coarse_note`]), from what the summary records:
    /// the run's report and stdout give it, and `tuft compare` and `tuft
    /// collect` carry it beside the verdicts they show.
    pub fn coarse_note(&self) -> Option<String> {
        let suggested = self
            .mesh
            .preparation
            .get("suggested_panels")
            .and_then(serde_json::Value::as_u64)?;
        crate::pipeline::coarse_note(
            self.mesh.panels,
            usize::try_from(suggested).ok()?,
            self.separated_wakes.is_some(),
            self.all_facets(),
        )
    }

    /// Whether the run was solved on under half of the panels suggested
    /// for its body: its region verdicts are then at best provisional
    /// ([`crate::region::RegionResult::coarse_mesh`]).
    pub fn under_half_suggested(&self) -> bool {
        self.mesh
            .preparation
            .get("suggested_panels")
            .and_then(serde_json::Value::as_u64)
            .is_some_and(|n| 2 * self.mesh.panels < n as usize)
    }

    /// Whether the run was on every facet of its STL (nothing was
    /// coarsened): `geometry.panels` cannot give it more, only a finer
    /// export can ([`crate::pipeline::raise_advice`]).
    pub fn all_facets(&self) -> bool {
        self.case["geometry"]["stl"].is_string() && self.mesh.preparation["coarsen"].is_null()
    }

    /// What the repair changed on the STL's surface, in a sentence: holes
    /// filled (the largest named), facets flipped to agree with their
    /// neighbours or parts turned outward, duplicate facets, facets shared
    /// three ways and doubled layers dropped; `None` when it changed
    /// nothing of the surface. A review's filled 300 x 50 mm hole in a
    /// pickup's floor moved the rear axle by 4.8 kg with only `tuft check`
    /// saying it was there.
    pub fn repair_words(&self) -> Option<String> {
        let r = &self.mesh.preparation["repair"];
        let count = |v: &serde_json::Value| v.as_u64().unwrap_or(0);
        let mut parts = Vec::new();
        let mut guess = "";
        if let Some(filled) = r["holes"]["filled"].as_array().filter(|f| !f.is_empty()) {
            let largest = filled.iter().max_by(|a, b| {
                let p = |v: &serde_json::Value| v["perimeter"].as_f64().unwrap_or(0.0);
                p(a).total_cmp(&p(b))
            });
            let at = largest
                .and_then(|l| {
                    let c = l["centre"].as_array()?;
                    let xyz: Vec<f64> = c.iter().filter_map(serde_json::Value::as_f64).collect();
                    let [x, y, z] = xyz[..] else { return None };
                    Some(format!(
                        " ({}a rim {:.2} m long, at x {x:.2}, y {y:.2}, z {z:.2} m)",
                        if filled.len() > 1 {
                            "the largest with "
                        } else {
                            ""
                        },
                        l["perimeter"].as_f64()?
                    ))
                })
                .unwrap_or_default();
            parts.push(format!(
                "{}{at}",
                crate::output::plural(filled.len(), "hole filled", "holes filled")
            ));
            guess = "; a filled hole is a guess at the surface there, so a result that moves with it \
                     rests on the guess";
        }
        for (n, one, many) in [
            (
                count(&r["orientation"]["facets_flipped"]),
                "facet flipped to agree with its neighbours",
                "facets flipped to agree with their neighbours",
            ),
            (
                count(&r["outward"]["components_reversed"]),
                "part turned outward",
                "parts turned outward",
            ),
            (
                count(&r["duplicates"]),
                "duplicate facet dropped",
                "duplicate facets dropped",
            ),
            (
                count(&r["fins"]),
                "facet dropped from edges shared three ways",
                "facets dropped from edges shared three ways",
            ),
            (
                r["layers"].as_array().map_or(0, |l| l.len() as u64),
                "doubled layer dropped",
                "doubled layers dropped",
            ),
        ] {
            if n > 0 {
                parts.push(crate::output::plural(n as usize, one, many));
            }
        }
        (!parts.is_empty()).then(|| {
            format!(
                "{}{guess} (tuft check lists every repair)",
                crate::output::and_list(&parts)
            )
        })
    }

    /// The repairs in a few words for a table's cell (`collect`'s
    /// ranking, sweep.csv's `repairs`): [`Self::repair_words`]' list
    /// without where the largest hole lies nor the advice (a review's
    /// morning table had shown a file with four holes filled and one with
    /// 2,324 facets flipped as clean as the rest).
    pub fn repair_short(&self) -> Option<String> {
        let words = self.repair_words()?;
        let list = words.split(';').next().unwrap_or(&words);
        let list = list.split(" (tuft check").next().unwrap_or(list).to_owned();
        // The largest hole's place, in brackets, is for the report.
        Some(match (list.find(" ("), list.find(')')) {
            (Some(a), Some(b)) if a < b => format!("{}{}", &list[..a], &list[b + 1..]),
            _ => list,
        })
    }

    /// Whether the surface was wrapped (parts joined into one outer surface
    /// on a grid, `tuft_mesh::wrap`), which re-meshes the whole body.
    pub fn wrapped(&self) -> bool {
        self.mesh.preparation["wrap"].is_object()
    }

    /// Why the run has not the panel count asked for, when the
    /// coarsening settled on another ([`crate::pipeline::panels_instead`]).
    pub fn panels_instead(&self) -> Option<String> {
        let c = &self.mesh.preparation["coarsen"];
        let target = usize::try_from(c["target_panels"].as_u64()?).ok()?;
        crate::pipeline::panels_instead(self.mesh.panels, target, c["fallback"].as_str())
    }

    /// What the wrap closed between parts (a tyre in its arch), in one
    /// line for stdout: how many places, the air filled and the largest's
    /// centre; `None` when it closed none (a review's run summary never
    /// said its arches had been filled). Fills of a few cells in creases
    /// are not gaps ([`tuft_mesh::wrap::is_gap_place`]).
    pub fn gaps_closed(&self) -> Option<String> {
        let wrap = &self.mesh.preparation["wrap"];
        let cell = wrap["cell"].as_f64()?;
        let volume = |p: &serde_json::Value| p[0].as_f64().unwrap_or(0.0);
        let places: Vec<&serde_json::Value> = wrap["gap_places"]
            .as_array()?
            .iter()
            .filter(|p| tuft_mesh::wrap::is_gap_place(volume(p), cell))
            .collect();
        let litres = tuft_mesh::wrap::litres(places.iter().map(|p| volume(p)).sum::<f64>());
        let first = places.first()?;
        let at = |k: usize| first[1][k].as_f64().unwrap_or(f64::NAN);
        Some(format!(
            "the wrap closed gaps between parts in {} ({litres} litres of air; the largest near x \
             {:.2}, y {:.2}, z {:.2} m), as round a tyre in its arch: the panels take the parts as joined \
             there (the report's wrap note lists the places)",
            crate::output::plural(places.len(), "place", "places"),
            at(0),
            at(1),
            at(2)
        ))
    }

    /// Whether the body stood on the ground (the wrap found contact:
    /// tyres, usually). Drag with wheels on is no basis for a ranking (see
    /// [`crate::pipeline::WHEELS_DRAG`]).
    pub fn wheels_on(&self) -> bool {
        self.contact_area() > 0.0 && !self.floor_on_ground()
    }

    /// Whether the body's floor, not tyres, stood on the ground (over more
    /// than [`crate::pipeline::FLOOR_CONTACT_SHARE`] of its plan area): the
    /// ground is set too high for it, and the wrap cut the floor off, so
    /// the body solved is not the one drawn.
    pub fn floor_on_ground(&self) -> bool {
        self.bounds()
            .is_some_and(|b| crate::pipeline::floor_contact(self.contact_area(), b).is_some())
    }

    /// Whether the rim zone (panels beside sharp front edges the flow
    /// leaves) is worth a line: at least 0.005 m^2, a patch 7 cm across (a
    /// review's yawed coupe printed "0.00 m^2 beside them, at x 0.01 to
    /// 0.01 m").
    pub fn rim_shown(&self) -> bool {
        self.separation.rim_m2 >= 0.005
    }

    /// Whether the front/rear axle split of the lift means anything: a
    /// ground is given (a road vehicle) or the case gave the axles. A test
    /// sphere in free air had read "lift 0 kg (front +35, rear -35)", its
    /// drag's moment about a ground point it does not have, on axles
    /// assumed at 20 and 80 % of its length.
    pub fn axle_split_shown(&self) -> bool {
        self.mesh.ground_z.is_some() || self.reference.given.get("axles").copied().unwrap_or(false)
    }

    /// Height of the body's lowest point above the ground, m; `None` in
    /// free air or when the extent is not recorded.
    pub fn clearance_m(&self) -> Option<f64> {
        Some(self.bounds()?[0][2] - self.mesh.ground_z?)
    }

    /// Whether the run is a half model that a cross wind ran mirrored into
    /// a whole body (its case a half model, no symmetry plane solved).
    pub fn mirrored_half(&self) -> bool {
        !self.mesh.symmetry_plane && self.case["geometry"]["half_model"].as_bool() == Some(true)
    }

    /// Height of the floor above the ground, m: the lowest point's, or on
    /// a body standing on its tyres the lower of the floor's heights at
    /// the axles (a review's body with and without wheels, its floor at
    /// 140 mm in both, had read 139 mm lower with them); `None` in free
    /// air.
    pub fn floor_clearance_m(&self) -> Option<f64> {
        if self.wheels_on() {
            self.reference.floor_heights_m.map(|[f, r]| f.min(r))
        } else {
            self.clearance_m()
        }
    }

    /// The solved body's extent, metres (least and greatest corner), as
    /// the preparation report records it; `None` when it does not.
    pub fn bounds(&self) -> Option<[[f64; 3]; 2]> {
        let b = &self.mesh.preparation["bounds"];
        let corner = |k: usize| -> Option<[f64; 3]> {
            let c = b.get(k)?;
            Some([
                c.get(0)?.as_f64()?,
                c.get(1)?.as_f64()?,
                c.get(2)?.as_f64()?,
            ])
        };
        Some([corner(0)?, corner(1)?])
    }

    /// Area over which the wrapped body stood on the ground, m^2 (0 when
    /// it did not).
    fn contact_area(&self) -> f64 {
        self.mesh.preparation["wrap"]["contact_area"]
            .as_f64()
            .unwrap_or(0.0)
    }
}

/// What the separated-flow loop found.
#[derive(Debug, Clone, Copy, Serialize, Deserialize, PartialEq, Default)]
pub struct SeparatedWakes {
    /// Passes run, the attached pass included.
    pub passes: usize,
    /// Whether the separated set settled before the pass limit.
    pub converged: bool,
    /// Whether a pass blew up and was discarded.
    pub diverged: bool,
    /// Drag coefficient of the attached pass with the plateau model and
    /// friction (what `wakes = "attached"` would report).
    pub cd_plateau: f64,
    /// Drag coefficient of the last pass with the dead water at its
    /// pressure, plus friction (the same as `drag_estimate.cd`).
    pub cd_loop: f64,
    /// Base pressure coefficient of the attached pass with the plateau
    /// model (mean Cp over downstream-facing panels).
    pub base_cp_plateau: Option<f64>,
    /// Base pressure coefficient of the last pass.
    pub base_cp_loop: Option<f64>,
    /// The dead water's pressure coefficient, from Hoerner's base-drag
    /// correlation (`None` when nothing separated faces downstream: the
    /// plateau model then holds the separated panels).
    #[serde(default)]
    pub dead_water_cp: Option<f64>,
    /// Wake-sheet panels shed in the last pass (0 with the open dead
    /// water, which sheds none).
    pub wake_panels: usize,
}

impl SeparatedWakes {
    /// The dead water's one pressure as stdout, the report and the pictures
    /// quote it: Hoerner's, or where nothing separated faces downstream the
    /// base's mean; `None` after one pass, when nothing separated.
    pub fn dead_water_pressure(&self) -> Option<f64> {
        self.dead_water_cp
            .or(self.base_cp_loop)
            .filter(|_| self.passes > 1)
    }
}

/// The caution printed with every result.
pub const CAUTION: &str = "Screening estimate only. Lift, drag and stability at speed must be \
confirmed by validated CFD or wind-tunnel tests and by the responsible engineer, under local \
regulations.";

#[cfg(test)]
mod tests {
    use super::*;

    /// The lift is split between axles over a ground or on given axles,
    /// not for a body in free air with assumed ones.
    #[test]
    fn the_axle_split_needs_a_ground_or_given_axles() {
        let mut s = Summary::default();
        assert!(!s.axle_split_shown());
        s.reference.given.insert("axles".into(), true);
        assert!(s.axle_split_shown());
        s.reference.given.insert("axles".into(), false);
        s.mesh.ground_z = Some(0.0);
        assert!(s.axle_split_shown());
    }

    /// The repairs that changed the surface are said in one sentence
    /// (holes filled, the largest named; facets flipped), with the
    /// caution on a filled hole only where one was; none without them.
    #[test]
    fn repairs_to_the_surface_are_said() {
        let mut s = Summary::default();
        assert_eq!(s.repair_words(), None);
        s.mesh.preparation = serde_json::json!({"repair": {
            "holes": {"filled": [
                {"centre": [4.426, 0.346, 0.85], "perimeter": 0.8475},
                {"centre": [1.0, 0.2, 0.3], "perimeter": 0.1}
            ]},
            "orientation": {"facets_flipped": 1256},
            "outward": {"components_reversed": 0},
            "duplicates": 0, "fins": 0, "layers": []
        }});
        assert_eq!(
            s.repair_words().as_deref(),
            Some(
                "2 holes filled (the largest with a rim 0.85 m long, at x 4.43, y 0.35, z 0.85 m) and 1256 \
                 facets flipped to agree with their neighbours; a filled hole is a guess at the \
                 surface there, so a result that moves with it rests on the guess (tuft check lists \
                 every repair)"
            )
        );
        assert_eq!(
            s.repair_short().as_deref(),
            Some("2 holes filled and 1256 facets flipped to agree with their neighbours")
        );
        s.mesh.preparation["repair"]["holes"]["filled"] = serde_json::json!([]);
        assert_eq!(
            s.repair_words().as_deref(),
            Some(
                "1256 facets flipped to agree with their neighbours (tuft check lists every repair)"
            )
        );
        assert_eq!(
            s.repair_short().as_deref(),
            Some("1256 facets flipped to agree with their neighbours")
        );
    }
}
