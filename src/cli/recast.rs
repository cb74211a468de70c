//! `recoil recast --search S [--detector D] FILES…`: yields, cut-flows,
//! CLs and limits of one search for one model point (one event sample).

use std::io::{Read, Write};
use std::path::{Path, PathBuf};

use anyhow::{Context, bail};
use recoil::detector::{Detector, DetectorProfile, Variation};
use recoil::events::{EventSource, FileCombination, InvisibleSet, ReadOptions};
use recoil::search::{
    ModelIndependentLimit, Search, SearchLimits, UncertaintyScaling, formats,
    model_independent_limits, run_sample, search_limits,
};
use recoil::stats::{BackgroundConstraint, LimitOptions, Method};

/// Arguments of `recoil recast`.
#[derive(Debug, clap::Args)]
pub struct RecastArgs {
    /// Search definition (TOML), e.g. recasts/searches/demo-jet-met.toml.
    #[arg(long, value_name = "FILE")]
    pub search: PathBuf,

    /// Detector profile (TOML); default: the profile the search definition
    /// names in `detector_profile`.
    #[arg(long, value_name = "FILE")]
    pub detector: Option<PathBuf>,

    /// Shift the detector response, e.g. `resolution=0.2,efficiency=-0.05`
    /// (resolutions 20 % worse, every efficiency 0.05 lower).
    #[arg(long, value_name = "SPEC")]
    pub detector_variation: Option<String>,

    /// Seed of the detector smearing (each event's random numbers come from
    /// the seed, the file index and the event index).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,

    /// Override the sample cross-section [pb] (efficiencies are kept).
    #[arg(long, value_name = "PB")]
    pub xsec_pb: Option<f64>,

    /// Project to another integrated luminosity [fb⁻¹]: signal and
    /// background scale with L; observed counts become the rounded
    /// projected background (a projection has no data).
    #[arg(long, value_name = "IFB")]
    pub lumi_ifb: Option<f64>,

    /// How background uncertainties scale in a projection: `linear`
    /// (σ_b ∝ L, systematics-dominated) or `sqrt` (σ_b ∝ √L).
    #[arg(long, value_name = "RULE", default_value = "linear")]
    pub background_unc_scaling: String,

    /// CLs method: `asymptotic`, `exact` (Poisson; only for regions whose
    /// background uncertainty is 0) or `toys`.
    #[arg(long, default_value = "asymptotic")]
    pub method: String,

    /// Pseudo-experiments per hypothesis with `--method toys`.
    #[arg(long, default_value_t = 10_000)]
    pub toys: usize,

    /// Constraint on the background nuisance parameter: `gaussian`,
    /// `lognormal` or `poisson` (auxiliary measurement; independent regions
    /// only).
    #[arg(long, default_value = "gaussian")]
    pub constraint: String,

    /// Confidence level, overriding the search's (e.g. 0.95).
    #[arg(long)]
    pub cl: Option<f64>,

    /// Extra PDG ids treated as invisible (comma-separated), on top of
    /// neutrinos, 51–53 and 1000022.
    #[arg(long, value_name = "IDS", value_delimiter = ',')]
    pub invisible_ids: Vec<i32>,

    /// The files are different processes whose cross-sections add (default:
    /// independent runs of one process).
    #[arg(long)]
    pub separate_processes: bool,

    /// Worker threads (0 = all cores). Results do not depend on it.
    #[arg(long, default_value_t = 0)]
    pub threads: usize,

    /// Write yields.csv, cutflow.csv, distributions.csv and result.json to
    /// this folder (created if missing).
    #[arg(long, value_name = "DIR")]
    pub out: Option<PathBuf>,

    /// Event files (LHEF, plain or gzip-compressed) read as one sample.
    #[arg(required = true)]
    pub files: Vec<PathBuf>,
}

/// Library configuration built from the arguments before any event file
/// is opened.
struct Config {
    search: Search,
    search_path: PathBuf,
    profile: DetectorProfile,
    profile_path: PathBuf,
    variation: Variation,
    limit: LimitOptions,
    invisible: InvisibleSet,
    combination: FileCombination,
}

