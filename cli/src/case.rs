//! Case files: the TOML a user writes to describe one run.
//!
//! Two stages, as in any careful command line: [`CaseFile`] is what the TOML
//! says (every key optional where a default exists, unknown keys refused by
//! serde), [`Case`] is the checked, resolved case a run uses. Lengths are in
//! metres except the STL, which `geometry.units` scales.

use std::path::{Path, PathBuf};

use anyhow::{Context, Result, bail};
use serde::{Deserialize, Serialize};

/// The case file as written.
#[derive(Debug, Clone, Deserialize, Serialize, Default)]
#[serde(deny_unknown_fields)]
pub struct CaseFile {
    /// Geometry: an STL or a built-in shape.
    pub geometry: GeometrySection,
    /// Free stream and air properties.
    #[serde(default)]
    pub flow: FlowSection,
    /// Ground plane; absent for free air.
    pub ground: Option<GroundSection>,
    /// Boundary-layer options.
    #[serde(default)]
    pub boundary_layer: BoundaryLayerSection,
    /// Reference values for coefficients and the axle split.
    #[serde(default)]
    pub reference: ReferenceSection,
    /// Solver options.
    #[serde(default)]
    pub solver: SolverSection,
    /// Named regions whose separation the summary and report give
    /// (`[[region]]`).
    #[serde(default, rename = "region", skip_serializing_if = "Vec::is_empty")]
    pub regions: Vec<crate::region::RegionSection>,
    /// Flow slices on planes of the case's choosing, besides the built-in
    /// ones (`[[slice]]`).
    #[serde(default, rename = "slice", skip_serializing_if = "Vec::is_empty")]
    pub slices: Vec<crate::planes::SliceSection>,
}

/// `[solver]`.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(default, deny_unknown_fields)]
pub struct SolverSection {
    /// `separated` (default): the separated-flow loop (the separated
    /// regions opened as dead water and the boundary layer marched again
    /// until the separated set settles); `attached`: the attached potential
    /// flow only, with the plateau model in separated regions.
    pub wakes: String,
    /// How the influence matrix is held: `auto` (default: dense below
    /// 20,000 panels, compressed from there), `dense`, or `compressed`
    /// (hierarchical matrix with low-rank far-field blocks).
    pub linear: String,
}

impl Default for SolverSection {
    fn default() -> Self {
        Self {
            wakes: "separated".into(),
            linear: "auto".into(),
        }
    }
}

/// `[geometry]`.
#[derive(Debug, Clone, Deserialize, Serialize, Default)]
#[serde(deny_unknown_fields)]
pub struct GeometrySection {
    /// STL path, relative to the case file.
    pub stl: Option<PathBuf>,
    /// A built-in shape instead of an STL: `coupe`, `ahmed`, `sphere`.
    pub shape: Option<String>,
    /// Length unit of the STL: m, cm, mm, in.
    pub units: Option<String>,
    /// Coarsen to about this many panels.
    pub panels: Option<usize>,
    /// The STL is the y >= 0 half, cut at y = 0.
    #[serde(default)]
    pub half_model: bool,
    /// Wrap the STL into one outer surface even when nothing calls for
    /// it: the baseline of an add-on study whose add-on runs are wrapped.
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub wrap: bool,
    /// Where the STL's nose points: "-x" (tuft's axes, the default) or
    /// "+x" (ISO 8855 vehicle axes, x forward).
    pub nose: Option<String>,
    /// The STL's up axis: "z" (the default) or "y" (many exports).
    pub up: Option<String>,
    /// Built-in coupe: rear-window slope from horizontal, degrees.
    pub rear_window_deg: Option<f64>,
    /// Built-in coupe: boot-deck length, metres.
    pub boot_deck_length: Option<f64>,
    /// Built-in coupe: angle of the underbody's rise at the tail (the
    /// diffuser), degrees.
    pub diffuser_deg: Option<f64>,
    /// Built-in coupe and slant-back body: ground clearance, metres.
    pub ride_height: Option<f64>,
    /// Built-in slant-back body: slant angle, degrees.
    pub slant_deg: Option<f64>,
    /// Built-in sphere: radius, metres.
    pub radius: Option<f64>,
    /// Built-in sphere: height of the centre, metres.
    pub centre_z: Option<f64>,
}

/// `[flow]`. The speed may be given in m/s (`speed`) or in km/h
/// (`speed_kmh`), not both.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(default, try_from = "RawFlowSection")]
pub struct FlowSection {
    /// Free-stream speed, m/s.
    pub speed: f64,
    /// Yaw angle, degrees (free stream rotated about z).
    pub yaw: f64,
    /// Air density, kg/m^3.
    pub density: f64,
    /// Kinematic viscosity, m^2/s.
    pub viscosity: f64,
}

