//! Writing one run's results: tables, VTK files, pictures, summary, report.

use std::collections::BTreeMap;

use anyhow::{Context, Result};
use nalgebra::Point3;
use tuft_mesh::PanelMesh;
use tuft_solver::boundary_layer::FlowState;
use tuft_solver::offbody::FlowField;

use crate::case::Case;
use crate::geometry::Geometry;
use crate::outdir::Staging;
use crate::output::html::{NumberRow, Picture, Report, TextSection};
use crate::output::sheet::SurfaceField;
use crate::output::{
    self, Caption, PanelState, PointScalars, Slice, Streamlines, SurfaceResult, WakeSheets, csv,
    html, plot, sheet, slice, tufts, vtk,
};
use crate::pipeline::Computed;
use crate::planes::{Plane, Window};
use crate::progress::Progress;
use crate::summary::{
    CAUTION, CoefficientSet, DragEstimate, LiftKg, MeshFacts, ReferenceValues, SeparatedWakes,
    Separation, SolverFacts, Summary,
};

/// Per-panel fields in the shapes the writers take.
pub struct Fields {
    /// Momentum thickness.
    pub theta: Vec<f64>,
    /// Shape factor.
    pub shape_factor: Vec<f64>,
    /// Skin friction.
    pub cf: Vec<f64>,
    /// State.
    pub state: Vec<PanelState>,
    /// Risk.
    pub risk: Vec<f64>,
    /// How the separated regions were found (the loop's passes).
    pub separation_note: Option<String>,
    /// The dead water's pressure coefficient, which the separated panels
    /// hold after the separated-flow loop.
    pub dead_water_cp: Option<f64>,
    /// Panels whose pressure the loop holds beside a rim
    /// (`BoundaryLayer::rim_zone`); empty without the dead water's
    /// pressure.
    pub held: Vec<bool>,
}

impl Fields {
    /// Unpack the boundary layer.
    pub fn new(c: &Computed) -> Self {
        let l = &c.layer.panels;
        Self {
            theta: l.iter().map(|p| p.theta).collect(),
            shape_factor: l.iter().map(|p| p.h).collect(),
            cf: l.iter().map(|p| p.cf).collect(),
            state: l.iter().map(|p| panel_state(p.state)).collect(),
            risk: l.iter().map(|p| p.risk).collect(),
            dead_water_cp: c.wakes.as_ref().and_then(|w| w.dead_water_cp),
            held: if c.wakes.as_ref().is_some_and(|w| w.dead_water_cp.is_some()) {
                c.layer.rim_zone.clone()
            } else {
                Vec::new()
            },
            separation_note: c.wakes.as_ref().filter(|w| w.passes > 1).map(|w| {
                format!(
                    "Separated regions from the separated-flow loop ({}, {}).",
                    crate::output::plural(w.passes, "pass", "passes"),
                    if w.converged {
                        "converged"
                    } else {
                        "not converged"
                    }
                )
            }),
        }
    }

    /// The writers' view of a result.
    pub fn surface<'a>(&'a self, mesh: &'a PanelMesh, c: &'a Computed) -> SurfaceResult<'a> {
        SurfaceResult {
            mesh,
            cp: &c.surface_cp,
            velocity: &c.potential.velocity,
            theta: &self.theta,
            shape_factor: &self.shape_factor,
            cf: &self.cf,
            state: &self.state,
            risk: &self.risk,
            separation_note: self.separation_note.as_deref(),
            dead_water_cp: self.dead_water_cp,
            held: &self.held,
        }
    }
}

fn panel_state(s: FlowState) -> PanelState {
    match s {
        FlowState::Laminar => PanelState::Laminar,
        FlowState::Turbulent => PanelState::Turbulent,
        FlowState::Separated => PanelState::Separated,
        FlowState::Unresolved => PanelState::Unresolved,
    }
}

/// Write every output of a run into `out` and return the summary.
pub fn write_all(
    case: &Case,
    geo: &Geometry,
    c: &Computed,
    out: &Staging,
    progress: &mut Progress,
) -> Result<Summary> {
    let phase = progress.begin("outputs", "writing tables and VTK files");
    let mesh = &geo.mesh;
    let fields = Fields::new(c);
    let surface = fields.surface(mesh, c);
    let caption = Caption {
        case: case.name.clone(),
        speed_ms: case.file.flow.speed,
        yaw_deg: case.file.flow.yaw,
    };
    output::write_file(&out.file("panels.csv"), |w| csv::write_panels(w, &surface))?;
    crate::meshfile::write(&out.file(crate::meshfile::FILE), mesh)?;
    output::write_file(&out.file("surface.vtu"), |w| {
        vtk::write_surface(w, &surface)
    })?;
    let lines: Vec<Vec<Point3<f64>>> = c
        .layer
        .streamlines
        .iter()
        .map(|s| s.points.clone())
        .collect();
    // Each point carries the values of the panel its segment crosses (the
    // last point its last segment's), and whether the line has separated.
    let along = |f: &dyn Fn(usize) -> f64| -> Vec<Vec<f64>> {
        c.layer
            .streamlines
            .iter()
            .map(|l| {
                (0..l.points.len())
                    .map(|i| {
                        l.panels
                            .get(i.min(l.panels.len().saturating_sub(1)))
                            .map_or(f64::NAN, |&t| f(t as usize))
                    })
                    .collect()
            })
            .collect()
    };
    let separated: Vec<Vec<f64>> = c
        .layer
        .streamlines
        .iter()
        .map(|l| {
            let from = l.separated_at.unwrap_or(usize::MAX);
            (0..l.points.len())
                .map(|i| f64::from(u8::from(i >= from)))
                .collect()
        })
        .collect();
    let values = [
        along(&|t| surface.cp[t]),
        along(&|t| surface.shape_factor_at(t)),
        along(&|t| surface.risk[t]),
    ];
    let scalars = [
        PointScalars {
            name: "cp",
            values: &values[0],
        },
        PointScalars {
            name: "shape_factor",
            values: &values[1],
        },
        PointScalars {
            name: "risk",
            values: &values[2],
        },
        PointScalars {
            name: "separated",
            values: &separated,
        },
    ];
    let streamlines = Streamlines {
        lines: &lines,
        scalars: &scalars,
    };
    output::write_file(&out.file("streamlines.vtp"), |w| {
        vtk::write_streamlines(w, &streamlines)
    })?;
    if let Some(w) = c.wakes.as_ref().filter(|w| !w.wake.panels.is_empty()) {
        let sheets = WakeSheets {
            quads: &w.wake.panels,
            strength: &w.wake.strength,
        };
        output::write_file(&out.file("wake.vtu"), |f| vtk::write_wake(f, &sheets))?;
    }
    progress.end(phase, "");
    let phase = progress.begin("flow slices", "computing flow slices off the body");
    let planes = crate::planes::placed(&case.file.slices, mesh)?;
    let slices = flow_slices(mesh, c, &planes)?;
    progress.end(phase, "");
    let phase = progress.begin("pictures", "drawing pictures and the report");
    for s in &slices {
        output::write_file(&out.file(&format!("slice-{}.vti", s.name)), |w| {
            vtk::write_slice(w, s)
        })?;
    }
    let marks = crate::region::marks(
        &crate::region::on_body(&case.file.regions, &geo.mesh).0,
        &geo.mesh,
    );
    let holes = filled_hole_marks(&geo.mesh, &geo.report.repair.holes.filled);
    let pictures = pictures(&surface, &slices, (&marks, &holes), &caption)?;
    for p in &pictures {
        std::fs::write(out.file(&p.0), &p.1.png).with_context(|| p.0.clone())?;
    }
    let summary = summary(case, geo, c, progress);
    let json = serde_json::to_string_pretty(&summary)?;
    std::fs::write(out.file("summary.json"), json + "\n").context("summary.json")?;
    let report = report(
        case,
        &summary,
        c,
        pictures.into_iter().map(|p| p.1).collect(),
        caption,
    );
    output::write_file(&out.file("report.html"), |w| html::write_report(w, &report))?;
    progress.end(phase, "");
    Ok(summary)
}

/// Holes the repair filled that [`filled_hole_marks`] outlines: at most
/// this many, the largest (our choice: more names crowd the views).
const FILLED_HOLES_SHOWN: usize = 5;

/// A filled hole is outlined when its rim is at least this many panel
/// edges long (our choice: a scan's pinholes, under a panel across, fill
/// one panel's corner and would only scatter marks).
const FILLED_HOLE_EDGES: f64 = 2.0;

/// Outline colour of the holes the repair filled: a dark green, apart
/// from the regions' blue and from both colour maps.
const FILLED_HOLE_OUTLINE: output::outline::OutlineStyle = output::outline::OutlineStyle {
    colour: [0, 110, 80],
    halo: true,
};

/// The holes the repair filled, as marks for the pictures: the panels
/// (and their mirror images) whose centroids lie within the hole's
/// radius (its rim over 2 pi, at least 0.6 of a panel edge) of its
/// centre, for the largest [`FILLED_HOLES_SHOWN`] holes whose rim is
/// [`FILLED_HOLE_EDGES`] panel edges or longer, each named "filled hole":
/// the surface there is the repair's guess, which the report names in
/// words only (a review asked where on the car it was).
fn filled_hole_marks(
    mesh: &PanelMesh,
    filled: &[tuft_mesh::repair::LoopInfo],
) -> Vec<output::outline::RegionMark> {
    let Some(edge) = tuft_mesh::quality::typical_edge(mesh.panels.iter().map(|p| p.area)) else {
        return Vec::new();
    };
    let mut holes: Vec<&tuft_mesh::repair::LoopInfo> = filled
        .iter()
        .filter(|h| h.perimeter >= FILLED_HOLE_EDGES * edge)
        .collect();
    holes.sort_by(|a, b| b.perimeter.total_cmp(&a.perimeter));
    holes.truncate(FILLED_HOLES_SHOWN);
    // The display triangles' centroids, mirror images included, as the
    // regions' marks take them.
    let copies = crate::region::copies(mesh);
    holes
        .into_iter()
        .map(|h| {
            let centre = tuft_mesh::Point::from(h.centre);
            let radius = (h.perimeter / std::f64::consts::TAU).max(0.6 * edge);
            let member: Vec<bool> = copies
                .iter()
                .map(|(c, _)| (c - centre).norm() <= radius)
                .collect();
            output::outline::RegionMark {
                name: "filled hole".into(),
                member,
            }
        })
        .filter(|m| m.member.iter().any(|&x| x))
        .collect()
}

