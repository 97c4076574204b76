//! The sweep file and the list of variants it stands for.
//!
//! ```toml
//! # rear-window.toml
//! base = "coupe.toml"          # a case file (relative to this file) ...
//! # [base]                     # ... or the case written inline
//! # geometry = { shape = "coupe" }
//! combine = "all"              # every combination ("all") or one list at a time ("each")
//!
//! [[vary]]
//! key = "yaw"                  # short name or a dotted case key
//! values = [0.0, 5.0, 10.0]
//!
//! [[vary]]
//! key = "rear_window_deg"
//! values = [22.0, 30.0, 38.0]
//! ```
//!
//! Short names: `speed`, `yaw`, `ground` (the ground height), `panels`,
//! `transition`, `stl` (files relative to the sweep file),
//! `rear_window_deg`, `boot_deck_length`, `diffuser_deg`, `ride_height`, `slant_deg`; any
//! other key is a dotted path into the case file (`flow.density`,
//! `boundary_layer.separation_h`, ...). Each variant is the base case with
//! its values set, named after them (`yaw-5_rear_window_deg-30`), and runs
//! into a folder of that name. Variants are ordered so that those sharing
//! geometry (only the flow, boundary-layer or reference keys differ) sit
//! together; shards are contiguous slices of that order.

use std::path::{Path, PathBuf};

use anyhow::{Context, Result, bail};
use serde::{Deserialize, Serialize};

use crate::case::CaseFile;

/// The base case: a path or an inline case table.
#[derive(Debug, Clone, Deserialize)]
#[serde(untagged)]
enum BaseCase {
    /// A case file, relative to the sweep file.
    Path(PathBuf),
    /// The case itself.
    Inline(Box<toml::Value>),
}

/// How lists combine.
#[derive(Debug, Clone, Copy, Deserialize, Default, PartialEq, Eq)]
#[serde(rename_all = "lowercase")]
enum Combine {
    /// Every combination of the lists (a full grid).
    #[default]
    All,
    /// Each list alone, the other keys at the base value.
    Each,
}

/// One `[[vary]]` table.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct Vary {
    key: String,
    values: Vec<toml::Value>,
    /// A number for each value, for `tuft collect`'s plots and sweep.csv
    /// where the values are not numbers (an STL per boot-lid height), or
    /// a short name for each (an STL per accessory: "bare", "roof box"),
    /// which the plots show as categories.
    #[serde(default)]
    labels: Option<Vec<toml::Value>>,
    /// What the labels measure, with their unit ("boot lid raise [mm]"),
    /// or a list of names for labels that are lists, one value per name
    /// (an STL per spoiler height and diffuser angle: `label = ["spoiler
    /// [mm]", "diffuser [deg]"]`, `labels = [[1400, 4], [1400, 8], ...]`).
    #[serde(default)]
    label: Option<toml::Value>,
}

/// [`Vary::label`]'s names: one, or one per place in each label; `None`
/// for anything else.
fn label_names(label: &toml::Value) -> Option<Vec<String>> {
    match label {
        toml::Value::String(n) => Some(vec![n.clone()]),
        toml::Value::Array(ns) => ns.iter().map(|n| n.as_str().map(str::to_owned)).collect(),
        _ => None,
    }
}

/// The settings one value of a `[[vary]]` list makes: the key and value,
/// and its label's name and number when the list has labels.
type Pairs = Vec<(String, toml::Value)>;

/// Whether a setting's key is a label's ([`Vary::labels`]): a label names
/// no case key, and case keys all have their section and a dot.
pub fn is_label(key: &str) -> bool {
    !key.contains('.')
}

/// The sweep file as written.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct SweepFile {
    base: BaseCase,
    #[serde(default)]
    combine: Combine,
    #[serde(default)]
    vary: Vec<Vary>,
}

/// One swept setting of a variant: the dotted case key and its value.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct Setting {
    /// Dotted case key, e.g. `flow.yaw`.
    pub key: String,
    /// The value as written in the sweep file.
    pub value: serde_json::Value,
}

/// One variant to run.
#[derive(Debug, Clone)]
pub struct Variant {
    /// Folder name.
    pub name: String,
    /// What differs from the base case.
    pub settings: Vec<Setting>,
    /// The case file of the variant (or why it cannot be made).
    pub file: Result<CaseFile, String>,
    /// Variants with equal keys share geometry (and one matrix).
    pub geometry_key: String,
}

/// A checked sweep.
#[derive(Debug, Clone)]
pub struct Plan {
    /// Sweep name (file stem).
    pub name: String,
    /// The sweep file.
    pub path: PathBuf,
    /// Every variant, geometry groups together.
    pub variants: Vec<Variant>,
}

/// The dotted case key a short name stands for.
pub fn full_key(key: &str) -> String {
    SHORT_KEYS
        .iter()
        .find(|(short, _)| *short == key)
        .map_or_else(|| key.into(), |(_, full)| (*full).into())
}

/// The short names a `[[vary]]` key may use, with the case-file key each
/// stands for.
const SHORT_KEYS: [(&str, &str); 17] = [
    ("speed", "flow.speed"),
    ("yaw", "flow.yaw"),
    ("density", "flow.density"),
    ("viscosity", "flow.viscosity"),
    ("ground", "ground.z"),
    ("transition", "boundary_layer.transition"),
    ("panels", "geometry.panels"),
    ("stl", "geometry.stl"),
    ("shape", "geometry.shape"),
    ("rear_window_deg", "geometry.rear_window_deg"),
    ("boot_deck_length", "geometry.boot_deck_length"),
    ("diffuser_deg", "geometry.diffuser_deg"),
    ("ride_height", "geometry.ride_height"),
    ("slant_deg", "geometry.slant_deg"),
    ("radius", "geometry.radius"),
    ("centre_z", "geometry.centre_z"),
    ("units", "geometry.units"),
];