/// `[flow]` as written.
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(default, deny_unknown_fields)]
struct RawFlowSection {
    speed: Option<f64>,
    speed_kmh: Option<f64>,
    yaw: Option<f64>,
    density: Option<f64>,
    viscosity: Option<f64>,
}

/// Fastest free stream, m/s: the flow is taken as incompressible, which
/// holds to a Mach number of about 0.3 (common practice).
const MAX_SPEED: f64 = 100.0;

impl TryFrom<RawFlowSection> for FlowSection {
    type Error = String;

    fn try_from(raw: RawFlowSection) -> Result<Self, String> {
        let d = FlowSection::default();
        let speed = match (raw.speed, raw.speed_kmh) {
            (Some(_), Some(_)) => {
                return Err(
                    "give the speed once: flow.speed (m/s) or flow.speed_kmh, not both".into(),
                );
            }
            (Some(v), None) => v,
            (None, Some(kmh)) if kmh > 3.6 * MAX_SPEED => {
                return Err(format!(
                    "flow.speed_kmh {kmh} km/h is beyond the incompressible range tuft models (at most \
                     {:.0} km/h, {MAX_SPEED} m/s)",
                    3.6 * MAX_SPEED
                ));
            }
            (None, Some(kmh)) if !(kmh.is_finite() && kmh > 0.0) => {
                return Err(format!(
                    "flow.speed_kmh must be a positive number (got {kmh})"
                ));
            }
            (None, Some(kmh)) => kmh / 3.6,
            (None, None) => d.speed,
        };
        Ok(Self {
            speed,
            yaw: raw.yaw.unwrap_or(d.yaw),
            density: raw.density.unwrap_or(d.density),
            viscosity: raw.viscosity.unwrap_or(d.viscosity),
        })
    }
}

impl Default for FlowSection {
    /// 40 m/s in air at 20 degC and 101.325 kPa (rho 1.204 kg/m^3,
    /// nu 1.506e-5 m^2/s, derived from ISO 2533 relations).
    fn default() -> Self {
        Self {
            speed: 40.0,
            yaw: 0.0,
            density: 1.204,
            viscosity: 1.506e-5,
        }
    }
}

/// `[ground]`.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct GroundSection {
    /// Height of the ground plane, metres.
    pub z: f64,
}

/// `[boundary_layer]`.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(default, deny_unknown_fields)]
pub struct BoundaryLayerSection {
    /// free | laminar | turbulent | forced.
    pub transition: String,
    /// For `forced`: fraction of body length from the nose.
    pub forced_at: Option<f64>,
    /// Turbulent separation threshold on the shape factor H.
    pub separation_h: Option<f64>,
}

impl Default for BoundaryLayerSection {
    fn default() -> Self {
        Self {
            transition: "free".into(),
            forced_at: None,
            separation_h: None,
        }
    }
}

/// `[reference]`.
#[derive(Debug, Clone, Deserialize, Serialize, Default)]
#[serde(deny_unknown_fields)]
pub struct ReferenceSection {
    /// Reference area, m^2 (default: frontal area).
    pub area: Option<f64>,
    /// Reference length, m (default: body length).
    pub length: Option<f64>,
    /// Front axle position along x, m.
    pub front_axle_x: Option<f64>,
    /// Rear axle position along x, m.
    pub rear_axle_x: Option<f64>,
}

/// Where the geometry comes from, once checked.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum GeometrySource {
    /// An STL file (absolute or relative to the working directory).
    Stl {
        /// Path to the STL.
        path: PathBuf,
        /// The unit the STL is written in.
        unit: tuft_mesh::LengthUnit,
        /// How the STL's axes lie against tuft's.
        axes: tuft_mesh::FileAxes,
    },
    /// A built-in shape by name, with the section's parameters.
    Shape {
        /// `coupe`, `ahmed` or `sphere`.
        name: String,
    },
}

/// How the boundary layer becomes turbulent, once checked.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum TransitionMode {
    /// Michel's criterion.
    Free,
    /// All laminar.
    Laminar,
    /// Turbulent from the attachment line.
    Turbulent,
    /// Forced at a fraction of the body length.
    Forced(f64),
}