/// The pictures of a run, with their file names; `marks`: the named
/// regions and the holes the repair filled ([`filled_hole_marks`]).
fn pictures(
    s: &SurfaceResult<'_>,
    slices: &[Slice],
    (marks, holes): (
        &[output::outline::RegionMark],
        &[output::outline::RegionMark],
    ),
    caption: &Caption,
) -> Result<Vec<(String, Picture)>> {
    let mut out = Vec::new();
    let mut add = |file: &str, title: &str, png: Vec<u8>| {
        out.push((
            file.to_string(),
            Picture {
                title: title.to_string(),
                png,
            },
        ));
    };
    let mut cp = sheet::surface_sheet(s, SurfaceField::Pressure, caption)?;
    let show_holes = |canvas: &mut output::canvas::Canvas| {
        output::outline::draw_regions_styled(
            canvas,
            s.mesh,
            holes,
            FILLED_HOLE_OUTLINE,
            caption.yaw_deg,
        );
    };
    show_holes(&mut cp);
    add(
        "pressure.png",
        "Surface pressure coefficient: side, top, underneath, front and rear",
        cp.to_png()?,
    );
    let mut risk = sheet::surface_sheet(s, SurfaceField::SeparationRisk, caption)?;
    output::outline::draw_regions(&mut risk, s.mesh, marks, caption.yaw_deg);
    show_holes(&mut risk);
    add(
        "separation-risk.png",
        "Separation risk, separated areas hatched",
        risk.to_png()?,
    );
    let mut flow = tufts::tuft_sheet(s, caption)?;
    output::outline::draw_regions(&mut flow, s.mesh, marks, caption.yaw_deg);
    show_holes(&mut flow);
    add(
        "surface-flow.png",
        "Surface flow shown as tufts, separated areas crossed",
        flow.to_png()?,
    );
    let (line, _) = plot::centreline_cp_plot(s, caption)?;
    add(
        "centreline-cp.png",
        "Cp along the centre line, upper and lower surface",
        line.to_png()?,
    );
    for sl in slices {
        let (pic, _) = slice::slice_picture(sl, caption, Some(s.cp))?;
        add(
            &format!("slice-{}.png", sl.name),
            &format!("Flow slice: {}", sl.title),
            pic.to_png()?,
        );
    }
    Ok(out)
}

/// Velocity and Cp on the centre plane (the symmetry plane of a half
/// model, otherwise the middle of the body's width), on a horizontal
/// plane through the middle of the body, over the ground on a plane under
/// it, and on the case's own planes (`extra`), from the panel solution the
/// surface pressures come from (the separated-flow loop's last pass, its
/// dead water's sources included, when the loop ran).
pub fn flow_slices(mesh: &PanelMesh, c: &Computed, extra: &[Plane]) -> Result<Vec<Slice>> {
    let p = &c.potential;
    let field = FlowField::new(mesh, &p.sigma, &p.mu, p.freestream.velocity(), None)?;
    let u2 = p.freestream.velocity().norm_squared();
    let (lo, hi) = mesh.bounds();
    let height = hi.z - lo.z;
    let w = Window::of(mesh);
    let yc = plot::centre_y(mesh);
    let note = slice_note(c);
    // The dead water is hatched after the separated-flow loop, whose last
    // pass lets the free stream through it.
    let separated: Vec<bool> = if c.wakes.is_some() {
        c.layer
            .panels
            .iter()
            .map(|l| l.state == tuft_solver::boundary_layer::FlowState::Separated)
            .collect()
    } else {
        Vec::new()
    };
    let stream = p.freestream.velocity();
    let sample = |plane: &Plane| {
        let mut s = grid(&field, u2, plane);
        let points: Vec<Point3<f64>> = (0..s.dims.1)
            .flat_map(|j| (0..s.dims.0).map(move |i| (i, j)))
            .map(|(i, j)| s.point(i, j))
            .collect();
        s.near_surface = slice::near_surface(mesh, &points);
        if !separated.is_empty() {
            s.dead_water = slice::dead_water(
                mesh,
                &separated,
                &stream,
                slice::DEAD_WATER_HEIGHTS * height,
                &points,
            )
            .into_iter()
            .zip(&s.velocity)
            .map(|(dead, v)| dead && v.is_some())
            .collect();
        }
        // The hatching's words only where a slice holds dead water.
        if s.dead_water.iter().any(|&d| d) || c.wakes.as_ref().is_none_or(|w| w.passes <= 1) {
            s.note.clone_from(&note);
        } else {
            s.note = WAKE_RECOVERY.trim_start().to_string();
        }
        s
    };
    let built_in = |k: usize, at: f64, stem: &str| {
        Plane::square_to(k, at, &w, stem.into(), stem.replace('-', " "))
    };
    let mut planes = vec![
        built_in(1, yc, "centre-plane"),
        built_in(2, 0.5 * (lo.z + hi.z), "horizontal-plane"),
    ];
    // Over the ground, a plane halfway between the ground and the body's
    // lowest point: the underbody's flow seen from above (a review's
    // diffuser study had no picture of the flow under the car; the centre
    // plane takes two samples across a 180 mm gap). A body standing on
    // the ground (its tyres) is sliced halfway up to its floor instead
    // (`floor_z`; a review's sports car on its wheels had no such slice).
    if let Some(g) = mesh.mirrors.ground {
        let clear = |z: f64| z - g > UNDERBODY_SLICE_GAP * height;
        let under = Some(lo.z)
            .filter(|&z| clear(z))
            .or_else(|| floor_z(mesh).filter(|&z| clear(z)));
        if let Some(z) = under {
            planes.push(built_in(2, 0.5 * (g + z), "underbody-plane"));
        }
    }
    planes.extend(extra.iter().cloned());
    Ok(planes.iter().map(sample).collect())
}

/// The floor's height: the median height, by area, of the surface facing
/// down (normal within about 45 degrees of straight down), which a floor
/// holds most of where a tyre's contact patch holds little (a review's
/// sports car: 0.25 m^2 of tyres on the ground under about 7 m^2 of floor);
/// `None` for a body with no such surface.
pub(crate) fn floor_z(mesh: &PanelMesh) -> Option<f64> {
    let mut down: Vec<(f64, f64)> = mesh
        .panels
        .iter()
        .filter(|p| p.normal.z < -0.7)
        .map(|p| (p.centroid.z, p.area))
        .collect();
    down.sort_by(|a, b| a.0.total_cmp(&b.0));
    let half = 0.5 * down.iter().map(|d| d.1).sum::<f64>();
    let mut sum = 0.0;
    down.into_iter().find_map(|(z, a)| {
        sum += a;
        (sum >= half).then_some(z)
    })
}

/// Steepest slope, degrees, of a panel that counts as flat floor for
/// [`floor_heights`] (our choice): a rake is a degree or two, a diffuser's
/// ramp 4 degrees and more (reviews swept 4 to 14).
const FLAT_FLOOR_DEG: f64 = 3.0;

/// How far above the lowest surface facing down at its place along the
/// body a flat panel facing down still counts as floor for
/// [`floor_heights`], as a share of the body's height (our choice: a
/// floor's panels within one place lie within millimetres of each other;
/// a roof box's underside lies a body's height above).
const FLOOR_LAYER_SHARE: f64 = 0.05;

/// The floor's height above the ground at each of two axles, m: the line
/// fitted (by area, least squares) through the flat floor on the centre
/// line (surface facing down and sloping by under [`FLAT_FLOOR_DEG`],
/// within a fortieth of the body's length of the centre, between the
/// axles and that far beyond), read at each axle; where that floor spans
/// under half the wheelbase, the lowest surface facing down on the centre
/// line within a fortieth of the length of each axle; only the lowest such
/// surface at each place ([`FLOOR_LAYER_SHARE`]). `None` in free air
/// or with no surface facing down there. A rake study's variants had only
/// their lowest points to tell them apart (a review's 1-degree rake read
/// "26 mm lower" where the front had dropped 26 mm and the rear risen 22).
/// The centre line keeps the tyres out and the sills' rounding too
/// (across the whole width the demo coupe's underside read 10 mm above its
/// 120 mm floor); the flat floor keeps a diffuser's ramp under the rear
/// axle out (a review's ramp starting 150 mm ahead of it read 108 to 124
/// mm at the axle over a 100 mm floor, and `compare` called a diffuser
/// change a rake change).
fn floor_heights(mesh: &PanelMesh, axles: [f64; 2]) -> Option<[f64; 2]> {
    let g = mesh.mirrors.ground?;
    let (lo, hi) = mesh.bounds();
    let reach = 0.025 * (hi.x - lo.x);
    let yc = plot::centre_y(mesh);
    let under = |p: &&tuft_mesh::Panel| p.normal.z < -0.7 && (p.centroid.y - yc).abs() <= reach;
    let flat = FLAT_FLOOR_DEG.to_radians().cos();
    let [front, rear] = axles;
    let floor: Vec<(f64, f64, f64)> = mesh
        .panels
        .iter()
        .filter(under)
        .filter(|p| {
            -p.normal.z >= flat && p.centroid.x >= front - reach && p.centroid.x <= rear + reach
        })
        .map(|p| (p.centroid.x, p.centroid.z - g, p.area))
        .collect();
    // The lowest surface facing down at each place along the body only:
    // the underside of a roof box or a roof bar on the centre line faces
    // down and is flat too (a review's roof box had read the floor at 110
    // and 919 mm, 16 degrees nose down, over a level 151 mm floor).
    let layer = FLOOR_LAYER_SHARE * (hi.z - lo.z);
    let lowest_near = |x: f64| {
        floor
            .iter()
            .filter(|f| (f.0 - x).abs() <= reach)
            .map(|f| f.1)
            .fold(f64::INFINITY, f64::min)
    };
    let floor: Vec<(f64, f64, f64)> = floor
        .iter()
        .copied()
        .filter(|f| f.1 <= lowest_near(f.0) + layer)
        .collect();
    let (x0, x1) = floor
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), f| {
            (a.min(f.0), b.max(f.0))
        });
    if x1 - x0 >= 0.5 * (rear - front) {
        let w: f64 = floor.iter().map(|f| f.2).sum();
        let xm = floor.iter().map(|f| f.2 * f.0).sum::<f64>() / w;
        let zm = floor.iter().map(|f| f.2 * f.1).sum::<f64>() / w;
        let sxx: f64 = floor.iter().map(|f| f.2 * (f.0 - xm).powi(2)).sum();
        let sxz: f64 = floor.iter().map(|f| f.2 * (f.0 - xm) * (f.1 - zm)).sum();
        let slope = sxz / sxx;
        return Some(axles.map(|x| zm + slope * (x - xm)));
    }
    let at = |x: f64| {
        mesh.panels
            .iter()
            .filter(under)
            .filter(|p| (p.centroid.x - x).abs() <= reach)
            .map(|p| p.centroid.z - g)
            .reduce(f64::min)
    };
    Some([at(front)?, at(rear)?])
}

/// Least gap between the ground and the body's lowest point, as a share of
/// the body's height, for the underbody plane (our choice: a body on its
/// wheels or on the ground has no gap to slice).
pub const UNDERBODY_SLICE_GAP: f64 = 0.02;

/// What flow the slices show, in one line. After the separated-flow loop
/// the solution is its last pass, in which the dead water's panels let the
/// free stream through (transpiration sources): behind a separated region
/// the slice shows that stream, not the dead water's pressure, which the
/// surface pictures hold at the base pressure instead.
fn slice_note(c: &Computed) -> String {
    match &c.wakes {
        Some(w) if w.passes > 1 => format!(
            "Hatched grey: dead water behind separated surface (to one and a half body heights), which the model \
             holds at {} and computes no flow in (the VTK file keeps the stream it lets through).{WAKE_RECOVERY}",
            w.dead_water_cp
                .or(w.base_cp_loop)
                .map(|v| format!("Cp {v:.2}"))
                .unwrap_or_else(|| "one pressure".into())
                .replace('-', "\u{2212}")
        ),
        Some(_) => "Attached potential flow (nothing separated).".into(),
        None => {
            "Attached potential flow; the separated regions' dead water and wakes are not shown."
                .into()
        }
    }
}

