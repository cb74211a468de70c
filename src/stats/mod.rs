//! Counting-experiment statistics: likelihoods with background nuisance
//! parameters, CLs limits (exact, asymptotic, pseudo-experiments), expected
//! bands, region choice and combination.
//!
//! Independent of the event stages; [`crate::search`] and [`crate::scan`]
//! feed it region counts.
//!
//! # Methods
//! - [`Method::Exact`]: one region with known background (σ_b = 0, no signal
//!   uncertainty); CLs from Poisson sums ([`poisson`]).
//! - [`Method::Asymptotic`] (the default, [`LimitOptions::default`]): the
//!   profile-likelihood statistic q̃_μ with the asymptotic formulae and the
//!   background-only Asimov data set ([`asymptotic`]); every region with
//!   signal and expected background below [`SMALL_BACKGROUND_EVENTS`] adds a
//!   warning suggesting pseudo-experiments.
//! - [`Method::Toys`]: pseudo-experiments ([`toys`]), seeded per toy.
//!
//! A model with zero total signal has no sensitivity: μ_up = +∞ and
//! CLs(μ = 1) = 1, without error.

use nalgebra::DMatrix;

pub mod asymptotic;
pub mod likelihood;
pub mod poisson;
pub mod root;
pub mod significance;
pub mod toys;

pub use likelihood::CountingModel;
pub use significance::{discovery_significance, discovery_significance_with_unc};

/// Expected background \[events\] below which the asymptotic method warns.
pub const SMALL_BACKGROUND_EVENTS: f64 = 5.0;

/// Errors of the statistics stage.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum StatsError {
    /// An input violates a rule (message names the quantity, value and rule).
    #[error("{0}")]
    InvalidInput(String),
    /// The root-finder could not bracket the limit.
    #[error("{0}")]
    NoBracket(String),
}

/// How CLs is computed.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub enum Method {
    /// Exact Poisson CLs for known background (Read 2002; Junk 1999).
    Exact,
    /// Asymptotic CLs with the Asimov data set (Cowan et al., EPJC 71 (2011) 1554).
    Asymptotic,
    /// Pseudo-experiments, seeded and bit-identical on any number of threads.
    Toys {
        /// Number of pseudo-experiments per hypothesis.
        n_toys: usize,
        /// Global seed.
        seed: u64,
    },
}

/// Shape of the constraint on the background nuisance parameter.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum BackgroundConstraint {
    /// Gaussian, truncated so the expected count stays positive (default).
    Gaussian,
    /// Log-normal.
    LogNormal,
    /// Poisson auxiliary measurement (the on/off problem): m ~ Poisson(τ b)
    /// with τ = b/σ_b², so that b is known to ±σ_b; independent regions only.
    Poisson,
}

/// One counting region.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct RegionCounts {
    /// Observed events n.
    pub observed: u64,
    /// Expected background events b.
    pub background: f64,
    /// Absolute background uncertainty σ_b \[events\].
    pub background_unc: f64,
    /// Expected signal events s at μ = 1.
    pub signal: f64,
    /// Relative signal uncertainty (fraction, e.g. MC statistics).
    pub signal_rel_unc: f64,
}

/// Options of a limit computation.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct LimitOptions {
    /// Confidence level 1 − α, e.g. 0.95.
    pub cl: f64,
    /// Method.
    pub method: Method,
    /// Background constraint.
    pub constraint: BackgroundConstraint,
}

/// Result of a limit computation on the signal strength μ.
///
/// A region with zero signal has no sensitivity: μ_up = +∞, CLs(μ=1) = 1.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Limit {
    /// Confidence level used.
    pub cl: f64,
    /// Method used.
    pub method: Method,
    /// CLs at μ = 1.
    pub cls_mu1: f64,
    /// Monte Carlo uncertainty of CLs at μ = 1 (pseudo-experiments only).
    pub cls_mu1_mc_unc: Option<f64>,
    /// Observed upper limit on μ.
    pub mu_up_observed: f64,
    /// Expected upper limits on μ at −2σ, −1σ, median, +1σ, +2σ.
    pub mu_up_expected: [f64; 5],
    /// Warnings (e.g. asymptotic method at small counts).
    pub warnings: Vec<String>,
}

impl Default for LimitOptions {
    /// 95 % CL, asymptotic CLs, Gaussian background constraint.
    fn default() -> Self {
        Self {
            cl: 0.95,
            method: Method::Asymptotic,
            constraint: BackgroundConstraint::Gaussian,
        }
    }
}

fn check_count(region: usize, name: &str, v: f64) -> Result<(), StatsError> {
    if !v.is_finite() || v < 0.0 {
        return Err(StatsError::InvalidInput(format!(
            "region {region}: {name} must be finite and ≥ 0, got {v}"
        )));
    }
    Ok(())
}

