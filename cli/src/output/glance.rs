//! Separation at a glance: a compact picture of one run's separation risk
//! seen from the side and from above (the two views a rear-window or
//! boot-deck change reads from; with the rear and the underneath on a
//! second row for an underbody study, [`GlanceLayout::with_names`]),
//! drawn as on the run report's risk sheet
//! (the same colour map, separated panels hatched, named regions
//! outlined), for the sweep page's row per variant. Every variant's
//! picture is drawn through one [`GlanceLayout`], one scale and one centre
//! per view for all, so that sizes and positions compare from row to row;
//! the section's one key ([`key`]) carries the colour bar and a scale bar.

use tuft_mesh::PanelMesh;

use super::canvas::{Canvas, GRID, INK, MUTED};
use super::colorbar::{ColourScale, Swatch, draw_swatch, nice_ticks, tick_label};
use super::outline::{self, OutlineStyle, RegionMark, RegionViews};
use super::render::{self, Frame, RenderParams, View, display_triangles};
use super::sheet::{self, NO_VALUE, SEPARATED, SurfaceField};
use super::text::{self, Align, TextStyle};
use super::{OutputError, SurfaceResult};

/// Width of a variant's picture and of the key, pixels.
pub const WIDTH: u32 = 1140;
/// Height of a variant's picture of one row of views, pixels (a second
/// row adds [`ROW_HEIGHT`]).
pub const HEIGHT: u32 = 300;
/// Height of a row of views, pixels.
const ROW_HEIGHT: f64 = HEIGHT as f64 - LABEL_BAND;
/// Height of the key, pixels.
pub const KEY_HEIGHT: u32 = 66;
/// The band for the variant's label at the top, pixels.
const LABEL_BAND: f64 = 30.0;
/// The band for the views' labels under it, pixels.
const VIEW_BAND: f64 = 22.0;
/// Left and right margins, and the gap between the two views, pixels.
const MARGIN: f64 = 10.0;
const GAP: f64 = 24.0;
/// Room in the side view under the lowest body point (the ground line)
/// and over the highest (two region names, one above the other), pixels.
const GROUND_ROOM: f64 = 22.0;
const NAME_ROOM: f64 = 46.0;
/// Further room under the ground line for a region name, pixels, where a
/// region faces down (its name goes under the body in the side view,
/// [`outline::draw_regions_labelled`]): a name's plate ends 29 pixels
/// under the ground line, which lies within [`GROUND_ROOM`] of the body.
const NAME_BELOW_ROOM: f64 = 32.0;

/// The views of a run at `yaw_deg`: the side the run report shows
/// ([`View::sheet`]: the lee side at a positive yaw) and the top, then,
/// when `underbody`, the rear and the underneath.
pub fn views(yaw_deg: f64, underbody: bool) -> Vec<View> {
    let mut v = vec![View::sheet(yaw_deg)[0], View::Top];
    if underbody {
        v.extend([View::Rear, View::Underneath]);
    }
    v
}

/// The rectangle (left, top, width, height) of the `k`-th view: two to a
/// row.
fn cell(k: usize) -> (i64, i64, i64, i64) {
    let w = (f64::from(WIDTH) - 2.0 * MARGIN - GAP) / 2.0;
    let top = LABEL_BAND + VIEW_BAND + (k / 2) as f64 * ROW_HEIGHT;
    let h = ROW_HEIGHT - VIEW_BAND - 6.0;
    (
        (MARGIN + (k % 2) as f64 * (w + GAP)) as i64,
        top as i64,
        w as i64,
        h as i64,
    )
}

/// One scale for all the variants' pictures and one centre per view.
#[derive(Debug, Clone, PartialEq)]
pub struct GlanceLayout {
    /// Pixels per metre.
    pub scale: f64,
    /// View coordinates (right, up), metres, of each view's centre.
    centres: Vec<(View, (f64, f64))>,
    /// The rear and the underneath are drawn too, on a second row.
    underbody: bool,
}