/// A checked case, ready to run.
#[derive(Debug, Clone, Serialize)]
pub struct Case {
    /// Case name (file stem).
    pub name: String,
    /// The case file as read (defaults filled).
    pub file: CaseFile,
    /// Resolved geometry source.
    pub source: GeometrySource,
    /// Resolved transition mode.
    pub transition: TransitionMode,
    /// When to run the separated-flow loop.
    pub wakes: WakesMode,
    /// The operator forced by the case (`None`: chosen by size).
    pub operator: Option<crate::estimate::Operator>,
}

/// When the separated-flow loop runs (`[solver] wakes`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum WakesMode {
    /// The separated-flow loop (default).
    Separated,
    /// Attached flow only.
    Attached,
}

impl Case {
    /// Read and check a case file.
    pub fn load(path: &Path) -> Result<Self> {
        if path.is_dir() {
            bail!(
                "{}: this is a folder; tuft run takes a case file (.toml)",
                path.display()
            );
        }
        if path
            .extension()
            .is_some_and(|e| e.eq_ignore_ascii_case("stl"))
        {
            bail!(
                "{}: this is an STL; tuft run takes a case file (.toml) that names it (see the README), \
                 and tuft check reads an STL directly",
                path.display()
            );
        }
        let text = read_text(path, "the case file")?;
        other_kind(path, &text, false)?;
        let file: CaseFile = toml::from_str(&text).map_err(|e| toml_error(path, &text, &e))?;
        Self::from_file(path, file).with_context(|| path.display().to_string())
    }

    /// Check a parsed case; `path` locates relative STL paths and names the case.
    pub fn from_file(path: &Path, file: CaseFile) -> Result<Self> {
        let name = path
            .file_stem()
            .map_or("case".into(), |s| s.to_string_lossy().into_owned());
        check_flow(&file)?;
        check_reference(&file.reference).map_err(|e| with_axes_hint(e, &file.geometry))?;
        crate::region::check(&file.regions)?;
        crate::planes::check(&file.slices)?;
        let source = resolve_geometry(path, &file.geometry)?;
        let transition = resolve_transition(&file.boundary_layer)?;
        let wakes = match file.solver.wakes.as_str() {
            "separated" => WakesMode::Separated,
            "attached" => WakesMode::Attached,
            other => bail!("solver.wakes must be separated or attached (got \"{other}\")"),
        };
        let operator = match file.solver.linear.as_str() {
            "auto" => None,
            "dense" => Some(crate::estimate::Operator::Dense),
            "compressed" => Some(crate::estimate::Operator::Compressed),
            other => bail!("solver.linear must be auto, dense or compressed (got \"{other}\")"),
        };
        Ok(Self {
            name,
            file,
            source,
            transition,
            wakes,
            operator,
        })
    }
}

/// Refuse the other kind of tuft file, which would otherwise fail on its
/// first key: a sweep file has a top-level `base`, a case file a
/// `[geometry]` section. `sweep`: a sweep file is wanted.
pub fn other_kind(path: &Path, text: &str, sweep: bool) -> Result<()> {
    let Ok(top) = toml::from_str::<toml::Table>(text) else {
        return Ok(());
    };
    let (base, geometry) = (top.contains_key("base"), top.contains_key("geometry"));
    if !sweep && base && !geometry {
        bail!(
            "{}: this is a sweep file (it has `base`); run it with tuft sweep",
            path.display()
        );
    }
    if sweep && geometry && !base {
        bail!(
            "{}: this is a case file (it has [geometry]); run it with tuft run, or name it as a sweep \
             file's `base`",
            path.display()
        );
    }
    Ok(())
}

/// A TOML file's parse or type error in one sentence: the file, the line
/// and column, the line as written, and the complaint without Rust's type
/// names ("expected f64" reads "expected a number").
pub fn toml_error(path: &Path, text: &str, e: &toml::de::Error) -> anyhow::Error {
    let what = plain_toml_words(e.message());
    let Some(span) = e.span() else {
        return anyhow::anyhow!("{}: {what}", path.display());
    };
    let before = &text[..span.start.min(text.len())];
    let line = before.matches('\n').count() + 1;
    let column = before.len() - before.rfind('\n').map_or(0, |i| i + 1) + 1;
    let written = text.lines().nth(line - 1).unwrap_or("").trim();
    anyhow::anyhow!(
        "{}: line {line}, column {column} (`{written}`): {what}",
        path.display()
    )
}

