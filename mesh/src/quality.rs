//! Panel quality: aspect ratio, smallest angle, neighbour size ratio, with
//! warnings where panels will hurt accuracy, and a suggested panel count.
//!
//! Measures:
//! - aspect ratio `L_max * P / (4 sqrt(3) A)` (longest edge over the
//!   diameter of the inscribed circle, scaled to 1 for an equilateral
//!   triangle; Shewchuk 2002, "What is a good linear finite element?",
//!   table of quality measures, from memory);
//! - smallest interior angle, degrees;
//! - neighbour area ratio: the largest `A_i / A_j` across an edge;
//! - turned panels: a panel whose normal is turned more than
//!   [`TURNED_DEG`] from each of its edge neighbours' while they agree with
//!   one another, or from their mean as well ([`turned_panels`]).
//!
//! Thresholds (common practice for constant-strength panel methods, where
//! the collocation point sits at the centroid and the surface velocity
//! comes from differences between neighbours; Katz & Plotkin 2001,
//! *Low-Speed Aerodynamics*, ch. 12, advise smooth panel-size variation):
//! aspect ratio above 5, smallest angle below 10 degrees, neighbour area
//! ratio above 4 (edge-length ratio about 2).

use serde::Serialize;

use crate::{Panel, PanelMesh};

/// Warning thresholds (common practice, see the module docs).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct QualityParams {
    /// Warn above this aspect ratio.
    pub max_aspect_ratio: f64,
    /// Warn below this smallest angle, degrees.
    pub min_angle_deg: f64,
    /// Warn above this area ratio across an edge.
    pub max_neighbour_area_ratio: f64,
    /// Warn when more than this fraction of panels breaks a threshold.
    pub warn_fraction: f64,
}

impl Default for QualityParams {
    fn default() -> Self {
        Self {
            max_aspect_ratio: 5.0,
            min_angle_deg: 10.0,
            max_neighbour_area_ratio: 4.0,
            warn_fraction: 0.01,
        }
    }
}

/// Smallest, median and largest of a measure.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct Spread {
    /// Smallest value.
    pub min: f64,
    /// Median.
    pub median: f64,
    /// Largest value.
    pub max: f64,
}

/// The quality of a panel mesh.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct QualityReport {
    /// Panels measured.
    pub panels: usize,
    /// Aspect ratio (1 for equilateral).
    pub aspect_ratio: Spread,
    /// Smallest angle per panel, degrees.
    pub min_angle_deg: Spread,
    /// Largest area ratio across an edge per panel.
    pub neighbour_area_ratio: Spread,
    /// Panels above the aspect-ratio threshold.
    pub high_aspect: usize,
    /// Panels below the angle threshold.
    pub small_angle: usize,
    /// Panels above the neighbour-ratio threshold.
    pub size_jump: usize,
    /// Panels turned against all their neighbours ([`turned_panels`]).
    pub turned: usize,
    /// Panels almost degenerate (aspect ratio above
    /// [`DEGENERATE_ASPECT`]).
    pub degenerate: usize,
    /// Thresholds used.
    pub thresholds: QualityParams,
    /// Plain-language warnings (empty when all is well).
    pub warnings: Vec<String>,
    /// Remarks on the grading of a coarsened mesh that call for no action
    /// ([`QualityReport::grading_as_notes`]).
    pub notes: Vec<String>,
    /// Per warning: the panels it counts, when it is about the grading
    /// (aspect ratio, angles, size jumps), none for a fold.
    #[serde(skip)]
    grading: Vec<Option<usize>>,
}

/// Share of the panels under which a grading warning on a mesh tuft
/// coarsened itself is a note ([`QualityReport::grading_as_notes`]).
pub const GRADING_NOTE_SHARE: f64 = 0.10;

/// Share of the panels with an aspect ratio above the threshold from which
/// the whole solution is in doubt, not some pressures
/// ([`QualityReport::slivers_dominate`]): tuft's own coarsening leaves 1
/// to 5 % (measured on the shipped and reviewed cars), a CAD export cut
/// in strips nearly all (our choice).
pub const SLIVER_SHARE: f64 = 0.5;

impl QualityReport {
    /// More than [`SLIVER_SHARE`] of the panels are slivers (aspect ratio
    /// above the threshold).
    pub fn slivers_dominate(&self) -> bool {
        self.high_aspect as f64 > SLIVER_SHARE * self.panels as f64
    }

