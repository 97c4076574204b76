//! Line plots with axes, ticks, grid, legend and title; among them the
//! pressure coefficient along the centre line (upper and lower surface),
//! drawn with the Cp axis inverted (suction up), as the trade reads it.

use super::canvas::{Canvas, GRID, INK, MUTED, Rgb, WHITE};
use super::colorbar::{nice_ticks, tick_label};
use super::text::{self, Align, TextStyle};
use super::{Caption, OutputError, PanelState, SurfaceResult};

/// One named curve.
#[derive(Debug, Clone, PartialEq)]
pub struct Series {
    /// Legend text.
    pub name: String,
    /// Points in data units, drawn in the given order.
    pub points: Vec<(f64, f64)>,
    /// Line colour.
    pub colour: Rgb,
}

/// A curve that does not set the vertical axis (a drag band's top, far
/// above the estimates): its points within the axis are drawn as a thin
/// line with markers, those above it as an arrow at the top edge with the
/// value written beside it, and a note under the subtitle says what the
/// curve is.
#[derive(Debug, Clone, PartialEq)]
pub struct OffScale {
    /// The curve (its legend text, points and colour).
    pub series: Series,
    /// One line saying what the curve is, shown when a point lies above
    /// the axis.
    pub note: String,
    /// Decimals of the values written beside the arrows.
    pub decimals: usize,
}

/// Stretches of the horizontal axis shaded behind the curves (where the
/// centre line is separated), with the legend's words for them.
#[derive(Debug, Clone, PartialEq)]
pub struct Shading {
    /// `(from, to)` in data units.
    pub spans: Vec<(f64, f64)>,
    /// Legend text.
    pub name: String,
    /// Tint, multiplied into what lies under it (so that two shadings
    /// that overlap both show).
    pub colour: Rgb,
    /// The share of the plot area's height it covers, `(from, to)` from
    /// the top: `(0.0, 1.0)` the whole height.
    pub rows: (f64, f64),
}

/// A plot to draw.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct LinePlot {
    /// Title (what, which case, what speed).
    pub title: String,
    /// One line under the title.
    pub subtitle: String,
    /// Horizontal axis label with unit.
    pub x_label: String,
    /// Vertical axis label with unit.
    pub y_label: String,
    /// Draw the vertical axis with its smallest value at the top.
    pub invert_y: bool,
    /// The curves.
    pub series: Vec<Series>,
    /// A curve drawn against the axis the others set, arrows where it
    /// lies above it.
    pub off_scale: Option<OffScale>,
    /// Stretches of x shaded behind the curves.
    pub shading: Vec<Shading>,
    /// A second line under the subtitle (what the shading shows), or
    /// empty.
    pub note: String,
    /// The least height the vertical axis spans, in its units (0: as the
    /// data fall), so that differences within the noise do not fill it.
    pub min_y_span: f64,
    /// Names of the horizontal axis's whole-number positions 0, 1, 2 ...
    /// when what it shows is not a number (an STL per variant): the ticks
    /// carry the names and the points are not joined, as no value lies
    /// between two of them (empty: a numeric axis).
    pub x_categories: Vec<String>,
    /// Vertical bars from a low to a high value at points of x (a
    /// variant's least and most over three panel counts), behind the
    /// curves; they count towards the vertical axis.
    pub whiskers: Option<Whiskers>,
    /// A stretch of y shaded across the whole width behind the curves (a
    /// sweep's lowest drag and the noise floor above it), one legend
    /// entry; it counts towards the vertical axis.
    pub y_band: Option<YBand>,
    /// Where the vertical axis starts when no value lies below it (a
    /// magnitude's zero: an area, a share), so that a line's height reads
    /// as its size (a review read a separated area going from 1.6 to 2.3
    /// m^2 on an axis from 1.5 as fivefold, and a share's axis reached
    /// -10 %); `None`: as the values fall.
    pub y_from: Option<f64>,
    /// A span the vertical axis covers whatever the values, so that two
    /// runs' plots share an axis where their values allow (two centre-line
    /// plots of the demo had read -1.0 to 1.5 and -1.5 to 1.5 and could
    /// not be laid over each other); `None`: as the values fall.
    pub y_covers: Option<(f64, f64)>,
    /// The series drawn widest, the one to read first (a lift plot's
    /// whole body beside its underbody and rest-of-body parts, which a
    /// review's eye had gone to first, drawn wider by their places);
    /// `None`: widths by place ([`line_width`]).
    pub emphasis: Option<usize>,
}

impl LinePlot {
    /// The width of series `k`'s line: by its place, or, with an
    /// [`Self::emphasis`], the widest for that one and at most the second
    /// width for the others.
    fn series_width(&self, k: usize) -> f32 {
        match self.emphasis {
            Some(e) if e == k => line_width(2),
            Some(_) => line_width(k.min(1)),
            None => line_width(k),
        }
    }
}

/// A stretch of the vertical axis shaded across the plot ([`LinePlot::y_band`]).
#[derive(Debug, Clone, PartialEq)]
pub struct YBand {
    /// `(from, to)` in data units.
    pub span: (f64, f64),
    /// Legend text.
    pub name: String,
    /// Tint, multiplied into what lies under it.
    pub colour: Rgb,
}

/// Vertical bars with caps ([`LinePlot::whiskers`]), one legend entry.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Whiskers {
    /// Legend text.
    pub name: String,
    /// `(x, low, high, colour)`, in data units.
    pub bars: Vec<(f64, f64, f64, Rgb)>,
}

impl Whiskers {
    /// Each bar's two ends, in data units.
    fn ends(&self) -> impl Iterator<Item = (f64, f64)> + '_ {
        self.bars
            .iter()
            .flat_map(|&(x, lo, hi, _)| [(x, lo), (x, hi)])
            .filter(|p| p.0.is_finite() && p.1.is_finite())
    }
}

/// Picture size of a plot.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PlotParams {
    /// Width, pixels.
    pub width: u32,
    /// Height, pixels.
    pub height: u32,
}

impl Default for PlotParams {
    fn default() -> Self {
        Self {
            width: 1400,
            height: 800,
        }
    }
}

/// The data-to-pixel map of a drawn plot.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PlotFrame {
    /// Plot area: left, top, width, height, pixels.
    pub rect: (f64, f64, f64, f64),
    /// Horizontal data range (left, right).
    pub x_range: (f64, f64),
    /// Vertical data range (bottom, top) as drawn (swapped when inverted).
    pub y_range: (f64, f64),
}

impl PlotFrame {
    /// Pixel position of a data point.
    pub fn pixel_at(&self, x: f64, y: f64) -> (f64, f64) {
        let (l, t, w, h) = self.rect;
        let u = (x - self.x_range.0) / (self.x_range.1 - self.x_range.0);
        let v = (y - self.y_range.0) / (self.y_range.1 - self.y_range.0);
        (l + u * w, t + (1.0 - v) * h)
    }
}

/// Series colours: a dark blue and an orange (distinguishable with the
/// common colour-vision deficiencies), then a green and a purple, a teal,
/// a vermilion, a brown and a pink, so that a plot of up to eight lines
/// gives each its own (a review's five diffuser angles drew the first
/// and the fifth in one blue).
pub const SERIES_COLOURS: [Rgb; 8] = [
    [31, 90, 166],
    [222, 110, 20],
    [44, 140, 80],
    [120, 70, 160],
    [0, 150, 170],
    [200, 60, 50],
    [140, 100, 40],
    [220, 120, 180],
];

