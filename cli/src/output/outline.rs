//! Named regions drawn on a view sheet: the outline of each region's
//! panels where it meets panels outside it (only where that edge is seen),
//! and the region's name clear of the body with a thin line to the middle
//! of what is seen of it (so that the name hides none of the result), so a
//! verdict such as "rear window: partly separated" can be checked against
//! the picture by eye.

use super::canvas::{Canvas, Rgb, WHITE};
use super::render::{self, DisplayTri, Frame, View, display_triangles};
use super::sheet::{self, SheetParams};
use super::text::{self, Align, TextStyle};

/// Outline and label colour: a strong blue that stands out of both the
/// pressure and the risk colour maps.
pub const OUTLINE: Rgb = [20, 80, 200];

/// One named region: membership of each display triangle (the real panels
/// first, then, on a half model, their mirror images in the same order).
#[derive(Debug, Clone, PartialEq)]
pub struct RegionMark {
    /// Its name.
    pub name: String,
    /// True for the display triangles in it.
    pub member: Vec<bool>,
}

/// Outline and label colour on a sheet whose legend takes blue (the
/// separation change's "separates in A only" stripes): a dark purple,
/// over a white halo so it stands apart from any stripe it crosses.
pub const OUTLINE_ON_STRIPES: Rgb = [95, 20, 110];

/// How region outlines are drawn: the line's colour, and whether a white
/// halo goes under it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct OutlineStyle {
    /// Line and name colour.
    pub colour: Rgb,
    /// A white rim on both sides of the line.
    pub halo: bool,
}

impl Default for OutlineStyle {
    fn default() -> Self {
        Self {
            colour: OUTLINE,
            halo: false,
        }
    }
}

/// Draw every region's outline and name on a sheet drawn with the default
/// [`SheetParams`] for `mesh` at `yaw_deg` (which picks the side view,
/// [`crate::output::render::View::sheet`]), in the default blue.
pub fn draw_regions(
    canvas: &mut Canvas,
    mesh: &tuft_mesh::PanelMesh,
    marks: &[RegionMark],
    yaw_deg: f64,
) {
    draw_regions_styled(canvas, mesh, marks, OutlineStyle::default(), yaw_deg);
}

/// [`draw_regions`] in another colour, for a sheet whose legend uses the
/// default blue.
pub fn draw_regions_styled(
    canvas: &mut Canvas,
    mesh: &tuft_mesh::PanelMesh,
    marks: &[RegionMark],
    style: OutlineStyle,
    yaw_deg: f64,
) {
    on_sheet(canvas, mesh, marks, style, yaw_deg, |v| {
        !matches!(v, View::Front | View::Rear)
    });
}

/// [`draw_regions_styled`] without names in any view: for a set of panels
/// the sheet's note names (`compare`'s changed shape).
pub fn draw_outlines_unnamed(
    canvas: &mut Canvas,
    mesh: &tuft_mesh::PanelMesh,
    marks: &[RegionMark],
    style: OutlineStyle,
    yaw_deg: f64,
) {
    on_sheet(canvas, mesh, marks, style, yaw_deg, |_| false);
}

fn on_sheet(
    canvas: &mut Canvas,
    mesh: &tuft_mesh::PanelMesh,
    marks: &[RegionMark],
    style: OutlineStyle,
    yaw_deg: f64,
    named: fn(View) -> bool,
) {
    if marks.is_empty() {
        return;
    }
    let tris = display_triangles(mesh);
    let lay = sheet::layout_at(&tris, &SheetParams::default(), yaw_deg);
    let on = RegionViews {
        views: &lay.views,
        named,
        flow_corner: true,
        scale_bar: true,
    };
    draw_regions_in(canvas, mesh, marks, style, &on);
}

/// The views a picture's region outlines go on: each view with its
/// frame, the views that carry the names, whether a name keeps left of
/// the flow arrow's corner ([`sheet::flow_mark_box`]) and right of the
/// scale bar ([`sheet::scale_bar_box`]).
pub struct RegionViews<'a> {
    /// The views and their frames.
    pub views: &'a [(View, Frame)],
    /// True for the views whose regions are named.
    pub named: fn(View) -> bool,
    /// The flow arrow sits in each view's top right corner.
    pub flow_corner: bool,
    /// The scale bar sits in the side view's bottom left corner.
    pub scale_bar: bool,
}

/// A region's name as placed on one view: its plate (x, y, w, h) and the
/// point its line runs to, pixels.
#[derive(Debug, Clone, PartialEq)]
pub struct Label {
    /// The view.
    pub view: View,
    /// The region's name.
    pub name: String,
    /// The white plate under the name.
    pub plate: [f32; 4],
    /// The end of its line, on the region.
    pub anchor: (f64, f64),
}

