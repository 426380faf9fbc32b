//! `polaray run`.

use std::path::PathBuf;
use std::process::ExitCode;

/// Options of `polaray run`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Room file (TOML).
    pub room: PathBuf,
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    anyhow::bail!("{}: `polaray run` is not built yet", args.room.display())
}
