//! `tuft run CASE.toml` and `tuft demo`.

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::{Context, Result};

use crate::case::{Case, CaseFile, GeometrySection};
use crate::outdir::Staging;
use crate::progress::Progress;
use crate::summary::Summary;
use crate::{EXIT_WARNINGS, geometry, pipeline, write};

/// Options shared by the commands that run cases.
#[derive(clap::Args, Clone)]
pub struct RunOptions {
    /// Worker threads (default: all cores). Results do not depend on it
    /// beyond round-off.
    #[arg(long)]
    pub threads: Option<usize>,
    /// Replace an existing result folder.
    #[arg(long)]
    pub force: bool,
    /// No progress messages.
    #[arg(long, short)]
    pub quiet: bool,
    /// Memory the run may use, e.g. 8G (default: what the system has
    /// available). A run that would need more stops before solving and
    /// suggests a panel count that fits.
    #[arg(long, value_name = "SIZE")]
    pub memory_limit: Option<String>,
    /// Also solve at 8 % fewer and 8 % more panels and report how far the
    /// drag and lift move: this shape's panel noise, which compare and
    /// collect then use where it is larger than the built-in floor. Takes
    /// about three times as long.
    #[arg(long)]
    pub noise: bool,
}

impl RunOptions {
    /// The memory limit in bytes, if given.
    pub fn memory_limit_bytes(&self) -> Result<Option<f64>> {
        self.memory_limit
            .as_deref()
            .map(crate::estimate::parse_size)
            .transpose()
    }
}

/// Arguments of `tuft run`.
#[derive(clap::Args)]
pub struct RunArgs {
    /// The case file (TOML).
    pub case: PathBuf,
    /// Result folder (default: next to the case, named after it).
    #[arg(long)]
    pub out: Option<PathBuf>,
    #[command(flatten)]
    pub options: RunOptions,
}

/// Arguments of `tuft demo`.
#[derive(clap::Args)]
pub struct DemoArgs {
    /// Folder for the two results (default: `tuft-demo` in the working folder).
    #[arg(long)]
    pub out: Option<PathBuf>,
    #[command(flatten)]
    pub options: RunOptions,
}

/// Set the worker thread count once for the process.
pub fn set_threads(threads: Option<usize>) -> Result<()> {
    if let Some(n) = threads {
        if n == 0 {
            anyhow::bail!("--threads must be at least 1");
        }
        rayon::ThreadPoolBuilder::new()
            .num_threads(n)
            .build_global()
            .context("cannot set the thread count")?;
    }
    Ok(())
}

/// `tuft run`.
pub fn run(args: &RunArgs) -> Result<ExitCode> {
    set_threads(args.options.threads)?;
    let case = Case::load(&args.case)?;
    let out = args
        .out
        .clone()
        .unwrap_or_else(|| default_out(&args.case, &case.name));
    let summary =
        run_case(&case, &out, &args.options).with_context(|| args.case.display().to_string())?;
    finish(&out, &summary, args.options.quiet)
}

/// Default result folder: beside the case file, named after it.
fn default_out(case_path: &Path, name: &str) -> PathBuf {
    case_path.parent().unwrap_or(Path::new(".")).join(name)
}

/// Run one checked case into `out`; nothing appears in `out` unless the
/// whole run succeeds.
pub fn run_case(case: &Case, out: &Path, options: &RunOptions) -> Result<Summary> {
    let memory_limit = options.memory_limit_bytes()?;
    let staging = Staging::new(out, options.force, crate::outdir::Kind::Run)?;
    let mut progress = Progress::new(options.quiet, &case.name);
    let what = "reading and preparing the geometry";
    let phase = progress.begin("geometry", what);
    let stages = progress.stages(&phase, what);
    let geo = geometry::load_keeping(case, options.noise)?;
    drop(stages);
    progress.end(phase, &panels_note(&geo));
    let mut computed = pipeline::compute(&geo.mesh, case, memory_limit, &mut progress)?;
    if options.noise {
        crate::noise::add_to(&mut computed, case, &geo, memory_limit, &mut progress);
    }
    let summary = write::write_all(case, &geo, &computed, &staging, &mut progress)
        .with_context(|| format!("writing results for {}", out.display()))?;
    staging.commit()?;
    Ok(summary)
}

