//! The `tuft` command: aerodynamic screening, in minutes on a laptop, of concept car shapes.
//!
//! Exit codes: 0 success; 1 the run finished but left warnings the user must
//! read; 2 bad input or failure. Every error message starts with `tuft:` and
//! names the file and the problem.

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
mod outdir;
// Some writer helpers serve only the tests and later commands.
#[allow(dead_code)]
mod output;
mod pipeline;
mod progress;
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
    let outcome = match cli.command {
        Command::Run(args) => run::run(&args),
        Command::Demo(args) => run::demo(&args),
        Command::Check(args) => check::run(&args),
        Command::Compare(args) => compare::run(&args),
        Command::Sweep(args) => sweep::run(&args),
        Command::Collect(args) => collect::run(&args),
    };
    match outcome {
        Ok(code) => code,
        Err(err) => {
            report_error(&err);
            ExitCode::from(EXIT_FAILURE)
        }
    }
}

/// Write to stdout, dropping what a closed stdout (a reader such as
/// `head` that has stopped reading: the write fails with a broken pipe)
/// or a failing one cannot take: what a command prints is a summary of
/// the files it writes, so the command goes on to its usual end and exit
/// code instead of panicking.
pub fn write_stdout(args: std::fmt::Arguments<'_>, newline: bool) {
    use std::io::Write as _;
    let mut out = std::io::stdout().lock();
    let _ = out.write_fmt(args).and_then(|()| {
        if newline {
            out.write_all(b"\n")
        } else {
            Ok(())
        }
    });
}

/// Print an error and its causes on one line, prefixed with the program name.
fn report_error(err: &anyhow::Error) {
    let chain: Vec<String> = err.chain().map(ToString::to_string).collect();
    eprintln!("tuft: {}", chain.join(": "));
}
