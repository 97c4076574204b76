//! One call from an STL file to panels: read, scale to metres, move, check
//! the mirror planes, repair, wrap parts that overlap or stand on the
//! ground, coarsen and relax, refuse a surface that passes through itself,
//! build panels and measure them.
//!
//! ```
//! # fn main() -> Result<(), tuft_mesh::MeshError> {
//! use tuft_mesh::{generate, prepare::{prepare_mesh, PrepareParams}, LengthUnit, Mirrors};
//! let params = PrepareParams { units: LengthUnit::M, target_panels: Some(500), ..PrepareParams::default() };
//! let (panels, report) = prepare_mesh(generate::icosphere(1.0, 4), None, &params)?;
//! assert!(panels.len() <= 500 && report.coarsen.is_some());
//! # Ok(()) }
//! ```

use std::path::Path;

use serde::Serialize;

use crate::coarsen::{CoarsenParams, CoarsenReport, coarsen_with_params};
use crate::crossing::crossings;
use crate::import::{FileAxes, LengthUnit, RigidTransform, StlReport, read_stl};
use crate::quality::{GRADING_NOTE_SHARE, QualityReport, quality, suggested_panels};
use crate::repair::{RepairParams, RepairReport, repair_with_params};
use crate::wrap::{WrapParams, WrapReport};
use crate::{MeshError, Mirrors, PanelMesh, Point, TriMesh};

/// Everything `prepare` needs besides the file.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PrepareParams {
    /// Length unit of the file.
    pub units: LengthUnit,
    /// How the file's axes lie (nose towards +x, y up), undone after
    /// scaling.
    pub axes: FileAxes,
    /// Rigid motion applied after scaling and the axes (to put x
    /// downstream, z up).
    pub transform: Option<RigidTransform>,
    /// Mirror planes (ground height in metres, after the transform).
    pub mirrors: Mirrors,
    /// Panels wanted; `None` uses [`suggested_panels`]. A mesh already at or
    /// below the target is not coarsened.
    pub target_panels: Option<usize>,
    /// Repair tolerances.
    pub repair: RepairParams,
    /// Coarsening settings (its `target_panels` is replaced by the above).
    pub coarsen: CoarsenParams,
    /// Wrapping settings (for parts that overlap or stand on the ground).
    pub wrap: WrapParams,
    /// Measure how far a whole body (not declared a half model) is from
    /// symmetric about y = 0, as the cut a half model would make
    /// ([`MirrorReport::halves`]; `tuft check` asks, a run does not).
    pub measure_symmetry: bool,
    /// A half model (or a whole body to be cut as one) is prepared as a
    /// half model up to the wrap and then mirrored into a whole body
    /// ([`crate::mirror::whole_from_half`]), which runs without the
    /// symmetry plane: for a run in a cross wind, which a half model
    /// cannot take. `mirrors.symmetry` is then false.
    pub whole_from_half: bool,
}

impl Default for PrepareParams {
    fn default() -> Self {
        Self {
            units: LengthUnit::Mm,
            axes: FileAxes::default(),
            transform: None,
            mirrors: Mirrors::none(),
            target_panels: None,
            repair: RepairParams::default(),
            coarsen: CoarsenParams::default(),
            wrap: WrapParams::default(),
            measure_symmetry: false,
            whole_from_half: false,
        }
    }
}

/// The mirror planes as reported.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct MirrorReport {
    /// Ground plane height, metres.
    pub ground: Option<f64>,
    /// Half model mirrored in `y = 0`.
    pub symmetry: bool,
    /// Vertices of a half model moved onto its cut (see [`CUT_TOLERANCE`]),
    /// before the repair and after it.
    pub cut_vertices_moved: usize,
    /// The largest of those moves, metres.
    pub cut_largest_move: f64,
    /// Vertices of a border on the ground (a body cut at the floor) moved
    /// onto it after the repair (`snap_border_to_plane`).
    pub ground_vertices_moved: usize,
    /// The largest of those moves, metres.
    pub ground_largest_move: f64,
    /// A whole body declared a half model, cut at `y = 0`
    /// ([`crate::cut::keep_right_half`]).
    pub whole_cut: Option<crate::cut::HalfCut>,
    /// For a whole body not declared a half model, when asked
    /// ([`PrepareParams::measure_symmetry`]): the cut at y = 0 a half model
    /// would make, with how far its halves differ.
    pub halves: Option<crate::cut::HalfCut>,
    /// When asked as for [`MirrorReport::halves`], a whole body too far off
    /// y = 0 to be cut there: its centre's y, metres.
    pub off_centre: Option<f64>,
    /// A half model of the car's left side (in y <= 0 in tuft's axes, once
    /// turned into them) that runs as its mirror image in y >= 0
    /// ([`crate::import::FileAxes::apply`]; [`MIRRORED_HALF_NOTE`]).
    pub mirrored_half: bool,
}

/// What the run says of a half model mirrored into a whole body
/// ([`PrepareParams::whole_from_half`]).
pub const MIRRORED_WHOLE_NOTE: &str = "the half model was mirrored into a whole body, its two sides \
     the same shape, to run in a cross wind (a half model cannot): the panels, the pictures and the \
     VTK files show both sides, and the differences between them are the wind's (the attached flow \
     mirrors exactly; the separated-flow loop can still part a few panels between the two sides)";

/// What the run says of a half model mirrored onto y >= 0.
pub const MIRRORED_HALF_NOTE: &str = "the half model is the car's left side (y <= 0 in tuft's axes, in \
     which y points right seen from the driver's seat): it runs as its mirror image, the right side in \
     y >= 0, with the same flow and loads, so panels.csv, the VTK files, the pictures and every place \
     named here (quality warnings, holes) show the right side: negate y to find one in the file";

/// A half model's vertices within this fraction of the body's diagonal of
/// the symmetry plane, on its open border or on the wrong side of it, are
/// moved onto it (about 5 mm on a car): a scan cut by hand or in the
/// scanner's software is off the plane by a millimetre or two, and
/// without the move its cut would not be taken for the mirror's and a
/// vertex a hair below y = 0 would refuse the whole body (our choice).
pub const CUT_TOLERANCE: f64 = 1e-3;

/// A coarsening that ends above this multiple of its target (its checks
/// refused the tries at the target) is warned about: the run costs about
/// the square of that in memory.
pub const COARSEN_SHORTFALL: f64 = 1.5;

/// What `prepare` did, step by step (serializable).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PrepareReport {
    /// What the file held (absent for an in-memory mesh).
    pub read: Option<StlReport>,
    /// Length unit assumed.
    pub units: LengthUnit,
    /// Whether a rigid motion or a change of axes was applied.
    pub transformed: bool,
    /// The file's axes, turned into tuft's.
    pub axes: FileAxes,
    /// Mirror planes.
    pub mirrors: MirrorReport,
    /// Every repair pass.
    pub repair: RepairReport,
    /// Wrapping into one outer surface (absent when no part overlaps
    /// another, lies inside another or stands on the ground).
    pub wrap: Option<WrapReport>,
    /// Panels cross each other in local folds (warned about in `quality`).
    pub folded: bool,
    /// Suggested panel count for this body and how it was found.
    pub suggested_panels: usize,
    /// Coarsening (absent when the mesh was already small enough).
    pub coarsen: Option<CoarsenReport>,
    /// Quality of the final panels.
    pub quality: QualityReport,
    /// Final panels.
    pub panels: usize,
    /// Area of the real panels, m^2.
    pub area: f64,
    /// Bounding box of the real panels, metres.
    pub bounds: [[f64; 3]; 2],
}

/// Read `path` and prepare it.
///
/// # Errors
/// Every reading error of [`read_stl`], every repair error,
/// [`MeshError::AcrossSymmetryPlane`] or [`MeshError::BelowGround`] when the body crosses a declared mirror plane,
/// [`MeshError::NotCentred`] when a whole body declared a half model is not
/// centred on `y = 0` (a centred one is cut there),
/// [`MeshError::NothingInside`] when a wrap finds no inside, and
/// [`MeshError::SelfCrossing`] when the panels pass through their own
/// surface.
pub fn prepare(
    path: &Path,
    params: &PrepareParams,
) -> Result<(PanelMesh, PrepareReport), MeshError> {
    repair_file(path, params)?.panels(params.target_panels)
}

/// Read `path` and do the part of [`prepare`] before the coarsening
/// ([`repair_body`]).
///
/// # Errors
/// As [`prepare`], less those of the coarsening and the panel checks.
pub fn repair_file(path: &Path, params: &PrepareParams) -> Result<Repaired, MeshError> {
    crate::stage::starting(|| format!("reading {}", path.display()));
    let (mesh, read) = read_stl(path)?;
    repair_body(mesh, Some(read), params)
}

