//! Pictures of flow slices: speed ratio |V|/U and Cp on a sampled plane,
//! one above the other at the same scale, the body cross-section in grey,
//! each with its colour bar, axes in metres and a title.
//!
//! The colour ranges leave out the samples next to the surface
//! ([`Slice::near_surface`]): a constant-strength panel's velocity is
//! singular along its edges (Katz & Plotkin 2001, sec. 10.4), so a sample
//! within about a panel size of the surface can read several times the
//! free stream where the flow does no such thing, and one such sample set
//! the whole speed scale. The ranges are also clipped at a high quantile
//! ([`ColourScale::speed_ratio`], [`ColourScale::cp`]); the bars point
//! their clipped ends and give the extreme beyond them. Given the surface
//! pressures, the Cp picture takes the surface pictures' scale, so that a
//! colour means one Cp in every picture of a run (a review read the
//! slices' -1 to 1 beside the surface's -1.5 to 1).

use std::collections::HashMap;

use nalgebra::{Point3, Vector3};

use super::canvas::{Canvas, INK, MUTED, Rgb};
use super::colorbar::{self, ColourScale, nice_ticks, tick_label};
use super::text::{self, Align, TextStyle};
use super::{Caption, OutputError, Slice, short_number};
use crate::rays::RayBins;

/// Colour of the body cross-section.
pub const BODY: Rgb = [140, 142, 150];

/// Stripes over the dead water ([`Slice::dead_water`]): period and width,
/// pixels, and their colour.
const DEAD_WATER_STRIPE: (i64, i64) = (10, 3);
const DEAD_WATER_INK: Rgb = [70, 72, 80];

/// Ground colour of the dead water under its stripes: the model computes
/// no flow there (the last pass lets the free stream through its panels),
/// so no field colour is drawn (a review's hatched tube behind a mirror,
/// in free-stream colours, read as "no wake").
const DEAD_WATER_GROUND: Rgb = [226, 227, 230];

/// Samples closer than this many panel sizes (longest edge) to a panel's
/// centroid are near the surface: the velocity of a constant-strength
/// panel is singular along its edges (Katz & Plotkin 2001, sec. 10.4),
/// and the error is large within about a panel size of the surface
/// (common practice).
pub const NEAR_SURFACE_SIZES: f64 = 1.0;

/// Which of `points` lie within [`NEAR_SURFACE_SIZES`] panel sizes of a
/// panel centroid of `mesh` (or of its mirror image in the symmetry plane
/// of a half model): the samples [`Slice::near_surface`] marks.
pub fn near_surface(mesh: &tuft_mesh::PanelMesh, points: &[Point3<f64>]) -> Vec<bool> {
    let reach = mesh
        .panels
        .iter()
        .fold(0.0f64, |m, p| m.max(NEAR_SURFACE_SIZES * p.size));
    if !(reach > 0.0) {
        return vec![false; points.len()];
    }
    let cell = |p: &Point3<f64>| {
        let c = p.coords / reach;
        (c.x.floor() as i64, c.y.floor() as i64, c.z.floor() as i64)
    };
    let mut cells: HashMap<Cell, Vec<(Point3<f64>, f64)>> = HashMap::new();
    for p in &mesh.panels {
        let mut at = vec![p.centroid];
        if mesh.mirrors.symmetry {
            at.push(Point3::new(p.centroid.x, -p.centroid.y, p.centroid.z));
        }
        for c in at {
            let r = NEAR_SURFACE_SIZES * p.size;
            cells.entry(cell(&c)).or_default().push((c, r));
        }
    }
    points
        .iter()
        .map(|q| {
            let (i, j, k) = cell(q);
            (-1..=1).any(|di| {
                (-1..=1).any(|dj| {
                    (-1..=1).any(|dk| {
                        cells
                            .get(&(i + di, j + dj, k + dk))
                            .is_some_and(|v| v.iter().any(|(c, r)| (q - c).norm() < *r))
                    })
                })
            })
        })
        .collect()
}

/// How far behind separated surface the slices hatch the dead water, in
/// body heights: the recirculating near wake of a bluff body closes about
/// one to one and a half base heights behind the base (square-back bodies
/// near the ground; from memory), and a car's base is about its height or
/// less (our choice: the far end, one and a half body heights, since a
/// pocket's floor and walls hold the trapped flow in: at one body height
/// a review's pickup, its tailgate 1.64 m behind the cab on a body 1.63 m
/// tall, read the tailgate's inside at stagnation pressure as one file and
/// in the dead water as the same file wrapped, 88 counts apart).
pub const DEAD_WATER_HEIGHTS: f64 = 1.5;