/// Checks every region's numbers and the options.
pub(crate) fn validate_regions(
    regions: &[RegionCounts],
    opts: &LimitOptions,
) -> Result<(), StatsError> {
    if !(opts.cl > 0.0 && opts.cl < 1.0) {
        return Err(StatsError::InvalidInput(format!(
            "confidence level must lie strictly between 0 and 1, got {}",
            opts.cl
        )));
    }
    if let Method::Toys { n_toys: 0, .. } = opts.method {
        return Err(StatsError::InvalidInput(
            "pseudo-experiments: the number of toys must be ≥ 1, got 0".into(),
        ));
    }
    if regions.is_empty() {
        return Err(StatsError::InvalidInput(
            "at least one region is needed, got none".into(),
        ));
    }
    for (i, r) in regions.iter().enumerate() {
        let k = i + 1;
        check_count(k, "background [events]", r.background)?;
        check_count(k, "background uncertainty [events]", r.background_unc)?;
        check_count(k, "signal [events]", r.signal)?;
        check_count(
            k,
            "relative signal uncertainty [fraction]",
            r.signal_rel_unc,
        )?;
    }
    Ok(())
}

/// The result for a model without signal: no sensitivity.
fn no_sensitivity(opts: &LimitOptions) -> Limit {
    Limit {
        cl: opts.cl,
        method: opts.method,
        cls_mu1: 1.0,
        cls_mu1_mc_unc: None,
        mu_up_observed: f64::INFINITY,
        mu_up_expected: [f64::INFINITY; 5],
        warnings: vec!["no signal expected: no sensitivity, μ_up = +∞".into()],
    }
}

/// Exact CLs for one region with known background.
fn exact_limit(r: &RegionCounts, opts: &LimitOptions, regions: usize) -> Result<Limit, StatsError> {
    if regions != 1 || r.background_unc > 0.0 || r.signal_rel_unc > 0.0 {
        return Err(StatsError::InvalidInput(format!(
            "exact method: needs one region with known background and signal (uncertainties 0), got {regions} region(s), background uncertainty {} events, relative signal uncertainty {}; use the asymptotic method or pseudo-experiments",
            r.background_unc, r.signal_rel_unc
        )));
    }
    let alpha = 1.0 - opts.cl;
    let s_obs = poisson::exact_signal_limit(r.observed, r.background, alpha)?;
    let s_exp = poisson::exact_expected_signal_limits(r.background, alpha)?;
    Ok(Limit {
        cl: opts.cl,
        method: opts.method,
        cls_mu1: poisson::exact_cls(r.observed, r.signal, r.background),
        cls_mu1_mc_unc: None,
        mu_up_observed: s_obs / r.signal,
        mu_up_expected: s_exp.map(|s| s / r.signal),
        warnings: Vec::new(),
    })
}

/// Warnings for the asymptotic method at small counts and for a covariance
/// whose diagonal disagrees with the per-region uncertainties.
fn warnings(
    regions: &[RegionCounts],
    covariance: Option<&DMatrix<f64>>,
    opts: &LimitOptions,
) -> Vec<String> {
    let mut out = Vec::new();
    if opts.method == Method::Asymptotic {
        for (i, r) in regions.iter().enumerate() {
            if r.signal > 0.0 && r.background < SMALL_BACKGROUND_EVENTS {
                out.push(format!(
                    "region {}: expected background {} events is below {SMALL_BACKGROUND_EVENTS}; the asymptotic formulae may be inaccurate, consider pseudo-experiments (--method toys)",
                    i + 1,
                    r.background
                ));
            }
        }
    }
    if let Method::Toys { n_toys, .. } = opts.method
        && (n_toys as f64) * (1.0 - opts.cl) < 50.0
    {
        out.push(format!(
            "{n_toys} pseudo-experiments give fewer than 50 in the tail at CLs = {:.3}; the limit has a large Monte Carlo uncertainty, consider more toys",
            1.0 - opts.cl
        ));
    }
    if let Some(c) = covariance {
        for (i, r) in regions.iter().enumerate() {
            if i < c.nrows() && i < c.ncols() {
                let sd = c[(i, i)].max(0.0).sqrt();
                if (sd - r.background_unc).abs() > 1e-3 * sd.max(r.background_unc) {
                    out.push(format!(
                        "region {}: covariance gives σ_b = {sd} events, the region says {} events; the covariance is used",
                        i + 1,
                        r.background_unc
                    ));
                }
            }
        }
    }
    out
}