/// Where a fanned face's rings are cut ([`recut_fans`]): fractions of the
/// way from the hub to the rim, closing in on the rim so that the outer
/// ring, whose panels touch the sharp rim, is a narrow one (a tenth of the
/// way, under a fifth of the face's area), as on a face cut in rings.
pub const FAN_RINGS: [f64; 3] = [0.5, 0.75, 0.9];

/// Re-cut every flat face meeting the wind that is cut as a fan of thin
/// triangles from one corner ([`crate::quality::fans`]) in
/// rings about the same corner, cut at [`FAN_RINGS`]: each fan triangle
/// `(hub, a, b)` becomes a small fan triangle at the hub and a strip of two
/// triangles per ring out to its rim edge `a b`, the ring points on the
/// lines from the hub to each rim vertex (shared by the triangles on
/// either side, so the surface stays closed, and the rim edges, shared with
/// the faces beside, stay as they were). Only the outer ring then touches
/// the sharp rim, as on a face cut in rings. Returns the mesh, and the
/// faces re-cut with the panels added (`None` when there were none).
///
/// # Errors
/// [`MeshError`] from rebuilding the panels (not expected: the new
/// triangles are the old ones' pieces).
pub fn recut_fans(panels: PanelMesh) -> Result<(PanelMesh, Option<(usize, usize)>), MeshError> {
    let fans = crate::quality::fans(&panels);
    if fans.is_empty() {
        return Ok((panels, None));
    }
    let before = panels.len();
    let mut vertices = panels.vertices.clone();
    let mut triangles: Vec<[u32; 3]> = Vec::with_capacity(before + 8 * fans.len());
    let mut in_fan = vec![None; before];
    for (f, (_, face)) in fans.iter().enumerate() {
        for &j in face {
            in_fan[j as usize] = Some(f);
        }
    }
    // Ring point `k` (1..=FAN_RINGS.len(), the last the rim vertex itself)
    // of fan `f` towards rim vertex `v`.
    let rings = FAN_RINGS.len();
    let mut ring: std::collections::HashMap<(usize, u32, usize), u32> = Default::default();
    let mut point = |vertices: &mut Vec<Point>, f: usize, hub: u32, v: u32, k: usize| -> u32 {
        if k > rings {
            return v;
        }
        *ring.entry((f, v, k)).or_insert_with(|| {
            let (h, p) = (vertices[hub as usize], vertices[v as usize]);
            vertices.push(h + (p - h) * FAN_RINGS[k - 1]);
            (vertices.len() - 1) as u32
        })
    };
    for (t, tri) in panels.triangles.iter().enumerate() {
        let Some(f) = in_fan[t] else {
            triangles.push(*tri);
            continue;
        };
        let hub = fans[f].0;
        let Some(at) = tri.iter().position(|&v| v == hub) else {
            triangles.push(*tri);
            continue;
        };
        let (a, b) = (tri[(at + 1) % 3], tri[(at + 2) % 3]);
        let (a1, b1) = (
            point(&mut vertices, f, hub, a, 1),
            point(&mut vertices, f, hub, b, 1),
        );
        triangles.push([hub, a1, b1]);
        for k in 1..=rings {
            let (ak, bk) = (
                point(&mut vertices, f, hub, a, k),
                point(&mut vertices, f, hub, b, k),
            );
            let (an, bn) = (
                point(&mut vertices, f, hub, a, k + 1),
                point(&mut vertices, f, hub, b, k + 1),
            );
            triangles.push([ak, an, bn]);
            triangles.push([ak, bn, bk]);
        }
    }
    let mirrors = panels.mirrors;
    let recut = PanelMesh::new(
        TriMesh {
            vertices,
            triangles,
        },
        mirrors,
    )?;
    let added = recut.len() - before;
    Ok((recut, Some((fans.len(), added))))
}

/// Parts thinner than this many of the panels' typical edges are not
/// resolved ([`thin_part_warning`]): a section needs panels on both faces
/// and round it (our choice).
pub const THIN_EDGES: f64 = 2.0;

/// A warning when parts of the input are thinner than [`THIN_EDGES`] of
/// the panels' typical edge (that of an equilateral triangle of the median
/// panel area). Under one edge the panels do not resolve a part's section,
/// so its own pressures and drag are not in the results (30 mm roof bars
/// under 100 mm panels); up to two, a panel or two spans it, and its own
/// drag is rough (a review's 100 mm mirror housing under 90 mm panels
/// carried about 9 counts on 43 panels, most held at the rim bound or the
/// dead water's pressure, where the first wording had said none). Nor
/// is a thin wing's lift: no Kutta wake leaves an STL part's trailing
/// edge (a review's rear wing carried 3 kg where a hand estimate gives
/// 55).
fn thin_part_warning(thin: &[crate::thin::PartSize], panels: &PanelMesh) -> Option<String> {
    let edge = crate::quality::typical_edge(panels.panels.iter().map(|p| p.area))?;
    let under: Vec<&crate::thin::PartSize> = thin
        .iter()
        .filter(|p| p.thickness < THIN_EDGES * edge)
        .collect();
    let first = under.first()?;
    let [x, y, z] = first.centre;
    let (count, verb) = match under.len() {
        1 => ("1 part".to_owned(), "is"),
        n => (format!("{n} parts"), "are"),
    };
    let what = if first.thickness < edge {
        "the thinnest is under one panel edge, so the panels do not resolve its section: its own \
         pressures, lift and drag are not in the results as computed (a roof bar, a lip or a blade; the body's \
         flow round it is), though the suction its edges draw can move the loads a good deal (held at \
         a bound where the run says so: a test 12 mm windscreen's side edges carried 177 counts)"
    } else {
        "a panel or two spans their section, so their own pressures, lift and drag are rough (many of \
         their panels take the bound beside a sharp edge or the dead water's pressure)"
    };
    Some(format!(
        "{count} of the STL {verb} thinner than two of the panels' edges ({:.0} mm; the thinnest {:.0} mm, \
         near x {x:.2}, y {y:.2}, z {z:.2} m): {what}; judge such parts' own lift and drag elsewhere. \
         A wing's downforce needs the circulation its trailing edge sheds, which tuft does not model \
         on an STL's parts: a rear wing adds next to nothing to the axle loads here (a test 1.4 m \
         wing at 6 degrees over a coupe's deck carried about 3 kg at 200 km/h on its own panels, \
         where a hand estimate gives about 55)",
        THIN_EDGES * edge * 1000.0,
        first.thickness * 1000.0
    ))
}

/// The warning of a coarsening that left `lost` separate parts of the
/// input with no panels: they are not in the body at all (`thin` names
/// the thinnest part, the likeliest of them).
fn lost_parts_warning(lost: usize, thin: &[crate::thin::PartSize]) -> String {
    let (what, verb) = if lost == 1 {
        ("1 separate part", "is")
    } else {
        (&*format!("{lost} separate parts"), "are")
    };
    let look = thin.first().map_or(String::new(), |p| {
        let [x, y, z] = p.centre;
        format!(
            " (the STL's thinnest part, {:.0} mm, near x {x:.2}, y {y:.2}, z {z:.2} m, is the one to \
             look at first)",
            1000.0 * p.thickness
        )
    });
    format!(
        "{what} of the STL got no panels and {verb} left out of the body, smaller than the panels{look}: \
         scanner debris or a stray fragment is best deleted in the modeller; a part of the car needs \
         more panels (geometry.panels, --panels) to be in the results. The coarsening's largest \
         deviation from the input may lie there"
    )
}

/// What the STL reader did beyond reading one plain file: several parts
/// read as one body, a facet count that fell short.
fn read_notes(r: &StlReport) -> Vec<String> {
    let mut notes = Vec::new();
    if r.solids > 1 {
        let what = match r.format {
            crate::import::StlFormat::Ascii => "solid ... endsolid blocks (one per part)",
            crate::import::StlFormat::Binary => "binary STLs joined one after another",
        };
        notes.push(format!(
            "the STL holds {} {what}: all {} facets were read as one body",
            r.solids, r.facets
        ));
    }
    if let Some(n) = r.count_short {
        notes.push(format!(
            "the STL's header gives {n} facets but the file holds {}: all were read",
            r.facets
        ));
    }
    notes
}

/// Height over width beyond which a body is taller than any car or van
/// stands (a high-roof van is about 1.4 times as tall as wide, a car
/// 0.6 to 0.9; common practice): a file read with the wrong up axis lies
/// on its side, 1.6 times as tall as wide for the shipped coupe. Only a
/// low car is caught so: a saloon or an SUV on its side is 1.1 to 1.3
/// times as tall as wide.
pub const UPRIGHT_RATIO: f64 = 1.5;

/// Length from which a body is a bus or a lorry, not a car or a van, and
/// [`UPRIGHT_RATIO`] does not apply (the longest vans are about 7 m;
/// common practice).
pub const UPRIGHT_MAX_LENGTH: f64 = 7.5;

