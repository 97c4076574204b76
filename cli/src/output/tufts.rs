//! The surface-flow sheet: tufts drawn on the views, the way a wind
//! tunnel shows the flow next to a model's surface. A wool tuft taped to
//! the body lies along the local flow where the boundary layer is
//! attached and flails without a steady direction where it has separated
//! (common practice in tunnel testing).
//!
//! Tufts stand on a square grid of the picture, [`TUFT_SPACING`] pixels
//! apart and through the picture of the origin (so a body symmetric about
//! y = 0 gets symmetric tufts), each on whichever panel is seen at its grid
//! point, and lie along
//! that panel's surface velocity as projected into the view: a tuft on a
//! surface seen at a slant is foreshortened, as in a photograph, and one
//! on a surface seen nearly edge on (its normal more than about 72 degrees
//! from the viewer) is left out. Colours: blue laminar, ink turbulent,
//! orange close to separating (risk [`CLOSE_RISK`] or more); a separated
//! panel gets a red cross instead of a tuft, on a pale hatch.

use nalgebra::Vector3;

use super::canvas::{Canvas, INK, Rgb};
use super::colorbar::{Swatch, draw_legend};
use super::render::{self, DisplayTri, Frame, PanelPaint, View};
use super::sheet::{self, BAR_COLUMN, NO_VALUE, SheetParams, TITLE_BAND, draw_titles};
use super::text::{self, TextStyle};
use super::{Caption, OutputError, PanelState, SurfaceResult};

/// Distance between tufts on the picture, pixels.
pub const TUFT_SPACING: f64 = 15.0;
/// Longest tuft, as a share of [`TUFT_SPACING`].
const TUFT_LENGTH: f64 = 0.85;
/// Separation risk from which a tuft is drawn as close to separating.
pub const CLOSE_RISK: f64 = 0.7;
/// Least cosine between a panel's normal and the direction to the viewer
/// for a tuft to be drawn on it.
const FACING_MIN: f64 = 0.3;

/// Body colour under the tufts.
const BODY: Rgb = [228, 229, 233];
/// Pale hatch of separated panels.
const BODY_SEPARATED: (Rgb, Rgb) = ([196, 196, 204], [236, 236, 240]);
/// Tuft colours.
const LAMINAR: Rgb = [35, 105, 190];
const TURBULENT: Rgb = INK;
const CLOSE: Rgb = [230, 120, 10];
const SEPARATED: Rgb = [205, 25, 35];

/// What a tuft shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TuftKind {
    /// Attached laminar layer.
    Laminar,
    /// Attached turbulent layer.
    Turbulent,
    /// Attached, with a separation risk of [`CLOSE_RISK`] or more.
    CloseToSeparating,
    /// Separated: no steady direction.
    Separated,
}

/// One tuft on the picture.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Tuft {
    /// Canvas position of the taped end, pixels.
    pub root: (f64, f64),
    /// Canvas position of the free end, pixels (the root for a separated
    /// panel).
    pub tip: (f64, f64),
    /// What it shows.
    pub kind: TuftKind,
    /// The real panel it stands on.
    pub panel: u32,
}