impl Config {
    fn build(args: &RecastArgs) -> anyhow::Result<Config> {
        let mut search = Search::from_toml_file(&args.search)
            .with_context(|| format!("reading search definition {}", args.search.display()))?;
        let scaling = match args.background_unc_scaling.as_str() {
            "linear" => UncertaintyScaling::Linear,
            "sqrt" => UncertaintyScaling::Sqrt,
            other => bail!("--background-unc-scaling must be linear or sqrt, got \"{other}\""),
        };
        if let Some(l) = args.lumi_ifb {
            search = search.projected(l, scaling)?;
        }
        if let Some(x) = args.xsec_pb
            && !(x.is_finite() && x >= 0.0)
        {
            bail!("--xsec-pb must be finite and ≥ 0, got {x} pb");
        }
        let cl = args.cl.unwrap_or(search.cl());
        if !(cl > 0.0 && cl < 1.0) {
            bail!("--cl must be in (0, 1), got {cl}");
        }
        let method = match args.method.as_str() {
            "asymptotic" => Method::Asymptotic,
            "exact" => Method::Exact,
            "toys" if args.toys >= 100 => Method::Toys {
                n_toys: args.toys,
                seed: args.seed,
            },
            "toys" => bail!("--toys must be ≥ 100, got {}", args.toys),
            other => bail!("--method must be asymptotic, exact or toys, got \"{other}\""),
        };
        let constraint = match args.constraint.as_str() {
            "gaussian" => BackgroundConstraint::Gaussian,
            "lognormal" => BackgroundConstraint::LogNormal,
            "poisson" => BackgroundConstraint::Poisson,
            other => bail!("--constraint must be gaussian, lognormal or poisson, got \"{other}\""),
        };
        let variation = match &args.detector_variation {
            Some(spec) => spec.parse::<Variation>().context("--detector-variation")?,
            None => Variation::default(),
        };
        let profile_path = match (&args.detector, search.detector_profile()) {
            (Some(p), _) => p.clone(),
            (None, Some(p)) => p.to_path_buf(),
            (None, None) => bail!(
                "no detector profile: give --detector FILE or set detector_profile in {}",
                args.search.display()
            ),
        };
        let profile = DetectorProfile::from_toml_file(&profile_path)
            .with_context(|| format!("reading detector profile {}", profile_path.display()))?
            .varied(&variation);
        for f in &args.files {
            if !f.is_file() {
                bail!("{}: no such event file", f.display());
            }
        }
        Ok(Config {
            search,
            search_path: args.search.clone(),
            profile,
            profile_path,
            variation,
            limit: LimitOptions {
                cl,
                method,
                constraint,
            },
            invisible: InvisibleSet::extended(args.invisible_ids.iter().copied()),
            combination: if args.separate_processes {
                FileCombination::SeparateProcesses
            } else {
                FileCombination::IndependentRuns
            },
        })
    }
}

