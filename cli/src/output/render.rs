//! Orthographic pictures of the body: z-buffered flat-shaded triangles,
//! coloured per panel, with Lambert shading so the shape reads.
//!
//! Views (x downstream, z up): [`View::Side`] from -y (nose to the left)
//! and [`View::SideFromRight`] from +y (nose to the right), the lee side
//! first in a cross wind ([`View::sheet`]),
//! [`View::Top`] from +z, [`View::Underneath`] from -z, [`View::Front`]
//! from -x looking downstream and [`View::Rear`] from +x looking upstream. A half model (symmetry plane declared) is drawn
//! whole: its mirror image across y = 0 carries the same values.
//!
//! Shading: `ambient + (1 - ambient) max(0, n . l)` (Lambert's cosine law,
//! Lambert 1760; as in Foley et al., *Computer Graphics*, 2nd ed., eq. 16.1)
//! with a light from over the viewer's left shoulder, so faces toward the
//! viewer keep nearly their true colour.

use nalgebra::Vector3;
use tuft_mesh::{PanelMesh, Point};

use super::canvas::{Canvas, Rgb, WHITE};
use super::colorbar::hatch;

/// Colour of the body outline.
const OUTLINE: Rgb = [60, 62, 70];

/// One of the standard views.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum View {
    /// From -y looking at +y; x to the right (nose left), z up.
    Side,
    /// From +y looking at -y; x to the left (nose right), z up: the lee
    /// side when the wind comes from -y (positive yaw).
    SideFromRight,
    /// From +z looking down; x to the right, y up.
    Top,
    /// From -z looking up; x to the right, -y up.
    Underneath,
    /// From -x looking downstream; -y to the right, z up.
    Front,
    /// From +x looking upstream; y to the right, z up.
    Rear,
}

impl View {
    /// The views in sheet order.
    pub const ALL: [View; 5] = [
        View::Side,
        View::Top,
        View::Underneath,
        View::Front,
        View::Rear,
    ];

    /// The views of a sheet at `yaw_deg`, in sheet order: straight ahead
    /// [`View::ALL`]; in a cross wind both sides, the lee side first,
    /// where a cross wind's separation lies (from +y for a positive yaw,
    /// whose wind blows towards +y; from -y for a negative one), then the
    /// windward side (a review's van at 15 degrees showed its windward
    /// flank edge-on only, with suction all along it).
    pub fn sheet(yaw_deg: f64) -> Vec<View> {
        if yaw_deg == 0.0 {
            return View::ALL.to_vec();
        }
        let [lee, windward] = if yaw_deg > 0.0 {
            [View::SideFromRight, View::Side]
        } else {
            [View::Side, View::SideFromRight]
        };
        vec![
            lee,
            windward,
            View::Top,
            View::Underneath,
            View::Front,
            View::Rear,
        ]
    }

    /// The label printed above the view on a sheet at `yaw_deg`: a yawed
    /// run's side views are named the lee and the windward side.
    pub fn label_at(self, yaw_deg: f64) -> String {
        if self.is_side() && yaw_deg != 0.0 {
            let lee = (yaw_deg > 0.0) == (self == View::SideFromRight);
            let which = if lee { "lee" } else { "windward" };
            format!("{}: the {which} side", self.label())
        } else {
            self.label().to_owned()
        }
    }

    /// The free stream's direction on the screen (right, down), unit, at
    /// `yaw_deg`; `None` for the front and rear views, which it crosses.
    pub fn flow_direction(self, yaw_deg: f64) -> Option<(f64, f64)> {
        let yaw = yaw_deg.to_radians();
        match self {
            View::Side => Some((1.0, 0.0)),
            View::SideFromRight => Some((-1.0, 0.0)),
            View::Top => Some((yaw.cos(), -yaw.sin())),
            View::Underneath => Some((yaw.cos(), yaw.sin())),
            View::Front | View::Rear => None,
        }
    }

