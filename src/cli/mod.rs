//! The command-line layer: one file per subcommand. Parses arguments, calls
//! the library, prints tables and writes files. No physics lives here.

use clap::{Parser, Subcommand};

mod direct;
mod inspect;
mod limit;
mod merge;
mod output;
mod plot;
mod progress;
mod recast;
mod scan;
mod translate;

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
    /// Yields, cut-flows, CLs and limits of one search for one event sample.
    Recast(Box<recast::RecastArgs>),
    /// Model point or collider boundary → widths, Γ/M, BR, σ_SI / σ_SD.
    Translate(translate::TranslateArgs),
    /// Figures (SVG, with their data as CSV) from the files other commands write.
    Plot(plot::PlotArgs),
    /// Direct detection: recoil spectrum, expected counts, limit curve.
    Direct(direct::DirectArgs),
    /// CLs upper limits for counting experiments (exact, asymptotic, pseudo-experiments).
    Limit(limit::LimitArgs),
    /// A grid of model points in parallel: results table, contours, DM–nucleon curves.
    Scan(scan::ScanArgs),
    /// Combine the output folders of the shards of one scan.
    Merge(merge::MergeArgs),
}

/// Runs the parsed command.
pub fn run(cli: Cli) -> anyhow::Result<()> {
    match cli.command {
        Command::Inspect(args) => inspect::run(args),
        Command::Recast(args) => recast::run(*args),
        Command::Translate(args) => translate::run(args),
        Command::Plot(args) => plot::run(args),
        Command::Direct(args) => direct::run(args),
        Command::Limit(args) => limit::run(args),
        Command::Scan(args) => scan::run(args),
        Command::Merge(args) => merge::run(args),
    }
}
