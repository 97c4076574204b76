//! The view sheet: one PNG per surface field with side, top,
//! underneath, front and rear views at one common scale, a title naming the
//! field, case and speed, view labels, a scale bar and one colour bar.

use tuft_mesh::Point;

use super::canvas::{Canvas, GRID, INK, MUTED, Rgb};
use super::colorbar::{self, ColourScale, Swatch};
use super::render::{self, DisplayTri, Frame, PanelPaint, RenderParams, View, display_triangles};
use super::text::{self, Align, TextStyle};
use super::{Caption, OutputError, PanelState, SurfaceResult};

/// Colour of panels without a value (NaN, or no boundary-layer result).
pub const NO_VALUE: Rgb = [200, 200, 204];
/// Hatching of separated panels.
pub const SEPARATED: (Rgb, Rgb) = ([40, 40, 46], [150, 150, 158]);
/// The thin stripes over separated panels on the pressure sheet, whose Cp
/// there is no computed pressure (the dead water's one assumed value).
pub const ASSUMED_PRESSURE: Rgb = [120, 121, 130];

/// Which surface field a sheet shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SurfaceField {
    /// Pressure coefficient.
    Pressure,
    /// Separation risk, separated panels hatched.
    SeparationRisk,
}

/// Size and renderer settings of a sheet.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SheetParams {
    /// Picture width, pixels.
    pub width: u32,
    /// Picture height, pixels.
    pub height: u32,
    /// Body renderer settings.
    pub render: RenderParams,
}

impl Default for SheetParams {
    fn default() -> Self {
        Self {
            width: 1600,
            height: 1000,
            render: RenderParams::default(),
        }
    }
}

impl SheetParams {
    /// The whole-body sheet's height at `yaw_deg`: a cross wind's third
    /// row of views ([`View::sheet`]) makes it a third taller, so that the
    /// views keep their scale and the room over them for region names.
    pub fn height_at(&self, yaw_deg: f64) -> u32 {
        if yaw_deg == 0.0 {
            self.height
        } else {
            self.height + self.height / 3
        }
    }
}

/// Where each view sits on the sheet.
#[derive(Debug, Clone, PartialEq)]
pub struct Layout {
    /// The views with their frames, in [`View::sheet`] order (the side view by the yaw).
    pub views: Vec<(View, Frame)>,
}

impl Layout {
    /// The frame of a view.
    pub fn frame(&self, view: View) -> Option<&Frame> {
        self.views.iter().find(|(v, _)| *v == view).map(|(_, f)| f)
    }
}

/// Heights of the title band and of a view label, pixels.
pub(crate) const TITLE_BAND: f64 = 96.0;
const LABEL_BAND: f64 = 34.0;
/// Width of the colour-bar column, pixels.
pub(crate) const BAR_COLUMN: f64 = 230.0;

/// Frames for the views at one common scale (largest that fits all): side
/// and top above, underneath below with front and rear side by side in
/// the last cell (a car is about half as wide as it is long).
pub fn layout(tris: &[DisplayTri], params: &SheetParams) -> Layout {
    layout_at(tris, params, 0.0)
}

/// [`layout`] for a sheet at `yaw_deg` ([`View::sheet`]): in a cross wind
/// three rows of two, the lee and the windward side, the top and the
/// underneath, the front and the rear, on a sheet a third taller
/// ([`SheetParams::height_at`]).
pub fn layout_at(tris: &[DisplayTri], params: &SheetParams, yaw_deg: f64) -> Layout {
    let sheet_views = View::sheet(yaw_deg);
    let rows = if sheet_views.len() > 5 { 3 } else { 2 };
    let cell_w = (f64::from(params.width) - BAR_COLUMN - 20.0) / 2.0;
    let cell_h = (f64::from(params.height_at(yaw_deg)) - TITLE_BAND - 10.0) / f64::from(rows);
    let (pic_w, pic_h) = (cell_w - 30.0, cell_h - LABEL_BAND - 14.0);
    // Each view's cell (column, row), and whether it shares it with the
    // next: the five-view sheet's last cell holds the front and the rear.
    let shared = |k: usize| rows == 2 && k >= 3;
    let width = |k: usize| if shared(k) { 0.5 * pic_w - 10.0 } else { pic_w };
    let cell = |k: usize| {
        if rows == 2 && k >= 3 {
            (1, 1)
        } else {
            (k % 2, k / 2)
        }
    };
    let extents: Vec<_> = sheet_views
        .iter()
        .map(|&v| render::extent(tris, v))
        .collect();
    let scale = extents
        .iter()
        .enumerate()
        .map(|(k, e)| (0.92 * width(k) / (e.1 - e.0)).min(0.9 * pic_h / (e.3 - e.2)))
        .fold(f64::INFINITY, f64::min);
    let scale = usable_scale(scale);
    let views = sheet_views
        .iter()
        .zip(extents)
        .enumerate()
        .map(|(k, (&v, e))| {
            let (column, row) = cell(k);
            let mut left = 20.0 + cell_w * column as f64 + 10.0;
            if shared(k) && k == 4 {
                left += 0.5 * pic_w + 10.0;
            }
            let top = TITLE_BAND + cell_h * row as f64 + LABEL_BAND;
            let frame = Frame {
                scale,
                centre: (0.5 * (e.0 + e.1), 0.5 * (e.2 + e.3)),
                rect: (left as i64, top as i64, width(k) as i64, pic_h as i64),
            };
            (v, frame)
        })
        .collect();
    Layout { views }
}

