//! An experiment: target, exposure, nuclear-recoil energy window,
//! detection efficiency (constant or a CSV curve), optional Gaussian energy
//! resolution, expected background and observed counts, the halo and the
//! limit settings; read from TOML and validated. Computes expected signal
//! counts and the smeared (observed-energy) spectrum.
//!
//! Fed by [`crate::direct::rate`]; used by [`crate::direct::reach`] and
//! `recoil direct`.
//!
//! # TOML form
//! ```toml
//! name = "example"
//! description = "Invented scenario"
//! target = "germanium"          # see Target::known_names()
//! exposure_kg_day = 3000.0      # or exposure_tonne_year = 8.2
//! threshold_kev = 5.0           # nuclear-recoil energy window \[keV\]
//! upper_kev = 100.0
//! efficiency = 0.8              # or efficiency_csv = "eff.csv" (columns e_kev, efficiency)
//! background_events = 0.5       # expected background in the window
//! observed_events = 1
//! cl = 0.9                      # optional, default 0.9
//! poisson_method = "classical"  # optional: "classical" (default) or "cls"
//! [resolution]                  # optional: σ(E) = √(sigma0_kev² + sigma_sqrt_kev²·E)
//! sigma0_kev = 0.2
//! sigma_sqrt_kev = 0.05
//! [halo]                        # optional overrides of the standard halo
//! rho_gev_cm3 = 0.3
//! v0_km_s = 238.0
//! vesc_km_s = 544.0
//! vearth_km_s = 250.6           # or date = "2026-06-02"
//! ```

use std::path::{Path, PathBuf};

use super::rate::{FormFactorChoice, Interaction, RecoilSpectrum};
use super::reach::PoissonMethod;
use super::{DirectError, Halo, Target, require_non_negative, require_positive};
use crate::units::DAYS_PER_YEAR;

/// Abscissae of the 4-point Gauss–Legendre rule on [−1, 1].
const GL4_X: [f64; 4] = [
    -0.861_136_311_594_052_6,
    -0.339_981_043_584_856_3,
    0.339_981_043_584_856_3,
    0.861_136_311_594_052_6,
];
/// Weights of the 4-point Gauss–Legendre rule on [−1, 1].
const GL4_W: [f64; 4] = [
    0.347_854_845_137_453_8,
    0.652_145_154_862_546_1,
    0.652_145_154_862_546_1,
    0.347_854_845_137_453_8,
];
/// Log-spaced panels across the integration range.
const LOG_PANELS: usize = 24;
/// Gaussian tails kept in the resolution kernel, in units of σ.
const RESOLUTION_REACH_SIGMA: f64 = 8.0;

/// Detection efficiency as a function of nuclear-recoil energy.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub enum Efficiency {
    /// The same fraction at every energy.
    Constant(f64),
    /// Piecewise-linear curve through (E_R \[keV\], ε) nodes, strictly
    /// increasing in energy, covering the energy window.
    Curve(Vec<(f64, f64)>),
}

impl Efficiency {
    /// Efficiency at `e_kev` (linear interpolation; end values outside the nodes).
    pub fn at(&self, e_kev: f64) -> f64 {
        match self {
            Efficiency::Constant(eps) => *eps,
            Efficiency::Curve(nodes) => {
                let i = nodes.partition_point(|&(e, _)| e <= e_kev);
                match (i.checked_sub(1).and_then(|k| nodes.get(k)), nodes.get(i)) {
                    (Some(&(e0, f0)), Some(&(e1, f1))) => f0 + (f1 - f0) * (e_kev - e0) / (e1 - e0),
                    (Some(&(_, f)), None) | (None, Some(&(_, f))) => f,
                    (None, None) => 0.0,
                }
            }
        }
    }