    /// Add a warning that is not about the grading (a fold).
    pub fn add_warning(&mut self, text: String) {
        self.warnings.push(text);
        self.grading.push(None);
    }

    /// On a mesh that tuft's own coarsening made, move the warnings about
    /// its grading (aspect ratio, angles, size jumps) that count fewer
    /// than `share` of the panels into [`Self::notes`]: error-driven
    /// simplification keeps curved parts finer than flat ones, so a few
    /// per cent of its panels always break these thresholds, the user can
    /// do nothing about it, and the answers barely move with the panel
    /// count (a review's hatchback: drag within 0.003 and lift within
    /// about 2 kg from 4,000 to 8,000 panels, each mesh with 3.4-4.8 % of
    /// size jumps). Folds stay warnings.
    pub fn grading_as_notes(&mut self, share: f64) {
        let n = self.panels.max(1) as f64;
        let (mut keep, mut notes) = (Vec::new(), Vec::new());
        for (text, grading) in self.warnings.drain(..).zip(self.grading.drain(..)) {
            match grading {
                // The why once, on the first such note.
                Some(count) if (count as f64) < share * n && notes.is_empty() => notes.push(format!(
                    "{text}; this comes from the coarsening's grading (finer where the surface curves), \
                     and the size jumps themselves move the answers little (on a test hatchback, drag \
                     within 0.003 and lift within about 2 kg from 4,000 to 8,000 panels); the panel count \
                     itself can move a scan's more (a wrapped hatchback with a separated tailgate: drag by \
                     0.014 and rear lift by 5 kg from 3,500 to 4,000), so compare variants at one count \
                     (tuft run --noise measures how far this body's answers move)"
                )),
                Some(count) if (count as f64) < share * n => {
                    notes.push(format!("{text}; this too comes from the coarsening's grading"));
                }
                g => keep.push((text, g)),
            }
        }
        (self.warnings, self.grading) = keep.into_iter().unzip();
        self.notes.extend(notes);
    }
}

/// Gap between a separate part's bounding box and the main part's, as a
/// share of the main part's length, beyond which the part is warned
/// about: wheels, mirrors and spoilers modelled as shells of their own sit
/// inside or against the body's box (gap 0); a part well clear of it is
/// more likely a stray from the export (our choice).
pub const DETACHED_GAP_SHARE: f64 = 0.05;

/// A warning for parts of the panel mesh (sets of panels joined by edges)
/// whose bounding box stands more than [`DETACHED_GAP_SHARE`] of the
/// largest part's length clear of that part's box: they run as part of
/// the body, and the body's length, assumed axles and reference area take
/// them in (a review's coupe with a box 1.5 m behind its tail ran as a
/// 6.5 m body, C_D 0.201 against 0.151, its assumed rear axle behind the
/// car), but nothing had said so but a count of connected parts. Names
/// the part farthest away.
pub fn detached_part_warning(mesh: &PanelMesh) -> Option<String> {
    let n = mesh.len();
    let mut part = vec![usize::MAX; n];
    let mut parts: Vec<(f64, crate::Point, crate::Point)> = Vec::new();
    for seed in 0..n {
        if part[seed] != usize::MAX {
            continue;
        }
        let id = parts.len();
        let p0 = mesh.panels[seed].centroid;
        let (mut area, mut lo, mut hi) = (0.0, p0, p0);
        part[seed] = id;
        let mut stack = vec![seed];
        while let Some(t) = stack.pop() {
            area += mesh.panels[t].area;
            for &v in &mesh.triangles[t] {
                let c = mesh.vertices[v as usize];
                lo = lo.inf(&c);
                hi = hi.sup(&c);
            }
            for &j in mesh.edge_neighbours[t].iter().flatten() {
                let j = j as usize;
                if part[j] == usize::MAX {
                    part[j] = id;
                    stack.push(j);
                }
            }
        }
        parts.push((area, lo, hi));
    }
    let main = parts.iter().max_by(|a, b| a.0.total_cmp(&b.0))?;
    let length = main.2.x - main.1.x;
    let gap = |p: &(f64, crate::Point, crate::Point)| {
        let apart = (p.1 - main.2)
            .sup(&(main.1 - p.2))
            .sup(&crate::Vector::zeros());
        apart.norm()
    };
    let far: Vec<_> = parts
        .iter()
        .filter(|p| gap(p) > DETACHED_GAP_SHARE * length)
        .collect();
    let worst = far.iter().max_by(|a, b| gap(a).total_cmp(&gap(b)))?;
    let size = worst.2 - worst.1;
    let centre = nalgebra::center(&worst.1, &worst.2);
    Some(format!(
        "{} of the surface {} clear of the body: the farthest, {:.2} x {:.2} x {:.2} m near x {:.2}, y \
         {:.2}, z {:.2} m, stands {:.2} m from it; it runs as part of the body, and the body's length, \
         any assumed axles and the reference area take it in: remove it from the STL if it is not part of \
         the car",
        if far.len() == 1 {
            "a separate part".to_owned()
        } else {
            format!("{} separate parts", far.len())
        },
        if far.len() == 1 { "stands" } else { "stand" },
        size.x,
        size.y,
        size.z,
        centre.x,
        centre.y,
        centre.z,
        gap(worst)
    ))
}

