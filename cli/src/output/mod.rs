//! Everything a run writes: tables, VTK files, pictures and the report.
//!
//! The writers take plain data (the structs below), never solver types, so
//! they can be tested on analytic fields and wired to any solver output.
//! One file per format:
//!
//! - [`csv`]: `panels.csv`, one row per real panel;
//! - [`vtk`]: `surface.vtu`, `streamlines.vtp`, `wake.vtu`, slices as `.vti`
//!   (VTK XML, raw little-endian data base64-encoded inline);
//! - [`render`]: orthographic z-buffered views of the body, coloured by a
//!   field; [`sheet`] lays four of them out with a title and a colour bar;
//! - [`colorbar`]: colour scales (Cp, separation risk, speed) and their bars;
//! - [`text`]: text drawing with an embedded font (DejaVu Sans), so pictures
//!   come out the same on a machine with no fonts installed;
//! - [`plot`]: line plots, among them Cp along the centre line;
//! - [`slice`]: pictures of flow slices;
//! - [`html`]: the self-contained `report.html`.
//!
//! Units are SI throughout (metres, m/s); angles in the captions in degrees.

pub mod canvas;
pub mod colorbar;
pub mod csv;
pub mod glance;
pub mod html;
pub mod outline;
pub mod plot;
pub mod render;
pub mod sheet;
pub mod slice;
pub mod text;
pub mod tufts;
pub mod vtk;

#[cfg(test)]
pub(crate) mod fixture;

use std::fs::File;
use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};

use nalgebra::{Point3, Vector3};

/// Boundary-layer state of a panel.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum PanelState {
    /// Laminar boundary layer.
    Laminar,
    /// Turbulent boundary layer.
    Turbulent,
    /// The boundary layer has separated (or the panel lies downstream of a
    /// separation line).
    Separated,
    /// No boundary-layer result (no streamline reached the panel).
    Unresolved,
}

impl PanelState {
    /// Every state, in code order.
    pub const ALL: [PanelState; 4] = [
        PanelState::Laminar,
        PanelState::Turbulent,
        PanelState::Separated,
        PanelState::Unresolved,
    ];

    /// Lowercase name, as written in `panels.csv`.
    pub fn as_str(self) -> &'static str {
        match self {
            PanelState::Laminar => "laminar",
            PanelState::Turbulent => "turbulent",
            PanelState::Separated => "separated",
            PanelState::Unresolved => "unresolved",
        }
    }

    /// Integer code written to VTK files: 0 laminar, 1 turbulent,
    /// 2 separated, 3 unresolved.
    pub fn code(self) -> i32 {
        match self {
            PanelState::Laminar => 0,
            PanelState::Turbulent => 1,
            PanelState::Separated => 2,
            PanelState::Unresolved => 3,
        }
    }
}

/// Surface results, one value per real panel of `mesh` (same order).
#[derive(Debug, Clone, Copy)]
pub struct SurfaceResult<'a> {
    /// The real panels (no images).
    pub mesh: &'a tuft_mesh::PanelMesh,
    /// Pressure coefficient `(p - p_inf) / (0.5 rho U^2)`.
    pub cp: &'a [f64],
    /// Surface velocity, m/s.
    pub velocity: &'a [Vector3<f64>],
    /// Momentum thickness, m.
    pub theta: &'a [f64],
    /// Shape factor `H = delta* / theta`.
    pub shape_factor: &'a [f64],
    /// Skin-friction coefficient.
    pub cf: &'a [f64],
    /// Boundary-layer state.
    pub state: &'a [PanelState],
    /// Separation risk, 0 (far from separating) to 1 (separated).
    pub risk: &'a [f64],
    /// How the separated regions were found, for the risk picture (e.g.
    /// the separated-flow loop's passes); `None` says nothing.
    pub separation_note: Option<&'a str>,
    /// The one pressure coefficient the separated panels' `cp` holds (the
    /// separated-flow loop's dead water), which the pressure pictures mark
    /// as assumed; `None` where their `cp` is the attached flow's.
    pub dead_water_cp: Option<f64>,
    /// Panels beside a sharp edge the flow leaves, whose attached `cp` is
    /// held no lower than the dead water's (the separated-flow loop's rim
    /// zone); empty where nothing is held or it is not known.
    pub held: &'a [bool],
}