    /// Reads an efficiency curve from CSV: a header with columns `e_kev` and
    /// `efficiency`, at least two rows, energies finite, ≥ 0 and strictly
    /// increasing, efficiencies in [0, 1].
    pub fn from_csv_file(path: &Path) -> Result<Efficiency, DirectError> {
        let columns = read_two_columns(path, "e_kev", "efficiency")?;
        let csv_err = |line: u64, message: String| DirectError::Csv {
            path: path.to_path_buf(),
            line,
            message,
        };
        let mut nodes: Vec<(f64, f64)> = Vec::with_capacity(columns.len());
        for (line, e, eps) in columns {
            if !(e.is_finite() && e >= 0.0) {
                return Err(csv_err(
                    line,
                    format!("e_kev must be finite and >= 0, got {e} keV"),
                ));
            }
            if !(0.0..=1.0).contains(&eps) {
                return Err(csv_err(
                    line,
                    format!("efficiency must be in [0, 1], got {eps}"),
                ));
            }
            if let Some(&(prev, _)) = nodes.last()
                && e <= prev
            {
                return Err(csv_err(
                    line,
                    format!("e_kev must increase strictly, got {e} keV after {prev} keV"),
                ));
            }
            nodes.push((e, eps));
        }
        if nodes.len() < 2 {
            return Err(csv_err(
                1,
                format!("need at least 2 rows, got {}", nodes.len()),
            ));
        }
        Ok(Efficiency::Curve(nodes))
    }

    /// ∫_{lo}^{hi} ε(E') N(E'; μ, σ) dE' for a Gaussian of mean μ and width σ,
    /// exact for the piecewise-linear ε.
    ///
    /// # Formula
    /// On a segment where ε = c₀ + c₁E', with u = (E' − μ)/σ:
    /// ∫ = (c₀ + c₁μ) [Φ(u_b) − Φ(u_a)] + c₁σ [φ(u_a) − φ(u_b)].
    ///
    /// # Units
    /// Energies in keV; result dimensionless.
    fn gaussian_weight(&self, lo: f64, hi: f64, mu: f64, sigma: f64) -> f64 {
        let segment = |a: f64, b: f64, c0: f64, c1: f64| {
            let (ua, ub) = ((a - mu) / sigma, (b - mu) / sigma);
            (c0 + c1 * mu) * normal_mass(ua, ub) + c1 * sigma * (normal_pdf(ua) - normal_pdf(ub))
        };
        match self {
            Efficiency::Constant(eps) => segment(lo, hi, *eps, 0.0),
            Efficiency::Curve(nodes) => nodes
                .windows(2)
                .map(|w| {
                    let ((e0, f0), (e1, f1)) = (w[0], w[1]);
                    let (a, b) = (e0.max(lo), e1.min(hi));
                    if b <= a {
                        return 0.0;
                    }
                    let c1 = (f1 - f0) / (e1 - e0);
                    segment(a, b, f0 - c1 * e0, c1)
                })
                .sum(),
        }
    }

    /// Energies inside (lo, hi) where the curve has a kink.
    fn kinks_in(&self, lo: f64, hi: f64) -> Vec<f64> {
        match self {
            Efficiency::Constant(_) => Vec::new(),
            Efficiency::Curve(nodes) => nodes
                .iter()
                .map(|&(e, _)| e)
                .filter(|&e| e > lo && e < hi)
                .collect(),
        }
    }
}

/// Standard normal density φ(u).
fn normal_pdf(u: f64) -> f64 {
    (-0.5 * u * u).exp() / (2.0 * std::f64::consts::PI).sqrt()
}

/// Φ(b) − Φ(a) for a ≤ b, using erfc on the tails to avoid cancellation.
fn normal_mass(a: f64, b: f64) -> f64 {
    use statrs::function::erf::{erf, erfc};
    let s = std::f64::consts::SQRT_2;
    if a >= 0.0 {
        0.5 * (erfc(a / s) - erfc(b / s))
    } else if b <= 0.0 {
        0.5 * (erfc(-b / s) - erfc(-a / s))
    } else {
        0.5 * (erf(b / s) - erf(a / s))
    }
}

