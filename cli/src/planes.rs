//! Where the flow slices lie: the box round the body they span, the
//! built-in planes and the ones a case asks for (`[[slice]]`).
//!
//! The built-in planes are fixed (the centre plane, a horizontal plane
//! through the middle of the body and, over the ground, one under it); a
//! review's diffuser study wanted the flow across the diffuser's exit,
//! which none of them shows, so a case can add planes square to one axis
//! anywhere in the same box. A case's plane may narrow its window along
//! its other two axes and set its own sample spacing: a review's slices
//! across an 80 mm gap between a roof box and the roof took two or three
//! samples across it at the box's spacing (34 mm on x planes, 83 mm on y
//! and z planes).

use std::fmt;

use anyhow::{Result, bail};
use nalgebra::{Point3, Vector3};
use serde::de::{self, Deserializer, SeqAccess, Visitor};
use serde::{Deserialize, Serialize};
use tuft_mesh::PanelMesh;

use crate::output::{fine_number, short_number};

/// One axis of a `[[slice]]` as written: the plane's position on it, m,
/// or the range its window keeps along it, m (`[from, to]`).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(untagged)]
pub enum SliceAxis {
    /// The plane lies where this axis takes this value.
    At(f64),
    /// The window along this axis, from and to.
    Range([f64; 2]),
}

impl<'de> Deserialize<'de> for SliceAxis {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        struct AxisVisitor;
        impl<'de> Visitor<'de> for AxisVisitor {
            type Value = SliceAxis;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("a number (the plane's position, m) or a range [from, to] (m)")
            }
            fn visit_f64<E: de::Error>(self, v: f64) -> Result<SliceAxis, E> {
                Ok(SliceAxis::At(v))
            }
            fn visit_i64<E: de::Error>(self, v: i64) -> Result<SliceAxis, E> {
                Ok(SliceAxis::At(v as f64))
            }
            fn visit_u64<E: de::Error>(self, v: u64) -> Result<SliceAxis, E> {
                Ok(SliceAxis::At(v as f64))
            }
            fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<SliceAxis, A::Error> {
                let two = "a range of two numbers [from, to] (m)";
                let from: f64 = seq
                    .next_element()?
                    .ok_or_else(|| de::Error::invalid_length(0, &two))?;
                let to: f64 = seq
                    .next_element()?
                    .ok_or_else(|| de::Error::invalid_length(1, &two))?;
                if seq.next_element::<f64>()?.is_some() {
                    return Err(de::Error::invalid_length(3, &two));
                }
                Ok(SliceAxis::Range([from, to]))
            }
        }
        d.deserialize_any(AxisVisitor)
    }
}

/// `[[slice]]` as written: one more flow slice, on the plane where one of
/// `x`, `y` or `z` takes the given value (m, tuft's axes); each of the
/// other two may be a range narrowing the window along it.
#[derive(Debug, Clone, Deserialize, Serialize, PartialEq, Default)]
#[serde(deny_unknown_fields)]
pub struct SliceSection {
    /// Name for the picture's title and the file names (absent: named
    /// after the plane, as `x = 4.2 m` in `slice-x4.2.png`).
    pub name: Option<String>,
    /// A plane across the stream at this x, seen from behind; or the
    /// window's x range on a y or z plane.
    pub x: Option<SliceAxis>,
    /// A plane along the stream at this y, seen from the side (-y); or
    /// the window's y range.
    pub y: Option<SliceAxis>,
    /// A horizontal plane at this z, seen from above; or the window's z
    /// range.
    pub z: Option<SliceAxis>,
    /// Distance between samples, m (absent: the longer side of the
    /// window over [`SLICE_SAMPLES`]). Left out of the case as kept
    /// when absent, so that results written before it stay current.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub spacing: Option<f64>,
}

/// The names of the built-in planes' files, which a case's planes may not
/// take.
pub const BUILT_IN: [&str; 3] = ["centre-plane", "horizontal-plane", "underbody-plane"];

/// Samples along the longer side of a flow slice whose spacing is not
/// asked for.
pub const SLICE_SAMPLES: usize = 110;

/// Most samples a case's slice may take (our choice). Each sample costs a
/// velocity summed over the panels (the treecode's clusters), a look
/// for the surface within a panel size and a ray upstream for the dead
/// water: on the demo coupe's STL (3,956 panels) a slice of 247,860
/// samples took 20 s on one thread, against 2 s for the solve and 1.2 s
/// for the three built-in slices (about 28,000 samples), and wrote an
/// 11.6 MB .vti.
pub const SLICE_BUDGET: usize = 250_000;