/// Runs `recoil recast`.
pub fn run(args: RecastArgs) -> anyhow::Result<()> {
    let cfg = Config::build(&args)?;
    // One pool for the whole command: the workers parse and reconstruct,
    // the event reader has a thread of its own.
    rayon::ThreadPoolBuilder::new()
        .num_threads(args.threads)
        .build_global()
        .context("starting worker threads")?;
    let source = EventSource::open(
        &args.files,
        ReadOptions {
            invisible: cfg.invisible.clone(),
            combination: cfg.combination,
        },
    )
    .with_context(|| format!("opening event files {}", list(&args.files)))?;
    let weight_names = source.info().weight_names.clone();
    let detector = Detector::new(cfg.profile.clone(), cfg.invisible.clone(), args.seed);

    let bar = super::progress::bytes_bar(&args.files, "reading events");
    let progress = |bytes: u64| {
        if let Some(bar) = &bar {
            bar.set_position(bytes);
        }
    };
    let result = run_sample(&cfg.search, source, &detector, Some(&progress));
    if let Some(bar) = &bar {
        bar.finish_and_clear();
    }
    let mut yields = result.map_err(|e| match &e {
        recoil::search::SearchError::Event { file_index, .. } => {
            let name = args
                .files
                .get(*file_index)
                .map_or_else(|| "?".into(), |p| p.display().to_string());
            anyhow::Error::new(e).context(format!("counting events of {name}"))
        }
        _ => anyhow::Error::new(e).context(format!("reading {}", list(&args.files))),
    })?;
    if let Some(x) = args.xsec_pb {
        yields = yields.with_cross_section_pb(x)?;
    }
    let (limits, independent) = rayon::join(
        || search_limits(&cfg.search, &yields, &cfg.limit),
        || model_independent_limits(&cfg.search, &cfg.limit),
    );
    let (limits, independent) = (limits?, independent?);

    let mut out = std::io::stdout().lock();
    print_report(&mut out, &cfg, &yields, &limits, &independent)?;

    if let Some(dir) = &args.out {
        std::fs::create_dir_all(dir)
            .with_context(|| format!("creating output folder {}", dir.display()))?;
        super::output::write_atomically(
            &dir.join("yields.csv"),
            &yields_csv(&cfg, &yields, &limits, &independent)?,
        )?;
        super::output::write_atomically(&dir.join("cutflow.csv"), &cutflow_csv(&yields)?)?;
        super::output::write_atomically(
            &dir.join("distributions.csv"),
            &distributions_csv(&yields)?,
        )?;
        let json = result_json(&args, &cfg, &weight_names, &yields, &limits, &independent)?;
        super::output::write_atomically(&dir.join("result.json"), json.as_bytes())?;
        writeln!(
            out,
            "\nwrote yields.csv, cutflow.csv, distributions.csv, result.json to {}",
            dir.display()
        )?;
    }
    Ok(())
}

fn list(files: &[PathBuf]) -> String {
    files
        .iter()
        .map(|f| f.display().to_string())
        .collect::<Vec<_>>()
        .join(", ")
}

/// Number with 4 significant digits for people; `inf` for infinity.
fn sig(x: f64) -> String {
    if x.is_infinite() {
        return if x > 0.0 { "inf".into() } else { "-inf".into() };
    }
    if x.is_nan() {
        return "nan".into();
    }
    if x == 0.0 {
        return "0".into();
    }
    let mag = x.abs().log10().floor() as i32;
    if !(-3..6).contains(&mag) {
        format!("{x:.3e}")
    } else {
        let decimals = (3 - mag).max(0) as usize;
        format!("{x:.decimals$}")
    }
}

/// Number for machine-readable files: Rust's shortest round-trip form.
fn num(x: f64) -> String {
    format!("{x}")
}

fn opt(x: Option<f64>) -> String {
    x.map(num).unwrap_or_default()
}

/// A table with a header row; the first column and `cut` are left-aligned,
/// the others (numbers) right-aligned.
fn table(out: &mut impl Write, header: &[&str], rows: &[Vec<String>]) -> std::io::Result<()> {
    let mut widths: Vec<usize> = header.iter().map(|h| h.chars().count()).collect();
    for row in rows {
        for (w, cell) in widths.iter_mut().zip(row) {
            *w = (*w).max(cell.chars().count());
        }
    }
    let line = |cells: Vec<&str>| -> String {
        cells
            .iter()
            .zip(&widths)
            .enumerate()
            .map(|(i, (c, w))| {
                let pad = " ".repeat(w - c.chars().count());
                if i == 0 || header[i] == "cut" {
                    format!("{c}{pad}")
                } else {
                    format!("{pad}{c}")
                }
            })
            .collect::<Vec<_>>()
            .join("  ")
    };
    writeln!(out, "{}", line(header.to_vec()))?;
    for row in rows {
        writeln!(out, "{}", line(row.iter().map(String::as_str).collect()))?;
    }
    Ok(())
}

/// Step, cut, raw count, s ± MC stat, cumulative and step efficiency of
/// step `i` of a cut-flow, for the terminal.
fn cutflow_row(flow: &recoil::search::Cutflow, i: usize) -> Vec<String> {
    let st = &flow.steps[i];
    vec![
        i.to_string(),
        st.cut.clone(),
        st.raw_events.to_string(),
        format!("{} ± {}", sig(st.events), sig(st.mc_stat)),
        sig(flow.efficiency_cumulative(i)),
        sig(flow.efficiency_step(i)),
    ]
}