/// Reads two named numeric columns of a CSV file; returns (line, x, y) rows.
pub(crate) fn read_two_columns(
    path: &Path,
    x_name: &str,
    y_name: &str,
) -> Result<Vec<(u64, f64, f64)>, DirectError> {
    let csv_err = |line: u64, message: String| DirectError::Csv {
        path: path.to_path_buf(),
        line,
        message,
    };
    let file = std::fs::File::open(path).map_err(|reason| DirectError::Io {
        path: path.to_path_buf(),
        reason,
    })?;
    let mut reader = csv::ReaderBuilder::new()
        .trim(csv::Trim::All)
        .comment(Some(b'#'))
        .from_reader(file);
    let headers = reader
        .headers()
        .map_err(|e| csv_err(1, format!("cannot read the header: {e}")))?
        .clone();
    let column = |name: &str| {
        headers.iter().position(|h| h == name).ok_or_else(|| {
            csv_err(
                1,
                format!(
                    "header must contain a column {name:?} (found: {})",
                    headers.iter().collect::<Vec<_>>().join(", ")
                ),
            )
        })
    };
    let (ix, iy) = (column(x_name)?, column(y_name)?);
    let mut rows = Vec::new();
    for record in reader.records() {
        let record = record.map_err(|e| {
            let line = e.position().map_or(0, |p| p.line());
            csv_err(line, format!("malformed row: {e}"))
        })?;
        let line = record.position().map_or(0, |p| p.line());
        let number = |i: usize, name: &str| -> Result<f64, DirectError> {
            let text = record.get(i).unwrap_or("");
            text.parse::<f64>()
                .map_err(|_| csv_err(line, format!("column {name:?}: not a number: {text:?}")))
        };
        rows.push((line, number(ix, x_name)?, number(iy, y_name)?));
    }
    Ok(rows)
}

/// Gaussian energy resolution σ(E) = √(σ₀² + s²·E).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Resolution {
    /// Constant term σ₀ \[keV\].
    pub sigma0_kev: f64,
    /// Stochastic term s [√keV] (σ² grows as s²·E).
    #[serde(default)]
    pub sigma_sqrt_kev: f64,
}

impl Resolution {
    /// σ(E) \[keV\] at true energy E \[keV\].
    ///
    /// # Formula
    /// σ(E) = √(σ₀² + s² E) (common practice, no source).
    pub fn sigma_kev(&self, e_kev: f64) -> f64 {
        (self.sigma0_kev.powi(2) + self.sigma_sqrt_kev.powi(2) * e_kev.max(0.0)).sqrt()
    }
}

/// Optional halo overrides in an experiment file.
#[derive(Debug, Clone, Default, PartialEq, serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct HaloConfig {
    /// ρ_0 [GeV/cm³].
    pub rho_gev_cm3: Option<f64>,
    /// v_0 [km/s].
    pub v0_km_s: Option<f64>,
    /// v_esc [km/s].
    pub vesc_km_s: Option<f64>,
    /// v_E [km/s]; excludes `date`.
    pub vearth_km_s: Option<f64>,
    /// Date `YYYY-MM-DD` for the Earth speed; excludes `vearth_km_s`.
    pub date: Option<String>,
}

impl HaloConfig {
    /// Builds the halo: the standard halo with the given overrides (see
    /// [`HaloConfig::apply_to`]).
    pub fn build(&self) -> Result<Halo, DirectError> {
        self.apply_to(&Halo::standard())
    }

    /// `base` with the given overrides. When v_0 is overridden and neither
    /// v_E nor a date is given, v_E follows v_0
    /// ([`crate::direct::halo::sun_speed_km_s`]); a date sets v_E for that
    /// day from the resulting v_0.
    pub fn apply_to(&self, base: &Halo) -> Result<Halo, DirectError> {
        if self.vearth_km_s.is_some() && self.date.is_some() {
            return Err(DirectError::invalid(
                "halo",
                "give vearth_km_s or date, not both",
            ));
        }
        let v0 = self.v0_km_s.unwrap_or(base.v0_km_s());
        let vearth = match (self.vearth_km_s, self.v0_km_s) {
            (Some(v), _) => v,
            (None, Some(v0)) => super::halo::sun_speed_km_s(v0),
            (None, None) => base.vearth_km_s(),
        };
        let halo = Halo::new(
            self.rho_gev_cm3.unwrap_or(base.rho_gev_cm3()),
            v0,
            self.vesc_km_s.unwrap_or(base.vesc_km_s()),
            vearth,
        )?;
        match &self.date {
            Some(d) => halo.with_date(d),
            None => Ok(halo),
        }
    }