/// Measure with default thresholds.
pub fn quality(mesh: &PanelMesh) -> QualityReport {
    quality_with_params(mesh, &QualityParams::default())
}

/// Measure every panel and compare with the thresholds.
pub fn quality_with_params(mesh: &PanelMesh, q: &QualityParams) -> QualityReport {
    let aspect: Vec<f64> = mesh.panels.iter().map(aspect_ratio).collect();
    let angle: Vec<f64> = mesh.panels.iter().map(smallest_angle_deg).collect();
    let ratio: Vec<f64> = (0..mesh.len())
        .map(|i| neighbour_area_ratio(mesh, i))
        .collect();
    let worst = |v: &[f64], sign: f64| {
        let i = (0..v.len())
            .max_by(|&a, &b| (sign * v[a]).total_cmp(&(sign * v[b])))
            .unwrap_or(0);
        mesh.panels.get(i).map(|p| p.centroid)
    };
    let turned = turned_panels(mesh);
    // The worst turned panel: the one least aligned with its best neighbour.
    let best_neighbour = |i: usize| {
        mesh.edge_neighbours[i]
            .iter()
            .flatten()
            .map(|&j| mesh.panels[i].normal.dot(&mesh.panels[j as usize].normal))
            .fold(-1.0, f64::max)
    };
    let worst_turned = (0..mesh.len())
        .filter(|&i| turned[i])
        .min_by(|&a, &b| best_neighbour(a).total_cmp(&best_neighbour(b)))
        .map(|i| mesh.panels[i].centroid);
    let at = [
        worst(&aspect, 1.0),
        worst(&angle, -1.0),
        worst(&ratio, 1.0),
        worst_turned,
    ];
    let mut r = QualityReport {
        panels: mesh.len(),
        high_aspect: aspect.iter().filter(|&&a| a > q.max_aspect_ratio).count(),
        small_angle: angle.iter().filter(|&&a| a < q.min_angle_deg).count(),
        size_jump: ratio
            .iter()
            .filter(|&&a| a > q.max_neighbour_area_ratio)
            .count(),
        turned: turned.iter().filter(|&&t| t).count(),
        degenerate: aspect.iter().filter(|&&a| a > DEGENERATE_ASPECT).count(),
        aspect_ratio: spread(aspect),
        min_angle_deg: spread(angle),
        neighbour_area_ratio: spread(ratio),
        thresholds: *q,
        warnings: Vec::new(),
        notes: Vec::new(),
        grading: Vec::new(),
    };
    (r.warnings, r.grading) = warnings(&r, q, at).into_iter().unzip();
    r
}

