//! Wrapping: one outer surface for a mesh whose parts pass into each other,
//! that holds a part inside another, or that stands on the ground.
//!
//! A digital surface is often assembled from parts that run into each
//! other (wheels through the body, a spoiler into the boot lid) or lie
//! wholly inside it (an interior left in the export), and a clay model's
//! tyres stand on the floor. A panel method needs one closed surface round
//! one inside: facets inside the body carry doublets that no flow outside
//! can satisfy, and a tyre touching its own ground image puts panels on
//! top of their images. Wrapping rebuilds the outer surface on a grid of
//! cubic cells:
//!
//! 1. Inside or outside at every grid node, from the winding number along
//!    the grid lines in x, y and z: each facet a line crosses adds one or
//!    takes one away according to the side its normal faces, so a node
//!    inside any part counts one or more (inside two overlapping parts,
//!    two). A line through an edge or a vertex is decided by shifting it
//!    symbolically (simulation of simplicity; Edelsbrunner & Mücke 1990,
//!    ACM Trans. Graphics 9(1), from memory), computed the same way for
//!    every facet sharing the edge, so no crossing is counted twice or
//!    lost. A line whose count does not return to zero has passed through
//!    a hole; its nodes take the vote of the other two directions.
//! 2. The distance to the nearest facet at the nodes within two cells of
//!    the surface (closest point on a triangle, Ericson 2005), negative
//!    inside.
//! 3. The zero level of that signed distance cut into triangles by marching
//!    tetrahedra: six tetrahedra round each cell's main diagonal, so that
//!    neighbouring cells split their common face alike and the surface is
//!    closed and manifold (Doi & Koide 1991, IEICE Trans. E74(1), from
//!    memory). Each vertex sits at the linear zero of its grid edge, kept
//!    5 % of the edge away from either node so that no triangle collapses.
//!
//! Before the cut, gaps narrower than about four cells are closed
//! ([`close_gaps`]): a sheet of air one or two nodes thick between two
//! parts (a tyre 8 to 20 mm from its arch) left the surfaces on both sides
//! within a fraction of a cell of each other, with facets turned over
//! where the sheet thinned out, which the coarsening could not pass.
//!
//! Mirror planes: the mesh and its images decide inside and outside (a
//! half model's cut and a tyre's flat contact are closed by them), grid
//! nodes lie on the planes and only cells on the body's side are cut, so
//! the wrapped surface ends exactly on each plane, as a half model's cut
//! does, and the images close it again in the solver. A border closed by
//! a mirror must lie exactly on its plane: the grid lines lying in a plane
//! are shifted symbolically off it to the body's side, so they count the
//! mesh's facets there and not the image's, and pass through any gap
//! between the border and its image, however thin (`prepare` moves a half
//! model's border onto y = 0 after the repair, and a border on the ground,
//! a body cut at the floor, onto the ground). Nodes of the bottom
//! row below a part within [`WrapParams::contact_cells`] cells of the
//! ground are taken as inside: a tyre touching the ground meets it over a
//! contact patch instead of leaving a hair-thin gap to its image.
//!
//! The cell is the body length over [`WrapParams::cells_along_length`]
//! (11 mm on a 4.5 m car, an eighth of a default panel's edge): the wrapped
//! surface follows a smooth input to a small fraction of a cell, rounds
//! sharp edges over about a cell, loses parts thinner than about a cell
//! and closes gaps narrower than about four, all below the panels' own
//! resolution.

use std::collections::{HashMap, HashSet};

use rayon::prelude::*;
use serde::Serialize;

use crate::distance::closest_point_on_triangle;
use crate::trimesh::corner_box;
use crate::{Mirrors, Point, TriMesh, Vector};

/// Wrapping settings.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct WrapParams {
    /// Cells along the body's longest side (default 400).
    pub cells_along_length: usize,
    /// Most grid nodes; a larger box gets larger cells (default 30
    /// million: about 5 bytes a node of working memory, 150 MB, besides
    /// the facets of the mesh and its images and the wrapped surface).
    pub max_nodes: usize,
    /// A part whose lowest point is within this many cells of the ground
    /// stands on it (default 2).
    pub contact_cells: f64,
    /// How far below the ground the body may reach, as a fraction of its
    /// height, and be cut there as a tyre's contact is (default 5 %, 65 mm
    /// on a car); deeper, it is refused as an export with the wrong axes.
    pub max_ground_depth: f64,
    /// Wrap even when nothing calls for it: a baseline for an add-on whose
    /// own run is wrapped gets the same treatment (the wrap rounds sharp
    /// edges over about a cell and re-cuts the whole surface; a review's
    /// unchanged estate read 9 drag counts apart wrapped and not).
    pub always: bool,
}

impl Default for WrapParams {
    fn default() -> Self {
        Self {
            cells_along_length: 400,
            max_nodes: 30_000_000,
            contact_cells: 2.0,
            max_ground_depth: 0.05,
            always: false,
        }
    }
}

/// Why a mesh needs wrapping (all zero or `None`: it does not).
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct WrapReasons {
    /// Pairs of facets of different parts that cross each other.
    pub overlapping_pairs: usize,
    /// Parts lying wholly inside another part.
    pub enclosed_parts: usize,
    /// The body's lowest point above the ground (metres, negative below
    /// it) when it is within the contact distance.
    pub ground_gap: Option<f64>,
    /// Pairs of parts, neither crossing nor enclosing another, that come
    /// closer to each other than the gaps the wrap closes (a tyre in its
    /// arch with no ground declared), see [`GAP_NODES`].
    pub near_pairs: usize,
    /// The case asked for the wrap ([`WrapParams::always`]).
    pub asked: bool,
}

impl WrapReasons {
    /// True when any reason holds.
    pub fn any(&self) -> bool {
        self.asked
            || self.overlapping_pairs > 0
            || self.enclosed_parts > 0
            || self.ground_gap.is_some()
            || self.near_pairs > 0
    }
}

/// A part of the input (a connected surface) that lost area to the wrap.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct LostPart {
    /// Area lost, m^2.
    pub area: f64,
    /// The part's whole area, m^2 (what lies inside another part is not
    /// lost, so a part running into the body loses only what stands out).
    pub part_area: f64,
    /// The area-weighted centre of the lost facets, metres.
    pub at: [f64; 3],
}

impl LostPart {
    /// "0.412 m^2 near x 1.20, y 0.00, z 1.05 m (all of a part of 0.412
    /// m^2)", or the share of the part when some of it stays.
    pub fn words(&self) -> String {
        let [x, y, z] = self.at;
        let share = self.area / self.part_area.max(f64::MIN_POSITIVE);
        let fate = if share > WHOLE_PART_LOST {
            format!("all of a part of {:.3} m^2", self.part_area)
        } else {
            format!(
                "{:.0} % of a part of {:.3} m^2",
                100.0 * share,
                self.part_area
            )
        };
        format!(
            "{:.3} m^2 near x {x:.2}, y {y:.2}, z {z:.2} m ({fate})",
            self.area
        )
    }
}

/// A part that lost more than this share of its area is called lost
/// whole (the facets along a cut edge can stay; our choice).
const WHOLE_PART_LOST: f64 = 0.95;