    /// True when no override is given.
    pub fn is_empty(&self) -> bool {
        *self == HaloConfig::default()
    }
}

/// The experiment file as written (before validation).
#[derive(Debug, Clone, PartialEq, serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ExperimentConfig {
    /// Short name.
    pub name: String,
    /// Free text (e.g. "invented scenario").
    #[serde(default)]
    pub description: String,
    /// Target name ([`Target::known_names`]).
    pub target: String,
    /// Exposure [kg·day]; excludes `exposure_tonne_year`.
    pub exposure_kg_day: Option<f64>,
    /// Exposure [tonne·year] (1 t·yr = 1000 × 365.25 kg·day).
    pub exposure_tonne_year: Option<f64>,
    /// Lower edge of the energy window [keV nuclear recoil].
    pub threshold_kev: f64,
    /// Upper edge of the energy window [keV nuclear recoil].
    pub upper_kev: f64,
    /// Constant efficiency in [0, 1]; excludes `efficiency_csv`.
    pub efficiency: Option<f64>,
    /// Efficiency curve CSV (relative to the experiment file).
    pub efficiency_csv: Option<PathBuf>,
    /// Optional Gaussian energy resolution.
    pub resolution: Option<Resolution>,
    /// Expected background events in the window.
    pub background_events: f64,
    /// Observed events in the window.
    pub observed_events: u64,
    /// Confidence level (default 0.9).
    pub cl: Option<f64>,
    /// Poisson limit method (default classical).
    pub poisson_method: Option<PoissonMethod>,
    /// Halo overrides.
    #[serde(default)]
    pub halo: HaloConfig,
}

/// A validated experiment.
#[derive(Debug, Clone, PartialEq)]
pub struct Experiment {
    name: String,
    description: String,
    target: Target,
    exposure_kg_day: f64,
    threshold_kev: f64,
    upper_kev: f64,
    efficiency: Efficiency,
    resolution: Option<Resolution>,
    background_events: f64,
    observed_events: u64,
    cl: f64,
    method: PoissonMethod,
    halo: Halo,
    /// True-energy integration panels and their Gauss nodes (energy \[keV\],
    /// weight × detection probability \[keV\]).
    panels: Vec<Panel>,
}

/// One integration panel in true recoil energy.
#[derive(Debug, Clone, PartialEq)]
struct Panel {
    lo_kev: f64,
    hi_kev: f64,
    nodes: [(f64, f64); 4],
}

/// Parts of an experiment other than the file-level details, for building
/// one in code.
#[derive(Debug, Clone, PartialEq)]
pub struct ExperimentParts {
    /// Short name.
    pub name: String,
    /// Free text.
    pub description: String,
    /// Target.
    pub target: Target,
    /// Exposure [kg·day].
    pub exposure_kg_day: f64,
    /// Energy window lower edge \[keV\].
    pub threshold_kev: f64,
    /// Energy window upper edge \[keV\].
    pub upper_kev: f64,
    /// Efficiency.
    pub efficiency: Efficiency,
    /// Optional resolution.
    pub resolution: Option<Resolution>,
    /// Expected background \[events\].
    pub background_events: f64,
    /// Observed events.
    pub observed_events: u64,
    /// Confidence level in (0, 1).
    pub cl: f64,
    /// Poisson limit method.
    pub method: PoissonMethod,
    /// Halo.
    pub halo: Halo,
}

