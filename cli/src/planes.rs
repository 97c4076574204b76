//! Where the flow slices lie: the box round the body they span, the
//! built-in planes and the ones a case asks for (`[[slice]]`).
//!
//! The built-in planes are fixed (the centre plane, a horizontal plane
//! through the middle of the body and, over the ground, one under it); a
//! review's diffuser study wanted the flow across the diffuser's exit,
//! which none of them shows, so a case can add planes square to one axis
//! anywhere in the same box.

use anyhow::{Result, bail};
use nalgebra::{Point3, Vector3};
use serde::{Deserialize, Serialize};
use tuft_mesh::PanelMesh;

use crate::output::short_number;

/// `[[slice]]` as written: one more flow slice, on the plane where one of
/// `x`, `y` or `z` takes the given value (m, tuft's axes).
#[derive(Debug, Clone, Deserialize, Serialize, PartialEq, Default)]
#[serde(deny_unknown_fields)]
pub struct SliceSection {
    /// Name for the picture's title and the file names (absent: named
    /// after the plane, as `x = 4.2 m` in `slice-x4.2.png`).
    pub name: Option<String>,
    /// A plane across the stream at this x, seen from behind.
    pub x: Option<f64>,
    /// A plane along the stream at this y, seen from the side (-y).
    pub y: Option<f64>,
    /// A horizontal plane at this z, seen from above.
    pub z: Option<f64>,
}

/// The names of the built-in planes' files, which a case's planes may not
/// take.
pub const BUILT_IN: [&str; 3] = ["centre-plane", "horizontal-plane", "underbody-plane"];

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
}

/// One plane to sample, ready for the grid: file stem, title, the corner
/// of sample (0, 0), the two in-plane axes (i to the right, j up on the
/// picture) and the extent along each, m.
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
    /// Extent along i and along j, m.
    pub size: (f64, f64),
}

impl Plane {
    /// The plane where coordinate `k` (0 x, 1 y, 2 z) equals `at`, across
    /// the whole window: x planes seen from behind (y to the right, z up),
    /// y planes from the side (x to the right), z planes from above.
    pub fn square_to(k: usize, at: f64, w: &Window, stem: String, title: String) -> Self {
        let (a, b) = match k {
            0 => (1, 2),
            1 => (0, 2),
            _ => (0, 1),
        };
        let unit = |i: usize| Vector3::ith(i, 1.0);
        let mut origin = Point3::new(w.x[0], w.y[0], w.z[0]);
        origin[k] = at;
        let (ra, rb) = (w.range(a), w.range(b));
        Self {
            stem,
            title,
            origin,
            axes: (unit(a), unit(b)),
            size: (ra[1] - ra[0], rb[1] - rb[0]),
        }
    }

    /// Where the plane lies and how the picture sees it, in words:
    /// "plane x = 4.3 m, seen from behind".
    pub fn words(&self) -> String {
        let n = self.axes.0.cross(&self.axes.1);
        let k = (0..3)
            .max_by(|&a, &b| n[a].abs().total_cmp(&n[b].abs()))
            .unwrap_or(0);
        let view = ["seen from behind", "seen from the side", "seen from above"][k];
        format!(
            "plane {} = {} m, {view}",
            AXES[k],
            short_number(self.origin[k])
        )
    }
}

const AXES: [&str; 3] = ["x", "y", "z"];

impl SliceSection {
    /// The axis (0 x, 1 y, 2 z) and position the section gives, if it
    /// gives exactly one.
    fn position(&self) -> Option<(usize, f64)> {
        let given: Vec<(usize, f64)> = [self.x, self.y, self.z]
            .into_iter()
            .enumerate()
            .filter_map(|(k, v)| v.map(|v| (k, v)))
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

/// Check the case's `[[slice]]` sections as written: one axis each, a
/// finite position, a name that gives a file name, no two files alike and
/// none a built-in plane's.
pub fn check(slices: &[SliceSection]) -> Result<()> {
    let mut stems: Vec<String> = Vec::new();
    for (k, s) in slices.iter().enumerate() {
        let Some((_, at)) = s.position() else {
            bail!(
                "slice {} ({}): give exactly one of x, y or z, the position of its plane in metres",
                k + 1,
                s.name.as_deref().unwrap_or("no name")
            );
        };
        let label = s.label();
        if !at.is_finite() {
            bail!("slice \"{label}\": its position must be a number (got {at})");
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
/// A plane outside the window the slices span, naming the window.
pub fn placed(slices: &[SliceSection], mesh: &PanelMesh) -> Result<Vec<Plane>> {
    let w = Window::of(mesh);
    slices
        .iter()
        .map(|s| {
            let label = s.label();
            let Some((k, at)) = s.position() else {
                bail!("slice \"{label}\": give exactly one of x, y or z");
            };
            let [lo, hi] = w.range(k);
            if !(lo..=hi).contains(&at) {
                bail!(
                    "slice \"{label}\": {} = {} m lies outside the box the flow slices span round \
                     this body (x {} to {}, y {} to {}, z {} to {} m)",
                    AXES[k],
                    short_number(at),
                    short_number(w.x[0]),
                    short_number(w.x[1]),
                    short_number(w.y[0]),
                    short_number(w.y[1]),
                    short_number(w.z[0]),
                    short_number(w.z[1]),
                );
            }
            Ok(Plane::square_to(k, at, &w, s.stem(), label))
        })
        .collect()
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;

    fn section(name: Option<&str>, x: Option<f64>, y: Option<f64>, z: Option<f64>) -> SliceSection {
        SliceSection {
            name: name.map(str::to_owned),
            x,
            y,
            z,
        }
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
    fn a_cross_plane_is_seen_from_behind_across_the_window() {
        let w = Window {
            x: [-1.0, 6.0],
            y: [-2.0, 2.0],
            z: [0.0, 2.5],
        };
        let p = Plane::square_to(0, 4.2, &w, "x4.2".into(), "x = 4.2 m".into());
        assert_eq!(p.origin, Point3::new(4.2, -2.0, 0.0));
        assert_eq!(p.axes, (Vector3::y(), Vector3::z()));
        assert_eq!(p.size, (4.0, 2.5));
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
}
