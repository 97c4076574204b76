//! `tuft check FILE.stl`: read, repair and report on a surface mesh.

use std::path::PathBuf;
use std::process::ExitCode;

/// Arguments of `tuft check`.
#[derive(clap::Args)]
pub struct CheckArgs {
    /// The STL file (binary or ASCII).
    pub file: PathBuf,
}

/// Run `tuft check`.
pub fn run(args: &CheckArgs) -> anyhow::Result<ExitCode> {
    anyhow::bail!("{}: check is not implemented yet", args.file.display())
}