/// Draw the view sheet of `field`.
///
/// # Errors
/// [`OutputError::LengthMismatch`] for fields of the wrong length,
/// [`OutputError::PictureSize`] for an unusable size.
pub fn surface_sheet(
    s: &SurfaceResult<'_>,
    field: SurfaceField,
    caption: &Caption,
) -> Result<Canvas, OutputError> {
    surface_sheet_with_params(s, field, caption, &SheetParams::default())
}

/// [`surface_sheet`] with explicit size and renderer settings.
///
/// # Errors
/// As [`surface_sheet`].
pub fn surface_sheet_with_params(
    s: &SurfaceResult<'_>,
    field: SurfaceField,
    caption: &Caption,
    params: &SheetParams,
) -> Result<Canvas, OutputError> {
    let (scale, legend, what, note) = field_style(s, field);
    let note = match (field, &s.separation_note) {
        (SurfaceField::SeparationRisk, Some(extra)) => format!("{note} {extra}"),
        (SurfaceField::Pressure, _) => pressure_note(s),
        _ => note.to_owned(),
    };
    let style = FieldStyle {
        scale,
        legend,
        what: what.to_owned(),
        note,
    };
    let paint = |i: usize| panel_paint(s, field, &style.scale, i);
    field_sheet_with_params(s, &style, caption, params, &paint)
}

/// What a sheet of any per-panel field shows: the colour scale, legend
/// swatches, title word and note (for pictures such as the differences
/// between two runs drawn on one body).
#[derive(Debug, Clone)]
pub struct FieldStyle {
    /// Colour scale of the bar.
    pub scale: ColourScale,
    /// Extra swatches under the bar.
    pub legend: Vec<(String, Swatch)>,
    /// Title word, e.g. "Cp difference".
    pub what: String,
    /// One explanatory line under the title.
    pub note: String,
}

/// Draw the view sheet of a field given by `paint` (one paint per
/// panel of `s.mesh`), with the same layout, views and decorations as
/// [`surface_sheet`].
///
/// # Errors
/// As [`surface_sheet`].
pub fn field_sheet(
    s: &SurfaceResult<'_>,
    style: &FieldStyle,
    caption: &Caption,
    paint: &dyn Fn(usize) -> PanelPaint,
) -> Result<Canvas, OutputError> {
    field_sheet_with_params(s, style, caption, &SheetParams::default(), paint)
}

/// [`field_sheet`] with explicit size and renderer settings.
fn field_sheet_with_params(
    s: &SurfaceResult<'_>,
    style: &FieldStyle,
    caption: &Caption,
    params: &SheetParams,
    paint: &dyn Fn(usize) -> PanelPaint,
) -> Result<Canvas, OutputError> {
    let mut canvas = views_sheet(s, caption, params, paint, &mut |_, _, _, _| {})?;
    finish_field_sheet(&mut canvas, style, caption, params);
    Ok(canvas)
}

/// A field sheet's titles and colour bar.
fn finish_field_sheet(
    canvas: &mut Canvas,
    style: &FieldStyle,
    caption: &Caption,
    params: &SheetParams,
) {
    draw_titles(canvas, &caption.title(&style.what), &style.note);
    let bar_x = f64::from(params.width) - BAR_COLUMN + 36.0;
    let bar_h = (f64::from(params.height) * 0.5).min(520.0);
    colorbar::draw_bar(
        canvas,
        &style.scale,
        (bar_x as f32, (TITLE_BAND + 50.0) as f32, 30.0, bar_h as f32),
        &style.legend,
    );
}

/// The largest share of a close-up's picture the box it frames takes
/// ([`close_up_layout`]; our choice, room round the part to see what it
/// meets).
const CLOSE_UP_FILL: f64 = 0.7;

