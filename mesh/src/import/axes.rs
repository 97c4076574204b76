//! The file's axes against tuft's: x downstream from the nose, z up. CAD
//! and scanner exports often differ: vehicle axes after ISO 8855 point x
//! forward (the nose at +x), and many exports put y up.

use crate::{Point, TriMesh};

/// How the file's axes lie against tuft's.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize)]
pub struct FileAxes {
    /// The nose points towards +x in the file (ISO 8855 vehicle axes),
    /// not towards -x.
    pub nose_plus_x: bool,
    /// y is up in the file, not z.
    pub y_up: bool,
}

/// How [`FileAxes::places_note`] starts, for telling it from other notes.
pub const PLACES_NOTE_START: &str = "the file's axes (";

impl FileAxes {
    /// The signs of the turn into tuft's axes: tuft's x is `along` times
    /// the file's, tuft's y `side` times the file's side axis (y, or z when
    /// y is up): the sign that makes the turn a rotation, or, for a half
    /// mirrored onto y >= 0 (`mirrored`), the other.
    fn signs(&self, mirrored: bool) -> (f64, f64) {
        let along = if self.nose_plus_x { -1.0 } else { 1.0 };
        let swapped = if self.y_up { -1.0 } else { 1.0 };
        let rotation_sign = along * swapped;
        (
            along,
            if mirrored {
                -rotation_sign
            } else {
                rotation_sign
            },
        )
    }

    /// True when the file's axes are tuft's already.
    pub fn is_identity(&self) -> bool {
        !self.nose_plus_x && !self.y_up
    }

    /// Turn `mesh` into tuft's axes. Length and height are fixed by the
    /// settings; the side-to-side axis takes the sign that makes the
    /// change a rotation, except for a half model (`half`), whose half
    /// must land on y >= 0: there the sign follows the side the body lies
    /// on and, where that makes the change a mirror image, the facets are
    /// turned round so that their normals still point out. True when the
    /// half was mirrored so: a half of the car's left side, in y <= 0 once
    /// turned into tuft's axes (where y points right seen from the seat),
    /// whatever side of the file's own axes it lies on. A whole body (reaching both sides by at
    /// least [`crate::cut::WHOLE_SIDE_SHARE`] of its width) is only
    /// rotated, as without `half`: it is cut at y = 0 later.
    pub fn apply(&self, mesh: &mut TriMesh, half: bool) -> bool {
        // The sign of the side axis that makes the map a rotation: the
        // determinant of x' = along x, y' = s side, z' = up.
        let (along, rotation_sign) = self.signs(false);
        // (x, up, side) of a file point.
        let parts = |p: &Point| {
            if self.y_up {
                (p.x, p.y, p.z)
            } else {
                (p.x, p.z, p.y)
            }
        };
        let (lo, hi) = mesh.vertices.iter().fold((0.0f64, 0.0f64), |(lo, hi), p| {
            let s = rotation_sign * parts(p).2;
            (lo.min(s), hi.max(s))
        });
        let share = crate::cut::WHOLE_SIDE_SHARE * (hi - lo);
        let whole = -lo >= share && hi >= share;
        let mirrored = half && !whole && hi < -lo;
        if self.is_identity() && !mirrored {
            return false;
        }
        let (_, side_sign) = self.signs(mirrored);
        mesh.map_vertices(|p| {
            let (x, up, side) = parts(&p);
            Point::new(along * x, side_sign * side, up)
        });
        if mirrored {
            for t in &mut mesh.triangles {
                t.swap(1, 2);
            }
        }
        mirrored
    }