/// A warning when the body, as read, is more than [`UPRIGHT_RATIO`] times
/// as tall as it is wide (a half model's width doubled): a car exported
/// with y up and read with z up runs lying on its side, and a review's did
/// with no word about it.
fn upright_warning(lo: crate::Point, hi: crate::Point, params: &PrepareParams) -> Option<String> {
    let height = hi.z - lo.z;
    let width = params.mirrors.whole_width(&lo, &hi);
    // Buses and lorries (a double-decker is 1.6 times as tall as wide)
    // are longer than any car or van.
    let car_length = hi.x - lo.x < UPRIGHT_MAX_LENGTH;
    (car_length && width > 0.0 && height > UPRIGHT_RATIO * width).then(|| {
        let fix = if params.axes.y_up {
            "it was read with y up: if the file has z up, drop geometry.up (tuft check: leave out --up); \
             if it is a half model, declare it (geometry.half_model = true, --half)"
        } else {
            "if the file has y up, set geometry.up = \"y\" (tuft check: --up y); if it is a half model, \
             declare it (geometry.half_model = true, --half)"
        };
        format!(
            "the body stands {height:.2} m tall and {width:.2} m wide, taller than any car or van \
             (more than {UPRIGHT_RATIO} times its width): {fix}"
        )
    })
}

/// Angle about the vertical, degrees, from which a whole body's centre line
/// reads as turned off the x axis (`turned_warning`): 1 degree moves a
/// 4.5 m car's ends 39 mm to either side of its middle, where a symmetric
/// body's slices centre within a few millimetres and a part on one side
/// (a door mirror) moves one slice's mid-width by up to 0.1 m (our
/// choice).
pub const TURNED_DEG: f64 = 1.0;

/// A warning when a whole body's centre line runs at an angle to the x
/// axis, as a scan not aligned with the axes does: the centre of its width
/// in each of ten slices along x, fitted with a line over the middle
/// eight (nose and tail trimmed) by the median of their pairwise slopes. A review's coupe turned 2 degrees about
/// the vertical had been told it was off-centre by 80 mm, and its run
/// (C_D 0.142 against 0.151, a side force at zero yaw) said nothing.
fn turned_warning(panels: &PanelMesh) -> Option<String> {
    const SLICES: usize = 10;
    let (lo, hi) = panels.bounds();
    let length = hi.x - lo.x;
    if length <= 0.0 {
        return None;
    }
    let mut width = [(f64::INFINITY, f64::NEG_INFINITY); SLICES];
    for v in &panels.vertices {
        let k = (((v.x - lo.x) / length * SLICES as f64) as usize).min(SLICES - 1);
        width[k] = (width[k].0.min(v.y), width[k].1.max(v.y));
    }
    let points: Vec<(f64, f64)> = (1..SLICES - 1)
        .filter(|&k| width[k].0 <= width[k].1)
        .map(|k| {
            let x = lo.x + (k as f64 + 0.5) * length / SLICES as f64;
            (x, 0.5 * (width[k].0 + width[k].1))
        })
        .collect();
    if points.len() < 3 {
        return None;
    }
    // Theil-Sen: the median of the slopes between every pair of slices,
    // so that a part on one side only (a mirror, an open door, steered
    // wheels), which moves one or two slices' mid-width, does not tilt
    // the line as a least-squares fit would.
    let mut slopes: Vec<f64> = Vec::new();
    for (i, a) in points.iter().enumerate() {
        for b in &points[i + 1..] {
            slopes.push((b.1 - a.1) / (b.0 - a.0));
        }
    }
    slopes.sort_by(f64::total_cmp);
    let m = slopes.len();
    let slope = if m % 2 == 1 {
        slopes[m / 2]
    } else {
        0.5 * (slopes[m / 2 - 1] + slopes[m / 2])
    };
    let angle = slope.atan().to_degrees();
    (angle.abs() > TURNED_DEG).then(|| {
        format!(
            "the body's centre line runs about {:.1} degrees off the x axis (its width is centred at y {:.3} m \
             near the nose and {:.3} m near the tail): a scan not aligned with the axes runs at that yaw \
             and reads as off-centre; turn it in the modeller so that its centre line lies along x (a \
             file with y up read as z up, which has no such centre line, reads so too: then set \
             geometry.up = \"y\", --up y)",
            angle.abs(),
            points[0].1,
            points[points.len() - 1].1
        )
    })
}

/// Where the enclosed volume's centroid lies across y and up z, each as a
/// fraction of the body's extent from its box's middle (divergence
/// theorem on the panels, one point each: V = sum A n_k c_k and the
/// centroid's c_k = sum A n_k c_k^2 / 2V); `None` for a body enclosing no
/// volume.
fn centroid_offsets(panels: &PanelMesh) -> Option<(f64, f64)> {
    let (lo, hi) = panels.bounds();
    let along = |k: usize| {
        let (mut v, mut m) = (0.0, 0.0);
        for p in &panels.panels {
            let c = p.centroid[k] - 0.5 * (lo[k] + hi[k]);
            v += p.area * p.normal[k] * c;
            m += p.area * p.normal[k] * c * c / 2.0;
        }
        (v > 0.0 && hi[k] > lo[k]).then(|| m / v / (hi[k] - lo[k]))
    };
    Some((along(1)?, along(2)?))
}

/// How near, as a fraction of its height, a whole body's centroid may lie
/// to its box's middle in z and read as symmetric top to bottom (our
/// choice, from a review's generated vehicles and the demo coupe: whole
/// bodies read 0.00002 or less across y, cars 0.03 to 0.14 in z, van
/// and bus boxes 0.001 to 0.007; a y-up file read as z up swaps the two).
pub const UP_AXIS_SYMMETRIC: f64 = 0.01;

/// How far a whole body's centroid must lie off its box's middle across y,
/// as a fraction of its width, to read as lopsided side to side (our
/// choice: a y-up van read 0.032, a y-up saloon 0.108; a part on one side
/// only moves the box's middle, 0.02 to 0.07 for a door mirror 25 to 150
/// mm off, but a car with one is lopsided top to bottom as well).
pub const UP_AXIS_LOPSIDED: f64 = 0.025;

/// A warning when a whole body is lopsided across y and symmetric top to
/// bottom, as a car is the other way round: a file with y up read as z
/// up (a review's y-up saloon, 1.4 times as tall as wide in the wrong
/// axes, was not caught by [`upright_warning`] and ran lying on its side).
fn up_axis_warning(panels: &PanelMesh, params: &PrepareParams) -> Option<String> {
    if params.mirrors.symmetry {
        return None;
    }
    let (across, up) = centroid_offsets(panels)?;
    (across.abs() > UP_AXIS_LOPSIDED && up.abs() < UP_AXIS_SYMMETRIC).then(|| {
        let fix = if params.axes.y_up {
            "it was read with y up: if the file has z up, drop geometry.up (tuft check: leave out --up)"
        } else {
            "if the file has y up, set geometry.up = \"y\" (tuft check: --up y)"
        };
        format!(
            "the body is symmetric top to bottom (its volume's centre {:.1} % of its height from the middle) \
             and lopsided side to side ({:.1} % of its width), where a car is the other way round: {fix}",
            100.0 * up.abs(),
            100.0 * across.abs()
        )
    })
}

/// Prepare a mesh already in memory (in `params.units`).
///
/// # Errors
/// As [`prepare`], less the reading errors.
pub fn prepare_mesh(
    mesh: TriMesh,
    read: Option<StlReport>,
    params: &PrepareParams,
) -> Result<(PanelMesh, PrepareReport), MeshError> {
    repair_body(mesh, read, params)?.panels(params.target_panels)
}

/// A body read, turned into tuft's axes, cut or mirrored, repaired and
/// wrapped, but not yet coarsened: all of [`prepare_mesh`] that does not
/// depend on the panel count, kept so that one body can be panelled at
/// several counts ([`Repaired::panels`]) without repeating that work (on a
/// 1.9-million-facet scan the read, repair and wrap are some 14 s a count).
#[derive(Debug, Clone)]
pub struct Repaired {
    params: PrepareParams,
    mesh: TriMesh,
    parts: Parts,
}