/// The tufts of one view. `tris` are [`display_triangles`] of `s.mesh`
/// (real panels first, then their mirror images across y = 0).
pub fn tufts(s: &SurfaceResult<'_>, tris: &[DisplayTri], view: View, frame: &Frame) -> Vec<Tuft> {
    let seen = render::visible(tris, view, frame);
    let (right, up, toward) = view.basis();
    let (l, t, w, h) = frame.rect;
    // The grid passes through the picture of the origin, so a body
    // symmetric about y = 0 gets symmetric tufts in the views across it.
    let (ox, oy) = frame.project(view, &tuft_mesh::Point::origin());
    let first =
        |origin: f64, edge: f64| origin - ((origin - edge) / TUFT_SPACING).floor() * TUFT_SPACING;
    let (x0, y0) = (first(ox, l as f64), first(oy, t as f64));
    let columns = ((l + w) as f64 - x0).div_euclid(TUFT_SPACING).max(0.0) as i64 + 1;
    let rows = ((t + h) as f64 - y0).div_euclid(TUFT_SPACING).max(0.0) as i64 + 1;
    let mut out = Vec::new();
    for row in 0..rows {
        for column in 0..columns {
            let root = (
                x0 + column as f64 * TUFT_SPACING,
                y0 + row as f64 * TUFT_SPACING,
            );
            let Some(k) = seen.at(root.0 as i64, root.1 as i64) else {
                continue;
            };
            let tri = &tris[k];
            if tri.normal.dot(&toward) < FACING_MIN {
                continue;
            }
            let panel = tri.panel as usize;
            let Some(kind) = kind(s.state[panel], s.risk[panel]) else {
                continue;
            };
            let mut v = s.velocity[panel];
            if k >= s.mesh.len() {
                v = Vector3::new(v.x, -v.y, v.z);
            }
            let speed = v.norm();
            if kind != TuftKind::Separated && !(speed > 0.0 && speed.is_finite()) {
                continue;
            }
            let tip = if kind == TuftKind::Separated {
                root
            } else {
                let reach = TUFT_LENGTH * TUFT_SPACING / speed;
                (root.0 + reach * v.dot(&right), root.1 - reach * v.dot(&up))
            };
            out.push(Tuft {
                root,
                tip,
                kind,
                panel: tri.panel,
            });
        }
    }
    out
}

/// The kind of tuft on a panel; `None` where no boundary-layer result.
fn kind(state: PanelState, risk: f64) -> Option<TuftKind> {
    match state {
        PanelState::Unresolved => None,
        PanelState::Separated => Some(TuftKind::Separated),
        _ if risk >= CLOSE_RISK => Some(TuftKind::CloseToSeparating),
        PanelState::Laminar => Some(TuftKind::Laminar),
        PanelState::Turbulent => Some(TuftKind::Turbulent),
    }
}

/// Draw the surface-flow sheet.
///
/// # Errors
/// As [`sheet::surface_sheet`].
pub fn tuft_sheet(s: &SurfaceResult<'_>, caption: &Caption) -> Result<Canvas, OutputError> {
    let params = SheetParams::default();
    let paint = |i: usize| match s.state[i] {
        PanelState::Separated => PanelPaint::Hatched(BODY_SEPARATED.0, BODY_SEPARATED.1),
        PanelState::Unresolved => PanelPaint::Solid(NO_VALUE),
        _ => PanelPaint::Solid(BODY),
    };
    let mut draw = |canvas: &mut Canvas, tris: &[DisplayTri], view: View, frame: &Frame| {
        for tuft in tufts(s, tris, view, frame) {
            draw_tuft(canvas, &tuft);
        }
    };
    let mut canvas = sheet::views_sheet(s, caption, &params, &paint, &mut draw)?;
    let mut note =
        "Tufts lie along the flow next to the surface, as wool tufts on a tunnel model; \
                    a surface seen at a slant shows them shorter. Red crosses: separated."
            .to_owned();
    if let Some(extra) = s.separation_note {
        note = format!("{note} {extra}");
    }
    draw_titles(&mut canvas, &caption.title("Surface flow (tufts)"), &note);
    draw_key(&mut canvas, &params, s);
    Ok(canvas)
}

/// One tuft: a dot at the taped end and a line to the free end, or a
/// cross on a separated panel.
fn draw_tuft(canvas: &mut Canvas, tuft: &Tuft) {
    let (x, y) = (tuft.root.0 as f32, tuft.root.1 as f32);
    if tuft.kind == TuftKind::Separated {
        let a = (0.22 * TUFT_SPACING) as f32;
        canvas.polyline(&[(x - a, y - a), (x + a, y + a)], SEPARATED, 1.8);
        canvas.polyline(&[(x - a, y + a), (x + a, y - a)], SEPARATED, 1.8);
        return;
    }
    let colour = match tuft.kind {
        TuftKind::Laminar => LAMINAR,
        TuftKind::CloseToSeparating => CLOSE,
        _ => TURBULENT,
    };
    canvas.fill_circle(x, y, 1.6, colour);
    canvas.polyline(
        &[(x, y), (tuft.tip.0 as f32, tuft.tip.1 as f32)],
        colour,
        1.6,
    );
}

