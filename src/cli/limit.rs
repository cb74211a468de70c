//! `recoil limit`: CLs upper limits for counting experiments, from numbers
//! on the command line or a CSV table of regions.

use std::io::IsTerminal;
use std::path::{Path, PathBuf};

use anyhow::{Context, bail};
use nalgebra::DMatrix;
use recoil::stats::{
    self, BackgroundConstraint, Limit, LimitOptions, Method, RegionCounts, visible_cross_section_fb,
};

/// How CLs is computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum MethodArg {
    /// Exact Poisson CLs (one region, known background).
    Exact,
    /// Asymptotic formulae with the Asimov data set.
    Asymptotic,
    /// Pseudo-experiments.
    Toys,
}

/// Shape of the background constraint.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum ConstraintArg {
    /// Gaussian, truncated at zero background.
    Gaussian,
    /// Log-normal.
    Lognormal,
    /// Poisson auxiliary measurement (on/off), τ = b/σ_b²; independent regions.
    Poisson,
}

/// Arguments of `recoil limit`: CLs upper limits on the signal strength μ,
/// on signal events (S95) and on the visible cross-section.
#[derive(Debug, clap::Args)]
#[command(
    allow_negative_numbers = true,
    group(clap::ArgGroup::new("input").required(true).args(["observed", "regions"]))
)]
pub struct LimitArgs {
    /// Observed events in a single region.
    #[arg(long, requires_all = ["background", "background_unc"], conflicts_with = "regions")]
    pub observed: Option<u64>,
    /// Expected background events in the single region.
    #[arg(long, requires = "observed")]
    pub background: Option<f64>,
    /// Absolute background uncertainty [events] in the single region.
    #[arg(long, requires = "observed")]
    pub background_unc: Option<f64>,
    /// Expected signal events at μ = 1; without it the signal is one event,
    /// so the limit on μ is the limit on signal events (S95).
    #[arg(long, requires = "observed")]
    pub signal: Option<f64>,
    /// Relative signal uncertainty (fraction, e.g. 0.1).
    #[arg(long, default_value_t = 0.0, requires = "observed")]
    pub signal_unc: f64,
    /// CSV table of exclusive regions with header
    /// name,observed,background,background_unc,signal,signal_unc
    /// (counts in events, signal_unc a fraction).
    #[arg(long)]
    pub regions: Option<PathBuf>,
    /// CSV background covariance matrix [events²] between the regions, one
    /// row per region in the order of --regions (an optional first row of
    /// names is skipped).
    #[arg(long, requires = "regions")]
    pub covariance: Option<PathBuf>,
    /// Confidence level, strictly between 0 and 1.
    #[arg(long, default_value_t = 0.95)]
    pub cl: f64,
    /// Method: exact (known background only), asymptotic (default) or toys.
    #[arg(long, value_enum, default_value_t = MethodArg::Asymptotic)]
    pub method: MethodArg,
    /// Pseudo-experiments per hypothesis (with --method toys).
    #[arg(long, default_value_t = 10_000)]
    pub toys: usize,
    /// Seed of the pseudo-experiments.
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Background constraint.
    #[arg(long, value_enum, default_value_t = ConstraintArg::Gaussian)]
    pub constraint: ConstraintArg,
    /// Integrated luminosity [fb⁻¹]; adds σ_vis = S95/L [fb].
    #[arg(long)]
    pub lumi: Option<f64>,
    /// Write the results as JSON to this file.
    #[arg(long)]
    pub out: Option<PathBuf>,
}

impl LimitArgs {
    /// The library options, checked before any file is read.
    fn options(&self) -> anyhow::Result<LimitOptions> {
        if !(self.cl > 0.0 && self.cl < 1.0) {
            bail!("--cl must lie strictly between 0 and 1, got {}", self.cl);
        }
        if let Some(l) = self.lumi
            && !(l.is_finite() && l > 0.0)
        {
            bail!("--lumi must be finite and > 0 fb⁻¹, got {l}");
        }
        if self.method == MethodArg::Toys && self.toys == 0 {
            bail!("--toys must be ≥ 1, got 0");
        }
        Ok(LimitOptions {
            cl: self.cl,
            method: match self.method {
                MethodArg::Exact => Method::Exact,
                MethodArg::Asymptotic => Method::Asymptotic,
                MethodArg::Toys => Method::Toys {
                    n_toys: self.toys,
                    seed: self.seed,
                },
            },
            constraint: match self.constraint {
                ConstraintArg::Gaussian => BackgroundConstraint::Gaussian,
                ConstraintArg::Lognormal => BackgroundConstraint::LogNormal,
                ConstraintArg::Poisson => BackgroundConstraint::Poisson,
            },
        })
    }
}

