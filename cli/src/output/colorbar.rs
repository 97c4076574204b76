//! Colour scales (from `colorous`, Cynthia Brewer's and matplotlib's
//! published maps) and the colour bar drawn beside every picture.
//!
//! - Cp: the diverging red-blue map centred on Cp = 0 (red = pressure above
//!   free stream, blue = suction) over `-m` to 1: steady incompressible
//!   flow has no Cp above the stagnation value 1, so the red half ends
//!   there in full red, and the suction half runs to `m`, at least 1.
//! - Separation risk: the sequential yellow-orange-red map over 0..1.
//! - Speed ratio |V|/U: the sequential viridis map from 0.
//!
//! Every range ends on a labelled tick. Where values lie beyond a range
//! (a scale clipped so that a few extreme samples do not wash out the
//! rest), that end of the bar is drawn pointed and a note under the bar
//! gives the extreme value.

use colorous::Gradient;

use super::canvas::{Canvas, INK, Rgb};
use super::text::{self, Align, TextStyle};

/// Which map and how values reach it.
#[derive(Debug, Clone, Copy)]
enum Map {
    /// `t = 0.5 - 0.5 v / max` above 0 and `0.5 + 0.5 v / min` below
    /// (each half of the map over its own half of the range), red at the
    /// top.
    Diverging,
    /// `t = t0 + (t1 - t0) (v - min) / (max - min)`.
    Sequential {
        gradient: Gradient,
        t0: f64,
        t1: f64,
    },
}

/// A value-to-colour map with its range and label.
#[derive(Debug, Clone)]
pub struct ColourScale {
    /// Quantity and unit, e.g. `Cp [-]`.
    pub label: String,
    /// Value at the bottom of the bar.
    pub min: f64,
    /// Value at the top of the bar.
    pub max: f64,
    /// The lowest and the highest value shown, where they lie beyond the
    /// range (drawn in the end colours; the bar's end is pointed).
    pub clipped: (Option<f64>, Option<f64>),
    map: Map,
}

impl ColourScale {
    /// Pressure coefficient: diverging, centred on 0, from `-m` to the
    /// stagnation value 1 (no steady incompressible flow exceeds it), `m`
    /// the 1 % quantile of `|Cp|` on the suction side rounded up to a
    /// tick, at least 1 (a few sharp-edge panels would otherwise wash out
    /// the rest of the picture; the bar says so when it clips them, and
    /// when a panel's discretisation error puts it above 1).
    pub fn cp(values: &[f64]) -> Self {
        let m = round_to_tick((-quantile(values, 0.01)).max(1.0), true);
        Self {
            label: "Cp [-]".to_owned(),
            min: -m,
            max: 1.0,
            clipped: (None, None),
            map: Map::Diverging,
        }
        .mark_clipped(values)
    }

    /// A diverging scale like [`ColourScale::cp`]'s, centred on 0, over
    /// `±m` with `m` the 98 % quantile of `|values|` (at least `floor`)
    /// rounded up to a tick, marked clipped where values lie beyond it.
    pub fn diverging(label: &str, values: &[f64], floor: f64) -> Self {
        let mags: Vec<f64> = values.iter().map(|v| v.abs()).collect();
        let m = round_to_tick(quantile(&mags, 0.98).max(floor), true);
        Self {
            label: label.to_owned(),
            min: -m,
            max: m,
            clipped: (None, None),
            map: Map::Diverging,
        }
        .mark_clipped(values)
    }

    /// Separation risk over 0..1 (the palest yellow left out so low risk
    /// still shows against a white page).
    pub fn risk() -> Self {
        Self {
            label: "separation risk [-]".to_owned(),
            min: 0.0,
            max: 1.0,
            clipped: (None, None),
            map: Map::Sequential {
                gradient: colorous::YELLOW_ORANGE_RED,
                t0: 0.12,
                t1: 1.0,
            },
        }
    }