/// Which of `points` lie in the dead water behind `mesh`'s separated
/// panels (`separated`, one flag per panel): looking upstream from the
/// point (against the unit free-stream direction `stream`), the first
/// surface met (a panel, or its mirror image for a half model) is a
/// separated panel no farther than `reach` metres. The separated-flow
/// loop holds that region at one pressure and lets the free stream
/// through its panels, so the flow a slice shows there is not the dead
/// water's.
pub fn dead_water(
    mesh: &tuft_mesh::PanelMesh,
    separated: &[bool],
    stream: &Vector3<f64>,
    reach: f64,
    points: &[Point3<f64>],
) -> Vec<bool> {
    first_met_separated(mesh, separated, &-stream, reach, points)
}

/// Which of `points` see, along the direction `dir`, a separated panel of
/// `mesh` (`separated`, one flag per panel; or its mirror image for a half
/// model) as the first surface within `reach` metres, met from the side
/// its outward normal faces: a ray from inside the body meets a panel's
/// inner side first and marks nothing. Against the stream it finds the
/// dead water behind separated bases ([`dead_water`]); along it, the
/// separated faces turned to the wind ahead of a point.
pub fn first_met_separated(
    mesh: &tuft_mesh::PanelMesh,
    separated: &[bool],
    dir: &Vector3<f64>,
    reach: f64,
    points: &[Point3<f64>],
) -> Vec<bool> {
    use rayon::prelude::*;
    if separated.len() != mesh.len() || !separated.iter().any(|&s| s) || !(reach > 0.0) {
        return vec![false; points.len()];
    }
    let dir = dir.normalize();
    let shown = super::render::display_triangles(mesh);
    let corners: Vec<[Point3<f64>; 3]> = shown.iter().map(|t| t.corners).collect();
    let marks: Vec<bool> = shown
        .iter()
        .map(|t| separated[t.panel as usize] && t.normal.dot(&dir) < 0.0)
        .collect();
    let bins = RayBins::new(&corners, &dir);
    points
        .par_iter()
        .map(|q| {
            bins.first_hit(&corners, q, &dir, |_| false)
                .is_some_and(|(t, k)| t <= reach && marks[k as usize])
        })
        .collect()
}

/// A cube of the grid [`near_surface`] sorts centroids into.
type Cell = (i64, i64, i64);

/// Picture size of a slice picture.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SliceParams {
    /// Width, pixels.
    pub width: u32,
    /// Height, pixels.
    pub height: u32,
}

impl Default for SliceParams {
    fn default() -> Self {
        Self {
            width: 1600,
            height: 1000,
        }
    }
}

/// Room under a field's bottom edge for its tick labels, axis name and
/// the colour bar's clipping note, pixels.
const BELOW_FIELDS: f64 = 90.0;

/// Where one field of the slice landed: grid index to pixel.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SliceFrame {
    /// Pixel of sample (0, 0)'s position (bottom-left corner of the grid).
    pub origin: (f64, f64),
    /// Pixels per grid step.
    pub pixels_per_step: f64,
}

impl SliceFrame {
    /// Pixel position of the (fractional) grid index `(i, j)`; `j` grows up.
    pub fn pixel_at(&self, i: f64, j: f64) -> (f64, f64) {
        (
            self.origin.0 + i * self.pixels_per_step,
            self.origin.1 - j * self.pixels_per_step,
        )
    }

    /// Grid index of pixel centre `(x, y)`.
    fn grid_at(&self, x: f64, y: f64) -> (f64, f64) {
        (
            (x + 0.5 - self.origin.0) / self.pixels_per_step,
            (self.origin.1 - y - 0.5) / self.pixels_per_step,
        )
    }
}

/// Draw a slice picture: |V|/U above, Cp below, Cp on the scale of
/// `surface_cp` when given (the surface pictures'), else its own.
///
/// # Errors
/// [`OutputError::EmptySlice`] or [`OutputError::LengthMismatch`] for a
/// malformed slice, [`OutputError::PictureSize`] for an unusable size.
pub fn slice_picture(
    slice: &Slice,
    caption: &Caption,
    surface_cp: Option<&[f64]>,
) -> Result<(Canvas, [SliceFrame; 2]), OutputError> {
    slice_picture_with_params(slice, caption, surface_cp, &SliceParams::default())
}