/// The box the flow slices span round a body, m: from 0.3 body lengths
/// ahead of the nose to 0.6 behind the tail, two half widths either side
/// of the centre, from the ground (or 0.6 body heights below the body in
/// free air) to 0.8 body heights above it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Window {
    /// Least and most x.
    pub x: [f64; 2],
    /// Least and most y.
    pub y: [f64; 2],
    /// Least and most z.
    pub z: [f64; 2],
}

impl Window {
    /// The window round `mesh` (its mirror images included).
    pub fn of(mesh: &PanelMesh) -> Self {
        let (lo, hi) = mesh.bounds();
        let (len, height) = (hi.x - lo.x, hi.z - lo.z);
        let yc = crate::output::plot::centre_y(mesh);
        let half_width = (hi.y - yc).max(yc - lo.y);
        let z0 = mesh
            .mirrors
            .ground
            .map_or(lo.z - 0.6 * height, |g| g + 1e-3 * height);
        Self {
            x: [lo.x - 0.3 * len, hi.x + 0.6 * len],
            y: [yc - 2.0 * half_width, yc + 2.0 * half_width],
            z: [z0, hi.z + 0.8 * height],
        }
    }

    /// The window's range along axis `k` (0 x, 1 y, 2 z).
    fn range(&self, k: usize) -> [f64; 2] {
        [self.x, self.y, self.z][k]
    }

    /// The window with its range along axis `k` replaced by `r`.
    fn with_range(mut self, k: usize, r: [f64; 2]) -> Self {
        match k {
            0 => self.x = r,
            1 => self.y = r,
            _ => self.z = r,
        }
        self
    }
}

/// One plane to sample, ready for the grid: file stem, title, the corner
/// of sample (0, 0), the two in-plane axes (i to the right, j up on the
/// picture), the extent of its window along each, m, and its samples.
#[derive(Debug, Clone, PartialEq)]
pub struct Plane {
    /// File stem after `slice-` (e.g. `centre-plane`, `diffuser-exit`).
    pub stem: String,
    /// Title on the picture and in the report.
    pub title: String,
    /// Position of sample (0, 0).
    pub origin: Point3<f64>,
    /// Unit vectors along i and along j.
    pub axes: (Vector3<f64>, Vector3<f64>),
    /// Extent of the window along i and along j, m.
    pub size: (f64, f64),
    /// Distance between samples, m.
    pub spacing: f64,
    /// Samples along i and along j.
    pub dims: (usize, usize),
    /// The ranges asked for that reached past the slices' box and were
    /// cut to it: axis (0 x, 1 y, 2 z) and the range as asked.
    pub clipped: Vec<(usize, [f64; 2])>,
    /// The panels' median size (longest edge), m, on a case's plane with a
    /// window or a spacing of its own whose samples lie closer together
    /// than it: nearer the surface than about a panel's size the panels
    /// do not resolve the flow, however fine the samples.
    pub finer_than_panels: Option<f64>,
}

impl Plane {
    /// The plane where coordinate `k` (0 x, 1 y, 2 z) equals `at`, across
    /// the whole window: x planes seen from behind (y to the right, z up),
    /// y planes from the side (x to the right), z planes from above.
    /// [`SLICE_SAMPLES`] samples along the window's longer side, as many
    /// along the shorter as the nearest whole number of spacings gives.
    pub fn square_to(k: usize, at: f64, w: &Window, stem: String, title: String) -> Self {
        let (a, b) = in_plane(k);
        let unit = |i: usize| Vector3::ith(i, 1.0);
        let mut origin = Point3::new(w.x[0], w.y[0], w.z[0]);
        origin[k] = at;
        let (ra, rb) = (w.range(a), w.range(b));
        let size = (ra[1] - ra[0], rb[1] - rb[0]);
        let spacing = default_spacing(size);
        Self {
            stem,
            title,
            origin,
            axes: (unit(a), unit(b)),
            size,
            spacing,
            dims: (
                (size.0 / spacing).round() as usize + 1,
                (size.1 / spacing).round() as usize + 1,
            ),
            clipped: Vec::new(),
            finer_than_panels: None,
        }
    }