/// Short label of a dotted key for variant names.
fn short_key(key: &str) -> &str {
    match key {
        "ground.z" => "ground",
        k => k.rsplit('.').next().unwrap_or(k),
    }
}

impl Plan {
    /// Read a sweep file.
    pub fn load(path: &Path) -> Result<Self> {
        let text = crate::case::read_text(path, "the sweep file")?;
        crate::case::other_kind(path, &text, true)?;
        // `base = "FILE"` and a `[base.geometry]` table beside it: TOML
        // cannot add keys to a string (a review met its parser's "cannot
        // extend value of type the text with a dotted key").
        if text
            .lines()
            .any(|l| l.trim_start().starts_with("base") && l.contains('"'))
            && text.lines().any(|l| l.trim_start().starts_with("[base."))
        {
            bail!(
                "{}: base names a case file, so it takes no [base.*] tables of its own; change a \
                 setting of the base case through a [[vary]] list with one value (key = \"panels\", \
                 values = [3000]), or write the whole case under [base] instead of naming a file",
                path.display()
            );
        }
        let file: SweepFile =
            toml::from_str(&text).map_err(|e| crate::case::toml_error(path, &text, &e))?;
        Self::from_file(path, file).with_context(|| path.display().to_string())
    }

    fn from_file(path: &Path, file: SweepFile) -> Result<Self> {
        let dir = path.parent().unwrap_or(Path::new(".")).to_path_buf();
        let base = base_value(&dir, &file.base)?;
        let vary = check_vary(&file.vary)?;
        let combos = match file.combine {
            Combine::All => grid(&vary),
            Combine::Each => each(&vary),
        };
        let mut variants: Vec<Variant> = combos
            .into_iter()
            .map(|settings| variant(&base, &dir, settings))
            .collect();
        unique_names(&mut variants);
        refuse_bad_variants(&dir, &variants)?;
        let variants = group_by_geometry(variants);
        let name = path
            .file_stem()
            .map_or("sweep".into(), |s| s.to_string_lossy().into_owned());
        Ok(Self {
            name,
            path: path.to_path_buf(),
            variants,
        })
    }

    /// Give every variant one panel count when the variants' geometries
    /// differ, at least one reads an STL, and neither the base case nor
    /// the sweep sets `geometry.panels`: the default count is chosen per
    /// STL from its surface area and length, rounded to 500
    /// (`tuft_mesh::quality::suggested_panels`), so variants of the same
    /// size had been solved on 7,000 and 6,500 panels and `tuft collect`
    /// then warned that they should be ranked at about the same count.
    /// The count is the first variant's default (what a run of it alone
    /// uses: the suggestion, or all its facets when it has fewer), the
    /// same in every shard; `dir` is the sweep file's folder.
    /// Returns the count set, `None` when nothing was changed (or the first
    /// variant's geometry cannot be prepared: it then fails on its own).
    pub fn one_panel_count(&mut self, dir: &Path) -> Option<usize> {
        let files = || self.variants.iter().filter_map(|v| v.file.as_ref().ok());
        if files().any(|f| f.geometry.panels.is_some())
            || !files().any(|f| f.geometry.stl.is_some())
            || self.geometry_groups() < 2
        {
            return None;
        }
        let first = self.variants.iter().find(|v| v.file.is_ok())?;
        let file = first.file.clone().ok()?;
        let case =
            crate::case::Case::from_file(&dir.join(format!("{}.toml", first.name)), file).ok()?;
        // What a lone run uses: the suggestion, or every facet of an STL
        // that holds fewer (tuft does not refine; the suggestion had given
        // every variant of the shipped 3,956-facet coupe a warning that
        // its 6,500 panels were not met).
        let geo = crate::geometry::load(&case).ok()?;
        let n = match geo.report.coarsen {
            Some(_) => geo.report.suggested_panels,
            None => geo.report.suggested_panels.min(geo.mesh.len()),
        };
        for f in self
            .variants
            .iter_mut()
            .filter_map(|v| v.file.as_mut().ok())
        {
            f.geometry.panels = Some(n);
        }
        Some(n)
    }

    /// Number of distinct geometries.
    pub fn geometry_groups(&self) -> usize {
        let mut keys: Vec<&str> = self
            .variants
            .iter()
            .map(|v| v.geometry_key.as_str())
            .collect();
        keys.sort_unstable();
        keys.dedup();
        keys.len()
    }
}

/// Refuse the sweep before anything runs when a variant's case cannot
/// run: a key that does not take the value, a value a case refuses (a
/// negative speed, a yaw beyond 30 degrees) or a built-in shape's
/// parameter its generator refuses. An overnight sweep had run its good
/// variants first and failed the bad ones in the morning. Checks that
/// need the prepared body (the ground, axles and regions against it) stay
/// with each variant's run. `dir`: the sweep file's folder.
/// Why a case's STL cannot be read, if it cannot: a missing or
/// unreadable file is found before anything runs, not when the sweep
/// reaches it (a review's misspelt file name surfaced after the first
/// variant had run).
fn unreadable_stl(case: &crate::case::Case) -> Option<String> {
    let crate::case::GeometrySource::Stl { path, .. } = &case.source else {
        return None;
    };
    std::fs::File::open(path).err().map(|e| {
        format!(
            "geometry.stl = \"{}\": cannot read the file: {e}",
            path.display()
        )
    })
}

