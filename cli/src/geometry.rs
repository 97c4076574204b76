//! From a case's geometry section to a prepared panel mesh.

use std::path::Path;

use anyhow::{Context, Result, bail};
use tuft_mesh::generate::{self, AhmedParams, CoupeParams};
use tuft_mesh::import::read_stl;
use tuft_mesh::prepare::{PrepareParams, PrepareReport, Repaired, prepare_mesh, repair_body};
use tuft_mesh::{LengthUnit, MeshError, Mirrors, PanelMesh, TriMesh};

use crate::case::{Case, GeometrySource};

/// Default panel count of the built-in shapes (a few seconds per run).
pub const SHAPE_PANELS: usize = 4000;

/// The prepared mesh of a case and how it was made.
pub struct Geometry {
    /// Real panels with their mirror planes.
    pub mesh: PanelMesh,
    /// Facets read or generated.
    pub input_facets: usize,
    /// Everything preparation did.
    pub report: PrepareReport,
    /// An STL's body before the coarsening, kept when asked
    /// ([`load_keeping`]) to panel it at other counts ([`at_count`]).
    pub body: Option<Repaired>,
}

/// Mirror planes a case's run uses: the symmetry plane only for a half
/// model at zero yaw (in a cross wind it runs whole, [`mirrored_whole`]).
pub fn mirrors(case: &Case) -> Mirrors {
    Mirrors {
        ground: case.file.ground.as_ref().map(|g| g.z),
        symmetry: case.file.geometry.half_model && case.file.flow.yaw == 0.0,
    }
}

/// Whether a half model runs whole, mirrored into both sides: in a cross
/// wind, which a half model cannot take (the review of a half-model
/// export had no way to a yawed run).
pub fn mirrored_whole(case: &Case) -> bool {
    case.file.geometry.half_model && case.file.flow.yaw != 0.0
}

/// Build or read the case's body and prepare it.
pub fn load(case: &Case) -> Result<Geometry> {
    load_keeping(case, false)
}

/// [`load`], keeping an STL's repaired body in [`Geometry::body`] when
/// `keep` (for `--noise`, which panels it at two more counts).
pub fn load_keeping(case: &Case, keep: bool) -> Result<Geometry> {
    let mirrors = mirrors(case);
    let g = &case.file.geometry;
    match &case.source {
        GeometrySource::Stl { path, unit, axes } => {
            let params = PrepareParams {
                units: *unit,
                axes: *axes,
                mirrors,
                target_panels: g.panels,
                whole_from_half: mirrored_whole(case),
                wrap: wrap_params(case),
                ..PrepareParams::default()
            };
            tuft_mesh::stage::starting(|| format!("reading {}", path.display()));
            let (mesh, read) = read_stl(path)
                .map_err(|e| name_mirror_keys(e, case))
                .with_context(|| stl_key(path))?;
            // A size no unit makes a car of is refused before the repair
            // and wrap (a review's file in metres read as millimetres was
            // refused after 11 s of them).
            if let Some((lo, hi)) = mesh.bounds() {
                let size = (hi - lo).max() * unit.to_metres();
                if let Some(why) = size_problem(size, Some(*unit), "geometry.units") {
                    bail!(why);
                }
            }
            let body = repair_body(mesh, Some(read), &params)
                .map_err(|e| name_mirror_keys(e, case))
                .with_context(|| stl_key(path))?;
            let mut geo = panel_stl(case, path, &body)?;
            geo.body = keep.then_some(body);
            Ok(geo)
        }
        GeometrySource::Shape { name } => {
            let body = shape(name, case).with_context(|| format!("geometry.shape = \"{name}\""))?;
            let facets = body.len();
            let params = PrepareParams {
                units: LengthUnit::M,
                mirrors,
                target_panels: Some(facets.max(g.panels.unwrap_or(0))),
                ..PrepareParams::default()
            };
            let (mesh, report) = prepare_mesh(body, None, &params)
                .map_err(|e| name_mirror_keys(e, case))
                .with_context(|| format!("geometry.shape = \"{name}\""))?;
            finish(case, mesh, report, facets)
        }
    }
}