    /// Speed ratio |V|/U from 0 to the 99.5 % quantile of `values`
    /// rounded up to a tick (at least 1.25): a handful of samples, such as
    /// those a panel method computes next to a panel edge, cannot set the
    /// scale alone (the bar says so when it clips them).
    pub fn speed_ratio(values: &[f64]) -> Self {
        let top = quantile(values, 0.995).max(1.25);
        Self {
            label: "|V|/U [-]".to_owned(),
            min: 0.0,
            max: round_to_tick(top, false),
            clipped: (None, None),
            map: Map::Sequential {
                gradient: colorous::VIRIDIS,
                t0: 0.0,
                t1: 1.0,
            },
        }
        .mark_clipped(values)
    }

    /// Note the extremes of `values` that lie beyond the range by more
    /// than 1 % of it (kept when already noted further out).
    pub fn mark_clipped(mut self, values: &[f64]) -> Self {
        let finite = values.iter().copied().filter(|v| v.is_finite());
        let (lo, hi) = finite.fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
            (lo.min(v), hi.max(v))
        });
        // Beyond an end by less than 1 % of the range is not to be seen.
        let seen = 0.01 * (self.max - self.min);
        if lo < self.min - seen {
            self.clipped.0 = Some(self.clipped.0.map_or(lo, |c| c.min(lo)));
        }
        if hi > self.max + seen {
            self.clipped.1 = Some(self.clipped.1.map_or(hi, |c| c.max(hi)));
        }
        self
    }

    /// Colour of `v`, clamped to the range; `None` for NaN.
    pub fn colour(&self, v: f64) -> Option<Rgb> {
        if v.is_nan() {
            return None;
        }
        let c = match self.map {
            Map::Diverging => {
                let half = if v >= 0.0 { self.max } else { -self.min };
                colorous::RED_BLUE.eval_continuous((0.5 - 0.5 * v / half).clamp(0.0, 1.0))
            }
            Map::Sequential { gradient, t0, t1 } => {
                let s = ((v - self.min) / (self.max - self.min)).clamp(0.0, 1.0);
                gradient.eval_continuous(t0 + (t1 - t0) * s)
            }
        };
        Some([c.r, c.g, c.b])
    }

    /// Round tick values covering the range (steps 1, 2, 2.5 or 5 times a
    /// power of ten, about five ticks).
    pub fn ticks(&self) -> Vec<f64> {
        nice_ticks(self.min, self.max, 5)
    }
}

/// The `q` quantile (0..1) of the finite values, 0 for none.
fn quantile(values: &[f64], q: f64) -> f64 {
    let mut v: Vec<f64> = values.iter().copied().filter(|x| x.is_finite()).collect();
    if v.is_empty() {
        return 0.0;
    }
    v.sort_by(f64::total_cmp);
    v[((v.len() - 1) as f64 * q.clamp(0.0, 1.0)).round() as usize]
}

/// The smallest value at or above `top` on which the bar's ticks end: the
/// bar runs over `[0, m]`, or `[-m, m]` when `symmetric`, and its ticks
/// ([`nice_ticks`], about five) must include `m` so that both ends are
/// labelled.
pub fn round_to_tick(top: f64, symmetric: bool) -> f64 {
    if !(top.is_finite() && top > 0.0) {
        return 1.0;
    }
    let span = |m: f64| if symmetric { 2.0 * m } else { m };
    // Try ever coarser round steps; the first whose multiple above `top`
    // is also a multiple of the step the ticks of that range take wins
    // (one step's range always is, so the search ends).
    let mut step = nice_step(span(top) / 5.0);
    for _ in 0..16 {
        let m = (top / step - 1e-9).ceil() * step;
        let r = m / nice_step(span(m) / 5.0);
        if (r - r.round()).abs() < 1e-6 {
            return m;
        }
        step = coarser_step(step);
    }
    top
}

/// The next round step above `step` (1, 2, 2.5, 5 times a power of ten).
fn coarser_step(step: f64) -> f64 {
    let p = 10f64.powf(step.log10().floor());
    let f = step / p;
    [1.0, 2.0, 2.5, 5.0, 10.0]
        .into_iter()
        .find(|&m| m > f * (1.0 + 1e-9))
        .unwrap_or(10.0)
        * p
}