fn method_text(opts: &LimitOptions) -> String {
    let m = match opts.method {
        Method::Exact => "exact Poisson CLs (test statistic: observed count)".to_string(),
        Method::Asymptotic => {
            "asymptotic CLs with the Asimov data set, test statistic q̃_μ (Cowan et al., EPJC 71 (2011) 1554)".to_string()
        }
        Method::Toys { n_toys, seed } => format!(
            "CLs from {n_toys} pseudo-experiments per hypothesis (seed {seed}), test statistic q̃_μ"
        ),
    };
    let c = match opts.constraint {
        BackgroundConstraint::Gaussian => "Gaussian",
        BackgroundConstraint::LogNormal => "log-normal",
        BackgroundConstraint::Poisson => "Poisson auxiliary-measurement (on/off)",
    };
    format!("{m}; {c} background constraint")
}

fn print_report(
    out: &mut impl Write,
    cfg: &Config,
    y: &recoil::search::SampleYields,
    limits: &SearchLimits,
    independent: &[ModelIndependentLimit],
) -> anyhow::Result<()> {
    let s = &cfg.search;
    writeln!(out, "search: {}", s.title())?;
    writeln!(
        out,
        "√s = {} TeV, L = {} fb⁻¹; detector profile: {} ({}); events: {}; σ = {} pb",
        s.sqrt_s_tev(),
        s.lumi_ifb(),
        cfg.profile.name,
        cfg.profile_path.display(),
        y.n_events,
        sig(y.cross_section_pb)
    )?;
    if let Some(p) = s.projection() {
        writeln!(out, "projection: {}", p.describe())?;
    }
    writeln!(
        out,
        "limits at {} % CL: {}",
        limits.options.cl * 100.0,
        method_text(&limits.options)
    )?;
    writeln!(
        out,
        "estimate from parton-level events and a parametrised detector, not an official result\n"
    )?;

    writeln!(out, "cut-flow (preselection)")?;
    let pre = &y.cutflows[0];
    let rows: Vec<Vec<String>> = (0..pre.steps.len()).map(|i| cutflow_row(pre, i)).collect();
    let header = [
        "step",
        "cut",
        "MC events",
        "s ± MC stat [events]",
        "ε cumulative",
        "ε step",
    ];
    table(out, &header, &rows)?;
    writeln!(
        out,
        "\ncut-flow (regions; steps 0 and 1 are all events and the preselection above)"
    )?;
    let rows: Vec<Vec<String>> = y.cutflows[1..]
        .iter()
        .flat_map(|flow| {
            (2..flow.steps.len()).map(move |i| {
                let mut row = vec![flow.name.clone()];
                row.extend(cutflow_row(flow, i));
                row
            })
        })
        .collect();
    let mut region_header = vec!["region"];
    region_header.extend(header);
    table(out, &region_header, &rows)?;
    writeln!(out)?;

    let has_var = y.n_weight_variations > 0;
    let mut header = vec!["region", "excl", "s ± MC stat [events]"];
    if has_var {
        header.push("s variations [events]");
    }
    header.extend([
        "ε",
        "b ± σ_b [events]",
        "n_obs",
        "CLs(μ=1)",
        "μ_up obs",
        "μ_up exp [−1σ, +1σ]",
        "s95 obs/exp [events]",
        "σ_vis,up obs/exp [fb]",
    ]);
    let rows: Vec<Vec<String>> = s
        .regions()
        .iter()
        .zip(&y.regions)
        .zip(limits.regions.iter().zip(independent))
        .map(|((r, ry), (rl, mi))| {
            let mut row = vec![
                r.name().to_string(),
                if r.exclusive() { "yes" } else { "no" }.to_string(),
                format!("{} ± {}", sig(ry.events), sig(ry.mc_stat)),
            ];
            if has_var {
                row.push(format!(
                    "[{}, {}]",
                    ry.variation_low.map_or_else(String::new, sig),
                    ry.variation_high.map_or_else(String::new, sig)
                ));
            }
            let e = &rl.limit.mu_up_expected;
            row.extend([
                sig(ry.efficiency),
                format!("{} ± {}", sig(r.background()), sig(r.background_unc())),
                r.observed().to_string(),
                sig(rl.limit.cls_mu1),
                sig(rl.limit.mu_up_observed),
                format!("{} [{}, {}]", sig(e[2]), sig(e[1]), sig(e[3])),
                format!("{} / {}", sig(mi.s95_obs), sig(mi.s95_exp)),
                format!(
                    "{} / {}",
                    sig(mi.sigma_vis_obs_fb),
                    sig(mi.sigma_vis_exp_fb)
                ),
            ]);
            row
        })
        .collect();
    table(out, &header, &rows)?;
    writeln!(out)?;
    match limits.best() {
        Some(b) => writeln!(
            out,
            "most sensitive region (smallest median expected μ_up): {}: μ_up obs = {}, exp = {}, CLs(μ=1) = {} → {}",
            b.region,
            sig(b.limit.mu_up_observed),
            sig(b.limit.mu_up_expected[2]),
            sig(b.limit.cls_mu1),
            if b.limit.mu_up_observed < 1.0 {
                "excluded"
            } else {
                "not excluded"
            }
        )?,
        None => writeln!(out, "no region has signal: nothing to exclude")?,
    }
    if let Some(c) = &limits.combined {
        writeln!(
            out,
            "exclusive regions combined ({}): μ_up obs = {}, exp = {} [{}, {}], CLs(μ=1) = {}",
            if s.background_covariance().is_some() {
                "with the background covariance"
            } else {
                "backgrounds uncorrelated"
            },
            sig(c.mu_up_observed),
            sig(c.mu_up_expected[2]),
            sig(c.mu_up_expected[1]),
            sig(c.mu_up_expected[3]),
            sig(c.cls_mu1)
        )?;
    }
    // Each distinct warning once, with the regions it concerns.
    let mut warnings: Vec<(&str, Vec<&str>)> = Vec::new();
    let named = limits
        .regions
        .iter()
        .map(|r| (r.region.as_str(), &r.limit))
        .chain(limits.combined.iter().map(|c| ("combined", c)));
    for (region, limit) in named {
        for w in &limit.warnings {
            match warnings.iter_mut().find(|(text, _)| text == w) {
                Some((_, regions)) => regions.push(region),
                None => warnings.push((w, vec![region])),
            }
        }
    }
    for (text, regions) in warnings {
        writeln!(out, "warning ({}): {text}", regions.join(", "))?;
    }
    for (r, mi) in s.regions().iter().zip(independent) {
        if let Some(p) = r.published() {
            writeln!(
                out,
                "{}: published s95 obs/exp = {}/{} (ours {}/{}); σ_vis obs/exp = {}/{} fb (ours {}/{})",
                r.name(),
                p.s95_obs.map_or_else(|| "–".into(), sig),
                p.s95_exp.map_or_else(|| "–".into(), sig),
                sig(mi.s95_obs),
                sig(mi.s95_exp),
                p.sigma_vis_obs_fb.map_or_else(|| "–".into(), sig),
                p.sigma_vis_exp_fb.map_or_else(|| "–".into(), sig),
                sig(mi.sigma_vis_obs_fb),
                sig(mi.sigma_vis_exp_fb),
            )?;
        }
    }
    Ok(())
}