/// The geometry phase's closing words: the panel count, and why it is not
/// the one asked for when coarsening had to settle for more.
pub(crate) fn panels_note(geo: &geometry::Geometry) -> String {
    let panels = geo.mesh.len();
    let coarsen = geo.report.coarsen.as_ref();
    match coarsen.and_then(|c| {
        crate::pipeline::panels_instead(panels, c.target_panels, c.fallback.as_deref())
    }) {
        Some(instead) => format!("{panels} panels {instead}"),
        None => format!("{panels} panels"),
    }
}

fn finish(out: &Path, summary: &Summary, quiet: bool) -> Result<ExitCode> {
    if !quiet {
        print_summary(out, summary);
    } else if !summary.warnings.is_empty() {
        // One line, so that a script's log says why the exit code is 1 (a
        // review's quiet run of an inch file read as millimetres, a body
        // 0.18 m long, had printed nothing).
        let broken = if pipeline::loads_broken(&summary.warnings) {
            ", one that its loads are not usable"
        } else {
            ""
        };
        quiet_finish_line(
            &summary.case_name,
            &format!(
                "{}{broken}",
                crate::output::plural(summary.warnings.len(), "warning", "warnings")
            ),
            &out.join("report.html"),
        );
    }
    Ok(if summary.warnings.is_empty() {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(EXIT_WARNINGS)
    })
}

/// The one line a quiet command prints on stderr when it finished with
/// warnings or notes (`what`: "2 warnings"), naming the page to read them
/// in, so that a script's log says why the exit code is 1.
pub fn quiet_finish_line(name: &str, what: &str, page: &Path) {
    eprintln!(
        "tuft: {name}: finished with {what}; read them in {}",
        page.display()
    );
}