fn refuse_bad_variants(dir: &Path, variants: &[Variant]) -> Result<()> {
    // A built-in shape is generated once per geometry (variants that differ
    // only in the flow share one; every Slurm shard repeats this).
    let mut shapes: std::collections::HashMap<&str, Option<String>> =
        std::collections::HashMap::new();
    let reasons: Vec<(&str, String)> = variants
        .iter()
        .filter_map(|v| {
            let why = match &v.file {
                Err(e) => e.clone(),
                Ok(file) => {
                    let path = dir.join(format!("{}.toml", v.name));
                    match crate::case::Case::from_file(&path, file.clone()) {
                        Err(e) => format!("{e:#}"),
                        Ok(case) => match unreadable_stl(&case) {
                            Some(why) => why,
                            None => shapes
                                .entry(v.geometry_key.as_str())
                                .or_insert_with(|| {
                                    crate::geometry::check_shape(&case)
                                        .err()
                                        .map(|e| format!("{e:#}"))
                                })
                                .clone()?,
                        },
                    }
                }
            };
            Some((v.name.as_str(), why))
        })
        .collect();
    // One reason for every variant (a misspelt key, a shape key beside an
    // STL): said once.
    if let [(_, first), rest @ ..] = reasons.as_slice()
        && !rest.is_empty()
        && reasons.len() == variants.len()
        && rest.iter().all(|(_, why)| why == first)
    {
        bail!(
            "all {} variants fail the same way, so none was started: {first}",
            variants.len()
        );
    }
    let bad: Vec<String> = reasons
        .iter()
        .map(|(name, why)| format!("{name}: {why}"))
        .collect();
    const NAMED: usize = 3;
    if let Some(first) = bad.first() {
        let more = match bad.len() {
            1 => String::new(),
            n if n <= NAMED => format!("; {}", bad[1..].join("; ")),
            n => format!("; {}; and {} more", bad[1..NAMED].join("; "), n - NAMED),
        };
        bail!(
            "{} of {} variants cannot run, so none was started: {first}{more}",
            bad.len(),
            variants.len()
        );
    }
    Ok(())
}

/// The base case as a TOML value, STL paths made relative to the sweep's
/// folder.
fn base_value(dir: &Path, base: &BaseCase) -> Result<toml::Value> {
    let (value, case_dir) = match base {
        BaseCase::Path(p) => {
            let file = dir.join(p);
            let text = crate::case::read_text(&file, "the base case file")?;
            let v: toml::Value =
                toml::from_str(&text).map_err(|e| crate::case::toml_error(&file, &text, &e))?;
            // Its mistakes named in its own file, with the line.
            let _: CaseFile =
                toml::from_str(&text).map_err(|e| crate::case::toml_error(&file, &text, &e))?;
            (v, file.parent().unwrap_or(Path::new(".")).to_path_buf())
        }
        BaseCase::Inline(v) => ((**v).clone(), dir.to_path_buf()),
    };
    let mut value = value;
    if let Some(stl) = value.get_mut("geometry").and_then(|g| g.get_mut("stl"))
        && let Some(s) = stl.as_str()
    {
        *stl = toml::Value::String(path_string(&case_dir.join(s)));
    }
    // Check the base now so its mistakes are reported once, up front.
    let _: CaseFile = value.clone().try_into().map_err(|e: toml::de::Error| {
        anyhow::anyhow!(
            "base case: {}",
            crate::case::plain_toml_words(&e.to_string())
        )
    })?;
    Ok(value)
}

fn path_string(p: &Path) -> String {
    std::path::absolute(p)
        .unwrap_or_else(|_| p.to_path_buf())
        .to_string_lossy()
        .into_owned()
}

