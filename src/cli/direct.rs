//! `recoil direct spectrum|counts|curve`: direct-detection recoil spectra,
//! expected signal counts and limit curves σ_lim(m_χ) for an experiment.

use std::path::{Path, PathBuf};

use anyhow::Context;

use recoil::direct::{
    CurvePoint, Experiment, ExperimentConfig, FormFactorChoice, HaloConfig, Interaction, LimitKind,
    PoissonMethod, RecoilSpectrum, Resolution, Target, interpolate_curve, limit_curve_points_both,
    log_mass_grid, median_expected_count, read_curve_csv, signal_upper_limit,
};

/// Direct detection: recoil spectrum, expected counts, limit curve.
/// Energies are nuclear-recoil energies in keV; rates per kg per day per keV.
#[derive(Debug, clap::Args)]
pub struct DirectArgs {
    #[command(subcommand)]
    mode: DirectMode,
}

#[derive(Debug, clap::Subcommand)]
enum DirectMode {
    /// dR/dE_R on an energy grid for one WIMP mass and cross-section.
    Spectrum(Box<SpectrumArgs>),
    /// Expected signal counts of an experiment for WIMP masses and a cross-section.
    Counts(Box<CountsArgs>),
    /// Limit curve σ_lim(m_χ) of an experiment on a log mass grid.
    Curve(Box<CurveArgs>),
}

/// Halo overrides shared by all modes (default: the experiment's halo, or
/// the standard halo ρ_0 = 0.3 GeV/cm³, v_0 = 238, v_esc = 544 km/s).
#[derive(Debug, clap::Args)]
struct HaloArgs {
    /// Local dark-matter density ρ_0 [GeV/cm³].
    #[arg(long, value_name = "GEV_CM3")]
    rho_gev_cm3: Option<f64>,
    /// Most probable speed v_0 [km/s] (the Earth speed then follows it unless given).
    #[arg(long, value_name = "KM_S")]
    v0_km_s: Option<f64>,
    /// Escape speed v_esc [km/s].
    #[arg(long, value_name = "KM_S")]
    vesc_km_s: Option<f64>,
    /// Earth speed v_E in the galactic frame [km/s].
    #[arg(long, value_name = "KM_S", conflicts_with = "date")]
    vearth_km_s: Option<f64>,
    /// Date YYYY-MM-DD for the Earth speed (annual modulation).
    #[arg(long, value_name = "YYYY-MM-DD")]
    date: Option<String>,
}

impl HaloArgs {
    fn config(&self) -> HaloConfig {
        HaloConfig {
            rho_gev_cm3: self.rho_gev_cm3,
            v0_km_s: self.v0_km_s,
            vesc_km_s: self.vesc_km_s,
            vearth_km_s: self.vearth_km_s,
            date: self.date.clone(),
        }
    }
}

/// Arguments of `recoil direct spectrum`.
#[derive(Debug, clap::Args)]
struct SpectrumArgs {
    /// Experiment TOML (its target, halo and resolution); or give --target.
    #[arg(long, required_unless_present = "target", conflicts_with = "target")]
    experiment: Option<PathBuf>,
    /// Target name (xenon, germanium, argon, silicon, nai, cawo4, c3f8, fluorine).
    #[arg(long)]
    target: Option<String>,
    /// WIMP mass m_χ [GeV].
    #[arg(long, value_name = "GEV")]
    mass_gev: f64,
    /// DM–nucleon cross-section σ [cm²] (σ_n for SI and SD-n, σ_p for SD-p).
    #[arg(long, value_name = "CM2", default_value = "1e-45")]
    sigma_cm2: f64,
    /// Interaction: SI, SD-p or SD-n.
    #[arg(long, default_value = "SI", value_parser = parse_interaction)]
    interaction: Interaction,
    /// Lowest recoil energy [keV].
    #[arg(long, value_name = "KEV", default_value_t = 0.0)]
    e_min_kev: f64,
    /// Highest recoil energy [keV] (default: the experiment's upper edge, else 100).
    #[arg(long, value_name = "KEV")]
    e_max_kev: Option<f64>,
    /// Number of energies (linear grid).
    #[arg(long, default_value_t = 101)]
    points: usize,
    #[command(flatten)]
    halo: HaloArgs,
    /// Write the spectrum as CSV to this file.
    #[arg(long)]
    out: Option<PathBuf>,
}