impl SurfaceResult<'_> {
    /// Number of real panels.
    pub fn len(&self) -> usize {
        self.mesh.len()
    }

    /// True when there are no panels.
    pub fn is_empty(&self) -> bool {
        self.mesh.is_empty()
    }

    /// A boundary-layer integral value of panel `i` as the files give it:
    /// NaN where the panel is separated, since the march's theta and H
    /// past separation describe no boundary layer (a review found theta up
    /// to 11 m on a 4.5 m car and H with a median of 24 there).
    fn layer_value(&self, field: &[f64], i: usize) -> f64 {
        if self.state[i] == PanelState::Separated {
            f64::NAN
        } else {
            field[i]
        }
    }

    /// Momentum thickness of panel `i`, m; NaN where it is separated.
    pub fn theta_at(&self, i: usize) -> f64 {
        self.layer_value(self.theta, i)
    }

    /// Shape factor of panel `i`; NaN where it is separated.
    pub fn shape_factor_at(&self, i: usize) -> f64 {
        self.layer_value(self.shape_factor, i)
    }

    /// Check that every field has one value per panel.
    ///
    /// # Errors
    /// [`OutputError::EmptyMesh`] without panels, [`OutputError::LengthMismatch`]
    /// naming the first field of the wrong length.
    pub fn validate(&self) -> Result<(), OutputError> {
        let n = self.mesh.len();
        if n == 0 {
            return Err(OutputError::EmptyMesh);
        }
        let lengths = [
            ("cp", self.cp.len()),
            ("velocity", self.velocity.len()),
            ("theta", self.theta.len()),
            ("shape_factor", self.shape_factor.len()),
            ("cf", self.cf.len()),
            ("state", self.state.len()),
            ("risk", self.risk.len()),
        ];
        check_lengths(&lengths, n)?;
        if self.held.is_empty() {
            Ok(())
        } else {
            check_lengths(&[("held", self.held.len())], n)
        }
    }
}

/// Fail on the first `(name, length)` pair whose length is not `expected`.
fn check_lengths(lengths: &[(&'static str, usize)], expected: usize) -> Result<(), OutputError> {
    match lengths.iter().find(|(_, len)| *len != expected) {
        Some(&(field, found)) => Err(OutputError::LengthMismatch {
            field,
            expected,
            found,
        }),
        None => Ok(()),
    }
}

/// A named scalar carried along streamlines, one value per point.
#[derive(Debug, Clone, Copy)]
pub struct PointScalars<'a> {
    /// Array name in the VTK file (e.g. `speed_ratio`).
    pub name: &'a str,
    /// One vector per line, one value per point of that line.
    pub values: &'a [Vec<f64>],
}

/// Streamlines (surface or off-body), as polylines in metres.
#[derive(Debug, Clone, Copy)]
pub struct Streamlines<'a> {
    /// The polylines.
    pub lines: &'a [Vec<Point3<f64>>],
    /// Optional per-point scalars (may be empty).
    pub scalars: &'a [PointScalars<'a>],
}

/// Wake sheets as quadrilaterals with their doublet strength.
#[derive(Debug, Clone, Copy)]
pub struct WakeSheets<'a> {
    /// Corners of each quad, in order round the quad, metres.
    pub quads: &'a [[Point3<f64>; 4]],
    /// Doublet strength of each quad, m^2/s.
    pub strength: &'a [f64],
}

/// A rectangular grid of flow samples on a plane.
///
/// Sample `(i, j)` sits at `origin + spacing (i axes.0 + j axes.1)`, and is
/// stored at index `i + j dims.0` (i fastest, as VTK image data).
#[derive(Debug, Clone, PartialEq)]
pub struct Slice {
    /// Short name, used in file names (e.g. `centre-plane`).
    pub name: String,
    /// What the picture's title calls it (e.g. `centre plane`).
    pub title: String,
    /// Position of sample `(0, 0)`, metres.
    pub origin: Point3<f64>,
    /// Unit vectors along `i` and along `j`.
    pub axes: (Vector3<f64>, Vector3<f64>),
    /// Distance between samples, metres.
    pub spacing: f64,
    /// Samples along `i` and along `j`.
    pub dims: (usize, usize),
    /// Velocity, m/s; `None` inside the body.
    pub velocity: Vec<Option<Vector3<f64>>>,
    /// Pressure coefficient; `None` inside the body.
    pub cp: Vec<Option<f64>>,
    /// Samples so close to the surface (within a panel size) that the
    /// panel method's near field is unreliable there: drawn, but left out
    /// of the colour range. Empty, or one per sample.
    pub near_surface: Vec<bool>,
    /// Samples in the dead water behind separated surface
    /// ([`slice::dead_water`]): hatched on the pictures and left out of
    /// the colour range, since the model holds that region at one
    /// pressure and the flow drawn there is the stream it lets through.
    /// Empty, or one per sample.
    pub dead_water: Vec<bool>,
    /// Which flow the slice shows and what it leaves out, for the
    /// picture's subtitle (empty for none).
    pub note: String,
    /// What the samples cannot show for lying closer together than the
    /// panels resolve, a line of the picture's subtitle (empty for none).
    pub resolution: String,
}