/// The wrap's settings for a case: the defaults, wrapping always when the
/// case asks (`geometry.wrap`).
pub fn wrap_params(case: &Case) -> tuft_mesh::wrap::WrapParams {
    tuft_mesh::wrap::WrapParams {
        always: case.file.geometry.wrap,
        ..tuft_mesh::wrap::WrapParams::default()
    }
}

/// The case's body at the panel count it now asks for, `geo` being the same
/// case prepared at another: an STL's body kept by [`load_keeping`] is
/// coarsened again, without reading, repairing or wrapping it again; a
/// built-in shape (generated at its count) or an STL not kept is prepared
/// anew.
pub fn at_count(case: &Case, geo: &Geometry) -> Result<Geometry> {
    match (&case.source, &geo.body) {
        (GeometrySource::Stl { path, .. }, Some(body)) => panel_stl(case, path, body),
        _ => load(case),
    }
}

fn stl_key(path: &Path) -> String {
    format!("geometry.stl = \"{}\"", path.display())
}

/// Coarsen an STL case's repaired body to the case's count and check it.
fn panel_stl(case: &Case, path: &Path, body: &Repaired) -> Result<Geometry> {
    let (mesh, report) = body
        .panels(case.file.geometry.panels)
        .map_err(|e| name_mirror_keys(e, case))
        .with_context(|| stl_key(path))?;
    let facets = report.read.as_ref().map_or(0, |r| r.facets);
    finish(case, mesh, report, facets)
}

/// The checks of a prepared body against the rest of its case.
fn finish(
    case: &Case,
    mesh: PanelMesh,
    mut report: PrepareReport,
    input_facets: usize,
) -> Result<Geometry> {
    check_ground(&mesh, case)?;
    let note = check_size(&mesh, case)?;
    // An axle or region off a body whose size says its unit may be wrong:
    // the unit first (a review's car in inches read as millimetres was
    // told only that its axles lay outside the body).
    check_placement(&mesh, case).map_err(|e| match &note {
        Some(n) => anyhow::anyhow!("{e:#}; but first: {n}"),
        None => e,
    })?;
    add_size_note(&mut report.quality, note);
    Ok(Geometry {
        mesh,
        input_facets,
        report,
        body: None,
    })
}

/// A mirror-plane refusal names the case keys that declared the planes.
pub fn name_mirror_keys(err: MeshError, case: &Case) -> anyhow::Error {
    let mut keys = Vec::new();
    if let Some(g) = &case.file.ground {
        keys.push(format!("ground.z = {}", g.z));
    }
    if case.file.geometry.half_model {
        keys.push("geometry.half_model = true".to_string());
    }
    let stl = matches!(case.source, GeometrySource::Stl { .. });
    let up = (stl && case.file.geometry.up.is_none()).then_some("set geometry.up = \"y\"");
    mirror_refusal(err, &keys, "ground.z", up)
}

/// A mirror-plane refusal with the settings that declared the planes
/// (`keys`). When a tenth or more of the body lies below the ground (twice
/// what tyres pressed into the floor may reach), an export with y up or a
/// wrong ground height is more likely: with `up` (what sets the STL's up
/// axis, as "set geometry.up = \"y\"", given when the STL's up axis was
/// not), the message asks which, naming `ground` (the ground's setting).
/// `tuft run` and `tuft check` (a case file or an STL alone) share it.
pub fn mirror_refusal(
    err: MeshError,
    keys: &[String],
    ground: &str,
    up: Option<&str>,
) -> anyhow::Error {
    let below = match err {
        MeshError::BelowGround { z, ground, top, .. } => ground - z > 0.1 * (top - z),
        MeshError::AcrossSymmetryPlane { .. } | MeshError::NotCentred { .. } => false,
        _ => return err.into(),
    };
    match up {
        Some(up) if below => anyhow::anyhow!(
            "{}: {err}: is {ground} right, or has the STL y up, as many exports do (then {up})?",
            keys.join(", ")
        ),
        _ => anyhow::Error::new(err).context(keys.join(", ")),
    }
}