/// Draw a line plot.
///
/// # Errors
/// [`OutputError::PictureSize`] for an unusable size.
pub fn draw_line_plot(
    plot: &LinePlot,
    params: &PlotParams,
) -> Result<(Canvas, PlotFrame), OutputError> {
    let mut c = Canvas::new(params.width, params.height)?;
    let mut frame = plot_frame(plot, params);
    // Where the legend would cover points in every corner, room above
    // them for it (a review's region plot hid a point at 99 % under it).
    if let Some(share) = legend_room(plot, &frame) {
        let (bottom, top) = frame.y_range;
        frame.y_range.1 = top + (top - bottom) * share / (1.0 - share);
    }
    for sh in &plot.shading {
        draw_shading(&mut c, sh, &frame);
    }
    if let Some(band) = &plot.y_band {
        draw_y_band(&mut c, band, &frame);
    }
    draw_grid_and_ticks(&mut c, &frame, plot.invert_y, &plot.x_categories);
    let above = plot
        .off_scale
        .as_ref()
        .is_some_and(|o| draw_off_scale(&mut c, o, &frame));
    if let Some(w) = &plot.whiskers {
        draw_whiskers(&mut c, w, &frame);
    }
    // Later series are drawn first and wider, so curves that coincide
    // (a symmetric body's upper and lower surface) both stay visible.
    for (k, s) in plot.series.iter().enumerate().rev() {
        let width = plot.series_width(k);
        let pts: Vec<(f32, f32)> = s
            .points
            .iter()
            .filter(|p| p.0.is_finite() && p.1.is_finite())
            .map(|&(x, y)| frame.pixel_at(x, y))
            .map(|(x, y)| (x as f32, y as f32))
            .collect();
        // Categories: dots, larger, and no line between them.
        let dot = if plot.x_categories.is_empty() {
            c.polyline(&pts, s.colour, width);
            1.0 + width
        } else {
            3.0 + width
        };
        for &(x, y) in &pts {
            c.fill_circle(x, y, dot, s.colour);
        }
    }
    let (l, t, w, h) = frame.rect;
    c.stroke_rect(l as f32, t as f32, w as f32, h as f32, INK, 1.2);
    let two = draw_labels(&mut c, plot, &frame);
    // What the arrows and the shading are, one line under the subtitle.
    let notes: Vec<&str> = [
        Some(plot.note.as_str()).filter(|n| !n.is_empty()),
        plot.off_scale
            .as_ref()
            .filter(|_| above)
            .map(|o| o.note.as_str()),
    ]
    .into_iter()
    .flatten()
    .collect();
    if !notes.is_empty() {
        let notes = notes.join(" ");
        let room = c.width() as f32 - 60.0;
        text::draw(
            &mut c,
            &notes,
            30.0,
            if two { 105.0 } else { 100.0 },
            &fitted(&notes, 15.0, room).colour(MUTED),
        );
    }
    // One line needs no key (and its box could hide a point).
    let mut keys: Vec<Key> = Vec::new();
    if let Some(o) = &plot.off_scale {
        let name = if above {
            format!("{} (arrows: off the scale)", o.series.name)
        } else {
            o.series.name.clone()
        };
        keys.push(Key::Line(name, o.series.colour, line_width(0), above));
    }
    keys.extend(
        plot.series
            .iter()
            .enumerate()
            .map(|(k, s)| Key::Line(s.name.clone(), s.colour, plot.series_width(k), false)),
    );
    for sh in plot.shading.iter().filter(|sh| !sh.spans.is_empty()) {
        keys.push(Key::Patch(sh.name.clone(), sh.colour));
    }
    if let Some(band) = &plot.y_band {
        keys.push(Key::Patch(band.name.clone(), band.colour));
    }
    if let Some(w) = plot.whiskers.as_ref().filter(|w| !w.bars.is_empty()) {
        keys.push(Key::Whisker(w.name.clone()));
    }
    if keys.len() > 1 {
        // The arrows count as points at the top edge, and the whiskers'
        // ends as points.
        let mut marks: Vec<(f64, f64)> = plot
            .off_scale
            .iter()
            .flat_map(|o| &o.series.points)
            .filter(|p| p.0.is_finite() && p.1.is_finite())
            .map(|p| {
                let (x, _) = frame.pixel_at(p.0, p.1);
                (x, frame.rect.1 + 15.0)
            })
            .collect();
        marks.extend(whisker_marks(plot, &frame));
        marks.extend(shading_marks(plot, &frame));
        draw_legend(&mut c, &keys, &plot.series, &marks, &frame);
    }
    Ok((c, frame))
}

/// The width of the `k`-th series' line: later ones wider, so curves that
/// coincide both stay visible (a centre line's upper and lower surface, a
/// band's end on its estimate), up to the third's (a lift plot's
/// underbody and rest-of-body lines, fourth and fifth, had been drawn
/// 9 px wide).
fn line_width(k: usize) -> f32 {
    2.2 + 1.8 * k.min(2) as f32
}

/// Half the width of a whisker's caps, pixels.
const WHISKER_CAP: f32 = 6.0;

/// The whiskers: a thin vertical line with a cap at each end.
fn draw_whiskers(c: &mut Canvas, w: &Whiskers, f: &PlotFrame) {
    for &(x, lo, hi, colour) in &w.bars {
        if ![x, lo, hi].iter().all(|v| v.is_finite()) {
            continue;
        }
        let (px, a) = f.pixel_at(x, lo);
        let (_, b) = f.pixel_at(x, hi);
        let (px, a, b) = (px as f32, a as f32, b as f32);
        c.polyline(&[(px, a), (px, b)], colour, 1.6);
        for y in [a, b] {
            c.polyline(&[(px - WHISKER_CAP, y), (px + WHISKER_CAP, y)], colour, 1.6);
        }
    }
}

/// The whiskers' ends of `plot`, pixels (for the legend to keep clear of).
fn whisker_marks(plot: &LinePlot, f: &PlotFrame) -> Vec<(f64, f64)> {
    plot.whiskers
        .iter()
        .flat_map(Whiskers::ends)
        .map(|(x, y)| f.pixel_at(x, y))
        .collect()
}

/// The shaded stretch of y, across the plot area.
fn draw_y_band(c: &mut Canvas, band: &YBand, f: &PlotFrame) {
    let (l, t, w, h) = f.rect;
    let (_, ya) = f.pixel_at(f.x_range.0, band.span.0);
    let (_, yb) = f.pixel_at(f.x_range.0, band.span.1);
    let (top, bottom) = (ya.min(yb).clamp(t, t + h), ya.max(yb).clamp(t, t + h));
    multiply_box(c, (l, top), (l + w, bottom), band.colour);
}

/// Multiply `colour` into the pixels of the box from `a` to `b` (pixels),
/// so that what lies under it still shows.
fn multiply_box(c: &mut Canvas, a: (f64, f64), b: (f64, f64), colour: Rgb) {
    for y in a.1.round() as i64..b.1.round() as i64 {
        for x in a.0.round() as i64..b.0.round() as i64 {
            let under = c.pixel(x, y);
            let mixed = [0, 1, 2].map(|k| (u16::from(under[k]) * u16::from(colour[k]) / 255) as u8);
            c.blend(x, y, mixed, 1.0);
        }
    }
}

/// The shaded stretches of x, over the share of the plot area's height
/// the shading's rows give.
fn draw_shading(c: &mut Canvas, sh: &Shading, f: &PlotFrame) {
    let (l, t, w, h) = f.rect;
    let (top, bottom) = (t + sh.rows.0 * h, t + sh.rows.1 * h);
    for &(a, b) in &sh.spans {
        let (xa, _) = f.pixel_at(a.min(b), f.y_range.0);
        let (xb, _) = f.pixel_at(a.max(b), f.y_range.0);
        let (xa, xb) = (xa.clamp(l, l + w), xb.clamp(l, l + w));
        multiply_box(c, (xa, top), (xb, bottom), sh.colour);
    }
}

/// Spacing of [`shading_marks`], pixels.
const SHADING_MARK_STEP: f64 = 20.0;

/// Points over the shaded stretches, one every [`SHADING_MARK_STEP`]
/// pixels each way, for the legend to keep clear of as of curve points (a
/// review's centre-line plot had its legend over the shaded separated
/// tail, which a free corner would have spared).
fn shading_marks(plot: &LinePlot, f: &PlotFrame) -> Vec<(f64, f64)> {
    let (l, t, w, h) = f.rect;
    let mut marks = Vec::new();
    for sh in &plot.shading {
        let (top, bottom) = (t + sh.rows.0 * h, t + sh.rows.1 * h);
        for &(a, b) in &sh.spans {
            let (xa, _) = f.pixel_at(a.min(b), f.y_range.0);
            let (xb, _) = f.pixel_at(a.max(b), f.y_range.0);
            let (xa, xb) = (xa.clamp(l, l + w), xb.clamp(l, l + w));
            let mut x = xa + 0.5 * SHADING_MARK_STEP;
            while x < xb {
                let mut y = top + 0.5 * SHADING_MARK_STEP;
                while y < bottom {
                    marks.push((x, y));
                    y += SHADING_MARK_STEP;
                }
                x += SHADING_MARK_STEP;
            }
        }
    }
    marks
}

/// The off-scale curve: its points within the vertical axis joined by a
/// thin line, those above the axis an arrow at the top edge with the
/// value beside it. True when some point lies above the axis.
fn draw_off_scale(c: &mut Canvas, o: &OffScale, f: &PlotFrame) -> bool {
    let (_, t, _, _) = f.rect;
    let (lo, hi) = (f.y_range.0.min(f.y_range.1), f.y_range.0.max(f.y_range.1));
    let points: Vec<(f64, f64)> = o
        .series
        .points
        .iter()
        .copied()
        .filter(|p| p.0.is_finite() && p.1.is_finite())
        .collect();
    // "Above" is towards the top of the picture, whichever way the axis runs.
    let over = |y: f64| {
        if f.y_range.1 >= f.y_range.0 {
            y > hi
        } else {
            y < lo
        }
    };
    let width = line_width(0);
    for pair in points.windows(2) {
        if pair.iter().all(|p| !over(p.1) && p.1 >= lo && p.1 <= hi) {
            let a = f.pixel_at(pair[0].0, pair[0].1);
            let b = f.pixel_at(pair[1].0, pair[1].1);
            c.polyline(
                &[(a.0 as f32, a.1 as f32), (b.0 as f32, b.1 as f32)],
                o.series.colour,
                width,
            );
        }
    }
    let mut any = false;
    let style = TextStyle::new(14.0).colour(o.series.colour);
    for &(x, y) in &points {
        let (px, py) = f.pixel_at(x, y);
        if over(y) {
            any = true;
            let px = px as f32;
            c.arrow(
                (px, t as f32 + 30.0),
                (px, t as f32 + 5.0),
                o.series.colour,
                2.0,
            );
            // Right of the arrow, or left of it where the frame's edge
            // would cut the number (a review's "435" at the last point).
            let words = format!("{y:.prec$}", prec = o.decimals);
            let right = (f.rect.0 + f.rect.2) as f32 - 4.0;
            let x = if px + 7.0 + text::width(&words, &style) > right {
                px - 7.0 - text::width(&words, &style)
            } else {
                px + 7.0
            };
            text::draw(c, &words, x, t as f32 + 24.0, &style);
        } else if y >= lo && y <= hi {
            c.fill_circle(px as f32, py as f32, 1.0 + width, o.series.colour);
        }
    }
    any
}

