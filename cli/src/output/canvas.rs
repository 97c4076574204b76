//! An opaque RGB drawing surface (white to start with) with antialiased
//! lines and shapes from `tiny-skia`, direct pixel access for the body
//! renderer and the text, and PNG encoding.

use tiny_skia::{FillRule, Paint, PathBuilder, Pixmap, Rect, Stroke, Transform};

use super::OutputError;

/// An sRGB colour.
pub type Rgb = [u8; 3];

/// White.
pub const WHITE: Rgb = [255, 255, 255];
/// Near-black for text and axes.
pub const INK: Rgb = [34, 34, 40];
/// Mid grey for secondary text.
pub const MUTED: Rgb = [100, 104, 112];
/// Light grey for grid lines.
pub const GRID: Rgb = [222, 224, 228];

/// An opaque picture being drawn.
pub struct Canvas {
    pixmap: Pixmap,
}

impl Canvas {
    /// A white canvas.
    ///
    /// # Errors
    /// [`OutputError::PictureSize`] for a zero or too large size.
    pub fn new(width: u32, height: u32) -> Result<Self, OutputError> {
        let mut pixmap =
            Pixmap::new(width, height).ok_or(OutputError::PictureSize { width, height })?;
        pixmap.fill(tiny_skia::Color::WHITE);
        Ok(Self { pixmap })
    }

    /// Width, pixels.
    pub fn width(&self) -> u32 {
        self.pixmap.width()
    }

    /// Height, pixels.
    pub fn height(&self) -> u32 {
        self.pixmap.height()
    }

    /// Byte offset of pixel `(x, y)`, `None` outside the canvas.
    fn offset(&self, x: i64, y: i64) -> Option<usize> {
        let (w, h) = (i64::from(self.width()), i64::from(self.height()));
        ((0..w).contains(&x) && (0..h).contains(&y)).then(|| 4 * (y * w + x) as usize)
    }

    /// Colour of pixel `(x, y)` (white outside).
    pub fn pixel(&self, x: i64, y: i64) -> Rgb {
        self.offset(x, y).map_or(WHITE, |o| {
            let d = &self.pixmap.data()[o..o + 3];
            [d[0], d[1], d[2]]
        })
    }

    /// Mix `rgb` over pixel `(x, y)` with coverage `alpha` (0..1); pixels
    /// outside the canvas are ignored.
    pub fn blend(&mut self, x: i64, y: i64, rgb: Rgb, alpha: f32) {
        let Some(o) = self.offset(x, y) else { return };
        let a = alpha.clamp(0.0, 1.0);
        let d = &mut self.pixmap.data_mut()[o..o + 4];
        for k in 0..3 {
            d[k] = (f32::from(d[k]) * (1.0 - a) + f32::from(rgb[k]) * a).round() as u8;
        }
        d[3] = 255;
    }

    /// Fill an axis-aligned rectangle.
    pub fn fill_rect(&mut self, x: f32, y: f32, w: f32, h: f32, rgb: Rgb) {
        if let Some(r) = Rect::from_xywh(x, y, w, h) {
            self.pixmap
                .fill_rect(r, &paint(rgb), Transform::identity(), None);
        }
    }

    /// Outline an axis-aligned rectangle.
    pub fn stroke_rect(&mut self, x: f32, y: f32, w: f32, h: f32, rgb: Rgb, width: f32) {
        let pts = [(x, y), (x + w, y), (x + w, y + h), (x, y + h), (x, y)];
        self.polyline(&pts, rgb, width);
    }

    /// An antialiased polyline.
    pub fn polyline(&mut self, pts: &[(f32, f32)], rgb: Rgb, width: f32) {
        if let Some(path) = path_through(pts, false) {
            let stroke = Stroke {
                width,
                ..Stroke::default()
            };
            self.pixmap
                .stroke_path(&path, &paint(rgb), &stroke, Transform::identity(), None);
        }
    }

    /// A filled polygon.
    pub fn fill_polygon(&mut self, pts: &[(f32, f32)], rgb: Rgb) {
        if let Some(path) = path_through(pts, true) {
            self.pixmap.fill_path(
                &path,
                &paint(rgb),
                FillRule::Winding,
                Transform::identity(),
                None,
            );
        }
    }