impl GlanceLayout {
    /// The largest scale at which every body of `bodies` (each mesh with
    /// its run's yaw) fits both its views, each view centred on the
    /// bodies' common extent in it (the side view's lowest point just
    /// above the ground line's room, the names' room over the body).
    pub fn new(bodies: &[(&PanelMesh, f64)]) -> Self {
        Self::with_names(bodies, false, false)
    }

    /// [`GlanceLayout::new`], with room under the side view's ground line
    /// for region names too when `below` (a region of the variants faces
    /// down: a floor, a diffuser), which are otherwise left unnamed there;
    /// `underbody` adds a second row of views, the rear and the underneath
    /// (an underbody study: a diffuser's separation is seen from below,
    /// where the side and top views show none of it).
    pub fn with_names(bodies: &[(&PanelMesh, f64)], below: bool, underbody: bool) -> Self {
        let ground_room = GROUND_ROOM + if below { NAME_BELOW_ROOM } else { 0.0 };
        let mut extents: Vec<(View, (f64, f64, f64, f64))> = Vec::new();
        for (mesh, yaw) in bodies {
            let tris = display_triangles(mesh);
            for view in views(*yaw, underbody) {
                let e = render::extent(&tris, view);
                match extents.iter_mut().find(|(v, _)| *v == view) {
                    Some((_, u)) => {
                        *u = (u.0.min(e.0), u.1.max(e.1), u.2.min(e.2), u.3.max(e.3));
                    }
                    None => extents.push((view, e)),
                }
            }
        }
        let (_, _, w, h) = cell(0);
        let (w, h) = (w as f64, h as f64);
        let scale = extents
            .iter()
            .map(|(v, e)| {
                let room = if v.is_side() {
                    h - ground_room - NAME_ROOM
                } else {
                    0.94 * h
                };
                (0.96 * w / (e.1 - e.0)).min(room / (e.3 - e.2))
            })
            .fold(f64::INFINITY, f64::min);
        let scale = sheet::usable_scale(scale);
        let centres = extents
            .into_iter()
            .map(|(v, e)| {
                let up = if v.is_side() {
                    e.2 + (0.5 * h - ground_room) / scale
                } else {
                    0.5 * (e.2 + e.3)
                };
                (v, (0.5 * (e.0 + e.1), up))
            })
            .collect();
        Self {
            scale,
            centres,
            underbody,
        }
    }

    /// A variant's picture height, pixels: [`HEIGHT`] for one row of
    /// views, [`ROW_HEIGHT`] more for the second.
    pub fn height(&self) -> u32 {
        if self.underbody {
            HEIGHT + ROW_HEIGHT as u32
        } else {
            HEIGHT
        }
    }

    /// The frames of the views of a run at `yaw_deg`; a view no body of
    /// the layout had is centred on `mesh`.
    pub fn frames(&self, mesh: &PanelMesh, yaw_deg: f64) -> Vec<(View, Frame)> {
        views(yaw_deg, self.underbody)
            .into_iter()
            .enumerate()
            .map(|(k, view)| {
                let centre = self.centres.iter().find(|(v, _)| *v == view).map_or_else(
                    || {
                        let e = render::extent(&display_triangles(mesh), view);
                        (0.5 * (e.0 + e.1), 0.5 * (e.2 + e.3))
                    },
                    |(_, c)| *c,
                );
                let frame = Frame {
                    scale: self.scale,
                    centre,
                    rect: cell(k),
                };
                (view, frame)
            })
            .collect()
    }
}