/// Axis ranges rounded out to ticks, and the plot area.
fn plot_frame(plot: &LinePlot, params: &PlotParams) -> PlotFrame {
    let finite = |f: fn(&(f64, f64)) -> f64| -> Vec<f64> {
        plot.series
            .iter()
            .flat_map(|s| s.points.iter().map(f))
            .filter(|v| v.is_finite())
            .collect()
    };
    let x_range = if plot.x_categories.is_empty() {
        padded_range(&finite(|p| p.0), 0.0, X_TICKS)
    } else {
        (-0.5, plot.x_categories.len() as f64 - 0.5)
    };
    let mut ys = finite(|p| p.1);
    ys.extend(plot.whiskers.iter().flat_map(Whiskers::ends).map(|p| p.1));
    ys.extend(
        plot.y_band
            .iter()
            .flat_map(|b| [b.span.0, b.span.1])
            .filter(|v| v.is_finite()),
    );
    // An off-scale curve joins the axis when that at most doubles it;
    // otherwise the others keep the height (a drag band's top had squeezed
    // the estimates into 6 % of it).
    let extra: Vec<f64> = plot
        .off_scale
        .iter()
        .flat_map(|o| o.series.points.iter().map(|p| p.1))
        .filter(|v| v.is_finite())
        .collect();
    let span = |v: &[f64]| {
        let (lo, hi) = v
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), &x| {
                (l.min(x), h.max(x))
            });
        hi - lo
    };
    let all: Vec<f64> = ys.iter().chain(&extra).copied().collect();
    let y = if extra.is_empty() || span(&all) <= 2.0 * span(&ys).max(f64::MIN_POSITIVE) {
        padded_range(&all, 0.05, Y_RANGE_TICKS)
    } else {
        // Room at the top for the arrows of the points above it.
        let top = ys.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let room = top + 0.15 * span(&ys);
        padded_range(&[ys.as_slice(), &[room]].concat(), 0.05, Y_RANGE_TICKS)
    };
    let y = if y.1 - y.0 < plot.min_y_span {
        let mid = 0.5 * (y.0 + y.1);
        (mid - 0.5 * plot.min_y_span, mid + 0.5 * plot.min_y_span)
    } else {
        y
    };
    let y = match plot.y_from {
        Some(from) if all.iter().all(|&v| v >= from) => {
            let top = y.1.max(from + plot.min_y_span);
            (from, padded_range(&[from, top], 0.0, Y_RANGE_TICKS).1)
        }
        _ => y,
    };
    let y = plot
        .y_covers
        .map_or(y, |(lo, hi)| (y.0.min(lo), y.1.max(hi)));
    let y_range = if plot.invert_y { (y.1, y.0) } else { y };
    let rect = (
        110.0,
        120.0,
        f64::from(params.width) - 150.0,
        f64::from(params.height) - 210.0,
    );
    PlotFrame {
        rect,
        x_range,
        y_range,
    }
}

/// About how many ticks the x axis carries; its range ends on one of
/// them, so that a 4.4 m body's axis ends at 4.5 m, not 5 (a review).
const X_TICKS: usize = 8;

/// About how many ticks set the ends of the y axis's range.
const Y_RANGE_TICKS: usize = 6;

/// `[min, max]` of `v`, widened by `pad` of its span and rounded out to
/// the step of about `ticks` round ticks; `[0, 1]` for no data.
fn padded_range(v: &[f64], pad: f64, ticks: usize) -> (f64, f64) {
    let lo = v.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = v.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if !(lo.is_finite() && hi.is_finite()) {
        return (0.0, 1.0);
    }
    let (lo, hi) = if hi - lo < 1e-12 {
        (lo - 0.5, hi + 0.5)
    } else {
        (lo, hi)
    };
    let (lo, hi) = (lo - pad * (hi - lo), hi + pad * (hi - lo));
    let ticks = nice_ticks(lo, hi, ticks);
    let step = match ticks.as_slice() {
        [a, b, ..] => b - a,
        _ => hi - lo,
    };
    (
        (lo / step - 1e-9).floor() * step,
        (hi / step + 1e-9).ceil() * step,
    )
}

/// Grid lines and tick labels on both axes.
fn draw_grid_and_ticks(c: &mut Canvas, f: &PlotFrame, invert_y: bool, categories: &[String]) {
    let (l, t, w, h) = f.rect;
    let style = TextStyle::new(15.0);
    let xt = if categories.is_empty() {
        nice_ticks(f.x_range.0, f.x_range.1, X_TICKS)
    } else {
        (0..categories.len()).map(|k| k as f64).collect()
    };
    // A category's name no wider than its share of the axis (about 8.5
    // pixels a character at this size).
    let room = (w / categories.len().max(1) as f64 / 8.5).floor().max(4.0) as usize;
    for (k, &x) in xt.iter().enumerate() {
        let name = match categories.get(k) {
            Some(n) if n.chars().count() > room => {
                format!("{}…", n.chars().take(room - 1).collect::<String>())
            }
            Some(n) => n.clone(),
            None => tick_label(x, &xt),
        };
        let (px, _) = f.pixel_at(x, f.y_range.0);
        c.polyline(
            &[(px as f32, t as f32), (px as f32, (t + h) as f32)],
            GRID,
            1.0,
        );
        c.polyline(
            &[
                (px as f32, (t + h) as f32),
                (px as f32, (t + h + 6.0) as f32),
            ],
            INK,
            1.2,
        );
        text::draw(
            c,
            &name,
            px as f32,
            (t + h + 24.0) as f32,
            &style.align(Align::Centre),
        );
    }
    let (ylo, yhi) = if invert_y {
        (f.y_range.1, f.y_range.0)
    } else {
        f.y_range
    };
    let yt = nice_ticks(ylo, yhi, 7);
    for &y in &yt {
        let (_, py) = f.pixel_at(f.x_range.0, y);
        let colour = if y.abs() < 1e-12 {
            [170, 172, 178]
        } else {
            GRID
        };
        c.polyline(
            &[(l as f32, py as f32), ((l + w) as f32, py as f32)],
            colour,
            1.0,
        );
        c.polyline(
            &[((l - 6.0) as f32, py as f32), (l as f32, py as f32)],
            INK,
            1.2,
        );
        text::draw(
            c,
            &tick_label(y, &yt),
            (l - 10.0) as f32,
            (py + 5.0) as f32,
            &style.align(Align::Right),
        );
    }
}

/// A line's style at `size` pixels, made smaller (to 11 at least) to fit
/// `room` pixels: a sweep's subtitle had run off the picture, cut
/// mid-word.
fn fitted(line: &str, size: f32, room: f32) -> TextStyle {
    let full = TextStyle::new(size);
    let width = text::width(line, &full);
    if width <= room {
        full
    } else {
        TextStyle::new((size * room / width).max(11.0))
    }
}

/// The least size, points, a subtitle is drawn at on one line before it
/// takes two (our choice).
const SUBTITLE_LEAST: f32 = 14.0;

/// `line` cut at the space that best evens two lines at `size` within
/// `room` pixels (the second may still need [`fitted`] to shrink).
fn two_lines(line: &str, size: f32, room: f32) -> [String; 2] {
    let style = TextStyle::new(size);
    let spaces: Vec<usize> = line.match_indices(' ').map(|(i, _)| i).collect();
    let best = spaces
        .iter()
        .filter(|&&i| text::width(&line[..i], &style) <= room)
        .min_by(|&&a, &&b| {
            let uneven = |i: usize| {
                (text::width(&line[..i], &style) - text::width(&line[i + 1..], &style)).abs()
            };
            uneven(a).total_cmp(&uneven(b))
        });
    match best {
        Some(&i) => [line[..i].to_owned(), line[i + 1..].to_owned()],
        None => [line.to_owned(), String::new()],
    }
}

/// Title, subtitle and axis labels; true when the subtitle took two lines.
fn draw_labels(c: &mut Canvas, plot: &LinePlot, f: &PlotFrame) -> bool {
    let (l, t, w, h) = f.rect;
    let room = c.width() as f32 - 60.0;
    text::draw(
        c,
        &plot.title,
        30.0,
        44.0,
        &super::sheet::title_style(&plot.title, room),
    );
    // A subtitle too long for one line at a readable size takes two (a
    // review read the centre-line plot's at 11 points, and a sweep's cut
    // off at the right edge).
    let one = fitted(&plot.subtitle, 16.0, room);
    let two = one.size < SUBTITLE_LEAST;
    if !two {
        text::draw(c, &plot.subtitle, 30.0, 76.0, &one.colour(MUTED));
    } else {
        let lines = two_lines(&plot.subtitle, SUBTITLE_LEAST, room);
        for (line, y) in lines.iter().zip([68.0, 86.0]) {
            text::draw(
                c,
                line,
                30.0,
                y,
                &fitted(line, SUBTITLE_LEAST, room).colour(MUTED),
            );
        }
    }
    let axis = TextStyle::new(17.0).bold().align(Align::Centre);
    text::draw(
        c,
        &plot.x_label,
        (l + 0.5 * w) as f32,
        (t + h + 58.0) as f32,
        &axis,
    );
    text::draw_vertical(c, &plot.y_label, 30.0, (t + 0.5 * h) as f32, &axis);
    two
}

/// One legend entry: a series' line (with its width; true: it has arrows
/// above the axis too), or a shaded patch.
enum Key {
    Line(String, Rgb, f32, bool),
    Patch(String, Rgb),
    Whisker(String),
}

impl Key {
    fn name(&self) -> &str {
        match self {
            Key::Line(name, ..) | Key::Patch(name, _) | Key::Whisker(name) => name,
        }
    }
}

