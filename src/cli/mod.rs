//! The command-line layer: one file per subcommand. Parses arguments, calls
//! the library, prints tables and writes files. No physics lives here.

use clap::{Parser, Subcommand};

mod inspect;
mod limit;

/// Recast LHC jet + missing-momentum searches for dark-matter models and
/// compare the exclusion with direct detection. Results are estimates, not an
/// experiment's official analysis.
#[derive(Debug, Parser)]
#[command(name = "recoil", version, about, long_about = None)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Debug, Subcommand)]
enum Command {
    /// What is in event files: count, cross-section, weights, particles, missing momentum.
    Inspect(inspect::InspectArgs),
    /// CLs upper limits for counting experiments (exact, asymptotic, pseudo-experiments).
    Limit(limit::LimitArgs),
}

/// Runs the parsed command.
pub fn run(cli: Cli) -> anyhow::Result<()> {
    match cli.command {
        Command::Inspect(args) => inspect::run(args),
        Command::Limit(args) => limit::run(args),
    }
}
