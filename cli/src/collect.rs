//! `tuft collect DIR`: merge the finished variants of a sweep into
//! `sweep.csv`, `sweep.json` and a self-contained `sweep.html` (a ranking
//! by drag and plots of drag, lift and separated area against each swept
//! value).
//!
//! Exit codes: 0 every planned variant was found, 1 some are missing or
//! failed (listed), 2 nothing to collect.

use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::{Context, Result, bail};
use base64::Engine as _;
use serde::{Deserialize, Serialize};

use crate::compare::read_summary;
use crate::output::html::escape;
use crate::output::plot::{LinePlot, PlotParams, SERIES_COLOURS, Series, draw_line_plot};
use crate::sweep::group::{VARIANT_FILE, VariantRecord};
use crate::sweep::{PLAN_FILE, PlanEntry};
use crate::{EXIT_WARNINGS, summary::CAUTION};

/// Arguments of `tuft collect`.
#[derive(clap::Args)]
pub struct CollectArgs {
    /// The sweep's result folder.
    pub dir: PathBuf,
    /// Print nothing on success.
    #[arg(long, short)]
    pub quiet: bool,
}

/// One finished variant.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct Row {
    /// Rank by drag estimate (1 = lowest).
    pub rank: usize,
    /// Variant name.
    pub name: String,
    /// Swept values by dotted key.
    pub settings: BTreeMap<String, serde_json::Value>,
    /// Drag estimate C_D.
    pub cd: f64,
    /// Low end of the drag band.
    pub cd_low: f64,
    /// High end of the drag band.
    pub cd_high: f64,
    /// Lift coefficient.
    pub cl: f64,
    /// Lift, kg at the variant's speed.
    pub lift_kg: f64,
    /// Front-axle lift, kg.
    pub front_axle_kg: f64,
    /// Rear-axle lift, kg.
    pub rear_axle_kg: f64,
    /// Separated area, m^2.
    pub separated_area_m2: f64,
    /// Separated fraction of the wetted area, %.
    pub separated_percent: f64,
    /// Separated fraction of the underbody (ground-facing panels), %.
    #[serde(default)]
    pub underbody_separated_percent: f64,
    /// Separated surface projected along the stream (front- and
    /// rear-facing parts counted separately), % of the reference area;
    /// it can exceed 100 %.
    #[serde(default)]
    pub separated_frontal_percent: f64,
    /// Panels.
    pub panels: usize,
    /// Warnings in the variant's summary.
    pub warnings: usize,
    /// The variant's potential flow used a matrix factorised for another.
    pub matrix_reused: bool,
}

/// `sweep.json`.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct Collected {
    /// Sweep name.
    pub sweep: String,
    /// Swept keys, in order.
    pub keys: Vec<String>,
    /// Finished variants, ranked by drag.
    pub variants: Vec<Row>,
    /// Planned variants with no finished folder.
    pub missing: Vec<String>,
    /// The caution that goes with every number.
    pub caution: String,
}

/// `tuft collect`.
pub fn run(args: &CollectArgs) -> Result<ExitCode> {
    let c = collect(&args.dir)?;
    write_outputs(&args.dir, &c)?;
    if !args.quiet {
        println!(
            "{}: {} variants collected; {}",
            c.sweep,
            c.variants.len(),
            best_drag(&c)
        );
        for m in &c.missing {
            println!("  missing or failed: {m}");
        }
        println!("  report: {}", args.dir.join("sweep.html").display());
    }
    Ok(if c.missing.is_empty() {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(EXIT_WARNINGS)
    })
}

/// The lowest drag, named the best only when it beats the next by more
/// than the noise floor ([`crate::compare::NOISE_COUNTS`]) and the
/// separated share stays put across the variants (as `tuft compare`
/// names a winner).
fn best_drag(c: &Collected) -> String {
    let [first, rest @ ..] = c.variants.as_slice() else {
        return "no drag to rank".into();
    };
    let lowest = format!("{} (C_D {:.3})", first.name, first.cd);
    let Some(second) = rest.first() else {
        return format!("drag: {lowest}");
    };
    let gap = 1000.0 * (second.cd - first.cd);
    if gap < crate::compare::NOISE_COUNTS {
        format!(
            "lowest drag: {lowest}, within {gap:.1} counts of {}: no clear winner",
            second.name
        )
    } else if separation_spread(c).is_some() {
        format!(
            "lowest drag: {lowest}; the separated area moves across the variants, so no winner is named (see the report)"
        )
    } else {
        format!("best drag: {lowest}, {gap:.1} counts below {}", second.name)
    }
}

