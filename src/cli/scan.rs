//! `recoil scan PLAN`: every point of a scan plan through detector,
//! selection, yields and statistics, in parallel, with a cache, resume and
//! shards; writes the results table, the contours and the DM–nucleon curves.

use std::path::{Path, PathBuf};
use std::time::Instant;

use anyhow::{Context, bail};
use recoil::scan::evaluate::PlanEvaluator;
use recoil::scan::products::PlanProducts;
use recoil::scan::{PointResult, Progress, RunOptions, ScanPlan, Shard, run_scan};

/// Arguments of `recoil scan`.
#[derive(Debug, clap::Args)]
pub struct ScanArgs {
    /// Scan plan (TOML): search, detector profile, mediator and reference
    /// couplings, statistics options and the CSV table of points.
    pub plan: PathBuf,

    /// Run only shard I of N (0-based, e.g. `--shard 0/4`): the points whose
    /// row index k (0-based, table order) has k mod N = I. Merge the shard
    /// folders with `recoil merge`.
    #[arg(long, value_name = "I/N")]
    pub shard: Option<String>,

    /// Worker threads (default: one per core). Results do not depend on it.
    #[arg(long, value_name = "N")]
    pub threads: Option<usize>,

    /// Output folder (default: `output` in the plan). Holds results.csv,
    /// contours.csv, dm_nucleon.csv, result.json, points/ and the cache.
    #[arg(long, value_name = "DIR")]
    pub out: Option<PathBuf>,

    /// Neither read nor write the yield cache (every point reads its events).
    #[arg(long)]
    pub no_cache: bool,
}

/// Runs `recoil scan`.
pub fn run(args: ScanArgs) -> anyhow::Result<()> {
    let shard = match &args.shard {
        Some(s) => s.parse::<Shard>().context("--shard")?,
        None => Shard::WHOLE,
    };
    if args.threads == Some(0) {
        bail!("--threads must be >= 1 (leave it out for one thread per core)");
    }
    let plan = ScanPlan::from_toml_file(&args.plan)
        .with_context(|| format!("scan plan {}", args.plan.display()))?;
    let out = match (&args.out, &plan.output) {
        (Some(o), _) => o.clone(),
        (None, Some(o)) => o.clone(),
        (None, None) => bail!(
            "{}: no output folder: give --out DIR or `output = \"DIR\"` in the plan",
            args.plan.display()
        ),
    };
    // Search, detector profile, model and direct-detection inputs are read
    // and validated here, before any event file is opened.
    let evaluator = PlanEvaluator::new(&plan).context("preparing the scan")?;
    let products = PlanProducts::new(&plan).context("preparing the DM–nucleon comparison")?;
    let opts = RunOptions {
        out: out.clone(),
        shard,
        threads: args.threads,
        use_cache: !args.no_cache,
    };
    let n_points = plan
        .points
        .iter()
        .filter(|p| shard.contains(p.index))
        .count();
    let bar = super::progress::count_bar(n_points as u64, "points");
    let on_progress = |p: Progress| {
        if let Some(b) = &bar {
            b.set_position(p.done as u64);
            b.set_message(format!("{} events read", p.events_read));
        }
    };
    let start = Instant::now();
    let summary = run_scan(&plan, &evaluator, &products, &opts, Some(&on_progress))
        .with_context(|| format!("scan {} into {}", args.plan.display(), out.display()))?;
    let seconds = start.elapsed().as_secs_f64();
    if let Some(b) = bar {
        b.finish_and_clear();
    }

    println!(
        "{} — shard {shard}, {} points",
        plan.title,
        summary.rows.len()
    );
    print_results(&summary.rows, plan.limit.cl);
    println!();
    println!(
        "{} evaluated ({} from the yield cache), {} resumed from an earlier run; {} events read \
         in {seconds:.2} s ({:.0} events/s)",
        summary.evaluated,
        summary.from_cache,
        summary.resumed,
        summary.events_read,
        summary.events_read as f64 / seconds.max(1e-9)
    );
    print_warnings(&summary.warnings);
    print_outputs(&out);
    Ok(())
}

/// Prints the results table with units in the headers.
pub(super) fn print_results(rows: &[PointResult], cl: f64) {
    println!(
        "{:<16} {:>9} {:>9} {:>7} {:<16} {:>11} {:>9} {:>10} {:>10} {:>9}",
        "point",
        "M [GeV]",
        "m_χ [GeV]",
        "Γ/M",
        "best region",
        "s [events]",
        "CLs(μ=1)",
        "μ_up obs",
        "μ_up exp",
        "excluded"
    );
    for r in rows {
        println!(
            "{:<16} {:>9} {:>9} {:>7.4} {:<16} {:>11.3} {:>9.4} {:>10.4} {:>10.4} {:>9}",
            r.label,
            r.m_med_gev,
            r.m_dm_gev,
            r.width_over_mass,
            r.best_region,
            r.signal_events,
            r.cls_mu1,
            r.mu_up_obs,
            r.mu_up_exp[2],
            if r.excluded() { "yes" } else { "no" }
        );
    }
    let n = rows.iter().filter(|r| r.excluded()).count();
    println!(
        "{n} of {} points excluded at {:.0} % CL (CLs; μ_up obs < 1). Estimates from \
         parton-level events and a parametrised detector, not an official result.",
        rows.len(),
        100.0 * cl
    );
}

/// Prints warnings once each, in order.
pub(super) fn print_warnings(warnings: &[String]) {
    for w in warnings {
        eprintln!("recoil: warning: {w}");
    }
}

/// Lists the files written into `out` (folders marked with `/`).
pub(super) fn print_outputs(out: &Path) {
    let mut names: Vec<String> = std::fs::read_dir(out)
        .map(|entries| {
            entries
                .filter_map(Result::ok)
                .map(|e| {
                    let name = e.file_name().to_string_lossy().into_owned();
                    let dir = e.file_type().is_ok_and(|t| t.is_dir());
                    if dir { format!("{name}/") } else { name }
                })
                .filter(|n| !n.starts_with('.'))
                .collect()
        })
        .unwrap_or_default();
    names.sort();
    println!("wrote {}: {}", out.display(), names.join(", "));
}