fn csv_bytes(header: &[&str], rows: Vec<Vec<String>>) -> anyhow::Result<Vec<u8>> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(header)?;
    for r in rows {
        w.write_record(&r)?;
    }
    w.into_inner().context("assembling CSV")
}

fn yields_csv(
    cfg: &Config,
    y: &recoil::search::SampleYields,
    limits: &SearchLimits,
    independent: &[ModelIndependentLimit],
) -> anyhow::Result<Vec<u8>> {
    let rows = cfg
        .search
        .regions()
        .iter()
        .enumerate()
        .zip(&y.regions)
        .zip(limits.regions.iter().zip(independent))
        .map(|(((i, r), ry), (rl, mi))| {
            let (lo, hi) = cfg.search.met_edges_gev(i);
            let l = &rl.limit;
            vec![
                r.name().to_string(),
                (!r.exclusive()).to_string(),
                opt(lo),
                opt(hi),
                num(ry.events),
                num(ry.mc_stat),
                opt(ry.variation_low),
                opt(ry.variation_high),
                num(ry.efficiency),
                num(r.background()),
                num(r.background_unc()),
                r.observed().to_string(),
                num(l.cls_mu1),
                num(l.mu_up_observed),
                num(l.mu_up_expected[2]),
                num(l.mu_up_expected[1]),
                num(l.mu_up_expected[3]),
                num(mi.s95_obs),
                num(mi.s95_exp),
                num(mi.sigma_vis_obs_fb),
                num(mi.sigma_vis_exp_fb),
            ]
        })
        .collect();
    csv_bytes(&formats::YIELDS_COLUMNS, rows)
}