/// What wrapping did (serializable).
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct WrapReport {
    /// Why it ran.
    pub reasons: WrapReasons,
    /// Cell edge, metres.
    pub cell: f64,
    /// Grid nodes along x, y and z.
    pub nodes: [usize; 3],
    /// Grid lines whose crossings did not add up to zero (through a hole).
    pub leaky_lines: usize,
    /// Facets before and after.
    pub input_facets: usize,
    /// Facets of the wrapped surface.
    pub output_facets: usize,
    /// Area before (overlapping and enclosed parts counted whole), m^2.
    pub input_area: f64,
    /// Area of the wrapped surface, m^2.
    pub output_area: f64,
    /// Volume the wrapped surface encloses (with its mirror cuts closed by
    /// the planes; the real body only), m^3.
    pub volume: f64,
    /// Area where the wrapped body stands on the ground, m^2.
    pub contact_area: f64,
    /// Gaps to the ground under this height were filled, metres.
    pub contact_gap: f64,
    /// Area of the input surface lost to the wrap: facets in cells the
    /// wrap found wholly outside (parts thinner than about a cell), m^2.
    pub lost_area: f64,
    /// Where the most of it was lost: the area-weighted centre of the lost
    /// facets of the part that lost the most, metres.
    pub lost_at: Option<[f64; 3]>,
    /// Each part of the input (a connected surface) that lost area, the
    /// most first.
    pub lost_parts: Vec<LostPart>,
    /// Area within the contact distance of the ground left open because
    /// it was too large for a tyre's contact (a floor), m^2.
    pub open_area: f64,
    /// Grid nodes filled in gaps of at most [`GAP_NODES`] nodes between
    /// parts (a tyre in its arch), see [`close_gaps`].
    pub gap_nodes: usize,
    /// The places closed (connected sets of filled nodes), largest first:
    /// their volume, m^3, and centre, metres.
    pub gap_places: Vec<(f64, [f64; 3])>,
}

impl WrapReport {
    /// One sentence on why and what the wrap did, in the words of
    /// `tuft check`.
    pub fn describe(&self) -> String {
        let r = &self.reasons;
        let mut why = Vec::new();
        if r.asked {
            why.push("the case asks for it (geometry.wrap = true)".to_string());
        }
        if r.overlapping_pairs > 0 {
            why.push(format!(
                "parts of the surface pass into each other ({} pairs of crossing facets)",
                r.overlapping_pairs
            ));
        }
        if r.enclosed_parts > 0 {
            why.push(format!(
                "{} part{} inside another",
                r.enclosed_parts,
                if r.enclosed_parts == 1 {
                    " lies"
                } else {
                    "s lie"
                }
            ));
        }
        if r.near_pairs > 0 {
            why.push(if r.near_pairs == 1 {
                "a pair of parts comes within about four cells of each other".to_string()
            } else {
                format!(
                    "{} pairs of parts come within about four cells of each other",
                    r.near_pairs
                )
            });
        }
        if let Some(gap) = r.ground_gap {
            let mm = 1000.0 * gap.abs();
            why.push(if mm < 0.05 {
                "the body touches the ground".to_string()
            } else if gap < 0.0 {
                format!("the body reaches {mm:.0} mm below the ground")
            } else {
                format!("the body comes within {mm:.1} mm of the ground")
            });
        }
        let mut ground = if self.contact_area > 0.0 {
            format!(
                ", standing on the ground over {:.3} m^2 (cut at the ground, gaps under {:.0} mm to it filled \
                 where a patch is small enough to be a tyre's contact)",
                self.contact_area,
                1000.0 * self.contact_gap
            )
        } else {
            String::new()
        };
        if self.open_area > 0.0 {
            ground += &format!(
                ", {:.3} m^2 within {:.0} mm of the ground left open (too large for a tyre's contact)",
                self.open_area,
                1000.0 * self.contact_gap
            );
        }
        format!(
            "{}: wrapped into one outer surface on {:.1} mm cells{ground}; {} facets ({:.2} m^2) became {} \
             ({:.2} m^2) enclosing {:.3} m^3; parts thinner than about a cell are lost{}, and gaps \
             between parts narrower than about four cells (a tyre in its arch) are closed{}",
            why.join(", "),
            1000.0 * self.cell,
            self.input_facets,
            self.input_area,
            self.output_facets,
            self.output_area,
            self.volume,
            if self.lost_area > 0.0 {
                format!(" ({:.3} m^2 of the input was)", self.lost_area)
            } else {
                String::new()
            },
            self.gap_words()
        )
    }

    /// Where gaps were closed, for [`WrapReport::describe`]: how many
    /// places, the air filled, and the largest few with their centres;
    /// fills of fewer than [`GAP_PLACE_NODES`] cells (a crease of the
    /// scan, a cell at an arch's lip) are counted apart.
    fn gap_words(&self) -> String {
        const SHOWN: usize = 4;
        if self.gap_places.is_empty() {
            return String::new();
        }
        let (gaps, creases): (Vec<_>, Vec<_>) = self
            .gap_places
            .iter()
            .partition(|p| is_gap_place(p.0, self.cell));
        let sum = |set: &[&(f64, [f64; 3])]| litres(set.iter().map(|p| p.0).sum());
        let small = match creases.len() {
            0 => String::new(),
            n => format!(
                "{}{n} fill{} of under {GAP_PLACE_NODES} cells in creases, {} litres together",
                if gaps.is_empty() { "" } else { "; besides, " },
                if n == 1 { "" } else { "s" },
                sum(&creases)
            ),
        };
        if gaps.is_empty() {
            return format!(" (no gap between parts; {small})");
        }
        let at: Vec<String> = gaps
            .iter()
            .take(SHOWN)
            .map(|(v, [x, y, z])| format!("{} near x {x:.2}, y {y:.2}, z {z:.2} m", litres(*v)))
            .collect();
        let more = gaps.len().saturating_sub(SHOWN);
        format!(
            " ({} litres of air in {} place{}: {}{}{small})",
            sum(&gaps),
            gaps.len(),
            if gaps.len() == 1 { "" } else { "s" },
            at.join("; "),
            if more > 0 {
                format!("; and {more} smaller")
            } else {
                String::new()
            }
        )
    }

    /// A warning when an underside larger than a tyre's contact lies within
    /// the contact distance of the ground and was left open.
    pub fn open_warning(&self) -> Option<String> {
        (self.open_area > 0.0).then(|| {
            format!(
                "{:.3} m^2 of the underside lies within {:.0} mm of the ground: panels of this size cannot \
                 resolve so narrow a gap to the ground's image, so the pressure there and the lift are rough; \
                 raise the body or give more panels",
                self.open_area,
                1000.0 * self.contact_gap
            )
        })
    }