/// Legend box in the corner of the plot area that covers the fewest
/// points of the curves `series` (top right when several tie), so it
/// hides no data point where a corner is free.
fn draw_legend(
    c: &mut Canvas,
    keys: &[Key],
    series: &[Series],
    arrows: &[(f64, f64)],
    f: &PlotFrame,
) {
    if keys.is_empty() {
        return;
    }
    let style = TextStyle::new(15.0);
    let names: Vec<String> = keys.iter().map(|k| k.name().to_owned()).collect();
    let (bw, bh) = legend_size(&names);
    let (x, y) = legend_corner(series, arrows, f, (bw, bh));
    c.fill_rect(x, y, bw, bh, WHITE);
    c.stroke_rect(x, y, bw, bh, [180, 182, 188], 1.0);
    for (k, key) in keys.iter().enumerate() {
        let cy = y + 19.0 + 26.0 * k as f32;
        match *key {
            Key::Line(_, colour, width, arrow) => {
                c.polyline(&[(x + 12.0, cy), (x + 48.0, cy)], colour, width);
                c.fill_circle(x + 30.0, cy, 1.0 + width, colour);
                if arrow {
                    c.arrow((x + 44.0, cy + 4.0), (x + 44.0, cy - 10.0), colour, 1.6);
                }
            }
            Key::Patch(_, colour) => {
                c.fill_rect(x + 12.0, cy - 8.0, 36.0, 16.0, colour);
                c.stroke_rect(x + 12.0, cy - 8.0, 36.0, 16.0, [180, 182, 188], 1.0);
            }
            Key::Whisker(_) => {
                let (a, b) = (cy - 9.0, cy + 9.0);
                c.polyline(&[(x + 30.0, a), (x + 30.0, b)], MUTED, 1.6);
                for y in [a, b] {
                    c.polyline(
                        &[(x + 30.0 - WHISKER_CAP, y), (x + 30.0 + WHISKER_CAP, y)],
                        MUTED,
                        1.6,
                    );
                }
            }
        }
        text::draw(c, key.name(), x + 58.0, cy + 5.0, &style);
    }
}

/// The share of the plot area's height to add above the data for the
/// legend, when its box would cover a point in every corner; `None` when a
/// corner is clear or there is no legend. The keys as
/// [`draw_line_plot`] lists them (an off-scale curve's name as if it had
/// arrows).
fn legend_room(plot: &LinePlot, f: &PlotFrame) -> Option<f64> {
    let mut names: Vec<String> = plot
        .off_scale
        .iter()
        .map(|o| format!("{} (arrows: off the scale)", o.series.name))
        .collect();
    names.extend(plot.series.iter().map(|s| s.name.clone()));
    names.extend(
        plot.shading
            .iter()
            .filter(|sh| !sh.spans.is_empty())
            .map(|sh| sh.name.clone()),
    );
    names.extend(plot.y_band.iter().map(|b| b.name.clone()));
    names.extend(
        plot.whiskers
            .iter()
            .filter(|w| !w.bars.is_empty())
            .map(|w| w.name.clone()),
    );
    if names.len() < 2 {
        return None;
    }
    let size = legend_size(&names);
    let (_, covered) = legend_cover(&plot.series, &whisker_marks(plot, f), f, size);
    (covered > 0).then(|| ((f64::from(size.1) + 24.0) / f.rect.3).min(0.4))
}

/// The size of a legend box listing `names`, pixels.
fn legend_size(names: &[String]) -> (f32, f32) {
    let style = TextStyle::new(15.0);
    let text_w = names
        .iter()
        .map(|n| text::width(n, &style))
        .fold(0.0, f32::max);
    (text_w + 70.0, 12.0 + 26.0 * names.len() as f32)
}

/// The top-left corner of a legend box of size `(bw, bh)`: the corner of
/// the plot area whose box covers the fewest curve points and `marks`
/// (pixel positions, such as off-scale arrows), top right when several
/// tie.
fn legend_corner(
    series: &[Series],
    marks: &[(f64, f64)],
    f: &PlotFrame,
    size: (f32, f32),
) -> (f32, f32) {
    legend_cover(series, marks, f, size).0
}

/// [`legend_corner`]'s corner and how many points its box covers.
fn legend_cover(
    series: &[Series],
    marks: &[(f64, f64)],
    f: &PlotFrame,
    (bw, bh): (f32, f32),
) -> ((f32, f32), usize) {
    let (l, t, w, h) = (
        f.rect.0 as f32,
        f.rect.1 as f32,
        f.rect.2 as f32,
        f.rect.3 as f32,
    );
    let corners = [
        (l + w - bw - 12.0, t + 12.0),
        (l + 12.0, t + 12.0),
        (l + w - bw - 12.0, t + h - bh - 12.0),
        (l + 12.0, t + h - bh - 12.0),
    ];
    let covered = |&(x, y): &(f32, f32)| {
        series
            .iter()
            .flat_map(|s| &s.points)
            .filter(|p| p.0.is_finite() && p.1.is_finite())
            .map(|&(px, py)| f.pixel_at(px, py))
            .chain(marks.iter().copied())
            .filter(|&(px, py)| {
                let (px, py) = (px as f32, py as f32);
                (x - 8.0..=x + bw + 8.0).contains(&px) && (y - 8.0..=y + bh + 8.0).contains(&py)
            })
            .count()
    };
    // min_by_key keeps the first of equals: top right.
    corners
        .iter()
        .map(|c| (*c, covered(c)))
        .min_by_key(|&(_, n)| n)
        .unwrap_or((corners[0], 0))
}

/// Settings of the centre-line extraction.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct CentrelineParams {
    /// Half-width of the band about the centre plane whose panel centroids
    /// count, metres; `None` for the panels the centre plane cuts, each at
    /// the middle of its cut (large floor panels of a coarsened body have
    /// centroids far from the plane, so a band of a typical panel size
    /// misses them).
    pub band: Option<f64>,
}

/// The `y` of a body's centre plane: the symmetry plane `y = 0` of a half
/// model, otherwise the middle of the body's extent in `y` (a body need
/// not be placed on `y = 0`; a plane beside it would cut nothing).
pub fn centre_y(mesh: &tuft_mesh::PanelMesh) -> f64 {
    if mesh.mirrors.symmetry || mesh.is_empty() {
        return 0.0;
    }
    let (lo, hi) = mesh.bounds();
    0.5 * (lo.y + hi.y)
}

/// Cp along the centre line: `(x, Cp)` of the panels the centre plane
/// ([`centre_y`]) cuts, at the middle of the cut (or, with a band, of the
/// panels whose centroid lies within it, at the centroid), split by the
/// sign of the normal's z component into upper and lower surface, each
/// sorted by x. A panel facing up with other surface above it on the
/// plane (the roof under a roof box or a rear wing), or facing down with
/// surface below it (the box's underside), is in neither but in `under`
/// or `over` a part: a review's estate with bars and a box had its upper curve
/// zig-zag between roof, bar tops and box top, and the lower one through
/// the box's underside and the car's floor.
pub fn centreline_cp(s: &SurfaceResult<'_>, params: &CentrelineParams) -> Centreline {
    let y = centre_y(s.mesh);
    // Each cut panel: where it is cut (x, z at the middle), the cut's two
    // ends, Cp, whether separated and whether it faces up.
    let mut cuts = Vec::new();
    for (i, ((p, &cp), &state)) in s.mesh.panels.iter().zip(s.cp).zip(s.state).enumerate() {
        let ends = match params.band {
            Some(band) => ((p.centroid.y - y).abs() <= band).then(|| {
                let (lo, hi) = p
                    .vertices
                    .iter()
                    .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), v| {
                        (l.min(v.x), h.max(v.x))
                    });
                [(lo, p.centroid.z), (hi, p.centroid.z)]
            }),
            None => cut_ends(&p.vertices, y),
        };
        if let Some(ends) = ends {
            let mid = match params.band {
                Some(_) => (p.centroid.x, p.centroid.z),
                None => (0.5 * (ends[0].0 + ends[1].0), 0.5 * (ends[0].1 + ends[1].1)),
            };
            cuts.push((
                mid,
                ends,
                cp,
                state == PanelState::Separated,
                p.normal.z >= 0.0,
                p.normal.z.abs() < UPRIGHT_NZ,
                s.held.get(i).copied().unwrap_or(false),
            ));
        }
    }
    let (lo, hi) = s.mesh.bounds();
    let tol_z = 1e-3 * (hi.z - lo.z);
    // The height of a cut (ends sorted by x, apart) at `x`, when `x` lies
    // within it.
    let height_at = |ends: &[(f64, f64); 2], x: f64| {
        let [(x0, z0), (x1, z1)] = *ends;
        (x0..=x1)
            .contains(&x)
            .then(|| z0 + (z1 - z0) * (x - x0) / (x1 - x0))
    };
    let (mut upper, mut lower) = (Vec::new(), Vec::new());
    let (mut under, mut over) = (Vec::new(), Vec::new());
    // Covered: the nearest surface the way the panel faces, upright
    // surface aside, faces back at it, across air. Surface met from inside
    // the body does not count, nor an upright base's panels one above
    // another, facing up and down by round-off: a base's panel had read
    // "under a part" (a review's sports car).
    for (k, &((x, z), _, cp, separated, up, _, held)) in cuts.iter().enumerate() {
        let covered = cuts
            .iter()
            .enumerate()
            .filter(|&(j, c)| j != k && !c.5)
            .filter_map(|(_, c)| {
                let h = height_at(&c.1, x)?;
                let gap = if up { h - z } else { z - h };
                (gap > tol_z).then_some((gap, c.4))
            })
            .min_by(|a, b| a.0.total_cmp(&b.0))
            .is_some_and(|(_, faces_up)| faces_up != up);
        let side = match (covered, up) {
            (true, true) => &mut under,
            (true, false) => &mut over,
            (false, true) => &mut upper,
            (false, false) => &mut lower,
        };
        side.push((x, cp, separated, held && !separated));
    }
    for side in [&mut upper, &mut lower, &mut under, &mut over] {
        side.sort_by(|a, b| a.0.total_cmp(&b.0));
    }
    let points = |v: &[(f64, f64, bool, bool)]| v.iter().map(|p| (p.0, p.1)).collect();
    // The runs of one flag, as `(x, Cp, flag)` for [`separated_spans`].
    let spans = |v: &[(f64, f64, bool, bool)], held: bool| {
        let flagged: Vec<(f64, f64, bool)> = v
            .iter()
            .map(|p| (p.0, p.1, if held { p.3 } else { p.2 }))
            .collect();
        separated_spans(&flagged)
    };
    let mut held: Vec<(f64, f64)> = [&upper, &lower]
        .into_iter()
        .flat_map(|side| spans(side, true))
        .collect();
    held.sort_by(|a, b| a.0.total_cmp(&b.0));
    // Overlapping stretches of the two surfaces made one.
    let held = held
        .into_iter()
        .fold(Vec::<(f64, f64)>::new(), |mut out, (a, b)| {
            match out.last_mut() {
                Some(last) if a <= last.1 => last.1 = last.1.max(b),
                _ => out.push((a, b)),
            }
            out
        });
    Centreline {
        y,
        upper_separated: spans(&upper, false),
        lower_separated: spans(&lower, false),
        held,
        upper: points(&upper),
        lower: points(&lower),
        under: points(&under),
        over: points(&over),
    }
}