#[derive(Deserialize)]
struct PlanFile {
    sweep: String,
    variants: Vec<PlanEntry>,
}

/// Read every finished variant of `dir`.
pub fn collect(dir: &Path) -> Result<Collected> {
    let plan_path = dir.join(PLAN_FILE);
    let plan: Option<PlanFile> = match std::fs::read_to_string(&plan_path) {
        Ok(text) => Some(
            serde_json::from_str(&text)
                .with_context(|| format!("{}: not a sweep plan", plan_path.display()))?,
        ),
        Err(_) => None,
    };
    let mut rows = Vec::new();
    let mut entries: Vec<PathBuf> = std::fs::read_dir(dir)
        .with_context(|| format!("{}: cannot read the folder", dir.display()))?
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.join(VARIANT_FILE).is_file() && p.join("summary.json").is_file())
        .collect();
    entries.sort();
    let mut keys: Vec<String> = Vec::new();
    let mut name = plan.as_ref().map(|p| p.sweep.clone());
    for path in entries {
        let (row, record) = read_row(&path)?;
        name.get_or_insert(record.sweep.clone());
        for s in &record.settings {
            if !keys.contains(&s.key) {
                keys.push(s.key.clone());
            }
        }
        rows.push((record.index, row));
    }
    if rows.is_empty() {
        bail!("{}: no finished sweep variants here", dir.display());
    }
    rows.sort_by(|a, b| a.1.cd.total_cmp(&b.1.cd).then(a.0.cmp(&b.0)));
    let variants: Vec<Row> = rows
        .into_iter()
        .enumerate()
        .map(|(k, (_, mut r))| {
            r.rank = k + 1;
            r
        })
        .collect();
    let missing = plan.map_or_else(Vec::new, |p| {
        p.variants
            .into_iter()
            .filter(|e| !variants.iter().any(|r| r.name == e.name))
            .map(|e| e.name)
            .collect()
    });
    Ok(Collected {
        sweep: name.unwrap_or_else(|| "sweep".into()),
        keys,
        variants,
        missing,
        caution: CAUTION.into(),
    })
}

fn read_row(path: &Path) -> Result<(Row, VariantRecord)> {
    let file = path.join(VARIANT_FILE);
    let text = std::fs::read_to_string(&file)
        .with_context(|| format!("{}: cannot read", file.display()))?;
    let record: VariantRecord = serde_json::from_str(&text)
        .with_context(|| format!("{}: not a sweep variant record", file.display()))?;
    let s = read_summary(path)?;
    let row = Row {
        rank: 0,
        name: record.name.clone(),
        settings: record
            .settings
            .iter()
            .map(|x| (x.key.clone(), x.value.clone()))
            .collect(),
        cd: s.coefficients.drag,
        cd_low: s.drag_estimate.cd_low,
        cd_high: s.drag_estimate.cd_high,
        cl: s.coefficients.lift,
        lift_kg: s.lift_kg.total,
        front_axle_kg: s.lift_kg.front_axle,
        rear_axle_kg: s.lift_kg.rear_axle,
        separated_area_m2: s.separation.area_m2,
        separated_percent: 100.0 * s.separation.fraction,
        underbody_separated_percent: 100.0 * s.separation.underbody_fraction,
        separated_frontal_percent: 100.0 * s.separation.frontal_m2
            / s.reference.area_m2.max(f64::MIN_POSITIVE),
        panels: s.mesh.panels,
        warnings: s.warnings.len(),
        matrix_reused: record.matrix.reused,
    };
    Ok((row, record))
}

/// Write a file whole: a temporary file renamed into place.
fn write_whole(path: &Path, bytes: &[u8]) -> Result<()> {
    let tmp = path.with_extension(format!("partial-{}", std::process::id()));
    std::fs::write(&tmp, bytes).with_context(|| format!("{}: cannot write", tmp.display()))?;
    std::fs::rename(&tmp, path).with_context(|| format!("{}: cannot write", path.display()))
}

fn write_outputs(dir: &Path, c: &Collected) -> Result<()> {
    write_whole(&dir.join("sweep.csv"), csv(c).as_bytes())?;
    write_whole(
        &dir.join("sweep.json"),
        (serde_json::to_string_pretty(c)? + "\n").as_bytes(),
    )?;
    let plots = plots(c)?;
    write_whole(&dir.join("sweep.html"), page(c, &plots).as_bytes())
}

fn cell(v: &serde_json::Value) -> String {
    match v {
        serde_json::Value::String(s) => s.replace([',', '\n'], " "),
        other => other.to_string(),
    }
}