/// How far a region's seen part must face down in a view (the mean of its
/// seen panels' normals along the view's up, where it faces the viewer)
/// for its name to go under the body rather than over it (or up, in the
/// view from underneath, where names go under the body): a region facing
/// down seen from the side has every seen normal at least 0.5 down
/// ([`crate::region::FACING_COS`]), one facing up or a whole rear window
/// seen from above about 0 (both flanks), so a name moves only for a
/// region that lies along one side of the body in that view. Our choice.
const NAME_SIDE_COS: f64 = 0.3;

/// How far into a region a name's line ends in a side view, from where
/// the region meets the body's outline nearest the name, pixels: the dot
/// (2.5 pixels) then sits on the region at its edge.
const ANCHOR_INSET: f64 = 5.0;

/// Draw every region's outline on the views of `on` of a picture of
/// `mesh`, in `style`, with their names where `on` says.
pub fn draw_regions_in(
    canvas: &mut Canvas,
    mesh: &tuft_mesh::PanelMesh,
    marks: &[RegionMark],
    style: OutlineStyle,
    on: &RegionViews<'_>,
) {
    draw_regions_labelled(canvas, mesh, marks, style, on);
}

/// [`draw_regions_in`], returning the names it placed.
///
/// A name stands clear of the body on the side its region lies on in
/// that view: over the body, or under it (under the ground line where
/// one is drawn) where the region's seen part faces down there
/// ([`NAME_SIDE_COS`]), as a floor or a diffuser does from the side (a
/// review's "diffuser" was named over the boot deck with its line running
/// down the whole flank to the sill, across the deck's name). Where there
/// is no room under the body in the view (the sweep's glance pictures
/// leave room only when a region faces down) the region keeps its outline
/// there unnamed. In a side view a region facing up or down is seen
/// edge-on, as a band along the body's outline whose middle lies on the
/// flank (a review read the "boot deck" line as ending on the flank below
/// the deck), so the line ends where the band meets the outline nearest
/// the name ([`ANCHOR_INSET`]); seen face-on (from above, from
/// underneath) it ends over the middle of the region's seen panels.
pub fn draw_regions_labelled(
    canvas: &mut Canvas,
    mesh: &tuft_mesh::PanelMesh,
    marks: &[RegionMark],
    style: OutlineStyle,
    on: &RegionViews<'_>,
) -> Vec<Label> {
    let mut labels = Vec::new();
    if marks.is_empty() {
        return labels;
    }
    let tris = display_triangles(mesh);
    let real = mesh.len();
    let neighbours = |k: usize| -> Vec<usize> {
        let offset = if k >= real { real } else { 0 };
        mesh.edge_neighbours[k - offset]
            .iter()
            .flatten()
            .map(|&j| j as usize + offset)
            .collect()
    };
    // The named views first; a region none of them names (a tailgate or
    // a base, seen from the rear only) is named in the first other view
    // that shows its face (a review's "tailgate" box was outlined in the
    // rear view with no name anywhere).
    // Outlines that no view names (compare's changed shape, which its
    // sheet's note names) get no name anywhere: a review's diffuser
    // comparison printed "changed shape" through the diffuser's name.
    let any_named = on.views.iter().any(|(v, _)| (on.named)(*v));
    let mut labelled = vec![!any_named; marks.len()];
    let mut order: Vec<&(View, Frame)> = on.views.iter().collect();
    order.sort_by_key(|(v, _)| !(on.named)(*v));
    for (view, frame) in order {
        let seen = render::visible(&tris, *view, frame);
        let (_, up, toward) = view.basis();
        let mut placed: Vec<[f32; 4]> = Vec::new();
        // Names step left of the flow arrow's corner and right of the
        // scale bar.
        let nowhere = [-1.0e6, -1.0e6, 0.0, 0.0];
        let corner = if on.flow_corner {
            sheet::flow_mark_box(frame.rect)
        } else {
            nowhere
        };
        let bar = if on.scale_bar && view.is_side() {
            sheet::scale_bar_box(frame)
        } else {
            nowhere
        };
        // The body's extent on the picture: names stand clear of it, above
        // (below in the view from underneath), so that they hide nothing.
        let (top, bottom) = tris
            .iter()
            .flat_map(|t| t.corners.iter().map(|c| frame.project(*view, c).1))
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), y| {
                (lo.min(y), hi.max(y))
            });
        let (t0, h0) = (frame.rect.1 as f64, frame.rect.3 as f64);
        // Under the body, past the ground line where the view draws one
        // ([`sheet::ground_line`]).
        let ground = mesh
            .mirrors
            .ground
            .filter(|_| !matches!(view, View::Top | View::Underneath))
            .map(|z| frame.project(*view, &tuft_mesh::Point::new(0.0, 0.0, z)).1)
            .filter(|y| (t0..t0 + h0).contains(y));
        let lowest = ground.map_or(bottom, |g| g.max(bottom));
        let over = (top - 10.0).max(t0 + 16.0);
        let under = if *view == View::Underneath {
            Some((bottom + 24.0).min(t0 + h0 - 4.0))
        } else {
            Some(lowest + 24.0).filter(|y| y + 5.0 <= t0 + h0)
        };
        for (m, mark) in marks.iter().enumerate() {
            let member = |k: usize| mark.member.get(k).copied().unwrap_or(false);
            let mut label = (0.0, 0.0, 0.0);
            let mut facing_up = 0.0;
            let mut dots: Vec<(f32, f32)> = Vec::new();
            let mut edges: Vec<BoundaryEdge> = Vec::new();
            for (k, t) in tris.iter().enumerate() {
                if !member(k) {
                    continue;
                }
                for e in 0..3 {
                    let (a, b) = (t.corners[e], t.corners[(e + 1) % 3]);
                    let outside = neighbours(k)
                        .into_iter()
                        .find(|&j| shares_edge(&tris[j], &a, &b))
                        .filter(|&j| !member(j));
                    if let Some(j) = outside {
                        edges.push(BoundaryEdge {
                            ends: [a, b],
                            tris: (k, j),
                        });
                    }
                }
                // The name goes where the region shows its face: a panel
                // seen edge-on or from behind (through an arch, from
                // underneath) does not place it (a review's "roof" was
                // labelled in the middle of the floor).
                let (x, y) = frame.project(*view, &centroid(t));
                if seen.at(x as i64, y as i64) == Some(k) && t.normal.dot(&toward) > 0.0 {
                    label = (label.0 + x, label.1 + y, label.2 + 1.0);
                    facing_up += t.normal.dot(&up);
                }
            }
            for (edge, smooth) in edges.iter().zip(smoothed(&edges)) {
                seen_edge(
                    &seen,
                    edge.tris,
                    [
                        frame.project(*view, &edge.ends[0]),
                        frame.project(*view, &edge.ends[1]),
                    ],
                    [
                        frame.project(*view, &smooth[0]),
                        frame.project(*view, &smooth[1]),
                    ],
                    &mut dots,
                );
            }
            // The halo first, all of it, so that it covers no part of the
            // line.
            if style.halo {
                for &(x, y) in &dots {
                    canvas.fill_circle(x, y, 2.6, WHITE);
                }
            }
            for &(x, y) in &dots {
                canvas.fill_circle(x, y, 1.3, style.colour);
            }
            if label.2 > 0.0 && ((on.named)(*view) || !labelled[m]) {
                let facing_up = facing_up / label.2;
                let below = if *view == View::Underneath {
                    facing_up < NAME_SIDE_COS
                } else {
                    facing_up < -NAME_SIDE_COS
                };
                let clear = if below { under } else { Some(over) };
                let Some(clear) = clear else {
                    continue;
                };
                let mut at = (label.0 / label.2, label.1 / label.2);
                if view.is_side() {
                    let seen_member = |y: i64| {
                        seen.at(at.0 as i64, y)
                            .is_some_and(|k| member(k) && tris[k].normal.dot(&toward) > 0.0)
                    };
                    if let Some(y) = edge_of(seen_member, (t0 as i64, (t0 + h0) as i64), below) {
                        at.1 = y;
                    }
                }
                let frame_x = (frame.rect.0 as f32, (frame.rect.0 + frame.rect.2) as f32);
                let plate = draw_label(
                    canvas,
                    &mark.name,
                    at,
                    (clear, below),
                    &Room {
                        placed: &placed,
                        keep_clear: [corner, bar],
                        frame_x,
                    },
                    style.colour,
                );
                placed.push(plate);
                labelled[m] = true;
                labels.push(Label {
                    view: *view,
                    name: mark.name.clone(),
                    plate,
                    anchor: at,
                });
            }
        }
    }
    labels
}