    /// True for the two side views.
    pub fn is_side(self) -> bool {
        matches!(self, View::Side | View::SideFromRight)
    }

    /// Label printed above the view.
    pub fn label(self) -> &'static str {
        match self {
            View::Side => "Side, from \u{2212}y (nose left)",
            View::SideFromRight => "Side, from +y (nose right)",
            // +y is the car's right (seen from the seat): where it lies on
            // each view, so a yawed run's windward and lee sides can be
            // told apart in every view.
            View::Top => "Top, from +z (+y up)",
            View::Underneath => "Underneath, from \u{2212}z (+y down)",
            View::Front => "Front, from \u{2212}x (+y left)",
            View::Rear => "Rear, from +x (+y right)",
        }
    }

    /// Screen right, screen up and the direction toward the viewer (a
    /// right-handed set: `right x up = toward`).
    pub fn basis(self) -> (Vector3<f64>, Vector3<f64>, Vector3<f64>) {
        let (x, y, z) = (Vector3::x(), Vector3::y(), Vector3::z());
        match self {
            View::Side => (x, z, -y),
            View::SideFromRight => (-x, z, y),
            View::Top => (x, y, z),
            View::Underneath => (x, -y, -z),
            View::Front => (-y, z, -x),
            View::Rear => (y, z, x),
        }
    }

    /// Unit light direction (toward the light) for this view.
    pub fn light(self) -> Vector3<f64> {
        let (right, up, toward) = self.basis();
        (0.8 * toward + 0.45 * up - 0.35 * right).normalize()
    }
}

/// Settings of the body renderer.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RenderParams {
    /// Share of the light that does not depend on the facet angle (0..1).
    pub ambient: f64,
    /// Samples per pixel along each axis (antialiasing).
    pub supersample: u32,
}

impl Default for RenderParams {
    fn default() -> Self {
        Self {
            ambient: 0.55,
            supersample: 2,
        }
    }
}

/// Lambert shading factor of a facet with unit normal `n` in `view`.
pub fn shade(view: View, n: &Vector3<f64>, params: &RenderParams) -> f64 {
    params.ambient + (1.0 - params.ambient) * n.dot(&view.light()).max(0.0)
}

/// Where a view lands on the canvas.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Frame {
    /// Pixels per metre.
    pub scale: f64,
    /// View coordinates (right, up), metres, of the picture centre.
    pub centre: (f64, f64),
    /// Picture rectangle on the canvas: left, top, width, height (pixels).
    pub rect: (i64, i64, i64, i64),
}

impl Frame {
    /// Canvas position of a world point (pixels, x right, y down).
    pub fn project(&self, view: View, p: &Point) -> (f64, f64) {
        let (right, up, _) = view.basis();
        let (l, t, w, h) = self.rect;
        let sx = l as f64 + 0.5 * w as f64 + (p.coords.dot(&right) - self.centre.0) * self.scale;
        let sy = t as f64 + 0.5 * h as f64 - (p.coords.dot(&up) - self.centre.1) * self.scale;
        (sx, sy)
    }
}

/// A triangle to draw: corners, the panel whose value it shows, its normal.
#[derive(Debug, Clone, Copy)]
pub struct DisplayTri {
    /// Corners, metres.
    pub corners: [Point; 3],
    /// Index of the real panel it shows.
    pub panel: u32,
    /// Outward unit normal.
    pub normal: Vector3<f64>,
}

/// The real panels plus, for a half model, their image across y = 0.
pub fn display_triangles(mesh: &PanelMesh) -> Vec<DisplayTri> {
    let mut out: Vec<DisplayTri> = mesh
        .panels
        .iter()
        .enumerate()
        .map(|(i, p)| DisplayTri {
            corners: p.vertices,
            panel: i as u32,
            normal: p.normal.into_inner(),
        })
        .collect();
    if mesh.mirrors.symmetry {
        let flip = |p: &Point| Point::new(p.x, -p.y, p.z);
        let images: Vec<DisplayTri> = out
            .iter()
            .map(|t| DisplayTri {
                corners: [
                    flip(&t.corners[0]),
                    flip(&t.corners[2]),
                    flip(&t.corners[1]),
                ],
                panel: t.panel,
                normal: Vector3::new(t.normal.x, -t.normal.y, t.normal.z),
            })
            .collect();
        out.extend(images);
    }
    out
}