/// One run's picture: `label` across the top, its separation risk from
/// the side (`yaw_deg` picks which, [`views`]) and from above through
/// `layout`, separated panels hatched and the regions of `marks`
/// outlined (named in the side view).
///
/// # Errors
/// [`OutputError::LengthMismatch`] for fields of the wrong length.
pub fn picture(
    s: &SurfaceResult<'_>,
    yaw_deg: f64,
    label: &str,
    marks: &[RegionMark],
    layout: &GlanceLayout,
) -> Result<Canvas, OutputError> {
    s.validate()?;
    let mut canvas = Canvas::new(WIDTH, layout.height())?;
    let tris = display_triangles(s.mesh);
    let scale = ColourScale::risk();
    let paint = |i: usize| sheet::panel_paint(s, SurfaceField::SeparationRisk, &scale, i);
    let room = f64::from(WIDTH) - 2.0 * MARGIN;
    let mut style = TextStyle::new(16.0).bold();
    if f64::from(text::width(label, &style)) > room {
        style = TextStyle::new(13.0).bold();
    }
    text::draw(&mut canvas, label, MARGIN as f32, 21.0, &style);
    let frames = layout.frames(s.mesh, yaw_deg);
    for (view, frame) in &frames {
        view_label(&mut canvas, *view, frame, yaw_deg);
        render::draw_view(
            &mut canvas,
            &tris,
            *view,
            frame,
            &RenderParams::default(),
            &paint,
        );
        if let (Some(z), true) = (s.mesh.mirrors.ground, view.is_side() || *view == View::Rear) {
            sheet::ground_line(&mut canvas, z, *view, frame);
        }
    }
    let on = RegionViews {
        views: &frames,
        named: View::is_side,
        flow_corner: false,
        scale_bar: false,
    };
    outline::draw_regions_in(&mut canvas, s.mesh, marks, OutlineStyle::default(), &on);
    Ok(canvas)
}

/// A view's label over it (a yawed run's side view named its lee side, as
/// on the run report's sheets) with the flow's direction beside it.
fn view_label(canvas: &mut Canvas, view: View, frame: &Frame, yaw_deg: f64) {
    let (l, t, w, _) = frame.rect;
    let words = view.label_at(yaw_deg);
    let style = TextStyle::new(13.0).bold();
    let y = (t - 7) as f32;
    text::draw(canvas, &words, l as f32, y, &style);
    canvas.polyline(
        &[(l as f32, (t - 2) as f32), ((l + w) as f32, (t - 2) as f32)],
        GRID,
        1.0,
    );
    // The rear view looks into the stream: no arrow, as on the sheets.
    let Some((dx, dy)) = view.flow_direction(yaw_deg) else {
        return;
    };
    let x0 = l as f32 + text::width(&words, &style) + 70.0;
    let (cx, cy) = (x0, y - 4.0);
    let (dx, dy) = (14.0 * dx as f32, 14.0 * dy as f32);
    canvas.arrow((cx - dx, cy - dy), (cx + dx, cy + dy), MUTED, 1.5);
    text::draw(
        canvas,
        "flow",
        cx - 20.0,
        y,
        &TextStyle::new(12.0).colour(MUTED).align(Align::Right),
    );
}