/// Where a column of pixels `rows` (top, bottom) first meets the region
/// (`inside` a row), from the bottom when `from_below`, else from the
/// top, moved [`ANCHOR_INSET`] into it (to the middle of a thinner run):
/// the row a name's line ends on. `None` when the column misses it.
fn edge_of(
    inside: impl Fn(i64) -> bool,
    (top, bottom): (i64, i64),
    from_below: bool,
) -> Option<f64> {
    let step: i64 = if from_below { -1 } else { 1 };
    let mut y = if from_below { bottom - 1 } else { top };
    while (top..bottom).contains(&y) && !inside(y) {
        y += step;
    }
    if !(top..bottom).contains(&y) {
        return None;
    }
    let mut run = 0;
    while run < 2 * ANCHOR_INSET as i64 && inside(y + step * (run + 1)) {
        run += 1;
    }
    let inset = (ANCHOR_INSET).min(0.5 * run as f64);
    Some(y as f64 + 0.5 + step as f64 * inset)
}

fn centroid(t: &DisplayTri) -> tuft_mesh::Point {
    let [a, b, c] = t.corners;
    tuft_mesh::Point::from((a.coords + b.coords + c.coords) / 3.0)
}

/// True when triangle `t` has both `a` and `b` among its corners.
fn shares_edge(t: &DisplayTri, a: &tuft_mesh::Point, b: &tuft_mesh::Point) -> bool {
    t.corners.contains(a) && t.corners.contains(b)
}