    /// What the turn into tuft's axes means for a reader of the file
    /// (`None` for a file in tuft's axes): which half of the file a half
    /// model (`half`; `mirrored` as [`FileAxes::apply`] returned) is, and
    /// how a place named in tuft's axes reads in the file's (a review's
    /// half model exported nose +x was told neither, and read "x 3.58,
    /// y 0.32" as a place in its file's axes).
    pub fn places_note(&self, half: bool, mirrored: bool) -> Option<String> {
        if self.is_identity() {
            return None;
        }
        let (along, side_sign) = self.signs(mirrored);
        let (side, up) = if self.y_up { ("z", "y") } else { ("y", "z") };
        let sign = |s: f64, axis: &str| {
            if s < 0.0 {
                format!("-{axis}")
            } else {
                axis.to_owned()
            }
        };
        let nose = if self.nose_plus_x { "+x" } else { "-x" };
        let half_words = if half {
            // Tuft's y >= 0 is the car's right (seen from the driver's
            // seat); the file's half is the side that lands there, or,
            // mirrored, its image.
            let file_side = if side_sign > 0.0 { ">=" } else { "<=" };
            if mirrored {
                format!(
                    "; the half model, the file's {side} {file_side} 0 half mirrored, is the car's left side run \
                     as its mirror image, the right side in y >= 0"
                )
            } else {
                format!(
                    "; the half model, the file's {side} {file_side} 0 half, is the car's right side, in y >= 0"
                )
            }
        } else {
            String::new()
        };
        Some(format!(
            "{PLACES_NOTE_START}nose at {nose}, {up} up) were turned into tuft's (nose at -x, z up, y to the right \
             seen from the driver's seat){half_words}: every place named here (and in panels.csv, the VTK \
             files and the pictures) is in tuft's axes, in metres; in the file's axes x is {}, {side} is {} and \
             {up} is z",
            sign(along, "x"),
            sign(side_sign, "y"),
        ))
    }