/// `sweep.csv`: one row per variant in rank order, numbers in shortest
/// round-trip form.
pub fn csv(c: &Collected) -> String {
    let mut s = String::from("rank,variant");
    for k in &c.keys {
        let _ = write!(s, ",{k}");
    }
    s.push_str(",cd,cd_low,cd_high,cl,lift_kg,front_axle_kg,rear_axle_kg,separated_area_m2,separated_percent,panels,warnings\n");
    for r in &c.variants {
        let _ = write!(s, "{},{}", r.rank, r.name);
        for k in &c.keys {
            let _ = write!(s, ",{}", r.settings.get(k).map(cell).unwrap_or_default());
        }
        let _ = writeln!(
            s,
            ",{},{},{},{},{},{},{},{},{},{},{}",
            r.cd,
            r.cd_low,
            r.cd_high,
            r.cl,
            r.lift_kg,
            r.front_axle_kg,
            r.rear_axle_kg,
            r.separated_area_m2,
            r.separated_percent,
            r.panels,
            r.warnings
        );
    }
    s
}

/// Plots of drag, lift and separated area against each numeric swept
/// key; one line per combination of the other keys' values.
fn plots(c: &Collected) -> Result<Vec<(String, Vec<u8>)>> {
    type Metric = (&'static str, &'static str, fn(&Row) -> f64);
    let metrics: [Metric; 3] = [
        ("Drag estimate", "drag estimate [counts]", |r| 1000.0 * r.cd),
        ("Lift", "lift [kg]", |r| r.lift_kg),
        ("Separated area", "separated area [m²]", |r| {
            r.separated_area_m2
        }),
    ];
    let mut out = Vec::new();
    for key in &c.keys {
        let numeric = c
            .variants
            .iter()
            .all(|r| r.settings.get(key).and_then(|v| v.as_f64()).is_some());
        if !numeric {
            continue;
        }
        for (what, unit, f) in &metrics {
            let plot = LinePlot {
                title: format!("{what} against {key}, sweep {}", c.sweep),
                subtitle: "Screening estimates; one line per combination of the other swept values"
                    .into(),
                x_label: axis_label(key),
                y_label: (*unit).into(),
                invert_y: false,
                series: series(c, key, *f),
            };
            let (canvas, _) = draw_line_plot(&plot, &PlotParams::default())?;
            out.push((format!("{what} against {key}"), canvas.to_png()?));
        }
    }
    Ok(out)
}

/// A swept key with its unit.
fn axis_label(key: &str) -> String {
    let unit = match key {
        "flow.speed" => "m/s",
        "flow.yaw"
        | "geometry.rear_window_deg"
        | "geometry.diffuser_deg"
        | "geometry.slant_deg" => "degrees",
        "ground.z"
        | "geometry.boot_deck_length"
        | "geometry.ride_height"
        | "geometry.radius"
        | "geometry.centre_z" => "m",
        "flow.density" => "kg/m³",
        "flow.viscosity" => "m²/s",
        _ => "-",
    };
    format!("{key} [{unit}]")
}

fn series(c: &Collected, key: &str, f: fn(&Row) -> f64) -> Vec<Series> {
    let mut groups: BTreeMap<String, Vec<(f64, f64)>> = BTreeMap::new();
    for r in &c.variants {
        let others: Vec<String> = r
            .settings
            .iter()
            .filter(|(k, _)| *k != key)
            .map(|(k, v)| format!("{k} = {}", cell(v)))
            .collect();
        let x = r
            .settings
            .get(key)
            .and_then(serde_json::Value::as_f64)
            .unwrap_or(f64::NAN);
        groups.entry(others.join(", ")).or_default().push((x, f(r)));
    }
    groups
        .into_iter()
        .enumerate()
        .map(|(k, (name, mut points))| {
            points.sort_by(|a, b| a.0.total_cmp(&b.0));
            Series {
                name: if name.is_empty() {
                    "all variants".into()
                } else {
                    name
                },
                points,
                colour: SERIES_COLOURS[k % SERIES_COLOURS.len()],
            }
        })
        .collect()
}