/// The warnings, each naming where its worst panel is (`at`: the worst
/// aspect ratio, smallest angle, area jump and turned panel).
/// Each with the panels it counts when it is about the grading.
fn warnings(
    r: &QualityReport,
    q: &QualityParams,
    at: [Option<crate::Point>; 4],
) -> Vec<(String, Option<usize>)> {
    let n = r.panels.max(1) as f64;
    let mut out = Vec::new();
    let many = q.warn_fraction * n;
    // `share`: a grading warning's threshold (a count of panels), or
    // `None` for a fold, worth a warning however few there are.
    let mut warn =
        |count: usize, share: Option<f64>, what: String, harm: &str, at: Option<crate::Point>| {
            let grading = share.map(|_| count);
            if count as f64 > share.unwrap_or(0.0) {
                let place = at.map_or(String::new(), |p| {
                    format!(
                        " (the worst near x {:.3}, y {:.3}, z {:.3} m)",
                        p.x, p.y, p.z
                    )
                });
                out.push((
                    format!(
                        "{count} {} ({:.1} %) {}{place}: {harm}",
                        if count == 1 { "panel" } else { "panels" },
                        100.0 * count as f64 / n,
                        if count == 1 { singular(&what) } else { what }
                    ),
                    grading,
                ));
            }
        };
    warn(
        r.high_aspect,
        Some(many),
        format!("have an aspect ratio above {}", q.max_aspect_ratio),
        "long thin panels put the collocation point far from parts of the panel and spoil the velocity from doublet differences",
        at[0],
    );
    warn(
        r.small_angle,
        Some(many),
        format!("have an angle below {} degrees", q.min_angle_deg),
        "needle-like panels make the velocity gradient noisy",
        at[1],
    );
    warn(
        r.size_jump,
        Some(many),
        format!(
            "differ in area by more than {}x from a neighbour",
            q.max_neighbour_area_ratio
        ),
        "abrupt size changes cause local errors in pressure",
        at[2],
    );
    // An almost degenerate panel or a turned one (a fold) is worth a
    // warning however few there are.
    warn(
        r.degenerate,
        None,
        format!("are almost degenerate, with an aspect ratio above {DEGENERATE_ASPECT:.0}"),
        "corners almost on one line leave a panel's normal and collocation point meaningless, so the pressure there is unsure; look at them (tuft check --save-panels) and try another panel count",
        at[0],
    );
    warn(
        r.turned,
        None,
        format!("are turned more than {TURNED_DEG:.0} degrees from every neighbour"),
        "folds that the coarsening or the scan made, with no edge of the shape there; their speed is interpolated from the flow around them and they start no separation, but look at them (tuft check --save-panels) and try another panel count",
        at[3],
    );
    // First, before the warnings it explains.
    if r.slivers_dominate() {
        out.insert(
            0,
            (
            format!(
                "most of the surface ({:.0} % of its panels) is cut in slivers: the pressures \
                 everywhere, not only near some panels, are unsure (a test ellipsoid cut in slivers \
                 read C_D 0.010 against 0.100 cut in even triangles); export the STL with even triangles, \
                 or ask for about a third of its facets (geometry.panels, tuft check --panels), which the \
                 coarsening evens",
                100.0 * r.high_aspect as f64 / n
            ),
                None,
            ),
        );
    }
    out
}

/// A fan counts in [`fans`] only on a face meeting the wind, its
/// normal's x below minus this (within 45 degrees of facing upstream): a
/// flat tail in the dead water, a wheel's face or a floor exported as fans
/// would have warned on every run, with no sign that they mislead.
pub const UPSTREAM_X: f64 = 0.7;

/// Corners with at least this many panels around them can be the hub of a
/// fan ([`fans`]; our choice: a flat face exported as a fan has one
/// triangle per rim segment, a dozen or more on a face with curved edges).
pub const FAN_HUB_PANELS: usize = 8;

/// Fans on faces meeting the wind ([`UPSTREAM_X`]), each hub vertex with
/// its face's panels, no panel in two: the panels around a corner that
/// has at least [`FAN_HUB_PANELS`] of them on one flat face (normals within
/// 2 degrees of one another), three quarters of those reaching the face's
/// rim (the edge opposite the hub on a crease of more than 30 degrees), the
/// way CAD exporters mesh a flat face: one triangle from a hub to each
/// segment of its rim. Every one of them reaches the rim, so none has
/// neighbours on its own face all round, and its centroid stands for a
/// strip from the middle of the face to its edge. `prepare::recut_fans`
/// re-cuts them in rings before a run, so none is left to warn about.
pub fn fans(mesh: &PanelMesh) -> Vec<(u32, Vec<u32>)> {
    let cos_flat = 2f64.to_radians().cos();
    let cos_crease = 30f64.to_radians().cos();
    let mut taken = vec![false; mesh.len()];
    let mut out = Vec::new();
    for (hub, around) in mesh.vertex_panels.iter().enumerate() {
        if around.len() < FAN_HUB_PANELS {
            continue;
        }
        let normal = |j: u32| *mesh.panels[j as usize].normal;
        // The face: the panels around the hub within 2 degrees of the one
        // most others lie flat with (a hub on the face's edge, a fan from
        // one of its corners, also has panels of the faces beside it).
        let flat_with = |i: u32| {
            around
                .iter()
                .filter(|&&j| normal(j).dot(&normal(i)) >= cos_flat)
                .count()
        };
        let Some(&key) = around.iter().max_by_key(|&&i| flat_with(i)) else {
            continue;
        };
        let face: Vec<u32> = around
            .iter()
            .copied()
            .filter(|&j| normal(j).dot(&normal(key)) >= cos_flat)
            .collect();
        // Only a face meeting the wind (x is downstream in tuft's axes):
        // the one where a fan was seen to mislead.
        if face.len() < FAN_HUB_PANELS || normal(key).x > -UPSTREAM_X {
            continue;
        }
        // The edge opposite the hub lies on a crease: the panel reaches the
        // face's rim (the innermost ring of a face cut in rings does not).
        let at_rim = |j: u32| {
            let t = mesh.triangles[j as usize];
            let Some(k) = t.iter().position(|&v| v as usize == hub) else {
                return false;
            };
            // Edge (k+1, k+2) is the one without the hub.
            mesh.edge_neighbours[j as usize][(k + 1) % 3]
                .is_some_and(|o| normal(o).dot(&normal(j)) < cos_crease)
        };
        let reach = face.iter().filter(|&&j| at_rim(j)).count();
        if 4 * reach >= 3 * face.len() && face.iter().all(|&j| !taken[j as usize]) {
            for &j in &face {
                taken[j as usize] = true;
            }
            out.push((hub as u32, face));
        }
    }
    out
}