/// The experiment: a TOML file, or its parameters as flags.
#[derive(Debug, clap::Args)]
struct ExperimentArgs {
    /// Experiment TOML file; or describe it with --target, --exposure-kg-day,
    /// --threshold-kev, --upper-kev and the optional flags below.
    #[arg(long, conflicts_with_all = [
        "target", "exposure_kg_day", "threshold_kev", "upper_kev", "efficiency",
        "efficiency_csv", "sigma0_kev", "sigma_sqrt_kev", "background_events", "observed_events",
    ])]
    experiment: Option<PathBuf>,
    /// Target name (xenon, germanium, argon, silicon, nai, cawo4, c3f8, fluorine).
    #[arg(long, required_unless_present = "experiment")]
    target: Option<String>,
    /// Exposure [kg·day].
    #[arg(long, value_name = "KG_DAY", required_unless_present = "experiment")]
    exposure_kg_day: Option<f64>,
    /// Lower edge of the nuclear-recoil energy window [keV].
    #[arg(long, value_name = "KEV", required_unless_present = "experiment")]
    threshold_kev: Option<f64>,
    /// Upper edge of the nuclear-recoil energy window [keV].
    #[arg(long, value_name = "KEV", required_unless_present = "experiment")]
    upper_kev: Option<f64>,
    /// Constant efficiency, a fraction in [0, 1] (default 1).
    #[arg(long, conflicts_with = "efficiency_csv")]
    efficiency: Option<f64>,
    /// Efficiency curve CSV (columns e_kev, efficiency).
    #[arg(long)]
    efficiency_csv: Option<PathBuf>,
    /// Resolution constant term σ₀ [keV]: σ(E) = √(σ₀² + s²·E).
    #[arg(long, value_name = "KEV")]
    sigma0_kev: Option<f64>,
    /// Resolution stochastic term s [√keV] (needs --sigma0-kev).
    #[arg(long, value_name = "SQRT_KEV", requires = "sigma0_kev")]
    sigma_sqrt_kev: Option<f64>,
    /// Expected background events in the window (default 0).
    #[arg(long, value_name = "EVENTS")]
    background_events: Option<f64>,
    /// Observed events in the window (default 0).
    #[arg(long, value_name = "EVENTS")]
    observed_events: Option<u64>,
}

impl ExperimentArgs {
    /// The experiment configuration given by flags (used when no file is given).
    fn flags_config(&self) -> ExperimentConfig {
        ExperimentConfig {
            name: "command-line".into(),
            description: "experiment given by command-line flags".into(),
            target: self.target.clone().unwrap_or_default(),
            exposure_kg_day: self.exposure_kg_day,
            exposure_tonne_year: None,
            threshold_kev: self.threshold_kev.unwrap_or(f64::NAN),
            upper_kev: self.upper_kev.unwrap_or(f64::NAN),
            efficiency: match (&self.efficiency, &self.efficiency_csv) {
                (None, None) => Some(1.0),
                (e, _) => *e,
            },
            efficiency_csv: self.efficiency_csv.clone(),
            resolution: self.sigma0_kev.map(|sigma0_kev| Resolution {
                sigma0_kev,
                sigma_sqrt_kev: self.sigma_sqrt_kev.unwrap_or(0.0),
            }),
            background_events: self.background_events.unwrap_or(0.0),
            observed_events: self.observed_events.unwrap_or(0),
            cl: None,
            poisson_method: None,
            halo: HaloConfig::default(),
        }
    }
}

/// Arguments of `recoil direct counts`.
#[derive(Debug, clap::Args)]
struct CountsArgs {
    #[command(flatten)]
    source: ExperimentArgs,
    /// WIMP masses m_χ [GeV] (repeat or comma-separate).
    #[arg(long, value_name = "GEV", required = true, value_delimiter = ',')]
    mass_gev: Vec<f64>,
    /// DM–nucleon cross-section σ [cm²].
    #[arg(long, value_name = "CM2", default_value = "1e-45")]
    sigma_cm2: f64,
    /// Interaction: SI, SD-p or SD-n.
    #[arg(long, default_value = "SI", value_parser = parse_interaction)]
    interaction: Interaction,
    #[command(flatten)]
    halo: HaloArgs,
    /// Write the counts as CSV to this file.
    #[arg(long)]
    out: Option<PathBuf>,
}