/// The part of [`prepare_mesh`] before the coarsening.
///
/// # Errors
/// As [`prepare_mesh`], less those of the coarsening and the panel checks.
pub fn repair_body(
    mut mesh: TriMesh,
    read: Option<StlReport>,
    params: &PrepareParams,
) -> Result<Repaired, MeshError> {
    // A half to be run whole is a half model up to the wrap.
    let whole = *params;
    let as_half = PrepareParams {
        mirrors: Mirrors {
            symmetry: true,
            ..params.mirrors
        },
        whole_from_half: false,
        ..*params
    };
    let params = if whole.whole_from_half {
        &as_half
    } else {
        params
    };
    let scale = params.units.to_metres();
    mesh.map_vertices(|p| p * scale);
    let mirrored_half = params.axes.apply(&mut mesh, params.mirrors.symmetry);
    if let Some(t) = params.transform {
        t.apply(&mut mesh);
    }
    let measured = (params.measure_symmetry && !params.mirrors.symmetry)
        .then(|| crate::cut::keep_right_half(&mesh));
    let off_centre = match &measured {
        Some(Err(MeshError::NotCentred { y_min, y_max })) => Some(0.5 * (y_min + y_max)),
        _ => None,
    };
    let halves = measured.and_then(Result::ok).flatten().map(|(_, cut)| cut);
    let whole_cut = if params.mirrors.symmetry {
        match crate::cut::keep_right_half(&mesh)? {
            Some((half, cut)) => {
                mesh = half;
                Some(cut)
            }
            None => None,
        }
    } else {
        None
    };
    let (cap_moved, cap_largest) = snap_cap_to_plane(&mut mesh, params)?;
    let caps = drop_symmetry_caps(&mut mesh, params);
    let (cut_vertices_moved, cut_largest_move) = snap_to_cut(&mut mesh, &params.mirrors);
    let (cut_vertices_moved, cut_largest_move) = (
        cut_vertices_moved + cap_moved,
        cut_largest_move.max(cap_largest),
    );
    check_mirror_sides(&mesh, params)?;
    crate::stage::starting(|| format!("repairing {} facets", mesh.len()));
    let (mut mesh, repair) =
        repair_with_params(mesh, &params.mirrors, &params.repair).map_err(|e| {
            match (&read, e) {
                (Some(r), e @ MeshError::OpenHole { .. }) if r.endsolid_missing => {
                    MeshError::CutShort {
                        facets: r.facets,
                        source: Box::new(e),
                    }
                }
                (_, e) => e,
            }
        })?;
    let capped_half = undeclared_cap_warning(&mesh, params);
    let plane_tol = params.repair.plane_tolerance * repair.diagonal;
    // Borders a mirror closes must lie exactly on its plane, for the wrap:
    // its grid lines in a mirror plane count the facets on the body's side
    // and pass through any gap between a border and its image, however
    // thin. After the repair, because its weld keeps the first of the
    // vertices it merges, so a new vertex of the cut on y = 0 merged into
    // an older one a hair off the plane takes that one's place (a review's
    // roof box, whose centre line lay 0.2 micrometres off it, was left a
    // slot along the plane); and a floor cut a hair above the ground (from
    // the STL's single precision or a transform) let the lines in the
    // ground pass under the body, which the wrap then closed a twentieth
    // of a cell above its image.
    let (moved_after, largest_after) = if params.mirrors.symmetry {
        snap_border_to_plane(&mut mesh, plane_tol, |p| &mut p.y, 0.0)
    } else {
        (0, 0.0)
    };
    let cut_vertices_moved = cut_vertices_moved + moved_after;
    let cut_largest_move = cut_largest_move.max(largest_after);
    let (ground_vertices_moved, ground_largest_move) = match params.mirrors.ground {
        Some(g) => snap_border_to_plane(&mut mesh, plane_tol, |p| &mut p.z, g),
        None => (0, 0.0),
    };
    let thin = crate::thin::thin_parts(&mesh);
    let reasons = crate::wrap::reasons(&mesh, &params.mirrors, &params.wrap, plane_tol);
    let (mesh, wrap) = if reasons.any() {
        crate::stage::starting(|| format!("wrapping {} facets into one outer surface", mesh.len()));
        let (m, r) = crate::wrap::wrap(&mesh, &params.mirrors, reasons, &params.wrap);
        if m.is_empty() {
            return Err(MeshError::NothingInside { cell: r.cell });
        }
        (m, Some(r))
    } else {
        (mesh, None)
    };
    // A half to run whole stays a half through the coarsening, which
    // then mirrors its panels (`Repaired::panels`): both sides panelled
    // alike, twice the half's count (mirrored before it, a review's van
    // was panelled 868 and 882 to a side, on half the count asked, and
    // read 28 counts apart at yaw +5 and -5 degrees).
    let params = if whole.whole_from_half {
        &whole
    } else {
        params
    };
    // A wrapped half model's surface facing the symmetry plane from close
    // by, and its whole area, measured here before the coarsening (for the
    // slot warning below).
    let slot = wrap
        .as_ref()
        .filter(|_| params.mirrors.symmetry)
        .map(|w| (facing_the_plane(&mesh, 2.0 * w.cell), mesh.area(), w.cell));
    // For the whole body when it runs whole.
    let suggested = suggest(&mesh, if whole.whole_from_half { 2.0 } else { 1.0 });
    let mirrors = MirrorReport {
        ground: params.mirrors.ground,
        symmetry: params.mirrors.symmetry,
        cut_vertices_moved,
        cut_largest_move,
        ground_vertices_moved,
        ground_largest_move,
        whole_cut,
        halves,
        off_centre,
        mirrored_half,
    };
    Ok(Repaired {
        params: *params,
        mesh,
        parts: Parts {
            read,
            mirrored_whole: whole.whole_from_half,
            mirrored_half,
            mirrors,
            caps,
            repair,
            capped_half,
            wrap,
            slot,
            suggested,
            thin,
        },
    })
}

impl Repaired {
    /// The rest of [`prepare_mesh`]: coarsen the body to `target_panels`
    /// (the suggested count when `None`; never refined), check the panels
    /// and report every step, as a [`prepare_mesh`] asked for that count
    /// would.
    ///
    /// # Errors
    /// [`MeshError::SelfCrossing`] when the panels pass through their own
    /// surface, and the coarsening's and panel building's errors.
    pub fn panels(
        &self,
        target_panels: Option<usize>,
    ) -> Result<(PanelMesh, PrepareReport), MeshError> {
        let params = &PrepareParams {
            target_panels,
            ..self.params
        };
        // A half to run whole is coarsened as a half model with its plane
        // to the count asked (a half model's, as a case gives it) and its
        // panels mirrored: twice that count runs.
        let halves = if params.whole_from_half { 2 } else { 1 };
        let half_target = target_panels.unwrap_or_else(|| self.parts.suggested.div_ceil(halves));
        let target = halves * half_target;
        let mirrors = Mirrors {
            symmetry: params.mirrors.symmetry || params.whole_from_half,
            ..params.mirrors
        };
        let (mesh, mut coarsen) = if self.mesh.len() > half_target {
            let cp = CoarsenParams {
                target_panels: half_target,
                ..params.coarsen
            };
            crate::stage::starting(|| {
                format!(
                    "coarsening {} facets to {half_target} panels",
                    self.mesh.len()
                )
            });
            let (m, mut r) = coarsen_with_params(&self.mesh, &mirrors, &cp);
            refuse_failed_coarsening(&r, self.parts.wrap.as_ref().map(|w| w.cell))?;
            // Parts smaller than the panels can vanish whole (a review's
            // 24 mm blob over a scan's roof got no panel and no word,
            // its thin-part warning saying the flow round it was in).
            let parts = |m: &TriMesh| {
                let mut ids = crate::crossing::surfaces(m);
                ids.sort_unstable();
                ids.dedup();
                ids.len()
            };
            r.parts_lost = parts(&self.mesh).saturating_sub(parts(&m));
            (m, Some(r))
        } else {
            (self.mesh.clone(), None)
        };
        let mesh = if params.whole_from_half {
            let tol = params.repair.plane_tolerance * self.parts.repair.diagonal;
            let whole = crate::mirror::whole_from_half(&mesh, tol);
            // The report counts the panels that run, the whole body's.
            if let Some(c) = coarsen.as_mut() {
                c.input_panels *= 2;
                c.target_panels = target;
                c.achieved_panels = whole.len();
                c.largest_try *= 2;
            }
            whole
        } else {
            mesh
        };
        panel_and_report(mesh, coarsen, params, self.parts.clone())
    }
}

/// What [`panel_and_report`] reports of the steps before the coarsening.
#[derive(Debug, Clone)]
struct Parts {
    read: Option<StlReport>,
    mirrored_whole: bool,
    mirrored_half: bool,
    mirrors: MirrorReport,
    caps: Option<(usize, f64)>,
    repair: RepairReport,
    capped_half: Option<String>,
    wrap: Option<WrapReport>,
    slot: Option<((f64, [f64; 3]), f64, f64)>,
    suggested: usize,
    thin: Vec<crate::thin::PartSize>,
}