/// Lists with their full keys, each value as the settings it makes
/// (its label's with it); refuses empty lists, repeated keys and labels
/// that do not pair with the values.
fn check_vary(vary: &[Vary]) -> Result<Vec<(String, Vec<Pairs>)>> {
    let mut out: Vec<(String, Vec<Pairs>)> = Vec::new();
    for (k, v) in vary.iter().enumerate() {
        let key = full_key(&v.key);
        if !key.contains('.') {
            let shorts: Vec<&str> = SHORT_KEYS.iter().map(|(short, _)| *short).collect();
            let nearest = crate::case::nearest_name(&v.key, shorts.iter().copied())
                .map_or(String::new(), |name| format!(" (did you mean {name}?)"));
            bail!(
                "vary #{} (key \"{}\"): not a key tuft knows{nearest}; give a case-file key with its \
                 section (e.g. geometry.rear_window_deg, flow.speed_kmh) or one of the short names {}",
                k + 1,
                v.key,
                shorts.join(", ")
            );
        }
        if v.values.is_empty() {
            bail!("vary #{} (key \"{}\"): values is empty", k + 1, v.key);
        }
        if out.iter().any(|(o, _)| *o == key) {
            bail!("vary #{}: key \"{}\" is varied twice", k + 1, v.key);
        }
        // A value listed twice would run the same variant twice (a
        // review's [30.0, 30.0] ran as speed-30-1 and speed-30-2; 20 and
        // 20.0 are one value too).
        let number = |x: &toml::Value| x.as_float().or_else(|| x.as_integer().map(|i| i as f64));
        let same = |a: &toml::Value, b: &toml::Value| match (number(a), number(b)) {
            (Some(p), Some(q)) => p == q,
            _ => a == b,
        };
        if let Some((i, twice)) = v
            .values
            .iter()
            .enumerate()
            .find(|(i, x)| v.values[..*i].iter().any(|y| same(x, y)))
        {
            bail!(
                "vary #{} (key \"{}\"): the value {twice} is listed twice (values {} and {}), which \
                 would run the same variant twice; list each value once",
                k + 1,
                v.key,
                v.values
                    .iter()
                    .position(|x| same(x, twice))
                    .map_or(0, |p| p + 1),
                i + 1
            );
        }
        let label = match (&v.labels, &v.label) {
            (None, None) => None,
            (None, Some(_)) => bail!(
                "vary #{} (key \"{}\"): label names what the labels measure, but labels is missing \
                 (a number for each value)",
                k + 1,
                v.key
            ),
            (Some(l), _) if l.len() != v.values.len() => bail!(
                "vary #{} (key \"{}\"): {} labels for {} values (give one label, a number or a name, for \
                 each value)",
                k + 1,
                v.key,
                l.len(),
                v.values.len()
            ),
            (Some(l), name) => {
                let at =
                    |why: String| anyhow::anyhow!("vary #{} (key \"{}\"): {why}", k + 1, v.key);
                // A sweep.csv header and a plot's axis: no comma, no dot
                // (a dot would read as a case key).
                let clean = |n: &str| {
                    n.replace([',', '.'], " ")
                        .split_whitespace()
                        .collect::<Vec<_>>()
                        .join(" ")
                };
                let names: Vec<String> = match name {
                    None => vec!["label".to_owned()],
                    Some(given) => label_names(given)
                        .ok_or_else(|| {
                            at(format!(
                                "label must be a name (\"boot lid raise [mm]\") or a list of names, one \
                                 for each place in the labels (got {given})"
                            ))
                        })?
                        .iter()
                        .map(|n| clean(n))
                        .collect(),
                };
                if names.is_empty() || names.iter().any(String::is_empty) {
                    bail!("vary #{} (key \"{}\"): label is empty", k + 1, v.key);
                }
                if let Some(twice) = names
                    .iter()
                    .enumerate()
                    .find(|(j, n)| names[..*j].contains(n))
                {
                    return Err(at(format!("the label name \"{}\" is given twice", twice.1)));
                }
                // A label named as one of sweep.csv's own columns would
                // repeat it (a review's `label = "variant"` gave two
                // `variant` columns, and a script reading by name lost the
                // folder's).
                if let Some(taken) = names.iter().find(|n| crate::collect::is_csv_column(n)) {
                    return Err(at(format!(
                        "the label name \"{taken}\" is one of sweep.csv's own columns: name it for \
                         what the labels measure (\"roof and window\", \"boot lid raise [mm]\")"
                    )));
                }
                if let [name] = names.as_slice() {
                    Some(vec![(name.clone(), label_values(l, true).map_err(at)?)])
                } else {
                    Some(label_columns(l, &names).map_err(at)?)
                }
            }
        };
        let values = v
            .values
            .iter()
            .enumerate()
            .map(|(i, value)| {
                let mut pairs = vec![(key.clone(), value.clone())];
                for (name, labels) in label.iter().flatten() {
                    pairs.push((name.clone(), labels[i].clone()));
                }
                pairs
            })
            .collect();
        out.push((key, values));
    }
    if out.is_empty() {
        bail!("no [[vary]] lists: a sweep needs at least one");
    }
    Ok(out)
}

/// Labels that are lists, one value for each of `names`: a column of
/// settings per name ([`label_values`], values may repeat within a
/// column), no two labels alike.
fn label_columns(
    labels: &[toml::Value],
    names: &[String],
) -> Result<Vec<(String, Vec<toml::Value>)>, String> {
    let rows: Vec<&Vec<toml::Value>> = labels
        .iter()
        .enumerate()
        .map(|(i, l)| match l.as_array() {
            Some(row) if row.len() == names.len() => Ok(row),
            _ => Err(format!(
                "label names {} things ({}), so each label is a list of {} values (label {} is {l})",
                names.len(),
                names.join(", "),
                names.len(),
                i + 1
            )),
        })
        .collect::<Result<_, _>>()?;
    if let Some((i, row)) = rows
        .iter()
        .enumerate()
        .find(|(i, r)| rows[..*i].contains(r))
    {
        return Err(format!(
            "label {} ({}) is given twice",
            i + 1,
            toml::Value::Array((*row).clone())
        ));
    }
    names
        .iter()
        .enumerate()
        .map(|(j, name)| {
            let column: Vec<toml::Value> = rows.iter().map(|r| r[j].clone()).collect();
            Ok((name.clone(), label_values(&column, false)?))
        })
        .collect()
}

/// A `[[vary]]` list's labels as settings: all numbers (as floats) or all
/// names (trimmed, none empty, none twice when `unique`).
fn label_values(labels: &[toml::Value], unique: bool) -> Result<Vec<toml::Value>, String> {
    let numbers: Option<Vec<toml::Value>> = labels
        .iter()
        .map(|v| match v {
            toml::Value::Integer(i) => Some(toml::Value::Float(*i as f64)),
            toml::Value::Float(f) => Some(toml::Value::Float(*f)),
            _ => None,
        })
        .collect();
    if let Some(numbers) = numbers {
        return Ok(numbers);
    }
    let names: Option<Vec<String>> = labels
        .iter()
        .map(|v| v.as_str().map(|s| s.trim().to_owned()))
        .collect();
    let Some(names) = names else {
        return Err(
            "labels must be all numbers (a value each: 0, 30, 60) or all names (\"bare\", \"roof box\")"
                .into(),
        );
    };
    if names.iter().any(String::is_empty) {
        return Err("a label is empty".into());
    }
    if let Some(twice) = names
        .iter()
        .enumerate()
        .find(|(k, n)| unique && names[..*k].contains(n))
    {
        return Err(format!("the label \"{}\" is given twice", twice.1));
    }
    Ok(names.into_iter().map(toml::Value::String).collect())
}

/// Every combination, the first list varying slowest.
fn grid(vary: &[(String, Vec<Pairs>)]) -> Vec<Pairs> {
    let mut combos: Vec<Pairs> = vec![Vec::new()];
    for (_, values) in vary {
        combos = combos
            .into_iter()
            .flat_map(|c| {
                values.iter().map(move |v| {
                    let mut c = c.clone();
                    c.extend(v.iter().cloned());
                    c
                })
            })
            .collect();
    }
    combos
}

/// Each list on its own.
fn each(vary: &[(String, Vec<Pairs>)]) -> Vec<Pairs> {
    vary.iter()
        .flat_map(|(_, values)| values.iter().cloned())
        .collect()
}