fn limit_of(
    regions: &[RegionCounts],
    covariance: Option<&DMatrix<f64>>,
    opts: &LimitOptions,
) -> Result<Limit, StatsError> {
    validate_regions(regions, opts)?;
    let model = CountingModel::new(regions, covariance, opts.constraint)?;
    if model.total_signal() <= 0.0 {
        return Ok(no_sensitivity(opts));
    }
    let alpha = 1.0 - opts.cl;
    let warnings = warnings(regions, covariance, opts);
    match opts.method {
        Method::Exact => {
            let mut l = exact_limit(&regions[0], opts, regions.len())?;
            l.warnings = warnings;
            Ok(l)
        }
        Method::Asymptotic => {
            let calc = asymptotic::Asymptotic::new(&model)?;
            let expected = calc.expected_limits(alpha)?;
            Ok(Limit {
                cl: opts.cl,
                method: opts.method,
                cls_mu1: calc.cls(1.0)?.cls,
                cls_mu1_mc_unc: None,
                mu_up_observed: calc.observed_limit_from(alpha, Some(expected[2]))?,
                mu_up_expected: expected,
                warnings,
            })
        }
        Method::Toys { n_toys, seed } => {
            let guess = asymptotic::Asymptotic::new(&model)
                .and_then(|a| a.observed_limit(alpha))
                .ok()
                .filter(|g| g.is_finite() && *g > 0.0)
                .unwrap_or(1.0);
            let calc = toys::Toys::new(&model, n_toys, seed)?;
            let at1 = calc.cls(1.0)?;
            Ok(Limit {
                cl: opts.cl,
                method: opts.method,
                cls_mu1: at1.cls,
                cls_mu1_mc_unc: Some(at1.cls_unc),
                mu_up_observed: calc.observed_limit(alpha, guess)?,
                mu_up_expected: calc.expected_limits(alpha, guess)?,
                warnings,
            })
        }
    }
}

/// Upper limit on μ for one region.
///
/// # Errors
/// [`StatsError::InvalidInput`] for negative or non-finite numbers, a
/// confidence level outside (0, 1), zero toys, or the exact method with
/// uncertainties; [`StatsError::NoBracket`] when the limit cannot be
/// bracketed.
pub fn region_limit(region: &RegionCounts, opts: &LimitOptions) -> Result<Limit, StatsError> {
    limit_of(std::slice::from_ref(region), None, opts)
}

/// Upper limit on μ from the combined likelihood of exclusive regions,
/// optionally with a background covariance matrix \[events²\].
///
/// With a covariance the backgrounds share a multivariate Gaussian (or
/// log-normal) constraint and the per-region `background_unc` are not used
/// (a warning notes any disagreement with the diagonal).
///
/// # Errors
/// As [`region_limit`]; also a covariance of the wrong size, not finite,
/// not symmetric or not positive semi-definite.
pub fn combined_limit(
    regions: &[RegionCounts],
    covariance: Option<&DMatrix<f64>>,
    opts: &LimitOptions,
) -> Result<Limit, StatsError> {
    limit_of(regions, covariance, opts)
}

/// Model-independent limit on the number of signal events (S95 at 95 % CL):
/// the limit on μ for a signal of one event.
///
/// # Units
/// `background`, `background_unc` and every limit in the result in events.
pub fn event_limit(
    observed: u64,
    background: f64,
    background_unc: f64,
    opts: &LimitOptions,
) -> Result<Limit, StatsError> {
    let region = RegionCounts {
        observed,
        background,
        background_unc,
        signal: 1.0,
        signal_rel_unc: 0.0,
    };
    region_limit(&region, opts)
}

/// Visible cross-section limit σ_vis = S95 / L.
///
/// # Formula
/// σ_vis = N_up / ∫L dt.
///
/// # Units
/// `events` in events, `lumi_ifb` in fb⁻¹, the result in fb.
///
/// # References
/// Definition of the visible cross-section σ × A × ε (common practice, no
/// single source).
pub fn visible_cross_section_fb(events: f64, lumi_ifb: f64) -> Result<f64, StatsError> {
    if !(lumi_ifb.is_finite() && lumi_ifb > 0.0) {
        return Err(StatsError::InvalidInput(format!(
            "integrated luminosity must be finite and > 0 fb⁻¹, got {lumi_ifb} fb⁻¹"
        )));
    }
    if events.is_nan() || events < 0.0 {
        return Err(StatsError::InvalidInput(format!(
            "event limit must be ≥ 0 events, got {events}"
        )));
    }
    Ok(events / lumi_ifb)
}

/// The region with the best (smallest) median expected limit, and its
/// limit; the usual practice is to quote that region's observed limit.
/// Ties go to the first region.
pub fn best_expected_region(
    regions: &[RegionCounts],
    opts: &LimitOptions,
) -> Result<(usize, Limit), StatsError> {
    validate_regions(regions, opts)?;
    let mut best: Option<(usize, Limit)> = None;
    for (i, r) in regions.iter().enumerate() {
        let l = region_limit(r, opts)?;
        let better = match &best {
            None => true,
            Some((_, b)) => l.mu_up_expected[2] < b.mu_up_expected[2],
        };
        if better {
            best = Some((i, l));
        }
    }
    // invariant: regions is not empty (checked by validate_regions).
    Ok(best.unwrap())
}