/// Check the coarsened mesh, build its panels and the whole report.
fn panel_and_report(
    mesh: TriMesh,
    coarsen: Option<CoarsenReport>,
    params: &PrepareParams,
    parts: Parts,
) -> Result<(PanelMesh, PrepareReport), MeshError> {
    let Parts {
        read,
        mirrored_whole,
        mirrored_half,
        mirrors,
        caps,
        repair,
        capped_half,
        wrap,
        slot,
        suggested,
        thin,
    } = parts;
    crate::stage::starting(|| format!("checking {} panels", mesh.len()));
    let local_crossing = refuse_self_crossing(&mesh)?;
    let panels = PanelMesh::new(mesh, params.mirrors)?;
    let (panels, recut) = recut_fans(panels)?;
    let (lo, hi) = panels.bounds();
    let coarsened = coarsen.is_some();
    let folded = local_crossing.is_some();
    let quality = {
        let mut q = quality(&panels);
        if let Some((faces, added)) = recut {
            q.notes.push(format!(
                "{faces} flat {} meeting the wind, cut as a fan of thin triangles from one corner (as CAD \
                 exporters cut flat faces, and as the coarsening keeps them), {} re-cut in {} \
                 rings ({added} panels more): a fan's panels each reach the face's sharp rim, and their \
                 velocity leans on the panels round it (a test flat face meeting the wind read Cp \
                 -0.16 as a fan and +0.81 cut in rings)",
                if faces == 1 { "face" } else { "faces" },
                if faces == 1 { "was" } else { "were" },
                FAN_RINGS.len() + 1
            ));
        }
        if coarsened {
            q.grading_as_notes(GRADING_NOTE_SHARE);
        }
        if let Some(w) = local_crossing {
            q.add_warning(w);
        }
        if let Some(c) = coarsen
            .as_ref()
            .filter(|c| c.achieved_panels as f64 > COARSEN_SHORTFALL * c.target_panels as f64)
        {
            q.add_warning(format!(
                "the coarsening could not reach {} panels and the run uses {} ({}): it costs more time \
                 and memory; thin parts or parts nearly touching each other usually cause this (tuft \
                 check --save-panels writes the panels to look at)",
                c.target_panels,
                c.achieved_panels,
                c.fallback.as_deref().unwrap_or("no try passed the checks")
            ));
        }
        let lost = coarsen.as_ref().map_or(0, |c| c.parts_lost);
        if lost > 0 {
            q.add_warning(lost_parts_warning(lost, &thin));
        } else if let Some(w) = thin_part_warning(&thin, &panels) {
            q.add_warning(w);
        }
        if let Some((n, area)) = caps {
            q.notes.push(format!(
                "the half model was closed on its symmetry plane y = 0 by {n} facets ({area:.2} m^2): \
                 they were removed, since the mirror image closes the cut (kept, they would be a wall \
                 across the middle of the mirrored body)"
            ));
        }
        if repair.weld_widened > 1.0 {
            let why = if repair.open_before_widening > crate::repair::MOSTLY_OPEN {
                "the STL's facets did not share their corners (each written apart, most edges open)"
                    .to_string()
            } else {
                format!(
                    "a few of the STL's corners only nearly met ({:.2} % of the edges were left open by \
                     the usual weld)",
                    100.0 * repair.open_before_widening
                )
            };
            q.notes.push(format!(
                "{why}: corners within {:.2} mm were welded, {:.0} times the usual tolerance; if the body \
                 has real detail finer than that, export it with shared vertices",
                1000.0 * repair.weld_tolerance,
                repair.weld_widened
            ));
        }
        if let Some(layers) = crate::repair::describe_layers(&repair.layers) {
            q.notes.push(layers);
        }
        if mirrored_whole {
            q.notes.push(MIRRORED_WHOLE_NOTE.to_owned());
        }
        match params
            .axes
            .places_note(params.mirrors.symmetry || mirrored_whole, mirrored_half)
        {
            Some(note) => q.notes.push(note),
            None if mirrored_half => q.notes.push(MIRRORED_HALF_NOTE.to_owned()),
            None => {}
        }
        if let Some(r) = &read {
            q.notes.extend(read_notes(r));
            if r.trailing_bytes >= 50 {
                q.add_warning(format!(
                    "{} bytes after the STL's last facet were ignored: they are neither facets of this \
                     body nor a binary STL joined after it, so a part may be missing from the body (tuft \
                     check gives the facets read); export the file again if it should hold more",
                    r.trailing_bytes
                ));
            }
            if r.endsolid_missing {
                q.add_warning(format!(
                    "the ASCII STL ends after facet {} without its closing endsolid line: if the export \
                     was cut short, part of the body is missing (tuft check gives the facets read); export \
                     the file again to be sure",
                    r.facets
                ));
            }
        }
        if let Some(c) = &mirrors.whole_cut {
            q.notes.push(c.describe());
            if c.differs() {
                q.add_warning(format!(
                    "the whole body was cut at y = 0 and its y >= 0 half run, but the halves differ by up \
                     to {:.0} mm: the run is of that half mirrored, not of the body as scanned (run it \
                     whole, half_model = false, to see both sides)",
                    1000.0 * c.largest_difference
                ));
            }
        }
        if let Some((slot, area, cell)) = slot
            && slot.0 > SLOT_SHARE * area
        {
            q.add_warning(format!(
                "the wrap left {:.2} m^2 of surface facing the symmetry plane within {:.0} mm of it \
                 (near x {:.3}, z {:.3} m): a slot along the centre plane inside parts that pass \
                 into each other, which the body does not have; run the whole body \
                 (half_model = false) to check the numbers there",
                slot.0,
                2000.0 * cell,
                slot.1[0],
                slot.1[2]
            ));
        }
        if let Some(w) = &wrap {
            q.notes.push(w.describe());
            if let Some(lost) = w.lost_warning() {
                q.add_warning(lost);
            }
            if let Some(open) = w.open_warning() {
                q.add_warning(open);
            }
        }
        if let Some(far) = crate::quality::detached_part_warning(&panels) {
            q.add_warning(far);
        }
        if let Some(w) = upright_warning(lo, hi, params) {
            q.add_warning(w);
        }
        if let Some(w) = capped_half {
            q.add_warning(w);
        }
        let up_axis = up_axis_warning(&panels, params);
        let wrong_up = up_axis.is_some();
        if let Some(w) = up_axis {
            q.add_warning(w);
        }
        // A y-up body read as z up has no centre line to turn.
        if !params.mirrors.symmetry
            && !wrong_up
            && let Some(w) = turned_warning(&panels)
        {
            q.add_warning(w);
        }
        q
    };
    let report = PrepareReport {
        read,
        units: params.units,
        transformed: params.transform.is_some() || !params.axes.is_identity() || mirrored_half,
        axes: params.axes,
        mirrors,
        repair,
        wrap,
        suggested_panels: suggested,
        coarsen,
        folded,
        quality,
        panels: panels.len(),
        area: panels.area(),
        bounds: [[lo.x, lo.y, lo.z], [hi.x, hi.y, hi.z]],
    };
    Ok((panels, report))
}

/// Share of a wrapped half model's area that may face the symmetry plane
/// from close by before it is warned about (our choice: 0.1 %).
pub const SLOT_SHARE: f64 = 1e-3;

/// Area of `mesh`'s facets within `reach` of the symmetry plane y = 0
/// whose outward normal points at it (within 25 degrees of -y), and the
/// centroid of the largest: with the mirror image in y = 0 such a facet
/// bounds a slot of no real thickness along the centre plane. A review's
/// whole SUV with a roof box sunk into its roof, cut at y = 0 and wrapped,
/// had 0.26 m^2 of them 2 to 8 mm off the plane inside the box (the same
/// half cut by hand had none): the repair's weld had moved the box's cut
/// 0.2 micrometres off the plane, and the wrap's grid lines in the plane
/// passed between it and its image. [`snap_border_to_plane`] after the repair
/// removed that cause; the check stays as a safety net for any other.
fn facing_the_plane(mesh: &TriMesh, reach: f64) -> (f64, [f64; 3]) {
    let mut total = 0.0;
    let mut largest = (0.0, [0.0; 3]);
    for t in 0..mesh.len() {
        let c = mesh.corners(t);
        let centroid = Point::from((c[0].coords + c[1].coords + c[2].coords) / 3.0);
        let a = mesh.area_vector(t);
        let area = a.norm();
        if centroid.y < reach && area > 0.0 && -a.y / area > 25f64.to_radians().cos() {
            total += area;
            if area > largest.0 {
                largest = (area, [centroid.x, centroid.y, centroid.z]);
            }
        }
    }
    (total, largest.1)
}

/// Most panels a kept input may have and still be run (with the
/// coarsening's warning) rather than refused: a few times the usual
/// counts, which the run's memory estimate still handles (a small file
/// whose coarsening failed had run before the refusal came in, and should
/// still; our choice).
pub const KEPT_INPUT_RUNS: usize = 20_000;

