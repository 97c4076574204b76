//! `report.html`: one self-contained page (styles inline, pictures as
//! base64 `data:` URIs, no scripts, no external resources) with the case,
//! the cautions, a table of numbers with units, the warnings, the pictures
//! and free text sections.

use std::io::Write;

use base64::Engine as _;

use super::{Caption, OutputError};

/// The caution every report carries, near the top.
pub const CAUTION: &str = "Screening estimate only. Lift, drag and stability at speed must be \
     confirmed by validated CFD or wind-tunnel tests and by the responsible engineer, under \
     local regulations.";

/// One row of the numbers table.
#[derive(Debug, Clone, PartialEq)]
pub struct NumberRow {
    /// What the number is (e.g. "Drag coefficient C_D").
    pub label: String,
    /// The value as it should read.
    pub value: String,
    /// Unit (e.g. "kg at 40 m/s", "m²", "-").
    pub unit: String,
}

impl NumberRow {
    /// A row with a number shown to four significant digits.
    pub fn number(label: &str, value: f64, unit: &str) -> Self {
        Self::text(label, &significant(value, 4), unit)
    }

    /// A row with a number shown to `decimals` places: as many as the
    /// quantity is worth (whole kilograms of lift, three places of a
    /// coefficient), not as many as the arithmetic carried.
    pub fn fixed(label: &str, value: f64, decimals: usize, unit: &str) -> Self {
        let text = format!("{value:.decimals$}");
        let magnitude = text.trim_start_matches('-');
        // A value that rounds to zero reads "0.000", not "-0.000".
        if magnitude.chars().all(|c| c == '0' || c == '.') {
            Self::text(label, magnitude, unit)
        } else {
            Self::text(label, &text, unit)
        }
    }

    /// A drag (or any force) coefficient in counts (1 count = 0.001,
    /// common practice), rounded to whole counts.
    pub fn counts(label: &str, coefficient: f64) -> Self {
        Self::text(label, &format!("{:.0}", 1000.0 * coefficient), "counts")
    }

    /// A row with a value already written out.
    pub fn text(label: &str, value: &str, unit: &str) -> Self {
        Self {
            label: label.to_owned(),
            value: value.to_owned(),
            unit: unit.to_owned(),
        }
    }
}

/// `v` to `digits` significant digits, without exponent for everyday sizes.
pub fn significant(v: f64, digits: i32) -> String {
    if !v.is_finite() {
        return v.to_string();
    }
    if v == 0.0 {
        return "0".to_owned();
    }
    let magnitude = v.abs().log10().floor() as i32;
    if !(-4..=6).contains(&magnitude) {
        return format!("{:.*e}", (digits - 1).max(0) as usize, v);
    }
    let decimals = (digits - 1 - magnitude).max(0) as usize;
    format!("{v:.decimals$}")
}

/// A titled block of free text; blank lines separate paragraphs.
#[derive(Debug, Clone, PartialEq)]
pub struct TextSection {
    /// Heading.
    pub title: String,
    /// Plain text (escaped on output).
    pub body: String,
}

/// A picture to inline.
#[derive(Debug, Clone, PartialEq)]
pub struct Picture {
    /// Caption under the picture (also its alternative text).
    pub title: String,
    /// PNG bytes.
    pub png: Vec<u8>,
}

/// Everything the report shows.
#[derive(Debug, Clone, PartialEq)]
pub struct Report {
    /// Case and conditions.
    pub caption: Caption,
    /// One or two sentences under the heading (may be empty).
    pub summary: String,
    /// The numbers table.
    pub numbers: Vec<NumberRow>,
    /// Warnings the user must read (mesh repairs, unresolved panels...).
    pub warnings: Vec<String>,
    /// Said after "No warnings." when there are none but a note below
    /// bears on how far to trust the numbers (a review's run on under half
    /// its suggested panels read "No warnings." above the note that said
    /// so).
    pub notes_pointer: Option<String>,
    /// Pictures, in order.
    pub pictures: Vec<Picture>,
    /// Free text sections after the pictures (method, settings...).
    pub sections: Vec<TextSection>,
    /// Cautions beyond [`CAUTION`], which is always shown.
    pub cautions: Vec<String>,
    /// Program name and version for the footer.
    pub generator: String,
}

