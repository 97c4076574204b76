//! `tuft check FILE.stl` (or a case file): read, repair and report on a
//! surface mesh.
//!
//! Prints what was read, what each repair pass changed, the boundary loops,
//! the wrap (when parts overlap or stand on the ground), the coarsening, the panel quality and a suggested panel count. Exit 0
//! when the mesh is usable (its verdict line says whether with warnings),
//! 1 when its panels cross each other (a fold through itself, which often
//! stops a run as unphysical); a problem is returned as an error and
//! printed as one line `tuft: FILE: problem` (exit 2).

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::Context;
use tuft_mesh::prepare::{PrepareParams, PrepareReport};
use tuft_mesh::repair::LoopInfo;
use tuft_mesh::{LengthUnit, Mirrors};

/// Arguments of `tuft check`.
#[derive(clap::Args)]
pub struct CheckArgs {
    /// The STL file (binary or ASCII), or a case file (`.toml`): its STL
    /// with its units, half model, ground and panel count, as a run would
    /// read them (then --panels overrides the count, --json and
    /// --save-panels apply, and --units, --half, --ground, --nose and --up
    /// are refused).
    pub file: PathBuf,
    /// Length unit of the file: m, cm, mm or in (default mm).
    #[arg(long)]
    pub units: Option<LengthUnit>,
    /// The file holds the y >= 0 half of the body, mirrored in y = 0.
    #[arg(long)]
    pub half: bool,
    /// Height of the ground plane z = Z, in metres (after unit conversion).
    #[arg(long, value_name = "Z", allow_hyphen_values = true)]
    pub ground: Option<f64>,
    /// Coarsen to about N panels (default: the case file's
    /// geometry.panels, or the suggested count).
    /// (A negative count reaches the range check as a number, not as an
    /// unknown option: a review's `--panels -500` read "unexpected
    /// argument".)
    #[arg(long, value_name = "N", allow_negative_numbers = true)]
    pub panels: Option<i64>,
    /// Where the file's nose points: -x (tuft's axes) or +x (ISO 8855
    /// vehicle axes, x forward).
    #[arg(long, value_name = "-x|+x", allow_hyphen_values = true)]
    pub nose: Option<String>,
    /// The file's up axis: z or y.
    #[arg(long, value_name = "z|y")]
    pub up: Option<String>,
    /// Print the full report as JSON instead of text.
    #[arg(long)]
    pub json: bool,
    /// Also write the panels a run would solve on (the modelled half only,
    /// no mirror images) to this binary STL, in the input's unit and axes,
    /// to look at over the scan in any viewer (never over the input itself).
    #[arg(long, value_name = "FILE.stl")]
    pub save_panels: Option<PathBuf>,
    /// Worker threads (default: all cores), as for the other commands.
    #[arg(long)]
    pub threads: Option<usize>,
    /// No progress messages on stderr (errors still print).
    #[arg(short, long)]
    pub quiet: bool,
}

impl CheckArgs {
    /// `--panels` as a count (checked to lie in 100 to 200,000 first).
    fn panel_count(&self) -> Option<usize> {
        self.panels.and_then(|n| usize::try_from(n).ok())
    }
}

/// Run `tuft check`. With `--json`, a file or case that cannot be read,
/// repaired or placed still gets a report on stdout, `"verdict":
/// "refused"` with the error's one line as `"error"` (and an open scan's
/// refused holes as `"holes"`), beside the line on
/// stderr and exit 2 (a review's script read nothing for a refused open
/// scan): no panels, no geometry, nothing a script could take for a
/// clean report.
pub fn run(args: &CheckArgs) -> anyhow::Result<ExitCode> {
    let result = run_checked(args);
    if let (Err(e), true) = (&result, args.json) {
        let mut refused = serde_json::json!({
            "verdict": "refused",
            "error": crate::error_line(e),
        });
        // An open scan's holes, each with its place, centre and size.
        if let Some(tuft_mesh::MeshError::OpenHole { holes, .. }) = e
            .chain()
            .find_map(|c| c.downcast_ref::<tuft_mesh::MeshError>())
        {
            refused["holes"] = serde_json::to_value(holes)?;
        }
        say!("{}", serde_json::to_string_pretty(&refused)?);
    }
    result
}