const STYLE: &str = "body{margin:0;background:#f4f5f2;color:#22232a;font:16px/1.5 'DejaVu Sans',Helvetica,Arial,sans-serif}\
main{max-width:1240px;margin:0 auto;padding:28px 32px 48px}h1{font-size:30px}h2{font-size:20px;border-left:4px solid #2b6f77;padding-left:10px}\
.caution{background:#fff7ea;border-left:6px solid #b5651d;padding:12px 16px;font-weight:600}\
table{border-collapse:collapse;background:#fff}th,td{padding:6px 12px;border-bottom:1px solid #dcdfe5;text-align:right}\
th{background:#eef1f0;font-size:13px}td.name{text-align:left;font-weight:600}figure{margin:0 0 24px;background:#fff;padding:10px}\
figure img{width:100%;height:auto}figcaption{color:#62656e;font-size:14px}";

/// A warning when the separated share of the surface varies across the
/// variants by more than [`crate::compare::SEPARATION_SHIFT`]: the drag
/// ranking then rests on the separated-flow model.
fn separation_spread(c: &Collected) -> Option<String> {
    let by_area = spread(c, |r| r.separated_percent, crate::compare::SEPARATION_SHIFT);
    let by_stream = spread(
        c,
        |r| r.separated_frontal_percent,
        crate::compare::SEPARATION_FRONTAL_SHIFT,
    );
    if by_area.is_none() && by_stream.is_none() {
        return None;
    }
    let (lo, hi) = range(c, |r| r.separated_percent);
    let (flo, fhi) = range(c, |r| r.separated_frontal_percent);
    Some(format!(
        "The separated share of the surface ranges from {lo:.1} % to {hi:.1} % across these variants, and \
         the separated surface projected along the stream (front- and rear-facing parts counted separately) \
         covers {flo:.1} % to {fhi:.1} % of the reference area: {}.",
        crate::compare::SEPARATION_CAUTION
    ))
}

/// The same for the underbody's separated share and the lift ranking.
fn underbody_spread(c: &Collected) -> Option<String> {
    let (lo, hi) = spread(
        c,
        |r| r.underbody_separated_percent,
        crate::compare::SEPARATION_SHIFT,
    )?;
    Some(format!(
        "The separated share of the underbody ranges from {lo:.1} % to {hi:.1} % across these variants: {}.",
        crate::compare::UNDERBODY_CAUTION
    ))
}

/// Lowest and highest of a percentage over the variants.
fn range(c: &Collected, f: fn(&Row) -> f64) -> (f64, f64) {
    let lo = c.variants.iter().map(f).fold(f64::INFINITY, f64::min);
    let hi = c.variants.iter().map(f).fold(f64::NEG_INFINITY, f64::max);
    (lo, hi)
}

/// [`range`] when the two lie more than `shift` (a fraction) apart.
fn spread(c: &Collected, f: fn(&Row) -> f64, shift: f64) -> Option<(f64, f64)> {
    let (lo, hi) = range(c, f);
    (hi - lo > 100.0 * shift).then_some((lo, hi))
}