impl Experiment {
    /// Validates the parts and prepares the integration panels.
    ///
    /// Rules: exposure > 0 kg·day; 0 ≤ threshold < upper edge (keV);
    /// efficiency in [0, 1] and a curve covering the window; resolution
    /// terms ≥ 0 and σ(E) > 0; background ≥ 0 events; 0 < CL < 1.
    pub fn new(parts: ExperimentParts) -> Result<Experiment, DirectError> {
        let ctx = format!("experiment {}", parts.name);
        let ctx = ctx.as_str();
        require_positive(ctx, "exposure", parts.exposure_kg_day, "kg·day")?;
        parts.target.validate()?;
        require_non_negative(ctx, "threshold_kev", parts.threshold_kev, "keV")?;
        require_positive(ctx, "upper_kev", parts.upper_kev, "keV")?;
        if parts.threshold_kev >= parts.upper_kev {
            return Err(DirectError::invalid(
                ctx,
                format!(
                    "threshold_kev must be below upper_kev, got threshold {} keV >= upper edge {} keV",
                    parts.threshold_kev, parts.upper_kev
                ),
            ));
        }
        match &parts.efficiency {
            Efficiency::Constant(eps) => {
                if !(0.0..=1.0).contains(eps) {
                    return Err(DirectError::invalid(
                        ctx,
                        format!("efficiency must be in [0, 1], got {eps}"),
                    ));
                }
            }
            Efficiency::Curve(nodes) => {
                let ok = nodes.len() >= 2
                    && nodes.windows(2).all(|w| w[0].0 < w[1].0)
                    && nodes
                        .iter()
                        .all(|&(e, f)| e.is_finite() && (0.0..=1.0).contains(&f));
                if !ok {
                    return Err(DirectError::invalid(
                        ctx,
                        "efficiency curve needs >= 2 nodes, strictly increasing energies and values in [0, 1]",
                    ));
                }
                let (first, last) = (nodes[0].0, nodes[nodes.len() - 1].0);
                if first > parts.threshold_kev || last < parts.upper_kev {
                    return Err(DirectError::invalid(
                        ctx,
                        format!(
                            "efficiency curve covers {first}..{last} keV but the window is {}..{} keV; it must cover the window",
                            parts.threshold_kev, parts.upper_kev
                        ),
                    ));
                }
            }
        }
        if let Some(r) = &parts.resolution {
            require_non_negative(ctx, "resolution.sigma0_kev", r.sigma0_kev, "keV")?;
            require_non_negative(ctx, "resolution.sigma_sqrt_kev", r.sigma_sqrt_kev, "√keV")?;
            if r.sigma0_kev == 0.0 {
                return Err(DirectError::invalid(
                    ctx,
                    "resolution.sigma0_kev must be > 0 (σ(0) = 0 is a delta function; omit [resolution] instead), got 0 keV",
                ));
            }
        }
        require_non_negative(ctx, "background_events", parts.background_events, "events")?;
        if !(parts.cl > 0.0 && parts.cl < 1.0) {
            return Err(DirectError::invalid(
                ctx,
                format!("cl must be in (0, 1), got {}", parts.cl),
            ));
        }
        let panels = build_panels(
            parts.threshold_kev,
            parts.upper_kev,
            &parts.efficiency,
            parts.resolution.as_ref(),
        );
        Ok(Experiment {
            name: parts.name,
            description: parts.description,
            target: parts.target,
            exposure_kg_day: parts.exposure_kg_day,
            threshold_kev: parts.threshold_kev,
            upper_kev: parts.upper_kev,
            efficiency: parts.efficiency,
            resolution: parts.resolution,
            background_events: parts.background_events,
            observed_events: parts.observed_events,
            cl: parts.cl,
            method: parts.method,
            halo: parts.halo,
            panels,
        })
    }

    /// Reads and validates an experiment TOML file; an efficiency CSV is
    /// looked up relative to the file's folder.
    pub fn from_toml_file(path: &Path) -> Result<Experiment, DirectError> {
        let text = std::fs::read_to_string(path).map_err(|reason| DirectError::Io {
            path: path.to_path_buf(),
            reason,
        })?;
        let config: ExperimentConfig = toml::from_str(&text).map_err(|e| DirectError::Toml {
            path: path.to_path_buf(),
            reason: Box::new(e),
        })?;
        let base = path.parent().unwrap_or_else(|| Path::new("."));
        Experiment::from_config(config, base, &path.display().to_string())
    }

