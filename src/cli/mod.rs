//! The command-line layer: one file per subcommand. Parses arguments, calls
//! the library, prints tables and writes files. No physics lives here.

use clap::{Parser, Subcommand};

mod inspect;
mod merge;
mod scan;

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
    /// A grid of model points in parallel: results table, contours, DM–nucleon curves.
    Scan(scan::ScanArgs),
    /// Combine the output folders of the shards of one scan.
    Merge(merge::MergeArgs),
}

/// Runs the parsed command.
pub fn run(cli: Cli) -> anyhow::Result<()> {
    match cli.command {
        Command::Inspect(args) => inspect::run(args),
        Command::Scan(args) => scan::run(args),
        Command::Merge(args) => merge::run(args),
    }
}