/// Build one variant from the base and its settings.
fn variant(base: &toml::Value, dir: &Path, settings: Pairs) -> Variant {
    let mut value = base.clone();
    let mut applied = Vec::new();
    let mut names = Vec::new();
    let mut error = None;
    for (key, v) in settings {
        // A label sets nothing in the case and is not in the name.
        if is_label(&key) {
            applied.push(Setting {
                key,
                value: serde_json::to_value(&v).unwrap_or(serde_json::Value::Null),
            });
            continue;
        }
        let v = if key == "geometry.stl" {
            v.as_str().map_or(v.clone(), |s| {
                toml::Value::String(path_string(&dir.join(s)))
            })
        } else {
            v
        };
        names.push(format!("{}-{}", short_key(&key), value_label(&key, &v)));
        if let Err(e) = set_key(&mut value, &key, v.clone()) {
            error.get_or_insert(e);
        }
        applied.push(Setting {
            key,
            value: serde_json::to_value(&v).unwrap_or(serde_json::Value::Null),
        });
    }
    let file = match error {
        Some(e) => Err(e),
        None => value
            .clone()
            .try_into::<CaseFile>()
            .map_err(|e| crate::case::plain_toml_words(&e.to_string())),
    };
    let geometry_key = geometry_key(&value);
    Variant {
        name: names.join("_"),
        settings: applied,
        file,
        geometry_key,
    }
}

/// What decides the shared matrix: the panel mesh (the geometry section
/// and the ground, and whether a half model runs whole in a cross wind)
/// and the solver settings (the operator, and whether the separated-flow
/// loop runs).
fn geometry_key(v: &toml::Value) -> String {
    let part = |k: &str| v.get(k).map(ToString::to_string).unwrap_or_default();
    let half = v
        .get("geometry")
        .and_then(|g| g.get("half_model"))
        .and_then(toml::Value::as_bool)
        == Some(true);
    let yawed = v
        .get("flow")
        .and_then(|f| f.get("yaw"))
        .and_then(|y| y.as_float().or_else(|| y.as_integer().map(|i| i as f64)))
        .is_some_and(|y| y != 0.0);
    let whole = if half && yawed { "|whole" } else { "" };
    format!(
        "{}|{}|{}{whole}",
        part("geometry"),
        part("ground"),
        part("solver")
    )
}

/// Set a dotted key, creating tables on the way; setting `geometry.stl`
/// drops `geometry.shape` and the other way round, and `flow.speed` drops
/// `flow.speed_kmh` and the other way round (the swept speed replaces the
/// base case's, in whichever unit that was given).
fn set_key(root: &mut toml::Value, key: &str, value: toml::Value) -> Result<(), String> {
    let parts: Vec<&str> = key.split('.').collect();
    let (last, path) = parts.split_last().ok_or_else(|| "empty key".to_string())?;
    let mut node = root;
    for p in path {
        let table = node
            .as_table_mut()
            .ok_or_else(|| format!("{key}: \"{p}\" is not a table"))?;
        node = table
            .entry(p.to_string())
            .or_insert_with(|| toml::Value::Table(toml::map::Map::new()));
    }
    let table = node
        .as_table_mut()
        .ok_or_else(|| format!("{key}: not a table"))?;
    match key {
        "geometry.stl" => drop(table.remove("shape")),
        "geometry.shape" => drop(table.remove("stl")),
        "flow.speed" => drop(table.remove("speed_kmh")),
        "flow.speed_kmh" => drop(table.remove("speed")),
        _ => {}
    }
    table.insert(last.to_string(), value);
    Ok(())
}

/// A value as it appears in a folder name.
fn value_label(key: &str, v: &toml::Value) -> String {
    let raw = match v {
        // A negative value reads "minus" ("yaw-minus5", not "yaw--5",
        // which looks like a command-line option).
        toml::Value::Float(f) if *f < 0.0 => format!("minus{}", crate::output::short_number(-f)),
        toml::Value::Integer(i) if *i < 0 => format!("minus{}", i.unsigned_abs()),
        toml::Value::Float(f) => crate::output::short_number(*f),
        toml::Value::Integer(i) => i.to_string(),
        toml::Value::String(s) if key == "geometry.stl" => Path::new(s)
            .file_stem()
            .map_or(s.clone(), |x| x.to_string_lossy().into_owned()),
        toml::Value::String(s) => s.clone(),
        toml::Value::Boolean(b) => b.to_string(),
        other => other.to_string(),
    };
    raw.chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || "-.+".contains(c) {
                c
            } else {
                '_'
            }
        })
        .collect()
}

/// Make names unique by numbering repeats.
fn unique_names(variants: &mut [Variant]) {
    let names: Vec<String> = variants.iter().map(|v| v.name.clone()).collect();
    for (k, v) in variants.iter_mut().enumerate() {
        if names.iter().filter(|n| **n == v.name).count() > 1 {
            v.name = format!("{}-{}", v.name, k + 1);
        }
    }
}

/// Stable grouping: geometry groups in order of first appearance.
fn group_by_geometry(variants: Vec<Variant>) -> Vec<Variant> {
    let mut keys: Vec<String> = Vec::new();
    for v in &variants {
        if !keys.contains(&v.geometry_key) {
            keys.push(v.geometry_key.clone());
        }
    }
    let mut out = Vec::with_capacity(variants.len());
    for k in &keys {
        out.extend(variants.iter().filter(|v| &v.geometry_key == k).cloned());
    }
    out
}

/// Indices of the variants shard `k` of `n` runs (1-based `k`): the
/// contiguous slice `[(k-1) len / n, k len / n)`, so the shards partition
/// the list with no loss and no repeats.
pub fn shard_range(len: usize, k: usize, n: usize) -> std::ops::Range<usize> {
    ((k - 1) * len / n)..(k * len / n)
}