/// [`slice_picture`] with an explicit size.
///
/// # Errors
/// As [`slice_picture`].
pub fn slice_picture_with_params(
    slice: &Slice,
    caption: &Caption,
    surface_cp: Option<&[f64]>,
    params: &SliceParams,
) -> Result<(Canvas, [SliceFrame; 2]), OutputError> {
    slice.validate()?;
    let frames = panel_frames(slice, params);
    // The picture ends under its fields' axes (a review's window beside a
    // mirror, wide and low, laid side by side, had left the lower half of
    // the picture blank).
    let bottom = frames.iter().map(|f| f.origin.1).fold(0.0, f64::max) + BELOW_FIELDS;
    let height = (bottom.ceil() as u32).min(params.height);
    let mut c = Canvas::new(params.width, height)?;
    let u = caption.speed_ms.abs().max(f64::MIN_POSITIVE);
    let speed: Vec<Option<f64>> = slice
        .velocity
        .iter()
        .map(|v| v.map(|v| v.norm() / u))
        .collect();
    let away = [
        away_from_surface(slice, &speed),
        away_from_surface(slice, &slice.cp),
    ];
    let painted = [
        near_values_from_neighbours(slice, &speed, &away[0]),
        near_values_from_neighbours(slice, &slice.cp, &away[1]),
    ];
    let scales = [
        ColourScale::speed_ratio(&away[0]).mark_clipped(&finite(&painted[0])),
        surface_cp
            .map_or_else(
                || ColourScale::cp(&away[1]),
                |cp| {
                    let mut own = ColourScale::cp(cp);
                    own.clipped = (None, None);
                    own
                },
            )
            .mark_clipped(&finite(&painted[1])),
    ];
    let speed_name = format!("Speed |V|/U (1 = {} m/s)", short_number(u));
    let names = [speed_name.as_str(), "Pressure coefficient Cp"];
    let fields = [&painted[0], &painted[1]];
    for k in 0..2 {
        draw_field(&mut c, slice, fields[k], &scales[k], &frames[k]);
        draw_axes(&mut c, slice, &frames[k], names[k]);
        draw_flow_arrow(&mut c, slice, &frames[k], caption.yaw_deg);
        let (x, top) = frames[k].pixel_at(slice.dims.0 as f64 - 1.0, slice.dims.1 as f64 - 1.0);
        let h = (slice.dims.1 - 1) as f64 * frames[k].pixels_per_step;
        colorbar::draw_bar(
            &mut c,
            &scales[k],
            (
                (x + 40.0) as f32,
                (top + 24.0) as f32,
                26.0,
                (h - 24.0).max(40.0) as f32,
            ),
            &[],
        );
    }
    let title = caption.title(&format!("Flow slice: {}", slice.title));
    let room = c.width() as f32 - 60.0;
    text::draw(
        &mut c,
        &title,
        30.0,
        44.0,
        &super::sheet::title_style(&title, room),
    );
    for (k, line) in [
        describe_plane(slice),
        slice.resolution.clone(),
        slice.note.clone(),
    ]
    .iter()
    .filter(|l| !l.is_empty())
    .enumerate()
    {
        // 16 px, smaller (down to 12) for a line that would run off the
        // picture.
        let full = TextStyle::new(16.0).colour(MUTED);
        let width = text::width(line, &full);
        let style = if width > room {
            TextStyle::new((16.0 * room / width).max(12.0)).colour(MUTED)
        } else {
            full
        };
        text::draw(&mut c, line, 30.0, 74.0 + 22.0 * k as f32, &style);
    }
    Ok((c, frames))
}

/// The free stream's direction in the slice's plane, as an arrow with the
/// word "flow" in the top right corner of a field (none when the stream
/// crosses the plane nearly square).
fn draw_flow_arrow(c: &mut Canvas, slice: &Slice, f: &SliceFrame, yaw_deg: f64) {
    let yaw = yaw_deg.to_radians();
    let d = Vector3::new(yaw.cos(), yaw.sin(), 0.0);
    let (di, dj) = (d.dot(&slice.axes.0), d.dot(&slice.axes.1));
    let n = di.hypot(dj);
    if n < 0.3 {
        return;
    }
    let (x1, top) = f.pixel_at(slice.dims.0 as f64 - 1.0, slice.dims.1 as f64 - 1.0);
    let (x0, y0) = ((x1 - 40.0) as f32, (top + 20.0) as f32);
    let (dx, dy) = ((22.0 * di / n) as f32, (-22.0 * dj / n) as f32);
    c.arrow((x0 - dx, y0 - dy), (x0 + dx, y0 + dy), INK, 2.0);
    text::draw(
        c,
        "flow",
        x0 - 30.0,
        y0 + 5.0,
        &TextStyle::new(13.0).colour(INK).align(Align::Right),
    );
}

/// The values of a field outside the body.
fn finite(field: &[Option<f64>]) -> Vec<f64> {
    field.iter().flatten().copied().collect()
}

/// The values of a field outside the body, away from its surface and out
/// of the dead water (all of them when the slice marks no sample).
fn away_from_surface(slice: &Slice, field: &[Option<f64>]) -> Vec<f64> {
    let flag = |flags: &[bool], k: usize| flags.get(k).copied().unwrap_or(false);
    field
        .iter()
        .enumerate()
        .filter(|&(k, _)| !flag(&slice.near_surface, k) && !flag(&slice.dead_water, k))
        .filter_map(|(_, v)| *v)
        .collect()
}