fn cutflow_csv(y: &recoil::search::SampleYields) -> anyhow::Result<Vec<u8>> {
    let mut rows = Vec::new();
    for flow in &y.cutflows {
        for (i, st) in flow.steps.iter().enumerate() {
            rows.push(vec![
                flow.name.clone(),
                i.to_string(),
                st.cut.clone(),
                st.raw_events.to_string(),
                num(st.events),
                num(flow.efficiency_cumulative(i)),
                num(flow.efficiency_step(i)),
            ]);
        }
    }
    csv_bytes(&formats::CUTFLOW_COLUMNS, rows)
}

fn distributions_csv(y: &recoil::search::SampleYields) -> anyhow::Result<Vec<u8>> {
    let mut rows = Vec::new();
    for d in &y.distributions {
        for b in &d.bins {
            rows.push(vec![
                d.observable.clone(),
                d.level.clone(),
                num(b.low_gev),
                num(b.high_gev.unwrap_or(f64::INFINITY)),
                num(b.events),
                num(b.mc_stat),
            ]);
        }
    }
    csv_bytes(&formats::DISTRIBUTIONS_COLUMNS, rows)
}

/// SHA-256 of a file's content, as lowercase hex.
fn sha256_file(path: &Path) -> anyhow::Result<String> {
    use sha2::Digest;
    let mut f = std::fs::File::open(path).with_context(|| format!("hashing {}", path.display()))?;
    let mut hasher = sha2::Sha256::new();
    let mut buf = vec![0u8; 1 << 20];
    loop {
        let n = f
            .read(&mut buf)
            .with_context(|| format!("hashing {}", path.display()))?;
        if n == 0 {
            break;
        }
        hasher.update(&buf[..n]);
    }
    Ok(hasher
        .finalize()
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect())
}

