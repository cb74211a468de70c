//! `recoil merge DIRS… --out DIR`: combines the output folders of the
//! shards of one scan into the output of a single run.

use std::path::PathBuf;

use anyhow::Context;
use recoil::scan::products::PlanProducts;
use recoil::scan::{ScanManifest, ScanPlan, merge_shards};

use super::scan::{print_outputs, print_results, print_warnings};

/// Arguments of `recoil merge`.
#[derive(Debug, clap::Args)]
pub struct MergeArgs {
    /// Output folders of the shards (`recoil scan --shard I/N --out DIR`),
    /// all N of them, in any order. Refused when they come from different
    /// plans or versions.
    #[arg(required = true)]
    pub dirs: Vec<PathBuf>,

    /// Folder for the merged results (results.csv, contours.csv,
    /// dm_nucleon.csv, result.json, points/).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
}

/// Runs `recoil merge`.
pub fn run(args: MergeArgs) -> anyhow::Result<()> {
    // The plan is needed for the whole-scan products; read it (and the
    // inputs it names) before merging anything.
    let first = &args.dirs[0];
    let manifest = ScanManifest::read(first).with_context(|| {
        format!(
            "{}: not a finished scan output (is the shard complete?)",
            first.display()
        )
    })?;
    let plan = ScanPlan::from_toml_file(&manifest.plan)
        .with_context(|| format!("scan plan {} of the shards", manifest.plan.display()))?;
    let products = PlanProducts::new(&plan).context("preparing the DM–nucleon comparison")?;
    let summary = merge_shards(&args.dirs, &args.out, &products)
        .with_context(|| format!("merging into {}", args.out.display()))?;
    println!(
        "{} — merged {} shards, {} points",
        plan.title,
        summary.shards,
        summary.rows.len()
    );
    print_results(&summary.rows, plan.limit.cl);
    print_warnings(&summary.warnings);
    print_outputs(&args.out);
    Ok(())
}