    /// Where the plane lies and how the picture sees it, in words:
    /// "plane x = 4.3 m, seen from behind".
    pub fn words(&self) -> String {
        let k = self.normal_axis();
        let view = ["seen from behind", "seen from the side", "seen from above"][k];
        format!(
            "plane {} = {} m, {view}",
            AXES[k],
            short_number(self.origin[k])
        )
    }

    /// Its window and samples in words: "y -0.6 to 0.6 m, z 1.4 to 2.1 m,
    /// 241 x 141 samples 0.005 m apart", with any range cut to the
    /// slices' box said so ("z 1.4 to 2.05 m (asked 1.4 to 2.5, cut to the
    /// box the slices span)").
    pub fn grid_words(&self) -> String {
        let (a, b) = in_plane(self.normal_axis());
        let span = |k: usize, from: f64, extent: f64| {
            let asked = self
                .clipped
                .iter()
                .find(|c| c.0 == k)
                .map(|(_, [lo, hi])| {
                    format!(
                        " (asked {} to {}, cut to the box the slices span)",
                        short_number(*lo),
                        short_number(*hi)
                    )
                })
                .unwrap_or_default();
            format!(
                "{} {} to {} m{asked}",
                AXES[k],
                short_number(from),
                short_number(from + extent)
            )
        };
        format!(
            "{}, {}, {} x {} samples {} m apart",
            span(a, self.origin[a], self.size.0),
            span(b, self.origin[b], self.size.1),
            self.dims.0,
            self.dims.1,
            fine_number(self.spacing)
        )
    }

    /// What the samples cannot show, when they lie closer together than
    /// the panels ([`Plane::finer_than_panels`]).
    pub fn resolution_words(&self) -> Option<String> {
        self.finer_than_panels.map(|size| {
            format!(
                "The samples lie closer together than the panels (median size {} m): nearer the \
                 surface than about a panel's size the panels do not resolve the flow, and those \
                 samples are left out of the colour range.",
                fine_number(size)
            )
        })
    }

    /// The axis (0 x, 1 y, 2 z) the plane is square to.
    fn normal_axis(&self) -> usize {
        let n = self.axes.0.cross(&self.axes.1);
        (0..3)
            .max_by(|&a, &b| n[a].abs().total_cmp(&n[b].abs()))
            .unwrap_or(0)
    }
}

/// The two axes in a plane square to axis `k`, in the picture's order
/// (to the right, up).
fn in_plane(k: usize) -> (usize, usize) {
    match k {
        0 => (1, 2),
        1 => (0, 2),
        _ => (0, 1),
    }
}

/// The spacing of a window `size` m across whose spacing is not asked
/// for: [`SLICE_SAMPLES`] along its longer side.
fn default_spacing(size: (f64, f64)) -> f64 {
    size.0.max(size.1) / SLICE_SAMPLES as f64
}

/// Samples `spacing` apart from one end of `extent` that stay within it
/// (a rounding's worth past it allowed).
fn samples_within(extent: f64, spacing: f64) -> f64 {
    (extent / spacing + 1e-9).floor() + 1.0
}

/// The smallest spacing, to two significant digits, at which a window
/// `size` m across takes no more than `budget` samples.
fn smallest_spacing(size: (f64, f64), budget: usize) -> f64 {
    let count = |h: f64| samples_within(size.0, h) * samples_within(size.1, h);
    let fits = |h: f64| count(h) <= budget as f64;
    // Fewer samples than the area over the spacing squared never fit.
    let mut lo = (size.0 * size.1 / budget as f64).sqrt();
    let mut hi = lo.max(1e-9);
    while !fits(hi) {
        lo = hi;
        hi *= 1.25;
    }
    for _ in 0..60 {
        let mid = 0.5 * (lo + hi);
        if fits(mid) { hi = mid } else { lo = mid }
    }
    // Up to two significant digits, which fits as well (fewer samples at
    // a wider spacing).
    let step = 10f64.powf(hi.log10().floor() - 1.0);
    let mut h = (hi / step).ceil() * step;
    while !fits(h) {
        h += step;
    }
    h
}

/// The panels' median size (longest edge), m.
fn median_panel_size(mesh: &PanelMesh) -> f64 {
    let mut sizes: Vec<f64> = mesh.panels.iter().map(|p| p.size).collect();
    sizes.sort_by(f64::total_cmp);
    sizes.get(sizes.len() / 2).copied().unwrap_or(0.0)
}

const AXES: [&str; 3] = ["x", "y", "z"];

impl SliceSection {
    /// The three axes as written, x, y, z.
    fn axes(&self) -> [Option<SliceAxis>; 3] {
        [self.x, self.y, self.z]
    }