/// The field as painted: a sample near the surface whose value lies
/// outside the range of the samples away from it (the singular velocity
/// next to a panel's edge, a Cp of -17 beside a bonnet's corner on the
/// demo coupe, whose neighbours read -0.2 to -0.4) takes the mean of its
/// neighbours within that range, so that it shows as no spot of its own;
/// it keeps its value when none of them is, unless it lies far outside
/// the slice's own values, when its spot is painted ring by ring from its
/// edge. The VTK file keeps every value. `away` is [`away_from_surface`] of the field.
fn near_values_from_neighbours(
    slice: &Slice,
    field: &[Option<f64>],
    away: &[f64],
) -> Vec<Option<f64>> {
    if slice.near_surface.is_empty() || away.is_empty() {
        return field.to_vec();
    }
    let lo = away.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = away.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let (ni, nj) = slice.dims;
    let fits = |v: f64| (lo..=hi).contains(&v);
    let mean_around = |values: &[Option<f64>], k: usize, keep: &dyn Fn(f64) -> bool| {
        let (i, j) = ((k % ni) as i64, (k / ni) as i64);
        let around: Vec<f64> = (-1..=1)
            .flat_map(|di| (-1..=1).map(move |dj| (i + di, j + dj)))
            .filter(|&(a, b)| a >= 0 && b >= 0 && (a as usize) < ni && (b as usize) < nj)
            .filter_map(|(a, b)| values[a as usize + b as usize * ni])
            .filter(|&w| keep(w))
            .collect();
        (!around.is_empty()).then(|| around.iter().sum::<f64>() / around.len() as f64)
    };
    let mut painted: Vec<Option<f64>> = (0..field.len())
        .map(|k| {
            let v = field[k]?;
            if !slice.near_surface[k] || fits(v) {
                return Some(v);
            }
            Some(mean_around(field, k, &fits).unwrap_or(v))
        })
        .collect();
    // A spot of singular samples several across (samples closer together
    // than the panels: a review's 10 mm slice under a floor of 143 mm
    // panels drew spots of Cp down to -111, each sample's neighbours out
    // of range too) is painted ring by ring from its edge inwards. Only
    // values far outside the slice's own (beyond its 5 to 95 % spread
    // twice over) count as singular here: a narrow window's samples can
    // all lie near the surface and outside the range of the few away
    // from it, and painting those would flatten the field.
    let mut all: Vec<f64> = field.iter().flatten().copied().collect();
    if all.len() < 20 {
        return painted;
    }
    all.sort_by(f64::total_cmp);
    let (q05, q95) = (all[all.len() / 20], all[all.len() * 19 / 20]);
    let spread = q95 - q05;
    let sound = |v: f64| (q05 - 2.0 * spread..=q95 + 2.0 * spread).contains(&v);
    loop {
        let next: Vec<Option<f64>> = (0..painted.len())
            .map(|k| {
                let v = painted[k]?;
                if !slice.near_surface[k] || sound(v) {
                    return Some(v);
                }
                Some(mean_around(&painted, k, &sound).unwrap_or(v))
            })
            .collect();
        if next == painted {
            return painted;
        }
        painted = next;
    }
}

/// Two frames at one scale that keeps the grid's aspect ratio: stacked,
/// or side by side when that draws them larger (a plane across the
/// stream is about as tall as it is wide, and stacked it came out a third
/// of the picture's width).
fn panel_frames(slice: &Slice, params: &SliceParams) -> [SliceFrame; 2] {
    let (ni, nj) = ((slice.dims.0 - 1) as f64, (slice.dims.1 - 1) as f64);
    let (width, height) = (f64::from(params.width), f64::from(params.height));
    // Room for the tick labels and axis name on the left, the colour bar
    // on the right, and the ticks and field name between two frames.
    // A third line under the title (the samples' resolution) moves the
    // frames down by its height.
    let under_title = if slice.resolution.is_empty() {
        0.0
    } else {
        22.0
    };
    let (left, top, right, gap) = (110.0, 130.0 + under_title, 230.0, 90.0);
    let stacked = (width - left - right, (height - top - 40.0) / 2.0 - gap);
    let beside = (width / 2.0 - left - right, height - top - 40.0 - gap);
    let scale = |(w, h): (f64, f64)| (w / ni).min(h / nj).max(1e-3);
    if scale(stacked) >= scale(beside) {
        let pps = scale(stacked);
        let x0 = left + 0.5 * (stacked.0 - ni * pps);
        [0.0, 1.0].map(|k| SliceFrame {
            origin: (x0, top + k * (stacked.1 + gap) + nj * pps),
            pixels_per_step: pps,
        })
    } else {
        let pps = scale(beside);
        [0.0, 1.0].map(|k| SliceFrame {
            origin: (
                k * width / 2.0 + left + 0.5 * (beside.0 - ni * pps),
                top + nj * pps,
            ),
            pixels_per_step: pps,
        })
    }
}