/// Frames for a close-up of the box `lo`..`hi` (metres) in `views` (up to
/// four, one to a cell of the sheet's two by two), each at the largest
/// scale at which the box fills at most [`CLOSE_UP_FILL`] of its picture
/// (a wide part's plan view would otherwise set a small scale for its
/// profile too; each view carries its own scale bar), centred on the box.
pub fn close_up_layout(views: &[View], (lo, hi): (Point, Point), params: &SheetParams) -> Layout {
    let cell_w = (f64::from(params.width) - BAR_COLUMN - 20.0) / 2.0;
    let cell_h = (f64::from(params.height) - TITLE_BAND - 10.0) / 2.0;
    let (pic_w, pic_h) = (cell_w - 30.0, cell_h - LABEL_BAND - 14.0);
    let corners: Vec<Point> = (0..8)
        .map(|k| {
            Point::new(
                if k & 1 == 0 { lo.x } else { hi.x },
                if k & 2 == 0 { lo.y } else { hi.y },
                if k & 4 == 0 { lo.z } else { hi.z },
            )
        })
        .collect();
    let extents: Vec<(f64, f64, f64, f64)> = views
        .iter()
        .map(|v| {
            let (right, up, _) = v.basis();
            corners.iter().fold(
                (
                    f64::INFINITY,
                    f64::NEG_INFINITY,
                    f64::INFINITY,
                    f64::NEG_INFINITY,
                ),
                |e, p| {
                    let (u, w) = (p.coords.dot(&right), p.coords.dot(&up));
                    (e.0.min(u), e.1.max(u), e.2.min(w), e.3.max(w))
                },
            )
        })
        .collect();
    let fit = |e: &(f64, f64, f64, f64)| {
        usable_scale(
            (CLOSE_UP_FILL * pic_w / (e.1 - e.0).max(1e-6))
                .min(CLOSE_UP_FILL * pic_h / (e.3 - e.2).max(1e-6)),
        )
    };
    let views = views
        .iter()
        .zip(extents)
        .take(4)
        .enumerate()
        .map(|(k, (&v, e))| {
            let left = 20.0 + cell_w * (k % 2) as f64 + 10.0;
            let top = TITLE_BAND + cell_h * (k / 2) as f64 + LABEL_BAND;
            let frame = Frame {
                scale: fit(&e),
                centre: (0.5 * (e.0 + e.1), 0.5 * (e.2 + e.3)),
                rect: (left as i64, top as i64, pic_w as i64, pic_h as i64),
            };
            (v, frame)
        })
        .collect();
    Layout { views }
}

/// A field sheet as [`field_sheet`] draws it, in the views and frames of
/// `layout` ([`close_up_layout`]): a close-up of part of the body.
///
/// # Errors
/// As [`surface_sheet`].
pub fn field_sheet_in(
    s: &SurfaceResult<'_>,
    style: &FieldStyle,
    caption: &Caption,
    layout: &Layout,
    paint: &dyn Fn(usize) -> PanelPaint,
) -> Result<Canvas, OutputError> {
    let params = SheetParams::default();
    // Each view at its own scale, each with its bar (the side view's
    // comes with its decorations).
    let mut bars = |c: &mut Canvas, _: &[DisplayTri], view: View, frame: &Frame| {
        if !view.is_side() {
            draw_scale_bar(c, frame);
        }
    };
    let mut canvas = views_sheet_in(s, caption, &params, Some(layout), paint, &mut bars)?;
    finish_field_sheet(&mut canvas, style, caption, &params);
    Ok(canvas)
}

/// Something drawn over the body in each view (the tufts).
pub(crate) type Overlay<'a> = dyn FnMut(&mut Canvas, &[DisplayTri], View, &Frame) + 'a;

/// A blank sheet with the views of `s.mesh` painted by `paint`, each
/// labelled, with `overlay` drawn over the body and then the ground line,
/// flow arrow and scale bar; the caller adds the titles and the key.
///
/// # Errors
/// As [`surface_sheet`].
pub(crate) fn views_sheet(
    s: &SurfaceResult<'_>,
    caption: &Caption,
    params: &SheetParams,
    paint: &dyn Fn(usize) -> PanelPaint,
    overlay: &mut Overlay<'_>,
) -> Result<Canvas, OutputError> {
    views_sheet_in(s, caption, params, None, paint, overlay)
}

/// [`views_sheet`] in the views and frames of `layout`, or of the
/// whole-body sheet ([`layout_at`]) for `None`.
fn views_sheet_in(
    s: &SurfaceResult<'_>,
    caption: &Caption,
    params: &SheetParams,
    layout: Option<&Layout>,
    paint: &dyn Fn(usize) -> PanelPaint,
    overlay: &mut Overlay<'_>,
) -> Result<Canvas, OutputError> {
    s.validate()?;
    let height = if layout.is_some() {
        params.height
    } else {
        params.height_at(caption.yaw_deg)
    };
    let mut canvas = Canvas::new(params.width, height)?;
    let tris = display_triangles(s.mesh);
    let whole;
    let lay = match layout {
        Some(l) => l,
        None => {
            whole = layout_at(&tris, params, caption.yaw_deg);
            &whole
        }
    };
    for (view, frame) in &lay.views {
        draw_cell(
            &mut canvas,
            &tris,
            *view,
            frame,
            (params, caption.yaw_deg),
            paint,
        );
        overlay(&mut canvas, &tris, *view, frame);
        decorate(&mut canvas, s, *view, frame, caption);
    }
    Ok(canvas)
}