    /// The axis (0 x, 1 y, 2 z) and position the section gives, if it
    /// gives exactly one as a number.
    fn position(&self) -> Option<(usize, f64)> {
        let given: Vec<(usize, f64)> = self
            .axes()
            .into_iter()
            .enumerate()
            .filter_map(|(k, v)| match v {
                Some(SliceAxis::At(at)) => Some((k, at)),
                _ => None,
            })
            .collect();
        match given[..] {
            [one] => Some(one),
            _ => None,
        }
    }

    /// What the user calls it: its name, or the plane (`x = 4.2 m`).
    fn label(&self) -> String {
        match (&self.name, self.position()) {
            (Some(n), _) => n.trim().to_owned(),
            (None, Some((k, at))) => format!("{} = {} m", AXES[k], short_number(at)),
            (None, None) => "slice".into(),
        }
    }

    /// File stem: the name in lower case with every run of other
    /// characters than letters and digits one hyphen, or the axis and
    /// position (`x4.2`, `y-0.45`).
    fn stem(&self) -> String {
        match (&self.name, self.position()) {
            (Some(n), _) => n
                .to_lowercase()
                .split(|c: char| !c.is_alphanumeric())
                .filter(|w| !w.is_empty())
                .collect::<Vec<_>>()
                .join("-"),
            (None, Some((k, at))) => format!("{}{}", AXES[k], short_number(at)),
            (None, None) => String::new(),
        }
    }
}

/// Check the case's `[[slice]]` sections as written: one axis a number
/// each, a finite position, ranges from low to high, a positive spacing,
/// a name that gives a file name, no two files alike and none a built-in
/// plane's.
pub fn check(slices: &[SliceSection]) -> Result<()> {
    let mut stems: Vec<String> = Vec::new();
    for (k, s) in slices.iter().enumerate() {
        let Some((_, at)) = s.position() else {
            bail!(
                "slice {} ({}): give exactly one of x, y or z as a number, the position of its plane \
                 in metres (the other two may be ranges [from, to] narrowing its window)",
                k + 1,
                s.name.as_deref().unwrap_or("no name")
            );
        };
        let label = s.label();
        if !at.is_finite() {
            bail!("slice \"{label}\": its position must be a number (got {at})");
        }
        for (axis, given) in AXES.iter().zip(s.axes()) {
            let Some(SliceAxis::Range([from, to])) = given else {
                continue;
            };
            if !(from.is_finite() && to.is_finite()) {
                bail!(
                    "slice \"{label}\": its {axis} range must be two numbers [from, to] in metres \
                     (got [{from}, {to}])"
                );
            }
            if from > to {
                bail!(
                    "slice \"{label}\": its {axis} range [{from}, {to}] runs backwards; \
                     give it as [from, to] with from below to"
                );
            }
            if from == to {
                bail!(
                    "slice \"{label}\": its {axis} range [{from}, {to}] is empty; \
                     give it as [from, to] with from below to"
                );
            }
        }
        if let Some(h) = s.spacing
            && !(h.is_finite() && h > 0.0)
        {
            bail!("slice \"{label}\": its spacing must be a length above zero in metres (got {h})");
        }
        let stem = s.stem();
        if stem.is_empty() {
            bail!(
                "slice {}: its name \"{label}\" has no letter or digit to name its files by",
                k + 1
            );
        }
        if BUILT_IN.contains(&stem.as_str()) {
            bail!(
                "slice \"{label}\": slice-{stem} is a built-in slice's file; give it another name"
            );
        }
        if stems.contains(&stem) {
            bail!("slice \"{label}\": another slice writes slice-{stem} too; give it another name");
        }
        stems.push(stem);
    }
    Ok(())
}

/// The case's planes on `mesh`, in the order written.
///
/// # Errors
/// A plane outside the window the slices span, naming the window; a range
/// wholly outside it; a window narrower than two samples; more samples
/// than [`SLICE_BUDGET`], naming the smallest spacing that fits.
pub fn placed(slices: &[SliceSection], mesh: &PanelMesh) -> Result<Vec<Plane>> {
    let w = Window::of(mesh);
    let panel_size = median_panel_size(mesh);
    slices.iter().map(|s| place(s, &w, panel_size)).collect()
}