/// Arguments of `recoil direct curve`.
#[derive(Debug, clap::Args)]
struct CurveArgs {
    #[command(flatten)]
    source: ExperimentArgs,
    /// Interaction: SI, SD-p or SD-n.
    #[arg(long, default_value = "SI", value_parser = parse_interaction)]
    interaction: Interaction,
    /// Lowest mass of the grid [GeV].
    #[arg(long, value_name = "GEV", default_value_t = 1.0)]
    mass_min_gev: f64,
    /// Highest mass of the grid [GeV].
    #[arg(long, value_name = "GEV", default_value_t = 1.0e4)]
    mass_max_gev: f64,
    /// Number of masses (log grid).
    #[arg(long, default_value_t = 200)]
    points: usize,
    /// Confidence level (default: the experiment's, else 0.9).
    #[arg(long)]
    cl: Option<f64>,
    /// Poisson limit: classical (default) or cls.
    #[arg(long, value_parser = parse_method)]
    method: Option<PoissonMethod>,
    /// Which limit goes into the sigma_cm2 column: observed or expected (median).
    #[arg(long, default_value = "observed", value_parser = parse_kind)]
    limit: LimitKind,
    /// External curve CSV (columns m_dm_gev, sigma_cm2) interpolated onto the grid for comparison.
    #[arg(long)]
    compare: Option<PathBuf>,
    #[command(flatten)]
    halo: HaloArgs,
    /// Write the curve as CSV to this file.
    #[arg(long)]
    out: Option<PathBuf>,
}

fn parse_interaction(s: &str) -> Result<Interaction, String> {
    s.parse()
        .map_err(|e: recoil::direct::DirectError| e.to_string())
}

fn parse_method(s: &str) -> Result<PoissonMethod, String> {
    s.parse()
        .map_err(|e: recoil::direct::DirectError| e.to_string())
}

fn parse_kind(s: &str) -> Result<LimitKind, String> {
    match s {
        "observed" => Ok(LimitKind::Observed),
        "expected" => Ok(LimitKind::MedianExpected),
        _ => Err(format!("expected observed or expected, got {s:?}")),
    }
}

/// Runs `recoil direct`.
pub fn run(args: DirectArgs) -> anyhow::Result<()> {
    match args.mode {
        DirectMode::Spectrum(a) => spectrum(*a),
        DirectMode::Counts(a) => counts(*a),
        DirectMode::Curve(a) => curve(*a),
    }
}

/// Builds the experiment from flags or loads it from its file, then applies
/// halo overrides.
fn experiment_from(source: &ExperimentArgs, halo: &HaloArgs) -> anyhow::Result<Experiment> {
    let exp = match &source.experiment {
        Some(path) => load_experiment(path)?,
        None => Experiment::from_config(source.flags_config(), Path::new("."), "command line")?,
    };
    with_halo_overrides(exp, halo)
}

/// Loads an experiment file.
fn load_experiment(path: &Path) -> anyhow::Result<Experiment> {
    Experiment::from_toml_file(path).context("loading the experiment")
}

/// Applies halo overrides from the command line.
fn with_halo_overrides(exp: Experiment, halo: &HaloArgs) -> anyhow::Result<Experiment> {
    let config = halo.config();
    if config.is_empty() {
        return Ok(exp);
    }
    let h = config
        .apply_to(exp.halo())
        .context("halo options on the command line")?;
    Ok(exp.with_halo(h))
}