/// A case or sweep file's text (`what` names it). A file saved as UTF-16
/// (as some editors on Windows do) is named as such with the fix, where the
/// reader's own words said only that the stream was not valid UTF-8.
///
/// # Errors
/// When the file cannot be read or is not UTF-8 text.
pub fn read_text(path: &Path, what: &str) -> Result<String> {
    let bytes =
        std::fs::read(path).with_context(|| format!("{}: cannot read {what}", path.display()))?;
    let utf16 = bytes.starts_with(&[0xff, 0xfe])
        || bytes.starts_with(&[0xfe, 0xff])
        || (bytes.len() >= 4
            && bytes.iter().take(64).filter(|&&b| b == 0).count() * 4 >= bytes.len().min(64));
    match String::from_utf8(bytes) {
        Ok(text) => Ok(text),
        Err(_) if utf16 => bail!(
            "{}: {what} is saved as UTF-16 text; save it as UTF-8 (the editor's encoding setting)",
            path.display()
        ),
        Err(e) => bail!(
            "{}: {what} is not UTF-8 text (byte {} cannot be read); save it as UTF-8",
            path.display(),
            e.utf8_error().valid_up_to() + 1
        ),
    }
}

/// A TOML reader's complaint without Rust's type names ("expected f64"
/// reads "where a number is expected"), on one line.
pub fn plain_toml_words(message: &str) -> String {
    let mut what = with_nearest_name(message.trim());
    for (rust, plain) in [
        ("invalid type: ", ""),
        // A negative count: "invalid value: integer `-5`, expected usize"
        // (a review read "the whole number `-5` where a whole number is
        // expected").
        ("invalid value: integer ", ""),
        (", expected f64", " where a number is expected"),
        (", expected f32", " where a number is expected"),
        (
            ", expected usize",
            " where a whole number of 0 or more is expected",
        ),
        (
            ", expected u64",
            " where a whole number of 0 or more is expected",
        ),
        (
            ", expected u32",
            " where a whole number of 0 or more is expected",
        ),
        (", expected a boolean", " where true or false is expected"),
        ("unknown field", "unknown key"),
        (", expected one of", "; the keys here are"),
        ("floating point ", "the number "),
        ("integer ", "the whole number "),
        ("string ", "the text "),
    ] {
        what = what.replace(rust, plain);
    }
    what.split_whitespace().collect::<Vec<_>>().join(" ")
}

/// How alike (Jaro-Winkler, 0 to 1) a misspelt key or value must be to a
/// known one for the complaint to name it: "rear_windw_deg" and
/// "rear_window_deg" score 0.99, "speeed" and "speed" 0.96, "wake" and
/// "wakes" 0.96; unrelated keys such as "slant_deg" and "speed" 0.54.
const NEAREST_NAME_SCORE: f64 = 0.85;

/// The name among `known` nearest to a misspelt `given`, when one is near
/// enough ([`NEAREST_NAME_SCORE`]).
pub fn nearest_name<'a>(given: &str, known: impl IntoIterator<Item = &'a str>) -> Option<&'a str> {
    known
        .into_iter()
        .map(|name| (strsim::jaro_winkler(given, name), name))
        .filter(|(score, _)| *score >= NEAREST_NAME_SCORE)
        .max_by(|a, b| a.0.total_cmp(&b.0))
        .map(|(_, name)| name)
}

/// A TOML reader's "unknown field `x`, expected one of `a`, `b`" (or
/// "expected `a` or `b`", or "unknown variant") with the known name nearest to `x` named after it,
/// when one is near enough ([`NEAREST_NAME_SCORE`]): a misspelt key in a
/// long list of keys had left the user to find it.
fn with_nearest_name(message: &str) -> String {
    let Some(rest) = ["unknown field `", "unknown variant `"]
        .iter()
        .find_map(|lead| message.find(lead).map(|at| &message[at + lead.len()..]))
    else {
        return message.to_owned();
    };
    let Some((given, list)) = rest.split_once('`') else {
        return message.to_owned();
    };
    let Some(list) = list.split_once("expected").map(|(_, l)| l) else {
        return message.to_owned();
    };
    match nearest_name(given, list.split('`').skip(1).step_by(2)) {
        Some(name) => message.replacen(
            &format!("`{given}`"),
            &format!("`{given}` (did you mean `{name}`?)"),
            1,
        ),
        None => message.to_owned(),
    }
}

fn positive(key: &str, v: f64) -> Result<()> {
    if !(v.is_finite() && v > 0.0) {
        bail!("{key} must be a positive number (got {v})");
    }
    Ok(())
}