/// The report's last section, for a reader who has not met the trade's
/// words (a review by a designer reading only the report had listed the
/// words it did not know).
pub const WORDS_USED: &str = "Cp, the pressure coefficient: the pressure above the free stream's, over \
    the dynamic pressure of the oncoming air; 1 where the air stops against the body, 0 at the free \
    stream's pressure, negative where the air speeds up and sucks.\n\n\
    Drag count: a thousandth of the drag coefficient C_D (drag over the dynamic pressure times the \
    reference area, here the frontal area unless the case sets another).\n\n\
    Attached and separated: the thin layer of slowed air next to the skin (the boundary layer) either \
    follows the surface or leaves it. Where it leaves, the air behind is a region of slow, churning \
    flow at about one pressure, called dead water here; partly separated means a region that is \
    between the two (attached under 20 % of its area separated, separated from 60 %).\n\n\
    Laminar and turbulent: the boundary layer starts smooth (laminar) and turns turbulent further \
    back (transition); a turbulent layer rubs more but stays on the surface longer.\n\n\
    Separation risk: how close the boundary layer came to leaving the surface, 0 far from it and 1 \
    where it leaves.\n\n\
    Separated-flow loop: the model first solves the air as if nothing separated, finds where the \
    boundary layer leaves, opens those regions as dead water and solves again until the separated \
    regions stop growing. The plateau model is the first pass's cruder estimate of the same \
    regions' pressure.\n\n\
    Band and sensitivity runs: the drag is estimated again with the separation criterion set looser \
    and stricter and with a fully turbulent layer; the band spans those answers and the model's \
    known shortfall, not the car's real drag.\n\n\
    Panels: the flat triangles the surface is cut into for the calculation; panel noise is how much \
    an answer moves when the same shape is cut into a few more or fewer.\n\n\
    Reynolds number: the speed times the length over the air's viscosity; where it is alike, so is \
    the boundary layer, which is why a scale model at low speed is not the car.";

/// What the slices show behind a body after the separated-flow loop (a
/// review read the red behind the coupe's tail as the wake pushing the
/// car forward).
const WAKE_RECOVERY: &str = " Behind the body the pressure is the potential flow's, which recovers to \
     above the free stream's where a real wake stays below it.";

fn grid(field: &FlowField, field_speed2: f64, plane: &Plane) -> Slice {
    let (a, b) = plane.axes;
    let (origin, spacing, dims) = (plane.origin, plane.spacing, plane.dims);
    let points: Vec<Point3<f64>> = (0..dims.1)
        .flat_map(|j| {
            (0..dims.0).map(move |i| origin + a * (i as f64 * spacing) + b * (j as f64 * spacing))
        })
        .collect();
    let velocity = field.velocities(&points);
    let u2 = field_speed2;
    let cp = velocity
        .iter()
        .map(|v| v.map(|v| 1.0 - v.norm_squared() / u2))
        .collect();
    Slice {
        name: plane.stem.clone(),
        title: plane.title.clone(),
        origin,
        axes: plane.axes,
        spacing,
        dims,
        velocity,
        cp,
        near_surface: vec![],
        dead_water: vec![],
        note: String::new(),
        resolution: plane.resolution_words().unwrap_or_default(),
    }
}

/// The summary's coefficients. The pitching moment is taken about the
/// body's lateral axis (y) through the moment point, as the axle split
/// takes it, not about the wind axes' side axis the solver's coefficients
/// use: at yaw the two differ (the rolling moment about the stream leaks
/// into the wind-axis pitch), and the summary's pitch had disagreed with
/// its own axle split.
fn coefficient_set(
    l: &tuft_solver::loads::Loads,
    r: &tuft_solver::loads::Reference,
) -> CoefficientSet {
    let qal = l.dynamic_pressure * r.area * r.length;
    CoefficientSet {
        lift: l.total.coefficients.lift,
        drag: l.total.coefficients.drag,
        drag_friction: l.friction.coefficients.drag,
        drag_pressure: l.pressure.coefficients.drag,
        side: l.total.coefficients.side,
        pitch: if qal > 0.0 {
            l.total.moment.y / qal
        } else {
            l.total.coefficients.pitch
        },
    }
}

/// The summary of a finished computation.
pub fn summary(case: &Case, geo: &Geometry, c: &Computed, progress: &Progress) -> Summary {
    let mesh = &geo.mesh;
    let flow = &case.file.flow;
    let e = &c.estimate;
    let sym = mesh.mirrors.whole_body_factor();
    let wetted = sym * mesh.area();
    let r = &c.reference;
    let given: BTreeMap<String, bool> = [
        ("area".to_string(), c.reference_given.area),
        ("length".to_string(), c.reference_given.length),
        ("axles".to_string(), c.reference_given.axles),
    ]
    .into_iter()
    .collect();
    let mut warnings = c.warnings.clone();
    warnings.extend(geo.report.quality.warnings.iter().cloned());
    // An STL run on every facet it has cannot be given more panels.
    let all_facets = matches!(case.source, crate::case::GeometrySource::Stl { .. })
        && geo.report.coarsen.is_none();
    warnings.extend(crate::pipeline::yaw_coarse_warning(
        mesh.len(),
        geo.report.suggested_panels,
        (c.wakes.is_some(), all_facets),
        flow.yaw,
    ));
    warnings.extend(crate::pipeline::coarse_warning(
        mesh.len(),
        geo.report.suggested_panels,
        c.wakes.is_some(),
        all_facets,
    ));
    warnings.extend(crate::pipeline::ground_contact_warning(&geo.report));
    warnings.extend(crate::pipeline::non_manifold_warning(&geo.report));
    warnings.extend(crate::pipeline::side_difference_warning(
        mesh, &c.layer, flow.yaw,
    ));
    // A built-in shape is generated at the count asked (half of it on a
    // half model); only an STL can hold fewer facets than asked.
    if matches!(case.source, crate::case::GeometrySource::Stl { .. }) {
        warnings.extend(crate::pipeline::unrefined_words(
            case.file.geometry.panels,
            mesh.len(),
            "geometry.panels",
        ));
    }
    // A body that may run backwards is the first thing to read.
    warnings.sort_by_key(|w| !crate::pipeline::questions_the_nose(w));
    let mut s = Summary {
        edge_hold: c.edge_hold.clone(),
        tool: format!("tuft {}", env!("CARGO_PKG_VERSION")),
        case_name: case.name.clone(),
        case: serde_json::to_value(&case.file).unwrap_or_default(),
        mesh: MeshFacts {
            input_facets: geo.input_facets,
            panels: mesh.len(),
            ground_z: mesh.mirrors.ground,
            symmetry_plane: mesh.mirrors.symmetry,
            wetted_area_m2: wetted,
            preparation: serde_json::to_value(&geo.report).unwrap_or_default(),
            stl_fingerprint: match &case.source {
                crate::case::GeometrySource::Stl { path, .. } => {
                    crate::summary::stl_fingerprint(path)
                }
                crate::case::GeometrySource::Shape { .. } => None,
            },
        },
        reference: ReferenceValues {
            area_m2: r.area,
            length_m: r.length,
            moment_point_m: [r.moment_point.x, r.moment_point.y, r.moment_point.z],
            front_axle_x_m: r.front_axle_x,
            rear_axle_x_m: r.rear_axle_x,
            given,
            floor_heights_m: floor_heights(mesh, [r.front_axle_x, r.rear_axle_x]),
        },
        dynamic_pressure_pa: e.dynamic_pressure,
        reynolds_number: flow.speed * r.length / flow.viscosity,
        coefficients: coefficient_set(e, r),
        coefficients_attached: coefficient_set(&c.attached, r),
        coefficients_body_axes: {
            let [axial, lateral] = coefficient_set(e, r).body_axes(flow.yaw);
            crate::summary::BodyAxes { axial, lateral }
        },
        drag_estimate: DragEstimate {
            cd: e.total.coefficients.drag,
            cd_low: c.drag_band.0,
            cd_high: c.drag_band.1,
            band: c.band_note.clone(),
            force_n: e.total.coefficients.drag * e.dynamic_pressure * r.area,
        },
        lift_kg: LiftKg {
            total: e.lift_kg,
            front_axle: e.axles.front_kg,
            rear_axle: e.axles.rear_kg,
            underbody: c.underbody_lift_kg[0],
            underbody_front_axle: c.underbody_lift_kg[1],
            underbody_rear_axle: c.underbody_lift_kg[2],
            // Set below, from the summary's own panel noise.
            noise: 0.0,
        },
        separation: Separation {
            area_m2: sym * c.separated_area,
            fraction: sym * c.separated_area / wetted,
            frontal_m2: sym * c.separated_frontal,
            rim_m2: c.rim_m2(mesh),
            rim_radius_m: c.rim.1,
            rim_x_m: c.rim.2[0].map(|v| if v.is_finite() { v } else { 0.0 }),
            rim_z_m: c.rim.2[1].map(|v| if v.is_finite() { v } else { 0.0 }),
            underbody_fraction: c.underbody_fraction(),
        },
        solver: SolverFacts {
            method: format!("{:?}", c.potential.stats.method),
            iterations: c.potential.stats.iterations,
            residual: Some(c.potential.stats.residual).filter(|r| r.is_finite()),
            streamlines: c.layer.streamlines.len(),
            unresolved_panels: c.layer.unresolved,
        },
        separated_wakes: c.wakes.as_ref().map(|w| SeparatedWakes {
            passes: w.passes,
            converged: w.converged,
            diverged: w.diverged,
            cd_plateau: w.loads_plateau.total.coefficients.drag,
            cd_loop: w.loads.total.coefficients.drag,
            base_cp_plateau: w.base_cp_plateau,
            base_cp_loop: w.base_cp_loop,
            dead_water_cp: w.dead_water_cp,
            wake_panels: w.wake.panels.len(),
        }),
        regions: c.regions.clone(),
        panel_noise: c.panel_noise.clone(),
        timings_s: progress.timings().iter().cloned().collect(),
        warnings,
        notes: geo.report.quality.notes.clone(),
        caution: CAUTION.into(),
    };
    s.lift_kg.noise = s.lift_noise_kg();
    // Folds of the input that the smoothing before the coarsening left,
    // as `tuft check` says them (a review's run said nothing of the 48
    // facets its check had called unsure near the nose).
    s.notes.extend(
        geo.report
            .coarsen
            .as_ref()
            .and_then(|c| c.untangled.as_ref())
            .and_then(folds_note),
    );
    s.notes.extend(s.coarse_note());
    s.notes.extend(c.region_notes.iter().cloned());
    s.notes.extend(reynolds_note(&s));
    s.notes.extend(transition_notes(case));
    if case.file.flow.yaw != 0.0 {
        let note = cross_wind_note(&s, case.file.flow.yaw);
        s.notes.push(note);
    }
    if s.under_half_suggested() {
        for r in &mut s.regions {
            r.coarse_mesh = true;
            r.standing = r.firmness().into();
        }
    }
    s
}