/// The self-contained page.
fn page(c: &Collected, plots: &[(String, Vec<u8>)]) -> String {
    let mut s = format!(
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>{0}: sweep</title>\n\
         <style>{STYLE}</style>\n</head>\n<body>\n<main>\n<h1>Sweep {0}</h1>\n<div class=\"caution\">{1}</div>\n",
        escape(&c.sweep),
        escape(&c.caution)
    );
    let _ = writeln!(
        s,
        "<p>{} variants ranked by the drag estimate. Differences of a few drag counts are within the noise \
         of any simulation (common practice); use <code>tuft compare</code> on two variants for a verdict.</p>",
        c.variants.len()
    );
    for text in [separation_spread(c), underbody_spread(c)]
        .into_iter()
        .flatten()
    {
        let _ = writeln!(s, "<p class=\"caution\">{}</p>", escape(&text));
    }
    s.push_str("<h2>Ranking</h2>\n<table>\n<tr><th>#</th><th>variant</th>");
    for k in &c.keys {
        let _ = write!(s, "<th>{}</th>", escape(k));
    }
    s.push_str("<th>C_D</th><th>band</th><th>lift [kg]</th><th>front [kg]</th><th>rear [kg]</th><th>separated [m²]</th><th>warnings</th></tr>\n");
    for r in &c.variants {
        let _ = write!(
            s,
            "<tr><td>{}</td><td class=\"name\">{}</td>",
            r.rank,
            escape(&r.name)
        );
        for k in &c.keys {
            let _ = write!(
                s,
                "<td>{}</td>",
                escape(&r.settings.get(k).map(cell).unwrap_or_default())
            );
        }
        let _ = writeln!(
            s,
            "<td>{:.3}</td><td>{:.3}–{:.3}</td><td>{:.0}</td><td>{:.0}</td><td>{:.0}</td><td>{:.3}</td><td>{}</td></tr>",
            r.cd,
            r.cd_low,
            r.cd_high,
            r.lift_kg,
            r.front_axle_kg,
            r.rear_axle_kg,
            r.separated_area_m2,
            r.warnings
        );
    }
    s.push_str("</table>\n");
    if !c.missing.is_empty() {
        s.push_str("<h2>Missing or failed</h2>\n<ul>\n");
        for m in &c.missing {
            let _ = writeln!(s, "<li>{}</li>", escape(m));
        }
        s.push_str("</ul>\n");
    }
    if !plots.is_empty() {
        s.push_str("<h2>Plots</h2>\n");
    }
    for (title, png) in plots {
        let data = base64::engine::general_purpose::STANDARD.encode(png);
        let _ = writeln!(
            s,
            "<figure><img alt=\"{0}\" src=\"data:image/png;base64,{data}\"><figcaption>{0}</figcaption></figure>",
            escape(title)
        );
    }
    let _ = writeln!(
        s,
        "<footer>tuft {}</footer>\n</main>\n</body>\n</html>",
        env!("CARGO_PKG_VERSION")
    );
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sweep(shares: &[f64]) -> Collected {
        let row = |(k, &p): (usize, &f64)| Row {
            rank: k + 1,
            name: format!("v{k}"),
            settings: BTreeMap::new(),
            cd: 0.3,
            cd_low: 0.28,
            cd_high: 0.32,
            cl: 0.0,
            lift_kg: 0.0,
            front_axle_kg: 0.0,
            rear_axle_kg: 0.0,
            separated_area_m2: p / 10.0,
            separated_percent: p,
            underbody_separated_percent: 2.0 * p,
            separated_frontal_percent: 0.0,
            panels: 1000,
            warnings: 0,
            matrix_reused: false,
        };
        Collected {
            sweep: "s".into(),
            keys: Vec::new(),
            variants: shares.iter().enumerate().map(row).collect(),
            missing: Vec::new(),
            caution: CAUTION.into(),
        }
    }

    /// The best drag is named only beyond the noise floor and with the
    /// separated share steady (the rule `tuft compare` follows).
    #[test]
    fn names_the_best_drag_only_beyond_the_noise() {
        let mut c = sweep(&[10.0, 10.0]);
        c.variants[1].cd = 0.302;
        assert!(
            best_drag(&c).contains("no clear winner"),
            "{}",
            best_drag(&c)
        );
        c.variants[1].cd = 0.31;
        assert!(
            best_drag(&c).starts_with("best drag: v0"),
            "{}",
            best_drag(&c)
        );
        c.variants[1].separated_percent = 14.0;
        assert!(
            best_drag(&c).contains("no winner is named"),
            "{}",
            best_drag(&c)
        );
    }

    /// The separated surface projected along the stream moving by more
    /// than 2 % of the reference area warns too, even when the share of the surface stays
    /// within a point (the slant-back body from 25 to 35 degrees).
    #[test]
    fn warns_when_the_separated_area_projected_along_the_stream_moves() {
        let mut c = sweep(&[10.0, 10.5]);
        assert!(separation_spread(&c).is_none());
        c.variants[1].separated_frontal_percent = 12.7;
        let text = separation_spread(&c).unwrap_or_default();
        assert!(
            text.contains("counted separately) covers 0.0 % to 12.7 % of the reference area"),
            "{text}"
        );
    }

    /// The page warns when the separated share of the surface moves by
    /// more than one point across the variants, and only then.
    #[test]
    fn warns_when_the_separated_share_moves() {
        for (shares, warned) in [
            (vec![10.0, 10.5, 10.9], false),
            (vec![10.0, 12.0], true),
            (vec![5.0], false),
        ] {
            let c = sweep(&shares);
            assert_eq!(separation_spread(&c).is_some(), warned, "{shares:?}");
            // The underbody's shares here are twice the surface's, so they
            // spread by more than a point whenever those spread by more
            // than half a point.
            let under = shares.iter().fold(f64::NEG_INFINITY, |m, &v| m.max(v))
                - shares.iter().fold(f64::INFINITY, |m, &v| m.min(v))
                > 0.5;
            assert_eq!(underbody_spread(&c).is_some(), under, "{shares:?}");
            let html = page(&c, &[]);
            assert_eq!(
                html.contains("drag ranking of rear slants"),
                warned,
                "{shares:?}"
            );
            assert_eq!(
                html.contains("loss of downforce when a diffuser stalls"),
                under,
                "{shares:?}"
            );
        }
    }
}