/// The key in the colour-bar column.
fn draw_key(canvas: &mut Canvas, params: &SheetParams, s: &SurfaceResult<'_>) {
    let x = (f64::from(params.width) - BAR_COLUMN + 36.0) as f32;
    let y = (TITLE_BAND + 50.0) as f32;
    text::draw(canvas, "tufts", x, y - 14.0, &TextStyle::new(17.0).bold());
    let entries = [
        ("laminar", Swatch::Solid(LAMINAR)),
        ("turbulent", Swatch::Solid(TURBULENT)),
        ("close to separating", Swatch::Solid(CLOSE)),
        ("separated (cross)", Swatch::Solid(SEPARATED)),
        (
            "separated area",
            Swatch::Hatched(BODY_SEPARATED.0, BODY_SEPARATED.1),
        ),
    ]
    .map(|(label, swatch)| (label.to_owned(), swatch))
    .into_iter()
    .chain(sheet::unresolved_swatch(s))
    .collect::<Vec<_>>();
    draw_legend(canvas, x, y, &entries);
    let below = y + 30.0 * entries.len() as f32 + 14.0;
    for (k, line) in [
        format!("close: risk {CLOSE_RISK} or more"),
        "dot: where a tuft is fixed".to_owned(),
    ]
    .iter()
    .enumerate()
    {
        text::draw(
            canvas,
            line,
            x,
            below + 20.0 * k as f32,
            &TextStyle::new(14.0),
        );
    }
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use tuft_mesh::{Mirrors, PanelMesh, TriMesh, generate};

    use super::*;
    use crate::output::canvas::testing::{decode, keep};
    use crate::output::fixture::{Fixture, caption};

    fn view_tufts(f: &Fixture, view: View) -> (Vec<Tuft>, Frame) {
        let s = f.surface();
        let tris = render::display_triangles(s.mesh);
        let lay = sheet::layout(&tris, &SheetParams::default());
        let frame = *lay.frame(view).unwrap();
        (tufts(&s, &tris, view, &frame), frame)
    }

    /// Lamb's flow past a sphere (Lamb, *Hydrodynamics*, §92): the surface
    /// flow runs from the front stagnation point over the top and down
    /// the back, so in the side view every tuft points downstream, those
    /// ahead of the widest section lean up and those behind it lean down.
    #[test]
    fn side_view_tufts_follow_the_flow_over_a_sphere() {
        let f = Fixture::sphere(3);
        let (tufts, frame) = view_tufts(&f, View::Side);
        let (cx, cy) = frame.project(View::Side, &tuft_mesh::Point::origin());
        let attached: Vec<&Tuft> = tufts
            .iter()
            .filter(|t| t.kind != TuftKind::Separated)
            .collect();
        assert!(attached.len() > 100, "{} tufts", attached.len());
        for t in &attached {
            let (dx, dy) = (t.tip.0 - t.root.0, t.tip.1 - t.root.1);
            assert!(dx >= -1e-9, "tuft at {:?} points upstream", t.root);
            let (ahead, above) = (t.root.0 < cx - 20.0, t.root.1 < cy - 20.0);
            let behind = t.root.0 > cx + 20.0;
            if above && ahead {
                assert!(dy < 0.0, "tuft at {:?} should rise", t.root);
            }
            if above && behind {
                assert!(dy > 0.0, "tuft at {:?} should fall", t.root);
            }
            assert!(dx.hypot(dy) <= TUFT_LENGTH * TUFT_SPACING + 1e-9);
        }
    }

    /// Each panel's state picks the tuft: the fixture's separated band
    /// gets crosses, its unresolved cap none, the rest lie along the flow.
    #[test]
    fn separated_panels_get_crosses_and_unresolved_ones_nothing() {
        let f = Fixture::sphere(3);
        let (tufts, _) = view_tufts(&f, View::Top);
        assert!(tufts.iter().any(|t| t.kind == TuftKind::Separated));
        for t in &tufts {
            let p = t.panel as usize;
            assert_ne!(f.state[p], PanelState::Unresolved);
            assert_eq!(
                t.kind == TuftKind::Separated,
                f.state[p] == PanelState::Separated
            );
            if t.kind == TuftKind::Separated {
                assert_eq!(t.root, t.tip);
            }
        }
    }

    /// A half model is drawn whole: seen from above, the mirrored half's
    /// tufts mirror the real half's (the velocity's y flips with the
    /// panel).
    #[test]
    fn half_model_tufts_mirror_across_the_symmetry_plane() {
        let whole = Fixture::sphere(3);
        let sphere = generate::icosphere(1.0, 3);
        let keep: Vec<usize> = (0..whole.mesh.len())
            .filter(|&i| whole.mesh.panels[i].centroid.y > 0.0)
            .collect();
        let triangles = keep.iter().map(|&i| sphere.triangles[i]).collect();
        let half = TriMesh::new(sphere.vertices.clone(), triangles).unwrap();
        let mut f = Fixture::sphere(3);
        f.mesh = PanelMesh::new(
            half,
            Mirrors {
                symmetry: true,
                ..Mirrors::none()
            },
        )
        .unwrap();
        f.cp = pick(&whole.cp, &keep);
        f.velocity = pick(&whole.velocity, &keep);
        f.theta = pick(&whole.theta, &keep);
        f.shape_factor = pick(&whole.shape_factor, &keep);
        f.cf = pick(&whole.cf, &keep);
        f.state = pick(&whole.state, &keep);
        f.risk = pick(&whole.risk, &keep);
        let (tufts, frame) = view_tufts(&f, View::Top);
        let (_, cy) = frame.project(View::Top, &tuft_mesh::Point::origin());
        let attached: Vec<&Tuft> = tufts
            .iter()
            .filter(|t| t.kind != TuftKind::Separated && (t.root.1 - cy).abs() > 20.0)
            .collect();
        assert!(attached.len() > 100);
        // The grid runs through the centre line: every tuft has its mirror.
        let roots: Vec<(f64, f64)> = tufts.iter().map(|t| t.root).collect();
        let mirrored = roots
            .iter()
            .filter(|r| {
                roots
                    .iter()
                    .any(|m| (m.0 - r.0).abs() < 1e-6 && (m.1 - (2.0 * cy - r.1)).abs() < 1e-6)
            })
            .count();
        assert!(
            mirrored * 100 >= roots.len() * 95,
            "{mirrored} of {}",
            roots.len()
        );
        for t in attached {
            let (dx, dy) = (t.tip.0 - t.root.0, t.tip.1 - t.root.1);
            assert!(dx >= -1e-9);
            let lean = if t.root.1 < cy { -1.0 } else { 1.0 };
            let ahead = t.root.0 < frame.project(View::Top, &tuft_mesh::Point::origin()).0 - 20.0;
            if ahead {
                assert!(
                    lean * dy > 0.0,
                    "tuft at {:?} should spread outward",
                    t.root
                );
            }
        }
    }

    fn pick<T: Copy>(v: &[T], keep: &[usize]) -> Vec<T> {
        keep.iter().map(|&i| v[i]).collect()
    }

    /// The sheet shows the three kinds of mark the fixture calls for:
    /// blue laminar tufts at the front, ink turbulent ones and red crosses
    /// behind.
    #[test]
    fn tuft_sheet_shows_laminar_tufts_and_separated_crosses() {
        let f = Fixture::sphere(3);
        let png = tuft_sheet(&f.surface(), &caption())
            .unwrap()
            .to_png()
            .unwrap();
        keep("tufts-sphere.png", &png);
        let d = decode(&png);
        let count = |c: Rgb| {
            let mut n = 0;
            for y in 150..950 {
                for x in 20..1350 {
                    let p = d.pixel(x, y);
                    n +=
                        usize::from((0..3).all(|k| (i32::from(p[k]) - i32::from(c[k])).abs() < 12));
                }
            }
            n
        };
        assert!(count(LAMINAR) > 200, "laminar {}", count(LAMINAR));
        assert!(count(SEPARATED) > 200, "separated {}", count(SEPARATED));
    }
}