/// Scale, legend, title word and explanatory note of a field.
fn field_style(
    s: &SurfaceResult<'_>,
    field: SurfaceField,
) -> (
    ColourScale,
    Vec<(String, Swatch)>,
    &'static str,
    &'static str,
) {
    match field {
        SurfaceField::Pressure => (
            ColourScale::cp(s.cp),
            s.state
                .contains(&PanelState::Separated)
                .then(|| (assumed_words(s).0.to_owned(), assumed_swatch(s)))
                .into_iter()
                .collect(),
            "Surface pressure",
            "",
        ),
        SurfaceField::SeparationRisk => (
            ColourScale::risk(),
            std::iter::once((
                "separated".to_owned(),
                Swatch::Hatched(SEPARATED.0, SEPARATED.1),
            ))
            .chain(unresolved_swatch(s))
            .collect(),
            "Separation risk",
            "How close the boundary layer came to separating: 0 far from it, 1 at the criterion. Hatched: separated. \
             A laminar layer reads 0 (unless the case keeps it laminar throughout): where it would separate it \
             turns turbulent (a short bubble) and goes on. 1 without hatching: a closed bubble, where the \
             layer leaves the surface and reattaches (as at the foot of a windscreen), counted attached.",
        ),
    }
}

/// The pressure sheet's note: what Cp and its colours are, and, where
/// some panel is separated, what its stripes say.
fn pressure_note(s: &SurfaceResult<'_>) -> String {
    let mut note =
        "Pressure coefficient Cp = (p \u{2212} p\u{221e}) / (\u{bd}\u{3c1}U\u{b2}). Red: above \
                    free-stream pressure; blue: suction."
            .to_owned();
    if s.state.contains(&PanelState::Separated) {
        note += " ";
        note += assumed_words(s).1;
    }
    note
}

/// The legend entry and the note's words for separated panels on the
/// pressure sheet: their Cp is the dead water's one assumed pressure, or
/// (no dead water) the attached flow's or the plateau model's; neither is
/// a computed pressure of the separated flow.
fn assumed_words(s: &SurfaceResult<'_>) -> (&'static str, &'static str) {
    if s.dead_water_cp.is_some() {
        (
            "separated: one\nassumed pressure\n(dead water)",
            "Grey stripes: separated, held at one assumed pressure (the dead water's), not a computed one.",
        )
    } else {
        (
            "separated: no\ncomputed pressure",
            "Grey stripes: separated, where the colour is the attached flow's or the plateau model's \
             pressure, not a computed pressure of the separated flow.",
        )
    }
}

/// The pressure sheet's swatch for separated panels: the dead water's
/// colour under the stripes where it has one, else a neutral grey.
fn assumed_swatch(s: &SurfaceResult<'_>) -> Swatch {
    let base = s
        .dead_water_cp
        .and_then(|cp| ColourScale::cp(s.cp).colour(cp))
        .unwrap_or(NO_VALUE);
    Swatch::Striped(base, ASSUMED_PRESSURE)
}

/// The legend's "not resolved" entry, only where some panel is.
pub(crate) fn unresolved_swatch(s: &SurfaceResult<'_>) -> Option<(String, Swatch)> {
    s.state
        .contains(&PanelState::Unresolved)
        .then(|| ("not resolved".to_owned(), Swatch::Solid(NO_VALUE)))
}

/// Paint of panel `i` for a field.
pub(crate) fn panel_paint(
    s: &SurfaceResult<'_>,
    field: SurfaceField,
    scale: &ColourScale,
    i: usize,
) -> PanelPaint {
    match field {
        SurfaceField::Pressure => {
            let colour = scale.colour(s.cp[i]).unwrap_or(NO_VALUE);
            if s.state[i] == PanelState::Separated {
                PanelPaint::Striped(colour, ASSUMED_PRESSURE)
            } else {
                PanelPaint::Solid(colour)
            }
        }
        SurfaceField::SeparationRisk => match s.state[i] {
            PanelState::Separated => PanelPaint::Hatched(SEPARATED.0, SEPARATED.1),
            PanelState::Unresolved => PanelPaint::Solid(NO_VALUE),
            _ => PanelPaint::Solid(scale.colour(s.risk[i]).unwrap_or(NO_VALUE)),
        },
    }
}

/// One view with its label.
fn draw_cell(
    canvas: &mut Canvas,
    tris: &[DisplayTri],
    view: View,
    frame: &Frame,
    (params, yaw_deg): (&SheetParams, f64),
    paint: &dyn Fn(usize) -> PanelPaint,
) {
    let (l, t, w, _) = frame.rect;
    let label = view.label_at(yaw_deg);
    text::draw(
        canvas,
        &label,
        l as f32,
        (t - 12) as f32,
        &TextStyle::new(17.0).bold(),
    );
    canvas.polyline(
        &[(l as f32, (t - 4) as f32), ((l + w) as f32, (t - 4) as f32)],
        GRID,
        1.0,
    );
    render::draw_view(canvas, tris, view, frame, &params.render, paint);
}