    /// A warning when the wrap lost a part of the surface that matters:
    /// more than [`LOST_AREA_WARNING`] of the input area (enclosed parts
    /// are inside, not lost).
    pub fn lost_warning(&self) -> Option<String> {
        const SHOWN: usize = 4;
        let [x, y, z] = self.lost_at?;
        (self.lost_area > LOST_AREA_WARNING * self.input_area).then(|| {
            // Each part that lost a share worth naming, the most first
            // (a review's roadster had lost its windscreen glass and could
            // not tell what else of its hoops and glass had gone).
            let named: Vec<&LostPart> = self
                .lost_parts
                .iter()
                .filter(|p| p.area > LOST_PART_SHOWN * self.input_area)
                .collect();
            let parts = if named.is_empty() {
                format!("most of it near x {x:.3}, y {y:.3}, z {z:.3} m")
            } else {
                let more = self.lost_parts.len() - named.len().min(SHOWN);
                let list: Vec<String> = named.iter().take(SHOWN).map(|p| p.words()).collect();
                format!(
                    "{}: {}{}",
                    match self.lost_parts.len() {
                        1 => "from one part".to_string(),
                        n => format!("from {n} parts"),
                    },
                    list.join("; "),
                    match more {
                        0 => String::new(),
                        1 => "; and 1 more, smaller".to_string(),
                        n => format!("; and {n} more, smaller"),
                    }
                )
            };
            format!(
                "the wrap lost {:.3} m^2 of the surface ({parts}): parts thinner than its {:.1} mm cell, \
                 such as a sheet-thin spoiler, windscreen or mirror stalk, are not in the panels; thicken \
                 them in the STL to keep them",
                self.lost_area,
                1000.0 * self.cell
            )
        })
    }
}

/// Share of the input area whose loss to the wrap is warned about (our
/// choice: a thousandth of a car's surface is a mirror stalk's area).
pub const LOST_AREA_WARNING: f64 = 1e-3;

/// Share of the input area a part must lose to be named in
/// [`WrapReport::lost_warning`] (a tenth of the warning's; below it the
/// facets along a part's edge that a cell cuts off).
const LOST_PART_SHOWN: f64 = 1e-4;

/// The cell edge for a body with bounds `lo..hi`.
pub fn cell_size(lo: &Point, hi: &Point, params: &WrapParams) -> f64 {
    let ext = hi - lo;
    let mut h = ext.max() / params.cells_along_length.max(1) as f64;
    if !(h.is_finite() && h > 0.0) {
        return 0.0;
    }
    let most = params.max_nodes.max(1000) as f64;
    loop {
        let nodes: f64 = ext.iter().map(|e| e / h + 6.0).product();
        if nodes <= most {
            return h;
        }
        h *= (nodes / most).cbrt().max(1.01);
    }
}

/// Why `mesh` (repaired: closed but for mirror cuts, parts outward) needs
/// wrapping. `plane_tol` (metres) is how far a vertex may lie below the
/// ground and still be on it.
///
/// Standing on the ground: a vertex below the ground, or one within
/// [`WrapParams::contact_cells`] cells of it where the surface faces the
/// ground (its normal within 60 degrees of straight down), so that a
/// wedge-shaped gap to the image forms; a surface cut at the ground and
/// meeting it steeply (a half body of revolution, a scan cut at the
/// floor) needs nothing.
pub fn reasons(
    mesh: &TriMesh,
    mirrors: &Mirrors,
    params: &WrapParams,
    plane_tol: f64,
) -> WrapReasons {
    let Some((lo, hi)) = mesh.bounds() else {
        return WrapReasons::default();
    };
    let asked = params.always;
    let h = cell_size(&lo, &hi, params);
    let ground_gap = mirrors.ground.and_then(|g| {
        let contact = params.contact_cells * h;
        let mut normal = vec![Vector::zeros(); mesh.vertices.len()];
        for (t, tri) in mesh.triangles.iter().enumerate() {
            let a = mesh.area_vector(t);
            for &v in tri {
                normal[v as usize] += a;
            }
        }
        mesh.vertices
            .iter()
            .zip(&normal)
            .map(|(p, n)| (p.z - g, n))
            .filter(|&(gap, n)| gap < -plane_tol || (gap < contact && n.z < -0.5 * n.norm()))
            .map(|(gap, _)| gap)
            .reduce(f64::min)
    });
    let part = crate::crossing::surfaces(mesh);
    let parts = {
        let mut ids = part.clone();
        ids.sort_unstable();
        ids.dedup();
        ids.len()
    };
    if parts < 2 {
        return WrapReasons {
            ground_gap,
            asked,
            ..WrapReasons::default()
        };
    }
    let overlapping: Vec<_> = crate::crossing::crossings(mesh)
        .into_iter()
        .filter(|c| !c.same_surface)
        .collect();
    let crossing_parts: HashSet<usize> = overlapping
        .iter()
        .flat_map(|c| [part[c.facet], part[c.other]])
        .collect();
    let enclosed = enclosed_parts(mesh, &part, &crossing_parts);
    // Only worth the search when nothing else calls for the wrap.
    let near_pairs = if overlapping.is_empty() && enclosed == 0 && ground_gap.is_none() {
        near_pairs(mesh, &part, (GAP_NODES + 1) as f64 * h)
    } else {
        0
    };
    WrapReasons {
        overlapping_pairs: overlapping.len(),
        enclosed_parts: enclosed,
        ground_gap,
        near_pairs,
        asked,
    }
}

/// Most vertices of a part tested against another part in [`near_pairs`]
/// (evenly spread): enough for a tyre's tread (our choice).
const NEAR_SAMPLES: usize = 20_000;

/// Pairs of parts (`part`: each facet's) that come within `reach` of each
/// other: for each pair whose boxes, widened by `reach`, overlap, the
/// smaller part's vertices (up to [`NEAR_SAMPLES`]) against the larger's
/// facets.
fn near_pairs(mesh: &TriMesh, part: &[usize], reach: f64) -> usize {
    let mut facets: HashMap<usize, Vec<[u32; 3]>> = HashMap::new();
    for (t, &p) in part.iter().enumerate() {
        facets.entry(p).or_default().push(mesh.triangles[t]);
    }
    let mut parts: Vec<(usize, Vec<[u32; 3]>)> = facets.into_iter().collect();
    parts.sort_by_key(|(p, _)| *p);
    let boxes: Vec<(Point, Point)> = parts
        .iter()
        .map(|(_, tris)| {
            let corners = tris.iter().flatten().map(|&v| mesh.vertices[v as usize]);
            corners.fold(
                (
                    Point::from(Vector::repeat(f64::INFINITY)),
                    Point::from(Vector::repeat(f64::NEG_INFINITY)),
                ),
                |(lo, hi), p| (lo.inf(&p), hi.sup(&p)),
            )
        })
        .collect();
    // The pairs near enough to test, each as (smaller part, larger part).
    let mut pairs = Vec::new();
    for a in 0..parts.len() {
        for b in a + 1..parts.len() {
            let ((alo, ahi), (blo, bhi)) = (boxes[a], boxes[b]);
            if (0..3).any(|k| alo[k] > bhi[k] + reach || blo[k] > ahi[k] + reach) {
                continue;
            }
            pairs.push(if parts[a].1.len() <= parts[b].1.len() {
                (a, b)
            } else {
                (b, a)
            });
        }
    }
    // Each larger part's facets binned once, however many pairs it is in
    // (a body with four tyres).
    let bigs: HashSet<usize> = pairs.iter().map(|&(_, big)| big).collect();
    let targets: HashMap<usize, TriMesh> = bigs
        .into_iter()
        .map(|big| {
            let target = TriMesh {
                vertices: mesh.vertices.clone(),
                triangles: parts[big].1.clone(),
            };
            (big, target)
        })
        .collect();
    let grids: HashMap<usize, crate::distance::SurfaceGrid<'_>> = targets
        .iter()
        .filter_map(|(&big, m)| {
            let (lo, hi) = m.bounds()?;
            Some((big, crate::distance::SurfaceGrid::new(m, lo, hi)))
        })
        .collect();
    pairs
        .iter()
        .filter(|&&(small, big)| {
            let Some(grid) = grids.get(&big) else {
                return false;
            };
            let mut vertices: Vec<u32> = parts[small].1.iter().flatten().copied().collect();
            vertices.sort_unstable();
            vertices.dedup();
            let step = vertices.len().div_ceil(NEAR_SAMPLES).max(1);
            vertices
                .par_iter()
                .step_by(step)
                .any(|&v| grid.distance(&mesh.vertices[v as usize]) < reach)
        })
        .count()
}