/// The report's words on the edges the flow leaves from a face into the
/// stream (`BoundaryLayer::rim_zone`); `dead_water`: the separated-flow
/// loop ran (else the plateau model's bound, Cp -0.46).
pub fn rim_text(s: &Separation, dead_water: bool) -> String {
    use tuft_solver::boundary_layer::screen::RIM_RADIUS;
    let bound = if dead_water {
        "the dead water's".to_owned()
    } else {
        format!(
            "taken as Cp {} (the strongest dead-water suction the separated-flow loop allows)",
            tuft_solver::boundary_layer::screen::RIM_CP
        )
    };
    format!(
        "The flow leaves sharp front edges here (rims: an edge, chamfer or rounding tighter than {:.0} mm, \
         {RIM_RADIUS} of the frontal size, which the flow turns round from a face into the stream). Beside them, \
         over {:.2} m^2, attached potential flow would give a suction many times the free stream's; the \
         pressure there is held no lower than on the free streamline leaving the edge, {bound}; the \
         area lies between x {} and {} m, z {} and {} m. \
         Bodies with such edges come out low: flat-faced cylinders and a cube 13-30 % below their handbook \
         drag. Whether a rounded edge counts is decided on the panels: one whose radius is close to {:.0} \
         mm, or spans no more than a panel or two, may read either way, so compare variants of a front \
         edge at one panel count and read them against the step in drag it makes.",
        1000.0 * s.rim_radius_m,
        s.rim_m2,
        output::fixed(s.rim_x_m[0], 2),
        output::fixed(s.rim_x_m[1], 2),
        output::fixed(s.rim_z_m[0], 2),
        output::fixed(s.rim_z_m[1], 2),
        1000.0 * s.rim_radius_m
    )
}

/// The report's words on the lift near the ground: the underbody's part,
/// the least certain one.
fn lift_text(l: &LiftKg, at: &str) -> String {
    // As the table shows them ([`LiftKg::axle_words`]), so the three add up.
    let total = &l.axle_words()[0];
    let under = &l.underbody_axle_words()[0];
    let rest = l.rest_words();
    let mut text = format!(
        "The lift of {total} {at} is the underbody's pressure, {under} kg, plus the rest of the body, \
         {rest} kg. The ground is modelled as a smooth plane moving with the air, and the underbody \
         is as smooth as the surface given, "
    );
    if l.underbody < 0.0 {
        text += "so the flow under the body speeds up and sucks it down more than under a real car, \
                 whose wheels, roughness and cooling flow slow it: the underbody's part is among the \
                 least certain numbers on this page";
        if l.total < 0.0 {
            text += ", and a net downforce on a body without aerodynamic devices most likely comes \
                     from it";
        }
        text += ". ";
    } else {
        text += "which a real underbody (wheels, roughness, cooling flow) is not: its part is among \
                 the least certain numbers on this page. ";
    }
    text + "Differences between variants that share the underbody and its height above the ground are \
            more trustworthy than the totals; a ride-height change moves mostly the underbody's suction, \
            so its lift trend is the least certain comparison of all."
}

/// The report's words on the separated-flow loop.
fn loop_text(w: &SeparatedWakes) -> String {
    let state = match (w.diverged, w.converged) {
        (true, _) => "a pass blew up and was discarded, so the pass before it is used",
        (false, true) => "converged",
        (false, false) => "not converged within the pass limit",
    };
    if w.passes <= 1 {
        return "The attached flow separated nowhere, so the separated-flow loop stopped after its \
                first pass."
            .into();
    }
    // The dead water's one pressure, as stdout and the pictures give it;
    // the base's mean beside it only where it differs (a review read
    // "dead water at C_p -0.17" on stdout and "base C_p -0.16" here).
    let pressure = match (w.dead_water_pressure(), w.base_cp_loop) {
        (Some(v), base) => {
            let base = base
                .filter(|b| (b - v).abs() >= 0.005)
                .map_or(String::new(), |b| {
                    format!(
                        " The mean C_p over the base (the panels facing downstream, attached ones among \
                         them) is {b:.2}."
                    )
                });
            format!(
                "The dead water holds C_p {v:.2}: Hoerner's base-drag correlation with the skin friction \
                 computed here, since an open wake alone gives far too weak a base suction; square-back \
                 bodies near the ground measure about -0.15 to -0.35.{base}"
            )
        }
        (None, _) => {
            "No separated panel faces downstream, so the dead water holds the plateau model's \
                      pressure."
                .into()
        }
    };
    format!(
        "The separated regions were opened to the free stream as dead water (the flow leaves each \
         separation line without turning round it) and the boundary layer was marched again: {} passes, \
         {state}. The separation verdicts and the pressures above come from the last pass. {pressure} \
         This loop replaces the attached first pass with the plateau model (what solver.wakes = \
         \"attached\" reports; its figures, no drag estimate to quote, stay in summary.json). Vortices shed \
         from the side edges of a slant (which raise the drag of 20-30 degree slants) are not modelled.",
        w.passes
    )
}

/// The body's lowest point above the ground, mm, in words (a ride-height
/// study's variants had no line saying how high each stood); "no ground"
/// in free air.
fn clearance_words(s: &Summary) -> String {
    match (s.mesh.ground_z, s.clearance_m()) {
        (None, _) => "no ground (free air)".to_owned(),
        // On its tyres: the floor's height beside it (a review read "stands
        // on the ground" here and 140 mm in sweep.csv for one run).
        (Some(_), Some(c)) if c < 5e-4 => match s.floor_clearance_m().filter(|_| s.wheels_on()) {
            Some(f) => format!(
                "stands on the ground on its tyres, its floor {:.0} mm above it",
                1000.0 * f
            ),
            None => "stands on the ground".to_owned(),
        },
        (Some(_), Some(c)) => format!("{:.0}", 1000.0 * c),
        (Some(_), None) => "not recorded".to_owned(),
    }
}

/// The note on facets of the STL still folded after the smoothing before
/// the coarsening, where the first lies; `None` when none is.
fn folds_note(u: &tuft_mesh::coarsen::UntangleReport) -> Option<String> {
    (u.folded_after > 0).then(|| {
        let at = u.still_folded_at.map_or(String::new(), |[x, y, z]| {
            format!(", the first near x {x:.3}, y {y:.3}, z {z:.3} m")
        });
        format!(
            "{} of the STL {} still folded after the smoothing before the coarsening{at}: the panels \
             there are unsure (many facets meeting at one point, as at a scan's pole, fold so; tuft \
             check says more)",
            output::plural(u.folded_after, "facet", "facets"),
            if u.folded_after == 1 { "is" } else { "are" }
        )
    })
}

/// The separated share of the surface under which a body is streamlined
/// for [`drag_lean`]. Our choice, measured: a 4:1 spheroid 1.6 %, the
/// demo coupes 8.8 % and more, the square-back research body's base alone
/// about 8 %.
pub const STREAMLINED_SHARE: f64 = 0.03;

/// Which way the true drag more likely lies from a loop run's estimate,
/// in words; `None` without the loop. A bluff body's estimate is low (the
/// band's top carries the loop's largest shortfall); a streamlined one's,
/// under [`STREAMLINED_SHARE`] separated, runs high instead: a 4:1
/// spheroid, fully turbulent, reads 0.082 against about 0.046 by Hoerner's
/// formula (from memory; `tests/tests/separated_wakes.rs`), where a
/// review had read the report's "more likely above" on a low-drag shape.
pub fn drag_lean(s: &Summary) -> Option<&'static str> {
    s.separated_wakes.as_ref()?;
    let f = s.separation.fraction;
    Some(if f < STREAMLINED_SHARE {
        "little of this body separates, and on a streamlined body the estimate runs high instead \
         (a 4:1 spheroid reads 0.082 where Hoerner's formula gives about 0.046): the layer's \
         displacement, which softens the tail's pressure rise, is not modelled"
    } else if f < BLUFF_SHARE {
        "between a streamlined body (whose estimate runs high) and a bluff one (whose estimate runs \
         low), the true drag can lie either side of the estimate"
    } else {
        "the true drag is more likely above the estimate than below"
    })
}

/// The separated share of the surface from which a body reads as bluff
/// for [`drag_lean`], between it and [`STREAMLINED_SHARE`] either way
/// (our choice, measured: the demo coupes 8.8 % and 7.7 % at 200 km/h; a
/// review's teardrop and boat tails 3.7 and 2.9 %, whose statement had
/// flipped with 0.6 points of separated area and with the panel count).
pub const BLUFF_SHARE: f64 = 0.06;

/// How a yawed run's note begins ([`cross_wind_note`]).
pub const CROSS_WIND: &str = "cross wind at";

/// Below this Reynolds number on the reference length a run notes that
/// its verdicts are a slow car's (a 4.5 m car at about 60 km/h; a 1:4
/// tunnel model at 45 m/s reads 3.4 million). Our choice.
pub const ROAD_REYNOLDS: f64 = 5.0e6;

/// How a run's Reynolds note begins ([`reynolds_note`]).
pub const REYNOLDS_WORDS: &str = "Reynolds number";

/// Length of the car a low Reynolds number is read against, m (a mid-size
/// car; common practice).
const CAR_LENGTH: f64 = 4.5;

/// A note for a run below [`ROAD_REYNOLDS`]: a scale model in a tunnel,
/// or a car at town speed. Transition and separation follow the Reynolds
/// number, not the speed, so the note gives the speed at which a 4.5 m
/// car has the same number (a review's 1:4 coupe at 45 m/s matched the
/// full-size coupe at 11.25 m/s to every digit, and its boot deck read 33
/// % separated against 22 % at 130 km/h, with no word of it).
pub fn reynolds_note(s: &Summary) -> Option<String> {
    let re = s.reynolds_number;
    let viscosity = s.flow("viscosity")?;
    (re > 0.0 && re < ROAD_REYNOLDS).then(|| {
        let car = re * viscosity / CAR_LENGTH;
        format!(
            "{REYNOLDS_WORDS} {:.2} million on the {} m reference length: a {CAR_LENGTH} m car's at {}, so \
             the transition and separation verdicts, and the coefficients, are for that; a scale model's \
             carry to the road at that speed only, and at road speeds the layer turns turbulent sooner \
             and separates later",
            re / 1e6,
            output::short_number(s.reference.length_m),
            output::speed_words(car)
        )
    })
}

/// How a transition note begins ([`transition_notes`]).
pub const TRANSITION_WORDS: &str = "boundary layer";

/// Notes on the case's transition setting: `forced_at` given with another
/// mode is not used (a review's was ignored without a word), and an
/// all-laminar layer is a bounding case (a review's 1:4 coupe read 82 %
/// of its surface separated and C_D 0.333 with it, against 10 % and
/// 0.157 with free transition).
fn transition_notes(case: &Case) -> Vec<String> {
    let b = &case.file.boundary_layer;
    let mut notes = Vec::new();
    if let (Some(at), false) = (
        b.forced_at,
        matches!(case.transition, crate::case::TransitionMode::Forced(_)),
    ) {
        notes.push(format!(
            "{TRANSITION_WORDS}: boundary_layer.forced_at = {at} is not used with transition = \"{}\" (only with \"forced\")",
            b.transition
        ));
    }
    if case.transition == crate::case::TransitionMode::Laminar {
        notes.push(format!(
            "{TRANSITION_WORDS}: transition = \"laminar\" keeps the layer laminar to its separation: a \
             bounding case, not a car's flow (a test 1:4 coupe read 82 % of its surface separated and \
             C_D 0.333 with it, 10 % and 0.157 with free transition)"
        ));
    }
    notes
}

