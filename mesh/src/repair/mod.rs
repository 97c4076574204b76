//! Repair as explicit passes, each reporting what it changed.
//!
//! In order: [`weld`] vertices within a tolerance, [`drop_degenerate`]
//! facets, [`drop_duplicates`], duplicated layers (an open sheet lying on
//! another part's surface, [`LAYER_DISTANCE`]), [`drop_fins`],
//! [`orient_consistently`], [`close_holes`]
//! (mirror-closed loops accepted, small holes filled, others refused),
//! [`orient_outward`], [`remove_unused_vertices`]. Repair applied to its own
//! output changes nothing ([`RepairReport::changes`] is zero): welded
//! vertices are more than the tolerance apart, dropped facets are gone,
//! orientation is consistent and outward, filled holes are closed.
//!
//! ```
//! use tuft_mesh::{generate, repair, Mirrors};
//! let mut sphere = generate::icosphere(1.0, 2);
//! sphere.flip(); // inside out
//! let (fixed, report) = repair::repair(sphere, &Mirrors::none()).unwrap();
//! assert_eq!(report.outward.components_reversed, 1);
//! assert!(fixed.signed_volume() > 0.0);
//! ```

mod compact;
mod degenerate;
mod duplicates;
mod ear_clip;
pub(crate) mod edges;
mod fins;
mod holes;
mod layers;
mod orient;
mod outward;
mod weld;

use serde::Serialize;

pub use compact::remove_unused_vertices;
pub use degenerate::{DegenerateReport, drop_degenerate};
pub use duplicates::drop_duplicates;
pub use fins::drop_fins;
pub(crate) use holes::OFF_PLANE_TOLERANCES;
pub use holes::{
    HoleReport, HoleSettings, LoopInfo, Refusal, RefusedHole, SPAN_EDGES, circle_words,
    close_holes, describe_refused, hole_advice, hole_lead, hole_measure,
};
pub use layers::{DroppedLayer, LAYER_AREA_SHARE, LAYER_DISTANCE, describe_layers};
pub use orient::{OrientReport, orient_consistently};
pub use outward::{OutwardReport, orient_outward};
pub use weld::weld;

use crate::{MeshError, Mirrors, Point, TriMesh};

/// Repair settings. Lengths relative to the bounding-box diagonal `D` of
/// the input.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct RepairParams {
    /// Weld vertices closer than `weld_tolerance * D` (default `1e-5`:
    /// 50 micrometres on a 5 m car, far below scan resolution).
    pub weld_tolerance: f64,
    /// A facet whose largest angle exceeds this (degrees) ...
    pub sliver_angle_deg: f64,
    /// ... and whose `2A / L^2` is below this is a collapsed sliver.
    pub sliver_ratio: f64,
    /// Holes measured up to `hole_fill * D` are filled (default 2 %), a
    /// hole measured by the smaller of its perimeter and pi times its span
    /// ([`hole_measure`]). Here `D` is the whole body's diagonal: on a
    /// declared half model, that of its box mirrored in y = 0 (a review's
    /// half car read 4.631 m for its half, 4.88 m whole).
    pub hole_fill: f64,
    /// Holes measured up to `hole_fill_local` times the perimeter of
    /// the facets around them are filled too, whatever `D` (default 4).
    /// Such a hole is a few missing facets, a defect of the file, not a
    /// missing part of the body: with facets of edge `a` (perimeter `3a`),
    /// one lost facet leaves a hole of perimeter `3a`, the six around a
    /// vertex `6a`, a row of `n` facets `(n + 2) a`; `12a` takes a row of
    /// ten. A wheel arch or an open underbody spans many facets across, so
    /// its perimeter is many facet perimeters (a round opening `k` facets
    /// wide has about `3k` rim edges) and is still refused. The absolute
    /// limit alone fails coarse files, whose single facets are larger than
    /// 2 % of the diagonal.
    pub hole_fill_local: f64,
    /// A vertex within `plane_tolerance * D` of a mirror plane is on it.
    pub plane_tolerance: f64,
    /// A loop enclosing less than `slit_ratio * P^2` is a slit.
    pub slit_ratio: f64,
}

impl Default for RepairParams {
    fn default() -> Self {
        Self {
            weld_tolerance: 1e-5,
            sliver_angle_deg: 179.0,
            sliver_ratio: 1e-3,
            hole_fill: 0.02,
            hole_fill_local: 4.0,
            plane_tolerance: 1e-4,
            slit_ratio: 1e-4,
        }
    }
}