/// Parts, other than those in `crossing`, with a vertex inside another
/// part (winding number of that part's facets along a ray in +x): such a
/// part lies wholly inside.
fn enclosed_parts(mesh: &TriMesh, part: &[usize], crossing: &HashSet<usize>) -> usize {
    let Some(bins) = PartRays::new(mesh, part) else {
        return 0;
    };
    let mut first_vertex: HashMap<usize, u32> = HashMap::new();
    for (t, tri) in mesh.triangles.iter().enumerate() {
        if !crossing.contains(&part[t]) {
            first_vertex.entry(part[t]).or_insert(tri[0]);
        }
    }
    first_vertex
        .par_iter()
        .filter(|&(&p, &v)| bins.inside_another(p, &mesh.vertices[v as usize]))
        .count()
}

/// The facets of a mesh and the part each belongs to
/// ([`crate::crossing::surfaces`]), binned for rays along x: whether a
/// point of one part lies inside another.
pub(crate) struct PartRays<'a> {
    mesh: &'a TriMesh,
    part: &'a [usize],
    bins: RayBins,
}

impl<'a> PartRays<'a> {
    /// `None` for an empty mesh.
    pub(crate) fn new(mesh: &'a TriMesh, part: &'a [usize]) -> Option<Self> {
        let (lo, hi) = mesh.bounds()?;
        Some(Self {
            mesh,
            part,
            bins: RayBins::new(mesh, &lo, &hi),
        })
    }

    /// Whether `s`, a point of part `own`, lies inside another part: the
    /// winding number of each other part along the ray from `s` in +x,
    /// counted as the wrap's grid lines count it.
    pub(crate) fn inside_another(&self, own: usize, s: &Point) -> bool {
        let mut winding: HashMap<usize, i32> = HashMap::new();
        for &t in self.bins.facets_near(s) {
            let t = t as usize;
            if self.part[t] == own {
                continue;
            }
            if let Some((x, sign)) = line_crossing(&self.mesh.corners(t), 0, [s.y, s.z])
                && x > s.x
            {
                *winding.entry(self.part[t]).or_insert(0) += sign;
            }
        }
        winding.values().any(|&w| w != 0)
    }
}

/// Facets binned by their extent in y and z, for rays along x.
struct RayBins {
    origin: [f64; 2],
    cell: [f64; 2],
    dims: [usize; 2],
    bins: Vec<Vec<u32>>,
}

impl RayBins {
    fn new(mesh: &TriMesh, lo: &Point, hi: &Point) -> Self {
        let n = ((mesh.len() as f64 / 4.0).sqrt().ceil() as usize).clamp(1, 256);
        let origin = [lo.y, lo.z];
        let cell = [
            ((hi.y - lo.y) / n as f64).max(1e-12),
            ((hi.z - lo.z) / n as f64).max(1e-12),
        ];
        let mut bins = vec![Vec::new(); n * n];
        let at =
            |k: usize, c: f64| (((c - origin[k]) / cell[k]).floor().max(0.0) as usize).min(n - 1);
        for t in 0..mesh.len() {
            let (mn, mx) = mesh.facet_box(t);
            for i in at(0, mn.y)..=at(0, mx.y) {
                for j in at(1, mn.z)..=at(1, mx.z) {
                    bins[i * n + j].push(t as u32);
                }
            }
        }
        Self {
            origin,
            cell,
            dims: [n, n],
            bins,
        }
    }

    fn facets_near(&self, p: &Point) -> &[u32] {
        let at = |k: usize, c: f64| {
            (((c - self.origin[k]) / self.cell[k]).floor().max(0.0) as usize).min(self.dims[k] - 1)
        };
        &self.bins[at(0, p.y) * self.dims[1] + at(1, p.z)]
    }
}

/// Side of the point `s` against the edge `p -> q` (in the plane of the
/// two coordinates other than a line's direction): +1 left, -1 right.
/// The edge is taken from its lexicographically lower end, so every facet
/// sharing it computes the same value, and a point on the edge's line is
/// decided by shifting it by `e (1, d)` with `d` far smaller than the
/// infinitesimal `e` (simulation of simplicity). 0 only for an edge of no
/// length.
fn edge_side(p: [f64; 2], q: [f64; 2], s: [f64; 2]) -> i32 {
    let forward = p[0] < q[0] || (p[0] == q[0] && p[1] <= q[1]);
    let (a, b) = if forward { (p, q) } else { (q, p) };
    let (du, dv) = (b[0] - a[0], b[1] - a[1]);
    let e = du * (s[1] - a[1]) - dv * (s[0] - a[0]);
    let side = if e != 0.0 {
        e.signum()
    } else if dv != 0.0 {
        -dv.signum()
    } else if du != 0.0 {
        du.signum()
    } else {
        0.0
    } as i32;
    if forward { side } else { -side }
}

/// Where the line along axis `d` through the point `s` (its coordinates
/// along the next two axes, cyclically) crosses the facet, and the change
/// of winding number there: +1 where the line enters (the facet's normal
/// faces against the line), -1 where it leaves.
fn line_crossing(corners: &[Point; 3], d: usize, s: [f64; 2]) -> Option<(f64, i32)> {
    let (u, v) = ((d + 1) % 3, (d + 2) % 3);
    let p = corners.map(|c| [c[u], c[v]]);
    let a = edge_side(p[0], p[1], s);
    let b = edge_side(p[1], p[2], s);
    let c = edge_side(p[2], p[0], s);
    if a == 0 || a != b || b != c {
        return None;
    }
    let n = (corners[1] - corners[0]).cross(&(corners[2] - corners[0]));
    if n[d] == 0.0 {
        return None;
    }
    let o = corners[0];
    let t = o[d] - (n[u] * (s[0] - o[u]) + n[v] * (s[1] - o[v])) / n[d];
    // A facet seen almost edge-on has a tiny n[d]; keep the crossing on it.
    let lo = corners[0][d].min(corners[1][d]).min(corners[2][d]);
    let hi = corners[0][d].max(corners[1][d]).max(corners[2][d]);
    let t = t.clamp(lo, hi);
    // `a` is the facet's turning sense seen along the line, the sign of n[d].
    Some((t, -a))
}

/// The grid: nodes at `origin + h (i, j, k)`, x slowest.
struct Grid {
    origin: Point,
    h: f64,
    n: [usize; 3],
}