/// About `count` round ticks inside `[lo, hi]` (Heckbert, "Nice numbers
/// for graph labels", Graphics Gems, 1990).
pub fn nice_ticks(lo: f64, hi: f64, count: usize) -> Vec<f64> {
    let span = hi - lo;
    if !(span.is_finite() && span > 0.0) {
        return vec![lo];
    }
    let step = nice_step(span / count.max(1) as f64);
    let first = (lo / step - 1e-9).ceil() as i64;
    let last = (hi / step + 1e-9).floor() as i64;
    (first..=last).map(|k| k as f64 * step).collect()
}

/// A round step near `raw`: 1, 2, 2.5 or 5 times a power of ten.
fn nice_step(raw: f64) -> f64 {
    let p = 10f64.powf(raw.log10().floor());
    let f = raw / p;
    let m = [1.0, 2.0, 2.5, 5.0, 10.0]
        .into_iter()
        .find(|&m| f <= m * 1.25)
        .unwrap_or(10.0);
    m * p
}

/// A tick label with as many decimals as the step needs, a true minus sign
/// and no "-0".
pub fn tick_label(v: f64, ticks: &[f64]) -> String {
    let step = match ticks {
        [a, b, ..] => (b - a).abs(),
        _ => 1.0,
    };
    let decimals = (0..6)
        .find(|&d| {
            let scaled = step * 10f64.powi(d);
            (scaled - scaled.round()).abs() < 1e-6 * scaled.max(1.0)
        })
        .unwrap_or(6) as usize;
    let s = format!("{:.*}", decimals, v);
    let s = if s
        .trim_start_matches('-')
        .chars()
        .all(|c| c == '0' || c == '.')
    {
        s.trim_start_matches('-').to_owned()
    } else {
        s
    };
    s.replace('-', "\u{2212}")
}

/// A legend entry drawn under the bar.
#[derive(Debug, Clone, PartialEq)]
pub enum Swatch {
    /// A flat colour.
    Solid(Rgb),
    /// Diagonal stripes of two colours.
    Hatched(Rgb, Rgb),
    /// A colour with thin stripes of another across it the other way
    /// ([`thin_stripes`]).
    Striped(Rgb, Rgb),
}

/// Stripe colour of hatching at pixel `(x, y)`: stripes 45° across, 3 px
/// of `a` then 4 px of `b`.
pub fn hatch(x: i64, y: i64, a: Rgb, b: Rgb) -> Rgb {
    if (x + y).rem_euclid(7) < 3 { a } else { b }
}

/// Colour at pixel `(x, y)` of `base` with thin stripes of `stripe`
/// across it: 2 px in 8, at 45° the other way from [`hatch`] (so the
/// colour under them still reads).
pub fn thin_stripes(x: i64, y: i64, base: Rgb, stripe: Rgb) -> Rgb {
    if (x - y).rem_euclid(8) < 2 {
        stripe
    } else {
        base
    }
}

/// Draw a vertical colour bar at `(x, y)` of size `w` x `h` (maximum at the
/// top), its label above and tick labels to the right, then the legend
/// entries below it. A clipped end (see [`ColourScale::clipped`]) is a
/// triangle in the end colour inside the box, and a note under the bar
/// gives the extreme value beyond it.
pub fn draw_bar(
    canvas: &mut Canvas,
    scale: &ColourScale,
    (x, y, w, h): (f32, f32, f32, f32),
    legend: &[(String, Swatch)],
) {
    text::draw(
        canvas,
        &scale.label,
        x,
        y - 14.0,
        &TextStyle::new(17.0).bold(),
    );
    let tri = w.min(0.2 * h);
    let top = if scale.clipped.1.is_some() { tri } else { 0.0 };
    let bottom = if scale.clipped.0.is_some() { tri } else { 0.0 };
    let (y, full_h, h) = (y + top, h, h - top - bottom);
    for row in 0..h.round() as i64 {
        let v = scale.max - (scale.max - scale.min) * (row as f64 + 0.5) / f64::from(h);
        let c = scale.colour(v).unwrap_or(INK);
        canvas.fill_rect(x, y + row as f32, w, 1.0, c);
    }
    canvas.stroke_rect(x, y, w, h, INK, 1.0);
    draw_clipped_ends(canvas, scale, (x, y, w, h), tri);
    let ticks = scale.ticks();
    let style = TextStyle::new(15.0);
    for &t in &ticks {
        let ty = y + h * ((scale.max - t) / (scale.max - scale.min)) as f32;
        canvas.polyline(&[(x + w, ty), (x + w + 6.0, ty)], INK, 1.2);
        text::draw(
            canvas,
            &tick_label(t, &ticks),
            x + w + 10.0,
            ty + 5.0,
            &style,
        );
    }
    let notes = clipped_notes(scale);
    for (k, note) in notes.iter().enumerate() {
        text::draw(
            canvas,
            note,
            x,
            y + h + bottom + 24.0 + 18.0 * k as f32,
            &TextStyle::new(14.0),
        );
    }
    let below = y - top + full_h + 34.0 + 18.0 * notes.len() as f32;
    draw_legend(canvas, x, below, legend);
}