/// |n_z| under which a panel is upright for [`centreline_cp`]: it covers
/// no other (within 3 degrees of upright; our choice, well above a file's
/// single-precision round-off).
const UPRIGHT_NZ: f64 = 0.05;

/// The stretches of x of the runs of separated points of `(x, Cp,
/// separated)` sorted by x, each reaching halfway to the attached points
/// either side of it (to the last point at an end).
fn separated_spans(points: &[(f64, f64, bool)]) -> Vec<(f64, f64)> {
    let mut spans = Vec::new();
    let mut k = 0;
    while k < points.len() {
        if !points[k].2 {
            k += 1;
            continue;
        }
        let first = k;
        while k + 1 < points.len() && points[k + 1].2 {
            k += 1;
        }
        let from = match first.checked_sub(1) {
            Some(before) => 0.5 * (points[before].0 + points[first].0),
            None => points[first].0,
        };
        let to = match points.get(k + 1) {
            Some(after) => 0.5 * (points[k].0 + after.0),
            None => points[k].0,
        };
        spans.push((from, to));
        k += 1;
    }
    spans
}

/// Cp along the centre line, `(x [m], Cp)` pairs sorted by x, and where
/// its panels are separated.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Centreline {
    /// The centre plane's `y`, metres.
    pub y: f64,
    /// Panels whose normal points up (or sideways).
    pub upper: Vec<(f64, f64)>,
    /// Panels whose normal points down.
    pub lower: Vec<(f64, f64)>,
    /// Stretches of x `(from, to)` where the upper surface's panels are
    /// separated (each run of separated points reaching halfway to its
    /// attached neighbours).
    pub upper_separated: Vec<(f64, f64)>,
    /// The same for the lower surface.
    pub lower_separated: Vec<(f64, f64)>,
    /// Panels facing up with surface above them on the plane: under a
    /// part (the roof under a roof box).
    pub under: Vec<(f64, f64)>,
    /// Panels facing down with surface below them: over a part (the roof
    /// box's underside).
    pub over: Vec<(f64, f64)>,
    /// Stretches of x where the upper or lower surface's attached panels
    /// lie beside a sharp edge the flow leaves, their Cp held rather than
    /// computed ([`SurfaceResult::held`]), each reaching halfway to its
    /// neighbours as the separated ones do.
    pub held: Vec<(f64, f64)>,
}

/// The two ends `(x, z)` of the segment where the plane at `y` cuts a
/// triangle (edges that cross it, and corners on it); `None` when it does
/// not reach the plane or touches it at one corner only.
fn cut_ends(v: &[tuft_mesh::Point; 3], y: f64) -> Option<[(f64, f64); 2]> {
    let mut at = Vec::with_capacity(3);
    for k in 0..3 {
        let (a, b) = (v[k], v[(k + 1) % 3]);
        let (da, db) = (a.y - y, b.y - y);
        if da == 0.0 {
            at.push((a.x, a.z));
        } else if da * db < 0.0 {
            let t = da / (da - db);
            at.push((a.x + (b.x - a.x) * t, a.z + (b.z - a.z) * t));
        }
    }
    let lo = at.iter().copied().min_by(|p, q| p.0.total_cmp(&q.0))?;
    let hi = at.iter().copied().max_by(|p, q| p.0.total_cmp(&q.0))?;
    (hi.0 > lo.0).then_some([lo, hi])
}

/// The centre-line Cp plot.
///
/// # Errors
/// [`OutputError::LengthMismatch`] for fields of the wrong length.
pub fn centreline_cp_plot(
    s: &SurfaceResult<'_>,
    caption: &Caption,
) -> Result<(Canvas, PlotFrame), OutputError> {
    centreline_cp_plot_with_params(
        s,
        caption,
        &CentrelineParams::default(),
        &PlotParams::default(),
    )
}

/// Lowest Cp the centre-line plot's axis shows: a single panel at a sharp
/// edge or a sliver can read -40 in attached flow and would squash the
/// rest of the curve onto one line (our choice; suction peaks on smooth car
/// shapes stay above about -3, common practice).
pub const CP_AXIS_FLOOR: f64 = -4.0;

/// Clamp the points below [`CP_AXIS_FLOOR`] to it; how many there were and
/// the lowest value, if any.
fn clip_suction(points: &mut [(f64, f64)]) -> Option<(usize, f64)> {
    let mut out: Option<(usize, f64)> = None;
    for p in points.iter_mut().filter(|p| p.1 < CP_AXIS_FLOOR) {
        let (n, lowest) = out.unwrap_or((0, f64::INFINITY));
        out = Some((n + 1, lowest.min(p.1)));
        p.1 = CP_AXIS_FLOOR;
    }
    out
}

/// [`centreline_cp_plot`] with explicit band and size.
///
/// # Errors
/// As [`centreline_cp_plot`].
pub fn centreline_cp_plot_with_params(
    s: &SurfaceResult<'_>,
    caption: &Caption,
    params: &CentrelineParams,
    plot_params: &PlotParams,
) -> Result<(Canvas, PlotFrame), OutputError> {
    s.validate()?;
    let Centreline {
        y,
        mut upper,
        mut lower,
        upper_separated,
        lower_separated,
        mut under,
        mut over,
        held,
    } = centreline_cp(s, params);
    let clipped = [&mut upper, &mut lower, &mut under, &mut over]
        .into_iter()
        .filter_map(|side| clip_suction(side))
        .reduce(|a, b| (a.0 + b.0, a.1.min(b.1)));
    let plane = if s.mesh.mirrors.symmetry {
        "the symmetry plane y = 0".to_owned()
    } else {
        format!(
            "the plane y = {} m (middle of the body's width)",
            super::short_number(y)
        )
    };
    let mut none = if upper.is_empty() && lower.is_empty() {
        " No panel lies on this plane.".to_owned()
    } else {
        String::new()
    };
    if let Some((n, lowest)) = clipped {
        none += &format!(
            " {n} panels below Cp {CP_AXIS_FLOOR} (down to {}) drawn at {CP_AXIS_FLOOR}: a sharp edge or a poor panel.",
            super::short_number((lowest * 10.0).round() / 10.0)
        );
    }
    let (mut shading, note) =
        separated_shading(s.dead_water_cp, &upper_separated, &lower_separated);
    // The held stretch named in the legend: the note line above the plot
    // is full with the separated stretches.
    if !held.is_empty() {
        let bound = s
            .dead_water_cp
            .map(|cp| format!(" (no lower than Cp {cp:.2})"))
            .unwrap_or_default();
        shading.push(Shading {
            spans: held,
            name: format!("beside a sharp edge: Cp held{bound}, not computed"),
            colour: HELD_GREY,
            rows: HELD_ROWS,
        });
    }
    let between_words = if under.is_empty() && over.is_empty() {
        ""
    } else {
        " Under a part: facing up with more of the body above it (a roof under a box); over a part: \
         facing down with more of the body below it."
    };
    let mut series = vec![
        Series {
            name: "upper surface".to_owned(),
            points: upper,
            colour: SERIES_COLOURS[0],
        },
        Series {
            name: "lower surface".to_owned(),
            points: lower,
            colour: SERIES_COLOURS[1],
        },
    ];
    for (name, points, colour) in [
        ("under a part", under, SERIES_COLOURS[2]),
        ("over a part", over, SERIES_COLOURS[3]),
    ] {
        if !points.is_empty() {
            series.push(Series {
                name: name.to_owned(),
                points,
                colour,
            });
        }
    }
    let plot = LinePlot {
        title: caption.title("Centre-line pressure"),
        subtitle: format!(
            "Panels on {plane}; upper surface: normal pointing up, nothing above it.{between_words} \
             Cp axis inverted: suction up.{none}"
        ),
        x_label: "x [m] (downstream)".to_owned(),
        y_label: "Cp [-]".to_owned(),
        invert_y: true,
        // From the stagnation's 1 to a suction a car's body reaches.
        y_covers: Some((-1.5, 1.0)),
        series,
        shading,
        note,
        ..LinePlot::default()
    };
    draw_line_plot(&plot, plot_params)
}

