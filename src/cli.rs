//! Command-line definition. Each command's options live beside its code in
//! `commands/<name>.rs`.

use clap::{Parser, Subcommand};

use crate::commands;

/// polaray: trace a room under several scattering treatments and see which
/// conclusions survive. Results are advisory; local codes and licensed practice decide.
#[derive(Debug, Parser)]
#[command(name = "polaray", version, about, long_about = None)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// The commands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Load a room file, print its volume, areas and reverberation estimates, and list every problem found.
    Check(commands::check::Args),
    /// Trace a room and write echograms, room parameters and plots.
    Run(commands::run::Args),
    /// Compute ISO 3382 room parameters from a measured impulse response (WAV).
    Analyze(commands::analyze::Args),
    /// Diffusion and scattering coefficients, and the bound that links them, from polar data.
    Polar(commands::polar::Args),
    /// Predict the polar response of a candidate surface profile.
    Profile(commands::profile::Args),
    /// Measure a material's reflection law on a virtual goniometer: polar response, s, d and the bound.
    Gonio(commands::gonio::Args),
    /// Trace a room under several reflection laws and surface treatments and judge, per receiver and parameter, whether the differences can be heard.
    Compare(commands::compare::Args),
}

#[cfg(test)]
mod tests {
    use super::*;
    use clap::CommandFactory;

    #[test]
    fn cli_definition_is_consistent() {
        Cli::command().debug_assert();
    }
}