/// Whether a built-in shape's parameters build a body (the generator's
/// own checks: a rear-window slope out of range, a negative ride height),
/// without preparing it; `Ok` for an STL, which only a run reads. A sweep
/// checks every variant so before the first one runs.
pub fn check_shape(case: &Case) -> Result<()> {
    match &case.source {
        GeometrySource::Shape { name } => shape(name, case)
            .map(drop)
            .with_context(|| format!("geometry.shape = \"{name}\"")),
        GeometrySource::Stl { .. } => Ok(()),
    }
}

/// The panels a built-in shape's case asks for: `geometry.panels`, the
/// panels solved, which on a half model are the modelled half's (as for
/// an STL), by default [`SHAPE_PANELS`] on a whole body and half of it on
/// a half model (the same body).
pub fn shape_panels(case: &Case) -> usize {
    let g = &case.file.geometry;
    g.panels.unwrap_or(if g.half_model {
        SHAPE_PANELS / 2
    } else {
        SHAPE_PANELS
    })
}

/// A built-in shape with the case's parameters.
fn shape(name: &str, case: &Case) -> Result<TriMesh> {
    let g = &case.file.geometry;
    // The generators count the whole body's panels: a half model (and one
    // run whole for a cross wind, whose count the case gives for its half)
    // asks them for twice the half's (a review's half model at 2,500
    // panels had solved 1,259, while `tuft check` suggested a count for
    // the modelled half, and an STL's count is the half's).
    let panels = shape_panels(case) * if g.half_model { 2 } else { 1 };
    let mesh = match name {
        "coupe" => {
            let d = CoupeParams::default();
            // The generator's height is the roof's above the ground, so its
            // own ride height would change the body's depth; a ride-height
            // study wants the same body raised or lowered: build it at the
            // default clearance and move it.
            let ride = g.ride_height.unwrap_or(d.ride_height);
            if !(ride.is_finite() && ride > 0.0) {
                bail!("geometry.ride_height must be a positive number of metres (got {ride})");
            }
            let mut body = generate::coupe_with_params(&CoupeParams {
                rear_window_deg: g.rear_window_deg.unwrap_or(d.rear_window_deg),
                boot_deck_length: g.boot_deck_length.unwrap_or(d.boot_deck_length),
                diffuser_deg: g.diffuser_deg.unwrap_or(d.diffuser_deg),
                panels,
                half: mirrors(case).symmetry,
                ..d
            })?;
            let lift = ride - d.ride_height;
            body.map_vertices(|p| nalgebra::Point3::new(p.x, p.y, p.z + lift));
            body
        }
        "ahmed" => {
            let d = AhmedParams::default();
            generate::ahmed_with_params(&AhmedParams {
                slant_deg: g.slant_deg.unwrap_or(d.slant_deg),
                clearance: g.ride_height.unwrap_or(d.clearance),
                panels,
                half: mirrors(case).symmetry,
                ..d
            })?
        }
        "sphere" => sphere(
            g.radius.unwrap_or(0.5),
            g.centre_z.unwrap_or(0.0),
            panels,
            mirrors(case).symmetry,
        )?,
        other => bail!("unknown shape {other}"),
    };
    Ok(mesh)
}

fn sphere(radius: f64, centre_z: f64, panels: usize, half: bool) -> Result<TriMesh> {
    if half {
        bail!("geometry.half_model is not available for the built-in sphere");
    }
    if !(radius.is_finite() && radius > 0.0) {
        bail!("geometry.radius must be a positive number (got {radius})");
    }
    // Icosphere levels give 20 * 4^k panels: take the level nearest the request.
    let level = ((panels as f64 / 20.0).log(4.0)).round().clamp(1.0, 6.0) as u32;
    let mut m = generate::icosphere(radius, level);
    m.map_vertices(|p| nalgebra::Point3::new(p.x, p.y, p.z + centre_z));
    Ok(m)
}

