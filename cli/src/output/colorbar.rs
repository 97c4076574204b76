//! Colour scales (from `colorous`, Cynthia Brewer's and matplotlib's
//! published maps) and the colour bar drawn beside every picture.
//!
//! - Cp: the diverging red-blue map centred on Cp = 0 (red = pressure above
//!   free stream, blue = suction), symmetric range `±m`, `m` at least 1 so
//!   the stagnation value Cp = 1 is always inside.
//! - Separation risk: the sequential yellow-orange-red map over 0..1.
//! - Speed ratio |V|/U: the sequential viridis map from 0.

use colorous::Gradient;

use super::canvas::{Canvas, INK, Rgb};
use super::text::{self, Align, TextStyle};

/// Which map and how values reach it.
#[derive(Debug, Clone, Copy)]
enum Map {
    /// `t = 0.5 - 0.5 v / max`, red at the top.
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
    map: Map,
}

impl ColourScale {
    /// Pressure coefficient: diverging, centred on 0, range `±m` with `m`
    /// the 1 % quantile of `|Cp|` on the suction side rounded up to a
    /// multiple of 0.5, at least 1 (a few sharp-edge panels would otherwise
    /// wash out the rest of the picture).
    pub fn cp(values: &[f64]) -> Self {
        let m = (2.0 * (-quantile(values, 0.01)).max(1.0)).ceil() / 2.0;
        Self {
            label: "Cp [-]".to_owned(),
            min: -m,
            max: m,
            map: Map::Diverging,
        }
    }

    /// Separation risk over 0..1 (the palest yellow left out so low risk
    /// still shows against a white page).
    pub fn risk() -> Self {
        Self {
            label: "separation risk [-]".to_owned(),
            min: 0.0,
            max: 1.0,
            map: Map::Sequential {
                gradient: colorous::YELLOW_ORANGE_RED,
                t0: 0.12,
                t1: 1.0,
            },
        }
    }

    /// Speed ratio |V|/U from 0 to `max` of `values` rounded up to 0.25
    /// (at least 1.25).
    pub fn speed_ratio(values: &[f64]) -> Self {
        let top = quantile(values, 1.0).max(1.25);
        Self {
            label: "|V|/U [-]".to_owned(),
            min: 0.0,
            max: (4.0 * top).ceil() / 4.0,
            map: Map::Sequential {
                gradient: colorous::VIRIDIS,
                t0: 0.0,
                t1: 1.0,
            },
        }
    }

    /// Colour of `v`, clamped to the range; `None` for NaN.
    pub fn colour(&self, v: f64) -> Option<Rgb> {
        if v.is_nan() {
            return None;
        }
        let c = match self.map {
            Map::Diverging => {
                colorous::RED_BLUE.eval_continuous((0.5 - 0.5 * v / self.max).clamp(0.0, 1.0))
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
}

/// Stripe colour of hatching at pixel `(x, y)`: stripes 45° across, 3 px
/// of `a` then 4 px of `b`.
pub fn hatch(x: i64, y: i64, a: Rgb, b: Rgb) -> Rgb {
    if (x + y).rem_euclid(7) < 3 { a } else { b }
}

/// Draw a vertical colour bar at `(x, y)` of size `w` x `h` (maximum at the
/// top), its label above and tick labels to the right, then the legend
/// entries below it.
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
    for row in 0..h.round() as i64 {
        let v = scale.max - (scale.max - scale.min) * (row as f64 + 0.5) / f64::from(h);
        let c = scale.colour(v).unwrap_or(INK);
        canvas.fill_rect(x, y + row as f32, w, 1.0, c);
    }
    canvas.stroke_rect(x, y, w, h, INK, 1.0);
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
    draw_legend(canvas, x, y + h + 34.0, legend);
}

/// Legend entries as swatches with labels, one per row.
fn draw_legend(canvas: &mut Canvas, x: f32, y: f32, legend: &[(String, Swatch)]) {
    for (k, (label, swatch)) in legend.iter().enumerate() {
        let top = y + 30.0 * k as f32;
        draw_swatch(canvas, x as i64, top as i64, swatch);
        canvas.stroke_rect(x, top, 22.0, 22.0, INK, 1.0);
        text::draw(
            canvas,
            label,
            x + 30.0,
            top + 16.0,
            &TextStyle::new(15.0).align(Align::Left),
        );
    }
}

/// A 22 px square swatch.
fn draw_swatch(canvas: &mut Canvas, x: i64, y: i64, swatch: &Swatch) {
    for dy in 0..22 {
        for dx in 0..22 {
            let c = match *swatch {
                Swatch::Solid(c) => c,
                Swatch::Hatched(a, b) => hatch(x + dx, y + dy, a, b),
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
        assert_eq!((s.min, s.max), (-1.5, 1.5));
        // ColorBrewer RdBu: the centre is near white, the ends red and blue.
        let mid = s.colour(0.0).unwrap();
        assert!(mid.iter().all(|&c| c > 230), "{mid:?}");
        let hi = s.colour(1.5).unwrap();
        let lo = s.colour(-1.5).unwrap();
        assert!(hi[0] > hi[2] && lo[2] > lo[0]);
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
}