    /// A filled circle.
    pub fn fill_circle(&mut self, cx: f32, cy: f32, r: f32, rgb: Rgb) {
        if let Some(path) = PathBuilder::from_circle(cx, cy, r) {
            self.pixmap.fill_path(
                &path,
                &paint(rgb),
                FillRule::Winding,
                Transform::identity(),
                None,
            );
        }
    }

    /// An arrow from `from` to `to` with a filled head.
    pub fn arrow(&mut self, from: (f32, f32), to: (f32, f32), rgb: Rgb, width: f32) {
        let (dx, dy) = (to.0 - from.0, to.1 - from.1);
        let len = (dx * dx + dy * dy).sqrt().max(1e-3);
        let (ux, uy) = (dx / len, dy / len);
        let head = 4.0 * width + 4.0;
        let base = (to.0 - ux * head, to.1 - uy * head);
        self.polyline(&[from, base], rgb, width);
        let side = (-uy * head * 0.45, ux * head * 0.45);
        let left = (base.0 + side.0, base.1 + side.1);
        let right = (base.0 - side.0, base.1 - side.1);
        self.fill_polygon(&[to, left, right], rgb);
    }

    /// The picture as PNG bytes (8-bit RGB).
    ///
    /// # Errors
    /// [`OutputError::Png`] when encoding fails.
    pub fn to_png(&self) -> Result<Vec<u8>, OutputError> {
        let rgb: Vec<u8> = self
            .pixmap
            .data()
            .chunks_exact(4)
            .flat_map(|p| [p[0], p[1], p[2]])
            .collect();
        let mut out = Vec::new();
        let mut enc = png::Encoder::new(&mut out, self.width(), self.height());
        enc.set_color(png::ColorType::Rgb);
        enc.set_depth(png::BitDepth::Eight);
        let mut writer = enc.write_header()?;
        writer.write_image_data(&rgb)?;
        writer.finish()?;
        Ok(out)
    }
}

/// The path through `pts` in order, closed back to the first point when
/// `closed`; `None` for fewer than two points.
fn path_through(pts: &[(f32, f32)], closed: bool) -> Option<tiny_skia::Path> {
    let mut pb = PathBuilder::new();
    for (k, &(x, y)) in pts.iter().enumerate() {
        if k == 0 {
            pb.move_to(x, y)
        } else {
            pb.line_to(x, y)
        }
    }
    if closed {
        pb.close();
    }
    pb.finish()
}

/// An antialiased solid paint.
fn paint(rgb: Rgb) -> Paint<'static> {
    let mut p = Paint::default();
    p.set_color_rgba8(rgb[0], rgb[1], rgb[2], 255);
    p.anti_alias = true;
    p
}

/// Test helpers: decode a PNG and keep pictures for inspection.
#[cfg(test)]
pub(crate) mod testing {
    #![allow(clippy::unwrap_used, clippy::expect_used)]

    /// A decoded 8-bit RGB picture.
    pub struct Decoded {
        pub width: u32,
        pub height: u32,
        pub rgb: Vec<u8>,
    }

    impl Decoded {
        pub fn pixel(&self, x: i64, y: i64) -> [u8; 3] {
            let o = 3 * (y as usize * self.width as usize + x as usize);
            [self.rgb[o], self.rgb[o + 1], self.rgb[o + 2]]
        }

        pub fn distinct_colours(&self) -> usize {
            let mut set: Vec<[u8; 3]> = self
                .rgb
                .chunks_exact(3)
                .map(|c| [c[0], c[1], c[2]])
                .collect();
            set.sort_unstable();
            set.dedup();
            set.len()
        }
    }

    /// Decode PNG bytes with the `png` crate's decoder.
    pub fn decode(bytes: &[u8]) -> Decoded {
        let decoder = png::Decoder::new(std::io::Cursor::new(bytes));
        let mut reader = decoder.read_info().unwrap();
        let mut buf = vec![0; reader.output_buffer_size().unwrap()];
        let info = reader.next_frame(&mut buf).unwrap();
        assert_eq!(info.color_type, png::ColorType::Rgb);
        buf.truncate(info.buffer_size());
        Decoded {
            width: info.width,
            height: info.height,
            rgb: buf,
        }
    }

    /// Keep a picture for a person to look at when `TUFT_KEEP_PICTURES`
    /// names a folder.
    pub fn keep(name: &str, bytes: &[u8]) {
        if let Some(dir) = std::env::var_os("TUFT_KEEP_PICTURES") {
            std::fs::write(std::path::Path::new(&dir).join(name), bytes).unwrap();
        }
    }
}