    /// Validates a parsed configuration; `base_dir` resolves a relative
    /// efficiency CSV path, `origin` names the file in error messages.
    pub fn from_config(
        config: ExperimentConfig,
        base_dir: &Path,
        origin: &str,
    ) -> Result<Experiment, DirectError> {
        let wrap = |e: DirectError| match e {
            DirectError::Invalid { context, message } => DirectError::Invalid {
                context: format!("{origin}: {context}"),
                message,
            },
            DirectError::UnknownTarget { name, known, .. } => DirectError::UnknownTarget {
                context: format!("{origin}: target"),
                name,
                known,
            },
            other => other,
        };
        let exposure_kg_day = match (config.exposure_kg_day, config.exposure_tonne_year) {
            (Some(x), None) => x,
            (None, Some(t)) => t * 1000.0 * DAYS_PER_YEAR,
            _ => {
                return Err(wrap(DirectError::invalid(
                    "exposure",
                    "give exactly one of exposure_kg_day and exposure_tonne_year",
                )));
            }
        };
        let efficiency = match (config.efficiency, &config.efficiency_csv) {
            (Some(eps), None) => Efficiency::Constant(eps),
            (None, Some(csv)) => Efficiency::from_csv_file(&base_dir.join(csv))?,
            _ => {
                return Err(wrap(DirectError::invalid(
                    "efficiency",
                    "give exactly one of efficiency (a fraction) and efficiency_csv (a file)",
                )));
            }
        };
        let parts = ExperimentParts {
            name: config.name,
            description: config.description,
            target: Target::by_name(&config.target).map_err(wrap)?,
            exposure_kg_day,
            threshold_kev: config.threshold_kev,
            upper_kev: config.upper_kev,
            efficiency,
            resolution: config.resolution,
            background_events: config.background_events,
            observed_events: config.observed_events,
            cl: config.cl.unwrap_or(0.9),
            method: config.poisson_method.unwrap_or_default(),
            halo: config.halo.build().map_err(wrap)?,
        };
        Experiment::new(parts).map_err(wrap)
    }

    /// The same experiment with another halo.
    pub fn with_halo(mut self, halo: Halo) -> Experiment {
        self.halo = halo;
        self
    }

    /// The same experiment with another confidence level and method.
    pub fn with_limit_settings(
        mut self,
        cl: f64,
        method: PoissonMethod,
    ) -> Result<Experiment, DirectError> {
        if !(cl > 0.0 && cl < 1.0) {
            return Err(DirectError::invalid(
                format!("experiment {}", self.name),
                format!("cl must be in (0, 1), got {cl}"),
            ));
        }
        self.cl = cl;
        self.method = method;
        Ok(self)
    }

    /// Short name.
    pub fn name(&self) -> &str {
        &self.name
    }
    /// Free-text description.
    pub fn description(&self) -> &str {
        &self.description
    }
    /// Target.
    pub fn target(&self) -> &Target {
        &self.target
    }
    /// Exposure [kg·day].
    pub fn exposure_kg_day(&self) -> f64 {
        self.exposure_kg_day
    }
    /// Energy window \[keV\]: (threshold, upper edge).
    pub fn window_kev(&self) -> (f64, f64) {
        (self.threshold_kev, self.upper_kev)
    }
    /// Efficiency.
    pub fn efficiency(&self) -> &Efficiency {
        &self.efficiency
    }
    /// Resolution, if any.
    pub fn resolution(&self) -> Option<&Resolution> {
        self.resolution.as_ref()
    }
    /// Expected background \[events\].
    pub fn background_events(&self) -> f64 {
        self.background_events
    }
    /// Observed events.
    pub fn observed_events(&self) -> u64 {
        self.observed_events
    }
    /// Confidence level.
    pub fn cl(&self) -> f64 {
        self.cl
    }
    /// Poisson limit method.
    pub fn method(&self) -> PoissonMethod {
        self.method
    }
    /// Halo.
    pub fn halo(&self) -> &Halo {
        &self.halo
    }