/// An edge between a region's triangle and one outside it: its corners
/// and the two triangles (inside, outside).
struct BoundaryEdge {
    ends: [tuft_mesh::Point; 2],
    tris: (usize, usize),
}

/// Passes of [`smoothed`]: each halves a corner's step across the line
/// and takes out a sawtooth of alternate triangles whole.
const SMOOTHING_PASSES: usize = 3;

/// The boundary `edges`' corners moved towards their neighbours along the
/// outline (each corner joining exactly two boundary edges to the mean of
/// itself, weight 1/2, and those two, 1/4 each, [`SMOOTHING_PASSES`]
/// times): a region's edge runs through the panels' triangles, and a box
/// cutting them at a slant, or a facing rule across a rounded shoulder,
/// had drawn a sawtooth of triangle edges that a review read as a glitch.
/// Corners where the outline branches or ends stay put.
fn smoothed(edges: &[BoundaryEdge]) -> Vec<[tuft_mesh::Point; 2]> {
    let key = |p: &tuft_mesh::Point| [p.x.to_bits(), p.y.to_bits(), p.z.to_bits()];
    let mut index: std::collections::HashMap<[u64; 3], usize> = std::collections::HashMap::new();
    let mut points: Vec<tuft_mesh::Point> = Vec::new();
    let mut ends: Vec<[usize; 2]> = Vec::with_capacity(edges.len());
    for e in edges {
        let mut at = |p: &tuft_mesh::Point| {
            *index.entry(key(p)).or_insert_with(|| {
                points.push(*p);
                points.len() - 1
            })
        };
        ends.push([at(&e.ends[0]), at(&e.ends[1])]);
    }
    let mut next: Vec<Vec<usize>> = vec![Vec::new(); points.len()];
    for &[a, b] in &ends {
        next[a].push(b);
        next[b].push(a);
    }
    for _ in 0..SMOOTHING_PASSES {
        points = points
            .iter()
            .enumerate()
            .map(|(i, p)| match next[i].as_slice() {
                &[a, b] => tuft_mesh::Point::from(
                    0.5 * p.coords + 0.25 * (points[a].coords + points[b].coords),
                ),
                _ => *p,
            })
            .collect();
    }
    ends.iter().map(|&[a, b]| [points[a], points[b]]).collect()
}

/// The dots of a boundary edge drawn along its smoothed projection
/// `drawn` (one a pixel), kept only where, at the same place along the
/// edge as it is, `ends`, one of the two triangles it separates is the
/// one seen (so edges behind the body stay hidden), added to `dots`.
fn seen_edge(
    seen: &render::Visible,
    (k, j): (usize, usize),
    ends: [(f64, f64); 2],
    drawn: [(f64, f64); 2],
    dots: &mut Vec<(f32, f32)>,
) {
    let [(x0, y0), (x1, y1)] = ends;
    let [(u0, v0), (u1, v1)] = drawn;
    let steps = (x1 - x0)
        .hypot(y1 - y0)
        .max((u1 - u0).hypot(v1 - v0))
        .ceil()
        .max(1.0) as usize;
    for s in 0..=steps {
        let f = s as f64 / steps as f64;
        let (x, y) = (x0 + f * (x1 - x0), y0 + f * (y1 - y0));
        let near = [(0, 0), (1, 0), (-1, 0), (0, 1), (0, -1)]
            .iter()
            .any(|&(dx, dy)| matches!(seen.at(x as i64 + dx, y as i64 + dy), Some(m) if m == k || m == j));
        if near {
            dots.push(((u0 + f * (u1 - u0)) as f32, (v0 + f * (v1 - v0)) as f32));
        }
    }
}

