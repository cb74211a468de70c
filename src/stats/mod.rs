//! Counting-experiment statistics: likelihoods with background nuisance
//! parameters, CLs limits (exact, asymptotic, pseudo-experiments), expected
//! bands, region choice and combination.
//!
//! Independent of the event stages; [`crate::search`] and [`crate::scan`]
//! feed it region counts.
//!
//! CONTRACT (types and signatures used by later stages; bodies under
//! construction).

use nalgebra::DMatrix;

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
}

/// One counting region.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct RegionCounts {
    /// Observed events n.
    pub observed: u64,
    /// Expected background events b.
    pub background: f64,
    /// Absolute background uncertainty σ_b [events].
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

/// Upper limit on μ for one region.
pub fn region_limit(_region: &RegionCounts, _opts: &LimitOptions) -> Result<Limit, StatsError> {
    Err(StatsError::InvalidInput(
        "statistics stage under construction".into(),
    ))
}

/// Upper limit on μ from the combined likelihood of exclusive regions,
/// optionally with a background covariance matrix [events²].
pub fn combined_limit(
    _regions: &[RegionCounts],
    _covariance: Option<&DMatrix<f64>>,
    _opts: &LimitOptions,
) -> Result<Limit, StatsError> {
    Err(StatsError::InvalidInput(
        "statistics stage under construction".into(),
    ))
}