fn check_flow(file: &CaseFile) -> Result<()> {
    let f = &file.flow;
    positive("flow.speed", f.speed)?;
    positive("flow.density", f.density)?;
    positive("flow.viscosity", f.viscosity)?;
    if !(f.yaw.is_finite() && f.yaw.abs() <= 30.0) {
        bail!(
            "flow.yaw must be between -30 and 30 degrees (got {})",
            f.yaw
        );
    }
    if f.speed > MAX_SPEED {
        bail!(
            "flow.speed {} m/s is beyond the incompressible range tuft models (at most {MAX_SPEED} m/s; a \
             speed in km/h goes in flow.speed_kmh)",
            f.speed
        );
    }
    Ok(())
}

fn check_reference(r: &ReferenceSection) -> Result<()> {
    if let Some(a) = r.area {
        positive("reference.area", a)?;
    }
    if let Some(l) = r.length {
        positive("reference.length", l)?;
    }
    match (r.front_axle_x, r.rear_axle_x) {
        (Some(f), Some(b)) if !(b > f) => {
            bail!(
                "reference.rear_axle_x ({b}) must lie behind reference.front_axle_x ({f}): x runs \
                 from the nose backwards in metres, so the rear axle's is the larger (check both: \
                 one off the body reads so too)"
            )
        }
        (Some(_), None) | (None, Some(_)) => {
            bail!("reference.front_axle_x and reference.rear_axle_x must be given together")
        }
        _ => Ok(()),
    }
}

/// The fewest panels a case may ask for (`geometry.panels`).
pub const MIN_PANELS: usize = 100;

/// The most panels a case may ask for (`geometry.panels`).
pub const MAX_PANELS: usize = 200_000;

fn resolve_geometry(case_path: &Path, g: &GeometrySection) -> Result<GeometrySource> {
    if let Some(n) = g.panels
        && !(MIN_PANELS..=MAX_PANELS).contains(&n)
    {
        bail!("geometry.panels must be between {MIN_PANELS} and {MAX_PANELS} (got {n})");
    }
    check_shape_keys(g)?;
    match (&g.stl, &g.shape) {
        (Some(_), Some(_)) => bail!("geometry: give either stl or shape, not both"),
        (None, None) => bail!("geometry: give stl (a file) or shape (coupe, ahmed, sphere)"),
        (Some(stl), None) => {
            let units = g.units.as_deref().unwrap_or("mm");
            // Exactly a unit's symbol (the parser would also trim spaces).
            let unit = units
                .parse::<tuft_mesh::LengthUnit>()
                .ok()
                .filter(|u| u.symbol() == units)
                .ok_or_else(|| {
                    anyhow::anyhow!("geometry.units must be one of m, cm, mm, in (got \"{units}\")")
                })?;
            let base = case_path.parent().unwrap_or(Path::new("."));
            Ok(GeometrySource::Stl {
                path: base.join(stl),
                unit,
                axes: file_axes(g.nose.as_deref(), g.up.as_deref(), "geometry.")?,
            })
        }
        (None, Some(name)) => {
            if !["coupe", "ahmed", "sphere"].contains(&name.as_str()) {
                bail!("geometry.shape must be coupe, ahmed or sphere (got \"{name}\")");
            }
            if g.units.is_some() {
                bail!("geometry.units applies to an STL only; built-in shapes are in metres");
            }
            if g.nose.is_some() || g.up.is_some() {
                bail!(
                    "geometry.nose and geometry.up apply to an STL only; built-in shapes are in tuft's axes"
                );
            }
            if g.wrap {
                bail!(
                    "geometry.wrap applies to an STL only; built-in shapes are one closed surface"
                );
            }
            Ok(GeometrySource::Shape { name: name.clone() })
        }
    }
}

/// The STL's axes from the `nose` and `up` settings (`key` prefixes their
/// names in errors: "geometry." in a case file, "--" on the command line).
pub fn file_axes(nose: Option<&str>, up: Option<&str>, key: &str) -> Result<tuft_mesh::FileAxes> {
    let nose_plus_x = match nose.unwrap_or("-x") {
        "-x" => false,
        "+x" => true,
        other => bail!(
            "{key}nose must be \"-x\" (the nose at the smallest x, tuft's axes) or \"+x\" (x pointing \
             forward, as in ISO 8855 vehicle axes) (got \"{other}\")"
        ),
    };
    let y_up = match up.unwrap_or("z") {
        "z" => false,
        "y" => true,
        other => bail!("{key}up must be \"z\" (the default) or \"y\" (got \"{other}\")"),
    };
    Ok(tuft_mesh::FileAxes { nose_plus_x, y_up })
}