impl Slice {
    /// Number of samples.
    pub fn len(&self) -> usize {
        self.dims.0 * self.dims.1
    }

    /// True when the grid has no samples.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Position of sample `(i, j)`.
    pub fn point(&self, i: usize, j: usize) -> Point3<f64> {
        self.origin + self.spacing * (i as f64 * self.axes.0 + j as f64 * self.axes.1)
    }

    /// Check the sample arrays against `dims`.
    ///
    /// # Errors
    /// [`OutputError::EmptySlice`] for a grid without samples,
    /// [`OutputError::LengthMismatch`] for arrays of the wrong length.
    pub fn validate(&self) -> Result<(), OutputError> {
        if self.dims.0 < 2 || self.dims.1 < 2 || self.spacing.is_nan() || self.spacing <= 0.0 {
            return Err(OutputError::EmptySlice {
                name: self.name.clone(),
            });
        }
        let lengths = [
            ("slice velocity", self.velocity.len()),
            ("slice cp", self.cp.len()),
        ];
        check_lengths(&lengths, self.len())?;
        for (name, flags) in [
            ("slice near_surface", &self.near_surface),
            ("slice dead_water", &self.dead_water),
        ] {
            if !flags.is_empty() {
                check_lengths(&[(name, flags.len())], self.len())?;
            }
        }
        Ok(())
    }
}

/// What a picture shows the run as: case name and conditions.
#[derive(Debug, Clone, PartialEq)]
pub struct Caption {
    /// Case name (e.g. `coupe-25`).
    pub case: String,
    /// Free-stream speed, m/s.
    pub speed_ms: f64,
    /// Yaw angle, degrees (free stream `(cos yaw, sin yaw, 0)`).
    pub yaw_deg: f64,
}

impl Caption {
    /// `"coupe-25, 40 m/s (144 km/h), yaw 0°"`; a yawed run says which
    /// side the wind comes from (`"yaw 10° (wind from the car's left,
    /// −y)"`: a positive yaw turns the wind towards +y, the car's right).
    pub fn conditions(&self) -> String {
        format!(
            "{}, {}, {}",
            self.case,
            speed_words(self.speed_ms),
            yaw_words(self.yaw_deg)
        )
    }

    /// A picture title: `"Surface pressure, coupe-25, 40 m/s (144 km/h), yaw 0°"`.
    pub fn title(&self, what: &str) -> String {
        format!("{what}, {}", self.conditions())
    }
}

/// A yaw angle in words: `"yaw 0°"`, or with the side the wind comes
/// from, `"yaw 10° (wind from the car's left, −y)"` (a positive yaw turns
/// the free stream towards +y, the car's right seen from the seat).
pub fn yaw_words(yaw_deg: f64) -> String {
    let side = if yaw_deg > 0.0 {
        " (wind from the car's left, \u{2212}y)"
    } else if yaw_deg < 0.0 {
        " (wind from the car's right, +y)"
    } else {
        ""
    };
    format!("yaw {}°{side}", short_number(yaw_deg))
}

/// A speed in m/s with its km/h beside it: `"40 m/s (144 km/h)"`.
pub fn speed_words(speed_ms: f64) -> String {
    format!(
        "{} m/s ({:.0} km/h)",
        speed_number(speed_ms),
        3.6 * speed_ms
    )
}

/// A speed in m/s as people read it: as given when it has at most three
/// decimals, otherwise one (a speed given in km/h comes in as a long
/// fraction: 140 km/h = 38.888... m/s, shown 38.9).
pub fn speed_number(speed_ms: f64) -> String {
    let exact = ((speed_ms * 1000.0).round() - speed_ms * 1000.0).abs() < 1e-6;
    if exact {
        short_number(speed_ms)
    } else {
        format!("{speed_ms:.1}")
    }
}

