//! Mirror planes: the ground plane `z = h` and the symmetry plane `y = 0`.
//!
//! A body cut by a mirror plane is closed by its image. The panel method
//! adds image panels (the body reflected in each plane, and in both) to every
//! influence; this module only says where the images are.

use crate::{Point, Vector};

/// Which mirror planes the case declares.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Mirrors {
    /// Height of the ground plane `z = h`, metres; `None` in free air.
    pub ground: Option<f64>,
    /// True for a half model: the STL holds the `y >= 0` half, cut at `y = 0`.
    pub symmetry: bool,
}

/// One reflection (or the product of two): `p -> S p + o`, `S` diagonal.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Reflection {
    /// Diagonal of `S` (each entry +1 or -1).
    pub scale: Vector,
    /// Offset `o`.
    pub offset: Vector,
}

impl Reflection {
    /// Image of a point.
    pub fn point(&self, p: &Point) -> Point {
        Point::from(p.coords.component_mul(&self.scale) + self.offset)
    }

    /// Image of a free vector (normals, velocities).
    pub fn vector(&self, v: &Vector) -> Vector {
        v.component_mul(&self.scale)
    }

    /// True when the map reverses orientation (one plane, determinant -1):
    /// image triangles then need their vertex order reversed to keep normals
    /// pointing out of the image body.
    pub fn reverses_orientation(&self) -> bool {
        self.scale.x * self.scale.y * self.scale.z < 0.0
    }
}

impl Mirrors {
    /// How many times the solved surface the whole body is: 2 for a half
    /// model, 1 otherwise (areas and loads of the panels scale by it).
    pub fn whole_body_factor(&self) -> f64 {
        if self.symmetry { 2.0 } else { 1.0 }
    }

    /// The whole body's width across y from the solved surface's extent
    /// `lo`..`hi`: twice the half's reach from y = 0 for a half model.
    pub fn whole_width(&self, lo: &crate::Point, hi: &crate::Point) -> f64 {
        if self.symmetry {
            2.0 * hi.y.max(-lo.y)
        } else {
            hi.y - lo.y
        }
    }

    /// Free air, full model.
    pub fn none() -> Self {
        Self::default()
    }

    /// Ground plane at height `z`.
    pub fn ground(z: f64) -> Self {
        Self {
            ground: Some(z),
            symmetry: false,
        }
    }

    /// Every image of the real body: zero, one or three reflections.
    pub fn images(&self) -> Vec<Reflection> {
        let ground = self.ground.map(|h| Reflection {
            scale: Vector::new(1.0, 1.0, -1.0),
            offset: Vector::new(0.0, 0.0, 2.0 * h),
        });
        let sym = self.symmetry.then_some(Reflection {
            scale: Vector::new(1.0, -1.0, 1.0),
            offset: Vector::zeros(),
        });
        let mut out = Vec::new();
        out.extend(ground);
        out.extend(sym);
        if let (Some(g), Some(s)) = (ground, sym) {
            out.push(Reflection {
                scale: g.scale.component_mul(&s.scale),
                offset: g.offset + s.offset,
            });
        }
        out
    }

    /// Is point `p` on one of the declared planes, within `tol` metres?
    pub fn on_plane(&self, p: &Point, tol: f64) -> bool {
        self.ground.is_some_and(|h| (p.z - h).abs() <= tol) || (self.symmetry && p.y.abs() <= tol)
    }
}

/// A half model's surface (its open border on `y = 0`) and its mirror
/// image joined into a whole body: the image's facets turned round so that
/// their normals point out, and each image vertex within `tol` of the
/// plane merged into its original, set on the plane, so that the two
/// halves share their border.
pub fn whole_from_half(half: &crate::TriMesh, tol: f64) -> crate::TriMesh {
    let n = half.vertices.len();
    let on_plane: Vec<bool> = half.vertices.iter().map(|p| p.y.abs() <= tol).collect();
    let mut vertices = half.vertices.clone();
    for (p, &on) in vertices.iter_mut().zip(&on_plane) {
        if on {
            p.y = 0.0;
        }
    }
    // The image's vertex for each original: itself on the plane, a new one
    // off it.
    let mut image = Vec::with_capacity(n);
    for k in 0..n {
        if on_plane[k] {
            image.push(k as u32);
        } else {
            let p = vertices[k];
            image.push(vertices.len() as u32);
            vertices.push(Point::new(p.x, -p.y, p.z));
        }
    }
    let mut triangles = half.triangles.clone();
    triangles.extend(half.triangles.iter().map(|t| {
        [
            image[t[0] as usize],
            image[t[2] as usize],
            image[t[1] as usize],
        ]
    }));
    crate::TriMesh {
        vertices,
        triangles,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn both_planes_make_three_images() {
        let m = Mirrors {
            ground: Some(-0.5),
            symmetry: true,
        };
        let imgs = m.images();
        assert_eq!(imgs.len(), 3);
        let p = Point::new(1.0, 2.0, 3.0);
        assert_eq!(imgs[0].point(&p), Point::new(1.0, 2.0, -4.0));
        assert_eq!(imgs[1].point(&p), Point::new(1.0, -2.0, 3.0));
        assert_eq!(imgs[2].point(&p), Point::new(1.0, -2.0, -4.0));
        assert!(imgs[0].reverses_orientation());
        assert!(!imgs[2].reverses_orientation());
    }
}
