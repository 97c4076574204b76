//! Duplicated layers: an open sheet lying on the surface of another part.
//!
//! A scan often carries a second sheet over part of a panel, where two
//! passes of the scanner overlap and both were kept: a copy of the panel's
//! facets a fraction of a millimetre off it, with noise of its own. An
//! exact copy goes with the duplicate facets ([`super::drop_duplicates`]);
//! such a sheet does not, and its rim was refused as an open hole (a
//! review's 250 x 230 mm patch of 8,621 facets 0.3 mm off a car's rear
//! quarter: "perimeter 1.241 m, above its fill limit"), though the body
//! under it is closed.
//!
//! A part here is a set of facets joined across edges that exactly two
//! facets share (as the orientation pass joins them), so a copy that
//! shares its rim with the panel under it (its rim edges then shared three
//! ways) is a part of its own, and so is the patch of the panel inside
//! that rim. A part is a duplicated layer, and is dropped, when
//! 1. it is open: one of its facets alone uses an edge that lies off the
//!    declared mirror planes (a closed part, a tyre or a spoiler plate, is
//!    a body of its own however near it lies, and is left to the wrap);
//! 2. at least [`LAYER_AREA_SHARE`] of its area lies within
//!    [`LAYER_DISTANCE`] of the facets of the other parts (a facet counts
//!    there when its corners and its centroid all do).
//!
//! Parts are tried smallest first, and a part dropped is no longer a
//! surface for the others: of two overlapping sheets the larger stays, and
//! of a copy sharing its rim with the panel and the patch under it, one
//! stays and closes the panel again. An open part standing off the others
//! (a panel's copy 30 mm out) is left, and its rim is reported as a hole.

use serde::Serialize;

use super::edges::{EdgeUse, edge_groups};
use crate::distance::SurfaceGrid;
use crate::fasthash::FastMap;
use crate::{Mirrors, Point, TriMesh, Vector};

/// How near another part's surface a layer lies, as a fraction of the
/// body's bounding-box diagonal: 4e-4, about 2 mm on a car (our choice).
/// Ten times a scanner's noise (0.2 mm on the review's scan, whose
/// duplicated sheet 0.3 mm off, with noise of its own, came up to about
/// 1.3 mm from the panel), and a twelfth of the thinnest part known to
/// stand off a car's surface on its own (a spoiler plate 25 mm thick,
/// which is closed besides); the coarsening's own deviation from its input
/// (11 to 16 mm on a car) is far larger, so no shape the panels resolve
/// lies within it.
pub const LAYER_DISTANCE: f64 = 4e-4;

/// Share of a part's area that must lie within [`LAYER_DISTANCE`] of the
/// other parts for it to be a duplicated layer (our choice: a sheet's
/// frayed rim or a few noisy facets may stand further off; a part of which
/// more than a hundredth stands off is a shape of its own).
pub const LAYER_AREA_SHARE: f64 = 0.99;

/// A part dropped as a duplicated layer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DroppedLayer {
    /// Its facets.
    pub facets: usize,
    /// Its area, m^2.
    pub area: f64,
    /// Distance from the other parts within which [`LAYER_AREA_SHARE`] of
    /// its area lies, metres.
    pub distance: f64,
    /// Its area-weighted centre, metres.
    pub centre: [f64; 3],
}

impl DroppedLayer {
    /// One sentence naming it, its place and what was done.
    pub fn describe(&self) -> String {
        let [x, y, z] = self.centre;
        let what = if self.facets == 1 {
            "1 facet".to_string()
        } else {
            format!("a sheet of {} facets", self.facets)
        };
        let area = if self.area < 1e-4 {
            format!("{:.1} mm^2", 1e6 * self.area)
        } else {
            format!("{:.4} m^2", self.area)
        };
        format!(
            "{what} ({area}) lying within {:.2} mm of the surface of another part was dropped as a \
             duplicated layer near ({x:.3}, {y:.3}, {z:.3}) m",
            1000.0 * self.distance
        )
    }
}

/// The layers dropped in one sentence (up to five named, largest first,
/// then how many more), with what they are; `None` when there were none.
pub fn describe_layers(layers: &[DroppedLayer]) -> Option<String> {
    const SHOWN: usize = 5;
    let mut largest: Vec<&DroppedLayer> = layers.iter().collect();
    largest.sort_by_key(|l| std::cmp::Reverse(l.facets));
    let mut parts: Vec<String> = largest.iter().take(SHOWN).map(|l| l.describe()).collect();
    if layers.len() > SHOWN {
        parts.push(format!("and {} more", layers.len() - SHOWN));
    }
    (!parts.is_empty()).then(|| {
        format!(
            "{}: an open sheet lying on another part's surface doubles it (as where two scan passes \
             overlap) and is no hole in the body",
            parts.join("; ")
        )
    })
}