impl Grid {
    fn new(lo: &Point, hi: &Point, mirrors: &Mirrors, h: f64) -> Self {
        let margin = 2.0 * h;
        let mut origin = lo - Vector::repeat(margin);
        // Nodes on each plane's lattice, starting on the plane itself when
        // the body comes within the margin of it (a far ground adds no nodes).
        let on_lattice = |plane: f64, low: f64| plane + ((low - plane) / h).floor().max(0.0) * h;
        if mirrors.symmetry {
            origin.y = on_lattice(0.0, origin.y);
        } else {
            // Nodes symmetric about y = 0, so that a symmetric body wraps
            // the same on both sides (within the tetrahedra's split).
            origin.y = (origin.y / h).floor() * h;
        }
        // On the ground's lattice only when the body comes within the
        // margin of it (its contact and its cut must end on the plane); a
        // body standing clear keeps its own grid, so that moving the
        // ground (a ride-height sweep) wraps the same surface (a review's
        // SUV with mirrors, 180 mm clear, was cut anew at each height and
        // its drag trend carried 2 to 12 counts of the panels' noise).
        if let Some(g) = mirrors.ground
            && origin.z <= g
        {
            origin.z = on_lattice(g, origin.z);
        }
        let n = [0, 1, 2].map(|k| ((hi[k] + margin - origin[k]) / h).ceil().max(1.0) as usize + 1);
        Self { origin, h, n }
    }

    fn len(&self) -> usize {
        self.n.iter().product()
    }

    fn index(&self, c: [usize; 3]) -> usize {
        (c[0] * self.n[1] + c[1]) * self.n[2] + c[2]
    }

    fn coords(&self, index: usize) -> [usize; 3] {
        let k = index % self.n[2];
        let rest = index / self.n[2];
        [rest / self.n[1], rest % self.n[1], k]
    }

    fn point(&self, c: [usize; 3]) -> Point {
        self.origin + Vector::new(c[0] as f64, c[1] as f64, c[2] as f64) * self.h
    }

    /// Node indices along `axis` whose coordinate lies in `lo..=hi`.
    fn range(&self, axis: usize, lo: f64, hi: f64) -> Option<(usize, usize)> {
        let first = ((lo - self.origin[axis]) / self.h).ceil().max(0.0);
        let last = ((hi - self.origin[axis]) / self.h).floor();
        let top = (self.n[axis] - 1) as f64;
        (last >= 0.0 && first <= top && first <= last)
            .then(|| (first as usize, last.min(top) as usize))
    }
}

/// The facets of the mesh and of its images, outward.
fn facets_with_images(mesh: &TriMesh, mirrors: &Mirrors) -> Vec<[Point; 3]> {
    let mut out: Vec<[Point; 3]> = (0..mesh.len()).map(|t| mesh.corners(t)).collect();
    for r in mirrors.images() {
        for t in 0..mesh.len() {
            let [a, b, c] = mesh.corners(t).map(|p| r.point(&p));
            out.push(if r.reverses_orientation() {
                [a, c, b]
            } else {
                [a, b, c]
            });
        }
    }
    out
}

/// Votes on inside and outside: per node, how many of the three line
/// directions know (their line's crossings add up to zero) and how many of
/// those say inside. Returns the count of lines that did not add up.
fn winding_votes(facets: &[[Point; 3]], grid: &Grid, known: &mut [u8], inside: &mut [u8]) -> usize {
    let mut leaky = 0;
    for d in 0..3 {
        let (u, v) = ((d + 1) % 3, (d + 2) % 3);
        let nv = grid.n[v];
        let mut hits: Vec<(u32, f64, i32)> = facets
            .par_iter()
            .flat_map_iter(|corners| {
                let mut found = Vec::new();
                let (mn, mx) = corner_box(corners);
                // One node wider on each side: the shifted line through a
                // node can fall inside a facet whose box ends on it, and
                // `line_crossing` decides exactly.
                let (lu, lv) = (
                    grid.range(u, mn[u] - grid.h, mx[u] + grid.h),
                    grid.range(v, mn[v] - grid.h, mx[v] + grid.h),
                );
                if let (Some((a0, a1)), Some((b0, b1))) = (lu, lv) {
                    for a in a0..=a1 {
                        for b in b0..=b1 {
                            let s = [
                                grid.origin[u] + a as f64 * grid.h,
                                grid.origin[v] + b as f64 * grid.h,
                            ];
                            if let Some((t, sign)) = line_crossing(corners, d, s) {
                                found.push(((a * nv + b) as u32, t, sign));
                            }
                        }
                    }
                }
                found
            })
            .collect();
        hits.par_sort_unstable_by(|x, y| x.0.cmp(&y.0).then(x.1.total_cmp(&y.1)));
        let mut next = 0;
        for line in 0..grid.n[u] * nv {
            let start = next;
            while next < hits.len() && hits[next].0 as usize == line {
                next += 1;
            }
            let line_hits = &hits[start..next];
            if line_hits.iter().map(|h| h.2).sum::<i32>() != 0 {
                leaky += 1;
                continue;
            }
            let (a, b) = (line / nv, line % nv);
            let mut w = 0;
            let mut p = 0;
            for m in 0..grid.n[d] {
                let s = grid.origin[d] + m as f64 * grid.h;
                while p < line_hits.len() && line_hits[p].1 < s {
                    w += line_hits[p].2;
                    p += 1;
                }
                let mut c = [0; 3];
                c[u] = a;
                c[v] = b;
                c[d] = m;
                let i = grid.index(c);
                known[i] += 1;
                inside[i] += u8::from(w > 0);
            }
        }
    }
    leaky
}

/// Distance to the nearest facet at every node within `band` of one,
/// `band` elsewhere. Parallel over slabs of x.
fn distances(facets: &[[Point; 3]], grid: &Grid, band: f64) -> Vec<f32> {
    const SLAB: usize = 4;
    let plane = grid.n[1] * grid.n[2];
    let slabs = grid.n[0].div_ceil(SLAB);
    let mut bins: Vec<Vec<u32>> = vec![Vec::new(); slabs];
    for (f, corners) in facets.iter().enumerate() {
        let (mn, mx) = corner_box(corners);
        if let Some((i0, i1)) = grid.range(0, mn.x - band, mx.x + band) {
            for bin in &mut bins[i0 / SLAB..=i1 / SLAB] {
                bin.push(f as u32);
            }
        }
    }
    let mut dist = vec![band as f32; grid.len()];
    dist.par_chunks_mut(SLAB * plane)
        .zip(bins.par_iter())
        .enumerate()
        .for_each(|(s, (chunk, bin))| {
            let first = s * SLAB;
            let last = first + chunk.len() / plane - 1;
            for &f in bin {
                let [a, b, c] = facets[f as usize];
                let (mn, mx) = corner_box(&facets[f as usize]);
                let ranges = [0, 1, 2].map(|k| grid.range(k, mn[k] - band, mx[k] + band));
                let [Some((i0, i1)), Some((j0, j1)), Some((k0, k1))] = ranges else {
                    continue;
                };
                for i in i0.max(first)..=i1.min(last) {
                    for j in j0..=j1 {
                        for k in k0..=k1 {
                            let p = grid.point([i, j, k]);
                            let d = (closest_point_on_triangle(&p, &a, &b, &c) - p).norm() as f32;
                            let slot = &mut chunk[((i - first) * grid.n[1] + j) * grid.n[2] + k];
                            if d < *slot {
                                *slot = d;
                            }
                        }
                    }
                }
            }
        });
    dist
}