/// One case's plane in the box `w` of a body whose panels' median size is
/// `panel_size`, as [`placed`].
fn place(s: &SliceSection, w: &Window, panel_size: f64) -> Result<Plane> {
    let label = s.label();
    let Some((k, at)) = s.position() else {
        bail!("slice \"{label}\": give exactly one of x, y or z as a number");
    };
    let [lo, hi] = w.range(k);
    if !(lo..=hi).contains(&at) {
        bail!(
            "slice \"{label}\": {} = {} m lies outside the box the flow slices span round \
             this body ({} m)",
            AXES[k],
            short_number(at),
            ranges_words(w, &[0, 1, 2])
        );
    }
    // Each range narrows the window, cut to the box where it reaches past.
    let mut window = *w;
    let mut clipped = Vec::new();
    for (j, given) in s.axes().into_iter().enumerate() {
        let Some(SliceAxis::Range([from, to])) = given else {
            continue;
        };
        let [lo, hi] = w.range(j);
        let cut = [from.max(lo), to.min(hi)];
        if !(cut[0] < cut[1]) {
            bail!(
                "slice \"{label}\": its {} range {} to {} m lies outside the box the flow slices \
                 span round this body ({} m)",
                AXES[j],
                short_number(from),
                short_number(to),
                ranges_words(w, &[j])
            );
        }
        if cut != [from, to] {
            clipped.push((j, [from, to]));
        }
        window = window.with_range(j, cut);
    }
    let mut plane = Plane::square_to(k, at, &window, s.stem(), label.clone());
    plane.clipped = clipped;
    let spacing = s.spacing.unwrap_or_else(|| default_spacing(plane.size));
    if !(spacing.is_finite() && spacing > 0.0) {
        bail!(
            "slice \"{label}\": its spacing must be a length above zero in metres (got {spacing})"
        );
    }
    let (a, b) = in_plane(k);
    for (j, extent) in [(a, plane.size.0), (b, plane.size.1)] {
        if extent < spacing {
            bail!(
                "slice \"{label}\": its window is {} m across along {}, less than its spacing \
                 ({} m), so it would take one sample across; give a wider {} range or a finer \
                 spacing",
                fine_number(extent),
                AXES[j],
                fine_number(spacing),
                AXES[j]
            );
        }
    }
    let dims = (
        samples_within(plane.size.0, spacing),
        samples_within(plane.size.1, spacing),
    );
    if dims.0 * dims.1 > SLICE_BUDGET as f64 {
        bail!(
            "slice \"{label}\": a spacing of {} m takes {} samples over its window ({} m), more \
             than the {} a slice may take; the smallest spacing that fits this window is {} m \
             (or narrow the window)",
            fine_number(spacing),
            crate::output::grouped(dims.0 * dims.1),
            ranges_words(&window, &[a, b]),
            crate::output::grouped(SLICE_BUDGET as f64),
            fine_number(smallest_spacing(plane.size, SLICE_BUDGET)),
        );
    }
    plane.spacing = spacing;
    plane.dims = (dims.0 as usize, dims.1 as usize);
    // Said where the case chose the samples (a window or a spacing of its
    // own); a plane across the whole box is sampled as the built-in ones.
    let chosen = s.spacing.is_some()
        || s.axes()
            .iter()
            .any(|a| matches!(a, Some(SliceAxis::Range(_))));
    plane.finer_than_panels = (chosen && spacing < panel_size).then_some(panel_size);
    Ok(plane)
}