/// Refuse a ground plane above the body's lowest point.
fn check_ground(mesh: &PanelMesh, case: &Case) -> Result<()> {
    let Some(ground) = case.file.ground.as_ref() else {
        return Ok(());
    };
    let (lo, hi) = mesh.bounds();
    let tol = 1e-6 * (hi - lo).norm();
    if lo.z < ground.z - tol {
        bail!(
            "ground.z = {} m lies above the body's lowest point (z = {:.4} m): put the ground plane at or below the body",
            ground.z,
            lo.z
        );
    }
    Ok(())
}

/// Smallest and largest body (its largest extent, m) a run accepts: below
/// and above them the STL's unit was almost surely misread (a car in metres
/// read as millimetres is 4.5 mm long; in millimetres read as metres,
/// 4.5 km; as centimetres, 45 m). The longest road vehicles are about 25 m
/// (common practice), models for a tunnel a few centimetres.
pub const BODY_SIZE_LIMITS: [f64; 2] = [0.05, 30.0];

/// Refuse a body whose size says the length unit was misread; otherwise
/// the note for an STL body small enough to be a scale model.
fn check_size(mesh: &PanelMesh, case: &Case) -> Result<Option<String>> {
    let (lo, hi) = mesh.bounds();
    let unit = match &case.source {
        GeometrySource::Stl { unit, .. } => Some(*unit),
        GeometrySource::Shape { .. } => None,
    };
    size_verdict((hi - lo).max(), unit, "geometry.units").map_err(|why| anyhow::anyhow!(why))
}

/// What a body `size` metres across at its largest says of its unit: the
/// refusal of [`size_problem`] as the error, or the note of [`size_note`]
/// (an STL's only: `unit` is `None` for a built-in shape).
pub fn size_verdict(
    size: f64,
    unit: Option<tuft_mesh::LengthUnit>,
    key: &str,
) -> std::result::Result<Option<String>, String> {
    match size_problem(size, unit, key) {
        Some(why) => Err(why),
        None => Ok(unit.and_then(|u| size_note(size, u, key))),
    }
}

/// The sentence refusing a body `size` metres across at its largest, when
/// it lies outside [`BODY_SIZE_LIMITS`]; `unit` is the STL's (named with
/// `key`, the setting that gives it), `None` for a built-in shape.
fn size_problem(size: f64, unit: Option<tuft_mesh::LengthUnit>, key: &str) -> Option<String> {
    if (BODY_SIZE_LIMITS[0]..=BODY_SIZE_LIMITS[1]).contains(&size) {
        return None;
    }
    let hint = unit.map_or(String::new(), |u| {
        let others = car_sized_readings(size, u);
        let readings = if others.is_empty() {
            String::new()
        } else {
            format!("; {}", others.join(", "))
        };
        format!(
            "; is {key} right (the STL was read as {}{readings})?",
            u.name()
        )
    });
    Some(format!(
        "the body is {} m across at its largest, outside the {} to {} m tuft screens{hint}",
        crate::output::html::significant(size, 2),
        BODY_SIZE_LIMITS[0],
        BODY_SIZE_LIMITS[1]
    ))
}

/// Largest body, metres across at its largest, that reads as a scale
/// model rather than a car (cars are about 3 to 6 m long; common
/// practice): a car in centimetres or inches read as millimetres comes to
/// 0.45 or 0.18 m, which the size limits let through.
pub const SCALE_MODEL_SIZE: f64 = 1.0;