/// A few lines on stdout: the headline numbers and where the report is.
fn print_summary(out: &Path, s: &Summary) {
    let k = &s.coefficients;
    // The loop's estimate sits low in its band (its top adds the model's
    // largest shortfall against measured drag): say so where the number
    // is read, not only in the report.
    let lean = match crate::write::drag_lean(s) {
        Some(l) if s.separation.fraction < crate::write::BLUFF_SHARE => format!("; {l}"),
        Some(_) => "; a low estimate: the true drag is more likely above it than below".to_owned(),
        None => String::new(),
    };
    // Loads resting on a defect of the surface are said before them (a
    // review read the headline first and the warning after it).
    let broken = if pipeline::loads_broken(&s.warnings) {
        " LOADS NOT USABLE (see the first warning), as computed:"
    } else {
        ""
    };
    say!(
        "{}:{broken} drag estimate C_D {:.3} (band {:.3} to {:.3}{lean}), lift C_L {:.3}; Reynolds number \
         {:.2} million on the reference length",
        s.case_name,
        k.drag,
        s.drag_estimate.cd_low,
        s.drag_estimate.cd_high,
        k.lift,
        s.reynolds_number / 1e6
    );
    // A body that may run backwards: before the numbers that would then
    // be wrong (a review's car with its nose at +x read C_D 0.431, the
    // hint sixth among the lines below).
    for w in s.warnings.iter().filter(|w| read_first(w)) {
        say!("  warning, read first: {w}");
    }
    // The speed the kg are at, and the underbody beside the rest of the
    // body (not "of which": it is larger than the whole).
    let speed = s.flow("speed").map_or_else(String::new, |v| {
        format!(" at {}", crate::output::speed_words(v))
    });
    // The force and power beside the coefficient, and the area it is on:
    // an add-on's runs each take their own frontal area (a review read a
    // roof box's +30 % in C_D where the drag area rose by 50 %).
    if let Some(v) = s.flow("speed") {
        let area = if s.reference.given.get("area").copied().unwrap_or(false) {
            "the case's reference area"
        } else {
            "the frontal area"
        };
        let (per_n, car) = crate::write::power_factor(s, v);
        let power_at = if car == v {
            String::new()
        } else {
            // The force the power is taken from, beside the drag's (a
            // review could not make 282 N at 39.4 m/s come to 10.6 kW).
            format!(
                " {}, from {:.0} N along the body",
                crate::write::power_at_words(s, v),
                1000.0 * per_n * s.drag_estimate.force_n / car
            )
        };
        say!(
            "  drag{speed}: {} N, {} kW{power_at} (band in brackets), on {area} {:.3} m^2 (C_D A {:.3} m^2)",
            crate::write::drag_force_words(&s.drag_estimate, 1.0, 0),
            crate::write::drag_force_words(&s.drag_estimate, per_n, 1),
            s.reference.area_m2,
            k.drag * s.reference.area_m2
        );
    }
    let [total, front, rear] = s.lift_kg.axle_words();
    let floor = crate::write::underbody_words(s).map_or_else(String::new, |u| format!("; {u}"));
    // Its scatter between like runs beside it, the least certain number's
    // (a review found the lift with no uncertainty where the drag had its
    // band).
    let noise = format!(
        "; like runs scatter by about {} kg",
        crate::output::fixed(s.lift_noise_kg(), 1)
    );
    if s.axle_split_shown() {
        say!(
            "  lift{speed}: {total} kg (front {front}, rear {rear}; negative is downforce{noise}){floor}"
        );
    } else {
        say!(
            "  lift{speed}: {total} kg (not split between axles: free air, no axles given; negative is \
             downforce{noise}){floor}"
        );
    }
    // Where the floor stands at the axles, for a rake or ride-height
    // study (a review had only the lowest point, 0 with tyres down).
    if let Some(words) = s.reference.floor_words() {
        say!("  floor above the ground: {words}");
    }
    say!(
        "  separated {} % of the surface",
        crate::output::fixed(100.0 * s.separation.fraction, 1)
    );
    if let Some(words) = s.repair_words() {
        say!("  repairs to the STL: {words}");
    }
    // The attached first pass's plateau figures are in the report and
    // summary.json, not here, where they were quoted as a second estimate.
    if let Some(w) = &s.separated_wakes {
        let state = match (w.diverged, w.converged) {
            (true, _) => "diverged, last good pass kept",
            (false, true) => "converged",
            (false, false) => "not converged",
        };
        // One pass: nothing separated, no dead water to give a pressure of
        // (a review's sliver ellipsoid read "dead water at base C_p 0.25").
        // The dead water's one pressure, as the pictures quote it (the
        // base's mean, beside it in the report, may include attached
        // panels: a review read -0.16 here and -0.17 on a plot).
        let base = w
            .dead_water_pressure()
            .map_or_else(String::new, |v| format!(", dead water at C_p {v:.2}"));
        say!(
            "  separated-flow loop: {}, {state}{base} (the drag estimate above is its last pass)",
            crate::output::plural(w.passes, "pass", "passes"),
        );
    }
    for note in s
        .notes
        .iter()
        .filter(|n| n.starts_with(crate::write::CROSS_WIND))
    {
        say!("  {note}");
    }
    if let Some(n) = &s.panel_noise {
        say!(
            "  panel noise: {} (compare and collect judge differences against it; it is the \
             scatter near this count, not convergence: halving the count can move more)",
            n.words(s.axle_split_shown())
        );
    }
    if s.rim_shown() {
        use crate::output::fixed;
        say!(
            "  sharp front edges: the flow leaves them (rims, tighter than {:.0} mm); {:.2} m^2 beside them, within x {} to {} m and z {} to {} m, where the boundary layer's speed is capped at the free-streamline bound and the pressure kept no lower than the dead water's",
            1000.0 * s.separation.rim_radius_m,
            s.separation.rim_m2,
            fixed(s.separation.rim_x_m[0], 2),
            fixed(s.separation.rim_x_m[1], 2),
            fixed(s.separation.rim_z_m[0], 2),
            fixed(s.separation.rim_z_m[1], 2)
        );
    }
    for r in &s.regions {
        let loads = r.loads.as_ref().map_or(String::new(), |l| {
            format!("; {}", l.words(s.axle_split_shown()))
        });
        say!("  {}: {}{loads}", r.name, r.words());
    }
    for n in s
        .notes
        .iter()
        .filter(|n| n.starts_with(crate::region::LEFT_OUT))
    {
        say!("  note: {n}");
    }
    // Region verdicts on a coarse mesh: the report's note, where the
    // verdicts are read.
    if let (false, Some(note)) = (s.regions.is_empty(), s.coarse_note()) {
        say!("  note: {note}");
    }
    // What the run assumed of the file that changes how every number reads
    // (a review found these only in the report): a scale model's size, a
    // left half run as its mirror image.
    for n in s.notes.iter().filter(|n| read_as_assumed(n)) {
        say!("  note: {n}");
    }
    if let Some(n) = s.gaps_closed() {
        say!("  note: {n}");
    }
    for w in s.warnings.iter().filter(|w| !read_first(w)) {
        say!("  warning: {w}");
    }
    say!("  report: {}", out.join("report.html").display());
}