/// What each pass changed, and what the mesh looked like before and after.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct RepairReport {
    /// Facets in.
    pub input_facets: usize,
    /// Vertices in.
    pub input_vertices: usize,
    /// Bounding-box diagonal, metres (all relative tolerances scale with it).
    pub diagonal: f64,
    /// Weld tolerance, metres.
    pub weld_tolerance: f64,
    /// The weld had to be widened to this many times its tolerance: most
    /// facets shared no corner within it, an export that writes each
    /// facet's corners apart ([`WIDER_WELDS`]); 1 when not (0 in a report
    /// made before the weld ran).
    pub weld_widened: f64,
    /// Share of the edges the usual weld left open, when it was widened.
    pub open_before_widening: f64,
    /// Vertices merged into a neighbour.
    pub vertices_welded: usize,
    /// Degenerate facets dropped.
    pub degenerate: DegenerateReport,
    /// Duplicate facets dropped.
    pub duplicates: usize,
    /// Open parts lying on another part's surface, dropped as duplicated
    /// layers ([`LAYER_DISTANCE`]).
    pub layers: Vec<DroppedLayer>,
    /// How near another part's surface a duplicated layer lies, metres.
    pub layer_distance: f64,
    /// Facets dropped from edges shared an odd number of ways, three or
    /// more ([`drop_fins`]).
    pub fins: usize,
    /// Consistency pass.
    pub orientation: OrientReport,
    /// Boundary loops, non-manifold edges, holes filled.
    pub holes: HoleReport,
    /// Outward pass.
    pub outward: OutwardReport,
    /// Vertices no facet used, removed.
    pub unused_vertices: usize,
    /// Facets out.
    pub output_facets: usize,
    /// Vertices out.
    pub output_vertices: usize,
}

impl RepairReport {
    /// Number of changes made (zero when the mesh needed no repair).
    pub fn changes(&self) -> usize {
        self.vertices_welded
            + self.degenerate.total()
            + self.duplicates
            + self.layers.iter().map(|l| l.facets).sum::<usize>()
            + self.fins
            + self.orientation.facets_flipped
            + self.holes.facets_added
            + self.outward.facets_flipped
            + self.unused_vertices
    }
}

/// Share of the edges left open after the weld above which the facets
/// are taken not to share their corners (a closed or nearly closed surface
/// has a few per cent at most; one exported facet by facet, all of them).
pub const MOSTLY_OPEN: f64 = 0.5;

/// Facets from which a mesh whose edges are mostly open is taken for an
/// export written facet by facet, not for a few loose facets (a single
/// facet is an open hole, reported as such).
pub const UNWELDED_MIN_FACETS: usize = 100;

/// The factors the weld tolerance is widened by in turn while most edges
/// stay open ([`MOSTLY_OPEN`]): up to 3e-4 of the diagonal by default,
/// 1.5 mm on a 5 m car, under a third of the smallest facets a
/// million-facet scan of it has (a review's export with corners up to 0.2
/// mm apart in each axis had been refused for 3,954 holes, each facet's
/// own rim; at 0.5 mm six stayed open). Only a mesh that arrives mostly
/// open is welded wider.
pub const WIDER_WELDS: [f64; 3] = [3.0, 10.0, 30.0];

/// The factors tried in turn when a few edges stay open after the weld
/// ([`MOSTLY_OPEN`] or fewer): a weld this much wider is kept only if it
/// closes every one of them (a review's export with each facet's corners
/// up to 0.02 mm apart in each axis welded but for the copies furthest
/// apart, which left one hole at a fan pole; a real hole stays open and is
/// reported as before). Narrower than [`WIDER_WELDS`]: the mesh shares
/// its corners almost everywhere.
pub const FEW_OPEN_WELDS: [f64; 2] = [3.0, 10.0];

/// Share of the distinct edges of `mesh` used by one facet only, less
/// those lying on a declared mirror plane (within `tol` of it: a half
/// model's cut is open on purpose, and would keep the weld widening).
fn open_edge_share(mesh: &TriMesh, mirrors: &Mirrors, tol: f64) -> f64 {
    let uses = crate::repair::edges::sorted_edge_uses(&mesh.triangles);
    let on_plane = |v: u32| {
        let p = mesh.vertices[v as usize];
        (mirrors.symmetry && p.y.abs() <= tol)
            || mirrors.ground.is_some_and(|g| (p.z - g).abs() <= tol)
    };
    let (mut open, mut all) = (0usize, 0usize);
    for group in crate::repair::edges::edge_groups(&uses) {
        all += 1;
        let (a, b) = group[0].ends();
        open += usize::from(group.len() == 1 && !(on_plane(a) && on_plane(b)));
    }
    if all == 0 {
        0.0
    } else {
        open as f64 / all as f64
    }
}

/// The diagonal of the whole body whose box is `lo..hi`: on a declared
/// half model, that of the box mirrored in y = 0, so that a hole's fill
/// limit is the same fraction of the car whether it is run whole or half.
fn whole_diagonal(mut lo: Point, mut hi: Point, mirrors: &Mirrors) -> f64 {
    if mirrors.symmetry {
        (lo.y, hi.y) = (lo.y.min(-hi.y), hi.y.max(-lo.y));
    }
    (hi - lo).norm()
}