/// A number with at most three decimals and no trailing zeros.
pub fn short_number(v: f64) -> String {
    let s = format!("{v:.3}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" {
        "0".to_owned()
    } else {
        s.to_owned()
    }
}

/// `v` with three significant digits below 0.1 (a spacing of 2.5 mm
/// reads 0.0025, not 0.003), else as [`short_number`].
pub fn fine_number(v: f64) -> String {
    if v == 0.0 || !v.is_finite() || v.abs() >= 0.1 {
        return short_number(v);
    }
    let decimals = (2 - v.abs().log10().floor() as i32).max(0) as usize;
    let s = format!("{v:.decimals$}");
    s.trim_end_matches('0').trim_end_matches('.').to_owned()
}

/// `v` rounded to `places` decimals, a rounded zero never written "-0".
fn rounded(v: f64, places: usize) -> f64 {
    let scale = 10f64.powi(i32::try_from(places).unwrap_or(0));
    // -0.0 + 0.0 is +0.0 (IEEE 754).
    (v * scale).round() / scale + 0.0
}

/// `v` to `places` decimals, a rounded zero as "0.0", never "-0.0".
pub fn fixed(v: f64, places: usize) -> String {
    format!("{:.places$}", rounded(v, places))
}

/// `text` with its first letter capitalised.
pub fn sentence(text: &str) -> String {
    let mut chars = text.chars();
    chars
        .next()
        .map(|f| f.to_uppercase().chain(chars).collect())
        .unwrap_or_default()
}

/// Items in words: "a", "a and b", "a, b and c".
pub fn and_list<S: AsRef<str>>(items: &[S]) -> String {
    match items {
        [] => String::new(),
        [one] => one.as_ref().to_owned(),
        [rest @ .., last] => {
            let rest: Vec<&str> = rest.iter().map(AsRef::as_ref).collect();
            format!("{} and {}", rest.join(", "), last.as_ref())
        }
    }
}

/// `n` with a comma between groups of three digits: "1,240,000".
pub fn grouped(n: f64) -> String {
    if !(n < 1e15) {
        return format!("{n:.1e}");
    }
    let digits = format!("{:.0}", n.max(0.0));
    let mut out = String::new();
    for (k, c) in digits.chars().enumerate() {
        if k > 0 && (digits.len() - k) % 3 == 0 {
            out.push(',');
        }
        out.push(c);
    }
    out
}

/// `n` and its noun: "1 pass", "4 passes".
pub fn plural(n: usize, one: &str, many: &str) -> String {
    format!("{n} {}", if n == 1 { one } else { many })
}

/// `v` to `places` decimals with its sign always written ("+3.0",
/// "-0.4"), a rounded zero as "+0".
pub fn signed(v: f64, places: usize) -> String {
    format!("{:+.places$}", rounded(v, places))
}

/// Decimals for a set of loads in kg shown together (a total and its axle
/// shares): whole kg from 10 kg up, else enough that the largest shows two
/// digits (one decimal under 10 kg, two under 1 kg, up to four), where
/// whole kg would show a total that its parts do not add up to (a 1 m
/// model: "1 kg (0 front, 2 rear)") and a scale model's lift as nothing
/// (a review's 10 cm toy read "0.0 kg (front 0.0, rear 0.0)" for -0.04).
pub fn kg_places(values: &[f64]) -> usize {
    let largest = values.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    if largest >= 9.95 {
        0
    } else if largest >= 0.995 || largest == 0.0 || !largest.is_finite() {
        1
    } else if largest >= 0.0995 {
        2
    } else if largest >= 0.00995 {
        3
    } else {
        4
    }
}

/// Ten to the power `places`: one unit of `places` decimals is its
/// inverse.
fn ten_to(places: usize) -> f64 {
    10f64.powi(i32::try_from(places).unwrap_or(0))
}

/// `v` in units of `places` decimals, rounded on its own (half away from
/// zero).
fn units_at(v: f64, places: usize) -> i64 {
    (v * ten_to(places)).round() as i64
}

/// Whether the parts of `values` (the first the total) add up to the
/// total within `tolerance` (a set with no parts, or one not finite,
/// does not).
fn parts_add_up(values: &[f64], tolerance: f64) -> bool {
    values.split_first().is_some_and(|(&total, parts)| {
        let sum: f64 = parts.iter().sum();
        !parts.is_empty() && sum.is_finite() && (sum - total).abs() <= tolerance
    })
}

/// A lift in `units` of `places` decimals in words: lift signed `+`,
/// downforce `-`, a zero without its sign ("0", not "+0").
fn lift_word(units: i64, places: usize) -> String {
    let v = from_units(units, places);
    if units > 0 {
        format!("{v:+.places$}")
    } else {
        format!("{v:.places$}")
    }
}

/// A total and its parts (the first value the total), in units of the
/// fewest decimals from `places` (at most `extra` more) at which the
/// parts, each rounded on its own, add up to the total as shown (so each
/// figure shown is its value rounded: 44.58 = 12.15 + 32.43 reads 44.6 =
/// 12.2 + 32.4, where whole kg read "45 = 12 + 32", and largest-remainder
/// rounding had shown -41.603 kg as -41 in one table and -41.6 in the
/// next line, which a review could not cross-check); where none does, at `places` with the parts rounded by
/// largest remainder ([`largest_remainder`], each within a unit of its
/// value). Parts that do not add up to the total (within a hundredth of
/// a unit) are each rounded on their own at `places`. The units and their
/// decimals.
pub fn total_and_parts<const N: usize>(
    values: [f64; N],
    places: usize,
    extra: usize,
) -> ([i64; N], usize) {
    if !parts_add_up(&values, 0.01 / ten_to(places)) {
        return (values.map(|v| units_at(v, places)), places);
    }
    let holds = |p: usize| {
        values.split_first().is_some_and(|(&t, parts)| {
            parts.iter().map(|&v| units_at(v, p)).sum::<i64>() == units_at(t, p)
        })
    };
    match (places..=places + extra).find(|&p| holds(p)) {
        Some(p) => (values.map(|v| units_at(v, p)), p),
        None => (
            largest_remainder(values.map(|v| v * ten_to(places))),
            places,
        ),
    }
}

/// A total and its parts (the first value the total), which add up to
/// it ([`total_and_parts`] has checked), each in whole units: the total
/// rounded, the parts rounded by largest remainder so that they add up to
/// the rounded total.
fn largest_remainder<const N: usize>(values: [f64; N]) -> [i64; N] {
    let mut units = values.map(|v| v.round() as i64);
    let Some((_, parts)) = values.split_first() else {
        return units;
    };
    let floors: Vec<i64> = parts.iter().map(|p| p.floor() as i64).collect();
    let short = units[0] - floors.iter().sum::<i64>();
    if !(0..=i64::try_from(parts.len()).unwrap_or(0)).contains(&short) {
        return units;
    }
    // The parts with the largest remainders go up by one unit, the first
    // of equals first (a stable sort).
    let mut order: Vec<usize> = (0..parts.len()).collect();
    order.sort_by(|&a, &b| {
        let rem = |k: usize| parts[k] - floors[k] as f64;
        rem(b).total_cmp(&rem(a))
    });
    for (k, floor) in floors.iter().enumerate() {
        units[k + 1] = *floor;
    }
    for &k in order.iter().take(usize::try_from(short).unwrap_or(0)) {
        units[k + 1] += 1;
    }
    units
}

/// A total load in kg and its parts (front and rear axle) in the units of
/// [`kg_places`] of the set, by [`total_and_parts`]; and those places.
fn kg_units<const N: usize>(values: [f64; N]) -> ([i64; N], usize) {
    total_and_parts(values, kg_places(&values), KG_EXTRA_PLACES)
}

/// Decimals a set of loads may add beyond [`kg_places`] for its parts to
/// add up as shown.
const KG_EXTRA_PLACES: usize = 1;

/// `units` of `places` decimals as a number, never "-0".
pub fn from_units(units: i64, places: usize) -> f64 {
    // -0.0 + 0.0 is +0.0 (IEEE 754).
    units as f64 / ten_to(places) + 0.0
}

/// A total load in kg and its parts (the first value the total, the rest
/// its axle shares), each to [`kg_places`] of the set, the parts adding
/// up to the total as shown ([`kg_units`]).
pub fn kg_set<const N: usize>(values: [f64; N]) -> [String; N] {
    if !countable(&values) {
        return values.map(|v| format!("{v:.0}"));
    }
    let (units, places) = kg_units(values);
    units.map(|u| format!("{:.places$}", from_units(u, places)))
}

/// A difference of loads in kg and its parts as [`kg_set`], signed, to
/// one decimal at most: a difference is small beside the loads whatever
/// their size, and hundredths of a car's kg are noise.
pub fn kg_set_signed<const N: usize>(values: [f64; N]) -> [String; N] {
    if !countable(&values) {
        return values.map(|v| format!("{v:+.0}"));
    }
    let (units, places) = total_and_parts(values, kg_places(&values).min(1), 1);
    units.map(|u| format!("{:+.places$}", from_units(u, places)))
}

/// A lift in kg and its axle shares as [`kg_set`], signed (lift `+`,
/// downforce `-`), a zero without its sign ("0", not "+0").
pub fn lift_set<const N: usize>(values: [f64; N]) -> [String; N] {
    if !countable(&values) {
        return kg_set(values);
    }
    let (units, places) = kg_units(values);
    units.map(|u| lift_word(u, places))
}

/// A lift and its axle shares as [`lift_set`] with the front less the
/// rear beside them, signed, all rounded on their own to decimals at which
/// both the sum and the difference read as shown (a review's table had
/// shown -48 and -52 with a difference of +5).
pub fn lift_set_and_balance(values: [f64; 3]) -> ([String; 3], String) {
    let [total, front, rear] = values;
    let balance = front - rear;
    if !countable(&values) {
        return (kg_set(values), format!("{balance:+.0}"));
    }
    let adds_up = parts_add_up(&values, 0.01);
    let places = kg_places(&values);
    let found = (places..=places + KG_EXTRA_PLACES).find(|&p| {
        let r = |v: f64| units_at(v, p);
        (!adds_up || r(front) + r(rear) == r(total)) && r(front) - r(rear) == r(balance)
    });
    // Where no decimals do, the set as shown elsewhere and the balance as
    // its axles shown make it.
    let (units, p) = match found {
        Some(p) => (values.map(|v| units_at(v, p)), p),
        None => kg_units(values),
    };
    (
        units.map(|u| lift_word(u, p)),
        format!("{:+.p$}", from_units(units[1] - units[2], p)),
    )
}

/// A lift with its axle shares `t`, its underbody's part `u` (each total
/// first) and the rest of the body's (`t` less `u`), all to one set of
/// decimals at which each figure is its value rounded and every sum and
/// difference reads as shown (two reviews: the rest shown as +10.05 kg for
/// 10.09 when taken from the rounded figures, and as +10.109 beside 0.319
/// and -9.8 when rounded on its own); where no such decimals are near,
/// `t` and `u` as [`lift_set`] shows them and the rest as their shown
/// difference. The totals and axles signed as [`lift_set`]'s, the rest
/// always signed.
pub fn lift_family(t: [f64; 3], u: [f64; 3]) -> [[String; 3]; 3] {
    let rest = [0, 1, 2].map(|k| t[k] - u[k]);
    if !countable(&t) || !countable(&u) {
        return [lift_set(t), lift_set(u), rest.map(|r| format!("{r:+.0}"))];
    }
    let floorless = u.iter().all(|v| v.abs() < 0.005);
    let base = if floorless {
        kg_places(&t)
    } else {
        kg_places(&t).max(kg_places(&u))
    };
    let (ta, ua) = (parts_add_up(&t, 0.01), parts_add_up(&u, 0.01));
    let found = (base..=base + KG_EXTRA_PLACES).find(|&p| {
        let r = |v: f64| units_at(v, p);
        (!ta || r(t[1]) + r(t[2]) == r(t[0]))
            && (!ua || r(u[1]) + r(u[2]) == r(u[0]))
            && (0..3).all(|k| r(t[k]) - r(u[k]) == r(rest[k]))
    });
    let (tu, tp, uu, up) = match found {
        Some(p) => (t.map(|v| units_at(v, p)), p, u.map(|v| units_at(v, p)), p),
        None => {
            let ((tu, tp), (uu, up)) = (kg_units(t), kg_units(u));
            (tu, tp, uu, up)
        }
    };
    let p = tp.max(up);
    let widen = |v: i64, from: usize| v * 10i64.pow(u32::try_from(p - from).unwrap_or(0));
    [
        tu.map(|v| lift_word(v, tp)),
        uu.map(|v| lift_word(v, up)),
        [0, 1, 2].map(|k| {
            format!(
                "{:+.p$}",
                from_units(widen(tu[k], tp) - widen(uu[k], up), p)
            )
        }),
    ]
}

/// Values the unit rounding of [`kg_units`] can hold: finite and far
/// inside the integer range (a broken solution's NaN prints as NaN, not
/// as 0).
fn countable(values: &[f64]) -> bool {
    values.iter().all(|v| v.is_finite() && v.abs() < 1e12)
}

/// Why an output could not be written.
#[derive(Debug, thiserror::Error)]
pub enum OutputError {
    /// The file could not be created or written.
    #[error("{}: {source}", path.display())]
    Io {
        /// The file.
        path: PathBuf,
        /// The cause.
        source: std::io::Error,
    },
    /// Writing to a stream failed (no file name known).
    #[error("write failed: {0}")]
    Write(#[from] std::io::Error),
    /// A field has the wrong number of values.
    #[error("{field} has {found} values, expected {expected}")]
    LengthMismatch {
        /// Which field.
        field: &'static str,
        /// Values expected (panels, points or samples).
        expected: usize,
        /// Values given.
        found: usize,
    },
    /// There are no panels to write.
    #[error("the surface has no panels")]
    EmptyMesh,
    /// A slice grid with fewer than 2 x 2 samples or no spacing.
    #[error("slice {name} has fewer than 2 x 2 samples or no spacing")]
    EmptySlice {
        /// Slice name.
        name: String,
    },
    /// Streamline `line` has a scalar array of the wrong length.
    #[error("streamline {line}: scalar {name} has {found} values for {expected} points")]
    StreamlineScalars {
        /// Line index.
        line: usize,
        /// Scalar name.
        name: String,
        /// Points on the line.
        expected: usize,
        /// Values given.
        found: usize,
    },
    /// The picture could not be encoded.
    #[error("PNG encoding failed: {0}")]
    Png(#[from] png::EncodingError),
    /// A picture size of zero or beyond what can be drawn.
    #[error("picture size {width} x {height} cannot be drawn")]
    PictureSize {
        /// Width, pixels.
        width: u32,
        /// Height, pixels.
        height: u32,
    },
}

/// Write a file through a buffered writer, naming the file in any error.
///
/// # Errors
/// [`OutputError::Io`] when the file cannot be created or written; errors of
/// `body` otherwise.
pub fn write_file<F>(path: &Path, body: F) -> Result<(), OutputError>
where
    F: FnOnce(&mut BufWriter<File>) -> Result<(), OutputError>,
{
    let io = |source| OutputError::Io {
        path: path.to_owned(),
        source,
    };
    let mut w = BufWriter::new(File::create(path).map_err(io)?);
    match body(&mut w) {
        Err(OutputError::Write(source)) => Err(io(source)),
        other => other,
    }?;
    w.flush().map_err(io)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn speeds_read_as_given() {
        assert_eq!(speed_words(40.0), "40 m/s (144 km/h)");
        assert_eq!(speed_words(27.75), "27.75 m/s (100 km/h)");
        // 140 km/h in m/s: one decimal, not 38.889.
        assert_eq!(speed_words(140.0 / 3.6), "38.9 m/s (140 km/h)");
    }

    /// The slant-back body's loads (ahmed-35 at 40 m/s: 1.32 kg, -0.48
    /// front, 1.80 rear) read with a decimal so the parts add up; a car's
    /// in whole kg; no "-0" anywhere.
    #[test]
    fn small_loads_keep_a_decimal_and_signs_no_negative_zero() {
        assert_eq!(kg_set([1.32, -0.48, 1.80]), ["1.3", "-0.5", "1.8"]);
        assert_eq!(kg_set([-95.4, -50.2, -45.2]), ["-95", "-50", "-45"]);
        assert_eq!(
            kg_set_signed([0.02, -0.04, 0.06]),
            ["+0.02", "-0.04", "+0.06"]
        );
        assert_eq!(kg_set_signed([44.0, -0.3, 44.3]), ["+44", "+0", "+44"]);
        assert_eq!(signed(-0.04, 1), "+0.0");
        assert_eq!(signed(-33.04, 1), "-33.0");
        // A 10 cm toy at 40 m/s: two digits of the largest, not "0.0".
        assert_eq!(
            lift_set([-0.04, -0.012, -0.028]),
            ["-0.040", "-0.012", "-0.028"]
        );
        assert_eq!(kg_set([0.52, 0.2, 0.32]), ["0.52", "0.20", "0.32"]);
        assert_eq!(kg_set([0.0, 0.0, 0.0]), ["0.0", "0.0", "0.0"]);
    }

    /// The parts add up to the total as shown (largest remainder): the
    /// review's cases, a demo comparison (+44.58 = +12.15 + +32.43), a
    /// sweep's row (-84.61 = -41.22 + -43.38) and an underbody (-242.31 =
    /// -136.77 + -105.54), each of which rounded part by part had been one
    /// kg off; and tenths on a small body.
    #[test]
    fn a_load_that_is_no_number_prints_as_such() {
        assert_eq!(kg_set([f64::NAN, 1.0, 2.0])[0], "NaN");
        assert_eq!(kg_set_signed([f64::INFINITY, 1.0, 2.0])[0], "+inf");
        assert_eq!(
            lift_family([f64::NAN, 0.0, 0.0], [1.0, 0.5, 0.5])[2][0],
            "NaN"
        );
    }

    /// Every figure is its value rounded on its own, with a decimal more
    /// where that is what it takes for the parts to add up as shown: the
    /// reviews' cases, a demo comparison (+44.58 = +12.15 + +32.43), a
    /// sweep's row (-84.61 = -41.22 + -43.38) and an underbody (-242.31 =
    /// -136.77 + -105.54), each of which rounded to whole kg had been one
    /// kg off, and -41.603 kg, which largest-remainder rounding had shown
    /// as -41.
    #[test]
    fn parts_add_up_to_the_total_as_shown() {
        assert_eq!(
            kg_set_signed([44.58, 12.15, 32.43]),
            ["+44.6", "+12.2", "+32.4"]
        );
        assert_eq!(
            kg_set([-84.605, -41.224, -43.381]),
            ["-84.6", "-41.2", "-43.4"]
        );
        assert_eq!(
            kg_set([-242.31, -136.77, -105.54]),
            ["-242.3", "-136.8", "-105.5"]
        );
        assert_eq!(kg_set([1.26, 0.63, 0.63]), ["1.26", "0.63", "0.63"]);
        assert_eq!(kg_set([-80.0, -41.603, -38.397]), ["-80", "-42", "-38"]);
        // Already adding up: as rounded one by one.
        assert_eq!(kg_set([-94.68, -48.09, -46.58]), ["-95", "-48", "-47"]);
        assert_eq!(kg_set([21.0, 10.5, 10.5]), ["21.0", "10.5", "10.5"]);
        let parse = |t: &str| t.parse::<f64>().unwrap();
        // Any split of any total adds up; nearly always each figure is its
        // value rounded.
        let mut correct = 0;
        for k in 0..2000 {
            let total = -300.0 + 0.3137 * f64::from(k);
            let front = total * (0.5 + 0.4 * (f64::from(k) * 0.7).sin());
            let shown = kg_set([total, front, total - front]);
            let places = shown[0].split_once('.').map_or(0, |(_, d)| d.len());
            let unit = 10f64.powi(-i32::try_from(places).unwrap());
            let [t, f, r] = shown.clone().map(|x| parse(&x));
            assert!((t - (f + r)).abs() < 1e-9, "{total} {front}: {shown:?}");
            // Within half a unit, or within one where largest remainder
            // had to make them add up.
            for (v, x) in [(t, total), (f, front), (r, total - front)] {
                assert!((v - x).abs() < unit, "{shown:?}");
            }
            correct += usize::from(
                [(t, total), (f, front), (r, total - front)]
                    .iter()
                    .all(|(v, x)| (v - x).abs() <= 0.5 * unit + 1e-9),
            );
        }
        assert!(correct > 1800, "{correct} of 2000 rounded on their own");
        // The lift, its underbody and the rest of the body, with their
        // axles: each figure its value rounded, every sum as shown.
        let family = |t: [f64; 3], u: [f64; 3]| lift_family(t, u).map(|set| set.map(|x| parse(&x)));
        for (t, u) in [
            ([-94.68, -48.09, -46.59], [-239.54, -133.65, -105.89]),
            // A review's slant-back body: 0.25 less -9.84, +10.09, not +10.05.
            ([0.25, 0.1, 0.15], [-9.84, -5.0, -4.84]),
            ([1.32, -0.48, 1.80], [-12.4, -7.0, -5.4]),
            ([0.319, -0.63, 0.949], [-9.79, -8.31, -1.48]),
        ] {
            let [ts, us, rs] = family(t, u);
            for k in 0..3 {
                assert!((ts[k] - us[k] - rs[k]).abs() < 1e-9, "{ts:?} {us:?} {rs:?}");
            }
            assert!((ts[1] + ts[2] - ts[0]).abs() < 1e-9 && (us[1] + us[2] - us[0]).abs() < 1e-9);
            let shown = &lift_family(t, u)[2][0];
            let places = shown.split_once('.').map_or(0, |(_, d)| d.len());
            let unit = 10f64.powi(-i32::try_from(places).unwrap());
            assert!((rs[0] - (t[0] - u[0])).abs() < unit, "{rs:?}");
        }
        assert_eq!(
            lift_family([0.25, 0.1, 0.15], [-9.84, -5.0, -4.84])[2][0],
            "+10.09"
        );
        assert_eq!(
            lift_family([-94.68, -48.09, -46.59], [-239.54, -133.65, -105.89])[2][0],
            "+145"
        );
        // In free air (no underbody) a car's lift keeps whole kg.
        assert_eq!(
            lift_family([-95.4, -50.2, -45.2], [0.0; 3])[0],
            ["-95", "-50", "-45"]
        );
        // The balance beside the axles reads as their difference.
        let ([l, f, r], b) = lift_set_and_balance([-100.51, -48.4, -52.11]);
        let [l, f, r, b] = [l, f, r, b].map(|x| parse(&x));
        assert!(
            (f + r - l).abs() < 1e-9 && (f - r - b).abs() < 1e-9,
            "{l} {f} {r} {b}"
        );
    }

    /// Whole kg (a set with a load of 10 kg or more) have no "-0" for a
    /// small negative value (lift on a body that has next to none).
    #[test]
    fn whole_numbers_have_no_negative_zero() {
        assert_eq!(kg_set([-0.3, -94.53, 12.5]), ["0", "-95", "13"]);
        // Lift words carry their signs, a zero none.
        assert_eq!(lift_set([-0.3, -94.53, 12.5]), ["0", "-95", "+13"]);
        assert_eq!(lift_set([15.2, -40.4, 55.6]), ["+15.2", "-40.4", "+55.6"]);
    }
}