/// `what` of a warning for one panel: its leading plural verb made singular.
fn singular(what: &str) -> String {
    for (plural, one) in [("have ", "has "), ("are ", "is "), ("differ ", "differs ")] {
        if let Some(rest) = what.strip_prefix(plural) {
            return format!("{one}{rest}");
        }
    }
    what.to_owned()
}

/// Aspect ratio above which a panel is almost degenerate, worth a warning
/// however few there are (our choice: twenty times the grading threshold
/// of common practice, 5; at 100 a triangle's height is about a 170th of
/// its longest edge).
pub const DEGENERATE_ASPECT: f64 = 100.0;

/// A panel turned more than this from each of its edge neighbours, while
/// those agree with one another within the same angle or the panel is
/// turned as far from their mean, is a fold (our choice): on a smooth body
/// neighbouring panels differ by a few degrees; along a sharp edge of the
/// shape a panel has a neighbour on its own face, and in a corner its
/// neighbours lie on different faces and disagree, while the panel that
/// cuts the corner faces between them (a cube's corner cut off faces
/// 55 degrees from each face and along their mean).
pub const TURNED_DEG: f64 = 45.0;

/// Panels turned against all their edge neighbours ([`TURNED_DEG`]): at
/// least two neighbours, every one of them more than `TURNED_DEG` from the
/// panel, and either all within `TURNED_DEG` of one another or their mean
/// normal (of length at least half, so not from faces that nearly cancel,
/// as either side of a thin plate) also more than `TURNED_DEG` from the
/// panel. A coarsened scan
/// makes them where a sliver bridges two regions or a vertex lands off the
/// surface; their collocation velocity has nothing to do with the shape.
/// The second form is a fold on a crease: on a review's SUV a panel on the
/// crease between flank and wing top faced backwards (normal 0.76 along
/// the stream) on one side only, 53 to 80 degrees from its neighbours on
/// the two faces and 60 from their mean, and the boundary layer took it
/// for the back of a bluff edge; a one-row strip of that flank read
/// separated to the tail.
pub fn turned_panels(mesh: &PanelMesh) -> Vec<bool> {
    (0..mesh.len())
        .map(|t| {
            let around: Vec<crate::Vector> = mesh.edge_neighbours[t]
                .iter()
                .flatten()
                .map(|&j| *mesh.panels[j as usize].normal)
                .collect();
            turned(&mesh.panels[t].normal, &around)
        })
        .collect()
}

/// Whether a panel of unit normal `n` is turned against its edge
/// neighbours' unit normals `around` ([`turned_panels`]).
pub fn turned(n: &crate::Vector, around: &[crate::Vector]) -> bool {
    let cos = TURNED_DEG.to_radians().cos();
    let agree = || {
        around
            .iter()
            .enumerate()
            .all(|(k, a)| around[k + 1..].iter().all(|b| a.dot(b) >= cos))
    };
    // The neighbours' mean direction, when they do not nearly cancel (a
    // knife edge's two faces: the panel across its end is real).
    let off_mean = || {
        let sum = around.iter().sum::<crate::Vector>();
        sum.norm() >= 0.5 * around.len() as f64 && n.dot(&sum.normalize()) < cos
    };
    around.len() >= 2 && around.iter().all(|m| n.dot(m) < cos) && (agree() || off_mean())
}