    /// The recoil spectrum of this experiment's target and halo.
    ///
    /// # Units
    /// m_χ in GeV, σ in cm².
    pub fn spectrum(
        &self,
        m_chi_gev: f64,
        sigma_cm2: f64,
        interaction: Interaction,
    ) -> Result<RecoilSpectrum, DirectError> {
        RecoilSpectrum::new(
            &self.halo,
            &self.target,
            m_chi_gev,
            sigma_cm2,
            interaction,
            FormFactorChoice::Standard,
        )
    }

    /// Probability that a recoil of true energy E is detected inside the
    /// window: ε(E)·1\[window\] without resolution, ∫_window ε(E') N(E'; E, σ(E)) dE'
    /// with it.
    ///
    /// # Units
    /// E in keV; result a fraction in [0, 1].
    pub fn detection_probability(&self, e_true_kev: f64) -> f64 {
        match &self.resolution {
            None => {
                if e_true_kev >= self.threshold_kev && e_true_kev <= self.upper_kev {
                    self.efficiency.at(e_true_kev)
                } else {
                    0.0
                }
            }
            Some(r) => self.efficiency.gaussian_weight(
                self.threshold_kev,
                self.upper_kev,
                e_true_kev,
                r.sigma_kev(e_true_kev),
            ),
        }
    }

    /// Expected signal events for one WIMP mass and cross-section.
    ///
    /// # Formula
    /// N = exposure · ∫ dE_R  P_det(E_R) · dR/dE_R, P_det from
    /// [`Experiment::detection_probability`]; the integral is composite
    /// 4-point Gauss–Legendre on log-spaced panels (split at efficiency
    /// nodes, refined to σ around the window edges with resolution),
    /// each isotope cut at its largest recoil energy.
    ///
    /// # Units
    /// m_χ in GeV, σ in cm²; result in events.
    pub fn expected_counts(
        &self,
        m_chi_gev: f64,
        sigma_cm2: f64,
        interaction: Interaction,
    ) -> Result<f64, DirectError> {
        let spectrum = self.spectrum(m_chi_gev, sigma_cm2, interaction)?;
        Ok(self.counts_of(&spectrum))
    }

    /// Expected events for a prepared spectrum (see [`Experiment::expected_counts`]).
    pub fn counts_of(&self, spectrum: &RecoilSpectrum) -> f64 {
        let mut total = 0.0;
        for iso in 0..spectrum.isotope_count() {
            let emax = spectrum.max_recoil_kev(iso);
            for p in &self.panels {
                if p.lo_kev >= emax {
                    break;
                }
                if p.hi_kev <= emax {
                    total += p
                        .nodes
                        .iter()
                        .filter(|&&(_, w)| w != 0.0)
                        .map(|&(e, w)| w * spectrum.isotope_rate(iso, e))
                        .sum::<f64>();
                } else {
                    // The panel holding the kinematic endpoint: 4 sub-panels.
                    let h = (emax - p.lo_kev) / 4.0;
                    for k in 0..4 {
                        let a = p.lo_kev + h * k as f64;
                        total += gauss4(a, a + h, |e| {
                            self.detection_probability(e) * spectrum.isotope_rate(iso, e)
                        });
                    }
                }
            }
        }
        total * self.exposure_kg_day
    }