/// Longest run of outside nodes, along a grid line between two inside
/// nodes, that is filled: gaps up to about four cells, 45 mm on a 4.5 m
/// car, half a default panel's edge (our choice, from reviews: a tyre 8 to
/// 20 mm from its arch on 12 to 15 mm cells, one or two nodes of air
/// between the parts, left folds the coarsening could not pass; closing
/// those and not a 30 mm one ran the same car as two different shapes,
/// C_D 0.233 closed and 0.116 open, and the 30 mm one folded too).
pub const GAP_NODES: usize = 3;

/// Rounds of [`close_gaps`] over the three grid directions.
const GAP_ROUNDS: usize = 3;

/// Close gaps narrower than about four cells: along every grid line, a run
/// of at most [`GAP_NODES`] outside nodes between two inside nodes is
/// filled. Such a gap leaves a sheet of air a few nodes thick between
/// two parts (a tyre and its arch, a spoiler and the boot lid): the
/// surfaces cut on both sides of it come within a fraction of a cell of
/// each other, their facets turn over where the sheet thins out, and the
/// panels, tens of cells wide, could not resolve the gap anyway. A concave
/// corner is not a gap (a line through it meets the inside on one side
/// only) and keeps its shape. Three rounds over the three directions: a
/// fill along one shortens runs along another. Returns the nodes filled.
fn close_gaps(grid: &Grid, field: &mut [f32]) -> Vec<usize> {
    let fill = -0.5 * grid.h as f32;
    let mut filled = Vec::new();
    for d in (0..3).cycle().take(3 * GAP_ROUNDS) {
        let (u, v) = ((d + 1) % 3, (d + 2) % 3);
        let nv = grid.n[v];
        let field_ref = &*field;
        let gaps: Vec<usize> = (0..grid.n[u] * nv)
            .into_par_iter()
            .flat_map_iter(|line| {
                let node = |m: usize| {
                    let mut c = [0; 3];
                    c[u] = line / nv;
                    c[v] = line % nv;
                    c[d] = m;
                    grid.index(c)
                };
                let mut out = Vec::new();
                let mut last_inside: Option<usize> = None;
                for m in 0..grid.n[d] {
                    if field_ref[node(m)] >= 0.0 {
                        continue;
                    }
                    if let Some(l) = last_inside
                        && m - l - 1 <= GAP_NODES
                    {
                        out.extend((l + 1..m).map(node));
                    }
                    last_inside = Some(m);
                }
                out
            })
            .collect();
        for &i in &gaps {
            field[i] = fill;
        }
        filled.extend(gaps);
    }
    filled
}

/// Fewest cells a closed place must hold to be called a gap between parts
/// (two cells a side): a scan's wrap fills single cells in creases by the
/// hundred (a review's 1.9-million-facet hatchback: 319 of its 331 places
/// were such fills, its tyres' gaps the two largest, 12 litres each); our
/// choice.
pub const GAP_PLACE_NODES: usize = 8;

/// Whether a closed place of `volume` m^3 on cells of `cell` metres holds
/// at least [`GAP_PLACE_NODES`] cells.
pub fn is_gap_place(volume: f64, cell: f64) -> bool {
    volume >= (GAP_PLACE_NODES as f64 - 0.5) * cell.powi(3)
}

/// A volume in m^3 as litres for people: to a tenth, or to two significant
/// digits below 0.05 litres (a review's car with its 70 mm arch gaps left
/// open read "0.0 litres of air in 4 places" for the bits of narrower gap
/// filled near the arches' lips).
pub fn litres(m3: f64) -> String {
    let l = 1000.0 * m3;
    if l >= 0.05 || l <= 0.0 {
        format!("{l:.1}")
    } else {
        let digits = (1.0 - l.log10().floor()).clamp(2.0, 6.0) as usize;
        format!("{l:.digits$}")
    }
}

/// The connected sets (through faces) of the nodes in `nodes`, largest
/// first: each set's volume (a cell per node) and centre.
fn places(grid: &Grid, mut nodes: Vec<usize>) -> Vec<(f64, [f64; 3])> {
    nodes.sort_unstable();
    nodes.dedup();
    let mut seen = vec![false; nodes.len()];
    let mut out = Vec::new();
    for start in 0..nodes.len() {
        if seen[start] {
            continue;
        }
        seen[start] = true;
        let mut stack = vec![start];
        let (mut count, mut sum) = (0usize, Vector::zeros());
        while let Some(k) = stack.pop() {
            let c = grid.coords(nodes[k]);
            count += 1;
            sum += grid.point(c).coords;
            for axis in 0..3 {
                for step in [-1i64, 1] {
                    let Ok(m) = usize::try_from(c[axis] as i64 + step) else {
                        continue;
                    };
                    if m >= grid.n[axis] {
                        continue;
                    }
                    let mut n = c;
                    n[axis] = m;
                    if let Ok(j) = nodes.binary_search(&grid.index(n))
                        && !seen[j]
                    {
                        seen[j] = true;
                        stack.push(j);
                    }
                }
            }
        }
        let centre = sum / count as f64;
        out.push((
            count as f64 * grid.h.powi(3),
            [centre.x, centre.y, centre.z],
        ));
    }
    out.sort_by(|a, b| b.0.total_cmp(&a.0));
    out
}

/// Largest patch filled down to the ground, as a share of the body's plan
/// area (our choice: a tyre's contact is about 0.6 % of a car's plan; a
/// floor lowered to within the contact distance is tens of per cent and is
/// left open, since sealing it would stop the underbody flow).
pub const MAX_CONTACT_PATCH: f64 = 0.02;

/// Stand the body on the ground: the columns of nodes whose first inside
/// node lies within the contact distance are filled down to the ground,
/// patch by patch (4-connected columns), where a patch is at most
/// [`MAX_CONTACT_PATCH`] of `plan`; columns inside at the ground itself
/// (cut there) count as contact. Returns the contact area and the area
/// left open, m^2.
fn ground_contact(grid: &Grid, field: &mut [f32], params: &WrapParams, plan: f64) -> (f64, f64) {
    let h = grid.h;
    let reach = (params.contact_cells.max(0.0).floor() as usize).min(grid.n[2] - 1);
    let (nx, ny) = (grid.n[0], grid.n[1]);
    // Per column: 0 outside, k > 0 the first inside node to fill below,
    // usize::MAX inside at the ground already.
    let mut first = vec![0usize; nx * ny];
    let mut cut = 0;
    for i in 0..nx {
        for j in 0..ny {
            if let Some(k) = (0..=reach).find(|&k| field[grid.index([i, j, k])] < 0.0) {
                first[i * ny + j] = if k == 0 { usize::MAX } else { k };
                cut += usize::from(k == 0);
            }
        }
    }
    let (mut filled, mut open) = (0usize, 0usize);
    let mut seen = vec![false; nx * ny];
    for start in 0..nx * ny {
        if seen[start] || first[start] == 0 || first[start] == usize::MAX {
            continue;
        }
        let mut patch = vec![start];
        seen[start] = true;
        let mut next = 0;
        while next < patch.len() {
            let c = patch[next];
            next += 1;
            let (i, j) = (c / ny, c % ny);
            let around = [
                (i > 0).then(|| c - ny),
                (i + 1 < nx).then(|| c + ny),
                (j > 0).then(|| c - 1),
                (j + 1 < ny).then(|| c + 1),
            ];
            for n in around.into_iter().flatten() {
                if !seen[n] && first[n] != 0 && first[n] != usize::MAX {
                    seen[n] = true;
                    patch.push(n);
                }
            }
        }
        if patch.len() as f64 * h * h <= MAX_CONTACT_PATCH * plan {
            for &c in &patch {
                for k in 0..first[c] {
                    field[grid.index([c / ny, c % ny, k])] = -0.5 * h as f32;
                }
            }
            filled += patch.len();
        } else {
            open += patch.len();
        }
    }
    ((cut + filled) as f64 * h * h, open as f64 * h * h)
}

