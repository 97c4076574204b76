//! The `tuft` command: aerodynamic screening, in minutes on a laptop, of concept car shapes.
//!
//! Exit codes: 0 success; 1 the run finished but left warnings the user must
//! read; 2 bad input or failure; 130 interrupted (Ctrl-C, or a scheduler's
//! stop). Every error message starts with `tuft:` and names the file and
//! the problem.

use std::process::ExitCode;

use clap::{Parser, Subcommand};

/// `println!` for what a command prints on stdout, which a closed stdout
/// does not stop: `tuft check case.toml | head -20` had panicked ("failed
/// printing to stdout: Broken pipe", exit 101). See [`write_stdout`].
macro_rules! say {
    ($($arg:tt)*) => {
        $crate::write_stdout(format_args!($($arg)*), true)
    };
}

/// `print!` as [`say!`] is `println!`.
macro_rules! say_part {
    ($($arg:tt)*) => {
        $crate::write_stdout(format_args!($($arg)*), false)
    };
}

mod case;
mod check;
mod collect;
mod compare;
mod estimate;
mod geometry;
mod meshfile;
mod noise;
mod outdir;
// Some writer helpers serve only the tests and later commands.
#[allow(dead_code)]
mod output;
mod pipeline;
mod planes;
mod progress;
mod rays;
mod region;
mod run;
mod slurm;
mod summary;
mod sweep;
mod write;

/// Exit code for a run that finished but left warnings the user must read.
pub const EXIT_WARNINGS: u8 = 1;
/// Exit code for bad input or a failed run.
pub const EXIT_FAILURE: u8 = 2;
/// Exit code for a command stopped by an interrupt (SIGINT, SIGTERM or
/// SIGHUP): 128 plus SIGINT's number, as shells give.
pub const EXIT_INTERRUPTED: i32 = 130;

/// On an interrupt, remove the result folders under construction and say
/// so in one line before leaving (a review's run ended on Ctrl-C without a
/// word, its hidden partial folder left for the next run to clear, and a
/// scheduler's stop left a log that simply ended).
fn stop_cleanly_on_interrupt() {
    // Without a handler the signal still stops the command, as before.
    let _ = ctrlc::set_handler(|| {
        let removed = outdir::remove_unfinished();
        let names = removed
            .iter()
            .map(|p| p.display().to_string())
            .collect::<Vec<_>>()
            .join(", ");
        let what = match removed.len() {
            0 => "nothing was being written".to_owned(),
            1 => format!("the result folder being written, {names}, was not made"),
            n => format!("the {n} result folders being written, {names}, were not made"),
        };
        eprintln!(
            "tuft: interrupted: {what}; results finished before, and an older result in its place, are kept"
        );
        std::process::exit(EXIT_INTERRUPTED);
    });
}

#[derive(Parser)]
#[command(
    name = "tuft",
    version,
    about = "Aerodynamic screening of concept car shapes: surface pressure, boundary-layer \
             separation risk, lift and a drag estimate, from an STL, on a laptop.",
    after_help = "Exit codes: 0 success, 1 finished with warnings to read, 2 bad input or failure.\n\
                  Screening estimates only: confirm lift, drag and stability at speed with \
                  validated CFD or tunnel tests."
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Run a case file: potential flow, boundary layer, loads, pictures and a report.
    Run(run::RunArgs),
    /// Run the built-in example: a concept coupe with two rear-window slopes.
    Demo(run::DemoArgs),
    /// Read an STL, repair it, and report what a run would use.
    Check(check::CheckArgs),
    /// Compare two result folders: differences of the numbers and pictures on B's body.
    Compare(compare::CompareArgs),
    /// Run a sweep of variants of a base case (locally, one shard, or as a Slurm job array).
    Sweep(sweep::SweepArgs),
    /// Merge the finished variants of a sweep into sweep.csv, sweep.json and sweep.html.
    Collect(collect::CollectArgs),
}

