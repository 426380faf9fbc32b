//! `polaray analyze`.

use std::path::PathBuf;
use std::process::ExitCode;

/// Options of `polaray analyze`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Input file.
    pub file: PathBuf,
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    anyhow::bail!(
        "{}: `polaray analyze` is not built yet",
        args.file.display()
    )
}