/// `err` (about lengths in the case file) with a word, when the STL is
/// turned into tuft's axes, that those lengths are in tuft's axes, not
/// the file's.
pub fn with_axes_hint(err: anyhow::Error, g: &GeometrySection) -> anyhow::Error {
    match axes_words(g) {
        Some(words) => anyhow::anyhow!("{err:#} (lengths in the case file{words})"),
        None => err,
    }
}

/// `err` about an axle position with one parenthesis on the case file's
/// lengths: metres, and in tuft's axes when the STL is turned into them
/// (two parentheses in a row had said each half).
pub fn with_lengths_hint(err: anyhow::Error, g: &GeometrySection) -> anyhow::Error {
    anyhow::anyhow!(
        "{err:#} (lengths in the case file are metres{})",
        axes_words(g).map_or(String::new(), |w| format!(", and{w}"))
    )
}

/// When geometry.nose or geometry.up turns the STL: the words after
/// "lengths in the case file" saying those lengths are in tuft's axes.
fn axes_words(g: &GeometrySection) -> Option<&'static str> {
    match (g.nose.as_deref(), g.up.as_deref()) {
        (Some("+x"), _) | (_, Some("y")) => Some(
            ", for axles, regions and the ground, are in tuft's axes, into which geometry.nose and \
             geometry.up turn the STL: x grows from front to rear, so with nose = \"+x\" it is minus the \
             STL's x, and z is up; tuft check prints the body's extent in them",
        ),
        _ => None,
    }
}

/// The built-in shapes and the `[geometry]` keys each one reads.
const SHAPE_KEYS: [(&str, &[&str]); 3] = [
    (
        "coupe",
        &[
            "rear_window_deg",
            "boot_deck_length",
            "diffuser_deg",
            "ride_height",
        ],
    ),
    ("ahmed", &["slant_deg", "ride_height"]),
    ("sphere", &["radius", "centre_z"]),
];

/// Refuse a built-in shape's parameter the case's geometry does not read
/// (e.g. `rear_window_deg` beside an STL, which would run the STL
/// unchanged and make a sweep over it a row of identical results).
fn check_shape_keys(g: &GeometrySection) -> Result<()> {
    let given = [
        ("rear_window_deg", g.rear_window_deg.is_some()),
        ("boot_deck_length", g.boot_deck_length.is_some()),
        ("diffuser_deg", g.diffuser_deg.is_some()),
        ("ride_height", g.ride_height.is_some()),
        ("slant_deg", g.slant_deg.is_some()),
        ("radius", g.radius.is_some()),
        ("centre_z", g.centre_z.is_some()),
    ];
    let reads = |key: &str| {
        SHAPE_KEYS
            .iter()
            .find(|(shape, _)| g.shape.as_deref() == Some(*shape))
            .is_some_and(|(_, keys)| keys.contains(&key))
    };
    let Some((key, _)) = given.iter().find(|(key, set)| *set && !reads(key)) else {
        return Ok(());
    };
    let owners: Vec<&str> = SHAPE_KEYS
        .iter()
        .filter(|(_, keys)| keys.contains(key))
        .map(|(shape, _)| *shape)
        .collect();
    let this = match (&g.stl, &g.shape) {
        (Some(_), _) => "this case reads an STL".to_owned(),
        (None, Some(shape)) => format!("this case's shape is {shape}"),
        (None, None) => "this case gives no shape".to_owned(),
    };
    let remedy = match (g.stl.is_some(), *key) {
        // An STL stands where it was drawn; moving the ground moves it
        // against the road.
        (true, "ride_height") => {
            "remove it; to raise or lower an STL body, move the ground instead (ground.z 0.02 m \
             lower raises the body 20 mm)"
        }
        (true, _) => "remove it, or change the STL itself",
        (false, _) => "remove it",
    };
    bail!(
        "geometry.{key} applies only to the built-in shape {} ({this}); {remedy}",
        owners.join(" and ")
    )
}