/// `L_max * P / (4 sqrt(3) A)`: 1 for an equilateral triangle.
pub fn aspect_ratio(p: &Panel) -> f64 {
    let [a, b, c] = p.vertices;
    let perimeter = (b - a).norm() + (c - b).norm() + (a - c).norm();
    p.size * perimeter / (4.0 * 3f64.sqrt() * p.area)
}

/// Smallest interior angle, degrees.
pub fn smallest_angle_deg(p: &Panel) -> f64 {
    let v = p.vertices;
    (0..3)
        .map(|k| {
            let (u, w) = (v[(k + 1) % 3] - v[k], v[(k + 2) % 3] - v[k]);
            u.angle(&w).to_degrees()
        })
        .fold(180.0, f64::min)
}

/// Largest area ratio (at least 1) between panel `i` and an edge neighbour.
pub fn neighbour_area_ratio(mesh: &PanelMesh, i: usize) -> f64 {
    let a = mesh.panels[i].area;
    mesh.edge_neighbours[i]
        .iter()
        .flatten()
        .map(|&j| {
            let b = mesh.panels[j as usize].area;
            (a / b).max(b / a)
        })
        .fold(1.0, f64::max)
}

fn spread(mut v: Vec<f64>) -> Spread {
    if v.is_empty() {
        return Spread::default();
    }
    v.sort_by(f64::total_cmp);
    Spread {
        min: v[0],
        median: v[v.len() / 2],
        max: v[v.len() - 1],
    }
}

/// The edge of an equilateral triangle of `area` (m^2), m: a panel's
/// typical edge.
pub fn equilateral_edge(area: f64) -> f64 {
    (4.0 * area / 3f64.sqrt()).sqrt()
}

/// The panels' typical edge: that of an equilateral triangle of their
/// median area, m; `None` without panels.
pub fn typical_edge(areas: impl IntoIterator<Item = f64>) -> Option<f64> {
    let mut areas: Vec<f64> = areas.into_iter().collect();
    areas.sort_by(f64::total_cmp);
    areas.get(areas.len() / 2).map(|&a| equilateral_edge(a))
}

