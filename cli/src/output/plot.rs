//! Line plots with axes, ticks, grid, legend and title; among them the
//! pressure coefficient along the centre line (upper and lower surface),
//! drawn with the Cp axis inverted (suction up), as the trade reads it.

use super::canvas::{Canvas, GRID, INK, MUTED, Rgb, WHITE};
use super::colorbar::{nice_ticks, tick_label};
use super::text::{self, Align, TextStyle};
use super::{Caption, OutputError, SurfaceResult};

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

/// A plot to draw.
#[derive(Debug, Clone, PartialEq)]
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
/// common colour-vision deficiencies), then a green and a purple.
pub const SERIES_COLOURS: [Rgb; 4] = [[31, 90, 166], [222, 110, 20], [44, 140, 80], [120, 70, 160]];

/// Draw a line plot.
///
/// # Errors
/// [`OutputError::PictureSize`] for an unusable size.
pub fn draw_line_plot(
    plot: &LinePlot,
    params: &PlotParams,
) -> Result<(Canvas, PlotFrame), OutputError> {
    let mut c = Canvas::new(params.width, params.height)?;
    let frame = plot_frame(plot, params);
    draw_grid_and_ticks(&mut c, &frame, plot.invert_y);
    // Later series are drawn first and wider, so curves that coincide
    // (a symmetric body's upper and lower surface) both stay visible.
    for (k, s) in plot.series.iter().enumerate().rev() {
        let width = 2.2 + 1.8 * k as f32;
        let pts: Vec<(f32, f32)> = s
            .points
            .iter()
            .filter(|p| p.0.is_finite() && p.1.is_finite())
            .map(|&(x, y)| frame.pixel_at(x, y))
            .map(|(x, y)| (x as f32, y as f32))
            .collect();
        c.polyline(&pts, s.colour, width);
        for &(x, y) in &pts {
            c.fill_circle(x, y, 1.0 + width, s.colour);
        }
    }
    let (l, t, w, h) = frame.rect;
    c.stroke_rect(l as f32, t as f32, w as f32, h as f32, INK, 1.2);
    draw_labels(&mut c, plot, &frame);
    // One line needs no key (and its box could hide a point).
    if plot.series.len() > 1 {
        draw_legend(&mut c, &plot.series, &frame);
    }
    Ok((c, frame))
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
    let x_range = padded_range(&finite(|p| p.0), 0.0);
    let y = padded_range(&finite(|p| p.1), 0.05);
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

/// `[min, max]` of `v`, widened by `pad` of its span and rounded out to
/// round ticks; `[0, 1]` for no data.
fn padded_range(v: &[f64], pad: f64) -> (f64, f64) {
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
    let ticks = nice_ticks(lo, hi, 6);
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
fn draw_grid_and_ticks(c: &mut Canvas, f: &PlotFrame, invert_y: bool) {
    let (l, t, w, h) = f.rect;
    let style = TextStyle::new(15.0);
    let xt = nice_ticks(f.x_range.0, f.x_range.1, 8);
    for &x in &xt {
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
            &tick_label(x, &xt),
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

/// Title, subtitle and axis labels.
fn draw_labels(c: &mut Canvas, plot: &LinePlot, f: &PlotFrame) {
    let (l, t, w, h) = f.rect;
    text::draw(c, &plot.title, 30.0, 44.0, &TextStyle::new(28.0).bold());
    text::draw(
        c,
        &plot.subtitle,
        30.0,
        76.0,
        &TextStyle::new(16.0).colour(MUTED),
    );
    let axis = TextStyle::new(17.0).bold().align(Align::Centre);
    text::draw(
        c,
        &plot.x_label,
        (l + 0.5 * w) as f32,
        (t + h + 58.0) as f32,
        &axis,
    );
    text::draw_vertical(c, &plot.y_label, 30.0, (t + 0.5 * h) as f32, &axis);
}

/// Legend box in the corner of the plot area that covers the fewest
/// points of the curves (top right when several tie), so it hides no
/// data point where a corner is free.
fn draw_legend(c: &mut Canvas, series: &[Series], f: &PlotFrame) {
    if series.is_empty() {
        return;
    }
    let style = TextStyle::new(15.0);
    let text_w = series
        .iter()
        .map(|s| text::width(&s.name, &style))
        .fold(0.0, f32::max);
    let (bw, bh) = (text_w + 70.0, 12.0 + 26.0 * series.len() as f32);
    let (x, y) = legend_corner(series, f, (bw, bh));
    c.fill_rect(x, y, bw, bh, WHITE);
    c.stroke_rect(x, y, bw, bh, [180, 182, 188], 1.0);
    for (k, s) in series.iter().enumerate() {
        let cy = y + 19.0 + 26.0 * k as f32;
        let width = 2.2 + 1.8 * k as f32;
        c.polyline(&[(x + 12.0, cy), (x + 48.0, cy)], s.colour, width);
        c.fill_circle(x + 30.0, cy, 1.0 + width, s.colour);
        text::draw(c, &s.name, x + 58.0, cy + 5.0, &style);
    }
}

/// The top-left corner of a legend box of size `(bw, bh)`: the corner of
/// the plot area whose box covers the fewest curve points, top right
/// when several tie.
fn legend_corner(series: &[Series], f: &PlotFrame, (bw, bh): (f32, f32)) -> (f32, f32) {
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
            .filter(|&(px, py)| {
                let (px, py) = (px as f32, py as f32);
                (x - 8.0..=x + bw + 8.0).contains(&px) && (y - 8.0..=y + bh + 8.0).contains(&py)
            })
            .count()
    };
    // min_by_key keeps the first of equals: top right.
    corners
        .iter()
        .copied()
        .min_by_key(covered)
        .unwrap_or(corners[0])
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
/// sorted by x.
pub fn centreline_cp(s: &SurfaceResult<'_>, params: &CentrelineParams) -> Centreline {
    let y = centre_y(s.mesh);
    let (mut upper, mut lower) = (Vec::new(), Vec::new());
    for (p, &cp) in s.mesh.panels.iter().zip(s.cp) {
        let x = match params.band {
            Some(band) => ((p.centroid.y - y).abs() <= band).then_some(p.centroid.x),
            None => cut_x(&p.vertices, y),
        };
        if let Some(x) = x {
            let side = if p.normal.z >= 0.0 {
                &mut upper
            } else {
                &mut lower
            };
            side.push((x, cp));
        }
    }
    upper.sort_by(|a, b| a.0.total_cmp(&b.0));
    lower.sort_by(|a, b| a.0.total_cmp(&b.0));
    Centreline { y, upper, lower }
}

/// Cp along the centre line, `(x [m], Cp)` pairs sorted by x.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Centreline {
    /// The centre plane's `y`, metres.
    pub y: f64,
    /// Panels whose normal points up (or sideways).
    pub upper: Vec<(f64, f64)>,
    /// Panels whose normal points down.
    pub lower: Vec<(f64, f64)>,
}

/// The x of the middle of the segment where the plane at `y` cuts a
/// triangle (edges that cross it, and corners on it); `None` when it does
/// not reach the plane or touches it at one corner only.
fn cut_x(v: &[tuft_mesh::Point; 3], y: f64) -> Option<f64> {
    let mut xs = Vec::with_capacity(3);
    for k in 0..3 {
        let (a, b) = (v[k], v[(k + 1) % 3]);
        let (da, db) = (a.y - y, b.y - y);
        if da == 0.0 {
            xs.push(a.x);
        } else if da * db < 0.0 {
            xs.push(a.x + (b.x - a.x) * da / (da - db));
        }
    }
    let (lo, hi) = xs
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), &x| {
            (l.min(x), h.max(x))
        });
    (hi > lo).then_some(0.5 * (lo + hi))
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
    } = centreline_cp(s, params);
    let clipped = match (clip_suction(&mut upper), clip_suction(&mut lower)) {
        (Some(a), Some(b)) => Some((a.0 + b.0, a.1.min(b.1))),
        (a, b) => a.or(b),
    };
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
    let plot = LinePlot {
        title: caption.title("Centre-line pressure"),
        subtitle: format!(
            "Panels on {plane}; upper surface: normal pointing up. Cp axis inverted: suction up.{none}"
        ),
        x_label: "x [m] (downstream)".to_owned(),
        y_label: "Cp [-]".to_owned(),
        invert_y: true,
        series: vec![
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
        ],
    };
    draw_line_plot(&plot, plot_params)
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;
    use crate::output::canvas::testing::{decode, keep};
    use crate::output::fixture::{Fixture, caption};

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
        };
        let frame = plot_frame(&plot, &PlotParams::default());
        // The line along the whole diagonal of the drawn range.
        let ((x0, x1), (y0, y1)) = (frame.x_range, frame.y_range);
        let diagonal: Vec<(f64, f64)> = (0..=50)
            .map(|k| f64::from(k) / 50.0)
            .map(|f| (x0 + f * (x1 - x0), y0 + f * (y1 - y0)))
            .collect();
        let (x, y) = legend_corner(&[line("a", diagonal)], &frame, (200.0, 64.0));
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
        let (x, _) = legend_corner(&flat.series, &frame, (200.0, 64.0));
        assert!(x > (frame.rect.0 + 0.5 * frame.rect.2) as f32, "{x}");
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
}