fn spectrum(args: SpectrumArgs) -> anyhow::Result<()> {
    anyhow::ensure!(
        args.points >= 2,
        "--points must be at least 2, got {}",
        args.points
    );
    let experiment = match &args.experiment {
        Some(path) => Some(with_halo_overrides(load_experiment(path)?, &args.halo)?),
        None => None,
    };
    let (target, halo) = match &experiment {
        Some(e) => (e.target().clone(), *e.halo()),
        None => {
            // clap requires --target when --experiment is absent.
            let name = args.target.as_deref().unwrap_or_default();
            (Target::by_name(name)?, args.halo.config().build()?)
        }
    };
    let e_max = args
        .e_max_kev
        .unwrap_or_else(|| experiment.as_ref().map_or(100.0, |e| e.window_kev().1));
    anyhow::ensure!(
        args.e_min_kev.is_finite() && args.e_min_kev >= 0.0 && e_max > args.e_min_kev,
        "need 0 <= --e-min-kev < --e-max-kev, got {} keV and {e_max} keV",
        args.e_min_kev
    );
    let s = RecoilSpectrum::new(
        &halo,
        &target,
        args.mass_gev,
        args.sigma_cm2,
        args.interaction,
        FormFactorChoice::Standard,
    )?;
    let step = (e_max - args.e_min_kev) / (args.points - 1) as f64;
    let rows: Vec<(f64, f64, f64)> = (0..args.points)
        .map(|k| {
            let e = args.e_min_kev + step * k as f64;
            let smeared = experiment
                .as_ref()
                .map_or_else(|| s.rate(e), |x| x.observed_rate(&s, e));
            (e, s.rate(e), smeared)
        })
        .collect();
    println!(
        "Recoil spectrum: {} ({}), m_χ = {} GeV, σ = {:e} cm² ({}), ρ_0 = {} GeV/cm³, v_0 = {} km/s, v_esc = {} km/s, v_E = {:.2} km/s",
        target.name,
        target.description,
        args.mass_gev,
        args.sigma_cm2,
        args.interaction,
        halo.rho_gev_cm3(),
        halo.v0_km_s(),
        halo.vesc_km_s(),
        halo.vearth_km_s()
    );
    println!(
        "{:>10}  {:>26}  {:>26}",
        "E_R [keV]", "dR/dE [1/(kg day keV)]", "smeared [1/(kg day keV)]"
    );
    let shown = sample_indices(rows.len(), 21);
    for &i in &shown {
        let (e, r, o) = rows[i];
        println!("{e:>10.3}  {r:>26.4e}  {o:>26.4e}");
    }
    if shown.len() < rows.len() {
        println!(
            "({} of {} rows shown; --out for all)",
            shown.len(),
            rows.len()
        );
    }
    if let Some(out) = &args.out {
        let mut text = String::from("e_kev,dr_de_per_kg_day_kev,dr_de_observed_per_kg_day_kev\n");
        for (e, r, o) in rows {
            text.push_str(&format!("{e},{r},{o}\n"));
        }
        super::output::write_atomically(out, &text)?;
    }
    Ok(())
}

fn counts(args: CountsArgs) -> anyhow::Result<()> {
    if let Some(m) = args.mass_gev.iter().find(|m| !(m.is_finite() && **m > 0.0)) {
        anyhow::bail!("--mass-gev must be finite and > 0, got {m} GeV");
    }
    anyhow::ensure!(
        args.sigma_cm2.is_finite() && args.sigma_cm2 >= 0.0,
        "--sigma-cm2 must be finite and >= 0, got {} cm²",
        args.sigma_cm2
    );
    let exp = experiment_from(&args.source, &args.halo)?;
    print_experiment(&exp);
    println!(
        "σ = {:e} cm² ({}); background {} events, observed {}",
        args.sigma_cm2,
        args.interaction,
        exp.background_events(),
        exp.observed_events()
    );
    println!("{:>14}  {:>18}", "m_χ [GeV]", "signal [events]");
    let mut text = String::from(
        "m_dm_gev,sigma_cm2,interaction,expected_counts,background_events,observed_events\n",
    );
    for &m in &args.mass_gev {
        let n = exp.expected_counts(m, args.sigma_cm2, args.interaction)?;
        println!("{m:>14}  {n:>18.6e}");
        text.push_str(&format!(
            "{m},{:e},{},{n},{},{}\n",
            args.sigma_cm2,
            args.interaction,
            exp.background_events(),
            exp.observed_events()
        ));
    }
    if let Some(out) = &args.out {
        super::output::write_atomically(out, &text)?;
    }
    Ok(())
}