/// How a panel is painted.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum PanelPaint {
    /// One colour, shaded.
    Solid(Rgb),
    /// Diagonal stripes of two colours, shaded (e.g. separated panels).
    Hatched(Rgb, Rgb),
    /// A colour with thin stripes of another across it, shaded
    /// ([`super::colorbar::thin_stripes`]; separated panels on the
    /// pressure sheet, whose colour still reads under them).
    Striped(Rgb, Rgb),
}

/// The nearest triangle under each sample of a view.
struct Raster {
    w: i64,
    h: i64,
    tri: Vec<u32>,
    depth: Vec<f64>,
}

const EMPTY: u32 = u32::MAX;

impl Raster {
    fn at(&self, x: i64, y: i64) -> u32 {
        if (0..self.w).contains(&x) && (0..self.h).contains(&y) {
            self.tri[(y * self.w + x) as usize]
        } else {
            EMPTY
        }
    }
}

/// Z-buffer the triangles at `ss` samples per pixel.
fn rasterize(tris: &[DisplayTri], view: View, frame: &Frame, ss: i64) -> Raster {
    let (w, h) = (frame.rect.2 * ss, frame.rect.3 * ss);
    let n = (w * h).max(0) as usize;
    let mut r = Raster {
        w,
        h,
        tri: vec![EMPTY; n],
        depth: vec![f64::INFINITY; n],
    };
    let toward = view.basis().2;
    for (k, t) in tris.iter().enumerate() {
        let s = t.corners.map(|p| {
            let (x, y) = frame.project(view, &p);
            let x = (x - frame.rect.0 as f64) * ss as f64;
            let y = (y - frame.rect.1 as f64) * ss as f64;
            (x, y, -p.coords.dot(&toward))
        });
        fill_triangle(&mut r, &s, k as u32);
    }
    r
}

/// Scan one projected triangle (sample coordinates, depth) into the raster.
fn fill_triangle(r: &mut Raster, s: &[(f64, f64, f64); 3], id: u32) {
    let [a, b, c] = *s;
    let area = (b.0 - a.0) * (c.1 - a.1) - (b.1 - a.1) * (c.0 - a.0);
    if area.abs() < 1e-12 || !area.is_finite() {
        return;
    }
    let x0 = a.0.min(b.0).min(c.0).floor().max(0.0) as i64;
    let x1 = (a.0.max(b.0).max(c.0).ceil() as i64).min(r.w - 1);
    let y0 = a.1.min(b.1).min(c.1).floor().max(0.0) as i64;
    let y1 = (a.1.max(b.1).max(c.1).ceil() as i64).min(r.h - 1);
    let edge = |p: (f64, f64, f64), q: (f64, f64, f64), x: f64, y: f64| {
        (q.0 - p.0) * (y - p.1) - (q.1 - p.1) * (x - p.0)
    };
    for y in y0..=y1 {
        for x in x0..=x1 {
            let (px, py) = (x as f64 + 0.5, y as f64 + 0.5);
            let (wa, wb, wc) = (
                edge(b, c, px, py) / area,
                edge(c, a, px, py) / area,
                edge(a, b, px, py) / area,
            );
            if wa < 0.0 || wb < 0.0 || wc < 0.0 {
                continue;
            }
            let z = wa * a.2 + wb * b.2 + wc * c.2;
            let k = (y * r.w + x) as usize;
            if z < r.depth[k] {
                r.depth[k] = z;
                r.tri[k] = id;
            }
        }
    }
}