/// A coarsening that kept its whole input, far above the target and above
/// [`KEPT_INPUT_RUNS`], stops
/// the run with the cause and the place: running a scan's half million
/// facets would ask for tens of gigabytes, and the memory advice that
/// followed (fewer panels) could not help, since fewer had been asked for.
/// `wrap_cell`: the wrap's cell edge, m, when the surface coarsened is the
/// wrap's (its folds are then the wrap's, not the input's: a review's 6
/// mm windscreen meeting its cowl at a shallow angle gave 1.9 million
/// folded facets on a clean CAD export, and the advice had blamed a
/// scan's noise).
fn refuse_failed_coarsening(r: &CoarsenReport, wrap_cell: Option<f64>) -> Result<(), MeshError> {
    let far_above = (r.achieved_panels as f64) > COARSEN_SHORTFALL * r.target_panels as f64;
    if !r.kept_input || !far_above || r.achieved_panels <= KEPT_INPUT_RUNS {
        return Ok(());
    }
    let why = r
        .first_refusal
        .clone()
        .unwrap_or_else(|| "no try passed the checks".to_string());
    let advice = match r.untangled.as_ref().filter(|u| u.folded_after > 0) {
        Some(u) => {
            let [x, y, z] = u.still_folded_at.unwrap_or(u.first);
            if let Some(cell) = wrap_cell {
                return Err(MeshError::CoarseningFailed {
                    target: r.target_panels,
                    input: r.input_panels,
                    largest_try: r.largest_try,
                    why,
                    advice: format!(
                        "the wrapped surface's facets fold over one another there ({} facets crossed \
                         others or were turned over against their neighbours, and {} are still folded \
                         after smoothing, the first near x {x:.3}, y {y:.3}, z {z:.3} m), as where a part \
                         thinner than about two of the wrap's {:.0} mm cells meets another at a shallow \
                         angle (a thin windscreen on its cowl, a lip on a bumper): thicken that part there \
                         to {:.0} mm or more, or leave it out of the STL, and check it again",
                        u.folded_before,
                        u.folded_after,
                        1000.0 * cell,
                        2000.0 * cell
                    ),
                });
            }
            format!(
                "the input's facets fold over one another there ({} facets crossed others or were \
                 turned over against their neighbours, and {} are still folded after smoothing, the \
                 first near x {x:.3}, y {y:.3}, z {z:.3} m), as where a scan's noise is larger than \
                 its facets: smooth or remesh the STL around that point (a scan tool's remesh or \
                 smoothing of that area) and check it again; another panel count (--panels, \
                 geometry.panels) may also pass",
                u.folded_before, u.folded_after
            )
        }
        None => "look at the STL near that point (thin parts, or parts nearly touching each other, \
                 usually cause this) and thicken, separate or remesh them there; another panel count \
                 (--panels, geometry.panels) may also pass"
            .to_string(),
    };
    Err(MeshError::CoarseningFailed {
        target: r.target_panels,
        input: r.input_panels,
        largest_try: r.largest_try,
        why,
        advice,
    })
}

/// Share of the body's side (its length by its height) that one flat face
/// facing away from the body across the plane y = 0, at the body's edge
/// nearest it, must cover to be taken for a half model's cut capped flat
/// (our choice: a car's centre section fills about three quarters of its
/// side box).
pub const CAP_SHARE: f64 = 0.3;

/// The flat face on the side of the body nearest y = 0 (`side` -1: the
/// least y, facing -y; +1: the greatest, facing +y): the facets with every
/// corner within `tol` of that y and facing that way, when they cover
/// [`CAP_SHARE`] of the side box. Returns that y, the area and the facets.
fn flat_side(mesh: &TriMesh, side: f64, tol: f64) -> Option<(f64, f64, Vec<usize>)> {
    let (lo, hi) = mesh.bounds()?;
    let edge = if side < 0.0 { lo.y } else { hi.y };
    let facets: Vec<usize> = (0..mesh.len())
        .filter(|&t| {
            let a = mesh.area_vector(t);
            mesh.triangles[t]
                .iter()
                .all(|&v| (mesh.vertices[v as usize].y - edge).abs() <= tol)
                && side * a.y > 0.99 * a.norm()
        })
        .collect();
    let area: f64 = facets.iter().map(|&t| mesh.area_vector(t).norm()).sum();
    (area >= CAP_SHARE * (hi.x - lo.x) * (hi.z - lo.z)).then_some((edge, area, facets))
}

/// A half model closed by a flat face parallel to the symmetry plane and
/// a little off it: within [`CUT_TOLERANCE`] its vertices are moved onto
/// y = 0 (where [`drop_symmetry_caps`] drops the face, as an open cut's
/// border is moved by [`snap_to_cut`]); further, within the distance at
/// which an open cut's rim is named as off the plane, refused, since the
/// mirror image would leave a slot twice as wide down the middle (a
/// review's capped halves 2 to 12 mm off y = 0 ran without a word). How
/// many vertices moved and the largest move.
fn snap_cap_to_plane(
    mesh: &mut TriMesh,
    params: &PrepareParams,
) -> Result<(usize, f64), MeshError> {
    let Some((lo, hi)) = mesh.bounds().filter(|_| params.mirrors.symmetry) else {
        return Ok((0, 0.0));
    };
    let diagonal = (hi - lo).norm();
    let tol = params.repair.plane_tolerance * diagonal;
    if lo.y <= tol {
        return Ok((0, 0.0));
    }
    let Some((y, area, facets)) = flat_side(mesh, -1.0, tol) else {
        return Ok((0, 0.0));
    };
    let moved = CUT_TOLERANCE * diagonal;
    if y > moved {
        return if y <= crate::repair::OFF_PLANE_TOLERANCES * tol {
            Err(MeshError::CapOffSymmetryPlane { y, area, moved })
        } else {
            Ok((0, 0.0))
        };
    }
    let mut vertices: Vec<u32> = facets.iter().flat_map(|&t| mesh.triangles[t]).collect();
    vertices.sort_unstable();
    vertices.dedup();
    let mut largest = 0.0f64;
    for &v in &vertices {
        let p = &mut mesh.vertices[v as usize];
        largest = largest.max(p.y.abs());
        p.y = 0.0;
    }
    Ok((vertices.len(), largest))
}

/// A warning when a body run whole lies on one side of y = 0 with that
/// side one flat face on the plane: a half model exported with its cut
/// capped and not declared (a review's ran whole at half its width without
/// a word).
fn undeclared_cap_warning(mesh: &TriMesh, params: &PrepareParams) -> Option<String> {
    if params.mirrors.symmetry {
        return None;
    }
    let (lo, hi) = mesh.bounds()?;
    let diagonal = (hi - lo).norm();
    let tol = params.repair.plane_tolerance * diagonal;
    // As far off as an open cut's rim is named as a declared plane's.
    let near = crate::repair::OFF_PLANE_TOLERANCES * tol;
    let side = if lo.y.abs() <= near {
        -1.0
    } else if hi.y.abs() <= near {
        1.0
    } else {
        return None;
    };
    let (y, area, _) = flat_side(mesh, side, tol)?;
    let moved = CUT_TOLERANCE * diagonal;
    Some(format!(
        "the body lies wholly in y {} 0 and its side nearest the plane is one flat face of {area:.2} m^2, \
         {:.1} mm off y = 0: if it is a half model exported with its cut capped, declare the symmetry \
         plane (geometry.half_model = true, --half: a cap within {:.1} mm of y = 0 is then dropped and \
         the mirror image closes the cut; one further off must be moved onto y = 0 in the modeller \
         first), or it runs as a body half as wide; a whole body with a flat side there runs as it is",
        if side < 0.0 { ">=" } else { "<=" },
        1000.0 * y.abs(),
        1000.0 * moved
    ))
}

/// With a symmetry plane declared, drop the facets lying in it (every
/// corner within the repair's plane tolerance of y = 0): a half model
/// exported closed, its cut capped by a flat face, which the mirror image
/// closes anyway; kept, the cap is a wall across the middle of the
/// mirrored body, with flow on both its faces (a review's capped half
/// read C_D 0.187 against 0.228 open, and 36 % separated against 11 %).
/// The count and area dropped, when they cover more than
/// [`CAP_NOTE_SHARE`] of the surface: slivers a cut of a scan leaves in
/// the plane are dropped without a word (a review's scan of 706,021
/// facets, cut to a half, had been told that 2,715 facets of 0.00 m^2
/// closed it).
fn drop_symmetry_caps(mesh: &mut TriMesh, params: &PrepareParams) -> Option<(usize, f64)> {
    let (lo, hi) = mesh.bounds().filter(|_| params.mirrors.symmetry)?;
    let tol = params.repair.plane_tolerance * (hi - lo).norm();
    let in_plane = |t: &[u32; 3]| t.iter().all(|&v| mesh.vertices[v as usize].y.abs() <= tol);
    let caps: Vec<usize> = (0..mesh.len())
        .filter(|&t| in_plane(&mesh.triangles[t]))
        .collect();
    if caps.is_empty() {
        return None;
    }
    let area: f64 = caps.iter().map(|&t| mesh.area_vector(t).norm()).sum();
    let mut k = 0;
    mesh.triangles.retain(|_| {
        let keep = caps.binary_search(&k).is_err();
        k += 1;
        keep
    });
    (area > CAP_NOTE_SHARE * mesh.area()).then_some((caps.len(), area))
}