fn run_checked(args: &CheckArgs) -> anyhow::Result<ExitCode> {
    crate::run::set_threads(args.threads)?;
    let is_case = args
        .file
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("toml"));
    // One range whether the STL comes alone or through a case file (a
    // review's STL alone at --panels 4 came back a tetrahedron, "usable").
    if let Some(n) = args.panels {
        anyhow::ensure!(
            (100..=200_000).contains(&n),
            "--panels must be 100 to 200000, as geometry.panels in a case file"
        );
    }
    let (file, params, case) = if is_case {
        let set: Vec<&str> = [
            (args.units.is_some(), "--units"),
            (args.half, "--half"),
            (args.ground.is_some(), "--ground"),
            (args.nose.is_some(), "--nose"),
            (args.up.is_some(), "--up"),
        ]
        .into_iter()
        .filter_map(|(given, flag)| given.then_some(flag))
        .collect();
        anyhow::ensure!(
            set.is_empty(),
            "{}: {} {} only to an STL given alone; with a case file its [geometry] and [ground] \
             sections say that (only --panels overrides the case)",
            args.file.display(),
            set.join(", "),
            if set.len() == 1 { "applies" } else { "apply" }
        );
        let mut case = crate::case::Case::load(&args.file)?;
        case.file.geometry.panels = args.panel_count().or(case.file.geometry.panels);
        let (file, params) = match &case.source {
            crate::case::GeometrySource::Shape { name } => return check_shape(args, &case, name),
            crate::case::GeometrySource::Stl { path, unit, axes } => {
                (path.clone(), stl_params(&case, *unit, *axes))
            }
        };
        (file, params, Some(case))
    } else {
        (args.file.clone(), settings(args)?, None)
    };
    // What an error names: the STL, or the case file and its key for it
    // (as `tuft run` names them).
    let label = if is_case {
        format!(
            "{}: geometry.stl = \"{}\"",
            args.file.display(),
            file.display()
        )
    } else {
        file.display().to_string()
    };
    let what = format!("reading, repairing and coarsening {}", file.display());
    // The phase and its stages as `tuft run` says them: a spinner on a
    // terminal, plain lines in a log (a review's overnight log had sat
    // silent for 25 s on a 1.26-million-facet scan), nothing with --quiet.
    let mut progress = crate::progress::Progress::new(args.quiet, "tuft check");
    let phase = progress.begin("geometry", &what);
    let stages = progress.stages(&phase, &what);
    // A size no unit makes a car of is refused as soon as the file is
    // read, before the repair and the coarsening, as `tuft run` does (a
    // review's scan in millimetres checked with --units m was refused for
    // a 9 km hole, and with --half told of its unit after 66 s).
    let key = if is_case { "geometry.units" } else { "--units" };
    tuft_mesh::stage::starting(|| format!("reading {}", file.display()));
    let read = tuft_mesh::import::read_stl(&file);
    if let Ok((mesh, _)) = &read
        && let Some((lo, hi)) = mesh.bounds()
        && let Err(why) = crate::geometry::size_verdict(
            (hi - lo).max() * params.units.to_metres(),
            Some(params.units),
            key,
        )
    {
        drop(stages);
        phase.clear();
        anyhow::bail!("{label}: {why}");
    }
    let prepared = read.and_then(|(mesh, report)| {
        tuft_mesh::prepare::repair_body(mesh, Some(report), &params)?.panels(params.target_panels)
    });
    drop(stages);
    if prepared.is_ok() {
        progress.end(phase, "");
    } else {
        phase.clear();
    }
    let (panels, mut report) = prepared
        .map_err(|e| match &case {
            Some(case) => crate::geometry::name_mirror_keys(e, case),
            None => {
                let mut keys = Vec::new();
                if let Some(z) = args.ground {
                    keys.push(format!("--ground {z}"));
                }
                if args.half {
                    keys.push("--half".to_owned());
                }
                let up = args.up.is_none().then_some("pass --up y");
                crate::geometry::mirror_refusal(e, &keys, "--ground", up)
            }
        })
        .with_context(|| label.clone())?;
    let [lo, hi] = report.bounds;
    let size = (0..3).map(|k| hi[k] - lo[k]).fold(0.0, f64::max);
    let note = crate::geometry::size_verdict(size, Some(params.units), key)
        .map_err(|why| anyhow::anyhow!("{label}: {why}"))?;
    crate::geometry::add_size_note(&mut report.quality, note);
    if let Some(w) = crate::pipeline::flat_end_warning(&panels, params.axes.nose_plus_x) {
        report.quality.add_warning(w);
    }
    // As the run warns: a floor standing on the ground.
    if let Some(w) = crate::pipeline::floor_on_ground_warning(&report) {
        report.quality.add_warning(w);
    }
    if let Some(w) = crate::pipeline::non_manifold_warning(&report) {
        report.quality.add_warning(w);
    }
    // As the run warns: more panels asked than the STL has facets.
    let asked = if args.panels.is_some() || !is_case {
        "--panels"
    } else {
        "geometry.panels"
    };
    report
        .quality
        .notes
        .extend(crate::pipeline::unrefined_words(
            params.target_panels,
            panels.len(),
            asked,
        ));
    // Axles and regions off the body are an error, given after what check
    // knows of the STL (its extent above all, which is what the axles must
    // be set against).
    let placement = case.as_ref().map_or(Ok(()), |case| {
        crate::geometry::check_placement(&panels, case)
            .with_context(|| args.file.display().to_string())
    });
    // A case that fails writes no panels file nor the JSON report (a
    // script reading it would take it for a clean one; `run` gives its
    // "refused" verdict instead); the text report still shows the body's
    // extent, with a verdict that names the case.
    if placement.is_err() && args.json {
        return placement.map(|()| ExitCode::SUCCESS);
    }
    let saved = match (&args.save_panels, placement.is_ok()) {
        (Some(out), true) => {
            let inputs = [Some(file.as_path()), is_case.then_some(args.file.as_path())];
            let axes = (params.axes, report.mirrors.mirrored_half);
            Some(save_panels(
                out,
                &panels,
                params.units,
                Some(axes),
                &inputs,
            )?)
        }
        _ => None,
    };

    if args.json {
        say!("{}", serde_json::to_string_pretty(&json_report(&report)?)?);
    } else {
        if is_case {
            say!(
                "case       {}: its STL as the run reads it",
                args.file.display()
            );
        }
        say_part!(
            "{}",
            summary(&file.display().to_string(), &report, placement.is_err())
        );
        if let Some(case) = case.as_ref().filter(|_| placement.is_ok()) {
            say_part!(
                "{}",
                placement_lines(&panels, case, report.suggested_panels)
            );
        }
        if let Some(line) = saved {
            say!("{line}");
        }
    }
    placement?;
    Ok(if doubtful(&report) {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}

/// Write the panels to `out` whole or not at all
/// ([`crate::outdir::write_whole`]), in `unit` and in the axes of the file
/// they came from (`axes`: how it was read and whether a left half was
/// mirrored; `None` for a built-in shape, in tuft's), never over one of
/// the `inputs` (the STL, the case file: a review's `--save-panels` named
/// the scan and replaced it with its 1,000 panels). The line saying where
/// they went.
fn save_panels(
    out: &Path,
    panels: &tuft_mesh::PanelMesh,
    unit: LengthUnit,
    axes: Option<(tuft_mesh::FileAxes, bool)>,
    inputs: &[Option<&Path>],
) -> anyhow::Result<String> {
    let same = |a: &Path| match (std::fs::canonicalize(a), std::fs::canonicalize(out)) {
        (Ok(a), Ok(b)) => a == b || same_file(&a, &b),
        _ => false,
    };
    if let Some(input) = inputs.iter().flatten().find(|p| same(p)) {
        anyhow::bail!(
            "--save-panels {}: that is the file being checked ({}); name another file for the panels",
            out.display(),
            input.display()
        );
    }
    // Only a panels file an earlier check wrote is replaced (a review's
    // `--save-panels` over another scan and over a picture had replaced
    // both without a word).
    if out.exists() && !tuft_mesh::export::is_panels_file(out) {
        anyhow::bail!(
            "--save-panels {}: the file exists and is not a panels file tuft wrote, so it is kept; name \
             another file for the panels",
            out.display()
        );
    }
    let mut bytes = Vec::new();
    tuft_mesh::export::write_panels_stl(&mut bytes, panels, unit, axes)?;
    crate::outdir::write_whole(out, &bytes)?;
    let frame = match axes {
        Some(_) => "in the STL's own axes, to lay over it",
        None => "in tuft's axes",
    };
    Ok(format!(
        "saved      {} panels to {} ({}, {frame}; the modelled half only on a half model)",
        panels.len(),
        out.display(),
        unit.name()
    ))
}

/// Whether `a` and `b` are one file under two names (a hard link).
fn same_file(a: &Path, b: &Path) -> bool {
    #[cfg(unix)]
    {
        use std::os::unix::fs::MetadataExt;
        if let (Ok(x), Ok(y)) = (std::fs::metadata(a), std::fs::metadata(b)) {
            return x.dev() == y.dev() && x.ino() == y.ino();
        }
    }
    let _ = (a, b);
    false
}

/// Where the case puts the axles and its named regions on the body, and
/// its own flow slices with their windows and spacings, in tuft's axes
/// (checked to lie on it, or in the slices' box, before this is printed).
fn placement_lines(
    panels: &tuft_mesh::PanelMesh,
    case: &crate::case::Case,
    suggested: usize,
) -> String {
    let r = &case.file.reference;
    let mut s = match (r.front_axle_x, r.rear_axle_x) {
        (Some(f), Some(b)) => format!("axles      front x {f:.3} m, rear x {b:.3} m\n"),
        _ => "axles      not given: a run splits the lift at 20 % and 80 % of the length, with a warning\n"
            .to_owned(),
    };
    s += &yaw_line(case.file.flow.yaw, suggested);
    // A half model's regions count their mirror images, as a run's do
    // (a review read "(whole body)" on every region as "covers the whole
    // body").
    let sides = if panels.mirrors.symmetry {
        " (both sides)"
    } else {
        ""
    };
    for region in &case.file.regions {
        let (n, area) = crate::region::extent(region, panels);
        if n == 0 {
            // Only an optional region gets here empty (placement refuses
            // the others first).
            s += &format!(
                "region     \"{}\": no panel of this body (optional: left out of its results)\n",
                region.name
            );
            continue;
        }
        let sides = if crate::region::one_side_only(region, panels) {
            " (the modelled side only: its y range leaves out the mirror image, so it covers one \
             side of the car and the side view from -y does not outline it; for the other side, \
             name a second region with the y range negated)"
        } else {
            sides
        };
        s += &format!(
            "region     \"{}\": {n} panels, {area:.3} m^2{sides}\n",
            region.name
        );
    }
    // The case's own flow slices (placed in the box before this prints).
    // Its window and samples too, since a range or a spacing can be cut
    // or refused only against the body.
    for plane in crate::planes::placed(&case.file.slices, panels).unwrap_or_default() {
        s += &format!(
            "slice      \"{}\": {}, {}, slice-{}.png\n",
            plane.title,
            plane.words(),
            plane.grid_words(),
            plane.stem
        );
        if let Some(words) = plane.resolution_words() {
            s += &format!("           {words}\n");
        }
    }
    s
}

/// A cross wind's line: what a yawed run needs of the panels, said before
/// the run rather than after it (a review's yawed case was checked without
/// a word and then warned), and, for a yaw under one, that it is in
/// degrees (a review typed 0.26, radians, unremarked). Empty straight
/// ahead.
fn yaw_line(yaw: f64, suggested: usize) -> String {
    if yaw == 0.0 {
        return String::new();
    }
    let least = (crate::pipeline::YAW_COARSE_SHARE * suggested as f64).ceil();
    let degrees = if yaw.abs() < 1.0 {
        format!(
            " (flow.yaw is in degrees: {yaw} radians would be {:.1})",
            yaw.to_degrees()
        )
    } else {
        String::new()
    };
    format!(
        "flow       {}{degrees}: a cross wind; a run warns on fewer than {least} panels (three quarters \
         of the {suggested} suggested), where the separation it moves is not converged\n",
        crate::output::yaw_words(yaw)
    )
}

/// `tuft check` of a case with a built-in shape (`name`): the panels a run
/// of it solves on, as for an STL, and with `--save-panels` those panels
/// as an STL in metres, to take a variant of the shape into a modeller (a
/// review had no way to get a 30-degree coupe out but to run it).
fn check_shape(args: &CheckArgs, case: &crate::case::Case, name: &str) -> anyhow::Result<ExitCode> {
    let geo = crate::geometry::load(case).with_context(|| args.file.display().to_string())?;
    let saved = match &args.save_panels {
        Some(out) => Some(save_panels(
            out,
            &geo.mesh,
            LengthUnit::M,
            None,
            &[Some(args.file.as_path())],
        )?),
        None => None,
    };
    if args.json {
        say!(
            "{}",
            serde_json::to_string_pretty(&json_report(&geo.report)?)?
        );
    } else {
        say!(
            "case       {}: the built-in shape \"{name}\" as the run generates it (in metres)",
            args.file.display()
        );
        say_part!(
            "{}",
            summary(&format!("built-in shape \"{name}\""), &geo.report, false)
        );
        say_part!(
            "{}",
            placement_lines(&geo.mesh, case, geo.report.suggested_panels)
        );
        if let Some(line) = saved {
            say!("{line}");
        }
    }
    Ok(if doubtful(&geo.report) {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}

/// The settings a case file gives a run of its STL, read in `unit` with
/// the file's `axes`.
fn stl_params(
    case: &crate::case::Case,
    unit: LengthUnit,
    axes: tuft_mesh::FileAxes,
) -> PrepareParams {
    PrepareParams {
        units: unit,
        axes,
        mirrors: crate::geometry::mirrors(case),
        target_panels: case.file.geometry.panels,
        whole_from_half: crate::geometry::mirrored_whole(case),
        wrap: crate::geometry::wrap_params(case),
        measure_symmetry: true,
        ..PrepareParams::default()
    }
}

/// Checked settings from the raw flags.
fn settings(args: &CheckArgs) -> anyhow::Result<PrepareParams> {
    if let Some(z) = args.ground {
        anyhow::ensure!(z.is_finite(), "--ground must be a finite height in metres");
    }
    Ok(PrepareParams {
        units: args.units.unwrap_or(LengthUnit::Mm),
        axes: crate::case::file_axes(args.nose.as_deref(), args.up.as_deref(), "--")?,
        mirrors: Mirrors {
            ground: args.ground,
            symmetry: args.half,
        },
        target_panels: args.panel_count(),
        measure_symmetry: true,
        ..PrepareParams::default()
    })
}

/// The human-readable report.
/// `case_fails`: the case file's axles or regions lie off the body, so the
/// verdict on the STL says the case cannot run as written.
fn summary(file: &str, r: &PrepareReport, case_fails: bool) -> String {
    let mut out = format!("tuft check: {file}\n");
    out += &read_lines(r);
    out += &repair_lines(r);
    out += &hole_lines(r);
    if let Some(w) = &r.wrap {
        out += &format!("wrap       {}\n", w.describe());
        if w.leaky_lines > 0 {
            out += &format!(
                "           {} grid lines passed through holes; their nodes took the other two directions' vote\n",
                w.leaky_lines
            );
        }
    }
    out += &panel_lines(r);
    out += &quality_lines(r);
    let half = if r.mirrors.symmetry {
        " for the modelled half"
    } else {
        ""
    };
    out += &format!(
        "suggested  {} panels{half}: edges about 1/50 of the body length, clamped to \
         1,000-12,000 (4,000-12,000 is usual for a full car; common practice)\n",
        r.suggested_panels
    );
    let v = verdict(r);
    if case_fails {
        out += &v.replacen(
            "verdict    ",
            "verdict    the case cannot run as written (below); the STL alone: ",
            1,
        );
    } else {
        out += &v;
    }
    out
}

/// `--json`'s report: the preparation report with the verdict beside it,
/// `"verdict"`: `usable` or `doubtful`, as the text's last line says (a
/// review's script found no verdict in the JSON).
fn json_report(r: &PrepareReport) -> anyhow::Result<serde_json::Value> {
    let mut v = serde_json::to_value(r)?;
    if let Some(map) = v.as_object_mut() {
        let word = if doubtful(r) { "doubtful" } else { "usable" };
        map.insert("verdict".into(), word.into());
    }
    Ok(v)
}

/// Whether the verdict is doubtful: panels crossing each other, most of
/// the surface cut in slivers, the floor standing on the ground (a
/// review's ground set 10 mm into the floor had read usable), or a body
/// a scale model's size that another unit makes a car (a review's car in
/// centimetres read as millimetres had read usable, exit 0, its warning
/// among the quality lines).
fn doubtful(r: &PrepareReport) -> bool {
    r.folded
        || r.quality.slivers_dominate()
        || crate::pipeline::floor_on_ground_warning(r).is_some()
        || unit_doubt(r)
        || flat_end_doubt(r)
}

/// Whether a warning says the end meeting the wind is the flatter one.
fn flat_end_doubt(r: &PrepareReport) -> bool {
    r.quality
        .warnings
        .iter()
        .any(|w| w.starts_with(crate::pipeline::FLAT_END_WORDS))
}

/// Whether a warning says another unit would make the body a car.
fn unit_doubt(r: &PrepareReport) -> bool {
    r.quality
        .warnings
        .iter()
        .any(|w| crate::geometry::is_unit_doubt(w))
}

/// The closing line: usable; with warnings, usable with a pointer to them
/// (they are of many kinds: a stray part, a body on its side, a cut file,
/// not only panel quality); doubtful with a fold (panels crossing each
/// other: the run may find the flow unphysical there and stop) or a
/// surface mostly cut in slivers.
fn verdict(r: &PrepareReport) -> String {
    let warnings = &r.quality.warnings;
    match (warnings.len(), r.folded) {
        (0, _) => "verdict    usable\n".to_string(),
        (_, false) if crate::pipeline::floor_on_ground_warning(r).is_some() => {
            "verdict    doubtful: the body's floor stands on the ground or all but (above), as no car's \
             does; the ground is probably set too high: set it at the road under the tyres (ground.z, \
             --ground)\n"
                .to_string()
        }
        (_, false) if unit_doubt(r) => "verdict    doubtful: as read, the body is a scale model's size, \
             and another unit makes it a car (above): check the unit (geometry.units, --units) before \
             running\n"
            .to_string(),
        (_, false) if flat_end_doubt(r) => "verdict    doubtful: the end meeting the wind is the \
             flatter one (above), as a car's tail is: check which way the file's nose points \
             (geometry.nose, --nose) before running\n"
            .to_string(),
        (_, false) if r.quality.slivers_dominate() => "verdict    doubtful: most of the surface is cut in \
             slivers (above), so every pressure and load is unsure; export it with even triangles or ask \
             for fewer panels\n"
            .to_string(),
        (_, true) => "verdict    doubtful: the surface folds through itself (above), and the flow there \
                      often comes out unphysical and stops the run; repair the STL there (another panel count \
                      may or may not avoid it)\n"
            .to_string(),
        (n, false) => format!(
            "verdict    usable; read the {n} warning{} above\n",
            if n == 1 { "" } else { "s" }
        ),
    }
}

fn read_lines(r: &PrepareReport) -> String {
    let mut s = String::new();
    if let Some(read) = &r.read {
        s += &format!(
            "read       {:?} STL, {} bytes, {} facets, {} distinct vertices; unit {} (x {} to metres)\n",
            read.format,
            read.bytes,
            read.facets,
            read.vertices,
            r.units,
            r.units.to_metres()
        )
        .to_lowercase();
        if read.trailing_bytes > 0 {
            s += &format!(
                "           {} bytes after the last facet ignored\n",
                read.trailing_bytes
            );
        }
        if read.count_missing {
            s += &format!(
                "           the header's facet count was 0 (its writer left it out): read the {} facets \
                 the file's length holds\n",
                read.facets
            );
        }
    }
    if !r.axes.is_identity() {
        let mut what = Vec::new();
        if r.axes.nose_plus_x {
            what.push("its nose at +x");
        }
        if r.axes.y_up {
            what.push("y up");
        }
        s += &format!(
            "axes       the file has {}: turned to tuft's axes (x growing from front to rear, z up, y to \
             the right seen from the driver's seat, the origin kept); everything below, and every length \
             in a case file, is in those\n",
            what.join(" and ")
        );
    }
    let [lo, hi] = r.bounds;
    // The wind arrives at the low-x end: a nose exported at the other end
    // runs backwards with nothing else to tell (a review's scan gave C_D
    // 0.37 instead of 0.15 that way), so name both ends and the switch.
    let turn = if r.axes.nose_plus_x {
        ""
    } else {
        "; a file whose nose lies at the other end needs geometry.nose = \"+x\" (--nose +x)"
    };
    // Length, width and height in words, so that a half model's width
    // (the modelled half's) and a height taken from the underside, not
    // the ground, read as what they are (a review took a half pickup's
    // 0.950 for the whole width).
    let width = if r.mirrors.symmetry {
        format!(
            "{:.3} wide (the modelled half; the whole body {:.3})",
            hi[1] - lo[1],
            2.0 * hi[1].abs().max(lo[1].abs())
        )
    } else {
        format!("{:.3} wide", hi[1] - lo[1])
    };
    s += &format!(
        "size       {:.3} long, {width}, {:.3} high from its lowest point at z {:.3} m (x from {:.3}, \
         the nose, where the wind arrives, to {:.3}, the tail{turn}), surface {:.3} m^2\n",
        hi[0] - lo[0],
        hi[2] - lo[2],
        lo[2],
        lo[0],
        hi[0],
        r.area
    );
    let ground = r
        .mirrors
        .ground
        .map_or("none".to_string(), |z| format!("z = {z} m"));
    s += &format!(
        "mirrors    ground plane: {ground}; symmetry plane y = 0: {}\n",
        if r.mirrors.whole_cut.is_some() {
            "yes (half model, cut from the whole body: see the note below)"
        } else if r.mirrors.mirrored_half {
            "yes (half model of the left side, y <= 0 in tuft's axes: run as its mirror image, see the note below)"
        } else if r.mirrors.symmetry {
            "yes (half model)"
        } else {
            "no"
        }
    );
    if let Some(h) = &r.mirrors.halves {
        s += &halves_line(h);
    }
    if let Some(y) = r.mirrors.off_centre {
        // Its box's middle: a body turned about the vertical (warned
        // about below) or a part on one side only moves it too, and
        // moving the body would not make such a one a half model.
        s += &format!(
            "           its box is centred {:.1} mm off y = 0: if the body is symmetric and only offset, move \
             its centre plane onto y = 0 in the STL to run it as a half model (a body turned about the \
             vertical, or with a part on one side only, is not a half model's)\n",
            1000.0 * y
        );
    }
    if r.mirrors.cut_vertices_moved > 0 {
        s += &format!(
            "           cut: {} within {:.1} mm of y = 0 moved onto it (largest move {})\n",
            crate::output::plural(r.mirrors.cut_vertices_moved, "vertex", "vertices"),
            1000.0 * tuft_mesh::prepare::CUT_TOLERANCE * diagonal(r),
            move_text(r.mirrors.cut_largest_move)
        );
    }
    if r.mirrors.ground_vertices_moved > 0 {
        s += &format!(
            "           ground: {} of the border on the ground moved onto it (largest move {})\n",
            crate::output::plural(r.mirrors.ground_vertices_moved, "vertex", "vertices"),
            move_text(r.mirrors.ground_largest_move)
        );
    }
    s
}

/// A vertex move for check's cut and ground lines: millimetres, or metres
/// in powers of ten with "round-off" below a hundredth of a millimetre (a
/// single-precision file's, which "0.00 mm" would hide).
fn move_text(metres: f64) -> String {
    if metres >= 1e-5 {
        format!("{:.2} mm", 1000.0 * metres)
    } else {
        format!("{metres:.1e} m, round-off")
    }
}

/// How symmetric a whole body is, and what follows: a body whose halves
/// agree (`HalfCut::differs`, the run's own test) can run as a half model.
fn halves_line(h: &tuft_mesh::cut::HalfCut) -> String {
    let [x, y, z] = h.largest_difference_at;
    let mm = 1000.0 * h.largest_difference;
    if h.differs() {
        format!(
            "           the halves about y = 0 differ by up to {mm:.0} mm (near x {x:.3}, y {y:.3}, z {z:.3} m): \
             run it whole\n"
        )
    } else {
        // Halves that differ by more than a thousandth of the diagonal
        // (some 5 mm on a car) still run as a half model, but the other
        // side's shape is then lost (a review's body, its halves 45 mm
        // apart, was told only that it could).
        let lost = if h.largest_difference > 0.001 * h.diagonal {
            format!(
                "; the half model is the y >= 0 half mirrored, so the other side's differences (up to \
                 {mm:.0} mm, near x {x:.3}, y {y:.3}, z {z:.3} m) are not modelled"
            )
        } else {
            String::new()
        };
        format!(
            "           the halves about y = 0 agree to {mm:.1} mm: it can run as a half model \
             (geometry.half_model = true, --half), cut at y = 0: straight ahead on half the panels in a \
             quarter of the memory, with a mirror-symmetric flow, and in a cross wind mirrored into a \
             whole body whose two sides are panelled alike (a whole mesh's sides differ, which biases a \
             yaw against its mirror image){lost}\n"
        )
    }
}

/// The bounding-box diagonal of the prepared body, metres.
fn diagonal(r: &PrepareReport) -> f64 {
    let [lo, hi] = r.bounds;
    (0..3).map(|k| (hi[k] - lo[k]).powi(2)).sum::<f64>().sqrt()
}

fn repair_lines(r: &PrepareReport) -> String {
    let p = &r.repair;
    let d = &p.degenerate;
    let layers = tuft_mesh::repair::describe_layers(&p.layers)
        .map(|l| format!("           duplicated layers dropped: {l}\n"))
        .unwrap_or_default();
    format!(
        "repair     weld within {:.3e} m: {} vertices merged\n\
         \x20          degenerate facets dropped: {} collapsed, {} zero-area, {} slivers\n\
         \x20          duplicate facets dropped: {}; facets dropped from edges shared three ways: {}\n\
         {layers}\
         \x20          orientation: {} connected parts, {} facets flipped to agree, {} edges still disagree\n\
         \x20          outward: {} parts turned outward ({} facets), {} parts enclosing no volume\n\
         \x20          unused vertices removed: {}; {} facets, {} vertices after repair\n",
        p.weld_tolerance,
        p.vertices_welded,
        d.collapsed,
        d.zero_area,
        d.slivers,
        p.duplicates,
        p.fins,
        p.orientation.components,
        p.orientation.facets_flipped,
        p.orientation.conflicting_edges,
        p.outward.components_reversed,
        p.outward.facets_flipped,
        p.outward.flat_components,
        p.unused_vertices,
        p.output_facets,
        p.output_vertices,
    )
}

fn hole_lines(r: &PrepareReport) -> String {
    let h = &r.repair.holes;
    let mut s = format!(
        "holes      {} boundary loops: {} closed by a mirror plane, {} filled (perimeter, or the circle across the hole's widest if shorter, up to {:.3} m, or {} times that of the facets around it), {} zero-width slits; {} non-manifold edges\n",
        h.loops,
        h.mirror_closed.len(),
        h.filled.len(),
        h.fill_limit,
        h.local_factor,
        h.slits,
        h.non_manifold_edges
    );
    let describe = |what: &str, l: &LoopInfo| {
        let round = tuft_mesh::repair::circle_words(l.measure, l.perimeter);
        format!(
            "           {what} at ({:.3}, {:.3}, {:.3}) m, perimeter {:.3} m{round}, {} edges\n",
            l.centre[0], l.centre[1], l.centre[2], l.perimeter, l.edges
        )
    };
    for l in h.mirror_closed.iter().take(5) {
        s += &describe(
            &format!("closed by the {} mirror:", l.plane.unwrap_or("?")),
            l,
        );
    }
    for l in h.filled.iter().take(5) {
        s += &describe("filled:", l);
    }
    if h.filled.len() > 5 {
        s += &format!(
            "           and {} more filled (all of them in --json)\n",
            h.filled.len() - 5
        );
    }
    // Unwrapped, they are among the warnings ([`crate::pipeline::non_manifold_warning`]).
    if h.non_manifold_edges > 0 && r.wrap.is_some() {
        s += "           the edges shared by three or more facets do not reach the panels: the wrap rebuilt \
              the surface round them\n";
    }
    s
}

fn panel_lines(r: &PrepareReport) -> String {
    match &r.coarsen {
        None => format!("panels     {} (no coarsening needed)\n", r.panels),
        Some(c) => {
            let mut s = format!(
                "panels     {} coarsened to {} (target {}); largest deviation from the input surface {:.3e} m, rms {:.3e} m ({} input vertices sampled)\n",
                c.input_panels,
                c.achieved_panels,
                c.target_panels,
                c.max_deviation,
                c.rms_deviation,
                c.samples
            );
            if let Some(u) = &c.untangled {
                s += &folds_line(u);
            }
            if let Some(f) = &c.fallback {
                s += &format!("           {f}\n");
            }
            s
        }
    }
}

fn quality_lines(r: &PrepareReport) -> String {
    let q = &r.quality;
    let t = &q.thresholds;
    let mut s = format!(
        "quality    aspect ratio median {:.2}, max {:.2} ({} above {}); smallest angle min {:.1} deg ({} below {} deg);\n\
         \x20          neighbour area ratio median {:.2}, max {:.2} ({} above {}); thresholds are common practice\n",
        q.aspect_ratio.median,
        q.aspect_ratio.max,
        q.high_aspect,
        t.max_aspect_ratio,
        q.min_angle_deg.min,
        q.small_angle,
        t.min_angle_deg,
        q.neighbour_area_ratio.median,
        q.neighbour_area_ratio.max,
        q.size_jump,
        t.max_neighbour_area_ratio
    );
    for w in &q.warnings {
        s += &format!("           warning: {w}\n");
    }
    // The wrap's description and the duplicated layers have their own
    // lines above.
    let wrap = r.wrap.as_ref().map(|w| w.describe());
    let layers = tuft_mesh::repair::describe_layers(&r.repair.layers);
    for n in q
        .notes
        .iter()
        .filter(|n| Some(*n) != wrap.as_ref() && Some(*n) != layers.as_ref())
    {
        s += &format!("           note: {n}\n");
    }
    s
}

/// The check's line on the folds smoothed before coarsening, with where
/// the first left folded lies (a review read "the quality lines say where"
/// and found no place there).
fn folds_line(u: &tuft_mesh::coarsen::UntangleReport) -> String {
    let [x, y, z] = u.first;
    let left = match (u.folded_after, u.still_folded_at) {
        (0, _) => "none still folded".to_owned(),
        (n, Some([fx, fy, fz])) => format!(
            "{n} facets still folded, the first near x {fx:.3}, y {fy:.3}, z {fz:.3} m: the panels there \
             are unsure"
        ),
        (n, None) => format!("{n} facets still folded"),
    };
    format!(
        "           folds smoothed before coarsening: {} input facets crossed others or were turned over \
         against their neighbours (the first near x {x:.3}, y {y:.3}, z {z:.3} m); {} vertices moved, by \
         at most {:.1e} m, ending at most {:.1e} m off the input surface; {left}\n",
        u.folded_before, u.vertices_moved, u.largest_move, u.largest_offset,
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A yawed case's check says what the run will ask of the panels, and
    /// that a yaw under one degree is read in degrees.
    #[test]
    fn a_cross_wind_is_said_before_the_run() {
        assert_eq!(yaw_line(0.0, 8000), "");
        let line = yaw_line(15.0, 10500);
        assert!(
            line.starts_with("flow       yaw 15°")
                && line.contains("fewer than 7875 panels (three quarters of the 10500 suggested)"),
            "{line}"
        );
        assert!(!line.contains("radians"), "{line}");
        let line = yaw_line(0.26, 10500);
        assert!(
            line.contains("(flow.yaw is in degrees: 0.26 radians would be 14.9)"),
            "{line}"
        );
    }

    /// The square-back research body (rounded nose, flat base) facing the
    /// right way is not noted; turned round, its flat base meets the wind
    /// and is (a review's reversed body had passed check without a word).
    #[test]
    fn a_flat_end_meeting_the_wind_is_noted() {
        let body = tuft_mesh::generate::ahmed(0.0, 3000).unwrap();
        let none = tuft_mesh::Mirrors::none();
        let forward = tuft_mesh::PanelMesh::new(body.clone(), none).unwrap();
        assert!(crate::pipeline::flat_end_warning(&forward, false).is_none());
        let mut turned = body;
        turned.map_vertices(|p| tuft_mesh::Point::new(-p.x, -p.y, p.z));
        let turned = tuft_mesh::PanelMesh::new(turned, none).unwrap();
        let n = crate::pipeline::flat_end_warning(&turned, false).unwrap();
        assert!(n.contains("set geometry.nose = \"+x\""), "{n}");
        assert!(n.starts_with(crate::pipeline::FLAT_END_WORDS), "{n}");
    }

    /// Halves that agree run as a half model; halves some centimetres
    /// apart still may, but the line says what the half model loses; more
    /// than a hundredth of the diagonal apart, run whole.
    #[test]
    fn the_halves_line_says_what_a_half_model_loses() {
        let cut = |mm: f64| tuft_mesh::cut::HalfCut {
            facets_before: 100,
            facets_kept: 50,
            facets_split: 0,
            y_range: [-0.9, 0.9],
            diagonal: 5.0,
            largest_difference: mm / 1000.0,
            largest_difference_at: [3.0, -0.8, 0.6],
        };
        let agree = halves_line(&cut(1.0));
        assert!(
            agree.contains("agree to 1.0 mm") && !agree.contains("not modelled"),
            "{agree}"
        );
        let apart = halves_line(&cut(45.0));
        assert!(
            apart.contains("agree to 45.0 mm")
                && apart.contains("the other side's differences (up to 45 mm, near x 3.000")
                && apart.contains("are not modelled"),
            "{apart}"
        );
        assert!(halves_line(&cut(60.0)).contains("differ by up to 60 mm"));
    }

    /// The folds line says where the first facet left folded lies, or
    /// that none is.
    #[test]
    fn the_folds_line_says_where_folds_are_left() {
        let mut u = tuft_mesh::coarsen::UntangleReport {
            folded_before: 12,
            folded_after: 8,
            first: [1.0, 0.5, 0.25],
            still_folded_at: Some([3.4, 0.2, 1.1]),
            vertices_moved: 40,
            largest_move: 2e-3,
            largest_offset: 1e-4,
        };
        let line = folds_line(&u);
        assert!(
            line.contains(
                "; 8 facets still folded, the first near x 3.400, y 0.200, z 1.100 m: the panels there \
                 are unsure\n"
            ),
            "{line}"
        );
        u.folded_after = 0;
        assert!(folds_line(&u).ends_with("; none still folded\n"));
    }
}