/// The corner of a view's `rect` (x, y, w, h) the flow arrow and its word
/// take, as a plate (x, y, w, h) other labels keep clear of.
pub fn flow_mark_box(rect: (i64, i64, i64, i64)) -> [f32; 4] {
    let (l, t, w, _) = rect;
    [(l + w - 130) as f32, t as f32, 130.0, 40.0]
}

/// The ground plane at height `z` as a line across `frame` in `view` (one
/// seen edge-on: side, front, rear), where it falls inside the frame; its
/// height on the canvas, pixels.
pub fn ground_line(canvas: &mut Canvas, z: f64, view: View, frame: &Frame) -> Option<f64> {
    let (l, t, w, h) = frame.rect;
    let (_, y) = frame.project(view, &Point::new(0.0, 0.0, z));
    (t as f64..(t + h) as f64).contains(&y).then(|| {
        canvas.polyline(
            &[(l as f32, y as f32), ((l + w) as f32, y as f32)],
            [150, 120, 90],
            1.5,
        );
        y
    })
}

/// The largest `scale` that fits, or 1 when none does (an empty or flat
/// extent): pixels per metre.
pub fn usable_scale(scale: f64) -> f64 {
    if scale.is_finite() && scale > 0.0 {
        scale
    } else {
        1.0
    }
}

/// Ground line, flow arrow and scale bar where they apply.
fn decorate(
    canvas: &mut Canvas,
    s: &SurfaceResult<'_>,
    view: View,
    frame: &Frame,
    caption: &Caption,
) {
    let (l, t, w, _) = frame.rect;
    if let (Some(z), View::Side | View::SideFromRight | View::Front | View::Rear) =
        (s.mesh.mirrors.ground, view)
        && let Some(y) = ground_line(canvas, z, view, frame)
    {
        text::draw(
            canvas,
            "ground",
            (l + w - 4) as f32,
            (y - 5.0) as f32,
            &TextStyle::new(13.0).colour(MUTED).align(Align::Right),
        );
    }
    if let Some((dx, dy)) = view.flow_direction(caption.yaw_deg) {
        // The word before the arrow, on one line with it, so the corner
        // they take is short and region names keep clear of it
        // ([`flow_mark_box`]).
        let (x0, y0) = ((l + w - 40) as f32, (t + 20) as f32);
        let (dx, dy) = (28.0 * dx as f32, 28.0 * dy as f32);
        canvas.arrow((x0 - dx, y0 - dy), (x0 + dx, y0 + dy), MUTED, 2.0);
        text::draw(
            canvas,
            "flow",
            x0 - 36.0,
            y0 + 5.0,
            &TextStyle::new(13.0).colour(MUTED).align(Align::Right),
        );
    }
    if view.is_side() {
        draw_scale_bar(canvas, frame);
    }
}

/// The scale bar's length in a view, metres: the largest of 1, 2 and 5
/// times a power of ten up to a quarter of the view's width (a round step
/// above the quarter had left no tick but 0, and the bar fell back to
/// 1 m: a review's close-up drew 1 m beside a 0.4 m base).
fn scale_bar_metres(frame: &Frame) -> f64 {
    let quarter = 0.25 * frame.rect.2 as f64 / frame.scale;
    if !(quarter.is_finite() && quarter > 0.0) {
        return 1.0;
    }
    let p = 10f64.powf(quarter.log10().floor());
    [5.0, 2.0, 1.0]
        .into_iter()
        .map(|m| m * p)
        .find(|&v| v <= quarter * (1.0 + 1e-9))
        .unwrap_or(p)
}

/// The part of a side view the scale bar and its label take
/// ([`draw_scale_bar`]), as a plate (x, y, w, h) region names keep
/// clear of.
pub fn scale_bar_box(frame: &Frame) -> [f32; 4] {
    let (l, t, _, h) = frame.rect;
    let len = (scale_bar_metres(frame) * frame.scale) as f32;
    [l as f32, (t + h) as f32 - 28.0, len + 8.0, 28.0]
}

/// A round-length scale bar in the bottom-left corner of a view.
fn draw_scale_bar(canvas: &mut Canvas, frame: &Frame) {
    let (l, t, _, h) = frame.rect;
    let metres = scale_bar_metres(frame);
    let len = (metres * frame.scale) as f32;
    let (x, y) = (l as f32 + 4.0, (t + h) as f32 - 6.0);
    canvas.polyline(
        &[(x, y - 6.0), (x, y), (x + len, y), (x + len, y - 6.0)],
        INK,
        1.5,
    );
    let label = format!("{} m", super::short_number(metres));
    text::draw(
        canvas,
        &label,
        x + 0.5 * len,
        y - 8.0,
        &TextStyle::new(13.0).align(Align::Centre),
    );
}