/// A panel count for a body of wetted `area` (m^2, the real panels only)
/// and overall `length` (m): panels with edges about `length / 50` (so
/// about 50 panels along the body, enough to resolve the pressure peaks at
/// nose, windscreen base and roof ends with constant-strength panels;
/// common practice), as equilateral triangles of area `sqrt(3)/4 h^2`,
/// rounded to 500 and clamped to 1,000-12,000. For a full car (about
/// 4.5 m long, 15-18 m^2 of surface) this gives 4,000-6,000; the usual
/// range for screening a full car is 4,000-12,000 (common practice).
pub fn suggested_panels(area: f64, length: f64) -> usize {
    if area.is_nan() || length.is_nan() || area <= 0.0 || length <= 0.0 {
        return 1000;
    }
    let h = length / 50.0;
    let n = area / (3f64.sqrt() / 4.0 * h * h);
    ((n / 500.0).round() * 500.0).clamp(1000.0, 12_000.0) as usize
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;
    use crate::{Mirrors, Point, TriMesh, generate};

    /// A surface cut mostly in slivers is in doubt as a whole (a review's
    /// CAD ellipsoid, all slivers, read C_D 0.010 against 0.100), and says
    /// so first; an even one is not.
    #[test]
    fn a_surface_cut_in_slivers_is_in_doubt_as_a_whole() {
        let strips = generate::latlong_sphere(1.0, 6, 96);
        let q = quality(&PanelMesh::new(strips, Mirrors::none()).unwrap());
        assert!(q.slivers_dominate(), "{} of {}", q.high_aspect, q.panels);
        assert!(
            q.warnings[0].starts_with("most of the surface"),
            "{:?}",
            q.warnings
        );
        let even = quality(&PanelMesh::new(generate::icosphere(1.0, 3), Mirrors::none()).unwrap());
        assert!(!even.slivers_dominate());
        assert!(
            !even
                .warnings
                .iter()
                .any(|w| w.starts_with("most of the surface"))
        );
    }

    /// Two spheres: touching boxes are one body with its parts, a sphere
    /// well clear of the other is warned about, named by its place.
    #[test]
    fn a_part_well_clear_of_the_body_is_warned_about() {
        let pair = |dx: f64| {
            let a = generate::icosphere(1.0, 2);
            let mut b = generate::icosphere(0.25, 2);
            b.map_vertices(|p| Point::new(p.x + dx, p.y, p.z));
            let k = a.vertices.len() as u32;
            let mut v = a.vertices.clone();
            v.extend(&b.vertices);
            let mut t = a.triangles.clone();
            t.extend(b.triangles.iter().map(|f| f.map(|i| i + k)));
            PanelMesh::new(TriMesh::new(v, t).unwrap(), Mirrors::none()).unwrap()
        };
        // Boxes 0.05 apart (2.5 % of the 2 m body): a part of the car.
        assert_eq!(detached_part_warning(&pair(1.3)), None);
        let w = detached_part_warning(&pair(3.0)).unwrap();
        assert!(
            w.starts_with("a separate part of the surface stands clear of the body")
                && w.contains("near x 3.00")
                && w.contains("stands 1.75 m from it"),
            "{w}"
        );
    }

    /// A box whose face meeting the wind is a fan of 96 thin triangles from
    /// its centre has them flagged; the fan on its downstream face, fans
    /// facing up or down, the same face cut in rings, and the built-in
    /// shapes are not.
    #[test]
    fn a_face_fanned_from_its_centre_is_found() {
        let boxed = |rings: usize| {
            // Rim points of a 2 x 2 square, 24 per side, at z = 1 and 0
            // (fan triangles of aspect ratio about 7).
            let rim: Vec<(f64, f64)> = (0..N)
                .map(|k| {
                    let (side, t) = (k / 24, -1.0 + (k % 24) as f64 / 12.0);
                    match side {
                        0 => (t, -1.0),
                        1 => (1.0, t),
                        2 => (-t, 1.0),
                        _ => (-1.0, -t),
                    }
                })
                .collect();
            let mut m = TriMesh::default();
            // Rings of the top face from the rim in (scale 1 is the rim).
            for r in 0..rings {
                let f = 1.0 - r as f64 / rings as f64;
                m.vertices
                    .extend(rim.iter().map(|&(x, y)| Point::new(f * x, f * y, 1.0)));
            }
            let bottom = m.vertices.len() as u32;
            m.vertices
                .extend(rim.iter().map(|&(x, y)| Point::new(x, y, 0.0)));
            m.vertices.push(Point::new(0.0, 0.0, 1.0));
            m.vertices.push(Point::new(0.0, 0.0, 0.0));
            let (top_hub, bottom_hub) = (bottom + N, bottom + N + 1);
            let inner = N * (rings as u32 - 1);
            for k in 0..N {
                let j = (k + 1) % N;
                m.triangles.push([top_hub, inner + k, inner + j]);
                m.triangles.push([bottom_hub, bottom + j, bottom + k]);
                m.triangles.push([k, bottom + k, bottom + j]);
                m.triangles.push([k, bottom + j, j]);
                for r in 1..rings as u32 {
                    let (o, i) = (N * (r - 1), N * r);
                    m.triangles.push([o + k, o + j, i + j]);
                    m.triangles.push([o + k, i + j, i + k]);
                }
            }
            PanelMesh::new(m, Mirrors::none()).unwrap()
        };
        const N: u32 = 96;
        // Turned a quarter about y, the top face meets the wind (-x) and
        // the bottom faces downstream (+x).
        let facing_wind = |m: PanelMesh| {
            let mut t = TriMesh {
                vertices: m.vertices.clone(),
                triangles: m.triangles.clone(),
            };
            t.map_vertices(|p| Point::new(-p.z, p.y, p.x));
            PanelMesh::new(t, Mirrors::none()).unwrap()
        };
        let fanned = |m: &PanelMesh| fans(m).iter().map(|f| f.1.len()).sum::<usize>();
        let fan = facing_wind(boxed(1));
        assert_eq!(fanned(&fan), 96, "only the fan meeting the wind");
        // On the face meeting the wind, at x = -1.
        assert!(
            fans(&fan)
                .iter()
                .flat_map(|f| &f.1)
                .all(|&j| (fan.panels[j as usize].centroid.x + 1.0).abs() < 1e-12)
        );
        assert_eq!(fanned(&facing_wind(boxed(4))), 0, "cut in rings");
        // Facing up and down (a roof, a floor): not counted.
        assert_eq!(fanned(&boxed(1)), 0);
        for mesh in [
            generate::ahmed(25.0, 2500).unwrap(),
            generate::ahmed(0.0, 2500).unwrap(),
            generate::coupe(22.0, 4000).unwrap(),
            generate::icosphere(1.0, 3),
        ] {
            assert_eq!(fanned(&PanelMesh::new(mesh, Mirrors::none()).unwrap()), 0);
        }
    }

    /// A fold on a smooth surface and one on a crease are turned; the
    /// panel that cuts a cube's corner or chamfers a right-angled edge is
    /// not (it faces between its neighbours; elementary geometry).
    #[test]
    fn folds_are_turned_and_cut_corners_are_not() {
        let v = |x: f64, y: f64, z: f64| crate::Vector::new(x, y, z).normalize();
        // Neighbours that agree, the panel across them.
        assert!(turned(
            &v(1.0, 0.0, 0.0),
            &[v(0.0, 0.0, 1.0), v(0.1, 0.0, 1.0)]
        ));
        // The review's crease: flank and wing top 60 degrees apart, the
        // panel between them facing backwards.
        let crease = [v(0.0, 1.0, 0.2), v(0.0, 0.3, 0.95)];
        assert!(turned(&v(0.76, 0.65, 0.06), &crease));
        assert!(!turned(&v(0.0, 0.7, 0.7), &crease));
        // A cube's corner cut off: 55 degrees from each face, along their mean.
        let faces = [v(1.0, 0.0, 0.0), v(0.0, 1.0, 0.0), v(0.0, 0.0, 1.0)];
        assert!(!turned(&v(1.0, 1.0, 1.0), &faces));
        // A 60-degree chamfer panel between faces 120 degrees apart.
        assert!(!turned(
            &v(1.0, 0.0, 0.0),
            &[v(0.5, 0.866, 0.0), v(0.5, -0.866, 0.0)]
        ));
        // The end face of a thin plate between its two faces, which nearly
        // cancel.
        assert!(!turned(
            &v(1.0, 0.0, 0.0),
            &[v(0.0, 0.05, 1.0), v(0.0, 0.0, -1.0)]
        ));
    }

    /// A unit plate in z = 0 whose edge y = 0 is bridged by a sliver to a
    /// vertex 1 cm inside the plate and 3 cm above it: the sliver faces
    /// mostly -y (about 72 degrees from its neighbours' +z), the three
    /// large triangles tilt by under 4 degrees.
    #[test]
    fn a_sliver_folded_out_of_a_plate_is_turned_and_nothing_else_is() {
        let v = vec![
            Point::new(0.0, 0.0, 0.0),
            Point::new(1.0, 0.0, 0.0),
            Point::new(1.0, 1.0, 0.0),
            Point::new(0.0, 1.0, 0.0),
            Point::new(0.5, 0.01, 0.03),
        ];
        let t = vec![[1, 4, 0], [0, 4, 3], [4, 2, 3], [4, 1, 2]];
        let mesh = PanelMesh::new(TriMesh::new(v, t).unwrap(), Mirrors::default()).unwrap();
        assert_eq!(turned_panels(&mesh), [true, false, false, false]);
        let mut q = quality(&mesh);
        assert_eq!(q.turned, 1);
        assert!(
            q.warnings
                .iter()
                .any(|w| w.contains("1 panel (25.0 %) is turned")),
            "{:?}",
            q.warnings
        );
        // The sliver's aspect ratio and angle (one panel of four) are
        // grading: under half of the panels, they become notes; the size
        // jumps (three of four) and the fold stay warnings.
        assert_eq!(q.warnings.len(), 4, "{:?}", q.warnings);
        q.grading_as_notes(0.5);
        assert_eq!(q.warnings.len(), 2, "{:?}", q.warnings);
        assert!(q.warnings[0].contains("differ in area"), "{:?}", q.warnings);
        assert!(q.warnings[1].contains("turned"), "{:?}", q.warnings);
        assert_eq!(q.notes.len(), 2, "{:?}", q.notes);
        // At a lower share they stay warnings.
        let mut q = quality(&mesh);
        q.grading_as_notes(0.2);
        assert_eq!((q.warnings.len(), q.notes.len()), (4, 0));
    }

    /// Sharp edges and corners of the shape are not folds: the slant-back
    /// body's box edges (90 degrees) and the slant's edges (25 degrees)
    /// give no turned panel.
    #[test]
    fn the_edges_and_corners_of_a_box_are_not_turned() {
        let body = generate::ahmed(25.0, 3000).unwrap();
        let mesh = PanelMesh::new(body, Mirrors::default()).unwrap();
        assert_eq!(quality(&mesh).turned, 0);
    }
}