/// What a yawed run's side force is worth, in one sentence for stdout and
/// summary.json's notes: a review scripting off summary.json read
/// `coefficients.side` 0.038 at 10 degrees with no word that it is not
/// the side force (the report's Cross wind section, [`cross_wind_text`],
/// had the words); a later review found the drag along the wind made
/// mostly of the side force's share and nothing saying so.
pub fn cross_wind_note(s: &Summary, yaw: f64) -> String {
    let k = &s.coefficients;
    let [axial, _] = s.coefficients.body_axes(yaw);
    format!(
        "{CROSS_WIND} {}: the side-force coefficient (coefficients.side, {:.3}) is not the side force{} \
         (cars measure about 0.03 to 0.04 per degree, common practice, mostly from the lee side's \
         separated, vortex-laden flow, which this model does not hold); the drag along the wind takes \
         in {:+.3} from the force across the body (along the body's axis the force coefficient is \
         {axial:.3}, coefficients_body_axes), so the drag at yaw carries the same doubt; no yawing or \
         rolling moment is given; compare runs at one yaw only{} (the report's Cross wind section says \
         more)",
        output::yaw_words(yaw),
        k.side,
        side_sign_words(s),
        side_share_of_drag(k, yaw),
        half_model_advice(s),
    )
}

/// The advice to run a body whose halves agree as a half model, or, for
/// a run that is one, what it gives (a review's half model had been told
/// to run as one).
fn half_model_advice(s: &Summary) -> &'static str {
    if s.mirrored_half() {
        "; this half model ran mirrored into a whole body with both sides panelled alike, so its attached \
         flow mirrors exactly between a yaw and its mirror image, though the separated-flow loop can \
         still part a few panels between the sides"
    } else {
        ", and run a body whose halves agree as a half model (half_model = true), which a cross wind \
         mirrors into a whole body with both sides panelled alike"
    }
}

/// How far the side force's sign can be trusted: the attached flow's can
/// be of the wrong sign (a review's box van at 5 degrees read -0.058,
/// pushed into the wind); the loop's comes from the lee flank's dead
/// water, which gives its sign but not its size (a review's box van at 15
/// degrees read 0.321, 0.021 per degree, where its attached flow gave
/// -0.159).
fn side_sign_words(s: &Summary) -> String {
    if s.separated_wakes.is_some() {
        format!(
            ", only a rough figure: the lee side's separated regions sit at the one dead-water pressure \
             the whole body shares, and the attached flow alone gives {:.3}",
            s.coefficients_attached.side
        )
    } else {
        ", not even in sign (it is the attached flow's)".to_owned()
    }
}

/// The part of the drag along the wind that the body's lateral force
/// makes: the drag is the axial force times `cos(yaw)` plus the lateral
/// force times `sin(yaw)` ([`crate::summary::CoefficientSet::body_axes`];
/// a review's box van at 15 degrees, 0.099 of C_D 0.280).
fn side_share_of_drag(k: &crate::summary::CoefficientSet, yaw: f64) -> f64 {
    k.body_axes(yaw)[1] * yaw.to_radians().sin()
}

/// What a yawed run can and cannot say: a car's side force comes mostly
/// from the separated, vortex-laden flow on its lee side, which attached
/// potential flow with one dead-water pressure does not hold (on the demo
/// coupe at 8,048 panels the side-force coefficient was 0.005 at 5 degrees
/// and 0.027 at 10, 2026-12-02); nor the drag it adds (the shipped coupe
/// STL case at 3,956 panels: C_D 0.151 straight ahead, 0.137 at 10
/// degrees and 0.143 at -10 on a body whose halves agree, underbody lift
/// -240 kg straight ahead and -268 at 10 degrees; a review, 2026-12-03). A
/// whole-body mesh panels its two sides differently, which a cross wind
/// turns into a bias between a yaw and its mirror image (a review's box
/// van at 15 and -15 degrees: side force 0.321 and -0.377, its roof 28 and
/// 15 % separated; as a half model mirrored whole, 0.357 both ways and 11
/// % separated).
fn cross_wind_text(s: &Summary, yaw: f64) -> String {
    let k = &s.coefficients;
    let [axial, lateral] = k.body_axes(yaw);
    format!(
        "At {} the side-force coefficient comes to {:.3} (positive to the car's right, +y){}. Cars \
         measure about 0.03 to 0.04 per degree of yaw (common practice), most of it from the separated \
         flow and the vortices on the lee side, which this model does not hold: the flanks' attached \
         pressures are the attached flow's (on a long body the windward flank can read more suction than \
         the lee), and no yawing or rolling moment is given. The drag is taken along the wind: the force \
         along the body's axis times the cosine of the yaw plus the force across it times the sine. \
         Along the axis the force coefficient is {axial:.3} and across it {lateral:.3}, so {:+.3} of \
         the drag's {:.3} here comes from the force across the body \
         (summary.json's coefficients_body_axes): the drag at yaw carries the side force's doubt. \
         Cars measure more drag in a cross wind than straight ahead (common practice), where this model \
         can give less. A whole-body mesh panels its two sides differently, and a cross wind turns that \
         into a difference between a yaw and its mirror image (a test box van at 15 and -15 degrees: \
         side force 0.321 and -0.377, its roof 28 and 15 % separated; the example coupe case, cases/coupe.toml, at its 3,956 panels: C_D 0.137 \
         at 10 degrees, 0.143 at -10). A half model (half_model = true) is mirrored into a whole body with \
         both sides panelled alike, so its attached flow mirrors exactly (that van read 0.357 both \
         ways), though the separated-flow loop can still part a few panels between the sides (a test \
         coupe at 8 and -8 degrees: 0.023 and -0.029 as a half model, 0.016 and -0.027 whole){}. Compare \
         drag between runs at one yaw only. The lift moves mostly with the \
         smooth underbody's suction (that coupe's underbody: -240 kg straight ahead, -268 at 10 \
         degrees), the least certain part of it. Cross-wind stability needs validated CFD or a tunnel.",
        output::yaw_words(yaw),
        k.side,
        side_sign_words(s),
        side_share_of_drag(k, yaw),
        k.drag,
        if s.mirrored_half() {
            "; this run is one"
        } else {
            "; run a body whose halves agree that way"
        },
    )
}

/// The smooth underbody's suction is the least certain part of the lift:
/// the underbody's part with its axle split and the rest of the body's,
/// which add up to the lift as shown, and the words that say so where the
/// lift is first read, whenever the underbody pulls the body down by more
/// than a kilogram (a review's chin spoiler turned the total lift positive
/// and the words went, though the underbody still gave -108 kg); `None`
/// otherwise. Not "of which": the part is larger than the whole.
pub fn underbody_words(s: &Summary) -> Option<String> {
    (s.mesh.ground_z.is_some() && s.lift_kg.underbody < -1.0).then(|| {
        let u = s.lift_kg.underbody_axle_words();
        format!(
            "underbody {} kg (front {}, rear {}), rest of the body {} kg; the smooth underbody is the \
             least certain part: a real one sucks far less{}",
            u[0],
            u[1],
            u[2],
            s.lift_kg.rest_words(),
            floor_sign_words(&s.lift_kg)
        )
    })
}

/// Where the lift's sign is the floor's: the total, or an axle's share,
/// is downforce while the rest of the body lifts there, so the sign rests
/// on the least certain part (a review's SUV read -74 kg, front -49 and
/// rear -25, from an underbody's -162 kg against +88 kg from the rest:
/// downforce on both axles of a road SUV, a sign a tunnel would not
/// show). Empty where the rest of the body agrees in sign.
/// The report's caution when the lift's sign is the smooth floor's
/// ([`floor_sign_words`]), at the top beside the general one: a review
/// read the demo's -95 kg of downforce disowned in the middle of a line,
/// and "No warnings" in the report.
pub fn lift_sign_caution(s: &Summary) -> Option<String> {
    let words = floor_sign_words(&s.lift_kg);
    (s.mesh.ground_z.is_some() && s.lift_kg.underbody < -1.0 && !words.is_empty()).then(|| {
        format!(
            "Lift: {}; the smooth underbody's suction is the least certain part of the model (a real \
             floor sucks far less).",
            words.trim_start_matches("; ")
        )
    })
}

fn floor_sign_words(l: &crate::summary::LiftKg) -> String {
    // The rest as shown beside the total and the underbody, adding up.
    let rests = l.rest_axle_words();
    let rest = |k: usize| rests[k].clone();
    let flipped: Vec<(&str, String)> = [
        ("the whole body", l.total, l.underbody),
        ("the front axle", l.front_axle, l.underbody_front_axle),
        ("the rear axle", l.rear_axle, l.underbody_rear_axle),
    ]
    .into_iter()
    .enumerate()
    .filter(|&(_, (_, t, u))| t < -0.5 && t - u > 0.5)
    .map(|(k, (name, _, _))| (name, rest(k)))
    .collect();
    if flipped.is_empty() {
        return String::new();
    }
    let names: Vec<&str> = flipped.iter().map(|f| f.0).collect();
    let lifts: Vec<String> = flipped.iter().map(|f| format!("{} kg", f.1)).collect();
    format!(
        "; the downforce on {} is the floor's: without its suction the rest of the body lifts there \
         ({}), so read neither its sign nor its size as the car's",
        output::and_list(&names),
        output::and_list(&lifts)
    )
}

/// The drag force with the band's ends, each times `scale` (1 for N:
/// `"95 (92 to 245)"`; the speed over 1000 for kW), with `decimals` (the
/// force scales with the coefficient at one speed and reference area).
pub fn drag_force_words(d: &crate::summary::DragEstimate, scale: f64, decimals: usize) -> String {
    let per_cd = if d.cd.abs() > 1e-12 {
        d.force_n / d.cd
    } else {
        0.0
    };
    format!(
        "{:.decimals$} ({:.decimals$} to {:.decimals$})",
        scale * d.force_n,
        scale * per_cd * d.cd_low,
        scale * per_cd * d.cd_high
    )
}

/// The power the aerodynamic force takes from the car: the drag times
/// the wind speed straight ahead; in a cross wind, the force along the
/// body's axis times the car's own speed, the wind's `U cos(yaw)` with the
/// wind taken across a still road (a review read 11.2 kW at 8 degrees,
/// the drag along the wind times the wind's speed, where the car's
/// needs 10.8). Returns the factor on the drag force's words (scaling
/// the band with the estimate) and the speed the power is at, m/s.
pub fn power_factor(s: &Summary, wind: f64) -> (f64, f64) {
    let Some(yaw) = s.flow("yaw").filter(|&y| y != 0.0) else {
        return (wind / 1000.0, wind);
    };
    let k = &s.coefficients;
    let car = wind * yaw.to_radians().cos();
    let along = if k.drag.abs() > 1e-12 {
        k.body_axes(yaw)[0] / k.drag
    } else {
        1.0
    };
    (along * car / 1000.0, car)
}

/// The words after a power in kW: the speed it is at, and in a cross
/// wind what it is.
pub fn power_at_words(s: &Summary, wind: f64) -> String {
    let (_, car) = power_factor(s, wind);
    if car == wind {
        format!("at {} m/s", output::speed_number(wind))
    } else {
        format!(
            "at the car's {} m/s (the force along its axis; the wind at the yaw taken across a still road)",
            output::speed_number(car)
        )
    }
}