/// Title and explanatory note at the top.
pub(crate) fn draw_titles(canvas: &mut Canvas, title: &str, note: &str) {
    let room = canvas.width() as f32 - 60.0;
    text::draw(canvas, title, 30.0, 44.0, &title_style(title, room));
    // The note wraps onto up to three lines, smaller as it grows, within
    // the title band.
    let layouts: [(f32, &[f32]); 3] = [
        (16.0, &[74.0]),
        (15.0, &[68.0, 87.0]),
        (13.0, &[63.0, 79.0, 95.0]),
    ];
    for (k, (size, rows)) in layouts.iter().enumerate() {
        let style = TextStyle::new(*size).colour(MUTED);
        let lines = wrap(note, room, &style);
        if lines.len() <= rows.len() || k == layouts.len() - 1 {
            for (line, &y) in lines.iter().zip(rows.iter()) {
                text::draw(canvas, line, 30.0, y, &style);
            }
            return;
        }
    }
}

/// `text` broken at spaces into lines no wider than `room` pixels (a
/// single word wider than that keeps a line to itself).
/// The title's style: 28 px bold, smaller (down to 18 px) when a long
/// case name and a yawed run's wind words would not fit in `room`.
pub(crate) fn title_style(title: &str, room: f32) -> TextStyle {
    let full = TextStyle::new(28.0).bold();
    let width = text::width(title, &full);
    if width <= room {
        return full;
    }
    TextStyle::new((28.0 * room / width).max(18.0)).bold()
}