fn result_json(
    args: &RecastArgs,
    cfg: &Config,
    weight_names: &[String],
    y: &recoil::search::SampleYields,
    limits: &SearchLimits,
    independent: &[ModelIndependentLimit],
) -> anyhow::Result<String> {
    let files = args
        .files
        .iter()
        .map(|f| {
            Ok(serde_json::json!({ "path": f.display().to_string(), "sha256": sha256_file(f)? }))
        })
        .collect::<anyhow::Result<Vec<_>>>()?;
    let regions: Vec<serde_json::Value> = cfg
        .search
        .regions()
        .iter()
        .zip(&y.regions)
        .zip(limits.regions.iter().zip(independent))
        .map(|((r, ry), (rl, mi))| {
            serde_json::json!({
                "region": r.name(),
                "exclusive": r.exclusive(),
                "yield": ry,
                "counts": rl.counts,
                "limit": rl.limit,
                "model_independent": mi,
                "published": r.published(),
            })
        })
        .collect();
    let value = serde_json::json!({
        "provenance": {
            "tool": "recoil",
            "version": env!("CARGO_PKG_VERSION"),
            "note": "estimate from parton-level events and a parametrised detector; not an official result; non-finite numbers are written as null",
            "event_files": files,
            "search": {
                "path": cfg.search_path.display().to_string(),
                "sha256": sha256_file(&cfg.search_path)?,
                "title": cfg.search.title(),
                "reference": cfg.search.reference(),
            },
            "detector_profile": {
                "path": cfg.profile_path.display().to_string(),
                "sha256": sha256_file(&cfg.profile_path)?,
                "name": cfg.profile.name,
                "variation": cfg.variation,
            },
            "seed": args.seed,
            "options": {
                "xsec_pb": args.xsec_pb,
                "lumi_ifb": cfg.search.lumi_ifb(),
                "projection": cfg.search.projection().map(|p| serde_json::json!({
                    "from_lumi_ifb": p.from_lumi_ifb,
                    "to_lumi_ifb": p.to_lumi_ifb,
                    "scaling": p.scaling,
                    "description": p.describe(),
                })),
                "invisible_pdg_ids": cfg.invisible.ids(),
                "file_combination": cfg.combination,
            },
        },
        "sample": {
            "n_events": y.n_events,
            "cross_section_pb": y.cross_section_pb,
            "weight_names": weight_names,
        },
        "cl": limits.options.cl,
        "method": limits.options.method,
        "constraint": limits.options.constraint,
        "statistic": method_text(&limits.options),
        "regions": regions,
        "best_region": limits.best().map(|b| b.region.clone()),
        "combined_exclusive": limits.combined,
        "combined_uses_covariance": cfg.search.background_covariance().is_some(),
    });
    Ok(serde_json::to_string_pretty(&value)? + "\n")
}

#[cfg(test)]
mod tests {
    use super::*;
    use recoil::detector::Reco;
    use recoil::search::{EventOrigin, SampleYields, TruthInfo, YieldAccumulator};
    use recoil::stats::Limit;