    /// The spectrum in observed energy, with the Gaussian resolution applied
    /// by numerical convolution (the true spectrum when there is none); no
    /// efficiency.
    ///
    /// # Formula
    /// dR/dE' = ∫ dE dR/dE(E) N(E'; E, σ(E)), integrated over
    /// E ∈ [E' − 8σ, E' + 8σ] ∩ [0, ∞) with composite 4-point Gauss–Legendre
    /// on panels of width ≤ σ/4.
    ///
    /// # Units
    /// E' in keV; result in events kg⁻¹ day⁻¹ keV⁻¹.
    pub fn observed_rate(&self, spectrum: &RecoilSpectrum, e_obs_kev: f64) -> f64 {
        let Some(r) = &self.resolution else {
            return spectrum.rate(e_obs_kev);
        };
        let sigma_hi = r.sigma_kev(e_obs_kev + RESOLUTION_REACH_SIGMA * r.sigma_kev(e_obs_kev));
        let lo = (e_obs_kev - RESOLUTION_REACH_SIGMA * sigma_hi).max(0.0);
        let hi = e_obs_kev + RESOLUTION_REACH_SIGMA * sigma_hi;
        if hi <= lo {
            return 0.0;
        }
        let n = (((hi - lo) / (r.sigma0_kev / 4.0)).ceil() as usize).clamp(16, 4096);
        let h = (hi - lo) / n as f64;
        (0..n)
            .map(|k| {
                let a = lo + h * k as f64;
                gauss4(a, a + h, |e| {
                    let s = r.sigma_kev(e);
                    spectrum.rate(e) * normal_pdf((e_obs_kev - e) / s) / s
                })
            })
            .sum()
    }
}

/// 4-point Gauss–Legendre integral of `f` over [a, b].
fn gauss4(a: f64, b: f64, f: impl Fn(f64) -> f64) -> f64 {
    let (mid, half) = (0.5 * (a + b), 0.5 * (b - a));
    GL4_X
        .iter()
        .zip(GL4_W)
        .map(|(&x, w)| w * f(mid + half * x))
        .sum::<f64>()
        * half
}

/// Integration panels in true energy with the detection probability folded
/// into the node weights.
fn build_panels(
    threshold_kev: f64,
    upper_kev: f64,
    efficiency: &Efficiency,
    resolution: Option<&Resolution>,
) -> Vec<Panel> {
    let mut edges: Vec<f64> = Vec::new();
    let (lo, hi) = match resolution {
        None => {
            edges.extend(efficiency.kinks_in(threshold_kev, upper_kev));
            (threshold_kev, upper_kev)
        }
        Some(r) => {
            let s_lo = r.sigma_kev(threshold_kev);
            let s_hi = r.sigma_kev(upper_kev + RESOLUTION_REACH_SIGMA * r.sigma_kev(upper_kev));
            let lo = (threshold_kev - RESOLUTION_REACH_SIGMA * s_lo).max(0.0);
            let hi = upper_kev + RESOLUTION_REACH_SIGMA * s_hi;
            // σ-wide panels across each window edge.
            for (edge, s) in [(threshold_kev, s_lo), (upper_kev, r.sigma_kev(upper_kev))] {
                let n = (2.0 * RESOLUTION_REACH_SIGMA) as usize;
                edges.extend((0..=n).map(|k| edge + s * (k as f64 - RESOLUTION_REACH_SIGMA)));
            }
            (lo, hi)
        }
    };
    // Log-spaced panels; a linear first panel when the range starts at 0.
    let log_lo = if lo > 0.0 {
        lo
    } else if threshold_kev > 0.0 {
        threshold_kev.min(hi) * 1e-3
    } else {
        hi * 1e-6
    };
    edges.push(lo);
    edges.extend(
        (0..=LOG_PANELS).map(|k| log_lo * (hi / log_lo).powf(k as f64 / LOG_PANELS as f64)),
    );
    edges.push(hi);
    edges.retain(|&e| e >= lo && e <= hi);
    edges.sort_by(f64::total_cmp);
    edges.dedup_by(|a, b| (*a - *b).abs() <= 1e-12 * hi);
    let probability = |e: f64| match resolution {
        None => efficiency.at(e),
        Some(r) => efficiency.gaussian_weight(threshold_kev, upper_kev, e, r.sigma_kev(e)),
    };
    edges
        .windows(2)
        .map(|w| {
            let (a, b) = (w[0], w[1]);
            let (mid, half) = (0.5 * (a + b), 0.5 * (b - a));
            let nodes = std::array::from_fn(|k| {
                let e = mid + half * GL4_X[k];
                (e, half * GL4_W[k] * probability(e))
            });
            Panel {
                lo_kev: a,
                hi_kev: b,
                nodes,
            }
        })
        .collect()
}