/// Share of the surface the facets dropped from the symmetry plane must
/// cover to be reported ([`drop_symmetry_caps`]; our choice: a half
/// model's cap is its cross-section, several per cent of the surface).
const CAP_NOTE_SHARE: f64 = 1e-3;

/// Move a half model's vertices within [`CUT_TOLERANCE`] of `y = 0` onto
/// it when they lie on an open border or below the plane; how many moved
/// and the largest move (metres). Run before the repair, so that its cut
/// is taken as closed by the mirror ([`snap_border_to_plane`] puts it
/// back on the plane after the repair).
fn snap_to_cut(mesh: &mut TriMesh, mirrors: &Mirrors) -> (usize, f64) {
    let Some((lo, hi)) = mesh.bounds().filter(|_| mirrors.symmetry) else {
        return (0, 0.0);
    };
    let tol = CUT_TOLERANCE * (hi - lo).norm();
    let mut border = vec![false; mesh.vertices.len()];
    let uses = crate::repair::edges::sorted_edge_uses(&mesh.triangles);
    for group in crate::repair::edges::edge_groups(&uses) {
        if group.len() == 1 {
            let (a, b) = group[0].ends();
            border[a as usize] = true;
            border[b as usize] = true;
        }
    }
    let (mut moved, mut largest) = (0, 0.0f64);
    for (v, on_border) in mesh.vertices.iter_mut().zip(border) {
        let close = v.y.abs() <= tol && v.y != 0.0;
        if close && (on_border || v.y < 0.0) {
            largest = largest.max(v.y.abs());
            moved += 1;
            v.y = 0.0;
        }
    }
    (moved, largest)
}

/// Move the vertices of the open edges lying on a mirror plane (both ends
/// within `tol` metres of `plane` in the coordinate `coordinate` picks:
/// the edges the repair took as closed by the mirror's image) onto it; how
/// many moved and the largest move (metres). Run after the repair: a
/// border a hair off its plane let the wrap's grid lines in the plane pass
/// between it and its image (the slot along y = 0 inside a roof box; a
/// body cut at the floor that the wrap closed just above the ground). A
/// border a hair below the ground was counted right; it is moved as well,
/// so that the image closes the body exactly. Only whole border edges on
/// the plane move, by at most `tol`.
fn snap_border_to_plane(
    mesh: &mut TriMesh,
    tol: f64,
    coordinate: fn(&mut Point) -> &mut f64,
    plane: f64,
) -> (usize, f64) {
    let mut on_plane = vec![false; mesh.vertices.len()];
    let uses = crate::repair::edges::sorted_edge_uses(&mesh.triangles);
    for group in crate::repair::edges::edge_groups(&uses) {
        if group.len() == 1 {
            let (a, b) = group[0].ends();
            let near = |v: u32| {
                let mut p = mesh.vertices[v as usize];
                (*coordinate(&mut p) - plane).abs() <= tol
            };
            if near(a) && near(b) {
                on_plane[a as usize] = true;
                on_plane[b as usize] = true;
            }
        }
    }
    let (mut moved, mut largest) = (0, 0.0f64);
    for (v, on) in mesh.vertices.iter_mut().zip(on_plane) {
        let c = coordinate(v);
        if on && *c != plane {
            largest = largest.max((*c - plane).abs());
            moved += 1;
            *c = plane;
        }
    }
    (moved, largest)
}

/// A crossing panel longer than this many typical panel edges (the
/// root-mean area's side) means the surface passes through itself at the
/// body's scale (a fan of facets through the body), not in a local fold.
pub const CROSSING_SPAN: f64 = 4.0;

/// The panels must not pass through their own surface at the body's
/// scale: refused, since the body then has no single inside and the whole
/// solution is meaningless. Crossings between panels of ordinary size (a
/// scan's local fold where two surfaces nearly touch) spoil only the
/// pressure near them: returned as a warning naming where. Two overlapping
/// bodies are left alone: each still has an inside.
fn refuse_self_crossing(mesh: &TriMesh) -> Result<Option<String>, MeshError> {
    let found: Vec<_> = crossings(mesh)
        .into_iter()
        .filter(|c| c.same_surface)
        .collect();
    let Some(first) = found.first() else {
        return Ok(None);
    };
    let typical = (2.0 * mesh.area() / mesh.len().max(1) as f64).sqrt();
    let longest = |t: usize| {
        let tri = mesh.corners(t);
        (0..3)
            .map(|k| (tri[(k + 1) % 3] - tri[k]).norm())
            .fold(0.0, f64::max)
    };
    let spans = |c: &&crate::crossing::Crossing| {
        longest(c.facet).max(longest(c.other)) > CROSSING_SPAN * typical
    };
    if let Some(c) = found.iter().find(spans) {
        return Err(MeshError::SelfCrossing {
            facet: c.facet,
            other: c.other,
            point: c.point,
            pairs: found.len(),
        });
    }
    let [x, y, z] = first.point;
    Ok(Some(format!(
        "{} pairs of panels cross each other (the first near x {x:.3}, y {y:.3}, z {z:.3} m): the surface \
         folds through itself there, as where two parts of a scan nearly touch; pressures and separation \
         near that point are unreliable",
        found.len()
    )))
}

/// Suggested count for the surface solved: a half model run whole counts
/// its area `copies` (2) times before the count is rounded, so that it
/// reads the whole body's count (doubling a rounded half had read 6,000
/// where the whole body read 6,500).
fn suggest(mesh: &TriMesh, copies: f64) -> usize {
    let Some((lo, hi)) = mesh.bounds() else {
        return 0;
    };
    let length = (hi - lo).max();
    suggested_panels(copies * mesh.area(), length)
}