    /// Undo [`FileAxes::apply`]: turn `mesh` from tuft's axes back into
    /// the file's, `mirrored` as `apply` returned (a left half is put back
    /// on its own side, its facets turned round again), so that panels
    /// written out lie over the file they came from.
    pub fn restore(&self, mesh: &mut TriMesh, mirrored: bool) {
        if self.is_identity() && !mirrored {
            return;
        }
        let (along, side_sign) = self.signs(mirrored);
        let y_up = self.y_up;
        mesh.map_vertices(|p| {
            // Each sign is its own inverse.
            let (x, side, up) = (along * p.x, side_sign * p.y, p.z);
            if y_up {
                Point::new(x, up, side)
            } else {
                Point::new(x, side, up)
            }
        });
        if mirrored {
            for t in &mut mesh.triangles {
                t.swap(1, 2);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;

    /// The places note gives the file's coordinates of a point in tuft's
    /// axes, for every setting of the axes and either half; a half model
    /// exported nose +x with its y <= 0 half is the car's right side.
    #[test]
    fn the_places_note_reads_tuft_axes_back_into_the_file() {
        assert_eq!(FileAxes::default().places_note(true, false), None);
        for nose_plus_x in [false, true] {
            for y_up in [false, true] {
                for side in [-1.0, 1.0] {
                    let axes = FileAxes { nose_plus_x, y_up };
                    // A tetrahedron on one side of the file's side axis.
                    let off = if y_up {
                        Point::new(1.0, 0.5, 2.0 * side)
                    } else {
                        Point::new(1.0, 2.0 * side, 0.5)
                    };
                    let mut m = tetra(off);
                    let file = m.vertices[0];
                    let mirrored = axes.apply(&mut m, true);
                    let p = m.vertices[0];
                    assert!(p.y > 0.0, "{axes:?} {side}");
                    let Some(note) = axes.places_note(true, mirrored) else {
                        assert!(axes.is_identity());
                        continue;
                    };
                    // "in the file's axes x is -x, y is -y and z is z"
                    let tail = note.split("in the file's axes ").nth(1).unwrap();
                    let words: Vec<&str> =
                        tail.split([' ', ',']).filter(|w| !w.is_empty()).collect();
                    let value = |w: &str| match w.trim_start_matches('-') {
                        "x" => p.x,
                        "y" => p.y,
                        _ => p.z,
                    } * if w.starts_with('-') { -1.0 } else { 1.0 };
                    let file_of = |axis: &str| match axis {
                        "x" => file.x,
                        "y" => file.y,
                        _ => file.z,
                    };
                    for k in [0, 3, 7] {
                        assert_eq!(words[k + 1], "is", "{note}");
                        assert_eq!(value(words[k + 2]), file_of(words[k]), "{note}");
                    }
                }
            }
        }
        let nose = FileAxes {
            nose_plus_x: true,
            y_up: false,
        };
        let note = nose.places_note(true, false).unwrap();
        assert!(
            note.contains("the file's y <= 0 half, is the car's right side"),
            "{note}"
        );
    }

    /// A right-angled corner tetrahedron off the origin, closed and outward.
    fn tetra(offset: Point) -> TriMesh {
        let v = [
            Point::new(0.0, 0.0, 0.0),
            Point::new(1.0, 0.0, 0.0),
            Point::new(0.0, 1.0, 0.0),
            Point::new(0.0, 0.0, 1.0),
        ]
        .map(|p| p + offset.coords)
        .to_vec();
        TriMesh::new(v, vec![[0, 2, 1], [0, 1, 3], [0, 3, 2], [1, 2, 3]]).unwrap()
    }

    #[test]
    fn restore_puts_every_setting_back_on_the_file() {
        for offset in [Point::new(2.0, 3.0, 4.0), Point::new(2.0, -3.0, -4.0)] {
            let body = tetra(offset);
            for (nose_plus_x, y_up) in [(false, false), (true, false), (false, true), (true, true)]
            {
                for half in [false, true] {
                    let axes = FileAxes { nose_plus_x, y_up };
                    let mut m = body.clone();
                    let mirrored = axes.apply(&mut m, half);
                    axes.restore(&mut m, mirrored);
                    assert_eq!(m.vertices, body.vertices, "{axes:?} half {half}");
                    assert_eq!(m.triangles, body.triangles, "{axes:?} half {half}");
                }
            }
        }
    }

    #[test]
    fn each_setting_is_a_rotation_that_keeps_the_volume_outward() {
        let body = tetra(Point::new(2.0, 3.0, 4.0));
        let volume = body.signed_volume();
        assert!(volume > 0.0);
        for (nose_plus_x, y_up) in [(true, false), (false, true), (true, true)] {
            let mut m = body.clone();
            FileAxes { nose_plus_x, y_up }.apply(&mut m, false);
            approx::assert_relative_eq!(m.signed_volume(), volume, epsilon = 1e-12);
            let p = m.vertices[0];
            // The length axis flips with the nose; the up axis is the file's.
            assert_eq!(p.x, if nose_plus_x { -2.0 } else { 2.0 });
            assert_eq!(p.z, if y_up { 3.0 } else { 4.0 });
        }
    }

    #[test]
    fn a_half_model_stays_on_the_positive_side_and_outward() {
        // The y >= 0 half in ISO 8855 axes (nose at +x, y to the left).
        let body = tetra(Point::new(2.0, 0.0, 4.0));
        let mut m = body.clone();
        let mirrored = FileAxes {
            nose_plus_x: true,
            y_up: false,
        }
        .apply(&mut m, true);
        // The file's y >= 0 half is the car's left side there (ISO 8855's y
        // points left): in tuft's axes it is mirrored onto the right.
        assert!(mirrored);
        assert!(m.vertices.iter().all(|p| p.y >= 0.0));
        approx::assert_relative_eq!(m.signed_volume(), body.signed_volume(), epsilon = 1e-12);
    }

    /// A half in y <= 0 in tuft's own axes lands on y >= 0 as its mirror
    /// image, outward; a whole body is left as it is, and a right half
    /// too.
    #[test]
    fn a_left_half_is_mirrored_onto_the_positive_side() {
        let right = tetra(Point::new(2.0, 0.0, 4.0));
        let mut left = right.clone();
        left.map_vertices(|p| Point::new(p.x, -p.y, p.z));
        for t in &mut left.triangles {
            t.swap(1, 2);
        }
        let mut m = left.clone();
        assert!(FileAxes::default().apply(&mut m, true));
        assert_eq!(m.vertices, right.vertices);
        approx::assert_relative_eq!(m.signed_volume(), right.signed_volume(), epsilon = 1e-12);
        let mut m = right.clone();
        assert!(!FileAxes::default().apply(&mut m, true));
        assert_eq!(m.vertices, right.vertices);
        // Not declared a half: left as it is (the run refuses nothing, as
        // without mirror).
        let mut m = left.clone();
        assert!(!FileAxes::default().apply(&mut m, false));
        assert_eq!(m.vertices, left.vertices);
        // A whole body, a little wider on -y, is not mirrored.
        let whole = tetra(Point::new(2.0, -0.6, 4.0));
        let mut m = whole.clone();
        assert!(!FileAxes::default().apply(&mut m, true));
        assert_eq!(m.vertices, whole.vertices);
    }
}
