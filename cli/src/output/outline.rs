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
    if marks.is_empty() {
        return;
    }
    let tris = display_triangles(mesh);
    let lay = sheet::layout_at(&tris, &SheetParams::default(), yaw_deg);
    let on = RegionViews {
        views: &lay.views,
        named: |v| !matches!(v, View::Front | View::Rear),
        flow_corner: true,
    };
    draw_regions_in(canvas, mesh, marks, style, &on);
}

/// The views a picture's region outlines go on: each view with its
/// frame, the views that carry the names, and whether a name keeps left
/// of the flow arrow's corner ([`sheet::flow_mark_box`]).
pub struct RegionViews<'a> {
    /// The views and their frames.
    pub views: &'a [(View, Frame)],
    /// True for the views whose regions are named.
    pub named: fn(View) -> bool,
    /// The flow arrow sits in each view's top right corner.
    pub flow_corner: bool,
}

/// Draw every region's outline on the views of `on` of a picture of
/// `mesh`, in `style`, with their names where `on` says.
pub fn draw_regions_in(
    canvas: &mut Canvas,
    mesh: &tuft_mesh::PanelMesh,
    marks: &[RegionMark],
    style: OutlineStyle,
    on: &RegionViews<'_>,
) {
    if marks.is_empty() {
        return;
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
    for (view, frame) in on.views {
        let seen = render::visible(&tris, *view, frame);
        let toward = view.basis().2;
        let mut placed: Vec<[f32; 4]> = Vec::new();
        // Names step left of the flow arrow's corner.
        let corner = if on.flow_corner {
            sheet::flow_mark_box(frame.rect)
        } else {
            [-1.0e6, -1.0e6, 0.0, 0.0]
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
        let clear = if *view == View::Underneath {
            (bottom + 24.0).min(t0 + h0 - 4.0)
        } else {
            (top - 10.0).max(t0 + 16.0)
        };
        for mark in marks {
            let mut label = (0.0, 0.0, 0.0);
            let mut dots: Vec<(f32, f32)> = Vec::new();
            for (k, t) in tris.iter().enumerate() {
                if !mark.member.get(k).copied().unwrap_or(false) {
                    continue;
                }
                for e in 0..3 {
                    let (a, b) = (t.corners[e], t.corners[(e + 1) % 3]);
                    let outside = neighbours(k)
                        .into_iter()
                        .find(|&j| shares_edge(&tris[j], &a, &b))
                        .filter(|&j| !mark.member.get(j).copied().unwrap_or(false));
                    if let Some(j) = outside {
                        seen_edge(
                            &seen,
                            (k, j),
                            [frame.project(*view, &a), frame.project(*view, &b)],
                            &mut dots,
                        );
                    }
                }
                // The name goes where the region shows its face: a panel
                // seen edge-on or from behind (through an arch, from
                // underneath) does not place it (a review's "roof" was
                // labelled in the middle of the floor).
                let (x, y) = frame.project(*view, &centroid(t));
                if seen.at(x as i64, y as i64) == Some(k) && t.normal.dot(&toward) > 0.0 {
                    label = (label.0 + x, label.1 + y, label.2 + 1.0);
                }
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
            if label.2 > 0.0 && (on.named)(*view) {
                let at = (label.0 / label.2, label.1 / label.2);
                let below = *view == View::Underneath;
                placed.push(draw_label(
                    canvas,
                    &mark.name,
                    at,
                    (clear, below),
                    (&placed, corner),
                    style.colour,
                ));
            }
        }
    }
}

fn centroid(t: &DisplayTri) -> tuft_mesh::Point {
    let [a, b, c] = t.corners;
    tuft_mesh::Point::from((a.coords + b.coords + c.coords) / 3.0)
}

/// True when triangle `t` has both `a` and `b` among its corners.
fn shares_edge(t: &DisplayTri, a: &tuft_mesh::Point, b: &tuft_mesh::Point) -> bool {
    t.corners.contains(a) && t.corners.contains(b)
}

/// The dots of the projected edge `ends` (one a pixel), kept only where one
/// of the two triangles it separates is the one seen (so edges behind the
/// body stay hidden), added to `dots`.
fn seen_edge(
    seen: &render::Visible,
    (k, j): (usize, usize),
    ends: [(f64, f64); 2],
    dots: &mut Vec<(f32, f32)>,
) {
    let [(x0, y0), (x1, y1)] = ends;
    let steps = (x1 - x0).hypot(y1 - y0).ceil().max(1.0) as usize;
    for s in 0..=steps {
        let f = s as f64 / steps as f64;
        let (x, y) = (x0 + f * (x1 - x0), y0 + f * (y1 - y0));
        let near = [(0, 0), (1, 0), (-1, 0), (0, 1), (0, -1)]
            .iter()
            .any(|&(dx, dy)| matches!(seen.at(x as i64 + dx, y as i64 + dy), Some(m) if m == k || m == j));
        if near {
            dots.push((x as f32, y as f32));
        }
    }
}

/// The region's name on a white plate clear of the body, at the height
/// `clear` and above the region's middle `at` (left of the flow arrow's
/// `corner` where it would cover it), moved further away from the body
/// (`below`: down, else up) past any plate already `placed` that it would
/// cover, with a thin line down (or up) to `at`; returns its plate (x, y,
/// w, h).
fn draw_label(
    canvas: &mut Canvas,
    name: &str,
    at: (f64, f64),
    (clear, below): (f64, bool),
    (placed, corner): (&[[f32; 4]], [f32; 4]),
    colour: Rgb,
) -> [f32; 4] {
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
    if overlaps(&corner, x, y) {
        x = corner[0] - 0.5 * w - 4.0;
    }
    while let Some(p) = placed.iter().find(|p| overlaps(p, x, y)) {
        y = if below {
            p[1] + p[3] + 15.0
        } else {
            p[1] - 7.0
        };
    }
    let plate = [x - 0.5 * w, y - 13.0, w, 18.0];
    let from = if below { y - 13.0 } else { y + 5.0 };
    canvas.polyline(&[(x, from), (at.0 as f32, at.1 as f32)], colour, 1.0);
    canvas.fill_circle(at.0 as f32, at.1 as f32, 2.5, colour);
    canvas.fill_rect(plate[0], plate[1], plate[2], plate[3], WHITE);
    text::draw(canvas, name, x, y, &style);
    plate
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
            (&[], corner),
            OUTLINE,
        );
        assert!(clear_of(plate, corner), "{plate:?} on {corner:?}");
        let plate = draw_label(
            &mut canvas,
            "bonnet",
            (200.0, 200.0),
            (30.0, false),
            (&[], corner),
            OUTLINE,
        );
        assert!(
            (plate[0] + 0.5 * plate[2] - 200.0).abs() < 1e-3,
            "{plate:?}"
        );
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