/// The input surface the wrap lost: facets whose centroid, moved a quarter
/// cell inward, lies in a cell with every corner outside (a part thinner
/// than about a cell has no node inside it, so no surface is cut there). Facets outside the grid (below
/// the ground, across the symmetry plane) were cut off on purpose and do
/// not count. Returns the lost area and each part that lost some, the
/// most first.
fn lost_surface(mesh: &TriMesh, grid: &Grid, field: &[f32]) -> (f64, Vec<LostPart>) {
    let part = crate::crossing::surfaces(mesh);
    let mut lost: HashMap<usize, (f64, Vector)> = HashMap::new();
    let mut part_area: HashMap<usize, f64> = HashMap::new();
    for (t, &p) in part.iter().enumerate() {
        let area_vector = mesh.area_vector(t);
        let area = area_vector.norm();
        *part_area.entry(p).or_insert(0.0) += area;
        let [a, b, c] = mesh.corners(t);
        let centre = (a.coords + b.coords + c.coords) / 3.0;
        // Looked up a quarter cell inside the facet: a face lying on a
        // grid plane (a CAD part whose top sits on a multiple of the cell)
        // has the cell above it all outside, however thick the part.
        let inward = -area_vector.try_normalize(0.0).unwrap_or_else(Vector::zeros);
        let probe = centre + 0.25 * grid.h * inward;
        let cell = [0, 1, 2].map(|k| ((probe[k] - grid.origin[k]) / grid.h).floor());
        let inside_grid = (0..3).all(|k| cell[k] >= 0.0 && cell[k] < (grid.n[k] - 1) as f64);
        if !inside_grid {
            continue;
        }
        let cell = cell.map(|c| c as usize);
        let outside = CORNERS
            .iter()
            .all(|o| field[grid.index([cell[0] + o[0], cell[1] + o[1], cell[2] + o[2]])] > 0.0);
        if outside {
            let entry = lost.entry(p).or_insert((0.0, Vector::zeros()));
            entry.0 += area;
            entry.1 += centre * area;
        }
    }
    let total = lost.values().fold(0.0, |sum, l| sum + l.0);
    let mut parts: Vec<LostPart> = lost
        .iter()
        .filter(|(_, l)| l.0 > 0.0)
        .map(|(p, (area, moment))| {
            let c = moment / *area;
            LostPart {
                area: *area,
                part_area: part_area.get(p).copied().unwrap_or(*area),
                at: [c.x, c.y, c.z],
            }
        })
        .collect();
    parts.sort_by(|x, y| y.area.total_cmp(&x.area));
    (total, parts)
}

/// Corners of a cell (x fastest) and its six tetrahedra round the diagonal
/// from corner 0 to corner 7.
const CORNERS: [[usize; 3]; 8] = [
    [0, 0, 0],
    [1, 0, 0],
    [0, 1, 0],
    [1, 1, 0],
    [0, 0, 1],
    [1, 0, 1],
    [0, 1, 1],
    [1, 1, 1],
];
const TETRAHEDRA: [[usize; 4]; 6] = [
    [0, 1, 3, 7],
    [0, 3, 2, 7],
    [0, 2, 6, 7],
    [0, 6, 4, 7],
    [0, 4, 5, 7],
    [0, 5, 1, 7],
];

/// Closest a vertex comes to either end of its grid edge, as a fraction.
const END_CLEARANCE: f64 = 0.05;

fn edge_key(a: usize, b: usize) -> u64 {
    ((a.min(b) as u64) << 32) | b.max(a) as u64
}

fn edge_point(key: u64, grid: &Grid, field: &[f32]) -> Point {
    let (a, b) = ((key >> 32) as usize, (key & 0xffff_ffff) as usize);
    let (fa, fb) = (f64::from(field[a]), f64::from(field[b]));
    let t = (fa / (fa - fb)).clamp(END_CLEARANCE, 1.0 - END_CLEARANCE);
    let (pa, pb) = (grid.point(grid.coords(a)), grid.point(grid.coords(b)));
    pa + (pb - pa) * t
}

/// The triangles (as keys of the grid edges their corners lie on) of one
/// tetrahedron, facing from inside (negative field) to outside.
fn tetrahedron(nodes: [usize; 4], grid: &Grid, field: &[f32], out: &mut Vec<[u64; 3]>) {
    let (mut ins, mut outs) = ([0usize; 4], [0usize; 4]);
    let (mut ni, mut no) = (0, 0);
    for n in nodes {
        if field[n] < 0.0 {
            ins[ni] = n;
            ni += 1;
        } else {
            outs[no] = n;
            no += 1;
        }
    }
    let key = edge_key;
    let (first, second) = match ni {
        1 => {
            let a = ins[0];
            ([key(a, outs[0]), key(a, outs[1]), key(a, outs[2])], None)
        }
        3 => {
            let d = outs[0];
            ([key(ins[0], d), key(ins[1], d), key(ins[2], d)], None)
        }
        2 => {
            let (a, b, c, d) = (ins[0], ins[1], outs[0], outs[1]);
            let q = [key(a, c), key(a, d), key(b, d), key(b, c)];
            ([q[0], q[1], q[2]], Some([q[0], q[2], q[3]]))
        }
        _ => return,
    };
    let centre = |set: &[usize]| {
        set.iter()
            .map(|&n| grid.point(grid.coords(n)).coords)
            .sum::<Vector>()
            / set.len() as f64
    };
    let outward = centre(&outs[..no]) - centre(&ins[..ni]);
    for mut tri in std::iter::once(first).chain(second) {
        let [p, q, r] = tri.map(|k| edge_point(k, grid, field));
        if (q - p).cross(&(r - p)).dot(&outward) < 0.0 {
            tri.swap(1, 2);
        }
        out.push(tri);
    }
}