fn resolve_transition(b: &BoundaryLayerSection) -> Result<TransitionMode> {
    let mode = match b.transition.as_str() {
        "free" => TransitionMode::Free,
        "laminar" => TransitionMode::Laminar,
        "turbulent" => TransitionMode::Turbulent,
        "forced" => {
            let at = b.forced_at.ok_or_else(|| {
                anyhow::anyhow!("boundary_layer.forced_at is required with transition = \"forced\"")
            })?;
            if !(at > 0.0 && at < 1.0) {
                bail!(
                    "boundary_layer.forced_at must be a fraction of the body length in (0, 1) (got {at})"
                );
            }
            TransitionMode::Forced(at)
        }
        other => bail!(
            "boundary_layer.transition must be free, laminar, turbulent or forced (got \"{other}\")"
        ),
    };
    if let Some(h) = b.separation_h
        && !(1.5..=4.0).contains(&h)
    {
        bail!("boundary_layer.separation_h must be between 1.5 and 4.0 (got {h})");
    }
    Ok(mode)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parse(text: &str) -> Result<Case> {
        let file: CaseFile = toml::from_str(text).map_err(|e| anyhow::anyhow!("{e}"))?;
        Case::from_file(Path::new("cases/demo.toml"), file)
    }

    fn err(text: &str) -> String {
        format!("{:#}", parse(text).unwrap_err())
    }

    /// Axles in the wrong order are refused saying which way x runs (a
    /// review's front axle typed off the body read only as an order
    /// error); one axle alone is refused too.
    #[test]
    fn axles_out_of_order_or_alone_are_refused() {
        let e = err(
            "[geometry]\nshape = \"coupe\"\n[reference]\nfront_axle_x = 7.0\nrear_axle_x = 4.4\n",
        );
        assert!(
            e.contains("must lie behind reference.front_axle_x (7)")
                && e.contains("x runs from the nose backwards")
                && e.contains("one off the body"),
            "{e}"
        );
        let e = err("[geometry]\nshape = \"coupe\"\n[reference]\nfront_axle_x = 0.9\n");
        assert!(e.contains("must be given together"), "{e}");
    }

    /// A misspelt key or value names the known one nearest to it (scores
    /// quoted at `NEAREST_NAME_SCORE`), and names none when nothing is
    /// near.
    #[test]
    fn a_misspelt_name_names_the_nearest() {
        let words = |text: &str| {
            let file = toml::from_str::<CaseFile>(text).unwrap_err();
            plain_toml_words(file.message())
        };
        let e = words("[geometry]\nshape = \"coupe\"\nrear_windw_deg = 30\n");
        assert!(
            e.starts_with("unknown key `rear_windw_deg` (did you mean `rear_window_deg`?); the keys here are `stl`"),
            "{e}"
        );
        let g = "[geometry]\nshape = \"coupe\"\n";
        let e = words(&format!("{g}[flow]\nspeeed = 40\n"));
        assert!(e.contains("`speeed` (did you mean `speed`?)"), "{e}");
        let e = words(&format!("{g}[solver]\nwake = \"attached\"\n"));
        assert!(e.contains("`wake` (did you mean `wakes`?)"), "{e}");
        let e = words(&format!("{g}[flow]\nwind = 40\n"));
        assert!(!e.contains("did you mean"), "{e}");
        // A negative count reads as such, not "the whole number `-5` where
        // a whole number is expected".
        let e = words("[geometry]\nshape = \"coupe\"\npanels = -5\n");
        assert_eq!(e, "`-5` where a whole number of 0 or more is expected");
    }

    /// A case file saved as UTF-16 is named as such, with the fix.
    #[test]
    fn a_utf16_case_file_is_named_as_such() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("notepad.toml");
        let mut bytes = vec![0xff, 0xfe];
        for u in "[geometry]\nshape = \"coupe\"\n".encode_utf16() {
            bytes.extend_from_slice(&u.to_le_bytes());
        }
        std::fs::write(&path, bytes).unwrap();
        let e = format!("{:#}", Case::load(&path).unwrap_err());
        assert!(
            e.contains("is saved as UTF-16 text; save it as UTF-8"),
            "{e}"
        );
        std::fs::write(&path, b"[geometry]\nshape = \"caf\xe9\"\n").unwrap();
        let e = format!("{:#}", Case::load(&path).unwrap_err());
        assert!(
            e.contains("is not UTF-8 text (byte 24 cannot be read)"),
            "{e}"
        );
    }

    /// An STL in other axes: the nose at +x (ISO 8855 vehicle axes) or y
    /// up; other words are refused by name, and built-in shapes take
    /// neither.
    #[test]
    fn the_stl_axes_are_read_and_checked() {
        let stl = "[geometry]\nstl = \"a.stl\"\n";
        let c = parse(&format!("{stl}nose = \"+x\"\nup = \"y\"\n")).unwrap();
        let GeometrySource::Stl { axes, .. } = c.source else {
            panic!("an STL case")
        };
        assert_eq!(
            axes,
            tuft_mesh::FileAxes {
                nose_plus_x: true,
                y_up: true
            }
        );
        let e = err(&format!("{stl}nose = \"forward\"\n"));
        assert!(
            e.contains("geometry.nose must be") && e.contains("ISO 8855"),
            "{e}"
        );
        assert!(err(&format!("{stl}up = \"+z\"\n")).contains("geometry.up must be"));
        let e = err("[geometry]\nshape = \"coupe\"\nnose = \"+x\"\n");
        assert!(e.contains("apply to an STL only"), "{e}");
        let e = err("[geometry]\nshape = \"coupe\"\nwrap = true\n");
        assert!(e.contains("geometry.wrap applies to an STL only"), "{e}");
    }

    /// The speed may be given in km/h instead; both at once is refused.
    #[test]
    fn speed_in_kmh() {
        let geo = "[geometry]\nshape = \"sphere\"\n";
        let c = parse(&format!("{geo}[flow]\nspeed_kmh = 144.0\n")).unwrap();
        assert!((c.file.flow.speed - 40.0).abs() < 1e-12);
        assert!(
            err(&format!("{geo}[flow]\nspeed_kmh = 144.0\nspeed = 40.0\n")).contains("not both")
        );
        let e = err(&format!("{geo}[flow]\nspeed_kmh = -10.0\n"));
        assert!(
            e.contains("flow.speed_kmh must be a positive number (got -10)"),
            "{e}"
        );
        let e = err(&format!("{geo}[flow]\nspeed_kmh = 400.0\n"));
        assert!(e.contains("flow.speed_kmh 400 km/h is beyond"), "{e}");
        let c = parse(&format!("{geo}[flow]\nyaw = 2.0\n")).unwrap();
        assert_eq!((c.file.flow.speed, c.file.flow.yaw), (40.0, 2.0));
    }

    /// A type slip reads as the line, where it is and what was expected,
    /// without Rust's type names.
    #[test]
    fn type_errors_read_plainly() {
        let text = "[geometry]\nshape = \"sphere\"\n[flow]\nspeed = \"40\"\n";
        let e = toml::from_str::<CaseFile>(text).unwrap_err();
        let said = toml_error(Path::new("c.toml"), text, &e).to_string();
        assert_eq!(
            said,
            "c.toml: line 4, column 9 (`speed = \"40\"`): the text \"40\" where a number is expected"
        );
    }

    #[test]
    fn full_example_parses() {
        let c = parse(
            r#"
            [geometry]
            stl = "body.stl"
            units = "mm"
            panels = 8000
            half_model = false
            [flow]
            speed = 40.0
            yaw = 0.0
            density = 1.204
            viscosity = 1.506e-5
            [ground]
            z = 0.0
            [boundary_layer]
            transition = "forced"
            forced_at = 0.05
            [reference]
            area = 2.1
            length = 4.6
            front_axle_x = 0.9
            rear_axle_x = 3.6
            "#,
        )
        .unwrap();
        assert_eq!(c.name, "demo");
        assert_eq!(c.transition, TransitionMode::Forced(0.05));
        assert_eq!(
            c.source,
            GeometrySource::Stl {
                path: PathBuf::from("cases/body.stl"),
                unit: tuft_mesh::LengthUnit::Mm,
                axes: tuft_mesh::FileAxes::default(),
            }
        );
    }

    #[test]
    fn refusals_name_the_key() {
        let geo = "[geometry]\nshape = \"sphere\"\n";
        assert!(err(&format!("{geo}[flow]\nspeed = -3.0\n")).contains("flow.speed"));
        assert!(err(&format!("{geo}[solver]\nwakes = \"rolled\"\n")).contains("solver.wakes"));
        assert!(err(&format!("{geo}[solver]\nlinear = \"sparse\"\n")).contains("solver.linear"));
        assert!(err(&format!("{geo}[flow]\nspeed = 3.0\nspeedd = 2\n")).contains("speedd"));
        assert!(err(&format!("{geo}[flow]\nyaw = 31.0\n")).contains("flow.yaw"));
        assert!(
            err("[geometry]\nstl = \"a.stl\"\nunits = \"furlong\"\n").contains("geometry.units")
        );
        assert!(
            err(&format!("{geo}[boundary_layer]\ntransition = \"forced\"\n")).contains("forced_at")
        );
        assert!(
            err(&format!(
                "{geo}[reference]\nfront_axle_x = 3.0\nrear_axle_x = 1.0\n"
            ))
            .contains("rear_axle_x")
        );
        assert!(err(&format!("{geo}[flow]\nspeed = \"fast\"\n")).contains("speed"));
        assert!(err("[geometry]\n").contains("geometry"));
    }
}