/// A half model must lie in `y >= 0`, a grounded body above the ground
/// but for [`WrapParams::max_ground_depth`] of its height (tyres pressed
/// into the floor; the wrap cuts them there).
fn check_mirror_sides(mesh: &TriMesh, params: &PrepareParams) -> Result<(), MeshError> {
    let Some((lo, hi)) = mesh.bounds() else {
        return Ok(());
    };
    let tol = params.repair.plane_tolerance * (hi - lo).norm();
    let mirrors = &params.mirrors;
    if mirrors.symmetry && lo.y < -tol {
        return Err(MeshError::AcrossSymmetryPlane {
            y: lo.y,
            moved: CUT_TOLERANCE * (hi - lo).norm(),
        });
    }
    let allowed = mirrors
        .ground
        .map_or(0.0, |g| params.wrap.max_ground_depth * (hi.z - g).max(0.0));
    if let Some(h) = mirrors.ground
        && lo.z < h - tol - allowed
    {
        return Err(MeshError::BelowGround {
            z: lo.z,
            ground: h,
            allowed,
            top: hi.z,
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::coarsen::UntangleReport;

    /// A long body turned 2 degrees about the vertical is warned about with
    /// its angle; the same body along x is not.
    #[test]
    fn a_body_turned_off_the_x_axis_is_warned_about() {
        let body = |deg: f64| {
            let mut m = crate::generate::icosphere(1.0, 4);
            let (s, c) = deg.to_radians().sin_cos();
            m.map_vertices(|p| {
                let (x, y) = (2.25 * p.x, 0.9 * p.y);
                Point::new(c * x - s * y, s * x + c * y, 0.6 * p.z)
            });
            PanelMesh::new(m, Mirrors::none()).unwrap()
        };
        assert!(turned_warning(&body(0.0)).is_none());
        // A part on one side only (a door mirror 0.2 m proud, over a tenth
        // of the length) moves one slice, not the line.
        let mut mirror = crate::generate::icosphere(1.0, 4);
        mirror.map_vertices(|p| {
            let bump = if p.y > 0.3 && (-0.5..-0.3).contains(&p.x) {
                0.2
            } else {
                0.0
            };
            Point::new(2.25 * p.x, 0.9 * p.y + bump, 0.6 * p.z)
        });
        assert!(turned_warning(&PanelMesh::new(mirror, Mirrors::none()).unwrap()).is_none());
        // The slices' mid-widths read a rounded body's turn low (1.5 degrees
        // here; a review's boxy coupe turned 2 read 2.0).
        let w = turned_warning(&body(2.0)).unwrap();
        let deg: f64 = w["the body's centre line runs about ".len()..]
            .split(' ')
            .next()
            .unwrap()
            .parse()
            .unwrap();
        assert!((1.0..=2.5).contains(&deg), "{w}");
    }

    /// A y-up car read as z up is symmetric top to bottom and lopsided
    /// side to side (a car's bulk sits low: the demo coupe's volume centre
    /// lies 8.8 % of its height below its box's middle, and 0.0 % across);
    /// the coupe itself, an ellipsoid and a box are not warned about.
    /// Parts thinner than two panel edges are warned about, thinnest
    /// named; thicker ones are not.
    #[test]
    fn parts_thinner_than_two_panels_are_warned_about() {
        use crate::thin::PartSize;
        // A unit icosphere at level 3: 1,280 panels, edges about 0.15 m.
        let panels = PanelMesh::new(crate::generate::icosphere(1.0, 3), Mirrors::none()).unwrap();
        let part = |thickness: f64| PartSize {
            thickness,
            centre: [0.5, 0.0, 1.2],
        };
        let w = thin_part_warning(&[part(0.03), part(0.05), part(0.5)], &panels).unwrap();
        assert!(
            w.starts_with("2 parts of the STL are thinner than two of the panels' edges (")
                && w.contains("the thinnest 30 mm, near x 0.50, y 0.00, z 1.20 m")
                && w.contains("not in the results"),
            "{w}"
        );
        // Between one and two edges, a panel or two spans it: rough.
        let w = thin_part_warning(&[part(0.22)], &panels).unwrap();
        assert!(
            w.contains("a panel or two spans") && !w.contains("not in the results"),
            "{w}"
        );
        assert_eq!(thin_part_warning(&[part(0.5)], &panels), None);
        assert_eq!(thin_part_warning(&[], &panels), None);
    }

    #[test]
    fn a_car_read_with_y_up_is_warned_about() {
        let coupe = crate::generate::coupe(28.0, 3000).unwrap();
        let panels = |m: &TriMesh| PanelMesh::new(m.clone(), Mirrors::none()).unwrap();
        let plain = PrepareParams::default();
        assert!(up_axis_warning(&panels(&coupe), &plain).is_none());
        let mut on_side = coupe.clone();
        on_side.map_vertices(|p| Point::new(p.x, p.z, -p.y));
        let w = up_axis_warning(&panels(&on_side), &plain).unwrap();
        assert!(w.contains("set geometry.up = \"y\""), "{w}");
        let (across, up) = centroid_offsets(&panels(&coupe)).unwrap();
        assert!(across.abs() < 1e-3 && up < -0.03, "{across} {up}");
        let ellipsoid = crate::generate::ellipsoid(2.0, 0.9, 0.6, 2000).unwrap();
        assert!(up_axis_warning(&panels(&ellipsoid), &plain).is_none());
    }

    /// A car read with the wrong up axis stands taller than wide; a car, a
    /// high-roof van and a half model (its width doubled) do not.
    #[test]
    fn a_body_on_its_side_is_warned_about() {
        let body = |w: f64, h: f64| (Point::new(0.0, -w / 2.0, 0.0), Point::new(4.5, w / 2.0, h));
        let plain = PrepareParams::default();
        let (lo, hi) = body(1.18, 1.85);
        let w = upright_warning(lo, hi, &plain).unwrap();
        assert!(w.contains("set geometry.up = \"y\""), "{w}");
        let (lo, hi) = body(1.85, 1.18);
        assert!(upright_warning(lo, hi, &plain).is_none());
        let (lo, hi) = body(2.0, 2.7);
        assert!(upright_warning(lo, hi, &plain).is_none());
        // A double-decker bus, 11 m long: tall, not on its side.
        let bus = (Point::new(0.0, -1.275, 0.0), Point::new(11.0, 1.275, 4.0));
        assert!(upright_warning(bus.0, bus.1, &plain).is_none());
        let half = PrepareParams {
            mirrors: Mirrors {
                symmetry: true,
                ..Mirrors::none()
            },
            ..PrepareParams::default()
        };
        let (lo, hi) = (Point::new(0.0, 0.0, 0.0), Point::new(4.5, 0.93, 1.2));
        assert!(upright_warning(lo, hi, &half).is_none());
        let y_up = PrepareParams {
            axes: crate::FileAxes {
                nose_plus_x: false,
                y_up: true,
            },
            ..PrepareParams::default()
        };
        let (lo, hi) = body(1.18, 1.85);
        assert!(
            upright_warning(lo, hi, &y_up)
                .unwrap()
                .contains("drop geometry.up")
        );
    }

    /// A facet a few millimetres off the symmetry plane facing it counts;
    /// one facing away, or far from the plane, does not.
    #[test]
    fn facets_facing_the_plane_from_close_by_are_found() {
        let v = |x: f64, y: f64, z: f64| Point::new(x, y, z);
        let mesh = TriMesh::new(
            vec![
                v(0.0, 0.005, 0.0),
                v(0.0, 0.005, 1.0),
                v(1.0, 0.005, 0.0),
                v(0.0, 0.5, 0.0),
                v(0.0, 0.5, 1.0),
                v(1.0, 0.5, 0.0),
            ],
            // Facing -y at y = 0.005, facing +y there, facing -y at 0.5.
            vec![[0, 1, 2], [0, 2, 1], [3, 4, 5]],
        )
        .unwrap();
        let (area, at) = facing_the_plane(&mesh, 0.02);
        assert!((area - 0.5).abs() < 1e-12, "{area}");
        assert!((at[1] - 0.005).abs() < 1e-12);
    }

    fn kept(untangled: Option<UntangleReport>) -> CoarsenReport {
        CoarsenReport {
            input_panels: 503_089,
            target_panels: 7000,
            achieved_panels: 503_089,
            locked_vertices: 0,
            max_deviation: 0.0,
            rms_deviation: 0.0,
            samples: 0,
            fallback: Some("the repaired mesh was kept uncoarsened".to_string()),
            relaxed: 0,
            untangled,
            kept_input: true,
            first_refusal: Some("an edge is shared by 4 panels at (-4.400, 0.008, 0.402) m".into()),
            largest_try: 28_000,
            parts_lost: 0,
        }
    }

    #[test]
    fn a_coarsening_that_kept_its_whole_input_stops_the_run_naming_the_cause_and_the_place() {
        let folds = UntangleReport {
            folded_before: 15_275,
            folded_after: 13,
            first: [-4.4, 0.009, 0.4],
            still_folded_at: Some([-4.396, -0.116, 0.389]),
            vertices_moved: 17_373,
            largest_move: 0.014,
            largest_offset: 0.01,
        };
        let Err(e) = refuse_failed_coarsening(&kept(Some(folds.clone())), None) else {
            panic!("a kept input far above the target must stop the run");
        };
        let text = e.to_string();
        for part in [
            "503089 facets down to 7000 panels",
            "up to 28000 panels",
            "an edge is shared by 4 panels at (-4.400, 0.008, 0.402) m",
            "13 are still folded",
            "near x -4.396, y -0.116, z 0.389 m",
            "smooth or remesh the STL",
        ] {
            assert!(text.contains(part), "{part:?} missing from: {text}");
        }
        assert!(!text.contains("GB"), "no memory advice: {text}");
        // On a wrapped surface the folds are the wrap's: the advice names
        // a thin part and the thickness the wrap resolves, not a scan.
        let text = refuse_failed_coarsening(&kept(Some(folds)), Some(0.01))
            .unwrap_err()
            .to_string();
        assert!(
            text.contains("the wrapped surface's facets fold over one another there")
                && text.contains("thinner than about two of the wrap's 10 mm cells")
                && text.contains("to 20 mm or more")
                && !text.contains("scan"),
            "{text}"
        );
        // Without folds left, the advice points at the place, not at folds.
        let text = refuse_failed_coarsening(&kept(None), None)
            .unwrap_err()
            .to_string();
        assert!(text.contains("look at the STL near that point"), "{text}");
        // A try that passed, or an input barely above the target, goes on.
        let passed = CoarsenReport {
            kept_input: false,
            achieved_panels: 14_000,
            ..kept(None)
        };
        assert!(refuse_failed_coarsening(&passed, None).is_ok());
        let close = CoarsenReport {
            input_panels: 7500,
            achieved_panels: 7500,
            ..kept(None)
        };
        assert!(refuse_failed_coarsening(&close, None).is_ok());
        // A small file far above its target but within what a run handles
        // (8,000 facets for 5,000 panels) runs, with the coarsening's
        // warning, as it did before the refusal came in.
        let small = CoarsenReport {
            input_panels: 8000,
            achieved_panels: 8000,
            target_panels: 5000,
            ..kept(None)
        };
        assert!(refuse_failed_coarsening(&small, None).is_ok());
    }
}