/// Whether a note says how the file was taken in a way that changes how
/// the numbers read ([`print_summary`] shows those on stdout).
/// Warnings printed before the numbers they make wrong: a body that may
/// run backwards, loads resting on a surface defect.
fn read_first(w: &str) -> bool {
    pipeline::questions_the_nose(w) || w.starts_with(pipeline::BROKEN_EDGE_WORDS)
}

fn read_as_assumed(note: &str) -> bool {
    note == tuft_mesh::prepare::MIRRORED_HALF_NOTE
        || note.starts_with(tuft_mesh::import::PLACES_NOTE_START)
        || crate::geometry::is_scale_model_note(note)
        || note.starts_with(crate::write::REYNOLDS_WORDS)
        || note.starts_with(crate::write::TRANSITION_WORDS)
}

/// Rear-window slopes of the demo coupe, degrees from horizontal: a gentle
/// fastback-like slope and a steep notch-like one.
pub const DEMO_SLOPES: [f64; 2] = [22.0, 38.0];

/// The demo's case for one rear-window slope.
pub fn demo_case(slope: f64) -> Result<Case> {
    let file = CaseFile {
        geometry: GeometrySection {
            shape: Some("coupe".into()),
            rear_window_deg: Some(slope),
            ..GeometrySection::default()
        },
        ground: Some(crate::case::GroundSection { z: 0.0 }),
        reference: crate::case::ReferenceSection {
            front_axle_x: Some(0.95),
            rear_axle_x: Some(3.65),
            ..Default::default()
        },
        // The generator's rear window runs from the roof's end to the
        // deck whatever its slope (the slope sets the deck's height), so
        // the same ranges name it on both variants (as in cases/coupe.toml).
        regions: [("rear window", [3.15, 3.7]), ("boot deck", [3.7, 4.2])]
            .into_iter()
            .map(|(name, x)| crate::region::RegionSection {
                name: name.into(),
                x: Some(x),
                y: None,
                z: None,
                facing: Some("up".into()),
                optional: false,
            })
            .collect(),
        ..CaseFile::default()
    };
    Case::from_file(Path::new(&format!("coupe-{slope:.0}deg.toml")), file)
}

/// `tuft demo`.
pub fn demo(args: &DemoArgs) -> Result<ExitCode> {
    set_threads(args.options.threads)?;
    let root = args
        .out
        .clone()
        .unwrap_or_else(|| PathBuf::from("tuft-demo"));
    let mut worst = ExitCode::SUCCESS;
    let mut outs = Vec::new();
    for slope in DEMO_SLOPES {
        let case = demo_case(slope)?;
        let out = root.join(&case.name);
        let summary = run_case(&case, &out, &args.options)?;
        let code = finish(&out, &summary, args.options.quiet)?;
        if code != ExitCode::SUCCESS {
            worst = code;
        }
        outs.push(out);
    }
    // The two set side by side, as a designer would next ask (a review
    // reading only the folders had found two reports and no verdict
    // between them). Its notes say what makes the two hard to compare;
    // the demo's exit code stays the runs'.
    let mut outs = outs.into_iter();
    let (Some(a), Some(b)) = (outs.next(), outs.next()) else {
        return Ok(worst);
    };
    crate::compare::run(&crate::compare::CompareArgs {
        a,
        b,
        out: None,
        force: args.options.force,
        quiet: args.options.quiet,
        threads: None,
    })?;
    Ok(worst)
}