/// Colour every pixel of one field: bilinear between four samples outside
/// the body, the nearest sample next to it, grey inside.
fn draw_field(
    c: &mut Canvas,
    slice: &Slice,
    field: &[Option<f64>],
    scale: &ColourScale,
    f: &SliceFrame,
) {
    let (ni, nj) = slice.dims;
    let (x0, y1) = f.pixel_at(0.0, 0.0);
    let (x1, y0) = f.pixel_at((ni - 1) as f64, (nj - 1) as f64);
    for y in y0.floor() as i64..y1.ceil() as i64 {
        for x in x0.floor() as i64..x1.ceil() as i64 {
            let (gi, gj) = f.grid_at(x as f64, y as f64);
            if gi < 0.0 || gj < 0.0 || gi > (ni - 1) as f64 || gj > (nj - 1) as f64 {
                continue;
            }
            let k = gi.round() as usize + gj.round() as usize * ni;
            let dead = slice.dead_water.get(k).copied().unwrap_or(false);
            let colour = match sample(field, slice.dims, gi, gj) {
                Some(_) if dead => DEAD_WATER_GROUND,
                Some(v) => scale.colour(v).unwrap_or(BODY),
                None => BODY,
            };
            c.blend(x, y, colour, 1.0);
            if dead && (x + y).rem_euclid(DEAD_WATER_STRIPE.0) < DEAD_WATER_STRIPE.1 {
                c.blend(x, y, DEAD_WATER_INK, 0.55);
            }
        }
    }
}

/// Value of a field at fractional index `(gi, gj)`; `None` in the body.
///
/// Bilinear weights over the four surrounding samples; the point is in the
/// body when the body samples carry half the weight or more (a smooth
/// cross-section edge instead of a staircase), otherwise the weighted mean
/// of the samples outside.
fn sample(field: &[Option<f64>], (ni, nj): (usize, usize), gi: f64, gj: f64) -> Option<f64> {
    let (i0, j0) = (
        (gi.floor() as usize).min(ni - 2),
        (gj.floor() as usize).min(nj - 2),
    );
    let (fi, fj) = (gi - i0 as f64, gj - j0 as f64);
    let corners = [
        (field[i0 + j0 * ni], (1.0 - fi) * (1.0 - fj)),
        (field[i0 + 1 + j0 * ni], fi * (1.0 - fj)),
        (field[i0 + (j0 + 1) * ni], (1.0 - fi) * fj),
        (field[i0 + 1 + (j0 + 1) * ni], fi * fj),
    ];
    let (sum, weight) = corners
        .iter()
        .filter_map(|&(v, w)| v.map(|v| (v * w, w)))
        .fold((0.0, 0.0), |a, b| (a.0 + b.0, a.1 + b.1));
    (weight > 0.5).then(|| sum / weight)
}

/// Frame, ticks in metres along both axes, axis names and the panel label.
fn draw_axes(c: &mut Canvas, slice: &Slice, f: &SliceFrame, label: &str) {
    let (ni, nj) = ((slice.dims.0 - 1) as f64, (slice.dims.1 - 1) as f64);
    let (x0, y1) = f.pixel_at(0.0, 0.0);
    let (x1, y0) = f.pixel_at(ni, nj);
    c.stroke_rect(
        x0 as f32,
        y0 as f32,
        (x1 - x0) as f32,
        (y1 - y0) as f32,
        INK,
        1.0,
    );
    text::draw(
        c,
        label,
        x0 as f32,
        (y0 - 10.0) as f32,
        &TextStyle::new(17.0).bold(),
    );
    let style = TextStyle::new(14.0);
    let (a, b) = slice.axes;
    let (oa, ob) = (slice.origin.coords.dot(&a), slice.origin.coords.dot(&b));
    // About one tick per 110 pixels, so that labels such as "-0.75" do
    // not run into each other on a narrow frame.
    let ta = nice_ticks(
        oa,
        oa + ni * slice.spacing,
        ((x1 - x0) / 110.0).clamp(3.0, 8.0) as usize,
    );
    for &t in &ta {
        let (px, _) = f.pixel_at((t - oa) / slice.spacing, 0.0);
        c.polyline(
            &[(px as f32, y1 as f32), (px as f32, (y1 + 5.0) as f32)],
            INK,
            1.2,
        );
        text::draw(
            c,
            &tick_label(t, &ta),
            px as f32,
            (y1 + 21.0) as f32,
            &style.align(Align::Centre),
        );
    }
    let tb = nice_ticks(ob, ob + nj * slice.spacing, 4);
    for &t in &tb {
        let (_, py) = f.pixel_at(0.0, (t - ob) / slice.spacing);
        c.polyline(
            &[((x0 - 5.0) as f32, py as f32), (x0 as f32, py as f32)],
            INK,
            1.2,
        );
        text::draw(
            c,
            &tick_label(t, &tb),
            (x0 - 9.0) as f32,
            (py + 5.0) as f32,
            &style.align(Align::Right),
        );
    }
    let axis = TextStyle::new(15.0).bold().align(Align::Centre);
    text::draw(
        c,
        &format!("{} [m]", axis_name(&a)),
        (0.5 * (x0 + x1)) as f32,
        (y1 + 42.0) as f32,
        &axis,
    );
    text::draw_vertical(
        c,
        &format!("{} [m]", axis_name(&b)),
        (x0 - 58.0) as f32,
        (0.5 * (y0 + y1)) as f32,
        &axis,
    );
}

