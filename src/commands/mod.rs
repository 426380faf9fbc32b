//! One module per command; each exposes `Args` (clap) and `run`.

pub mod analyze;
pub mod check;
pub mod compare;
pub mod gonio;
pub mod polar;
pub mod profile;
pub mod run;

use std::process::ExitCode;

use crate::cli::Command;

/// Runs the chosen command.
pub fn dispatch(command: Command) -> anyhow::Result<ExitCode> {
    match command {
        Command::Check(a) => check::run(a),
        Command::Run(a) => run::run(a),
        Command::Analyze(a) => analyze::run(a),
        Command::Polar(a) => polar::run(a),
        Command::Profile(a) => profile::run(a),
        Command::Gonio(a) => gonio::run(a),
        Command::Compare(a) => compare::run(a),
    }
}