/// A note for an STL body under [`SCALE_MODEL_SIZE`] across, or under a
/// car's 2.5 m when another unit would make it car-sized: a scale model
/// runs as it is, but a car whose STL unit was mistaken would report its
/// numbers at a toy's size (a review's 4.8 m car in inches read as
/// centimetres ran silently as a 1.9 m body); the note names the
/// car-sized readings the other units give (2.5 to 7 m). `unit`: the
/// STL's, named with `key`.
fn size_note(size: f64, unit: tuft_mesh::LengthUnit, key: &str) -> Option<String> {
    let others = car_sized_readings(size, unit);
    if size >= SCALE_MODEL_SIZE && (size >= CAR_SIZES[0] || others.is_empty()) {
        return None;
    }
    let hint = if others.is_empty() {
        String::new()
    } else {
        format!("{CAR_READING_WORDS}{key} right ({})?", others.join(", "))
    };
    Some(format!(
        "the body is {} m across at its largest, a scale model's size (the STL was read as {}): its \
         Reynolds number, lift in kg and forces are the model's at this speed{hint}",
        crate::output::html::significant(size, 2),
        unit.name()
    ))
}

/// Add [`size_note`]'s sentence to `quality`: as a warning when another
/// unit would make the body car-sized, since then the unit may be a slip
/// and every number the run gives is a toy's (a review's 4.8 m car in
/// centimetres, read as millimetres with its axles typed to match, ran
/// to exit 0 with only a note); as a note otherwise (a scale model).
pub fn add_size_note(quality: &mut tuft_mesh::quality::QualityReport, note: Option<String>) {
    match note {
        Some(n) if n.contains(CAR_READING_WORDS) => quality.add_warning(n),
        n => quality.notes.extend(n),
    }
}

/// Whether `warning` is [`add_size_note`]'s: the body a scale model's
/// size as read, car-sized in another unit.
pub fn is_unit_doubt(warning: &str) -> bool {
    warning.contains(CAR_READING_WORDS)
}

/// The words with which [`size_note`] gives a car-sized reading.
const CAR_READING_WORDS: &str = "; if it is a car, is ";

/// Lengths of a car, metres (common practice: a city car to a large van).
const CAR_SIZES: [f64; 2] = [2.5, 7.0];

/// Whether `note` is [`size_note`]'s.
pub fn is_scale_model_note(note: &str) -> bool {
    note.starts_with("the body is ") && note.contains(", a scale model's size (")
}

/// The readings of a body `size` metres across (as read in `unit`) that
/// other units would make car-sized, 2.5 to 7 m: "in metres it would be
/// 4.4 m".
fn car_sized_readings(size: f64, unit: tuft_mesh::LengthUnit) -> Vec<String> {
    use tuft_mesh::LengthUnit;
    let read = size / unit.to_metres();
    [
        LengthUnit::M,
        LengthUnit::Cm,
        LengthUnit::Mm,
        LengthUnit::In,
    ]
    .into_iter()
    .filter(|&u| u != unit)
    .map(|u| (u, read * u.to_metres()))
    .filter(|(_, m)| (CAR_SIZES[0]..=CAR_SIZES[1]).contains(m))
    .map(|(u, m)| {
        format!(
            "in {} it would be {} m",
            u.name(),
            crate::output::html::significant(m, 2)
        )
    })
    .collect()
}

/// Refuse axle positions outside the body's length (given in millimetres,
/// or for another body).
/// The axles and the named regions lie on the body, and the case's flow
/// slices in the box round it (in tuft's axes; the error says so when the
/// STL was turned into them).
pub fn check_placement(mesh: &PanelMesh, case: &Case) -> Result<()> {
    let g = &case.file.geometry;
    check_axles(mesh, case).map_err(|e| crate::case::with_lengths_hint(e, g))?;
    crate::region::check_on_body(&case.file.regions, mesh)
        .and_then(|()| crate::planes::placed(&case.file.slices, mesh).map(|_| ()))
        .map_err(|e| crate::case::with_axes_hint(e, g))
}