/// Wrap `mesh` (repaired, in metres) into one outer surface; `reasons` is
/// what [`reasons`] found, carried into the report.
pub fn wrap(
    mesh: &TriMesh,
    mirrors: &Mirrors,
    reasons: WrapReasons,
    params: &WrapParams,
) -> (TriMesh, WrapReport) {
    let empty = || {
        let report = WrapReport {
            reasons,
            input_facets: mesh.len(),
            input_area: mesh.area(),
            ..WrapReport::default()
        };
        (TriMesh::default(), report)
    };
    let Some((lo, hi)) = mesh.bounds() else {
        return empty();
    };
    let h = cell_size(&lo, &hi, params);
    if !(h.is_finite() && h > 0.0) {
        return empty();
    }
    let grid = Grid::new(&lo, &hi, mirrors, h);
    let facets = facets_with_images(mesh, mirrors);
    let n = grid.len();
    let (mut known, mut votes) = (vec![0u8; n], vec![0u8; n]);
    let leaky_lines = winding_votes(&facets, &grid, &mut known, &mut votes);
    let inside: Vec<bool> = known.iter().zip(&votes).map(|(&k, &v)| 2 * v > k).collect();
    drop((known, votes));
    // The distance, then signed in place: negative inside.
    let mut field = distances(&facets, &grid, 2.0 * h);
    drop(facets);
    let tiny = (1e-6 * h) as f32;
    field
        .par_iter_mut()
        .zip(inside.par_iter())
        .for_each(|(f, &ins)| {
            let d = f.max(tiny);
            *f = if ins { -d } else { d };
        });
    drop(inside);
    // Parts within the contact distance stand on the ground: the nodes
    // below them down to the ground are inside.
    let on_ground = reasons.ground_gap.is_some() && mirrors.ground == Some(grid.origin.z);
    let plan = (hi.x - lo.x) * (hi.y - lo.y);
    let (contact_area, open_area) = if on_ground {
        ground_contact(&grid, &mut field, params, plan)
    } else {
        (0.0, 0.0)
    };
    let filled = close_gaps(&grid, &mut field);
    let gap_nodes = filled.len();
    let gap_places = places(&grid, filled);
    let (lost_area, lost_parts) = lost_surface(mesh, &grid, &field);
    let lost_at = lost_parts.first().map(|p| p.at);
    let [nx, ny, nz] = grid.n;
    let tris: Vec<[u64; 3]> = (0..nx - 1)
        .into_par_iter()
        .flat_map_iter(|i| {
            let mut out = Vec::new();
            for j in 0..ny - 1 {
                for k in 0..nz - 1 {
                    let ids = CORNERS.map(|c| grid.index([i + c[0], j + c[1], k + c[2]]));
                    let negative = ids.iter().filter(|&&n| field[n] < 0.0).count();
                    if negative == 0 || negative == 8 {
                        continue;
                    }
                    for tet in TETRAHEDRA {
                        tetrahedron(tet.map(|c| ids[c]), &grid, &field, &mut out);
                    }
                }
            }
            out
        })
        .collect();
    let mut keys: Vec<u64> = tris.iter().flatten().copied().collect();
    keys.par_sort_unstable();
    keys.dedup();
    let vertices: Vec<Point> = keys
        .par_iter()
        .map(|&k| edge_point(k, &grid, &field))
        .collect();
    let triangles: Vec<[u32; 3]> = tris
        .par_iter()
        .map(|t| t.map(|k| keys.binary_search(&k).map_or(0, |i| i as u32)))
        .collect();
    let out = TriMesh {
        vertices,
        triangles,
    };
    let reference = Point::new(0.0, 0.0, mirrors.ground.unwrap_or(0.0));
    let volume = (0..out.len())
        .map(|t| {
            let [a, b, c] = out.corners(t).map(|p| p - reference);
            a.dot(&b.cross(&c)) / 6.0
        })
        .sum();
    let report = WrapReport {
        reasons,
        cell: h,
        nodes: grid.n,
        leaky_lines,
        input_facets: mesh.len(),
        output_facets: out.len(),
        input_area: mesh.area(),
        output_area: out.area(),
        volume,
        contact_area,
        contact_gap: params.contact_cells.max(0.0).floor() * h,
        lost_area,
        lost_at,
        lost_parts,
        open_area,
        gap_nodes,
        gap_places,
    };
    (out, report)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::generate;

    /// A wrap's note counts fills of a few cells (creases) apart from the
    /// gaps between parts, and says when there were only those.
    #[test]
    fn creases_are_not_called_gaps_between_parts() {
        let cell = 0.01;
        let cells = |n: f64| n * cell * cell * cell;
        let report = |places: Vec<(f64, [f64; 3])>| WrapReport {
            cell,
            gap_places: places,
            ..WrapReport::default()
        };
        let tyre = (cells(9000.0), [3.45, 0.7, 0.41]);
        let crease = (cells(2.0), [2.1, 0.9, 0.5]);
        let words = report(vec![tyre, crease, crease]).gap_words();
        assert!(
            words.contains("9.0 litres of air in 1 place: 9.0 near x 3.45")
                && words.contains(
                    "besides, 2 fills of under 8 cells in creases, 0.0040 litres together"
                ),
            "{words}"
        );
        let words = report(vec![crease]).gap_words();
        assert!(
            words.starts_with(" (no gap between parts; 1 fill of under 8 cells"),
            "{words}"
        );
        assert!(is_gap_place(cells(8.0), cell) && !is_gap_place(cells(7.0), cell));
    }

    /// Small fills keep two digits rather than reading as no air at all.
    #[test]
    fn litres_keep_two_digits_of_small_fills() {
        assert_eq!(litres(0.0123), "12.3");
        assert_eq!(litres(5e-5), "0.1");
        assert_eq!(litres(3.04e-5), "0.030");
        assert_eq!(litres(4.2e-6), "0.0042");
        assert_eq!(litres(0.0), "0.0");
    }

    #[test]
    fn a_line_through_a_shared_edge_crosses_one_facet_of_two() {
        // Two facets of the square z = 0 sharing the diagonal; lines along z
        // through the diagonal and through the shared corner.
        let a = Point::new(0.0, 0.0, 0.0);
        let b = Point::new(1.0, 0.0, 0.0);
        let c = Point::new(1.0, 1.0, 0.0);
        let d = Point::new(0.0, 1.0, 0.0);
        let facets = [[a, b, c], [a, c, d]];
        for s in [[0.5, 0.5], [0.0, 0.0], [1.0, 1.0], [0.25, 0.25], [0.5, 0.0]] {
            let hits: Vec<_> = facets
                .iter()
                .filter_map(|f| line_crossing(f, 2, s))
                .collect();
            let inside_square = s[0] > 0.0 && s[1] >= 0.0 && s[0] <= 1.0 && s[1] <= 1.0;
            assert!(hits.len() <= 1, "{s:?}: {hits:?}");
            if s == [0.5, 0.5] || s == [0.25, 0.25] {
                assert_eq!(hits.len(), 1, "{s:?} {inside_square}");
                assert_eq!(hits[0].1, -1, "normal +z: the line leaves");
            }
        }
    }

    #[test]
    fn a_sphere_wraps_to_its_own_volume() {
        // Volume of a sphere: 4/3 pi r^3; the inscribed icosphere holds a
        // little less, so compare with the input's own volume.
        let sphere = generate::icosphere(1.0, 5);
        let v0 = sphere.signed_volume();
        let r = reasons(&sphere, &Mirrors::none(), &WrapParams::default(), 0.0);
        assert!(!r.any());
        let (w, report) = wrap(&sphere, &Mirrors::none(), r, &WrapParams::default());
        assert_eq!(report.leaky_lines, 0);
        assert!(
            (report.volume - v0).abs() < 2e-3 * v0,
            "{} {v0}",
            report.volume
        );
        assert!((w.signed_volume() - v0).abs() < 2e-3 * v0);
    }
}