fn curve(args: CurveArgs) -> anyhow::Result<()> {
    let masses = log_mass_grid(args.mass_min_gev, args.mass_max_gev, args.points)?;
    let exp = experiment_from(&args.source, &args.halo)?;
    let exp = exp.clone().with_limit_settings(
        args.cl.unwrap_or(exp.cl()),
        args.method.unwrap_or(exp.method()),
    )?;
    let compare = match &args.compare {
        Some(path) => Some(read_curve_csv(path).context("reading the comparison curve")?),
        None => None,
    };
    let (observed, expected) = limit_curve_points_both(&exp, &masses, args.interaction)?;
    let b = exp.background_events();
    let n_med = median_expected_count(b);
    let s_obs = signal_upper_limit(&exp, LimitKind::Observed)?;
    let s_exp = signal_upper_limit(&exp, LimitKind::MedianExpected)?;
    print_experiment(&exp);
    println!(
        "Limit: {} % CL, {} Poisson limit, {}; background {b} events; observed {} → s_up = {s_obs:.4} events; median expected count {n_med} → s_up = {s_exp:.4} events",
        exp.cl() * 100.0,
        exp.method().label(),
        args.interaction,
        exp.observed_events()
    );
    if s_obs == 0.0 {
        println!(
            "warning: the classical limit is zero (far fewer events observed than expected from background); consider --method cls"
        );
    }
    let chosen = |i: usize| match args.limit {
        LimitKind::Observed => observed[i],
        LimitKind::MedianExpected => expected[i],
    };
    println!(
        "{:>12}  {:>16}  {:>16}  {:>16}",
        "m_χ [GeV]", "σ_obs [cm²]", "σ_exp [cm²]", "signal/σ [1/cm²]"
    );
    for i in sample_indices(masses.len(), 15) {
        println!(
            "{:>12.4}  {:>16.3e}  {:>16.3e}  {:>16.3e}",
            masses[i], observed[i].sigma_cm2, expected[i].sigma_cm2, observed[i].events_per_cm2
        );
    }
    if let Some(best) = (0..masses.len())
        .map(chosen)
        .filter(|p| p.sigma_cm2.is_finite())
        .min_by(|a, b| a.sigma_cm2.total_cmp(&b.sigma_cm2))
    {
        println!(
            "strongest {} limit: σ = {:.3e} cm² at m_χ = {:.4} GeV",
            args.limit.label(),
            best.sigma_cm2,
            best.m_dm_gev
        );
    }
    if let Some(out) = &args.out {
        let mut text = String::from(
            "m_dm_gev,sigma_cm2,expected_counts_at_sigma,sigma_observed_cm2,sigma_expected_cm2,events_per_cm2,interaction,cl,method,limit",
        );
        if compare.is_some() {
            text.push_str(",sigma_compare_cm2");
        }
        text.push('\n');
        for i in 0..masses.len() {
            let p: CurvePoint = chosen(i);
            text.push_str(&format!(
                "{},{:e},{},{:e},{:e},{:e},{},{},{},{}",
                p.m_dm_gev,
                p.sigma_cm2,
                p.expected_counts_at_sigma,
                observed[i].sigma_cm2,
                expected[i].sigma_cm2,
                p.events_per_cm2,
                args.interaction,
                exp.cl(),
                exp.method().label(),
                args.limit.label()
            ));
            if let Some(c) = &compare {
                text.push(',');
                if let Some(s) = interpolate_curve(c, p.m_dm_gev) {
                    text.push_str(&format!("{s:e}"));
                }
            }
            text.push('\n');
        }
        super::output::write_atomically(out, &text)?;
    }
    Ok(())
}

/// Prints the experiment's description lines.
fn print_experiment(exp: &Experiment) {
    let (lo, hi) = exp.window_kev();
    println!("Experiment: {} — {}", exp.name(), exp.description());
    println!(
        "  target {} ({}), exposure {} kg·day, window {lo}–{hi} keV (nuclear recoil), resolution {}",
        exp.target().name,
        exp.target().description,
        exp.exposure_kg_day(),
        exp.resolution().map_or("none".to_string(), |r| format!(
            "σ(E) = √({}² + {}²·E) keV",
            r.sigma0_kev, r.sigma_sqrt_kev
        ))
    );
    let h = exp.halo();
    println!(
        "  halo ρ_0 = {} GeV/cm³, v_0 = {} km/s, v_esc = {} km/s, v_E = {:.2} km/s",
        h.rho_gev_cm3(),
        h.v0_km_s(),
        h.vesc_km_s(),
        h.vearth_km_s()
    );
}

/// Up to `max` indices spread evenly over 0..n, first and last included.
fn sample_indices(n: usize, max: usize) -> Vec<usize> {
    if n <= max {
        return (0..n).collect();
    }
    let mut v: Vec<usize> = (0..max).map(|k| k * (n - 1) / (max - 1)).collect();
    v.dedup();
    v
}