/// Escape text for HTML element content and attribute values.
pub fn escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c => out.push(c),
        }
    }
    out
}

/// The page's style sheet (inline, no web fonts).
const STYLE: &str = "
:root { --ink: #22232a; --muted: #62656e; --line: #dcdfe5; --accent: #2b6f77; --warm: #b5651d; }
* { box-sizing: border-box; }
body { margin: 0; background: #f4f5f2; color: var(--ink);
  font: 16px/1.5 'DejaVu Sans', 'Segoe UI', Helvetica, Arial, sans-serif; }
main { max-width: 1240px; margin: 0 auto; padding: 28px 32px 48px; }
header { border-bottom: 3px solid var(--accent); padding-bottom: 14px; margin-bottom: 22px; }
header .kicker { text-transform: uppercase; letter-spacing: .12em; font-size: 12px; color: var(--accent); font-weight: 700; }
h1 { font-size: 30px; margin: 4px 0 6px; }
h2 { font-size: 20px; margin: 34px 0 12px; padding-left: 10px; border-left: 4px solid var(--accent); }
.conditions { color: var(--muted); margin: 0; }
.caution { background: #fff7ea; border: 1px solid #efd6b0; border-left: 6px solid var(--warm);
  padding: 12px 16px; margin: 18px 0; font-weight: 600; }
.caution p { margin: 4px 0; }
table { border-collapse: collapse; background: #fff; min-width: 60%; border: 1px solid var(--line); }
th, td { padding: 7px 14px; border-bottom: 1px solid var(--line); text-align: left; }
th { background: #eef1f0; font-size: 13px; text-transform: uppercase; letter-spacing: .06em; color: var(--muted); }
td.value { text-align: right; font-variant-numeric: tabular-nums; font-weight: 600; }
td.unit { color: var(--muted); }
ul.warnings { background: #fff; border: 1px solid var(--line); padding: 10px 16px 10px 34px; }
ul.warnings li { margin: 4px 0; }
.none { color: var(--muted); font-style: italic; }
figure { margin: 0 0 26px; background: #fff; border: 1px solid var(--line); padding: 10px; }
figure img { display: block; width: 100%; height: auto; }
figcaption { color: var(--muted); font-size: 14px; padding: 8px 4px 2px; }
section p { max-width: 80ch; }
footer { margin-top: 40px; color: var(--muted); font-size: 13px; border-top: 1px solid var(--line); padding-top: 10px; }
";

/// Write the report page.
///
/// # Errors
/// [`OutputError::Write`] when writing fails.
pub fn write_report<W: Write>(w: &mut W, r: &Report) -> Result<(), OutputError> {
    let mut page = String::new();
    page.push_str(&head(r));
    page.push_str(&cautions(r));
    page.push_str(&numbers(&r.numbers));
    page.push_str(&warnings(&r.warnings, r.notes_pointer.as_deref()));
    page.push_str(&pictures(&r.pictures));
    for s in &r.sections {
        page.push_str(&section(s));
    }
    page.push_str(&format!(
        "<footer>Written by {}. All values in SI units unless stated.</footer>\n</main>\n</body>\n</html>\n",
        escape(&r.generator)
    ));
    w.write_all(page.as_bytes())?;
    Ok(())
}

/// Document head and page heading.
fn head(r: &Report) -> String {
    let title = escape(&format!("{}: aerodynamic screening", r.caption.case));
    let summary = if r.summary.is_empty() {
        String::new()
    } else {
        format!("<p>{}</p>\n", escape(&r.summary))
    };
    format!(
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n\
         <title>{title}</title>\n<style>{STYLE}</style>\n</head>\n<body>\n<main>\n\
         <header><div class=\"kicker\">Aerodynamic screening</div>\n<h1>{}</h1>\n\
         <p class=\"conditions\">{}</p>\n{summary}</header>\n",
        escape(&r.caption.case),
        escape(&format!(
            "Free stream {}, {}",
            super::speed_words(r.caption.speed_ms),
            super::yaw_words(r.caption.yaw_deg)
        )),
    )
}

/// The fixed caution and any others.
fn cautions(r: &Report) -> String {
    let mut out = String::from("<div class=\"caution\" role=\"note\">\n");
    for c in std::iter::once(CAUTION).chain(r.cautions.iter().map(String::as_str)) {
        out.push_str(&format!("<p>{}</p>\n", escape(c)));
    }
    out.push_str("</div>\n");
    out
}

/// The numbers table.
fn numbers(rows: &[NumberRow]) -> String {
    let mut out = String::from("<h2>Numbers</h2>\n");
    if rows.is_empty() {
        out.push_str("<p class=\"none\">No numbers were computed.</p>\n");
        return out;
    }
    out.push_str(
        "<table>\n<thead><tr><th>Quantity</th><th>Value</th><th>Unit</th></tr></thead>\n<tbody>\n",
    );
    for r in rows {
        out.push_str(&format!(
            "<tr><td>{}</td><td class=\"value\">{}</td><td class=\"unit\">{}</td></tr>\n",
            escape(&r.label),
            escape(&r.value),
            escape(&r.unit)
        ));
    }
    out.push_str("</tbody>\n</table>\n");
    if rows.iter().any(|r| r.unit.starts_with("counts")) {
        out.push_str(&format!("<p class=\"none\">{COUNT_WORDS}</p>\n"));
    }
    out
}

/// What a drag count is, said wherever counts are shown.
pub const COUNT_WORDS: &str = "1 drag count = 0.001 of the drag coefficient C_D.";

/// The warnings list (says so when there are none, with `pointer` to a
/// note below when given).
fn warnings(list: &[String], pointer: Option<&str>) -> String {
    let mut out = String::from("<h2>Warnings</h2>\n");
    if list.is_empty() {
        let pointer = pointer.map_or(String::new(), |p| format!(" {}", escape(p)));
        out.push_str(&format!("<p class=\"none\">No warnings.{pointer}</p>\n"));
        return out;
    }
    out.push_str("<ul class=\"warnings\">\n");
    for w in list {
        out.push_str(&format!("<li>{}</li>\n", escape(w)));
    }
    out.push_str("</ul>\n");
    out
}

/// The pictures as inline PNG data URIs.
fn pictures(list: &[Picture]) -> String {
    let mut out = String::from("<h2>Pictures</h2>\n");
    for p in list {
        let data = base64::engine::general_purpose::STANDARD.encode(&p.png);
        let t = escape(&p.title);
        out.push_str(&format!(
            "<figure><img alt=\"{t}\" src=\"data:image/png;base64,{data}\">\n<figcaption>{t}</figcaption></figure>\n"
        ));
    }
    out
}

/// A free text section, paragraphs split on blank lines.
fn section(s: &TextSection) -> String {
    let mut out = format!("<section>\n<h2>{}</h2>\n", escape(&s.title));
    for para in s
        .body
        .split("\n\n")
        .map(str::trim)
        .filter(|p| !p.is_empty())
    {
        out.push_str(&format!("<p>{}</p>\n", escape(para)));
    }
    out.push_str("</section>\n");
    out
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;
    use crate::output::canvas::testing::keep;
    use crate::output::fixture::{Fixture, caption};
    use crate::output::plot::centreline_cp_plot;
    use crate::output::sheet::{SurfaceField, surface_sheet};

    fn report() -> Report {
        let f = Fixture::sphere(2);
        let s = f.surface();
        let pressure = surface_sheet(&s, SurfaceField::Pressure, &caption()).unwrap();
        let line = centreline_cp_plot(&s, &caption()).unwrap().0;
        Report {
            caption: caption(),
            summary: "Unit sphere in free air <test & check>.".to_owned(),
            numbers: vec![
                NumberRow::counts("Drag coefficient C_D", 0.0123),
                NumberRow::number("Frontal area", std::f64::consts::PI, "m²"),
                NumberRow::text("Panels", "320", "-"),
            ],
            warnings: vec!["12 panels could not be reached by a surface streamline.".to_owned()],
            notes_pointer: None,
            pictures: vec![
                Picture {
                    title: "Surface pressure".to_owned(),
                    png: pressure.to_png().unwrap(),
                },
                Picture {
                    title: "Centre-line pressure".to_owned(),
                    png: line.to_png().unwrap(),
                },
            ],
            sections: vec![TextSection {
                title: "Method".to_owned(),
                body: "Panels.\n\nBoundary layer.".to_owned(),
            }],
            cautions: vec![],
            generator: "tuft 0.1.0".to_owned(),
        }
    }

    #[test]
    fn page_is_self_contained_with_pictures_and_caution() {
        let r = report();
        let mut buf = Vec::new();
        write_report(&mut buf, &r).unwrap();
        keep("report.html", &buf);
        let html = String::from_utf8(buf).unwrap();
        assert!(html.contains(CAUTION));
        assert_eq!(html.matches("src=\"data:image/png;base64,").count(), 2);
        // The inlined bytes decode back to the pictures.
        let start = html.find("base64,").unwrap() + 7;
        let end = start + html[start..].find('"').unwrap();
        let png = base64::engine::general_purpose::STANDARD
            .decode(&html[start..end])
            .unwrap();
        assert_eq!(png, r.pictures[0].png);
        // No reference leaves the page: look outside the base64 payloads
        // (whose alphabet includes '/').
        let text: String = html
            .split("base64,")
            .enumerate()
            .map(|(k, part)| match (k, part.find('"')) {
                (0, _) | (_, None) => part,
                (_, Some(q)) => &part[q..],
            })
            .collect();
        for external in [
            "http:", "https:", "href=", "<link", "<script", "@import", "url(", "//",
        ] {
            assert!(!text.contains(external), "found {external}");
        }
        assert!(html.contains("<td class=\"value\">12</td><td class=\"unit\">counts</td>"));
        assert!(html.contains("&lt;test &amp; check&gt;"));
        assert!(html.contains("12 panels could not be reached"));
    }

    /// No warnings, but notes below that bear on the numbers: the
    /// warnings section says where to look.
    #[test]
    fn no_warnings_points_at_the_notes() {
        let mut r = report();
        r.warnings.clear();
        let page = |r: &Report| {
            let mut buf = Vec::new();
            write_report(&mut buf, r).unwrap();
            String::from_utf8(buf).unwrap()
        };
        assert!(page(&r).contains("<p class=\"none\">No warnings.</p>"));
        r.notes_pointer = Some("Read the note on the mesh and the model below.".into());
        assert!(page(&r).contains(
            "<p class=\"none\">No warnings. Read the note on the mesh and the model below.</p>"
        ));
    }

    #[test]
    fn numbers_read_plainly() {
        assert_eq!(significant(1.23456, 4), "1.235");
        // An ASCII minus, as the kg and counts beside them are written, so
        // that a table pasted into a spreadsheet reads as numbers (a
        // review's "\u{2212}0.518" became text there).
        assert_eq!(significant(-123.456, 4), "-123.5");
        assert_eq!(significant(0.0123, 3), "0.0123");
        assert_eq!(NumberRow::counts("C_D", 0.2854).value, "285");
        assert_eq!(NumberRow::fixed("lift", -94.53, 0, "kg").value, "-95");
        assert_eq!(NumberRow::fixed("C_L", -0.51338, 3, "-").value, "-0.513");
        assert_eq!(NumberRow::fixed("side", -0.0001, 3, "-").value, "0.000");
    }
}