fn wrap(text: &str, room: f32, style: &TextStyle) -> Vec<String> {
    let mut lines: Vec<String> = Vec::new();
    let mut line = String::new();
    for word in text.split(' ') {
        let wider = if line.is_empty() {
            word.to_owned()
        } else {
            format!("{line} {word}")
        };
        if text::width(&wider, style) > room && !line.is_empty() {
            lines.push(std::mem::replace(&mut line, word.to_owned()));
        } else {
            line = wider;
        }
    }
    if !line.is_empty() {
        lines.push(line);
    }
    lines
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use nalgebra::Vector3;

    use super::*;

    /// The scale bar is the largest 1, 2 or 5 times a power of ten within
    /// a quarter of the view's width: 1 m on a car's overview, 0.2 m where
    /// the quarter is 0.48 m (it had fallen back to 1 m there).
    #[test]
    fn the_scale_bar_fits_its_view() {
        let frame = |scale: f64| Frame {
            scale,
            centre: (0.0, 0.0),
            rect: (0, 0, 640, 300),
        };
        for (scale, metres) in [
            (128.0, 1.0),
            (333.3, 0.2),
            (1140.0, 0.1),
            (640.0, 0.2),
            (32.0, 5.0),
        ] {
            assert!(
                (scale_bar_metres(&frame(scale)) - metres).abs() < 1e-12,
                "{scale} px/m: {}",
                scale_bar_metres(&frame(scale))
            );
        }
    }
    use crate::output::canvas::testing::{decode, keep};

    /// A title that fits keeps its 28 px; one that would run off the
    /// picture (a long variant name and a yawed run's wind words) shrinks
    /// to fit it.
    #[test]
    fn a_long_title_shrinks_to_fit() {
        let short = "Surface pressure, coupe, 40 m/s (144 km/h), yaw 0°";
        let long = "Cp along the centre line, yaw-minus10_rear_window_deg-30_boot_deck_length-0.45, \
                    40 m/s (144 km/h), yaw -10° (wind from the car's right, +y)";
        let room = 1400.0 - 60.0;
        let full = TextStyle::new(28.0).bold();
        assert!(text::width(short, &full) <= room);
        assert_eq!(
            text::width(short, &title_style(short, room)),
            text::width(short, &full)
        );
        assert!(text::width(long, &full) > room);
        assert!(text::width(long, &title_style(long, room)) <= room + 1.0);
    }
    use crate::output::fixture::{Fixture, caption};
    use crate::output::render::shade;

    #[test]
    fn long_notes_wrap_at_spaces_within_the_room() {
        let style = TextStyle::new(15.0);
        let note = "word ".repeat(200);
        let lines = wrap(note.trim_end(), 500.0, &style);
        assert!(lines.len() > 1);
        assert!(lines.iter().all(|l| text::width(l, &style) <= 500.0));
        assert_eq!(lines.join(" "), note.trim_end());
        assert_eq!(wrap("short", 500.0, &style), ["short"]);
    }

    fn sheet(
        f: &Fixture,
        field: SurfaceField,
        name: &str,
    ) -> crate::output::canvas::testing::Decoded {
        let png = surface_sheet(&f.surface(), field, &caption())
            .unwrap()
            .to_png()
            .unwrap();
        keep(name, &png);
        decode(&png)
    }

    #[test]
    fn pressure_sheet_shows_the_sphere_in_every_view() {
        let f = Fixture::sphere(3);
        let img = sheet(&f, SurfaceField::Pressure, "pressure.png");
        assert_eq!((img.width, img.height), (1600, 1000));
        // Text, outline, shading and the colour map give thousands of colours.
        assert!(img.distinct_colours() > 200, "{}", img.distinct_colours());
        let lay = layout(&display_triangles(&f.mesh), &SheetParams::default());
        for (view, frame) in &lay.views {
            // The sphere's centre projects to the frame centre; a 60 px box
            // around it lies on the body (radius well over 100 px).
            let (cx, cy) = frame.project(*view, &Point::origin());
            let body = (-30..30)
                .flat_map(|dx| (-30..30).map(move |dy| (dx, dy)))
                .filter(|&(dx, dy)| img.pixel(cx as i64 + dx, cy as i64 + dy) != [255, 255, 255])
                .count();
            assert_eq!(body, 3600, "{view:?}");
            assert!(frame.scale > 100.0, "{view:?} scale {}", frame.scale);
        }
    }

    /// In a cross wind the side view shows the lee side: at positive yaw
    /// (wind towards +y) it looks from +y, the nose on the right and the
    /// flow arrow pointing left; straight ahead and at negative yaw it
    /// looks from -y, nose left.
    #[test]
    fn a_yawed_sheet_shows_the_lee_side() {
        let f = Fixture::sphere(2);
        let tris = display_triangles(&f.mesh);
        let params = SheetParams::default();
        let nose_right = |yaw: f64| {
            let lay = layout_at(&tris, &params, yaw);
            let (view, frame) = lay.views[0];
            let (nose, _) = frame.project(view, &Point::new(-1.0, 0.0, 0.0));
            let (tail, _) = frame.project(view, &Point::new(1.0, 0.0, 0.0));
            (view, nose > tail)
        };
        assert_eq!(nose_right(10.0), (View::SideFromRight, true));
        assert_eq!(nose_right(0.0), (View::Side, false));
        assert_eq!(nose_right(-10.0), (View::Side, false));
        let mut yawed = caption();
        yawed.yaw_deg = 10.0;
        let png = surface_sheet(&f.surface(), SurfaceField::Pressure, &yawed)
            .unwrap()
            .to_png()
            .unwrap();
        keep("pressure-yaw10.png", &png);
        let img = decode(&png);
        let (view, frame) = layout_at(&tris, &params, 10.0).views[0];
        let (cx, cy) = frame.project(view, &Point::origin());
        assert_ne!(img.pixel(cx as i64, cy as i64), [255, 255, 255]);
    }

    #[test]
    fn side_view_stagnation_point_has_the_colour_of_cp_one() {
        // Lamb (Hydrodynamics, §92): Cp = 1 at the stagnation point
        // (-1, 0, 0), which the side view shows at the left edge of the
        // disc. Three pixels inward (about 11 degrees round the sphere,
        // exact Cp 0.92) the colour must be the map's colour at Cp 0.92
        // times the Lambert factor of the sphere's normal there. Tolerance
        // 14 of 255 per channel: the flat facets tilt a few degrees from
        // the sphere, and their Cp differs from the exact one by a few
        // hundredths.
        let f = Fixture::sphere(3);
        let img = sheet(&f, SurfaceField::Pressure, "pressure.png");
        let frame = *layout(&display_triangles(&f.mesh), &SheetParams::default())
            .frame(View::Side)
            .unwrap();
        let (x, y) = frame.project(View::Side, &Point::new(-1.0, 0.0, 0.0));
        let px = x.round() as i64 + 3;
        let got = img.pixel(px, y as i64);
        let wx = -1.0 + (px as f64 + 0.5 - x) / frame.scale;
        let normal = Vector3::new(wx, -(1.0 - wx * wx).sqrt(), 0.0);
        let k = shade(View::Side, &normal, &RenderParams::default());
        let want = ColourScale::cp(&f.cp)
            .colour(0.92)
            .unwrap()
            .map(|c| f64::from(c) * k);
        for ch in 0..3 {
            assert!(
                (f64::from(got[ch]) - want[ch]).abs() <= 14.0,
                "got {got:?}, want {want:?}"
            );
        }
        // And it is not the suction colour (Cp = -1.25 at the equator).
        let suction = ColourScale::cp(&f.cp).colour(-1.25).unwrap();
        assert!((i32::from(got[2]) - i32::from(suction[2])).abs() > 60);
    }

    #[test]
    fn risk_sheet_hatches_separated_panels() {
        let f = Fixture::sphere(3);
        let img = sheet(&f, SurfaceField::SeparationRisk, "risk.png");
        assert_eq!((img.width, img.height), (1600, 1000));
        let frame = *layout(&display_triangles(&f.mesh), &SheetParams::default())
            .frame(View::Side)
            .unwrap();
        // The fixture marks 0.5 < x < 0.93 separated: at x = 0.7 on the
        // equator (seen from the side) a row of pixels shows both stripes.
        let (x, y) = frame.project(View::Side, &Point::new(0.7, -0.7, 0.0));
        let row: Vec<[u8; 3]> = (0..14).map(|d| img.pixel(x as i64 + d, y as i64)).collect();
        let dark = row.iter().filter(|c| c[0] < 60).count();
        let light = row.iter().filter(|c| c[0] > 90 && c[0] < 160).count();
        assert!(dark >= 2 && light >= 2, "{row:?}");
        // The rear view shows the separated band (x = 0.8 lies in it), the
        // front view the attached nose (x = -0.8) at the same place.
        let lay = layout(&display_triangles(&f.mesh), &SheetParams::default());
        let stripes = |view: View, x: f64| {
            let frame = lay.frame(view).unwrap();
            let (px, py) = frame.project(view, &Point::new(x, 0.6, 0.0));
            let row: Vec<[u8; 3]> = (0..14)
                .map(|d| img.pixel(px as i64 + d, py as i64))
                .collect();
            row.iter().filter(|c| c[0] < 60).count()
        };
        assert!(stripes(View::Rear, 0.8) >= 2);
        assert_eq!(stripes(View::Front, -0.8), 0);
    }

    /// Separated panels on the pressure sheet carry thin grey stripes
    /// over their colour (the fixture separates 0.5 < x < 0.93: seen in
    /// the rear view, not the front), and the legend names them.
    #[test]
    fn pressure_sheet_marks_separated_panels() {
        let f = Fixture::sphere(3);
        let img = sheet(&f, SurfaceField::Pressure, "pressure-separated.png");
        let lay = layout(&display_triangles(&f.mesh), &SheetParams::default());
        let greys = |view: View, x: f64| {
            let frame = lay.frame(view).unwrap();
            let (px, py) = frame.project(view, &Point::new(x, 0.6, 0.0));
            (0..16)
                .map(|d| img.pixel(px as i64 + d, py as i64))
                .filter(|c| {
                    let (lo, hi) = (c.iter().min().unwrap(), c.iter().max().unwrap());
                    hi - lo < 16 && *hi < 140
                })
                .count()
        };
        assert!(greys(View::Rear, 0.8) >= 2);
        assert_eq!(greys(View::Front, -0.8), 0);
        let s = f.surface();
        assert_eq!(assumed_words(&s).0, "separated: no\ncomputed pressure");
        let dead = crate::output::SurfaceResult {
            dead_water_cp: Some(-0.15),
            ..s
        };
        assert!(assumed_words(&dead).0.contains("assumed pressure"));
        assert!(pressure_note(&dead).contains("held at one assumed pressure"));
    }

    /// The five frames lie on the sheet and apart, front and rear side by
    /// side in the last cell.
    #[test]
    fn the_views_lie_apart_on_the_sheet() {
        let coupe = tuft_mesh::PanelMesh::new(
            tuft_mesh::generate::coupe(22.0, 800).unwrap(),
            tuft_mesh::Mirrors::ground(0.0),
        )
        .unwrap();
        let params = SheetParams::default();
        let tris = display_triangles(&coupe);
        let straight = layout(&tris, &params);
        // In a cross wind: six views, both sides, on a taller sheet, at
        // about the straight-ahead scale.
        let yawed = layout_at(&tris, &params, -10.0);
        assert_eq!(straight.views.len(), 5);
        assert_eq!(yawed.views.len(), 6);
        assert_eq!(
            [yawed.views[0].0, yawed.views[1].0],
            [View::Side, View::SideFromRight]
        );
        let scale = |l: &Layout| l.views[0].1.scale;
        assert!(scale(&yawed) > 0.9 * scale(&straight));
        for (lay, yaw) in [(straight, 0.0), (yawed, -10.0)] {
            for (i, (_, a)) in lay.views.iter().enumerate() {
                let (l, t, w, h) = a.rect;
                assert!(l >= 0 && t >= 0 && w > 0 && h > 0);
                assert!(l + w <= i64::from(params.width) - BAR_COLUMN as i64);
                assert!(t + h <= i64::from(params.height_at(yaw)));
                for (_, b) in &lay.views[i + 1..] {
                    let (m, u, x, y) = b.rect;
                    let apart = l + w <= m || m + x <= l || t + h <= u || u + y <= t;
                    assert!(apart, "{:?} and {:?} overlap", a.rect, b.rect);
                }
            }
            let (front, rear) = (
                lay.frame(View::Front).unwrap(),
                lay.frame(View::Rear).unwrap(),
            );
            assert_eq!(front.rect.1, rear.rect.1);
            assert!(front.rect.0 < rear.rect.0);
        }
        assert_eq!(
            View::SideFromRight.label_at(-10.0),
            "Side, from +y (nose right): the windward side"
        );
        assert_eq!(
            View::SideFromRight.label_at(10.0),
            "Side, from +y (nose right): the lee side"
        );
    }
}