/// Drop every duplicated layer of `mesh` (whose sorted edge uses are
/// `uses`) lying within `reach` metres of another part; a border edge
/// within `plane_tol` of a declared mirror plane does not make a part
/// open. Returns the layers dropped, smallest first.
pub(crate) fn drop_layers(
    mesh: &mut TriMesh,
    uses: &[EdgeUse],
    mirrors: &Mirrors,
    plane_tol: f64,
    reach: f64,
) -> Vec<DroppedLayer> {
    let (part, parts) = super::orient::manifold_parts(mesh.len(), uses);
    if parts < 2 {
        return Vec::new();
    }
    let open = open_parts(mesh, uses, &part, parts, mirrors, plane_tol);
    let mut area = vec![0.0; parts];
    for (t, &p) in part.iter().enumerate() {
        area[p as usize] += mesh.area_vector(t).norm();
    }
    let mut candidates: Vec<usize> = (0..parts).filter(|&p| open[p]).collect();
    if candidates.is_empty() {
        return Vec::new();
    }
    candidates.sort_by(|&a, &b| area[a].total_cmp(&area[b]).then(a.cmp(&b)));
    let mut facets: FastMap<u32, Vec<u32>> = FastMap::default();
    for (t, &p) in part.iter().enumerate() {
        if open[p as usize] {
            facets.entry(p).or_default().push(t as u32);
        }
    }
    let all: Vec<u32> = (0..mesh.len() as u32).collect();
    let mut dropped = vec![false; parts];
    let mut layers = Vec::new();
    {
        let grid = SurfaceGrid::over(mesh, &all);
        for &c in &candidates {
            let own = facets.get(&(c as u32)).map_or(&[][..], Vec::as_slice);
            let keep = |t: u32| {
                let p = part[t as usize] as usize;
                p != c && !dropped[p]
            };
            if let Some(layer) =
                as_layer(mesh, own, area[c], |p| grid.distance_within(p, reach, keep))
            {
                dropped[c] = true;
                layers.push(layer);
            }
        }
    }
    if !layers.is_empty() {
        let mut t = 0;
        mesh.triangles.retain(|_| {
            t += 1;
            !dropped[part[t - 1] as usize]
        });
    }
    layers
}

/// The part of facets `own` (of area `total`) as a layer, when
/// [`LAYER_AREA_SHARE`] of its area lies within reach of the other parts
/// (`distance`: the distance from a point to them, `None` beyond reach).
fn as_layer(
    mesh: &TriMesh,
    own: &[u32],
    total: f64,
    distance: impl Fn(&Point) -> Option<f64>,
) -> Option<DroppedLayer> {
    let allowed_far = (1.0 - LAYER_AREA_SHARE) * total;
    let mut far = 0.0;
    let mut near: Vec<(f64, f64)> = Vec::with_capacity(own.len());
    let mut at_vertex: FastMap<u32, Option<f64>> = FastMap::default();
    let mut weighted = Vector::zeros();
    for &t in own {
        let a = mesh.area_vector(t as usize).norm();
        let tri = mesh.triangles[t as usize];
        let centroid = Point::from(
            tri.iter()
                .map(|&v| mesh.vertices[v as usize].coords)
                .sum::<Vector>()
                / 3.0,
        );
        weighted += centroid.coords * a;
        let mut d = distance(&centroid);
        for v in tri {
            let dv = *at_vertex
                .entry(v)
                .or_insert_with(|| distance(&mesh.vertices[v as usize]));
            d = d.zip(dv).map(|(a, b)| a.max(b));
        }
        match d {
            Some(d) => near.push((d, a)),
            None => {
                far += a;
                if far > allowed_far {
                    return None;
                }
            }
        }
    }
    near.sort_by(|a, b| a.0.total_cmp(&b.0));
    let mut sum = 0.0;
    let mut distance = 0.0;
    for (d, a) in near {
        sum += a;
        distance = d;
        if sum >= LAYER_AREA_SHARE * total {
            break;
        }
    }
    let centre = if total > 0.0 {
        weighted / total
    } else {
        weighted
    };
    Some(DroppedLayer {
        facets: own.len(),
        area: total,
        distance,
        centre: [centre.x, centre.y, centre.z],
    })
}

/// Which parts are open: one of their facets alone uses an edge (used by
/// no other facet, or by facets of other parts only) that does not lie on
/// a declared mirror plane (both ends within `tol` of it).
fn open_parts(
    mesh: &TriMesh,
    uses: &[EdgeUse],
    part: &[u32],
    parts: usize,
    mirrors: &Mirrors,
    tol: f64,
) -> Vec<bool> {
    let on_plane = |v: u32| {
        let p = mesh.vertices[v as usize];
        (mirrors.symmetry && p.y.abs() <= tol)
            || mirrors.ground.is_some_and(|g| (p.z - g).abs() <= tol)
    };
    let mut open = vec![false; parts];
    let mut of_edge: Vec<u32> = Vec::new();
    for group in edge_groups(uses) {
        if group.len() == 2 {
            continue;
        }
        let (a, b) = group[0].ends();
        if on_plane(a) && on_plane(b) {
            continue;
        }
        of_edge.clear();
        of_edge.extend(group.iter().map(|u| part[u.facet as usize]));
        of_edge.sort_unstable();
        for run in of_edge.chunk_by(|a, b| a == b) {
            if run.len() == 1 {
                open[run[0] as usize] = true;
            }
        }
    }
    open
}