/// One named region.
#[derive(Debug, Clone, serde::Serialize)]
struct NamedRegion {
    name: String,
    counts: RegionCounts,
}

/// A limit with its translation into signal events and cross-section.
#[derive(Debug, serde::Serialize)]
struct Row {
    name: String,
    limit: Limit,
    s95_observed_events: f64,
    s95_expected_events: [f64; 5],
    sigma_vis_observed_fb: Option<f64>,
    sigma_vis_expected_fb: Option<[f64; 5]>,
    /// Median discovery significance Z_A [σ] for known background.
    z_discovery: Option<f64>,
    /// Median discovery significance with the background uncertainty [σ].
    z_discovery_with_unc: Option<f64>,
}

fn row(name: &str, signal: f64, limit: Limit, lumi: Option<f64>) -> anyhow::Result<Row> {
    // No sensitivity (μ_up = +∞) stays +∞ events, also for zero signal.
    let events = |mu: f64| if mu.is_infinite() { mu } else { mu * signal };
    let s95 = events(limit.mu_up_observed);
    let s95_exp = limit.mu_up_expected.map(events);
    let (obs, exp) = match lumi {
        Some(l) => {
            let mut e = [0.0; 5];
            for (slot, s) in e.iter_mut().zip(s95_exp) {
                *slot = visible_cross_section_fb(s, l)?;
            }
            (Some(visible_cross_section_fb(s95, l)?), Some(e))
        }
        None => (None, None),
    };
    Ok(Row {
        name: name.to_owned(),
        limit,
        s95_observed_events: s95,
        s95_expected_events: s95_exp,
        sigma_vis_observed_fb: obs,
        sigma_vis_expected_fb: exp,
        z_discovery: None,
        z_discovery_with_unc: None,
    })
}

/// Everything written with --out.
#[derive(Debug, serde::Serialize)]
struct Report {
    program: &'static str,
    version: &'static str,
    note: &'static str,
    cl: f64,
    method: Method,
    constraint: BackgroundConstraint,
    lumi_ifb: Option<f64>,
    regions_file: Option<PathBuf>,
    covariance_file: Option<PathBuf>,
    regions: Vec<NamedRegion>,
    limits: Vec<Row>,
    best_expected_region: Option<String>,
    combined: Option<Row>,
}

fn parse_field<T: std::str::FromStr>(
    path: &Path,
    line: u64,
    column: &str,
    text: &str,
) -> anyhow::Result<T>
where
    T::Err: std::fmt::Display,
{
    text.trim().parse::<T>().map_err(|e| {
        anyhow::anyhow!(
            "{}: line {line}: column {column}: cannot read {:?}: {e}",
            path.display(),
            text
        )
    })
}

/// Reads the regions CSV.
fn read_regions(path: &Path) -> anyhow::Result<Vec<NamedRegion>> {
    const COLUMNS: [&str; 6] = [
        "name",
        "observed",
        "background",
        "background_unc",
        "signal",
        "signal_unc",
    ];
    let mut reader = csv::ReaderBuilder::new()
        .trim(csv::Trim::All)
        .from_path(path)
        .with_context(|| format!("{}: cannot open the regions table", path.display()))?;
    let header = reader
        .headers()
        .with_context(|| format!("{}: cannot read the header", path.display()))?
        .clone();
    let mut index = [0usize; 6];
    for (slot, want) in index.iter_mut().zip(COLUMNS) {
        *slot = header.iter().position(|h| h == want).with_context(|| {
            format!(
                "{}: line 1: missing column {want:?} (need {})",
                path.display(),
                COLUMNS.join(",")
            )
        })?;
    }
    let mut out = Vec::new();
    for record in reader.records() {
        let record = record.with_context(|| format!("{}: cannot read a row", path.display()))?;
        let line = record.position().map_or(0, |p| p.line());
        let field = |k: usize| record.get(index[k]).unwrap_or("");
        out.push(NamedRegion {
            name: field(0).to_owned(),
            counts: RegionCounts {
                observed: parse_field(path, line, COLUMNS[1], field(1))?,
                background: parse_field(path, line, COLUMNS[2], field(2))?,
                background_unc: parse_field(path, line, COLUMNS[3], field(3))?,
                signal: parse_field(path, line, COLUMNS[4], field(4))?,
                signal_rel_unc: parse_field(path, line, COLUMNS[5], field(5))?,
            },
        });
    }
    if out.is_empty() {
        bail!(
            "{}: no regions (need at least one data row)",
            path.display()
        );
    }
    Ok(out)
}