/// Repair with default settings.
///
/// # Errors
/// See [`repair_with_params`].
pub fn repair(mesh: TriMesh, mirrors: &Mirrors) -> Result<(TriMesh, RepairReport), MeshError> {
    repair_with_params(mesh, mirrors, &RepairParams::default())
}

/// Run every pass in order.
///
/// # Errors
/// [`MeshError::NoFacets`] for an empty mesh, [`MeshError::AllDegenerate`]
/// when no facet survives, [`MeshError::OpenHole`] for a hole that is too
/// large to fill and lies on no declared mirror plane.
pub fn repair_with_params(
    mut mesh: TriMesh,
    mirrors: &Mirrors,
    p: &RepairParams,
) -> Result<(TriMesh, RepairReport), MeshError> {
    let (lo, hi) = mesh.bounds().ok_or(MeshError::NoFacets)?;
    if mesh.is_empty() {
        return Err(MeshError::NoFacets);
    }
    let diagonal = (hi - lo).norm();
    let mut r = RepairReport {
        input_facets: mesh.len(),
        input_vertices: mesh.vertices.len(),
        diagonal,
        weld_tolerance: p.weld_tolerance * diagonal,
        ..RepairReport::default()
    };
    r.vertices_welded = weld(&mut mesh, r.weld_tolerance);
    r.weld_widened = 1.0;
    // Facets whose corners only nearly meet (an exporter that writes each
    // facet apart, with rounding): most edges open after the weld. Welded
    // wider, they close; a scan whose facets share their corners is never
    // touched.
    let exported = mesh.len() >= UNWELDED_MIN_FACETS;
    let plane_tol = p.plane_tolerance * diagonal;
    let open_share = |m: &TriMesh| open_edge_share(m, mirrors, plane_tol);
    let first_open = open_share(&mesh);
    if exported && first_open > 0.0 && first_open <= MOSTLY_OPEN {
        // A few corners only nearly meet: a wider weld kept only if it
        // closes them all.
        for factor in FEW_OPEN_WELDS {
            let mut wider = mesh.clone();
            let merged = weld(&mut wider, factor * r.weld_tolerance);
            if open_share(&wider) == 0.0 {
                mesh = wider;
                r.vertices_welded += merged;
                r.weld_widened = factor;
                r.open_before_widening = first_open;
                break;
            }
        }
    }
    if exported && first_open > MOSTLY_OPEN {
        r.open_before_widening = first_open;
        // Wider until every edge closes (a weld that closes most leaves
        // the corners whose copies lie furthest apart open).
        for factor in WIDER_WELDS {
            r.vertices_welded += weld(&mut mesh, factor * r.weld_tolerance);
            r.weld_widened = factor;
            if open_share(&mesh) == 0.0 {
                break;
            }
        }
    }
    r.weld_tolerance *= r.weld_widened;
    let left_open = if exported { open_share(&mesh) } else { 0.0 };
    if left_open > MOSTLY_OPEN {
        return Err(MeshError::UnweldedFacets {
            open_share: left_open,
            tolerance: r.weld_tolerance,
        });
    }
    r.degenerate = drop_degenerate(&mut mesh, p.sliver_angle_deg, p.sliver_ratio);
    if mesh.is_empty() {
        return Err(MeshError::AllDegenerate {
            facets: r.input_facets,
        });
    }
    r.duplicates = drop_duplicates(&mut mesh);
    let uses = edges::sorted_edge_uses(&mesh.triangles);
    r.layer_distance = LAYER_DISTANCE * diagonal;
    r.layers = layers::drop_layers(&mut mesh, &uses, mirrors, plane_tol, r.layer_distance);
    let uses = r.layers.is_empty().then_some(uses);
    let (fins, uses) = fins::drop_fins_with_uses(&mut mesh, uses);
    r.fins = fins;
    let (orientation, mut component) = orient::orient_with_uses(&mut mesh, &uses);
    r.orientation = orientation;
    let settings = HoleSettings {
        mirrors: *mirrors,
        plane_tolerance: p.plane_tolerance * diagonal,
        fill_limit: p.hole_fill * whole_diagonal(lo, hi, mirrors),
        local_factor: p.hole_fill_local,
        slit_ratio: p.slit_ratio,
    };
    r.holes = holes::close_holes_with_uses(&mut mesh, &mut component, &settings, &uses)?;
    drop(uses);
    r.outward = orient_outward(&mut mesh, &component, orientation.components, mirrors);
    r.unused_vertices = remove_unused_vertices(&mut mesh);
    r.output_facets = mesh.len();
    r.output_vertices = mesh.vertices.len();
    Ok((mesh, r))
}