/// clap's complaint on one line: its first paragraph (which may name the
/// missing argument on a line of its own) and the usage it gives.
fn argument_error(text: &str) -> String {
    let first = text.split("\n\n").next().unwrap_or("bad arguments");
    let first = first
        .trim_start_matches("error: ")
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ");
    let usage = text
        .lines()
        .find_map(|l| l.strip_prefix("Usage: "))
        .map_or("see tuft --help".to_owned(), |u| format!("usage: {u}"));
    format!("{first} ({usage})")
}

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) if !e.use_stderr() => {
            // --help and --version.
            say_part!("{e}");
            return ExitCode::SUCCESS;
        }
        Err(e) => {
            eprintln!("tuft: {}", argument_error(&e.to_string()));
            return ExitCode::from(EXIT_FAILURE);
        }
    };
    stop_cleanly_on_interrupt();
    let outcome = match cli.command {
        Command::Run(args) => run::run(&args),
        Command::Demo(args) => run::demo(&args),
        Command::Check(args) => check::run(&args),
        Command::Compare(args) => compare::run(&args),
        Command::Sweep(args) => sweep::run(&args),
        Command::Collect(args) => collect::run(&args),
    };
    let finished = outcome.is_ok();
    let code = match outcome {
        Ok(code) => code,
        Err(err) => {
            report_error(&err);
            ExitCode::from(EXIT_FAILURE)
        }
    };
    if let Some(e) = stdout_failure() {
        // A script retrying on exit code 2 should know the results are
        // there (a review's run to a full stdout left a complete folder,
        // and the retry was refused as the folder existed).
        let rest = if finished {
            "; the command itself finished, and any folder it wrote is complete"
        } else {
            ""
        };
        eprintln!("tuft: writing to stdout failed ({e}): what it printed is cut short{rest}");
        return ExitCode::from(EXIT_FAILURE);
    }
    code
}

/// The first error writing stdout other than a closed pipe (a full disk
/// under `> report.json`), kept for `main` to report and fail on.
static STDOUT_FAILED: std::sync::Mutex<Option<String>> = std::sync::Mutex::new(None);

/// Write to stdout. What a closed stdout (a reader such as `head` that has
/// stopped reading: the write fails with a broken pipe) cannot take is
/// dropped: what a command prints is a summary of the files it writes, so
/// the command goes on to its usual end and exit code instead of
/// panicking. Any other failure (stdout sent to a file on a full disk) is
/// kept, and `main` then names it and exits 2, since the output is cut.
pub fn write_stdout(args: std::fmt::Arguments<'_>, newline: bool) {
    use std::io::Write as _;
    let mut out = std::io::stdout().lock();
    let written = out.write_fmt(args).and_then(|()| {
        if newline {
            out.write_all(b"\n")
        } else {
            Ok(())
        }
    });
    if let Err(e) = written
        && e.kind() != std::io::ErrorKind::BrokenPipe
        && let Ok(mut failed) = STDOUT_FAILED.lock()
    {
        failed.get_or_insert_with(|| e.to_string());
    }
}

/// The error kept by [`write_stdout`], if any.
fn stdout_failure() -> Option<String> {
    STDOUT_FAILED.lock().ok().and_then(|f| f.clone())
}

/// Print an error and its causes on one line, prefixed with the program name.
fn report_error(err: &anyhow::Error) {
    eprintln!("tuft: {}", error_line(err));
}

/// An error and its causes joined by ": ", a cause left out where the
/// message before it already ends with it (an error that quotes its
/// source, as a file's "path: No space left on device" does, had printed
/// the system's words twice).
pub(crate) fn error_line(err: &anyhow::Error) -> String {
    let mut parts: Vec<String> = Vec::new();
    for cause in err.chain() {
        let text = without_os_error(&cause.to_string());
        if !parts.last().is_some_and(|p| p.ends_with(&text)) {
            parts.push(text);
        }
    }
    parts.join(": ")
}

/// `text` without the system's error number, " (os error 2)", which
/// says nothing to a designer beside its words.
fn without_os_error(text: &str) -> String {
    let mut out = text.to_owned();
    while let Some(start) = out.find(" (os error ") {
        let Some(len) = out[start..].find(')') else {
            break;
        };
        out.replace_range(start..=start + len, "");
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The system's error number is left out of the line.
    #[test]
    fn an_error_line_leaves_out_the_os_error_number() {
        let e = anyhow::Error::new(std::io::Error::from_raw_os_error(2))
            .context("coupe.toml: geometry.stl = \"nothere.stl\": cannot read the file");
        let line = error_line(&e);
        assert!(
            line.ends_with("cannot read the file: No such file or directory"),
            "{line}"
        );
        assert_eq!(without_os_error("a (os error 13) b (os error 2)"), "a b");
    }

    /// A file error that quotes its cause prints the system's words once;
    /// causes that add something stay.
    #[test]
    fn an_error_line_does_not_repeat_its_cause() {
        let full = std::io::Error::from_raw_os_error(28);
        let words = full.to_string();
        let e = anyhow::Error::new(crate::output::OutputError::Io {
            path: "out/slice.vti".into(),
            source: full,
        })
        .context("writing results");
        assert_eq!(
            error_line(&e),
            format!(
                "writing results: out/slice.vti: {}",
                without_os_error(&words)
            )
        );
        let e = anyhow::anyhow!("the cause").context("what failed");
        assert_eq!(error_line(&e), "what failed: the cause");
    }
}