fn check_axles(mesh: &PanelMesh, case: &Case) -> Result<()> {
    let r = &case.file.reference;
    let (lo, hi) = mesh.bounds();
    let on_body = |x: f64| (lo.x..=hi.x).contains(&x);
    // Every axle off the body, in one sentence (a review's axles typed in
    // millimetres were refused one at a time).
    let (mut off, mut hints) = (Vec::new(), Vec::new());
    for (key, x) in [
        ("front_axle_x", r.front_axle_x),
        ("rear_axle_x", r.rear_axle_x),
    ] {
        let Some(x) = x.filter(|&x| !on_body(x)) else {
            continue;
        };
        // Longer than any body tuft screens and on the body in
        // millimetres: typed in the STL's unit.
        let hint = if x.abs() > BODY_SIZE_LIMITS[1] && on_body(x / 1000.0) {
            format!(
                "in millimetres it would be {:.3} m, on the body",
                x / 1000.0
            )
        } else if on_body(-x) {
            // Within the body when negated: given in the axes of a file
            // whose nose points to +x (a review's axles, read before its
            // `nose = "+x"` was set, were told only that they lay outside).
            let nose = match &case.source {
                GeometrySource::Stl { axes, .. } if !axes.nose_plus_x => {
                    "if the file's nose points to +x, set geometry.nose = \"+x\"; "
                }
                _ => "",
            };
            format!(
                "at x = {:.3} it would lie inside: {nose}positions in the case are in tuft's axes, x \
                 from the nose backwards, which negates the x of a file whose nose points to +x",
                -x
            )
        } else {
            String::new()
        };
        off.push(format!("reference.{key} = {x} m"));
        if !hint.is_empty() {
            hints.push((key, hint));
        }
    }
    if off.is_empty() {
        return Ok(());
    }
    // The hints after the sentence, each named when two are off (a
    // review read the two axles' hints inside the subject as garbled).
    let hints: Vec<String> = hints
        .into_iter()
        .map(|(key, hint)| {
            if off.len() > 1 {
                format!("{key}: {hint}")
            } else {
                hint
            }
        })
        .collect();
    let verb = if off.len() == 1 { "lies" } else { "lie" };
    bail!(
        "{} {verb} outside the body, which runs from x = {:.3} to {:.3} m{}",
        off.join(" and "),
        lo.x,
        hi.x,
        if hints.is_empty() {
            String::new()
        } else {
            format!("; {}", hints.join("; "))
        }
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::case::CaseFile;

    /// A 4.5 m car exported in centimetres or inches and read as
    /// millimetres (0.45 and 0.18 m) is warned about with the unit that
    /// would make it car-sized; a 1.04 m research body or a car is not,
    /// and a 0.8 m model no unit makes a car is noted.
    #[test]
    fn a_toy_sized_stl_body_is_noted_with_the_unit_that_fits() {
        use tuft_mesh::LengthUnit;
        let cm = size_note(0.45, LengthUnit::Mm, "geometry.units").unwrap();
        assert!(
            cm.starts_with("the body is 0.45 m across")
                && cm.contains("is geometry.units right (in centimetres it would be 4.5 m)"),
            "{cm}"
        );
        let inch = size_note(4.5 / 25.4, LengthUnit::Mm, "k").unwrap();
        assert!(inch.contains("in inches it would be 4.5 m"), "{inch}");
        assert!(size_note(1.044, LengthUnit::Mm, "k").is_none());
        // A 4.8 m car in inches read as centimetres: 1.9 m, no car, and in
        // inches a car.
        let cm = size_note(4.8 / 2.54, LengthUnit::Cm, "geometry.units").unwrap();
        assert!(cm.contains("in inches it would be 4.8 m"), "{cm}");
        assert!(size_note(1.9, LengthUnit::M, "k").is_none());
        assert!(is_scale_model_note(&cm));
        assert!(size_note(4.5, LengthUnit::Mm, "k").is_none());
        // With a car-sized reading it is a warning (the run exits 1); a
        // scale model with none stays a note.
        let ball = tuft_mesh::generate::icosphere(1.0, 2);
        let mut q =
            tuft_mesh::quality::quality(&PanelMesh::new(ball, tuft_mesh::Mirrors::none()).unwrap());
        q.warnings.clear();
        q.notes.clear();
        add_size_note(&mut q, size_note(0.45, LengthUnit::Mm, "k"));
        add_size_note(&mut q, size_note(0.8, LengthUnit::Mm, "k"));
        assert!(
            q.warnings.len() == 1 && q.warnings[0].contains("4.5 m"),
            "{q:?}"
        );
        assert!(
            q.notes.len() == 1 && is_scale_model_note(&q.notes[0]),
            "{q:?}"
        );
        // A car in metres read as millimetres is refused, naming the unit.
        let m = size_problem(0.0044, Some(LengthUnit::Mm), "geometry.units").unwrap();
        assert!(
            m.ends_with(
                "is geometry.units right (the STL was read as millimetres; in metres it would be 4.4 m)?"
            ),
            "{m}"
        );
    }

    fn coupe(ride: f64) -> PanelMesh {
        let text = format!(
            "[geometry]\nshape = \"coupe\"\npanels = 600\nride_height = {ride}\n[ground]\nz = 0.0\n"
        );
        let file: CaseFile = toml::from_str(&text).unwrap();
        let case = Case::from_file(std::path::Path::new("c.toml"), file).unwrap();
        load(&case).unwrap().mesh
    }

    /// An axle outside the body that would lie inside with its x negated
    /// is told why it may be so: an STL case not told its nose points to
    /// +x gets the setting named; an axle outside either way gets no hint.
    #[test]
    fn an_axle_outside_the_body_that_fits_negated_names_the_nose() {
        let dir = tempfile::tempdir().unwrap();
        std::fs::write(dir.path().join("b.stl"), b"").unwrap();
        let body = |shift: f64| {
            let mut m = tuft_mesh::generate::ellipsoid(2.0, 0.8, 0.6, 400).unwrap();
            m.map_vertices(|p| tuft_mesh::Point::new(p.x + shift, p.y, p.z));
            PanelMesh::new(m, tuft_mesh::Mirrors::none()).unwrap()
        };
        let case = |front: f64, rear: f64| {
            let text = format!(
                "[geometry]\nstl = \"b.stl\"\nunits = \"m\"\n[reference]\nfront_axle_x = {front}\nrear_axle_x = {rear}\n"
            );
            let file: CaseFile = toml::from_str(&text).unwrap();
            Case::from_file(&dir.path().join("c.toml"), file).unwrap()
        };
        // From x = -2 to 2: -2.5 is outside either way.
        let e = format!(
            "{:#}",
            check_axles(&body(0.0), &case(-2.5, 1.0)).unwrap_err()
        );
        assert!(!e.contains("geometry.nose"), "{e}");
        // From -3.5 to 0.5: 2.5 is outside, -2.5 inside.
        let e = format!(
            "{:#}",
            check_axles(&body(-1.5), &case(0.0, 2.5)).unwrap_err()
        );
        assert!(
            e.contains(
                "at x = -2.500 it would lie inside: if the file's nose points to +x, set geometry.nose"
            ),
            "{e}"
        );
        // Both axles typed in millimetres: both named, with the unit.
        let e = format!(
            "{:#}",
            check_axles(&body(2.0), &case(900.0, 3550.0)).unwrap_err()
        );
        assert!(
            e.starts_with(
                "reference.front_axle_x = 900 m and reference.rear_axle_x = 3550 m lie outside the \
                 body, which runs from x = 0.000 to 4.000 m; front_axle_x: in millimetres it would be \
                 0.900 m, on the body; rear_axle_x: in millimetres it would be 3.550 m, on the body"
            ),
            "{e}"
        );
    }

    /// A ride-height change moves the built-in coupe as a whole: floor and
    /// roof rise by the same amount, the plan view stays.
    #[test]
    fn ride_height_moves_the_whole_coupe() {
        let ((lo1, hi1), (lo2, hi2)) = (coupe(0.08).bounds(), coupe(0.16).bounds());
        assert!((lo1.z - 0.08).abs() < 1e-9 && (lo2.z - 0.16).abs() < 1e-9);
        assert!(
            (hi2.z - hi1.z - 0.08).abs() < 1e-9,
            "roof {} and {}",
            hi1.z,
            hi2.z
        );
        assert!((hi2.x - hi1.x).abs() < 1e-12 && (hi2.y - hi1.y).abs() < 1e-12);
    }
}