/// `x`, `y` or `z` for a coordinate axis (either sense), else `s`.
fn axis_name(a: &Vector3<f64>) -> &'static str {
    match (a.x.abs() > 0.999, a.y.abs() > 0.999, a.z.abs() > 0.999) {
        (true, _, _) => "x",
        (_, true, _) => "y",
        (_, _, true) => "z",
        _ => "s",
    }
}

/// One line saying where the plane is.
fn describe_plane(s: &Slice) -> String {
    let n = s.axes.0.cross(&s.axes.1);
    let pos = s.origin.coords.dot(&n);
    let plane = match axis_name(&n) {
        "s" => format!(
            "plane through ({}, {}, {}) m",
            short_number(s.origin.x),
            short_number(s.origin.y),
            short_number(s.origin.z)
        ),
        name => format!(
            "plane {name} = {} m",
            short_number(pos * n.dot(&axis_unit(name)).signum())
        ),
    };
    // Across the stream: seen from behind, looking upstream with z up,
    // +y lies to the right.
    let view = match axis_name(&n) {
        "x" => ", seen from behind",
        "z" if n.z > 0.0 => ", seen from above (+y up)",
        _ => "",
    };
    // A plane under the floor cuts no body: saying grey there sent a
    // review looking for the car in it.
    let inside = if s.cp.iter().any(Option::is_none) {
        "Grey: inside the body."
    } else {
        "The plane does not cut the body."
    };
    format!(
        "{plane}{view}; {} x {} samples {} m apart. {inside}",
        s.dims.0,
        s.dims.1,
        super::fine_number(s.spacing)
    )
}