/// Draw the body in `view` into `frame.rect` of the canvas, painting the
/// panel behind each sample with `paint(panel)`; samples are averaged per
/// pixel, the silhouette gets a thin dark outline.
pub fn draw_view(
    canvas: &mut Canvas,
    tris: &[DisplayTri],
    view: View,
    frame: &Frame,
    params: &RenderParams,
    paint: &dyn Fn(usize) -> PanelPaint,
) {
    let ss = i64::from(params.supersample.max(1));
    let r = rasterize(tris, view, frame, ss);
    let shades: Vec<f64> = tris
        .iter()
        .map(|t| shade(view, &t.normal, params))
        .collect();
    let (l, t, w, h) = frame.rect;
    for py in 0..h {
        for px in 0..w {
            let (cx, cy) = (l + px, t + py);
            let mut acc = [0.0f64; 3];
            let mut body = 0;
            for sy in 0..ss {
                for sx in 0..ss {
                    let c = sample_colour(
                        &r,
                        (px * ss + sx, py * ss + sy),
                        (cx, cy),
                        tris,
                        &shades,
                        paint,
                    );
                    body += i32::from(c != WHITE);
                    acc.iter_mut().zip(c).for_each(|(a, v)| *a += f64::from(v));
                }
            }
            if body > 0 {
                let n = (ss * ss) as f64;
                canvas.blend(cx, cy, acc.map(|a| (a / n).round() as u8), 1.0);
            }
        }
    }
}

/// Colour of one sample: background, outline or the shaded panel paint.
fn sample_colour(
    r: &Raster,
    (x, y): (i64, i64),
    (cx, cy): (i64, i64),
    tris: &[DisplayTri],
    shades: &[f64],
    paint: &dyn Fn(usize) -> PanelPaint,
) -> Rgb {
    let k = r.at(x, y);
    if k == EMPTY {
        return WHITE;
    }
    let edge = [(1, 0), (-1, 0), (0, 1), (0, -1)]
        .iter()
        .any(|&(dx, dy)| r.at(x + dx, y + dy) == EMPTY);
    if edge {
        return OUTLINE;
    }
    let tri = &tris[k as usize];
    let base = match paint(tri.panel as usize) {
        PanelPaint::Solid(c) => c,
        PanelPaint::Hatched(a, b) => hatch(cx, cy, a, b),
        PanelPaint::Striped(a, b) => super::colorbar::thin_stripes(cx, cy, a, b),
    };
    let s = shades[k as usize];
    base.map(|v| (f64::from(v) * s).round().clamp(0.0, 255.0) as u8)
}

/// Which display triangle is seen at each pixel of a view (one sample per
/// pixel), for marks drawn on the visible surface.
pub struct Visible {
    raster: Raster,
    origin: (i64, i64),
}

impl Visible {
    /// Index into the display triangles of the one seen at canvas pixel
    /// `(x, y)`; `None` off the body or outside the view.
    pub fn at(&self, x: i64, y: i64) -> Option<usize> {
        let k = self.raster.at(x - self.origin.0, y - self.origin.1);
        (k != EMPTY).then_some(k as usize)
    }
}

/// The triangles of `view` as seen through `frame`.
pub fn visible(tris: &[DisplayTri], view: View, frame: &Frame) -> Visible {
    Visible {
        raster: rasterize(tris, view, frame, 1),
        origin: (frame.rect.0, frame.rect.1),
    }
}

/// Extent of the triangles in a view: (min right, max right, min up, max up).
pub fn extent(tris: &[DisplayTri], view: View) -> (f64, f64, f64, f64) {
    let (right, up, _) = view.basis();
    let init = (
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
    );
    tris.iter()
        .flat_map(|t| t.corners.iter())
        .fold(init, |e, p| {
            let (u, v) = (p.coords.dot(&right), p.coords.dot(&up));
            (e.0.min(u), e.1.max(u), e.2.min(v), e.3.max(v))
        })
}