/// The separated stretches of the centre line, each surface's shaded in a
/// light tint of its curve's colour, with the note saying where and what
/// their Cp is: the dead water's one assumed pressure, or (`None`) the
/// attached flow's or the plateau model's, no pressure of the separated
/// flow.
fn separated_shading(
    dead_water_cp: Option<f64>,
    upper: &[(f64, f64)],
    lower: &[(f64, f64)],
) -> (Vec<Shading>, String) {
    let at = |spans: &[(f64, f64)]| {
        spans
            .iter()
            .map(|(a, b)| format!("{a:.2}-{b:.2}"))
            .collect::<Vec<_>>()
            .join(", ")
    };
    let (short, what) = match dead_water_cp {
        Some(cp) => (
            "assumed Cp (dead water)",
            format!("one assumed pressure, the dead water's Cp {cp:.2}, not a computed one"),
        ),
        None => (
            "no computed Cp",
            "the attached flow's or the plateau model's, not a computed pressure of the separated flow"
                .to_owned(),
        ),
    };
    let mut shading = Vec::new();
    let mut sides = Vec::new();
    // Both surfaces separated: the upper's in the top half, the lower's in
    // the bottom half, so that neither mixes into a colour the legend does
    // not show (a review read the overlap of two full-height tints as a
    // third kind).
    let both = !upper.is_empty() && !lower.is_empty();
    for (side, spans, colour, rows, half) in [
        (
            "upper surface",
            upper,
            SERIES_COLOURS[0],
            (0.0, 0.5),
            " (top half)",
        ),
        (
            "lower surface",
            lower,
            SERIES_COLOURS[1],
            (0.5, 1.0),
            " (bottom half)",
        ),
    ] {
        if spans.is_empty() {
            continue;
        }
        let half = if both { half } else { "" };
        sides.push(format!("{side}{half} at x {} m", at(spans)));
        shading.push(Shading {
            spans: spans.to_vec(),
            name: format!("{side} separated: {short}"),
            colour: tint(colour, SEPARATED_TINT),
            rows: if both { rows } else { (0.0, 1.0) },
        });
    }
    let note = if sides.is_empty() {
        String::new()
    } else {
        format!(
            "Shaded: separated, {}; there the curve's Cp is {what}.",
            sides.join(", ")
        )
    };
    (shading, note)
}

/// The strip along the foot of the centre-line plot that marks where the
/// attached Cp is held beside a sharp edge: a grey no curve uses, over
/// the bottom 6 % of the plot's height (a review read the bonnet's
/// leading edge off the curve with nothing saying its value was held).
const HELD_GREY: Rgb = [200, 200, 200];
const HELD_ROWS: (f64, f64) = (0.94, 1.0);

/// How much of a curve's colour its separated stretches' tint takes.
const SEPARATED_TINT: f64 = 0.16;