/// The region's name on a white plate clear of the body, at the height
/// `clear` and over the region's middle `at` (left of the flow arrow's
/// corner and right of the scale bar, `keep_clear`, where it would cover
/// them), with a thin line down (or, `below`, up) to `at`; returns its
/// plate (x, y, w, h). Where it would cover a plate already `placed` it
/// moves further from the body (`below`: down, else up) past it, or,
/// where its line would then run through that plate (the two regions lie
/// one over the other in the view), beside it at the same height, on the
/// side of its own region, within the view's `frame_x` (left, right).
fn draw_label(
    canvas: &mut Canvas,
    name: &str,
    at: (f64, f64),
    (clear, below): (f64, bool),
    room: &Room<'_>,
    colour: Rgb,
) -> [f32; 4] {
    let Room {
        placed,
        keep_clear,
        frame_x,
    } = *room;
    let style = TextStyle::new(14.0)
        .bold()
        .colour(colour)
        .align(Align::Centre);
    let w = text::width(name, &style) + 8.0;
    let (mut x, mut y) = (at.0 as f32, clear as f32);
    let overlaps = |p: &[f32; 4], x: f32, y: f32| {
        let (l, t) = (x - 0.5 * w, y - 13.0);
        l < p[0] + p[2] && p[0] < l + w && t < p[1] + p[3] && p[1] < t + 18.0
    };
    let [corner, bar] = keep_clear;
    if overlaps(&corner, x, y) {
        x = corner[0] - 0.5 * w - 4.0;
    }
    if overlaps(&bar, x, y) {
        x = bar[0] + bar[2] + 0.5 * w + 4.0;
    }
    let start = |x: f32, y: f32| (x, if below { y - 13.0 } else { y + 5.0 });
    let crosses = |x: f32, y: f32| {
        placed
            .iter()
            .any(|p| line_meets(start(x, y), (at.0 as f32, at.1 as f32), p))
    };
    let beside = placed
        .iter()
        .find(|p| overlaps(p, x, y))
        .map(|p| {
            if at.0 as f32 >= p[0] + 0.5 * p[2] {
                p[0] + p[2] + 0.5 * w + 4.0
            } else {
                p[0] - 0.5 * w - 4.0
            }
        })
        .filter(|&bx| {
            frame_x.0 <= bx - 0.5 * w
                && bx + 0.5 * w <= frame_x.1
                && !placed.iter().chain(&keep_clear).any(|p| overlaps(p, bx, y))
                && !crosses(bx, y)
        });
    let (sx, mut sy) = (x, y);
    while let Some(p) = placed.iter().find(|p| overlaps(p, sx, sy)) {
        sy = if below {
            p[1] + p[3] + 15.0
        } else {
            p[1] - 7.0
        };
    }
    (x, y) = match beside {
        Some(bx) if crosses(sx, sy) => (bx, y),
        _ => (sx, sy),
    };
    let plate = [x - 0.5 * w, y - 13.0, w, 18.0];
    canvas.polyline(&[start(x, y), (at.0 as f32, at.1 as f32)], colour, 1.0);
    canvas.fill_circle(at.0 as f32, at.1 as f32, 2.5, colour);
    canvas.fill_rect(plate[0], plate[1], plate[2], plate[3], WHITE);
    text::draw(canvas, name, x, y, &style);
    plate
}

/// What a name keeps clear of on its view: the plates (x, y, w, h)
/// already `placed`, the flow arrow's corner and the scale bar
/// (`keep_clear`), and the view's sides (`frame_x`: left, right).
#[derive(Clone, Copy)]
struct Room<'a> {
    placed: &'a [[f32; 4]],
    keep_clear: [[f32; 4]; 2],
    frame_x: (f32, f32),
}