/// Unit vector of a coordinate axis by name.
fn axis_unit(name: &str) -> Vector3<f64> {
    match name {
        "x" => Vector3::x(),
        "y" => Vector3::y(),
        _ => Vector3::z(),
    }
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]

    use super::*;
    use crate::output::canvas::testing::{decode, keep};
    use crate::output::fixture::{SPEED, caption};

    /// Potential flow past a unit sphere, free stream U along x (Lamb,
    /// Hydrodynamics, §92): phi = U x (1 + 1/(2 r^3)), so
    /// V = U [e_x (1 + 1/(2 r^3)) - 3/2 x r / r^5].
    fn sphere_velocity(p: &Point3<f64>) -> Option<Vector3<f64>> {
        let r = p.coords.norm();
        (r > 1.0).then(|| {
            SPEED * (Vector3::x() * (1.0 + 0.5 / r.powi(3)) - 1.5 * p.x * p.coords / r.powi(5))
        })
    }

    fn centre_plane() -> Slice {
        let dims = (121, 61);
        let spacing = 0.05;
        let origin = Point3::new(-3.0, 0.0, -1.5);
        let mut s = Slice {
            name: "centre-plane".to_owned(),
            title: "centre plane".to_owned(),
            origin,
            axes: (Vector3::x(), Vector3::z()),
            spacing,
            dims,
            velocity: vec![],
            cp: vec![],
            near_surface: vec![],
            dead_water: vec![],
            note: "Potential flow past a sphere (Lamb).".to_owned(),
            resolution: String::new(),
        };
        for j in 0..dims.1 {
            for i in 0..dims.0 {
                let v = sphere_velocity(&s.point(i, j));
                s.velocity.push(v);
                s.cp.push(v.map(|v| 1.0 - v.norm_squared() / (SPEED * SPEED)));
            }
        }
        s
    }

    /// One sample beside the sphere given a singular value (as a sample
    /// next to a panel's edge reads) is painted from its neighbours; a
    /// near sample within the range keeps its own, and the field handed
    /// to the VTK writer is not touched.
    #[test]
    fn a_singular_sample_next_to_the_surface_is_painted_from_its_neighbours() {
        let mut s = centre_plane();
        s.near_surface = vec![false; s.len()];
        // Just outside the sphere's top: (0, 0, 1.05) is sample (60, 51).
        let k = 60 + 51 * s.dims.0;
        let (before, next) = (s.cp[k].unwrap(), s.cp[k + 1].unwrap());
        s.cp[k] = Some(-17.0);
        s.near_surface[k] = true;
        s.near_surface[k + 1] = true;
        let painted = near_values_from_neighbours(&s, &s.cp, &away_from_surface(&s, &s.cp));
        let v = painted[k].unwrap();
        assert!((v - before).abs() < 0.3, "{v} against {before} before");
        assert_eq!(painted[k + 1], Some(next));
        assert_eq!(s.cp[k], Some(-17.0));
    }

    /// A spot of singular samples three across (samples closer together
    /// than the panels) is painted whole, its middle too, whose eight
    /// neighbours all lie in the spot.
    #[test]
    fn a_spot_of_singular_samples_is_painted_ring_by_ring() {
        let mut s = centre_plane();
        s.near_surface = vec![false; s.len()];
        let middle = 60 + 53 * s.dims.0;
        let spot: Vec<usize> = (-1..=1_i64)
            .flat_map(|dj| (-1..=1_i64).map(move |di| (di, dj)))
            .map(|(di, dj)| (middle as i64 + di + dj * s.dims.0 as i64) as usize)
            .collect();
        let before = s.cp[middle].unwrap();
        for &k in &spot {
            s.cp[k] = Some(-111.0);
            s.near_surface[k] = true;
        }
        let painted = near_values_from_neighbours(&s, &s.cp, &away_from_surface(&s, &s.cp));
        for &k in &spot {
            assert!(painted[k].is_some_and(|v| v > -2.0), "{:?}", painted[k]);
        }
        let v = painted[middle].unwrap();
        assert!((v - before).abs() < 0.3, "{v} against {before} before");
    }

    #[test]
    fn sphere_slice_shows_body_stagnation_and_free_stream() {
        let slice = centre_plane();
        let (canvas, frames) = slice_picture(&slice, &caption(), None).unwrap();
        let png = canvas.to_png().unwrap();
        keep("slice.png", &png);
        let img = decode(&png);
        // The picture ends under its fields' axes.
        let bottom = frames.iter().map(|f| f.origin.1).fold(0.0, f64::max);
        assert_eq!(img.width, 1600);
        assert!(
            f64::from(img.height) >= bottom + 60.0 && img.height <= 1000,
            "{} against fields down to {bottom}",
            img.height
        );
        assert!(img.distinct_colours() > 100);
        let grid = |x: f64, z: f64| ((x + 3.0) / 0.05, (z + 1.5) / 0.05);
        for f in &frames {
            // The sphere's centre is inside the body: grey.
            let (gi, gj) = grid(0.0, 0.0);
            let (px, py) = f.pixel_at(gi, gj);
            assert_eq!(img.pixel(px as i64, py as i64), BODY);
        }
        // Far upstream on the axis (x = -2.9, r = 2.9) Lamb's |V|/U is
        // 1 - 1/r^3 = 0.959: the speed map's colour there, within 6 levels
        // (bilinear interpolation between samples).
        let speed_scale = ColourScale::speed_ratio(&[1.5]);
        let (gi, gj) = grid(-2.9, 0.0);
        let (px, py) = frames[0].pixel_at(gi, gj);
        let want = speed_scale.colour(1.0 - 1.0 / 2.9f64.powi(3)).unwrap();
        let got = img.pixel(px as i64, py as i64);
        for ch in 0..3 {
            assert!(
                (i32::from(got[ch]) - i32::from(want[ch])).abs() <= 6,
                "{got:?} vs {want:?}"
            );
        }
        // Just ahead of the stagnation point (x = -1.1) the speed is low
        // (|V|/U = 1 - 1/1.1^3 = 0.25) and Cp high (0.94): dark in viridis,
        // red in the Cp map.
        let (gi, gj) = grid(-1.1, 0.0);
        let dark = img.pixel(
            frames[0].pixel_at(gi, gj).0 as i64,
            frames[0].pixel_at(gi, gj).1 as i64,
        );
        assert!(
            dark.iter().map(|&c| u32::from(c)).sum::<u32>() < 300,
            "{dark:?}"
        );
        let (px, py) = frames[1].pixel_at(gi, gj);
        let red = img.pixel(px as i64, py as i64);
        assert!(red[0] > 100 && red[0] > red[2] + 60, "{red:?}");
    }

    #[test]
    fn a_singular_sample_next_to_the_surface_does_not_set_the_scale() {
        // The samples within 0.1 of the sphere (about 3 % of them) read 4.2
        // times the free stream, as a panel method's do next to panel
        // edges. Marked as near the surface they are left out of the
        // range: the speed scale ends at 1.5 (Lamb's |V|/U at r = 1.1 is
        // 1 + 1/(2 1.1^3) = 1.38, Hydrodynamics, §92), not at 4.5.
        let mut slice = centre_plane();
        slice.near_surface = vec![false; slice.len()];
        let mut marked = 0;
        for j in 0..slice.dims.1 {
            for i in 0..slice.dims.0 {
                let k = i + j * slice.dims.0;
                let r = slice.point(i, j).coords.norm();
                if r > 1.0 && r < 1.1 {
                    slice.velocity[k] = Some(Vector3::new(4.2 * SPEED, 0.0, 0.0));
                    slice.near_surface[k] = true;
                    marked += 1;
                }
            }
        }
        assert!(marked as f64 > 0.01 * slice.len() as f64, "{marked}");
        let (canvas, frames) = slice_picture(&slice, &caption(), None).unwrap();
        let png = canvas.to_png().unwrap();
        keep("slice-clipped.png", &png);
        let img = decode(&png);
        // Far upstream (x = -2.9) on Lamb's 0.959: the colour of a scale
        // to 1.5, within 6 levels, as in the test above.
        let want = ColourScale::speed_ratio(&[1.5])
            .colour(1.0 - 1.0 / 2.9f64.powi(3))
            .unwrap();
        let (px, py) = frames[0].pixel_at(0.1 / 0.05, 1.5 / 0.05);
        let got = img.pixel(px as i64, py as i64);
        for ch in 0..3 {
            assert!(
                (i32::from(got[ch]) - i32::from(want[ch])).abs() <= 6,
                "{got:?} vs {want:?}"
            );
        }
    }

    /// Given the surface pressures, the Cp picture takes their scale (a
    /// sphere's surface reaches Lamb's -1.25 at its equator, and here a
    /// sharper body's -2.5), so a colour means one Cp in every picture:
    /// above the centre at r = 1.3, Lamb's Cp = 1 - (1 + 1/(2 r^3))^2 =
    /// -0.51 (Hydrodynamics, sec. 92) is painted in the surface scale's
    /// colour, not the slice's own.
    #[test]
    fn the_cp_picture_takes_the_surface_scale() {
        let slice = centre_plane();
        let surface = [-2.5, -1.0, 0.0, 1.0];
        let (canvas, frames) = slice_picture(&slice, &caption(), Some(&surface)).unwrap();
        let img = decode(&canvas.to_png().unwrap());
        let r: f64 = 1.3;
        let cp = 1.0 - (1.0 + 0.5 / r.powi(3)).powi(2);
        let (px, py) = frames[1].pixel_at(3.0 / 0.05, (1.5 + r) / 0.05);
        let got = img.pixel(px as i64, py as i64);
        let near =
            |want: Rgb| (0..3).all(|ch| (i32::from(got[ch]) - i32::from(want[ch])).abs() <= 6);
        let shared = ColourScale::cp(&surface).colour(cp).unwrap();
        let own = ColourScale::cp(&[-1.0, 1.0]).colour(cp).unwrap();
        assert!(near(shared), "{got:?} vs {shared:?}");
        assert!(!near(own), "{got:?} is the slice's own scale's {own:?}");
    }

    /// A sphere whose rear half is separated: a point on the axis behind
    /// it lies in the dead water up to the reach and not beyond, a point
    /// ahead of it or beside it (off the sphere's shadow) does not; the
    /// half model's mirror image shadows the y < 0 side the same way.
    #[test]
    fn the_dead_water_is_the_separated_surfaces_shadow_downstream() {
        let whole = tuft_mesh::PanelMesh::new(
            tuft_mesh::generate::icosphere(1.0, 3),
            tuft_mesh::Mirrors::none(),
        )
        .unwrap();
        let rear = |m: &tuft_mesh::PanelMesh| -> Vec<bool> {
            m.panels.iter().map(|p| p.centroid.x > 0.0).collect()
        };
        let points = [
            Point3::new(1.5, 0.0, 0.0),
            Point3::new(2.9, 0.3, -0.2),
            Point3::new(3.5, 0.0, 0.0),
            Point3::new(-1.5, 0.0, 0.0),
            Point3::new(1.5, 1.2, 0.0),
            Point3::new(1.5, -0.5, 0.3),
        ];
        let got = dead_water(&whole, &rear(&whole), &Vector3::x(), 2.0, &points);
        assert_eq!(got, [true, true, false, false, false, true]);
        // Everything separated: a point inside meets the front panels'
        // inner side first (facing upstream) and is no dead water; a point
        // behind still is.
        let all = vec![true; whole.len()];
        let inside = [Point3::new(0.5, 0.0, 0.0), Point3::new(1.5, 0.0, 0.0)];
        assert_eq!(
            dead_water(&whole, &all, &Vector3::x(), 2.0, &inside),
            [false, true]
        );
        // Nothing separated: no dead water.
        let none = vec![false; whole.len()];
        assert!(!dead_water(&whole, &none, &Vector3::x(), 2.0, &points).contains(&true));
        let half = tuft_mesh::PanelMesh::new(
            tuft_mesh::cut::keep_right_half(&tuft_mesh::generate::icosphere(1.0, 3))
                .unwrap()
                .unwrap()
                .0,
            tuft_mesh::Mirrors {
                ground: None,
                symmetry: true,
            },
        )
        .unwrap();
        let got = dead_water(&half, &rear(&half), &Vector3::x(), 2.0, &points);
        assert_eq!(got, [true, true, false, false, false, true]);
    }

    #[test]
    fn samples_within_a_panel_size_of_the_surface_are_marked() {
        // A unit icosphere: a point on the sphere is near, one at radius 2
        // is not (panel sizes here are about 0.15 m).
        let mesh = tuft_mesh::PanelMesh::new(
            tuft_mesh::generate::icosphere(1.0, 3),
            tuft_mesh::Mirrors::none(),
        )
        .unwrap();
        let size = mesh.panels.iter().fold(0.0f64, |m, p| m.max(p.size));
        assert!(size < 0.3, "{size}");
        let points = [
            Point3::new(0.0, 0.0, 1.0 + 0.2 * size),
            Point3::new(0.0, 0.0, 2.0),
            Point3::new(-1.0 - 0.2 * size, 0.0, 0.0),
        ];
        assert_eq!(near_surface(&mesh, &points), vec![true, false, true]);
    }
}