/// `colour` mixed with white, `share` of it kept.
fn tint(colour: Rgb, share: f64) -> Rgb {
    colour.map(|c| (255.0 - share * (255.0 - f64::from(c))).round() as u8)
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;
    use crate::output::canvas::testing::{decode, keep};
    use crate::output::fixture::{Fixture, caption};

    /// A subtitle too long for one line at a readable size is cut at a
    /// space into two lines that each fit, about even.
    #[test]
    fn a_long_subtitle_takes_two_lines() {
        let long = "Panels on the plane y = 0 m (middle of the body's width); upper surface: normal \
                    pointing up, nothing above it. Under a part: facing up with more of the body above \
                    it (a roof under a box); over a part: facing down with more of the body below it. \
                    Cp axis inverted: suction up.";
        let room = 1340.0;
        assert!(fitted(long, 16.0, room).size < SUBTITLE_LEAST);
        let [a, b] = two_lines(long, SUBTITLE_LEAST, room);
        assert_eq!(format!("{a} {b}"), long);
        let style = TextStyle::new(SUBTITLE_LEAST);
        let (wa, wb) = (text::width(&a, &style), text::width(&b, &style));
        assert!(wa <= room && wb <= room, "{wa} {wb}");
        assert!((wa - wb).abs() < 0.2 * room, "{wa} {wb}");
    }

    /// The x axis ends on the grid's own step: a 4.4 m body's at 4.5 m,
    /// not 5 (a review).
    #[test]
    fn the_x_axis_ends_at_the_next_grid_line() {
        let (lo, hi) = padded_range(&[0.001, 4.4], 0.0, X_TICKS);
        assert!(lo.abs() < 1e-12 && (hi - 4.5).abs() < 1e-12, "{lo} {hi}");
    }

    /// A least span keeps a spread within the noise from filling the
    /// axis (a review's sweep: drag 2-4 counts apart read as an optimum).
    #[test]
    fn a_least_span_holds_the_axis_open() {
        let plot = |min_y_span: f64| LinePlot {
            series: vec![Series {
                name: "drag".into(),
                points: vec![(0.0, 120.0), (1.0, 122.0), (2.0, 124.0)],
                colour: INK,
            }],
            min_y_span,
            ..LinePlot::default()
        };
        let params = PlotParams::default();
        let (lo, hi) = plot_frame(&plot(24.0), &params).y_range;
        assert!(hi - lo >= 24.0 && lo < 120.0 && hi > 124.0, "{lo} {hi}");
        let (lo, hi) = plot_frame(&plot(0.0), &params).y_range;
        assert!(hi - lo < 10.0, "{lo} {hi}");
    }

    /// A magnitude's axis starts at its zero (a review read 1.6 to 2.3
    /// m^2 on an axis from 1.5 as fivefold; a share's reached -10 %),
    /// unless a value lies below it.
    #[test]
    fn a_magnitude_axis_starts_at_zero() {
        let plot = |points: Vec<(f64, f64)>, min_y_span: f64| LinePlot {
            series: vec![Series {
                name: "separated".into(),
                points,
                colour: INK,
            }],
            min_y_span,
            y_from: Some(0.0),
            ..LinePlot::default()
        };
        let params = PlotParams::default();
        let (lo, hi) = plot_frame(&plot(vec![(0.0, 1.6), (1.0, 2.3)], 0.0), &params).y_range;
        assert!(lo == 0.0 && (2.3..3.0).contains(&hi), "{lo} {hi}");
        let (lo, hi) = plot_frame(&plot(vec![(0.0, 0.0), (1.0, 8.0)], 10.0), &params).y_range;
        assert!(lo == 0.0 && hi >= 10.0, "{lo} {hi}");
        let (lo, _) = plot_frame(&plot(vec![(0.0, -1.0), (1.0, 8.0)], 10.0), &params).y_range;
        assert!(lo < -1.0, "{lo}");
    }

    /// A band of y (a sweep's lowest drag and the noise floor above it)
    /// is tinted across the plot, widens the axis to its ends and has a
    /// legend entry; outside it the plot stays white.
    #[test]
    fn a_y_band_is_tinted_across_the_plot() {
        let plot = LinePlot {
            series: vec![
                Series {
                    name: "band, low end".into(),
                    points: vec![(0.0, 170.0), (1.0, 171.0)],
                    colour: MUTED,
                },
                Series {
                    name: "estimate".into(),
                    points: vec![(0.0, 186.0), (1.0, 179.0)],
                    colour: INK,
                },
            ],
            y_band: Some(YBand {
                span: (179.0, 195.0),
                name: "within the noise floor".into(),
                colour: [200, 240, 200],
            }),
            ..LinePlot::default()
        };
        let (c, f) = draw_line_plot(&plot, &PlotParams::default()).unwrap();
        assert!(f.y_range.1 >= 195.0, "{:?}", f.y_range);
        // Between grid lines, left of the points: tinted inside, white
        // outside.
        let at = |y: f64| {
            let (px, py) = f.pixel_at(f.x_range.0, y);
            c.pixel(px.round() as i64 + 30, py.round() as i64)
        };
        let inside = at(192.3);
        assert!(inside[1] > inside[0] + 20, "{inside:?}");
        let outside = at(175.3);
        assert_eq!(outside, [255, 255, 255]);
    }

    /// Whiskers widen the axis to their ends and are drawn in their
    /// colour between them.
    #[test]
    fn whiskers_reach_their_ends() {
        let colour = [200, 30, 30];
        let plot = LinePlot {
            series: vec![Series {
                name: "drag".into(),
                points: vec![(0.0, 120.0), (1.0, 122.0)],
                colour: INK,
            }],
            whiskers: Some(Whiskers {
                name: "panel noise".into(),
                bars: vec![(0.0, 100.0, 140.0, colour), (1.0, 121.0, 123.0, colour)],
            }),
            ..LinePlot::default()
        };
        let (c, f) = draw_line_plot(&plot, &PlotParams::default()).unwrap();
        let (lo, hi) = f.y_range;
        assert!(lo <= 100.0 && hi >= 140.0, "{lo} {hi}");
        // The bar's thin line, smoothed: its reddest pixel across it.
        for y in [105.0, 135.0] {
            let (px, py) = f.pixel_at(0.0, y);
            let reddest = (-1..=1)
                .map(|d| c.pixel(px.round() as i64 + d, py.round() as i64))
                .map(|p| i32::from(p[0]) - i32::from(p[1]))
                .max();
            assert!(reddest > Some(100), "at {y}: {reddest:?}");
        }
        // Nothing red beyond the bar's ends.
        let (px, py) = f.pixel_at(0.0, 95.0);
        if py < f.rect.1 + f.rect.3 {
            let p = c.pixel(px.round() as i64, py.round() as i64);
            assert!(i32::from(p[0]) - i32::from(p[1]) < 50, "{p:?}");
        }
    }

    /// Panels held beside a sharp edge (the loop's rim zone) make the
    /// centre line's held stretches, the two surfaces' merged, none where
    /// nothing is held; a held flag per panel or none.
    #[test]
    fn the_centre_line_marks_where_its_pressure_is_held() {
        let f = Fixture::sphere(3);
        let s = f.surface();
        // The front cap, x < -0.6 of the unit sphere, attached there.
        let held: Vec<bool> = f.mesh.panels.iter().map(|p| p.centroid.x < -0.6).collect();
        assert!(
            held.iter()
                .zip(s.state)
                .any(|(&h, &st)| h && st != PanelState::Separated)
        );
        let with = SurfaceResult { held: &held, ..s };
        let c = centreline_cp(&with, &CentrelineParams::default());
        assert_eq!(c.held.len(), 1, "{:?}", c.held);
        let (from, to) = c.held[0];
        // From the nose to about x -0.6 (halfway between the cuts either
        // side of the cap's edge).
        assert!(from < -0.9 && (-0.7..-0.3).contains(&to), "{from} {to}");
        assert!(
            centreline_cp(&s, &CentrelineParams::default())
                .held
                .is_empty()
        );
        assert!(centreline_cp_plot(&with, &caption()).is_ok());
        let short = SurfaceResult {
            held: &held[1..],
            ..s
        };
        assert!(matches!(
            centreline_cp_plot(&short, &caption()),
            Err(OutputError::LengthMismatch { field: "held", .. })
        ));
    }

    #[test]
    fn centre_line_follows_lambs_sphere() {
        // Lamb (Hydrodynamics, §92) on the plane y = 0 of a unit sphere:
        // Cp = 1 - 9/4 (1 - x^2) with x the centroid direction's x. The
        // extraction must return those panels, both surfaces, nose to tail.
        let f = Fixture::sphere(3);
        let Centreline { upper, lower, .. } =
            centreline_cp(&f.surface(), &CentrelineParams::default());
        assert!(
            upper.len() >= 16 && lower.len() >= 16,
            "{} {}",
            upper.len(),
            lower.len()
        );
        for &(x, cp) in upper.iter().chain(&lower) {
            // Centroids sit 1 % inside the unit sphere at this level, and
            // within the band |y| is small: |x| error < 0.02 (derived).
            let exact = 1.0 - 2.25 * (1.0 - x * x);
            assert!((cp - exact).abs() < 0.12, "x {x}: {cp} vs {exact}");
        }
        assert!(upper.windows(2).all(|w| w[0].0 <= w[1].0));
        assert!(upper.windows(2).all(|w| w[0].0 <= w[1].0));
        // One body: nothing is under or over another part.
        let c = centreline_cp(&f.surface(), &CentrelineParams::default());
        assert!(c.under.is_empty() && c.over.is_empty(), "{c:?}");
    }

    /// A fixture on `body` in free air with every field flat: Cp 0, the
    /// stream along x, a turbulent layer.
    fn flat_fields(body: tuft_mesh::TriMesh) -> Fixture {
        let mut f = Fixture::sphere(3);
        f.mesh = tuft_mesh::PanelMesh::new(body, tuft_mesh::Mirrors::none()).unwrap();
        let n = f.mesh.len();
        f.cp = vec![0.0; n];
        f.velocity = vec![nalgebra::Vector3::x(); n];
        for field in [&mut f.theta, &mut f.shape_factor, &mut f.cf, &mut f.risk] {
            *field = vec![0.0; n];
        }
        f.state = vec![PanelState::Turbulent; n];
        f
    }

    /// A small sphere above a large one, as a roof box over a roof: the
    /// large sphere's top under the small one is "under a part", the small
    /// one's underside "over a part", and the upper and lower curves keep
    /// only the outer surfaces (a review's estate with a roof box had its
    /// upper curve zig-zag between roof and box top).
    #[test]
    fn a_part_above_the_body_splits_off_the_surfaces_between() {
        let mut top = tuft_mesh::generate::icosphere(0.3, 3);
        top.map_vertices(|p| p + nalgebra::Vector3::new(0.0, 0.0, 1.5));
        let both = tuft_mesh::generate::icosphere(1.0, 3).joined(&top);
        let f = flat_fields(both);
        let c = centreline_cp(&f.surface(), &CentrelineParams::default());
        // The large sphere's top within the small one's shadow (|x| under
        // 0.3, less a panel) is under it; the small one's underside over it.
        assert!(c.under.len() >= 4 && c.over.len() >= 4, "{c:?}");
        assert!(
            c.under.iter().chain(&c.over).all(|p| p.0.abs() < 0.3),
            "{c:?}"
        );
        // The upper curve: the large sphere's top outside the shadow and
        // the small one's top; the lower: the large sphere's underside.
        assert!(c.upper.iter().any(|p| p.0.abs() < 0.1), "{c:?}");
        assert!(c.upper.iter().any(|p| p.0.abs() > 0.5), "{c:?}");
        assert!(c.lower.iter().all(|p| p.0.abs() <= 1.0), "{c:?}");
        let plain = centreline_cp(&Fixture::sphere(3).surface(), &CentrelineParams::default());
        let xs = |v: &[(f64, f64)]| v.iter().map(|p| p.0).collect::<Vec<_>>();
        assert_eq!(xs(&c.lower), xs(&plain.lower));
    }

    /// One body with an upright base and a level deck and floor (the
    /// slant-back body, square back): nothing is under or over a part,
    /// though the base's panels stand one above another, the deck above
    /// the lowest of them (a review's sports car had one base panel
    /// "under a part").
    #[test]
    fn an_upright_base_is_no_part() {
        for slant in [0.0, 25.0] {
            let mut body = tuft_mesh::generate::ahmed(slant, 3000).unwrap();
            // The base's corners a micrometre either way of upright, as a
            // file's single precision leaves them, so that the centre plane
            // cuts its panels (an exactly upright one is cut edge-on).
            let (_, hi) = body.bounds().unwrap();
            for (k, v) in body.vertices.iter_mut().enumerate() {
                if (v.x - hi.x).abs() < 1e-9 {
                    v.x += 1e-6 * ((k % 3) as f64 - 1.0);
                }
            }
            let f = flat_fields(body);
            let c = centreline_cp(&f.surface(), &CentrelineParams::default());
            assert!(
                c.under.is_empty() && c.over.is_empty(),
                "{slant}: under {:?}, over {:?}",
                c.under,
                c.over
            );
            assert!(c.upper.len() > 10 && c.lower.len() > 10, "{c:?}");
        }
    }

    /// The legend goes to the first corner (top right, top left, bottom
    /// right, bottom left) whose box covers no curve point: a rising line
    /// fills the top right and bottom left, so the box goes top left.
    #[test]
    fn the_legend_keeps_clear_of_the_points() {
        let line = |name: &str, points: Vec<(f64, f64)>| Series {
            name: name.into(),
            points,
            colour: [0, 0, 0],
        };
        let rising: Vec<(f64, f64)> = (0..=20).map(|k| (f64::from(k), f64::from(k))).collect();
        let plot = LinePlot {
            title: "t".into(),
            subtitle: String::new(),
            x_label: "x".into(),
            y_label: "y".into(),
            invert_y: false,
            series: vec![line("a", rising.clone()), line("b", rising)],
            ..LinePlot::default()
        };
        let frame = plot_frame(&plot, &PlotParams::default());
        // The line along the whole diagonal of the drawn range.
        let ((x0, x1), (y0, y1)) = (frame.x_range, frame.y_range);
        let diagonal: Vec<(f64, f64)> = (0..=50)
            .map(|k| f64::from(k) / 50.0)
            .map(|f| (x0 + f * (x1 - x0), y0 + f * (y1 - y0)))
            .collect();
        let (x, y) = legend_corner(&[line("a", diagonal)], &[], &frame, (200.0, 64.0));
        let (l, t) = (frame.rect.0 as f32, frame.rect.1 as f32);
        assert!(
            (x - (l + 12.0)).abs() < 1e-3 && (y - (t + 12.0)).abs() < 1e-3,
            "{x} {y}"
        );
        // Nothing in the way: top right.
        let flat = LinePlot {
            series: vec![
                line("a", vec![(0.0, 0.0), (20.0, 0.0)]),
                line("b", vec![(0.0, 0.1), (20.0, 0.1)]),
            ],
            ..plot
        };
        let frame = plot_frame(&flat, &PlotParams::default());
        let (x, _) = legend_corner(&flat.series, &[], &frame, (200.0, 64.0));
        assert!(x > (frame.rect.0 + 0.5 * frame.rect.2) as f32, "{x}");
    }

    /// Points in every corner (four categories, each with a point at the
    /// top and the bottom): the plot makes room above them, and the
    /// legend covers none (a review's region plot hid a point at 99 %).
    #[test]
    fn the_legend_gets_room_when_every_corner_is_taken() {
        let series = |name: &str, y: f64| Series {
            name: name.into(),
            points: (0..4).map(|k| (f64::from(k), y)).collect(),
            colour: [0, 0, 0],
        };
        let plot = LinePlot {
            series: vec![
                series("tailgate", 99.0),
                series("roof", 1.0),
                series("flank behind mirror", 0.5),
                series("floor", 0.0),
            ],
            x_categories: ["none", "block", "mirrors", "pods"]
                .map(String::from)
                .to_vec(),
            ..LinePlot::default()
        };
        let bare = plot_frame(&plot, &PlotParams::default());
        let names: Vec<String> = plot.series.iter().map(|s| s.name.clone()).collect();
        let size = legend_size(&names);
        let cover = legend_cover(&plot.series, &[], &bare, size);
        assert!(cover.1 > 0, "{size:?} {cover:?} {bare:?}");
        let (_, frame) = draw_line_plot(&plot, &PlotParams::default()).unwrap();
        assert!(frame.y_range.1 > bare.y_range.1);
        assert_eq!(
            legend_cover(&plot.series, &[], &frame, legend_size(&names)).1,
            0
        );
    }

    #[test]
    fn plot_draws_suction_peak_at_the_top() {
        let f = Fixture::sphere(3);
        let (canvas, frame) = centreline_cp_plot(&f.surface(), &caption()).unwrap();
        let png = canvas.to_png().unwrap();
        keep("centreline.png", &png);
        let img = decode(&png);
        assert_eq!((img.width, img.height), (1400, 800));
        assert!(img.distinct_colours() > 50);
        // Inverted axis: Cp = -1.25 (Lamb's minimum) plots above Cp = 1.
        let (_, y_min) = frame.pixel_at(0.0, -1.25);
        let (_, y_stag) = frame.pixel_at(-1.0, 1.0);
        assert!(y_min < y_stag);
        // The upper-surface curve passes through the suction peak: a pixel
        // of its colour within 6 px of (0, -1.25).
        let (px, py) = frame.pixel_at(0.0, -1.25);
        let near = (-6..=6)
            .flat_map(|dx| (-6..=6).map(move |dy| (dx, dy)))
            .any(|(dx, dy)| img.pixel(px as i64 + dx, py as i64 + dy) == SERIES_COLOURS[0]);
        assert!(near);
        // The lower surface, drawn wider underneath with larger markers,
        // shows beside it (its points at x = +-0.067 are 30-odd pixels off).
        let lower = (-40..=40)
            .flat_map(|dx| (-8..=8).map(move |dy| (dx, dy)))
            .any(|(dx, dy)| img.pixel(px as i64 + dx, py as i64 + dy) == SERIES_COLOURS[1]);
        assert!(lower);
    }

    /// One panel at Cp -41 (a sliver at a sharp edge) no longer sets the
    /// axis: Lamb's curve keeps its height and the note says what was cut.
    #[test]
    fn a_single_suction_spike_does_not_squash_the_curve() {
        let mut f = Fixture::sphere(3);
        let (_, calm) = centreline_cp_plot(&f.surface(), &caption()).unwrap();
        let spike = (0..f.mesh.len())
            .find(|&t| {
                let c = f.mesh.panels[t].centroid;
                c.y.abs() < 0.05 && c.z > 0.5
            })
            .unwrap();
        f.cp[spike] = -41.0;
        let (_, frame) = centreline_cp_plot(&f.surface(), &caption()).unwrap();
        let lowest_shown = |f: &PlotFrame| f.y_range.0.min(f.y_range.1);
        assert!(
            lowest_shown(&frame) >= CP_AXIS_FLOOR - 1.0,
            "{:?}",
            frame.y_range
        );
        assert!(lowest_shown(&frame) < lowest_shown(&calm));
        let c = centreline_cp(&f.surface(), &CentrelineParams::default());
        let (n, lowest) = {
            let (mut u, mut l) = (c.upper, c.lower);
            let a = clip_suction(&mut u).unwrap_or((0, 0.0));
            let b = clip_suction(&mut l).unwrap_or((0, 0.0));
            (a.0 + b.0, a.1.min(b.1))
        };
        assert_eq!((n, lowest), (1, -41.0));
    }

    #[test]
    fn centre_line_of_a_body_off_y_zero_cuts_its_middle() {
        // The same sphere moved 3 m along +y: the centre line is cut through
        // the middle of its width and finds the same panels with Lamb's Cp
        // (Hydrodynamics, §92) as the sphere on y = 0; the picture says
        // which plane.
        let on_axis = Fixture::sphere(3);
        let mut moved = Fixture::sphere(3);
        let mut tri = tuft_mesh::generate::icosphere(1.0, 3);
        tri.vertices.iter_mut().for_each(|v| v.y += 3.0);
        moved.mesh = tuft_mesh::PanelMesh::new(tri, tuft_mesh::Mirrors::none()).unwrap();
        let params = CentrelineParams::default();
        let here = centreline_cp(&on_axis.surface(), &params);
        let there = centreline_cp(&moved.surface(), &params);
        // Vertices of a sphere symmetric about y = 0: the middle is 3.
        assert!((there.y - 3.0).abs() < 1e-9, "{}", there.y);
        assert_eq!(here.y, 0.0);
        assert_eq!(
            (there.upper.len(), there.lower.len()),
            (here.upper.len(), here.lower.len())
        );
        assert!(!there.upper.is_empty());
        for &(x, cp) in there.upper.iter().chain(&there.lower) {
            // As in centre_line_follows_lambs_sphere.
            let exact = 1.0 - 2.25 * (1.0 - x * x);
            assert!((cp - exact).abs() < 0.12, "x {x}: {cp} vs {exact}");
        }
    }

    /// A curve far above the others (a drag band's top, some 230 counts
    /// over the estimates) leaves the axis to them and is drawn as arrows
    /// at the top edge; one close to them joins the axis.
    #[test]
    fn a_far_curve_is_drawn_off_the_scale() {
        let line = |name: &str, ys: [f64; 4], colour: Rgb| Series {
            name: name.into(),
            points: [16.0, 22.0, 28.0, 34.0].into_iter().zip(ys).collect(),
            colour,
        };
        let grey = [150, 150, 150];
        let top = line("band, high end", [379.0, 380.0, 386.0, 403.0], grey);
        let plot = LinePlot {
            title: "t".into(),
            x_label: "x".into(),
            y_label: "y".into(),
            series: vec![
                line("band, low end", [155.2, 140.9, 146.0, 162.8], grey),
                line("estimate", [160.9, 145.8, 148.9, 167.9], SERIES_COLOURS[0]),
            ],
            off_scale: Some(OffScale {
                series: top.clone(),
                note: "Arrows: the band's high end.".into(),
                decimals: 0,
            }),
            ..LinePlot::default()
        };
        let (canvas, frame) = draw_line_plot(&plot, &PlotParams::default()).unwrap();
        let png = canvas.to_png().unwrap();
        keep("off-scale.png", &png);
        let img = decode(&png);
        // The estimates and low ends fill most of the height.
        let (lo, hi) = frame.y_range;
        assert!(lo >= 130.0 && hi <= 180.0, "{:?}", frame.y_range);
        assert!((167.9 - 140.9) / (hi - lo) > 0.6, "{:?}", frame.y_range);
        // An arrow in the band's grey at the top edge above each x.
        let t = frame.rect.1 as i64;
        for x in [16.0, 22.0, 28.0, 34.0] {
            let (px, _) = frame.pixel_at(x, lo);
            let grey_near = (t..t + 30)
                .flat_map(|y| (-2..=2).map(move |dx| (px as i64 + dx, y)))
                .filter(|&(x, y)| img.pixel(x, y) == grey)
                .count();
            assert!(grey_near > 10, "x {x}: {grey_near}");
        }
        // Close to the others, the same curve sets the axis with them.
        let near = LinePlot {
            off_scale: Some(OffScale {
                series: line("band, high end", [170.0, 150.0, 152.0, 175.0], grey),
                note: String::new(),
                decimals: 0,
            }),
            ..plot
        };
        let (_, frame) = draw_line_plot(&near, &PlotParams::default()).unwrap();
        assert!(frame.y_range.1 >= 175.0, "{:?}", frame.y_range);
    }

    /// The stretches of the centre line whose panels are separated (the
    /// fixture's 0.5 < x < 0.93) are shaded in the curve's tint, the rest
    /// not; the legend and the note say what their Cp is.
    #[test]
    fn separated_stretches_of_the_centre_line_are_shaded() {
        let mut f = Fixture::sphere(3);
        let c = centreline_cp(&f.surface(), &CentrelineParams::default());
        for spans in [&c.upper_separated, &c.lower_separated] {
            assert_eq!(spans.len(), 1, "{spans:?}");
            let (a, b) = spans[0];
            assert!(
                (0.4..0.6).contains(&a) && (0.85..1.0).contains(&b),
                "{a} {b}"
            );
        }
        let dead = -0.15;
        for (cp, state) in f.cp.iter_mut().zip(&f.state) {
            if *state == PanelState::Separated {
                *cp = dead;
            }
        }
        let mut s = f.surface();
        s.dead_water_cp = Some(dead);
        let (canvas, frame) = centreline_cp_plot(&s, &caption()).unwrap();
        let png = canvas.to_png().unwrap();
        keep("centreline-separated.png", &png);
        let img = decode(&png);
        let (t, h) = (frame.rect.1, frame.rect.3);
        // Near the bottom of the plot area, clear of curves and legend.
        let y = (t + 0.9 * h) as i64;
        let at = |x: f64| img.pixel(frame.pixel_at(x, 0.0).0 as i64, y);
        // Both surfaces separated there: the lower surface's tint in the
        // bottom half, the upper's in the top half, never mixed.
        assert_eq!(at(0.7), tint(SERIES_COLOURS[1], SEPARATED_TINT));
        assert_eq!(at(-0.55), WHITE);
        let px = frame.pixel_at(0.7, 0.0).0 as i64;
        let top: Vec<Rgb> = ((t + 0.25 * h) as i64..(t + 0.45 * h) as i64)
            .map(|y| img.pixel(px, y))
            .collect();
        let upper = tint(SERIES_COLOURS[0], SEPARATED_TINT);
        assert!(
            top.iter().filter(|&&p| p == upper).count() > top.len() / 2,
            "{top:?}"
        );
        let (shading, note) = separated_shading(Some(dead), &c.upper_separated, &c.lower_separated);
        assert_eq!(shading.len(), 2);
        assert_eq!(
            shading[0].name,
            "upper surface separated: assumed Cp (dead water)"
        );
        assert!(
            note.contains("one assumed pressure, the dead water's Cp -0.15")
                && note.contains("upper surface (top half) at x"),
            "{note}"
        );
        let (_, note) = separated_shading(None, &c.upper_separated, &[]);
        assert!(note.contains("not a computed pressure"), "{note}");
        assert!(!note.contains("lower"), "{note}");
    }
}