/// Reads a square covariance matrix from CSV.
fn read_covariance(path: &Path, n: usize) -> anyhow::Result<DMatrix<f64>> {
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(false)
        .trim(csv::Trim::All)
        .from_path(path)
        .with_context(|| format!("{}: cannot open the covariance matrix", path.display()))?;
    let mut rows: Vec<Vec<f64>> = Vec::new();
    for (k, record) in reader.records().enumerate() {
        let record = record.with_context(|| format!("{}: cannot read a row", path.display()))?;
        let line = record.position().map_or(0, |p| p.line());
        if k == 0 && record.iter().all(|f| f.parse::<f64>().is_err()) {
            continue; // a header of region names
        }
        let mut row = Vec::with_capacity(record.len());
        for (j, f) in record.iter().enumerate() {
            row.push(parse_field(path, line, &(j + 1).to_string(), f)?);
        }
        if row.len() != n {
            bail!(
                "{}: line {line}: {} entries, expected {n} (one per region)",
                path.display(),
                row.len()
            );
        }
        rows.push(row);
    }
    if rows.len() != n {
        bail!(
            "{}: {} rows, expected {n} (one per region)",
            path.display(),
            rows.len()
        );
    }
    Ok(DMatrix::from_fn(n, n, |i, j| rows[i][j]))
}

fn fmt(x: f64) -> String {
    if x.is_infinite() {
        "inf".into()
    } else {
        format!("{x:.4}")
    }
}

fn method_text(opts: &LimitOptions) -> String {
    let m = match opts.method {
        Method::Exact => "exact Poisson CLs (known background)".to_owned(),
        Method::Asymptotic => "asymptotic CLs, q̃_μ with Asimov data set".to_owned(),
        Method::Toys { n_toys, seed } => {
            format!("pseudo-experiments, {n_toys} per hypothesis, seed {seed}")
        }
    };
    let c = match opts.constraint {
        BackgroundConstraint::Gaussian => "Gaussian (truncated)",
        BackgroundConstraint::LogNormal => "log-normal",
        BackgroundConstraint::Poisson => "Poisson auxiliary measurement (on/off)",
    };
    format!("method: {m}; CL = {}; background constraint: {c}", opts.cl)
}

fn print_table(rows: &[&Row], lumi: bool) {
    let mut header = format!(
        "{:<16} {:>10} {:>10} {:>10} {:>28} {:>11} {:>11}",
        "region",
        "CLs(μ=1)",
        "μ_up obs",
        "μ_up exp",
        "μ_up exp [−1σ, +1σ]",
        "S95 obs [ev]",
        "S95 exp [ev]"
    );
    if lumi {
        header.push_str(&format!(
            " {:>14} {:>14}",
            "σ_vis obs [fb]", "σ_vis exp [fb]"
        ));
    }
    header.push_str(&format!(" {:>8} {:>10}", "Z_A [σ]", "Z(σ_b) [σ]"));
    println!("{header}");
    for r in rows {
        let l = &r.limit;
        let cls = match l.cls_mu1_mc_unc {
            Some(u) => format!("{:.3}±{:.3}", l.cls_mu1, u),
            None => format!("{:.4}", l.cls_mu1),
        };
        let mut line = format!(
            "{:<16} {:>10} {:>10} {:>10} {:>28} {:>12} {:>12}",
            r.name,
            cls,
            fmt(l.mu_up_observed),
            fmt(l.mu_up_expected[2]),
            format!(
                "[{}, {}]",
                fmt(l.mu_up_expected[1]),
                fmt(l.mu_up_expected[3])
            ),
            fmt(r.s95_observed_events),
            fmt(r.s95_expected_events[2]),
        );
        if let (Some(o), Some(e)) = (r.sigma_vis_observed_fb, r.sigma_vis_expected_fb) {
            line.push_str(&format!(" {:>14} {:>14}", fmt(o), fmt(e[2])));
        }
        let z = |v: Option<f64>| v.map_or_else(|| "-".to_owned(), |x| format!("{x:.3}"));
        line.push_str(&format!(
            " {:>8} {:>10}",
            z(r.z_discovery),
            z(r.z_discovery_with_unc)
        ));
        println!("{line}");
    }
}