    const DEMO: &str = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/recasts/searches/demo-jet-met.toml"
    );

    /// Yields and placeholder limits: these tests check the layout of the
    /// output files (formats.md), not numbers.
    fn fixture() -> (
        Config,
        SampleYields,
        SearchLimits,
        Vec<ModelIndependentLimit>,
    ) {
        let search = Search::from_toml_file(Path::new(DEMO)).unwrap();
        let mut acc = YieldAccumulator::new(&search, 0);
        for (i, met) in [250.0, 450.0, 1500.0].into_iter().enumerate() {
            let reco = Reco {
                jets: vec![recoil::detector::Jet {
                    p4: recoil::kinematics::P4::from_pt_eta_phi_m(met, 0.0, 0.0, 0.0),
                    b_tagged: false,
                }],
                met_xy_gev: [-met, 0.0],
                met_gev: met,
                weight: 1.0,
                ..Reco::default()
            };
            let truth = TruthInfo {
                met_gev: met,
                leading_parton_pt_gev: Some(met),
            };
            let origin = EventOrigin {
                file_index: 0,
                event_index: i as u64,
                process_id: 1,
            };
            acc.add(&reco, &truth, origin).unwrap();
        }
        let y = acc.finish_with(|_, _| 1e-3, 3, 300.0).unwrap();
        let opts = LimitOptions {
            cl: 0.95,
            method: Method::Asymptotic,
            constraint: BackgroundConstraint::Gaussian,
        };
        let limit = Limit {
            cl: 0.95,
            method: Method::Asymptotic,
            cls_mu1: 0.5,
            cls_mu1_mc_unc: None,
            mu_up_observed: f64::INFINITY,
            mu_up_expected: [1.0, 2.0, 3.0, 4.0, 5.0],
            warnings: vec!["placeholder".into()],
        };
        let counts = search.region_counts(&y).unwrap();
        let limits = SearchLimits {
            options: opts,
            regions: search
                .regions()
                .iter()
                .zip(counts)
                .map(|(r, c)| recoil::search::RegionLimit {
                    region: r.name().to_string(),
                    counts: c,
                    limit: limit.clone(),
                })
                .collect(),
            best_region: Some(3),
            combined: Some(limit),
        };
        let mi = vec![
            ModelIndependentLimit {
                s95_obs: 10.0,
                s95_exp: 12.0,
                sigma_vis_obs_fb: 10.0 / 300.0,
                sigma_vis_exp_fb: 12.0 / 300.0,
            };
            search.regions().len()
        ];
        let cfg = Config {
            search,
            search_path: PathBuf::from(DEMO),
            profile: DetectorProfile::truth(),
            profile_path: PathBuf::from("truth.toml"),
            variation: Variation::default(),
            limit: opts,
            invisible: InvisibleSet::standard(),
            combination: FileCombination::IndependentRuns,
        };
        (cfg, y, limits, mi)
    }

    fn parse(bytes: &[u8]) -> (Vec<String>, Vec<Vec<String>>) {
        let mut r = csv::Reader::from_reader(bytes);
        let header = r.headers().unwrap().iter().map(String::from).collect();
        let rows = r
            .records()
            .map(|rec| rec.unwrap().iter().map(String::from).collect())
            .collect();
        (header, rows)
    }

    #[test]
    fn output_files_follow_the_shared_formats() {
        let (cfg, y, limits, mi) = fixture();
        // Column lists copied from the shared formats contract.
        let (h, rows) = parse(&yields_csv(&cfg, &y, &limits, &mi).unwrap());
        assert_eq!(
            h.join(","),
            "region,inclusive,met_low_gev,met_high_gev,signal_events,signal_mc_stat,\
             signal_var_low,signal_var_high,efficiency,background,background_unc,observed,\
             cls_mu1,mu_up_obs,mu_up_exp,mu_up_exp_m1,mu_up_exp_p1,s95_obs,s95_exp,\
             sigma_vis_up_obs_fb,sigma_vis_up_exp_fb"
        );
        assert_eq!(rows.len(), 16);
        // E200_250: exclusive, edges 200 and 250; E1200_inf open above;
        // one event of weight 1 × 1e-3 pb × 300 fb⁻¹ = 300 events.
        assert_eq!(&rows[0][..4], ["E200_250", "false", "200", "250"]);
        assert_eq!(&rows[10][..4], ["E1200_inf", "false", "1200", ""]);
        assert_eq!(rows[11][1], "true");
        assert_eq!(rows[10][4], "300");
        assert_eq!(rows[0][6], "");
        assert_eq!(rows[0][13], "inf");

        let (h, rows) = parse(&cutflow_csv(&y).unwrap());
        assert_eq!(
            h.join(","),
            "region,step,cut,raw_events,weighted_events,efficiency_cumulative,efficiency_step"
        );
        assert_eq!(rows[0][..3], ["preselection", "0", "all events"]);
        assert_eq!(rows[1][2], "met > 200");
        // 10 preselection rows + 16 regions × 3 steps.
        assert_eq!(rows.len(), 10 + 16 * 3);

        let (h, rows) = parse(&distributions_csv(&y).unwrap());
        assert_eq!(
            h.join(","),
            "observable,level,bin_low_gev,bin_high_gev,events,mc_stat"
        );
        assert_eq!(rows.len(), 4 * 41);
        assert_eq!(rows[40][3], "inf");
        assert_eq!(rows[0][..2], ["met", "truth"]);
    }

    #[test]
    fn report_states_method_and_best_region() {
        let (cfg, y, limits, mi) = fixture();
        let mut out = Vec::new();
        print_report(&mut out, &cfg, &y, &limits, &mi).unwrap();
        let text = String::from_utf8(out).unwrap();
        assert!(text.contains("limits at 95 % CL: asymptotic CLs"), "{text}");
        assert!(text.contains("most sensitive region"), "{text}");
        assert!(text.contains("E400_500"), "{text}");
        assert!(text.contains("σ_vis,up obs/exp [fb]"), "{text}");
        // A warning shared by every region is printed once.
        assert_eq!(text.matches("placeholder").count(), 1, "{text}");
        assert!(text.contains("not an official result"), "{text}");
    }

    #[test]
    fn atomic_write_leaves_no_temporary_file() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("x.csv");
        crate::cli::output::write_atomically(&target, b"a,b\n").unwrap();
        crate::cli::output::write_atomically(&target, b"c,d\n").unwrap();
        assert_eq!(std::fs::read(&target).unwrap(), b"c,d\n");
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
    }
}