/// The section's key: the risk colour bar, the hatching of separated
/// panels, the grey of unresolved ones (when some picture has them), the
/// region outline (when some has regions) and a scale bar at `layout`'s
/// scale, on a strip as wide as the pictures.
///
/// # Errors
/// [`OutputError::PictureSize`] never in practice (a fixed size).
pub fn key(layout: &GlanceLayout, unresolved: bool, regions: bool) -> Result<Canvas, OutputError> {
    let mut canvas = Canvas::new(WIDTH, KEY_HEIGHT)?;
    let scale = ColourScale::risk();
    let (x, y, w, h) = (MARGIN as f32, 26.0_f32, 300.0_f32, 14.0_f32);
    text::draw(
        &mut canvas,
        &scale.label,
        x,
        18.0,
        &TextStyle::new(14.0).bold(),
    );
    for col in 0..w as i64 {
        let v = scale.min + (scale.max - scale.min) * (col as f64 + 0.5) / f64::from(w);
        let c = scale.colour(v).unwrap_or(INK);
        canvas.fill_rect(x + col as f32, y, 1.0, h, c);
    }
    canvas.stroke_rect(x, y, w, h, INK, 1.0);
    let ticks = scale.ticks();
    for &t in &ticks {
        let tx = x + w * ((t - scale.min) / (scale.max - scale.min)) as f32;
        canvas.polyline(&[(tx, y + h), (tx, y + h + 5.0)], INK, 1.2);
        text::draw(
            &mut canvas,
            &tick_label(t, &ticks),
            tx,
            y + h + 19.0,
            &TextStyle::new(12.0).align(Align::Centre),
        );
    }
    let mut at = x + w + 40.0;
    let entry = |canvas: &mut Canvas, at: &mut f32, words: &str| {
        let style = TextStyle::new(14.0);
        text::draw(canvas, words, *at + 30.0, y + 13.0, &style);
        *at += 30.0 + text::width(words, &style) + 30.0;
    };
    let mut swatches = vec![("separated", Swatch::Hatched(SEPARATED.0, SEPARATED.1))];
    if unresolved {
        swatches.push(("not resolved", Swatch::Solid(NO_VALUE)));
    }
    for (words, swatch) in swatches {
        draw_swatch(&mut canvas, at as i64, (y - 4.0) as i64, &swatch);
        canvas.stroke_rect(at, y - 4.0, 22.0, 22.0, INK, 1.0);
        entry(&mut canvas, &mut at, words);
    }
    if regions {
        for k in 0..12 {
            canvas.fill_circle(at + 2.0 * k as f32, y + 7.0, 1.3, outline::OUTLINE);
        }
        entry(&mut canvas, &mut at, "named region");
    }
    // A round length of about a tenth of the picture's width.
    let metres = nice_ticks(0.0, 0.1 * f64::from(WIDTH) / layout.scale, 1)
        .get(1)
        .copied()
        .unwrap_or(1.0);
    let len = (metres * layout.scale) as f32;
    let words = format!(
        "{} m: every picture at this one scale",
        super::short_number(metres)
    );
    let style = TextStyle::new(14.0);
    let right = WIDTH as f32 - MARGIN as f32;
    let bar_x = right - text::width(&words, &style).max(len);
    canvas.polyline(
        &[
            (bar_x, y - 2.0),
            (bar_x, y + 4.0),
            (bar_x + len, y + 4.0),
            (bar_x + len, y - 2.0),
        ],
        INK,
        1.5,
    );
    text::draw(&mut canvas, &words, bar_x, y + h + 19.0, &style);
    Ok(canvas)
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;
    use crate::output::PanelState;
    use crate::output::canvas::testing::{decode, keep};
    use crate::output::fixture::Fixture;
    use tuft_mesh::Point;

    /// The stripes of the separated hatching in a row of 14 pixels from
    /// `(x, y)`: (dark, light) pixel counts.
    fn stripes(img: &crate::output::canvas::testing::Decoded, x: f64, y: f64) -> (usize, usize) {
        let row: Vec<[u8; 3]> = (0..14).map(|d| img.pixel(x as i64 + d, y as i64)).collect();
        let dark = row.iter().filter(|c| c[0] < 60 && c[2] < 70).count();
        let light = row
            .iter()
            .filter(|c| (90..160).contains(&c[0]) && c[0].abs_diff(c[2]) < 20)
            .count();
        (dark, light)
    }

    /// A body whose panels are all separated is hatched wherever it is
    /// seen, in both views, and nowhere else.
    #[test]
    fn a_separated_body_is_hatched_where_it_is() {
        let mut f = Fixture::sphere(3);
        f.state = vec![PanelState::Separated; f.state.len()];
        let s = f.surface();
        let lay = GlanceLayout::new(&[(&f.mesh, 0.0)]);
        let png = picture(&s, 0.0, "1. all separated", &[], &lay)
            .unwrap()
            .to_png()
            .unwrap();
        keep("glance-separated.png", &png);
        let img = decode(&png);
        assert_eq!((img.width, img.height), (WIDTH, HEIGHT));
        for (view, frame) in lay.frames(&f.mesh, 0.0) {
            // Across the body: points a third and two thirds of the radius
            // out from the centre, right and up, all hatched.
            for (u, v) in [(0.0, 0.0), (-0.6, 0.0), (0.5, 0.3), (0.0, -0.6)] {
                let (right, up, _) = view.basis();
                let p = Point::from(u * right + v * up);
                let (x, y) = frame.project(view, &p);
                let (dark, light) = stripes(&img, x - 7.0, y);
                assert!(dark >= 2 && light >= 2, "{view:?} at ({u}, {v})");
            }
            // Off the body, inside the frame: white.
            let (l, t, w, h) = frame.rect;
            let (x, _) = frame.project(view, &Point::origin());
            for (px, py) in [
                (l + 3, t + h - 3),
                (x as i64 + (0.4 * w as f64) as i64, t + h / 2),
            ] {
                if px < l + w {
                    assert_eq!(img.pixel(px, py), [255, 255, 255], "{view:?} ({px}, {py})");
                }
            }
        }
        // Attached, the same body shows no hatching.
        let g = Fixture::sphere(3);
        let attached: Vec<PanelState> = vec![PanelState::Turbulent; g.state.len()];
        let s = SurfaceResult {
            state: &attached,
            ..g.surface()
        };
        let img = decode(
            &picture(&s, 0.0, "attached", &[], &lay)
                .unwrap()
                .to_png()
                .unwrap(),
        );
        let (view, frame) = lay.frames(&g.mesh, 0.0)[0];
        let (x, y) = frame.project(view, &Point::origin());
        assert_eq!(stripes(&img, x - 7.0, y).0, 0);
    }

    /// An underbody layout adds the rear and the underneath on a second
    /// row: a body separated only on its lower part (as a diffuser is) is
    /// hatched there from below and on its lower half from the rear, and
    /// nowhere from above.
    #[test]
    fn an_underbody_study_shows_the_rear_and_the_underneath() {
        let mut f = Fixture::sphere(3);
        f.state = f
            .mesh
            .panels
            .iter()
            .map(|p| {
                if p.centroid.z < -0.3 {
                    PanelState::Separated
                } else {
                    PanelState::Turbulent
                }
            })
            .collect();
        let lay = GlanceLayout::with_names(&[(&f.mesh, 0.0)], false, true);
        let png = picture(&f.surface(), 0.0, "1. separated below", &[], &lay)
            .unwrap()
            .to_png()
            .unwrap();
        keep("glance-underbody.png", &png);
        let img = decode(&png);
        assert_eq!((img.width, img.height), (WIDTH, HEIGHT + ROW_HEIGHT as u32));
        let frames = lay.frames(&f.mesh, 0.0);
        let seen: Vec<View> = frames.iter().map(|(v, _)| *v).collect();
        assert_eq!(seen, [View::Side, View::Top, View::Rear, View::Underneath]);
        assert!(frames[2].1.rect.1 >= frames[0].1.rect.1 + frames[0].1.rect.3);
        let hatched = |view: View, p: Point| {
            let (_, frame) = frames.iter().find(|(v, _)| *v == view).unwrap();
            let (x, y) = frame.project(view, &p);
            let (dark, light) = stripes(&img, x - 7.0, y);
            dark >= 2 && light >= 2
        };
        assert!(hatched(View::Underneath, Point::new(0.0, 0.0, -1.0)));
        assert!(hatched(View::Rear, Point::new(1.0, 0.0, -0.7)));
        assert!(!hatched(View::Rear, Point::new(1.0, 0.0, 0.5)));
        assert!(!hatched(View::Top, Point::new(0.0, 0.0, 1.0)));
    }

    /// One scale for all: a sphere of half the radius drawn through the
    /// layout of both covers about a quarter of the pixels.
    #[test]
    fn variants_share_one_scale() {
        let big = Fixture::sphere(3);
        let mut small = Fixture::sphere(3);
        small.mesh = tuft_mesh::PanelMesh::new(
            tuft_mesh::generate::icosphere(0.5, 3),
            tuft_mesh::Mirrors::none(),
        )
        .unwrap();
        let lay = GlanceLayout::new(&[(&big.mesh, 0.0), (&small.mesh, 0.0)]);
        assert_eq!(lay, GlanceLayout::new(&[(&big.mesh, 0.0)]));
        let body = |f: &Fixture| {
            let img = decode(
                &picture(&f.surface(), 0.0, "", &[], &lay)
                    .unwrap()
                    .to_png()
                    .unwrap(),
            );
            let (_, frame) = lay.frames(&f.mesh, 0.0)[1];
            let (l, t, w, h) = frame.rect;
            (t..t + h)
                .flat_map(|y| (l..l + w).map(move |x| (x, y)))
                .filter(|&(x, y)| img.pixel(x, y) != [255, 255, 255])
                .count() as f64
        };
        let ratio = body(&small) / body(&big);
        assert!((ratio - 0.25).abs() < 0.03, "{ratio}");
    }

    /// A yawed run's side view is the run report's: the lee side, from +y
    /// with the nose on the right, at a positive yaw.
    #[test]
    fn a_yawed_run_shows_its_lee_side() {
        let f = Fixture::sphere(2);
        let lay = GlanceLayout::new(&[(&f.mesh, 0.0), (&f.mesh, 8.0)]);
        for (yaw, want) in [
            (8.0, View::SideFromRight),
            (0.0, View::Side),
            (-8.0, View::Side),
        ] {
            let (view, frame) = lay.frames(&f.mesh, yaw)[0];
            assert_eq!(view, View::sheet(yaw)[0]);
            assert_eq!(view, want);
            let (nose, _) = frame.project(view, &Point::new(-1.0, 0.0, 0.0));
            let (tail, _) = frame.project(view, &Point::new(1.0, 0.0, 0.0));
            assert_eq!(nose > tail, yaw > 0.0, "{yaw}");
        }
    }

    /// A region facing down (the coupe's diffuser) is named under the
    /// ground line of the side view when the layout leaves room for it,
    /// within the picture, and left unnamed (outlined only) when it does
    /// not, never over the body with its line down the flank.
    #[test]
    fn a_region_facing_down_is_named_under_the_body_or_not_at_all() {
        use tuft_mesh::generate::{CoupeParams, coupe_with_params};
        let body = coupe_with_params(&CoupeParams {
            panels: 2000,
            ..CoupeParams::default()
        })
        .unwrap();
        let mesh = PanelMesh::new(body, tuft_mesh::Mirrors::ground(0.0)).unwrap();
        let diffuser = crate::region::RegionSection {
            name: "diffuser".into(),
            x: Some([3.7, 4.5]),
            y: None,
            z: None,
            facing: Some("down".into()),
            optional: false,
        };
        let marks = crate::region::marks(&[diffuser], &mesh);
        let named = |lay: &GlanceLayout| {
            let frames = lay.frames(&mesh, 0.0);
            let on = RegionViews {
                views: &frames,
                named: View::is_side,
                flow_corner: false,
                scale_bar: false,
            };
            let mut canvas = Canvas::new(WIDTH, HEIGHT).unwrap();
            let labels = outline::draw_regions_labelled(
                &mut canvas,
                &mesh,
                &marks,
                OutlineStyle::default(),
                &on,
            );
            let (view, frame) = frames[0];
            let ground = frame.project(view, &Point::new(0.0, 0.0, 0.0)).1;
            labels
                .into_iter()
                .map(|l| (l.plate, ground, frame.rect))
                .collect::<Vec<_>>()
        };
        assert!(named(&GlanceLayout::new(&[(&mesh, 0.0)])).is_empty());
        let labels = named(&GlanceLayout::with_names(&[(&mesh, 0.0)], true, false));
        let [(plate, ground, (_, t, _, h))] = labels[..] else {
            panic!("{labels:?}")
        };
        assert!(
            f64::from(plate[1]) > ground,
            "{plate:?} over the ground at {ground}"
        );
        assert!(
            plate[1] + plate[3] <= (t + h) as f32,
            "{plate:?} out of the picture"
        );
    }

    /// The key draws the risk colours and a scale bar.
    #[test]
    fn the_key_shows_the_colour_bar() {
        let f = Fixture::sphere(2);
        let lay = GlanceLayout::new(&[(&f.mesh, 0.0)]);
        let png = key(&lay, true, true).unwrap().to_png().unwrap();
        keep("glance-key.png", &png);
        let img = decode(&png);
        assert_eq!((img.width, img.height), (WIDTH, KEY_HEIGHT));
        // The bar runs from risk 0 at its left end to 1 at its right.
        let near = |got: [u8; 3], v: f64| {
            let want = ColourScale::risk().colour(v).unwrap();
            (0..3).all(|k| got[k].abs_diff(want[k]) <= 8)
        };
        assert!(near(img.pixel(MARGIN as i64 + 2, 33), 0.0));
        assert!(near(img.pixel(MARGIN as i64 + 297, 33), 1.0));
    }
}