/// Triangles beyond a clipped end of the gradient box `(x, y, w, h)`,
/// pointing away from it, filled with the end colour.
fn draw_clipped_ends(
    canvas: &mut Canvas,
    scale: &ColourScale,
    (x, y, w, h): (f32, f32, f32, f32),
    tri: f32,
) {
    let ends = [
        (scale.clipped.1.is_some(), y, -tri, scale.max),
        (scale.clipped.0.is_some(), y + h, tri, scale.min),
    ];
    for (on, base, dy, v) in ends {
        if !on {
            continue;
        }
        let pts = [(x, base), (x + w, base), (x + 0.5 * w, base + dy)];
        canvas.fill_polygon(&pts, scale.colour(v).unwrap_or(INK));
        canvas.polyline(&[pts[0], pts[2], pts[1]], INK, 1.0);
    }
}

/// The notes under a clipped bar: the extreme beyond each pointed end.
pub fn clipped_notes(scale: &ColourScale) -> Vec<String> {
    let mut notes = Vec::new();
    if let Some(v) = scale.clipped.1 {
        notes.push(format!("clipped, max {}", two_digits(v)));
    }
    if let Some(v) = scale.clipped.0 {
        notes.push(format!("clipped, min {}", two_digits(v)));
    }
    notes
}

/// `v` to two significant digits, with a true minus sign.
fn two_digits(v: f64) -> String {
    let digits = (1 - v.abs().max(1e-12).log10().floor() as i32).max(0) as usize;
    format!("{v:.digits$}").replace('-', "\u{2212}")
}

/// Legend entries as swatches with labels, one per row (a label's
/// further lines, after a `\n`, under its first).
pub fn draw_legend(canvas: &mut Canvas, x: f32, y: f32, legend: &[(String, Swatch)]) {
    let mut top = y;
    for (label, swatch) in legend {
        draw_swatch(canvas, x as i64, top as i64, swatch);
        canvas.stroke_rect(x, top, 22.0, 22.0, INK, 1.0);
        let lines: Vec<&str> = label.split('\n').collect();
        for (k, line) in lines.iter().enumerate() {
            text::draw(
                canvas,
                line,
                x + 30.0,
                top + 16.0 + 18.0 * k as f32,
                &TextStyle::new(15.0).align(Align::Left),
            );
        }
        top += 30.0 + 18.0 * (lines.len() - 1) as f32;
    }
}

