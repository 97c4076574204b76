//! Text drawing with an embedded font (DejaVu Sans, Bitstream Vera
//! licence, shipped inside the `dejavu` crate), rasterised by `ab_glyph`,
//! so every picture looks the same on a machine with no fonts installed.

use std::sync::OnceLock;

use ab_glyph::{Font, FontRef, PxScale, ScaleFont};

use super::canvas::{Canvas, INK, Rgb};

/// Font weight.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Weight {
    /// DejaVu Sans.
    Regular,
    /// DejaVu Sans Bold.
    Bold,
}

/// Where the anchor point sits along the text.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Align {
    /// Anchor at the start.
    Left,
    /// Anchor at the middle.
    Centre,
    /// Anchor at the end.
    Right,
}

/// How a piece of text is drawn.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TextStyle {
    /// Font size, pixels.
    pub size: f32,
    /// Weight.
    pub weight: Weight,
    /// Colour.
    pub colour: Rgb,
    /// Horizontal alignment about the anchor.
    pub align: Align,
}

impl TextStyle {
    /// Regular ink text of `size` pixels, left aligned.
    pub fn new(size: f32) -> Self {
        Self {
            size,
            weight: Weight::Regular,
            colour: INK,
            align: Align::Left,
        }
    }

    /// The same style in bold.
    pub fn bold(self) -> Self {
        Self {
            weight: Weight::Bold,
            ..self
        }
    }

    /// The same style with another alignment.
    pub fn align(self, align: Align) -> Self {
        Self { align, ..self }
    }

    /// The same style in another colour.
    pub fn colour(self, colour: Rgb) -> Self {
        Self { colour, ..self }
    }
}

/// The embedded font of a weight (`None` only if the embedded file were
/// unreadable, in which case text is skipped rather than panicking).
fn font(weight: Weight) -> Option<&'static FontRef<'static>> {
    static REGULAR: OnceLock<Option<FontRef<'static>>> = OnceLock::new();
    static BOLD: OnceLock<Option<FontRef<'static>>> = OnceLock::new();
    let (cell, bytes) = match weight {
        Weight::Regular => (&REGULAR, dejavu::sans::regular()),
        Weight::Bold => (&BOLD, dejavu::sans::bold()),
    };
    cell.get_or_init(|| FontRef::try_from_slice(bytes).ok())
        .as_ref()
}

/// Advance width of `text`, pixels.
pub fn width(text: &str, style: &TextStyle) -> f32 {
    let mut w = 0.0;
    layout(text, style, |_, _, _| {}, &mut w);
    w
}

/// Lay out `text` on a baseline at the origin, calling `plot(u, v, coverage)`
/// for each covered pixel (u along the text, v down); the advance width
/// ends up in `advance`.
fn layout(text: &str, style: &TextStyle, mut plot: impl FnMut(f32, f32, f32), advance: &mut f32) {
    let Some(f) = font(style.weight) else { return };
    let scaled = f.as_scaled(PxScale::from(style.size));
    let mut caret = 0.0f32;
    let mut prev = None;
    for ch in text.chars() {
        let id = scaled.glyph_id(ch);
        if let Some(p) = prev {
            caret += scaled.kern(p, id);
        }
        let glyph = id.with_scale_and_position(style.size, ab_glyph::point(caret, 0.0));
        caret += scaled.h_advance(id);
        prev = Some(id);
        if let Some(outline) = f.outline_glyph(glyph) {
            let b = outline.px_bounds();
            outline.draw(|gx, gy, c| plot(b.min.x + gx as f32, b.min.y + gy as f32, c));
        }
    }
    *advance = caret;
}

/// Shift of the text start for the alignment.
fn start_offset(text: &str, style: &TextStyle) -> f32 {
    match style.align {
        Align::Left => 0.0,
        Align::Centre => -0.5 * width(text, style),
        Align::Right => -width(text, style),
    }
}

/// Draw `text` with its baseline at `y`, anchored at `x`.
pub fn draw(canvas: &mut Canvas, text: &str, x: f32, y: f32, style: &TextStyle) {
    let x0 = (x + start_offset(text, style)).round();
    let y0 = y.round();
    let mut w = 0.0;
    layout(
        text,
        style,
        |u, v, c| canvas.blend((x0 + u) as i64, (y0 + v) as i64, style.colour, c),
        &mut w,
    );
}

/// Draw `text` turned a quarter turn anticlockwise (reading upwards), its
/// baseline on the vertical line `x`, anchored at height `y`.
pub fn draw_vertical(canvas: &mut Canvas, text: &str, x: f32, y: f32, style: &TextStyle) {
    let u0 = start_offset(text, style);
    let (x0, y0) = (x.round(), y.round());
    let mut w = 0.0;
    layout(
        text,
        style,
        |u, v, c| canvas.blend((x0 + v) as i64, (y0 - u0 - u) as i64, style.colour, c),
        &mut w,
    );
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;

    #[test]
    fn embedded_font_draws_ink() {
        let mut c = Canvas::new(200, 40).unwrap();
        let style = TextStyle::new(20.0);
        draw(&mut c, "Cp [-] 40 m/s", 10.0, 28.0, &style);
        let dark = (0..200)
            .flat_map(|x| (0..40).map(move |y| (x, y)))
            .filter(|&(x, y)| c.pixel(x, y)[0] < 128)
            .count();
        // A 20 px string of 13 characters covers some hundreds of pixels.
        assert!(dark > 200, "{dark} dark pixels");
        let w = width("Cp [-] 40 m/s", &style);
        assert!(w > 100.0 && w < 190.0, "width {w}");
    }
}