/// Runs `recoil limit`.
pub fn run(args: LimitArgs) -> anyhow::Result<()> {
    let opts = args.options()?;
    let spinner = std::io::stderr().is_terminal().then(|| {
        let s = indicatif::ProgressBar::new_spinner();
        s.set_message("computing limits");
        s.enable_steady_tick(std::time::Duration::from_millis(120));
        s
    });
    let regions = match &args.regions {
        Some(path) => read_regions(path)?,
        None => {
            let (Some(n), Some(b), Some(db)) =
                (args.observed, args.background, args.background_unc)
            else {
                bail!("--observed, --background and --background-unc are needed together");
            };
            vec![NamedRegion {
                name: "region".into(),
                counts: RegionCounts {
                    observed: n,
                    background: b,
                    background_unc: db,
                    signal: args.signal.unwrap_or(1.0),
                    signal_rel_unc: args.signal_unc,
                },
            }]
        }
    };
    let covariance = match &args.covariance {
        Some(p) => Some(read_covariance(p, regions.len())?),
        None => None,
    };
    let mut limits = Vec::with_capacity(regions.len());
    for r in &regions {
        let l = stats::region_limit(&r.counts, &opts)
            .with_context(|| format!("region {:?}", r.name))?;
        let mut line = row(&r.name, r.counts.signal, l, args.lumi)?;
        let c = &r.counts;
        // Discovery significance needs a signal hypothesis and b > 0.
        if args.signal.is_some() || args.regions.is_some() {
            line.z_discovery = stats::discovery_significance(c.signal, c.background).ok();
            line.z_discovery_with_unc =
                stats::discovery_significance_with_unc(c.signal, c.background, c.background_unc)
                    .ok();
        }
        limits.push(line);
    }
    let (best, combined) = if regions.len() > 1 {
        let counts: Vec<RegionCounts> = regions.iter().map(|r| r.counts).collect();
        let best = limits
            .iter()
            .enumerate()
            .min_by(|a, b| a.1.limit.mu_up_expected[2].total_cmp(&b.1.limit.mu_up_expected[2]))
            .map(|(i, _)| regions[i].name.clone());
        let combined_opts = match opts.method {
            Method::Exact => LimitOptions {
                method: Method::Asymptotic,
                ..opts
            },
            _ => opts,
        };
        let l = stats::combined_limit(&counts, covariance.as_ref(), &combined_opts)
            .context("combined regions")?;
        let s_tot: f64 = counts.iter().map(|c| c.signal).sum();
        (best, Some(row("combined", s_tot, l, args.lumi)?))
    } else {
        (None, None)
    };
    if let Some(s) = spinner {
        s.finish_and_clear();
    }

    println!("{}", method_text(&opts));
    println!("estimates from a simplified likelihood, not an experiment's official result");
    let mut shown: Vec<&Row> = limits.iter().collect();
    if let Some(c) = &combined {
        shown.push(c);
    }
    print_table(&shown, args.lumi.is_some());
    if let Some(b) = &best {
        println!("best expected region: {b} (its observed limit is the one to quote)");
    }
    if let Some(c) = &combined
        && opts.method == Method::Exact
    {
        println!(
            "combined: the exact method needs one region; the combination uses {}",
            method_text(&LimitOptions {
                method: c.limit.method,
                ..opts
            })
        );
    }
    for r in &shown {
        for w in &r.limit.warnings {
            eprintln!("recoil: warning: {}: {w}", r.name);
        }
    }
    if let Some(out) = &args.out {
        let report = Report {
            program: "recoil limit",
            version: env!("CARGO_PKG_VERSION"),
            note: "estimates from a simplified likelihood, not an experiment's official result",
            cl: opts.cl,
            method: opts.method,
            constraint: opts.constraint,
            lumi_ifb: args.lumi,
            regions_file: args.regions.clone(),
            covariance_file: args.covariance.clone(),
            regions,
            limits,
            best_expected_region: best,
            combined,
        };
        let text = serde_json::to_string_pretty(&report).context("encoding the results")?;
        super::output::write_atomically(out, &text)?;
    }
    Ok(())
}