/// Parse `K/N` with `1 <= K <= N`.
pub fn parse_shard(s: &str) -> Result<(usize, usize)> {
    let (k, n) = s
        .split_once('/')
        .ok_or_else(|| anyhow::anyhow!("--shard must look like K/N, e.g. 2/8 (got \"{s}\")"))?;
    let parse = |x: &str| x.trim().parse::<usize>().ok();
    match (parse(k), parse(n)) {
        (Some(k), Some(n)) if k >= 1 && k <= n => Ok((k, n)),
        _ => bail!("--shard K/N needs whole numbers 1 <= K <= N (got \"{s}\")"),
    }
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;

    fn plan(text: &str) -> Result<Plan> {
        let file: SweepFile = toml::from_str(text).map_err(|e| anyhow::anyhow!("{e}"))?;
        Plan::from_file(Path::new("study/s.toml"), file)
    }

    const BASE: &str = "[base.geometry]\nshape = \"coupe\"\n[base.ground]\nz = 0.0\n";

    /// The sentence a refused sweep file gets.
    fn refusal(text: &str) -> String {
        plan(text).unwrap_err().to_string()
    }

    /// A base case file with a [base.geometry] table beside it is refused
    /// in words, naming the way to change a base setting.
    #[test]
    fn a_base_file_with_its_own_tables_is_refused_in_words() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("s.toml");
        std::fs::write(
            &path,
            "base = \"c.toml\"\n[base.geometry]\npanels = 500\n[[vary]]\nkey = \"yaw\"\nvalues = [0.0]\n",
        )
        .unwrap();
        let why = Plan::load(&path).unwrap_err().to_string();
        assert!(
            why.contains("base names a case file, so it takes no [base.*] tables")
                && why.contains("[[vary]] list with one value"),
            "{why}"
        );
    }

    /// Labels give each value a number that sets nothing in the case and
    /// is not in the folder name; they must pair with the values.
    #[test]
    fn labels_pair_a_number_with_each_value() {
        let p = plan(&format!(
            "{BASE}[[vary]]\nkey = \"rear_window_deg\"\nvalues = [22.0, 38.0]\n\
             labels = [1, 2]\nlabel = \"variant, no.\"\n"
        ))
        .unwrap();
        let v = &p.variants[1];
        assert_eq!(v.name, "rear_window_deg-38");
        assert_eq!(v.settings[1].key, "variant no");
        assert_eq!(v.settings[1].value, serde_json::json!(2.0));
        assert!(is_label(&v.settings[1].key) && !is_label(&v.settings[0].key));
        let file = v.file.as_ref().unwrap();
        assert_eq!(file.geometry.rear_window_deg, Some(38.0));
        let short = refusal(&format!(
            "{BASE}[[vary]]\nkey = \"rear_window_deg\"\nvalues = [22.0, 38.0]\nlabels = [1]\n"
        ));
        assert!(short.contains("1 labels for 2 values"), "{short}");
        let bare = refusal(&format!(
            "{BASE}[[vary]]\nkey = \"rear_window_deg\"\nvalues = [22.0]\nlabel = \"x\"\n"
        ));
        assert!(bare.contains("labels is missing"), "{bare}");
    }

    /// Labels may be names instead (an STL per accessory), each a setting
    /// of its variant; numbers and names mixed, an empty name or one
    /// given twice are refused.
    #[test]
    fn labels_may_be_lists_for_two_factors() {
        let sweep = |labels: &str, label: &str| {
            format!(
                "{BASE}[[vary]]\nkey = \"rear_window_deg\"\nvalues = [20.0, 22.0, 38.0, 40.0]\n\
                 labels = {labels}\nlabel = {label}\n"
            )
        };
        let names = "[\"spoiler [mm]\", \"diffuser [deg]\"]";
        let p = plan(&sweep("[[0, 4], [0, 8], [25, 4], [25, 8]]", names)).unwrap();
        let v = &p.variants[2].settings;
        assert_eq!(
            (v[1].key.as_str(), v[2].key.as_str()),
            ("spoiler [mm]", "diffuser [deg]")
        );
        assert_eq!(
            (&v[1].value, &v[2].value),
            (&serde_json::json!(25.0), &serde_json::json!(4.0))
        );
        for (labels, label, words) in [
            (
                "[[0, 4], [0], [25, 4], [25, 8]]",
                names,
                "each label is a list of 2 values (label 2",
            ),
            (
                "[[0, 4], [0, 8], [0, 4], [25, 8]]",
                names,
                "label 3 ([0, 4]) is given twice",
            ),
            (
                "[[0, 4], [0, 8], [25, 4], [25, 8]]",
                "[\"a\", \"a\"]",
                "label name \"a\" is given twice",
            ),
            (
                "[[0, \"x\"], [0, 8], [25, 4], [25, 8]]",
                names,
                "all numbers",
            ),
            (
                "[[0, 4], [0, 8], [25, 4], [25, 8]]",
                "5",
                "label must be a name",
            ),
        ] {
            let why = refusal(&sweep(labels, label));
            assert!(why.contains(words), "{why}");
        }
    }

    #[test]
    fn labels_may_be_names() {
        let p = plan(&format!(
            "{BASE}[[vary]]\nkey = \"rear_window_deg\"\nvalues = [22.0, 38.0]\n\
             labels = [\"low\", \" steep \"]\nlabel = \"window\"\n"
        ))
        .unwrap();
        assert_eq!(p.variants[1].settings[1].key, "window");
        assert_eq!(p.variants[1].settings[1].value, serde_json::json!("steep"));
        for (labels, words) in [
            ("[1, \"two\"]", "all numbers"),
            ("[\"a\", \"\"]", "a label is empty"),
            ("[\"a\", \"a\"]", "\"a\" is given twice"),
        ] {
            let why = refusal(&format!(
                "{BASE}[[vary]]\nkey = \"rear_window_deg\"\nvalues = [22.0, 38.0]\nlabels = {labels}\n"
            ));
            assert!(why.contains(words), "{why}");
        }
        // A label named as a sweep.csv column would repeat it.
        for taken in ["variant", "cd", "speed_kmh"] {
            let why = refusal(&format!(
                "{BASE}[[vary]]\nkey = \"rear_window_deg\"\nvalues = [22.0, 38.0]\n\
                 labels = [\"low\", \"steep\"]\nlabel = \"{taken}\"\n"
            ));
            assert!(
                why.contains(&format!(
                    "the label name \"{taken}\" is one of sweep.csv's own columns"
                )),
                "{why}"
            );
        }
    }

    /// Two STL variants of one length whose surfaces ask for different
    /// default counts (a review's tail variants: 7,000 and 6,500) are both
    /// solved at the first's; a count set in the base case stays; STLs
    /// with fewer facets than the suggestion run on all of them, as a
    /// lone run would (not at a count they cannot reach).
    #[test]
    fn stl_variants_get_one_panel_count() {
        use tuft_mesh::{LengthUnit, Mirrors, PanelMesh, generate};
        let dir = tempfile::tempdir().unwrap();
        let mut wanted = Vec::new();
        for (name, radius, level) in [
            ("slim.stl", 1.0, 4),
            ("wide.stl", 1.15, 4),
            ("few.stl", 1.0, 2),
            ("fewwide.stl", 1.15, 2),
        ] {
            let mut m = generate::icosphere(1.0, level);
            m.map_vertices(|p| nalgebra::Point3::new(4.0 * p.x, radius * p.y, radius * p.z + 2.0));
            wanted.push(tuft_mesh::quality::suggested_panels(m.area(), 8.0));
            let panels = PanelMesh::new(m, Mirrors::none()).unwrap();
            let mut f = std::fs::File::create(dir.path().join(name)).unwrap();
            tuft_mesh::export::write_panels_stl(&mut f, &panels, LengthUnit::M, None).unwrap();
        }
        assert_ne!(wanted[0], wanted[1], "the test needs two defaults");
        assert!(wanted[0] < 5120 && wanted[2] > 320, "{wanted:?}");
        let sweep_of = |stls: [&str; 2], base: &str| {
            let text = format!(
                "[base.geometry]\nstl = \"{}\"\nunits = \"m\"\n{base}\n[[vary]]\nkey = \"stl\"\n\
                 values = [\"{}\", \"{}\"]\n",
                stls[0], stls[0], stls[1]
            );
            let file: SweepFile = toml::from_str(&text).unwrap();
            Plan::from_file(&dir.path().join("s.toml"), file).unwrap()
        };
        let counts = |p: &Plan| -> Vec<Option<usize>> {
            p.variants
                .iter()
                .map(|v| v.file.as_ref().unwrap().geometry.panels)
                .collect()
        };
        let sweep = |base: &str| sweep_of(["slim.stl", "wide.stl"], base);
        let mut p = sweep("");
        assert_eq!(p.one_panel_count(dir.path()), Some(wanted[0]));
        assert_eq!(counts(&p), [Some(wanted[0]); 2]);
        let mut p = sweep("panels = 1200");
        assert_eq!(p.one_panel_count(dir.path()), None);
        assert_eq!(counts(&p), [Some(1200); 2]);
        let mut p = sweep_of(["few.stl", "fewwide.stl"], "");
        assert_eq!(p.one_panel_count(dir.path()), Some(320));
    }

    #[test]
    fn short_keys_name_their_sections() {
        assert_eq!(full_key("diffuser_deg"), "geometry.diffuser_deg");
        assert_eq!(full_key("rear_window_deg"), "geometry.rear_window_deg");
        assert_eq!(full_key("yaw"), "flow.yaw");
        assert_eq!(full_key("flow.speed"), "flow.speed");
    }

    /// A misspelt key is refused before any variant runs, naming the key.
    #[test]
    fn a_misspelt_key_is_refused_up_front() {
        let e = refusal(&format!(
            "{BASE}[[vary]]\nkey = \"rear_windw_deg\"\nvalues = [20.0]\n"
        ));
        assert!(
            e.contains("\"rear_windw_deg\"): not a key tuft knows (did you mean rear_window_deg?)"),
            "{e}"
        );
        let e = refusal(&format!(
            "{BASE}[[vary]]\nkey = \"geometry.rear_windw_deg\"\nvalues = [20.0, 30.0]\n"
        ));
        assert!(
            e.contains(
                "all 2 variants fail the same way, so none was started: unknown key `rear_windw_deg`"
            ),
            "{e}"
        );
        let e = refusal(
            "[base.geometry]\nshape = \"coupe\"\nrear_windw_deg = 20.0\n\
             [[vary]]\nkey = \"speed\"\nvalues = [30.0]\n",
        );
        assert!(
            e.contains("base case: unknown key `rear_windw_deg` (did you mean `rear_window_deg`?)"),
            "{e}"
        );
    }

    /// A swept speed replaces the base case's, in whichever unit each is
    /// given (a review's base case in km/h swept in m/s failed every
    /// variant with "give the speed once").
    #[test]
    fn a_swept_speed_replaces_the_base_speed_in_either_unit() {
        let base = format!("{BASE}[base.flow]\nspeed_kmh = 140.0\n");
        let p = plan(&format!(
            "{base}[[vary]]\nkey = \"speed\"\nvalues = [30.0]\n"
        ))
        .unwrap();
        assert_eq!(p.variants[0].file.as_ref().unwrap().flow.speed, 30.0);
        let base = format!("{BASE}[base.flow]\nspeed = 40.0\n");
        let p = plan(&format!(
            "{base}[[vary]]\nkey = \"flow.speed_kmh\"\nvalues = [108.0]\n"
        ))
        .unwrap();
        let v = p.variants[0].file.as_ref().unwrap().flow.speed;
        assert!((v - 30.0).abs() < 1e-12, "{v}");
    }

    #[test]
    fn grid_groups_geometry_and_names_variants() {
        let p = plan(&format!(
            "{BASE}[[vary]]\nkey = \"yaw\"\nvalues = [0.0, 5.0]\n\
             [[vary]]\nkey = \"rear_window_deg\"\nvalues = [22.0, 38.0]\n"
        ))
        .unwrap();
        let names: Vec<&str> = p.variants.iter().map(|v| v.name.as_str()).collect();
        // Grid order is yaw-0/22, yaw-0/38, yaw-5/22, yaw-5/38; grouping by
        // geometry puts the two 22-degree variants together.
        assert_eq!(
            names,
            [
                "yaw-0_rear_window_deg-22",
                "yaw-5_rear_window_deg-22",
                "yaw-0_rear_window_deg-38",
                "yaw-5_rear_window_deg-38"
            ]
        );
        assert_eq!(p.geometry_groups(), 2);
        let f = p.variants[1].file.as_ref().unwrap();
        assert_eq!(f.flow.yaw, 5.0);
        assert_eq!(f.geometry.rear_window_deg, Some(22.0));
    }

    /// A negative value reads "minus" in the variant's name, so that no
    /// folder name looks like a command-line option ("yaw--5").
    #[test]
    fn negative_values_name_variants_with_minus() {
        let p = plan(&format!(
            "{BASE}[[vary]]\nkey = \"yaw\"\nvalues = [-5.0, 0.0, 2.5]\n"
        ))
        .unwrap();
        let names: Vec<&str> = p.variants.iter().map(|v| v.name.as_str()).collect();
        assert_eq!(names, ["yaw-minus5", "yaw-0", "yaw-2.5"]);
    }

    #[test]
    fn each_mode_and_stl_lists() {
        let text = format!(
            "combine = \"each\"\n{BASE}[[vary]]\nkey = \"stl\"\nvalues = [\"a.stl\", \"b/b.stl\"]\n\
             [[vary]]\nkey = \"ground\"\nvalues = [-0.1]\n"
        );
        // The STLs must exist: a missing one is refused before anything
        // runs.
        let dir = tempfile::tempdir().unwrap();
        let study = dir.path().join("study");
        let sweep_file = study.join("s.toml");
        let file: SweepFile = toml::from_str(&text).unwrap();
        let e = Plan::from_file(&sweep_file, file.clone())
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("2 of 3 variants cannot run, so none was started: stl-a: geometry.stl = \"")
                && e.contains("a.stl\": cannot read the file"),
            "{e}"
        );
        std::fs::create_dir_all(study.join("b")).unwrap();
        for f in ["a.stl", "b/b.stl"] {
            std::fs::write(study.join(f), b"solid x\nendsolid x\n").unwrap();
        }
        let p = Plan::from_file(&sweep_file, file).unwrap();
        assert_eq!(p.variants.len(), 3);
        let f = p.variants[0].file.as_ref().unwrap();
        assert!(f.geometry.shape.is_none());
        assert!(f.geometry.stl.as_ref().unwrap().ends_with("study/a.stl"));
        assert_eq!(p.variants[1].name, "stl-b");
        assert_eq!(
            p.variants[2]
                .file
                .as_ref()
                .unwrap()
                .ground
                .as_ref()
                .unwrap()
                .z,
            -0.1
        );
    }

    #[test]
    fn bad_sweeps_and_bad_values_are_refused() {
        assert!(plan(BASE).is_err(), "no vary lists");
        assert!(plan(&format!("{BASE}[[vary]]\nkey = \"yaw\"\nvalues = []\n")).is_err());
        // A value of the wrong type stops the sweep before anything runs,
        // naming its variant and the key in plain words.
        let e = refusal(&format!(
            "{BASE}[[vary]]\nkey = \"yaw\"\nvalues = [0.0, \"five\"]\n"
        ));
        assert!(
            e.contains("1 of 2 variants cannot run, so none was started: yaw-five:")
                && e.contains("where a number is expected")
                && e.contains("flow.yaw"),
            "{e}"
        );
        // A misspelt key fails them all: refused up front.
        let e = refusal(&format!(
            "{BASE}[[vary]]\nkey = \"flow.speeed\"\nvalues = [1.0]\n[[vary]]\nkey = \"speed\"\nvalues = [30.0]\n"
        ));
        assert!(e.contains("speeed"), "{e}");
        // A value listed twice would run one variant twice.
        let e = refusal(&format!(
            "{BASE}[[vary]]\nkey = \"speed\"\nvalues = [20.0, 30.0, 30.0]\n"
        ));
        assert!(
            e.contains("the value 30.0 is listed twice (values 2 and 3)"),
            "{e}"
        );
        let e = refusal(&format!(
            "{BASE}[[vary]]\nkey = \"speed\"\nvalues = [30, 30.0]\n"
        ));
        assert!(e.contains("is listed twice (values 1 and 2)"), "{e}");
    }

    #[test]
    fn shards_partition_the_list() {
        for len in 0..30 {
            for n in 1..9 {
                let mut seen = Vec::new();
                for k in 1..=n {
                    seen.extend(shard_range(len, k, n));
                }
                assert_eq!(seen, (0..len).collect::<Vec<_>>(), "len {len} n {n}");
            }
        }
        assert_eq!(parse_shard("2/5").unwrap(), (2, 5));
        assert!(
            parse_shard("0/5").is_err() && parse_shard("6/5").is_err() && parse_shard("x").is_err()
        );
    }
}