/// The ranges of `w` along `axes` in words: "x -1.3 to 7, y -1.8 to 1.8".
fn ranges_words(w: &Window, axes: &[usize]) -> String {
    axes.iter()
        .map(|&j| {
            let [lo, hi] = w.range(j);
            format!("{} {} to {}", AXES[j], short_number(lo), short_number(hi))
        })
        .collect::<Vec<_>>()
        .join(", ")
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;

    fn section(name: Option<&str>, x: Option<f64>, y: Option<f64>, z: Option<f64>) -> SliceSection {
        SliceSection {
            name: name.map(str::to_owned),
            x: x.map(SliceAxis::At),
            y: y.map(SliceAxis::At),
            z: z.map(SliceAxis::At),
            spacing: None,
        }
    }

    /// A cross plane at x = 3 with ranges along y and z and a spacing.
    fn narrowed(y: Option<[f64; 2]>, z: Option<[f64; 2]>, spacing: Option<f64>) -> SliceSection {
        SliceSection {
            name: Some("roof gap".into()),
            x: Some(SliceAxis::At(3.0)),
            y: y.map(SliceAxis::Range),
            z: z.map(SliceAxis::Range),
            spacing,
        }
    }

    /// A box as a 4.5 m car's on the ground (x -1 to 6, y -2 to 2, z 0 to
    /// 2.5 m).
    const BOX: Window = Window {
        x: [-1.0, 6.0],
        y: [-2.0, 2.0],
        z: [0.0, 2.5],
    };

    fn refusal(s: &SliceSection) -> String {
        format!("{:#}", place(s, &BOX, 0.1).unwrap_err())
    }

    #[test]
    fn names_give_file_stems_and_titles() {
        let s = section(Some("Diffuser exit (rear)"), Some(4.2), None, None);
        assert_eq!(s.stem(), "diffuser-exit-rear");
        assert_eq!(s.label(), "Diffuser exit (rear)");
        let s = section(None, None, Some(-0.45), None);
        assert_eq!(s.stem(), "y-0.45");
        assert_eq!(s.label(), "y = -0.45 m");
        assert_eq!(section(None, Some(4.2), None, None).stem(), "x4.2");
        // A range beside the position leaves the name to the position.
        let mut s = narrowed(Some([-0.6, 0.6]), None, None);
        s.name = None;
        assert_eq!((s.stem(), s.label()), ("x3".into(), "x = 3 m".into()));
    }

    #[test]
    fn a_section_needs_one_axis_a_name_and_a_file_of_its_own() {
        let err = |v: &[SliceSection]| format!("{:#}", check(v).unwrap_err());
        assert!(err(&[section(None, None, None, None)]).contains("exactly one of x, y or z"));
        assert!(err(&[section(None, Some(1.0), None, Some(0.2))]).contains("exactly one"));
        assert!(err(&[section(Some("--"), Some(1.0), None, None)]).contains("no letter or digit"));
        assert!(err(&[section(Some("Centre plane"), Some(1.0), None, None)]).contains("built-in"));
        let twice = [
            section(Some("exit"), Some(1.0), None, None),
            section(Some("Exit"), Some(2.0), None, None),
        ];
        assert!(err(&twice).contains("slice-exit too"));
        assert!(err(&[section(None, Some(f64::NAN), None, None)]).contains("must be a number"));
        check(&[
            section(None, Some(1.0), None, None),
            section(Some("floor"), None, None, Some(0.05)),
        ])
        .unwrap();
    }

    #[test]
    fn ranges_and_spacing_are_checked_as_written() {
        let err = |s: SliceSection| format!("{:#}", check(&[s]).unwrap_err());
        // Every axis a range: no plane.
        let mut s = narrowed(Some([-0.6, 0.6]), Some([1.4, 2.1]), None);
        s.x = Some(SliceAxis::Range([2.0, 3.0]));
        assert_eq!(
            err(s),
            "slice 1 (roof gap): give exactly one of x, y or z as a number, the position of its \
             plane in metres (the other two may be ranges [from, to] narrowing its window)"
        );
        assert_eq!(
            err(narrowed(Some([0.6, -0.6]), None, None)),
            "slice \"roof gap\": its y range [0.6, -0.6] runs backwards; give it as [from, to] \
             with from below to"
        );
        assert_eq!(
            err(narrowed(None, Some([1.4, 1.4]), None)),
            "slice \"roof gap\": its z range [1.4, 1.4] is empty; give it as [from, to] with from \
             below to"
        );
        assert!(err(narrowed(None, Some([1.4, f64::INFINITY]), None)).contains("two numbers"));
        for h in [0.0, -0.005, f64::NAN] {
            assert!(
                err(narrowed(None, None, Some(h)))
                    .starts_with("slice \"roof gap\": its spacing must be a length above zero"),
                "{h}"
            );
        }
        check(&[narrowed(Some([-0.6, 0.6]), Some([1.4, 2.1]), Some(0.005))]).unwrap();
    }

    #[test]
    fn a_case_file_gives_a_position_or_a_range_on_each_axis() {
        #[derive(Deserialize)]
        struct File {
            slice: Vec<SliceSection>,
        }
        let f: File = toml::from_str(
            "[[slice]]\nx = 3\ny = [-0.6, 0.6]\nz = [1.4, 2.1]\nspacing = 0.005\n\
             [[slice]]\nz = 0.05\n",
        )
        .unwrap();
        assert_eq!(f.slice[0], narrowed_unnamed());
        assert_eq!(f.slice[1].z, Some(SliceAxis::At(0.05)));
        // Written back as read, with no spacing where none was given
        // (a kept result's case compares equal to the file's).
        let v = serde_json::to_value(&f.slice[0]).unwrap();
        assert_eq!(v["y"], serde_json::json!([-0.6, 0.6]));
        assert_eq!(v["x"], serde_json::json!(3.0));
        let v = serde_json::to_value(&f.slice[1]).unwrap();
        assert!(v.get("spacing").is_none());
        assert!(v["x"].is_null());
        for bad in ["y = [1.0]", "y = [1.0, 2.0, 3.0]", "y = \"wide\""] {
            let e = toml::from_str::<File>(&format!("[[slice]]\nx = 3\n{bad}\n"))
                .err()
                .unwrap();
            assert!(e.message().contains("[from, to]"), "{bad}: {}", e.message());
        }
    }

    fn narrowed_unnamed() -> SliceSection {
        let mut s = narrowed(Some([-0.6, 0.6]), Some([1.4, 2.1]), Some(0.005));
        s.name = None;
        s
    }

    #[test]
    fn a_cross_plane_is_seen_from_behind_across_the_window() {
        let w = BOX;
        let p = Plane::square_to(0, 4.2, &w, "x4.2".into(), "x = 4.2 m".into());
        assert_eq!(p.origin, Point3::new(4.2, -2.0, 0.0));
        assert_eq!(p.axes, (Vector3::y(), Vector3::z()));
        assert_eq!(p.size, (4.0, 2.5));
        // 110 spacings along the longer side, the nearest whole number
        // along the other: 2.5 / (4 / 110) = 68.75.
        assert_eq!(p.dims, (111, 70));
        assert!((p.spacing - 4.0 / 110.0).abs() < 1e-15);
        // Seen from behind (looking along -x, z up), +y is to the right.
        let right = (-Vector3::x()).cross(&Vector3::z());
        assert_eq!(right, p.axes.0);
        assert_eq!(p.words(), "plane x = 4.2 m, seen from behind");
        let p = Plane::square_to(2, 0.1, &w, "z".into(), "z".into());
        assert_eq!(p.origin, Point3::new(-1.0, -2.0, 0.1));
        assert_eq!(p.axes, (Vector3::x(), Vector3::y()));
        assert_eq!(p.size, (7.0, 4.0));
        assert_eq!(p.words(), "plane z = 0.1 m, seen from above");
    }

    #[test]
    fn ranges_narrow_the_window_and_the_spacing_is_as_asked() {
        let s = narrowed(Some([-0.6, 0.6]), Some([1.4, 2.1]), Some(0.005));
        let p = place(&s, &BOX, 0.1).unwrap();
        assert_eq!(p.origin, Point3::new(3.0, -0.6, 1.4));
        assert!((p.size.0 - 1.2).abs() < 1e-12 && (p.size.1 - 0.7).abs() < 1e-12);
        assert_eq!(p.spacing, 0.005);
        // 1.2 / 0.005 + 1 and 0.7 / 0.005 + 1: the last sample on each
        // side lies at the window's end, not past it.
        assert_eq!(p.dims, (241, 141));
        assert_eq!(
            p.grid_words(),
            "y -0.6 to 0.6 m, z 1.4 to 2.1 m, 241 x 141 samples 0.005 m apart"
        );
        assert!(p.clipped.is_empty());
        // Closer than the panels: said so.
        assert_eq!(p.finer_than_panels, Some(0.1));
        assert!(
            p.resolution_words()
                .unwrap()
                .starts_with("The samples lie closer together than the panels (median size 0.1 m)")
        );
        // A spacing that does not divide the window: every sample within.
        let p = place(&narrowed(None, Some([1.4, 2.1]), Some(0.03)), &BOX, 0.01).unwrap();
        assert_eq!(p.dims, (134, 24));
        let last = |n: usize| (n - 1) as f64 * p.spacing;
        assert!(last(p.dims.0) <= p.size.0 && last(p.dims.1) <= p.size.1);
        assert!(last(p.dims.0 + 1) > p.size.0 && last(p.dims.1 + 1) > p.size.1);
        assert_eq!(p.finer_than_panels, None);
        assert_eq!(p.resolution_words(), None);
        // Across the whole box at the built-in rule, sampled as the
        // built-in planes are, it says nothing of the panels.
        let p = place(&narrowed(None, None, None), &BOX, 1.0).unwrap();
        assert!(p.spacing < 1.0 && p.finer_than_panels.is_none());
        // No spacing: 110 along the narrowed window's longer side.
        let p = place(&narrowed(Some([-0.6, 0.6]), None, None), &BOX, 0.01).unwrap();
        assert!((p.spacing - 2.5 / 110.0).abs() < 1e-15);
        assert_eq!(p.dims, (53, 111));
        // A y or z plane narrows along x too.
        let s = SliceSection {
            name: None,
            x: Some(SliceAxis::Range([2.5, 4.0])),
            y: Some(SliceAxis::At(0.0)),
            z: Some(SliceAxis::Range([1.0, 2.0])),
            spacing: Some(0.01),
        };
        let p = place(&s, &BOX, 0.1).unwrap();
        assert_eq!(p.origin, Point3::new(2.5, 0.0, 1.0));
        assert_eq!(p.dims, (151, 101));
    }

    #[test]
    fn a_range_reaching_past_the_box_is_cut_to_it_and_said_so() {
        let p = place(&narrowed(None, Some([1.4, 3.0]), Some(0.01)), &BOX, 0.1).unwrap();
        assert_eq!(p.origin.z, 1.4);
        assert!((p.size.1 - 1.1).abs() < 1e-12);
        assert_eq!(p.clipped, vec![(2, [1.4, 3.0])]);
        assert_eq!(
            p.grid_words(),
            "y -2 to 2 m, z 1.4 to 2.5 m (asked 1.4 to 3, cut to the box the slices span), \
             401 x 111 samples 0.01 m apart"
        );
    }

    #[test]
    fn a_plane_that_cannot_be_sampled_is_refused_in_one_sentence() {
        // A range wholly outside the box.
        assert_eq!(
            refusal(&narrowed(Some([2.5, 3.0]), None, None)),
            "slice \"roof gap\": its y range 2.5 to 3 m lies outside the box the flow slices span \
             round this body (y -2 to 2 m)"
        );
        // Touching it is no window either.
        assert!(refusal(&narrowed(None, Some([-1.0, 0.0]), None)).contains("lies outside the box"));
        // The position outside, as before.
        let mut s = narrowed(None, None, None);
        s.x = Some(SliceAxis::At(9.0));
        assert_eq!(
            refusal(&s),
            "slice \"roof gap\": x = 9 m lies outside the box the flow slices span round this body \
             (x -1 to 6, y -2 to 2, z 0 to 2.5 m)"
        );
        // Narrower than one spacing: one sample across.
        assert_eq!(
            refusal(&narrowed(None, Some([1.4, 1.42]), Some(0.05))),
            "slice \"roof gap\": its window is 0.02 m across along z, less than its spacing \
             (0.05 m), so it would take one sample across; give a wider z range or a finer spacing"
        );
        // Over the budget: 801 x 501 samples at 5 mm over the whole box.
        let e = refusal(&narrowed(None, None, Some(0.005)));
        assert!(
            e.starts_with(
                "slice \"roof gap\": a spacing of 0.005 m takes 401,301 samples over its window \
                 (y -2 to 2, z 0 to 2.5 m), more than the 250,000 a slice may take; the smallest \
                 spacing that fits this window is 0.0064 m (or narrow the window)"
            ),
            "{e}"
        );
    }

    #[test]
    fn the_smallest_spacing_named_fits_and_a_finer_one_does_not() {
        for size in [(4.0, 2.5), (8.5, 2.4), (1.2, 0.7), (0.3, 20.0)] {
            let h = smallest_spacing(size, SLICE_BUDGET);
            let count = |h: f64| samples_within(size.0, h) * samples_within(size.1, h);
            assert!(count(h) <= SLICE_BUDGET as f64, "{size:?}: {h}");
            // Two significant digits: a step less no longer fits.
            let step = 10f64.powf(h.log10().floor() - 1.0);
            assert!(count(h - step) > SLICE_BUDGET as f64, "{size:?}: {h}");
        }
    }

    #[test]
    fn small_spacings_keep_their_digits() {
        assert_eq!(fine_number(0.0025), "0.0025");
        assert_eq!(fine_number(4.0 / 110.0), "0.0364");
        assert_eq!(fine_number(0.005), "0.005");
        assert_eq!(fine_number(0.25), "0.25");
        assert_eq!(crate::output::grouped(401_301.0), "401,301");
        assert_eq!(crate::output::grouped(250_000.0), "250,000");
        assert_eq!(crate::output::grouped(999.0), "999");
    }
}