/// True when the straight line from `a` to `b` passes through the plate
/// `p` (x, y, w, h), tested a pixel at a time.
fn line_meets(a: (f32, f32), b: (f32, f32), p: &[f32; 4]) -> bool {
    let steps = (b.0 - a.0).hypot(b.1 - a.1).ceil().max(1.0) as usize;
    (0..=steps).any(|s| {
        let f = s as f32 / steps as f32;
        let (x, y) = (a.0 + f * (b.0 - a.0), a.1 + f * (b.1 - a.1));
        p[0] < x && x < p[0] + p[2] && p[1] < y && y < p[1] + p[3]
    })
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;
    use crate::output::canvas::testing::{decode, keep};
    use crate::output::fixture::{Fixture, caption};
    use crate::output::sheet::{SurfaceField, surface_sheet};

    fn outline_pixels(marks: &[RegionMark]) -> usize {
        styled_pixels(marks, OutlineStyle::default())[0]
    }

    /// Pixels of the style's colour and of the default blue on a sheet
    /// with `marks` drawn in `style`.
    fn styled_pixels(marks: &[RegionMark], style: OutlineStyle) -> [usize; 2] {
        let f = Fixture::sphere(3);
        let mut canvas = surface_sheet(&f.surface(), SurfaceField::Pressure, &caption()).unwrap();
        draw_regions_styled(&mut canvas, &f.mesh, marks, style, 0.0);
        let png = canvas.to_png().unwrap();
        keep("regions-sphere.png", &png);
        let d = decode(&png);
        let mut n = [0, 0];
        for y in 0..1000 {
            for x in 0..1600 {
                n[0] += usize::from(d.pixel(x, y) == style.colour);
                n[1] += usize::from(d.pixel(x, y) == OUTLINE);
            }
        }
        n
    }

    /// Another colour replaces the blue, line and name alike.
    #[test]
    fn a_region_can_be_outlined_in_another_colour() {
        let f = Fixture::sphere(3);
        let member = f.mesh.panels.iter().map(|p| p.centroid.x > 0.3).collect();
        let marks = [RegionMark {
            name: "rear cap".into(),
            member,
        }];
        let style = OutlineStyle {
            colour: OUTLINE_ON_STRIPES,
            halo: true,
        };
        let [purple, blue] = styled_pixels(&marks, style);
        assert!(purple > 300, "{purple}");
        assert_eq!(blue, 0);
    }

    /// A region (the sphere's rear cap) is outlined and named; with no
    /// region the sheet has no outline colour at all.
    /// A name that would sit on the flow arrow's corner steps left of it
    /// (a review saw "boot deck" written over "flow"); elsewhere it stays
    /// above its region.
    #[test]
    fn a_name_keeps_clear_of_the_flow_arrow() {
        let mut canvas = Canvas::new(800, 400).unwrap();
        let corner = sheet::flow_mark_box((0, 0, 800, 400));
        let clear_of = |p: [f32; 4], q: [f32; 4]| {
            p[0] + p[2] <= q[0] || q[0] + q[2] <= p[0] || p[1] + p[3] <= q[1] || q[1] + q[3] <= p[1]
        };
        let plate = draw_label(
            &mut canvas,
            "boot deck",
            (760.0, 200.0),
            (30.0, false),
            &Room {
                placed: &[],
                keep_clear: [corner, [-1.0e6, -1.0e6, 0.0, 0.0]],
                frame_x: (0.0, 800.0),
            },
            OUTLINE,
        );
        assert!(clear_of(plate, corner), "{plate:?} on {corner:?}");
        let plate = draw_label(
            &mut canvas,
            "bonnet",
            (200.0, 200.0),
            (30.0, false),
            &Room {
                placed: &[],
                keep_clear: [corner, [-1.0e6, -1.0e6, 0.0, 0.0]],
                frame_x: (0.0, 800.0),
            },
            OUTLINE,
        );
        assert!(
            (plate[0] + 0.5 * plate[2] - 200.0).abs() < 1e-3,
            "{plate:?}"
        );
    }

    /// The built-in coupe on the ground with a rear window and a boot
    /// deck facing up and a diffuser facing down, as a case names them.
    /// A region over the whole height and width of `x`, faced.
    fn region(name: &str, x: [f64; 2], facing: &str) -> crate::region::RegionSection {
        crate::region::RegionSection {
            name: name.into(),
            x: Some(x),
            y: None,
            z: None,
            facing: Some(facing.into()),
            optional: false,
        }
    }

    fn coupe_with_regions() -> (tuft_mesh::PanelMesh, Vec<RegionMark>) {
        use tuft_mesh::generate::{CoupeParams, coupe_with_params};
        let body = coupe_with_params(&CoupeParams {
            panels: 3000,
            ..CoupeParams::default()
        })
        .unwrap();
        let mesh = tuft_mesh::PanelMesh::new(body, tuft_mesh::Mirrors::ground(0.0)).unwrap();
        let sections = [
            region("rear window", [3.15, 3.7], "up"),
            region("boot deck", [3.7, 4.2], "up"),
            region("diffuser", [3.7, 4.5], "down"),
        ];
        let marks = crate::region::marks(&sections, &mesh);
        (mesh, marks)
    }

    /// Canvas (x, y) box round what is seen of a region in a view: its
    /// pixels seen facing the viewer.
    fn seen_box(
        mesh: &tuft_mesh::PanelMesh,
        mark: &RegionMark,
        view: View,
        frame: &Frame,
    ) -> [f64; 4] {
        let tris = display_triangles(mesh);
        let seen = render::visible(&tris, view, frame);
        let toward = view.basis().2;
        let (l, t, w, h) = frame.rect;
        let mut b = [
            f64::INFINITY,
            f64::INFINITY,
            f64::NEG_INFINITY,
            f64::NEG_INFINITY,
        ];
        for y in t..t + h {
            for x in l..l + w {
                if let Some(k) = seen.at(x, y)
                    && mark.member[k]
                    && tris[k].normal.dot(&toward) > 0.0
                {
                    let (x, y) = (x as f64, y as f64);
                    b = [
                        b[0].min(x),
                        b[1].min(y),
                        b[2].max(x + 1.0),
                        b[3].max(y + 1.0),
                    ];
                }
            }
        }
        b
    }

    /// Regions outlined and named on a 1600 by 1000 sheet as the risk
    /// and surface-flow pictures name them (not in the front and rear
    /// views): the names placed, the canvas, the display triangles and
    /// the layout.
    fn labelled_sheet(
        mesh: &tuft_mesh::PanelMesh,
        marks: &[RegionMark],
    ) -> (Vec<Label>, Canvas, Vec<DisplayTri>, sheet::Layout) {
        let mut canvas = Canvas::new(1600, 1000).unwrap();
        let tris = display_triangles(mesh);
        let lay = sheet::layout(&tris, &SheetParams::default());
        let on = RegionViews {
            views: &lay.views,
            named: |v| !matches!(v, View::Front | View::Rear),
            flow_corner: true,
            scale_bar: true,
        };
        let labels = draw_regions_labelled(&mut canvas, mesh, marks, OutlineStyle::default(), &on);
        (labels, canvas, tris, lay)
    }

    /// In the side view a region facing down is named under the body
    /// (under the ground line) with its line up to where it is seen, one
    /// facing up over it with its line down to the top of what is seen of
    /// it (a review's "diffuser" was named over the boot deck, its line
    /// running across the deck's name and down the whole flank, and the
    /// deck's line ended on the flank below the deck). The independent
    /// check is the picture itself: each line ends within the box of the
    /// region's own seen pixels, and no name covers another or lies
    /// across another's line.
    #[test]
    fn a_name_stands_beside_what_it_names() {
        let (mesh, marks) = coupe_with_regions();
        let (labels, canvas, tris, lay) = labelled_sheet(&mesh, &marks);
        keep("regions-coupe.png", &canvas.to_png().unwrap());
        let frame = lay.frame(View::Side).unwrap();
        let ground = frame
            .project(View::Side, &tuft_mesh::Point::new(0.0, 0.0, 0.0))
            .1;
        let side = |name: &str| {
            labels
                .iter()
                .find(|l| l.view == View::Side && l.name == name)
                .unwrap_or_else(|| panic!("{name} is not named: {labels:?}"))
        };
        for mark in &marks {
            let label = side(&mark.name);
            let b = seen_box(&mesh, mark, View::Side, frame);
            let (x, y) = label.anchor;
            assert!(
                b[0] <= x && x <= b[2] && b[1] <= y && y <= b[3],
                "{}: line ends at {:?}, outside {b:?}",
                mark.name,
                label.anchor
            );
            let under = label.plate[1] as f64 > ground;
            assert_eq!(under, mark.name == "diffuser", "{label:?}");
            // Up-facing regions: the line ends on the region just under
            // the body's outline in its column (on the deck, not on the
            // flank under it).
            if !under {
                let seen = render::visible(&tris, View::Side, frame);
                let outline = (frame.rect.1..)
                    .find(|&r| seen.at(x as i64, r).is_some())
                    .unwrap();
                assert!(
                    (y - outline as f64) <= ANCHOR_INSET + 1.0,
                    "{label:?}: the outline at {outline}"
                );
            }
        }
        // From underneath the diffuser is named under the body as before,
        // and from above the regions facing up over it.
        assert!(
            labels
                .iter()
                .any(|l| l.view == View::Underneath && l.name == "diffuser")
        );
        assert!(
            !labels
                .iter()
                .any(|l| l.view == View::Top && l.name == "diffuser")
        );
        for (i, a) in labels.iter().enumerate() {
            for b in labels.iter().skip(i + 1).filter(|b| b.view == a.view) {
                let (p, q) = (a.plate, b.plate);
                let apart = p[0] + p[2] <= q[0]
                    || q[0] + q[2] <= p[0]
                    || p[1] + p[3] <= q[1]
                    || q[1] + q[3] <= p[1];
                assert!(apart, "{a:?} covers {b:?}");
                for (l, other) in [(a, b), (b, a)] {
                    let from = (l.plate[0] + 0.5 * l.plate[2], l.plate[1] + 0.5 * l.plate[3]);
                    let to = (l.anchor.0 as f32, l.anchor.1 as f32);
                    assert!(
                        !line_meets(from, to, &other.plate),
                        "{l:?} runs across {other:?}"
                    );
                }
            }
        }
    }

    /// A region that no named view names (the square-back research body's
    /// base, seen from the rear only) is named in the first other view
    /// showing its face; the roof, named above, is not named again there.
    #[test]
    fn a_region_seen_from_the_rear_only_is_named_there() {
        let body = tuft_mesh::generate::ahmed(0.0, 2000).unwrap();
        let mesh = tuft_mesh::PanelMesh::new(body, tuft_mesh::Mirrors::ground(0.0)).unwrap();
        let (lo, hi) = mesh.bounds();
        let sections = [
            region("roof", [lo.x, hi.x], "up"),
            region("base", [hi.x - 0.01, hi.x + 0.01], "rear"),
        ];
        let marks = crate::region::marks(&sections, &mesh);
        let (labels, ..) = labelled_sheet(&mesh, &marks);
        let views = |name: &str| -> Vec<View> {
            labels
                .iter()
                .filter(|l| l.name == name)
                .map(|l| l.view)
                .collect()
        };
        assert_eq!(views("base"), [View::Rear], "{labels:?}");
        let roof = views("roof");
        assert!(
            !roof.is_empty() && !roof.iter().any(|v| matches!(v, View::Front | View::Rear)),
            "{roof:?}"
        );
    }

    /// Outlines drawn with no view named (compare's changed shape) carry
    /// no name in any view, the rear's included.
    #[test]
    fn outlines_named_in_no_view_carry_no_name() {
        let body = tuft_mesh::generate::ahmed(0.0, 2000).unwrap();
        let mesh = tuft_mesh::PanelMesh::new(body, tuft_mesh::Mirrors::ground(0.0)).unwrap();
        let (_, hi) = mesh.bounds();
        let marks =
            crate::region::marks(&[region("base", [hi.x - 0.01, hi.x + 0.01], "rear")], &mesh);
        let mut canvas = Canvas::new(1600, 1000).unwrap();
        let tris = display_triangles(&mesh);
        let lay = sheet::layout(&tris, &SheetParams::default());
        let on = RegionViews {
            views: &lay.views,
            named: |_| false,
            flow_corner: true,
            scale_bar: true,
        };
        let labels =
            draw_regions_labelled(&mut canvas, &mesh, &marks, OutlineStyle::default(), &on);
        assert!(labels.is_empty(), "{labels:?}");
    }

    /// Two regions one over the other in a view: the second name goes
    /// beside the first at its height, not over it with its line through
    /// it; where its line would not cross the first, it stacks as before.
    #[test]
    fn a_name_whose_line_would_cross_another_goes_beside_it() {
        let mut canvas = Canvas::new(800, 400).unwrap();
        let none = [-1.0e6, -1.0e6, 0.0, 0.0];
        // A name placed at `at`, 60 pixels clear, beside those `placed`.
        let mut label = |name: &str, at: (f64, f64), placed: &[[f32; 4]]| {
            draw_label(
                &mut canvas,
                name,
                at,
                (60.0, false),
                &Room {
                    placed,
                    keep_clear: [none, none],
                    frame_x: (0.0, 800.0),
                },
                OUTLINE,
            )
        };
        let first = label("boot deck", (400.0, 200.0), &[]);
        let second = label("spoiler", (405.0, 180.0), &[first]);
        assert_eq!(second[1], first[1], "{second:?}");
        assert!(second[0] >= first[0] + first[2], "{second:?} {first:?}");
        // Far enough apart for a straight line past it: stacked over it.
        let third = label("rear window", (330.0, 180.0), &[first]);
        assert!(third[1] + third[3] <= first[1], "{third:?} {first:?}");
    }

    #[test]
    fn a_region_is_outlined_where_it_is_seen() {
        let f = Fixture::sphere(3);
        let member = f.mesh.panels.iter().map(|p| p.centroid.x > 0.3).collect();
        let marks = [RegionMark {
            name: "rear cap".into(),
            member,
        }];
        assert_eq!(outline_pixels(&[]), 0);
        assert!(outline_pixels(&marks) > 300);
    }
}