fn report(
    case: &Case,
    s: &Summary,
    c: &Computed,
    pictures: Vec<Picture>,
    caption: Caption,
) -> Report {
    let v = case.file.flow.speed;
    let at = format!("kg at {} m/s", output::speed_number(v));
    let [lift, front, rear] = s.lift_kg.axle_words();
    // No axle split for a body in free air without axles (Summary::axle_split_shown).
    let split = |axle: &str| {
        if s.axle_split_shown() {
            axle.to_owned()
        } else {
            "not split (free air, no axles given)".to_owned()
        }
    };
    let k = &s.coefficients;
    let (units, places) = output::total_and_parts(
        [k.drag, k.drag_pressure, k.drag_friction].map(|c| 1000.0 * c),
        0,
        1,
    );
    let drag_counts = units.map(|u| format!("{:.places$}", output::from_units(u, places)));
    let mut numbers = vec![
        // The drag rows in one unit, counts, with C_D beside the estimate
        // and its band; the parts add up to the estimate as shown.
        NumberRow::text(
            "Drag estimate (of the surface as given: no cooling flow, no wheel rotation)",
            &format!("{} (C_D {:.3})", drag_counts[0], k.drag),
            "counts",
        ),
        NumberRow::text(
            &match drag_lean(s) {
                Some(lean) => format!(
                    "Drag estimate band (model sensitivity; its top adds the separated-flow model's \
                     largest shortfall against measured drag; {lean})"
                ),
                None => "Drag estimate band (model sensitivity)".to_owned(),
            },
            &format!(
                "{:.0} to {:.0} (C_D {:.3} to {:.3})",
                1000.0 * s.drag_estimate.cd_low,
                1000.0 * s.drag_estimate.cd_high,
                s.drag_estimate.cd_low,
                s.drag_estimate.cd_high
            ),
            "counts",
        ),
        NumberRow::text(
            if s.separated_wakes.is_some() {
                "Drag, pressure part (dead water at its pressure)"
            } else {
                "Drag, pressure part (plateau model)"
            },
            &drag_counts[1],
            "counts",
        ),
        NumberRow::text("Drag, friction part", &drag_counts[2], "counts"),
        NumberRow::text(
            "Drag force (estimate, band)",
            &drag_force_words(&s.drag_estimate, 1.0, 0),
            &format!("N at {} m/s", output::speed_number(v)),
        ),
        NumberRow::text(
            "Power the drag absorbs (estimate, band)",
            &drag_force_words(&s.drag_estimate, power_factor(s, v).0, 1),
            &format!("kW {}", power_at_words(s, v)),
        ),
        NumberRow::fixed("Lift coefficient C_L (negative: downforce)", k.lift, 3, "-"),
        NumberRow::text("Lift, whole body (negative: downforce)", &lift, &at),
        NumberRow::text("Lift, front axle", &split(&front), &at),
        NumberRow::text("Lift, rear axle", &split(&rear), &at),
        // As stdout gives it (a review reading only the report had not
        // found how sure a lift difference is).
        NumberRow::text(
            "Lift, how far like runs scatter (a difference between variants under it is noise)",
            &format!("about {}", output::fixed(s.lift_noise_kg(), 1)),
            &at,
        ),
    ];
    if s.mesh.ground_z.is_some() {
        numbers.push(NumberRow::text(
            "Lift, underbody (ground-facing panels; front, rear axle)",
            &{
                let [u, f, r] = s.lift_kg.underbody_axle_words();
                format!("{u} ({f}, {r})")
            },
            &at,
        ));
        numbers.push(NumberRow::text(
            "Lift, rest of the body (whole body less underbody)",
            &s.lift_kg.rest_words(),
            &at,
        ));
    }
    // In a cross wind the side force is no estimate (the attached flow's
    // can be of the wrong sign, the loop's holds the lee side at one
    // pressure): the number says so where it is read.
    let side = if s.flow("yaw").is_some_and(|y| y != 0.0) {
        NumberRow::text(
            "Side-force coefficient (across the wind, level, positive to the car's right, +y; the \
             drag above is along the wind, not the body's axis)",
            &format!(
                "{:.3}{}; not an estimate of the side force (see Cross wind)",
                k.side,
                side_sign_words(s)
            ),
            "-",
        )
    } else {
        NumberRow::fixed(
            "Side-force coefficient (positive to the car's right, +y)",
            k.side,
            3,
            "-",
        )
    };
    numbers.extend([
        side,
        NumberRow::fixed(
            if s.mesh.ground_z.is_some() {
                "Pitching-moment coefficient (about the body's lateral axis through the wheelbase's \
                 middle on the ground, as the axle split; on the reference length; positive nose up)"
            } else {
                "Pitching-moment coefficient (about the body's lateral axis through the wheelbase's \
                 middle at the body's lowest point, no ground, as the axle split; on the reference \
                 length; positive nose up)"
            },
            k.pitch,
            3,
            "-",
        ),
        NumberRow::fixed("Separated area", s.separation.area_m2, 2, "m²"),
        NumberRow::fixed(
            "Separated fraction of the wetted area",
            100.0 * s.separation.fraction,
            1,
            "%",
        ),
    ]);
    for r in &s.regions {
        numbers.push(NumberRow::text(
            &format!(
                "Region \"{}\": verdict, separated share, mean risk, area",
                r.name
            ),
            &format!(
                "{}; mean risk {:.2}, {:.3} m²",
                r.words(),
                r.mean_risk,
                r.area_m2
            ),
            "-",
        ));
        if let Some(l) = &r.loads {
            numbers.push(NumberRow::text(
                &format!(
                    "Region \"{}\": the forces on its own surface (drag; lift, front and rear axle)",
                    r.name
                ),
                &{
                    let [lift, front, rear] =
                        output::lift_set([l.lift_kg, l.front_axle_kg, l.rear_axle_kg]);
                    format!("{:.0}; {lift} ({front}, {rear})", l.drag_counts)
                },
                &format!("counts; {at}"),
            ));
        }
    }
    numbers.extend([
        NumberRow::fixed(
            "Lift coefficient if nothing separated (attached potential flow, for comparison)",
            s.coefficients_attached.lift,
            3,
            "-",
        ),
        NumberRow::number("Reference area", s.reference.area_m2, "m²"),
        NumberRow::number("Reference length", s.reference.length_m, "m"),
        NumberRow::text(
            "Axles (front, rear), for the lift split",
            &format!(
                "x {:.3} and {:.3}{}",
                s.reference.front_axle_x_m,
                s.reference.rear_axle_x_m,
                if s.reference.given.get("axles").copied().unwrap_or(false) {
                    ""
                } else {
                    " (not given: 20 % and 80 % of the length)"
                }
            ),
            "m",
        ),
        {
            let words = clearance_words(s);
            // The unit only beside a number.
            let unit = if words.starts_with(|c: char| c.is_ascii_digit()) {
                "mm"
            } else {
                "-"
            };
            NumberRow::text(
                "Ground clearance (the body's lowest point above the ground)",
                &words,
                unit,
            )
        },
        NumberRow::text(
            "Floor above the ground at the axles",
            &s.reference
                .floor_words()
                .unwrap_or_else(|| "no ground, or no floor at the axles".into()),
            "-",
        ),
        NumberRow::text(
            "Reynolds number on the reference length",
            &format!("{:.2} million", s.reynolds_number / 1e6),
            "-",
        ),
        NumberRow::text(
            "Air density (the loads in kg and N scale with it)",
            &s.flow("density")
                .map_or_else(|| "not recorded".to_string(), |d| format!("{d}")),
            "kg/m³",
        ),
        NumberRow::number("Dynamic pressure", s.dynamic_pressure_pa, "Pa"),
        NumberRow::text(
            "Repairs to the STL",
            &s.repair_words()
                .unwrap_or_else(|| "none that changed its surface".into()),
            "-",
        ),
        NumberRow::text(
            "Panels",
            &match (s.mesh.symmetry_plane, s.panels_instead()) {
                (true, None) => format!("{} (half model, mirrored in y = 0)", s.mesh.panels),
                (true, Some(i)) => {
                    format!("{} (half model, mirrored in y = 0), {i}", s.mesh.panels)
                }
                (false, None) => s.mesh.panels.to_string(),
                (false, Some(i)) => format!("{} {i}", s.mesh.panels),
            },
            "-",
        ),
    ]);
    if let Some(n) = &s.panel_noise {
        numbers.push(NumberRow::text(
            "Panel noise (the case solved again at other panel counts: how far the numbers moved; \
             tuft compare and tuft collect judge differences against it where it is above their \
             built-in floor)",
            &n.words(s.axle_split_shown()),
            "-",
        ));
    }
    let floor = underbody_words(s).map_or_else(String::new, |u| format!("; {u}"));
    let summary = format!(
        "Drag estimate C_D {:.3} (band {:.3} to {:.3}); lift {} kg at {} m/s (front {}, rear {}){floor}; \
         {:.1} % of the surface separated{}.",
        k.drag,
        s.drag_estimate.cd_low,
        s.drag_estimate.cd_high,
        lift,
        output::speed_number(v),
        front,
        rear,
        100.0 * s.separation.fraction,
        s.regions
            .iter()
            .map(|r| format!("; {}: {}", r.name, r.words()))
            .collect::<String>()
    );
    let method = TextSection {
        title: "How these numbers were made".into(),
        body: format!(
            "Inviscid potential flow by a source/doublet panel method on {} panels{}; integral boundary \
             layers (Thwaites laminar, transition {}, Head turbulent with Ludwieg-Tillmann skin friction) \
             along {} surface streamlines, separation at lambda = -0.09 (laminar) or H = {} (turbulent).{}\n\n\
             {} and adds skin friction; its band re-runs the boundary layer with {}. It is a screening \
             estimate: absolute drag can be off by more than the band, while differences between close \
             variants are more trustworthy where their separated regions stay put. Differences of a few drag counts are within the noise of any \
             simulation (common practice).",
            s.mesh.panels,
            match (s.mesh.ground_z.is_some(), s.mesh.symmetry_plane) {
                (true, true) =>
                    " of a half model, mirrored in the symmetry plane y = 0 and with the ground \
                                 plane as a mirror image (forces, areas and kg are for the whole body)",
                (false, true) =>
                    " of a half model, mirrored in the symmetry plane y = 0, in free air \
                                  (forces, areas and kg are for the whole body)",
                (true, false) => " with the ground plane as a mirror image",
                (false, false) => " in free air",
            },
            match case.transition {
                crate::case::TransitionMode::Free => "free by Michel's criterion".to_string(),
                crate::case::TransitionMode::Laminar => "none (all laminar)".to_string(),
                crate::case::TransitionMode::Turbulent => "at once (all turbulent)".to_string(),
                crate::case::TransitionMode::Forced(f) => format!(
                    "forced at {:.0} % of the length or sooner by Michel's",
                    100.0 * f
                ),
            },
            s.solver.streamlines,
            case.file.boundary_layer.separation_h.unwrap_or(2.4),
            if case.transition == crate::case::TransitionMode::Free {
                " Free transition is for a smooth surface in calm air: on a road, or on a clay model \
                 with its tool marks, the layer turns turbulent sooner, which boundary_layer.transition \
                 = \"turbulent\" shows; the drag band's fully turbulent re-march, on this run's separated \
                 regions, gives part of that change, not all (a test coupe at 130 km/h read C_D \
                 0.1445 fully turbulent against a band from 0.1474). A turbulent or tripped layer can \
                 read less drag here than a free one: its friction rises, and Hoerner's base \
                 correlation, which sets the dead water's pressure from that friction, takes more than \
                 that off the separated regions' suction (that coupe: 0.152 free, 0.1445 turbulent), \
                 where a tunnel's trip adds drag unless it removes a laminar separation."
            } else {
                ""
            },
            if s.separated_wakes.is_some() {
                "The drag estimate integrates the pressure of the separated-flow loop's last pass (below), \
                 with the dead water at its pressure,"
            } else {
                "The drag estimate holds the pressure in separated regions at its value at the separation \
                 line (plateau model; attached potential flow does not see the wake that a real separation \
                 makes)"
            },
            c.band_note
        ),
    };
    let mut sections = vec![method];
    if !s.notes.is_empty() {
        sections.push(TextSection {
            title: "Notes on the mesh and the model".into(),
            body: s
                .notes
                .iter()
                .map(|n| crate::output::sentence(n))
                .collect::<Vec<_>>()
                .join("\n\n"),
        });
    }
    if s.rim_shown() {
        sections.push(TextSection {
            title: "Sharp front edges".into(),
            // The loop's dead water has a pressure of its own unless
            // nothing faces downstream (then the plateau model's bound).
            body: rim_text(
                &s.separation,
                s.separated_wakes
                    .as_ref()
                    .is_some_and(|w| w.dead_water_cp.is_some()),
            ),
        });
    }
    if s.mesh.ground_z.is_some() {
        sections.push(TextSection {
            title: "Lift near the ground".into(),
            body: lift_text(&s.lift_kg, &at),
        });
    }
    if !s.regions.is_empty() {
        let [attached, separated] = crate::region::VERDICT_LINES.map(|v| 100.0 * v);
        sections.push(TextSection {
            title: "Named regions".into(),
            body: format!(
                "Each region's verdict reads its separated share: attached under {attached:.0} %, separated \
                 from {separated:.0} %, partly separated between (our lines; on the slant-back research body \
                 they give the published regimes at 25 and 35 degrees). Mean risk is the area mean of how \
                 close the boundary layer came to separating, 0 far from it and 1 at the criterion. \
                 Each verdict is firm, provisional or uncertain: firm means it stands over the panel \
                 counts and the model's settings; provisional, that another panel count could cross a \
                 line (its share within {noise:.0} points of one, too few panels, or much of it beside \
                 sharp edges); uncertain, that the sensitivity runs, the panel counts or the two sides \
                 give another verdict, so it rests on the model. A verdict holds at this run's speed \
                 only (the example coupe's boot deck, cases/coupe.stl, read 32 % separated, firm, at 60 \
                 km/h and 0 % at 200 km/h, as its layer turns turbulent sooner).",
                noise = 100.0 * crate::region::VERDICT_NOISE
            ),
        });
    }
    if case.file.flow.yaw != 0.0 {
        sections.push(TextSection {
            title: "Cross wind".into(),
            body: cross_wind_text(s, case.file.flow.yaw),
        });
    }
    if let Some(w) = &s.separated_wakes {
        sections.push(TextSection {
            title: "Separated regions".into(),
            body: loop_text(w),
        });
    }
    sections.push(TextSection {
        title: "Words used here".into(),
        body: WORDS_USED.into(),
    });
    Report {
        caption,
        summary,
        numbers,
        warnings: s.warnings.clone(),
        notes_pointer: (!s.notes.is_empty()).then(|| {
            let (notes, they) = if s.notes.len() == 1 {
                ("note", "it bears")
            } else {
                ("notes", "they bear")
            };
            format!(
                "Read the {notes} on the mesh and the model below: {they} on how far the numbers \
                 hold."
            )
        }),
        pictures,
        sections,
        // Loads resting on a defect of the surface head the page (a review
        // read the numbers table before the warning that voids it).
        cautions: s
            .warnings
            .iter()
            .filter(|w| w.starts_with(crate::pipeline::BROKEN_EDGE_WORDS))
            .cloned()
            .chain(lift_sign_caution(s))
            .collect(),
        generator: s.tool.clone(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The glossary's verdict lines are the ones the verdicts use.
    #[test]
    fn the_words_used_give_the_verdict_lines() {
        let [attached, separated] = crate::region::VERDICT_LINES.map(|v| 100.0 * v);
        assert!(WORDS_USED.contains(&format!(
            "attached under {attached:.0} % of its area separated, separated from {separated:.0} %"
        )));
    }

    /// A 1:4 model at 45 m/s (Re 3.36 million on 1.125 m) is noted as a
    /// 4.5 m car at 11.25 m/s; the car at 130 km/h (10.8 million) is not.
    #[test]
    fn a_low_reynolds_number_is_read_as_a_slow_cars() {
        let mut s = Summary {
            case: serde_json::json!({"flow": {"speed": 45.0, "viscosity": 1.506e-5}}),
            reynolds_number: 45.0 * 1.125 / 1.506e-5,
            ..Summary::default()
        };
        s.reference.length_m = 1.125;
        let n = reynolds_note(&s).unwrap();
        assert!(
            n.starts_with("Reynolds number 3.36 million on the 1.125 m reference length: a 4.5 m car's at 11.25 m/s (40 km/h)"),
            "{n}"
        );
        s.reynolds_number = 1.079e7;
        assert!(reynolds_note(&s).is_none());
    }

    /// The power in a cross wind is the force along the body's axis at
    /// the car's own speed (a review's numbers: C_D 0.1555 and C_S 0.016
    /// at 8 degrees, the axial 0.1517); straight ahead the drag at the
    /// wind's speed; and the side force's share of the drag is the
    /// lateral force's times sin(yaw).
    #[test]
    fn a_cross_wind_takes_the_power_along_the_axis() {
        let mut s = Summary {
            case: serde_json::json!({"flow": {"speed": 40.0, "yaw": 8.0}}),
            ..Summary::default()
        };
        s.coefficients.drag = 0.1555;
        s.coefficients.side = 0.016;
        let [axial, lateral] = s.coefficients.body_axes(8.0);
        assert!((axial - 0.1517).abs() < 5e-4, "{axial}");
        let (factor, car) = power_factor(&s, 40.0);
        assert!((car - 40.0 * 8f64.to_radians().cos()).abs() < 1e-12);
        assert!((factor * 0.1555 - axial * car / 1000.0).abs() < 1e-12);
        assert!(power_at_words(&s, 40.0).starts_with("at the car's 39.6 m/s"));
        let share = side_share_of_drag(&s.coefficients, 8.0);
        assert!((share - lateral * 8f64.to_radians().sin()).abs() < 1e-15);
        assert!((axial * 8f64.to_radians().cos() + share - 0.1555).abs() < 1e-12);
        s.case = serde_json::json!({"flow": {"speed": 40.0, "yaw": 0.0}});
        assert_eq!(power_factor(&s, 40.0), (0.04, 40.0));
        assert_eq!(power_at_words(&s, 40.0), "at 40 m/s");
    }

    /// `body` with a closed box beside it, its least corner at `lo` and
    /// its edges `size` along x, y and z, m.
    fn with_box(body: &tuft_mesh::TriMesh, lo: Point3<f64>, size: [f64; 3]) -> tuft_mesh::TriMesh {
        let corners = (0..8u32).map(|k| {
            Point3::new(
                lo.x + size[0] * f64::from(k & 1),
                lo.y + size[1] * f64::from((k >> 1) & 1),
                lo.z + size[2] * f64::from((k >> 2) & 1),
            )
        });
        let n = u32::try_from(body.vertices.len()).unwrap();
        let mut vertices = body.vertices.clone();
        vertices.extend(corners);
        let mut triangles = body.triangles.clone();
        for t in [
            [0, 2, 1],
            [1, 2, 3],
            [4, 5, 6],
            [5, 7, 6],
            [0, 1, 4],
            [1, 5, 4],
            [2, 6, 3],
            [3, 6, 7],
            [0, 4, 2],
            [2, 4, 6],
            [1, 3, 5],
            [3, 7, 5],
        ] {
            triangles.push(t.map(|v: u32| v + n));
        }
        tuft_mesh::TriMesh::new(vertices, triangles).unwrap()
    }

    /// The floor's height is the flat underside's on the slant-back body
    /// (0.05 m above the ground, its generator's clearance), and stays
    /// there with a block standing on the ground under the nose, as a tyre
    /// does.
    #[test]
    fn the_floor_lies_where_most_of_the_downward_surface_is() {
        use tuft_mesh::{Mirrors, generate};
        let body = generate::ahmed(25.0, 3000).unwrap();
        let mesh = PanelMesh::new(body.clone(), Mirrors::none()).unwrap();
        let z = floor_z(&mesh).unwrap();
        assert!((z - 0.05).abs() < 1e-6, "floor at {z}");
        // A 0.1 x 0.1 m block from the ground up into the floor.
        let both = PanelMesh::new(
            with_box(&body, Point3::new(0.2, -0.05, 0.0), [0.1, 0.1, 0.06]),
            Mirrors::none(),
        )
        .unwrap();
        assert_eq!(both.bounds().0.z, 0.0);
        let z = floor_z(&both).unwrap();
        assert!((z - 0.05).abs() < 1e-6, "floor at {z} with the block");
    }

    /// The floor's heights at the axles come from the flat floor: on the
    /// slant-back body (floor 0.05 m above the ground) with a 10-degree
    /// ramp starting 50 mm ahead of a rear axle, both read 50 mm, level
    /// (the lowest surface within reach of the axle had read the ramp,
    /// about 54 mm); the same body pitched 1 degree nose down about the
    /// rear axle reads 1 degree, and the front axle's floor lower by the
    /// wheelbase times its tangent.
    #[test]
    fn the_floor_heights_come_from_the_flat_floor() {
        use tuft_mesh::{Mirrors, TriMesh, generate};
        let body = generate::ahmed(0.0, 4000).unwrap();
        let axles = [0.3, 0.8];
        let ground = Mirrors {
            ground: Some(0.0),
            ..Mirrors::none()
        };
        let ramp = 10f64.to_radians().tan();
        let mut ramped = body.vertices.clone();
        for v in &mut ramped {
            if (v.z - 0.05).abs() < 1e-9 && v.x > 0.75 {
                v.z += (v.x - 0.75) * ramp;
            }
        }
        let mesh = PanelMesh::new(
            TriMesh::new(ramped, body.triangles.clone()).unwrap(),
            ground,
        )
        .unwrap();
        let [f, r] = floor_heights(&mesh, axles).unwrap();
        assert!(
            (f - 0.05).abs() < 1e-4 && (r - 0.05).abs() < 1e-4,
            "front {f}, rear {r}"
        );
        let pitch = 1f64.to_radians();
        let pitched: Vec<Point3<f64>> = body
            .vertices
            .iter()
            .map(|v| {
                // Nose down: the front falls as x falls below the rear axle.
                let (dx, dz) = (v.x - axles[1], v.z - 0.05);
                Point3::new(
                    axles[1] + dx * pitch.cos() - dz * pitch.sin(),
                    v.y,
                    0.05 + dx * pitch.sin() + dz * pitch.cos(),
                )
            })
            .collect();
        // Lift it so that its lowest point stays above the ground.
        let lift = 0.02;
        let pitched: Vec<Point3<f64>> = pitched
            .into_iter()
            .map(|v| Point3::new(v.x, v.y, v.z + lift))
            .collect();
        let mesh = PanelMesh::new(
            TriMesh::new(pitched, body.triangles.clone()).unwrap(),
            ground,
        )
        .unwrap();
        let [f, r] = floor_heights(&mesh, axles).unwrap();
        let rake = (r - f).atan2(axles[1] - axles[0]).to_degrees();
        assert!((rake - 1.0).abs() < 0.02, "rake {rake}");
        assert!((r - (0.05 + lift)).abs() < 1e-3, "rear {r}");
        // A roof box over the rear half, its flat underside facing down on
        // the centre line 0.36 m up: not floor (a review's had read the
        // floor 16 degrees nose down).
        let boxed = PanelMesh::new(
            with_box(&body, Point3::new(0.55, -0.1, 0.36), [0.3, 0.2, 0.06]),
            ground,
        )
        .unwrap();
        let [f, r] = floor_heights(&boxed, axles).unwrap();
        assert!(
            (f - 0.05).abs() < 1e-4 && (r - 0.05).abs() < 1e-4,
            "front {f}, rear {r} under a roof box"
        );
    }

    /// The force band scales the central force by the band's coefficients
    /// (same speed, same reference area): F = C_D q A.
    #[test]
    fn drag_force_band_scales_with_the_coefficients() {
        let d = crate::summary::DragEstimate {
            cd: 0.2,
            cd_low: 0.1,
            cd_high: 0.4,
            band: String::new(),
            force_n: 300.0,
        };
        assert_eq!(super::drag_force_words(&d, 1.0, 0), "300 (150 to 600)");
        // Power P = F V: at 40 m/s, 12 kW (6 to 24).
        assert_eq!(super::drag_force_words(&d, 0.04, 1), "12.0 (6.0 to 24.0)");
    }

    /// At yaw the summary's pitch is about the body's lateral axis, the
    /// axis the axle split uses (it had been about the wind axes' side
    /// axis): the moment the axle loads carry about the moment point,
    /// `F_f (x_r - x_f) - (x_r - x_m) L`, is the pitch times `q A l`.
    #[test]
    fn pitch_at_yaw_is_about_the_body_axis_of_the_axle_split() {
        use tuft_mesh::{Mirrors, PanelMesh, generate};
        use tuft_solver::loads::{FlowState, Reference, integrate_loads};
        let mesh = PanelMesh::new(generate::icosphere(0.5, 2), Mirrors::none()).unwrap();
        let reference = Reference::from_mesh(&mesh, -0.3, 0.3);
        // A lopsided pressure: suction on the front right, pressure on the
        // rear left, so the body has rolling and pitching moments.
        let cp: Vec<f64> = mesh
            .panels
            .iter()
            .map(|p| p.centroid.y - 0.7 * p.centroid.x + 0.3 * p.centroid.z)
            .collect();
        let air = FlowState {
            density: 1.204,
            speed: 40.0,
            yaw: 15f64.to_radians(),
        };
        let l = integrate_loads(&mesh, &cp, None, &reference, &air).unwrap();
        let k = super::coefficient_set(&l, &reference);
        let qal = l.dynamic_pressure * reference.area * reference.length;
        let (xf, xr, xm) = (
            reference.front_axle_x,
            reference.rear_axle_x,
            reference.moment_point.x,
        );
        let axle_moment = l.axles.front * (xr - xf) - (xr - xm) * l.lift;
        assert!(
            (k.pitch * qal - axle_moment).abs() < 1e-9 * axle_moment.abs().max(1.0),
            "{} against {axle_moment}",
            k.pitch * qal
        );
        // The wind-axis pitch is another number at this yaw.
        assert!((l.total.coefficients.pitch - k.pitch).abs() > 1e-3, "{k:?}");
    }

    /// The underbody's part is named whenever it pulls down, whatever the
    /// total's sign (a chin spoiler's run: +20 kg in all, -108 kg of it
    /// from the underbody); not in free air, nor when it is negligible.
    #[test]
    fn the_underbodys_part_is_named_whenever_it_pulls_down() {
        // A review's SUV: downforce on both axles, all of it the floor's.
        let mut suv = crate::summary::Summary::default();
        suv.mesh.ground_z = Some(0.0);
        suv.lift_kg.total = -74.0;
        suv.lift_kg.front_axle = -49.0;
        suv.lift_kg.rear_axle = -25.0;
        suv.lift_kg.underbody = -162.0;
        suv.lift_kg.underbody_front_axle = -83.0;
        suv.lift_kg.underbody_rear_axle = -79.0;
        let words = super::underbody_words(&suv).unwrap();
        assert!(
            words.ends_with(
                "; the downforce on the whole body, the front axle and the rear axle is the floor's: \
                 without its suction the rest of the body lifts there (+88 kg, +34 kg and +54 kg), so \
                 read neither its sign nor its size as the car's"
            ),
            "{words}"
        );
        // The report carries it among its cautions, at the top.
        let caution = super::lift_sign_caution(&suv).unwrap_or_default();
        assert!(
            caution.starts_with(
                "Lift: the downforce on the whole body, the front axle and the rear axle"
            ) && caution.ends_with("(a real floor sucks far less)."),
            "{caution}"
        );
        // The rear's own downforce stays when the rest pulls down there too.
        suv.lift_kg.rear_axle = -85.0;
        suv.lift_kg.total = -134.0;
        let words = super::underbody_words(&suv).unwrap();
        assert!(
            words.contains("the downforce on the whole body and the front axle is the floor's")
                && words.contains("(+28 kg and +34 kg)"),
            "{words}"
        );
        let mut s = crate::summary::Summary::default();
        s.mesh.ground_z = Some(0.0);
        s.lift_kg.total = 20.0;
        s.lift_kg.underbody = -108.0;
        s.lift_kg.underbody_front_axle = -60.0;
        s.lift_kg.underbody_rear_axle = -48.0;
        // Lifting in all and at each axle: no caution on the sign.
        s.lift_kg.front_axle = 8.0;
        s.lift_kg.rear_axle = 12.0;
        assert_eq!(super::lift_sign_caution(&s), None);
        let words = super::underbody_words(&s).unwrap();
        assert!(
            words.starts_with(
                "underbody -108 kg (front -60, rear -48), rest of the body +128 kg; the smooth \
                 underbody is the least certain part"
            ),
            "{words}"
        );
        s.lift_kg.underbody = -0.5;
        assert!(super::underbody_words(&s).is_none());
        s.lift_kg.underbody = -108.0;
        s.mesh.ground_z = None;
        assert!(super::underbody_words(&s).is_none());
    }

    /// The clearance row: the lowest point above the ground in mm, words
    /// for a body standing on it and for free air.
    #[test]
    fn the_clearance_is_the_lowest_point_above_the_ground() {
        let mut s = crate::summary::Summary::default();
        s.mesh.preparation = serde_json::json!({"bounds": [[0.0, -0.9, 0.12], [4.5, 0.9, 1.3]]});
        assert_eq!(super::clearance_words(&s), "no ground (free air)");
        s.mesh.ground_z = Some(0.0);
        assert_eq!(super::clearance_words(&s), "120");
        s.mesh.ground_z = Some(0.02);
        assert_eq!(super::clearance_words(&s), "100");
        s.mesh.ground_z = Some(0.12);
        assert_eq!(super::clearance_words(&s), "stands on the ground");
        // On four tyre patches (0.106 m^2 of a wrapped hatchback's), with
        // its floor 140 mm up at both axles: the floor's height beside it.
        s.mesh.preparation = serde_json::json!({
            "bounds": [[0.0, -0.9, 0.0], [4.3, 0.9, 1.5]],
            "wrap": {"contact_area": 0.106}
        });
        s.mesh.ground_z = Some(0.0);
        s.reference.floor_heights_m = Some([0.14, 0.14]);
        assert!(s.wheels_on());
        assert_eq!(
            super::clearance_words(&s),
            "stands on the ground on its tyres, its floor 140 mm above it"
        );
        assert_eq!(s.floor_clearance_m(), Some(0.14));
    }

    /// Facets still folded after the smoothing are noted with where the
    /// first lies; none, no note.
    #[test]
    fn facets_still_folded_are_noted_where_they_lie() {
        let mut u = tuft_mesh::coarsen::UntangleReport {
            folded_before: 91,
            folded_after: 48,
            first: [0.0; 3],
            still_folded_at: Some([0.007, 0.2, 0.468]),
            vertices_moved: 2818,
            largest_move: 0.038,
            largest_offset: 0.001,
        };
        assert_eq!(
            folds_note(&u).as_deref(),
            Some(
                "48 facets of the STL are still folded after the smoothing before the coarsening, the \
                 first near x 0.007, y 0.200, z 0.468 m: the panels there are unsure (many facets \
                 meeting at one point, as at a scan's pole, fold so; tuft check says more)"
            )
        );
        u.folded_after = 0;
        assert_eq!(folds_note(&u), None);
    }

    /// A loop run's drag leans low on a body that separates, and high on
    /// one that barely does (a streamlined body); without the loop it
    /// says neither.
    #[test]
    fn the_drag_leans_by_how_much_separates() {
        let mut s = Summary::default();
        assert_eq!(drag_lean(&s), None);
        s.separated_wakes = Some(crate::summary::SeparatedWakes::default());
        s.separation.fraction = 0.088;
        assert_eq!(
            drag_lean(&s),
            Some("the true drag is more likely above the estimate than below")
        );
        s.separation.fraction = 0.04;
        assert!(
            drag_lean(&s).is_some_and(|l| l.contains("can lie either side")),
            "{:?}",
            drag_lean(&s)
        );
        s.separation.fraction = 0.016;
        assert!(
            drag_lean(&s)
                .is_some_and(|l| l.contains("on a streamlined body the estimate runs high")),
            "{:?}",
            drag_lean(&s)
        );
    }

    /// A lift of zero reads 0 kg, not -0 (a sharp-edged box's report had
    /// said "the lift of -0 kg").
    #[test]
    fn small_lifts_read_without_a_minus_zero() {
        let l = crate::summary::LiftKg {
            total: -0.4,
            underbody: -6.0,
            ..Default::default()
        };
        let text = super::lift_text(&l, "kg at 40 m/s");
        assert!(text.starts_with("The lift of -0.40 kg at 40 m/s"), "{text}");
        assert!(text.contains("the rest of the body, +5.60 kg"), "{text}");
        let l = crate::summary::LiftKg {
            total: -0.0,
            underbody: -0.0,
            ..Default::default()
        };
        let text = super::lift_text(&l, "kg at 40 m/s");
        assert!(text.starts_with("The lift of 0.0 kg at 40 m/s"), "{text}");
        // A scale model's loads keep two digits of the largest.
        let l = crate::summary::LiftKg {
            total: -0.04,
            underbody: -0.3,
            ..Default::default()
        };
        let text = super::lift_text(&l, "kg at 40 m/s");
        assert!(
            text.starts_with("The lift of -0.040 kg at 40 m/s"),
            "{text}"
        );
    }
}