/// A 22 px square swatch.
pub(crate) fn draw_swatch(canvas: &mut Canvas, x: i64, y: i64, swatch: &Swatch) {
    for dy in 0..22 {
        for dx in 0..22 {
            let c = match *swatch {
                Swatch::Solid(c) => c,
                Swatch::Hatched(a, b) => hatch(x + dx, y + dy, a, b),
                Swatch::Striped(a, b) => thin_stripes(x + dx, y + dy, a, b),
            };
            canvas.blend(x + dx, y + dy, c, 1.0);
        }
    }
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;

    #[test]
    fn cp_map_is_centred_and_red_for_pressure() {
        let s = ColourScale::cp(&[-1.25, 0.0, 1.0]);
        assert_eq!((s.min, s.max), (-1.5, 1.0));
        // ColorBrewer RdBu: the centre is near white, the ends red and blue.
        let mid = s.colour(0.0).unwrap();
        assert!(mid.iter().all(|&c| c > 230), "{mid:?}");
        let hi = s.colour(1.0).unwrap();
        let lo = s.colour(-1.5).unwrap();
        assert!(hi[0] > hi[2] && lo[2] > lo[0]);
        // Stagnation (Cp = 1) is the map's full red end, as deep as the
        // suction end is blue, whatever the suction range.
        let deep = colorous::RED_BLUE.eval_continuous(0.0);
        assert_eq!(hi, [deep.r, deep.g, deep.b]);
        let wide = ColourScale::cp(&[-4.0, 1.0]);
        assert_eq!(wide.colour(1.0), Some(hi));
        assert!(s.colour(f64::NAN).is_none());
    }

    #[test]
    fn ticks_are_round_and_inside() {
        // Heckbert's nice numbers (Graphics Gems, 1990): steps 0.5 and 0.2.
        let close = |a: Vec<f64>, b: &[f64]| {
            a.len() == b.len() && a.iter().zip(b).all(|(x, y)| (x - y).abs() < 1e-12)
        };
        assert!(close(
            nice_ticks(-1.5, 1.5, 5),
            &[-1.5, -1.0, -0.5, 0.0, 0.5, 1.0, 1.5]
        ));
        assert!(close(
            nice_ticks(0.0, 1.0, 5),
            &[0.0, 0.2, 0.4, 0.6, 0.8, 1.0]
        ));
        let t = nice_ticks(0.0, 1.5, 5);
        assert_eq!(tick_label(t[1], &t), "0.25");
        assert_eq!(tick_label(-1.0, &[-1.5, -1.0]), "\u{2212}1.0");
        assert_eq!(tick_label(-0.0, &[0.0, 0.2]), "0.0");
    }

    #[test]
    fn every_range_ends_on_a_labelled_tick() {
        // Both ends of a bar carry a number (common practice for colour
        // bars): the range is rounded up to a multiple of its tick step.
        for k in 1..400 {
            let top = 0.013 * f64::from(k);
            for symmetric in [false, true] {
                let m = round_to_tick(top, symmetric);
                assert!(m >= top && m <= 2.0 * top + 1e-12, "{top} -> {m}");
                let lo = if symmetric { -m } else { 0.0 };
                let t = nice_ticks(lo, m, 5);
                let on = |v: f64| t.iter().any(|&x| (x - v).abs() < 1e-9 * m);
                assert!(on(lo) && on(m), "{top} ({symmetric}): {t:?}");
            }
        }
        // The Cp difference of two runs peaking at 0.36 (the demo's): the
        // bar runs to 0.4, labelled, not to an unlabelled 0.36.
        let s = ColourScale::diverging("dCp [-]", &[0.36, -0.2], 0.02);
        assert_eq!((s.min, s.max), (-0.4, 0.4));
    }

    #[test]
    fn a_few_extreme_samples_are_clipped_and_said_so() {
        // 999 samples at |V|/U up to 1.4 and one at 4.2 (a sample next to a
        // panel edge): the range follows the many, the bar notes the one.
        let mut v: Vec<f64> = (0..999).map(|k| 1.4 * f64::from(k) / 998.0).collect();
        v.push(4.2);
        let s = ColourScale::speed_ratio(&v);
        assert_eq!(s.max, 1.5);
        assert_eq!(s.clipped, (None, Some(4.2)));
        assert_eq!(clipped_notes(&s), vec!["clipped, max 4.2".to_owned()]);
        // Nothing beyond the range, nothing noted.
        let s = ColourScale::speed_ratio(&v[..999]);
        assert_eq!(s.clipped, (None, None));
        assert!(clipped_notes(&s).is_empty());
        // Cp: the suction peak of a sharp edge beyond the range.
        let mut cp: Vec<f64> = (0..999).map(|k| -0.5 + f64::from(k) / 998.0).collect();
        cp.push(-7.3);
        let s = ColourScale::cp(&cp);
        assert_eq!(s.clipped, (Some(-7.3), None));
        assert_eq!(
            clipped_notes(&s),
            vec!["clipped, min \u{2212}7.3".to_owned()]
        );
    }
}
