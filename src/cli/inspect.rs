//! `recoil inspect FILES…`: what is in event files.

use std::path::PathBuf;

/// Arguments of `recoil inspect`.
#[derive(Debug, clap::Args)]
pub struct InspectArgs {
    /// Event files (LHEF, plain or gzip-compressed) read as one sample.
    #[arg(required = true)]
    pub files: Vec<PathBuf>,
}

/// Runs `recoil inspect`.
pub fn run(_args: InspectArgs) -> anyhow::Result<()> {
    anyhow::bail!("inspect: under construction")
}
