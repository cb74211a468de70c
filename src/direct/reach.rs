//! Reach of an experiment: exact Poisson upper limits on the signal count
//! (classical and CLs, known background), the limit curve σ_lim(m_χ) on a
//! mass grid (observed and median expected), and import of external curves.
//!
//! Fed by [`crate::direct::experiment`]; read by `recoil direct`,
//! [`crate::scan`] and [`crate::plot`].
//!
//! The Poisson limit lives in one function, [`poisson_upper_limit`]: its
//! CLs variant and the Poisson cumulative probability are the statistics
//! stage's exact method ([`crate::stats::event_limit`],
//! [`crate::stats::poisson::poisson_cdf`]); the classical (Neyman) variant,
//! which the statistics stage does not offer, is solved here.

use std::path::Path;

use rayon::prelude::*;

use super::experiment::read_two_columns;
use super::{DirectError, Experiment, Interaction, require_non_negative};
use crate::stats::{BackgroundConstraint, LimitOptions, Method};

/// How an upper limit on a Poisson signal with known background is built.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum PoissonMethod {
    /// Classical (Neyman) upper limit: P(k ≤ n | s + b) = 1 − CL. The
    /// default for direct detection, where limits are conventionally quoted
    /// as Poisson upper limits at 90 % CL. It is 0 when P(k ≤ n | b) ≤ 1 − CL
    /// (far fewer events than the background predicts).
    #[default]
    Classical,
    /// CLs: P(k ≤ n | s + b) / P(k ≤ n | b) = 1 − CL; never below the
    /// b = 0 limit's value at n = 0, never zero.
    Cls,
}

impl PoissonMethod {
    /// Label used in files and tables: `classical` or `cls`.
    pub fn label(self) -> &'static str {
        match self {
            PoissonMethod::Classical => "classical",
            PoissonMethod::Cls => "cls",
        }
    }
}

impl std::str::FromStr for PoissonMethod {
    type Err = DirectError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim().to_ascii_lowercase().as_str() {
            "classical" => Ok(PoissonMethod::Classical),
            "cls" => Ok(PoissonMethod::Cls),
            _ => Err(DirectError::invalid(
                "poisson method",
                format!("expected classical or cls, got {s:?}"),
            )),
        }
    }
}

pub use crate::stats::poisson::poisson_cdf;

/// Exact upper limit on the signal mean s for n observed events and a known
/// expected background b.
///
/// # Formula
/// With α = 1 − CL and P(n | μ) = P(k ≤ n | μ):
/// - classical: P(n | s_up + b) = α; s_up = 0 when P(n | b) ≤ α;
/// - CLs: P(n | s_up + b) / P(n | b) = α.
///
/// For b = 0 both give the classical Poisson limits (2.303 at 90 % CL for
/// n = 0). The CLs limit is the statistics stage's exact method
/// ([`crate::stats::event_limit`] with [`Method::Exact`], Brent's method to
/// 10⁻¹⁰ events); the classical limit, which the statistics stage does not
/// offer, is solved here by bisection to 10⁻¹² relative, with the same
/// Poisson cumulative probability ([`poisson_cdf`]).
///
/// # Units
/// b and the result in events.
///
/// # References
/// Classical: J. Neyman, Phil. Trans. R. Soc. A 236 (1937) 333; the table
/// of upper limits in the PDG Review "Statistics" (REFERENCES.md §1). CLs:
/// A. L. Read, J. Phys. G 28 (2002) 2693; T. Junk, NIM A434 (1999) 435.
pub fn poisson_upper_limit(
    observed: u64,
    background: f64,
    cl: f64,
    method: PoissonMethod,
) -> Result<f64, DirectError> {
    let ctx = "poisson upper limit";
    require_non_negative(ctx, "background", background, "events")?;
    if !(cl > 0.0 && cl < 1.0) {
        return Err(DirectError::invalid(
            ctx,
            format!("cl must be in (0, 1), got {cl}"),
        ));
    }
    match method {
        PoissonMethod::Cls => cls_upper_limit(observed, background, cl),
        PoissonMethod::Classical => classical_upper_limit(observed, background, 1.0 - cl),
    }
}

/// Exact CLs limit on the signal events from the statistics stage: the
/// limit on μ for a signal of one event with known background.
fn cls_upper_limit(observed: u64, background: f64, cl: f64) -> Result<f64, DirectError> {
    let opts = LimitOptions {
        cl,
        method: Method::Exact,
        constraint: BackgroundConstraint::Gaussian,
    };
    crate::stats::event_limit(observed, background, 0.0, &opts)
        .map(|limit| limit.mu_up_observed)
        .map_err(|source| DirectError::Stats {
            context: format!(
                "poisson upper limit (CLs, n = {observed}, b = {background} events, cl = {cl})"
            ),
            source,
        })
}

/// Classical (Neyman) limit: the s ≥ 0 with P(k ≤ n | s + b) = α, or 0 when
/// P(k ≤ n | b) ≤ α; bisection to 10⁻¹² relative.
fn classical_upper_limit(observed: u64, background: f64, alpha: f64) -> Result<f64, DirectError> {
    let ctx = "poisson upper limit";
    let excess = |s: f64| poisson_cdf(observed, s + background) - alpha;
    let at_zero = excess(0.0);
    if at_zero.is_nan() {
        return Err(DirectError::invalid(
            ctx,
            format!("P(k <= {observed} | b = {background}) cannot be evaluated"),
        ));
    }
    if at_zero <= 0.0 {
        return Ok(0.0);
    }
    let n = observed as f64;
    let mut hi = n + 10.0 * (n + background).sqrt() + 10.0;
    let mut tries = 0;
    while excess(hi) > 0.0 {
        hi *= 2.0;
        tries += 1;
        if tries > 200 || !hi.is_finite() {
            return Err(DirectError::invalid(
                ctx,
                format!("cannot bracket the limit for n = {observed}, b = {background} events"),
            ));
        }
    }
    let mut lo = 0.0;
    while hi - lo > 1e-12 * hi {
        let mid = 0.5 * (lo + hi);
        if excess(mid) > 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    Ok(0.5 * (lo + hi))
}

/// Median of the Poisson distribution of mean b: the smallest n with
/// P(k ≤ n | b) ≥ ½ (the background-only median count used for the median
/// expected limit).
///
/// # Units
/// b in events (finite, ≥ 0).
pub fn median_expected_count(background: f64) -> u64 {
    // The median lies in [b − ln 2, b + 1/3] (K. P. Choi, Proc. AMS 121
    // (1994) 245; memory), so a few candidates suffice.
    let mut n = (background - std::f64::consts::LN_2).floor().max(0.0) as u64;
    while poisson_cdf(n, background) < 0.5 && (n as f64) < background + 2.0 {
        n += 1;
    }
    n
}

/// Which limit a curve shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
pub enum LimitKind {
    /// From the observed count.
    Observed,
    /// From the median background-only count ("reach").
    MedianExpected,
}

impl LimitKind {
    /// Label: `observed` or `expected`.
    pub fn label(self) -> &'static str {
        match self {
            LimitKind::Observed => "observed",
            LimitKind::MedianExpected => "expected",
        }
    }
}

/// One point of a limit curve.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct CurvePoint {
    /// WIMP mass \[GeV\].
    pub m_dm_gev: f64,
    /// Upper limit on the DM–nucleon cross-section \[cm²\] (+∞ without sensitivity).
    pub sigma_cm2: f64,
    /// Expected signal events at `sigma_cm2` (the signal upper limit; 0 without sensitivity).
    pub expected_counts_at_sigma: f64,
    /// Expected signal events per cm² of cross-section [events/cm²].
    pub events_per_cm2: f64,
}

/// Cross-section at which the expected counts are computed; counts are
/// linear in σ, so any value works — this one keeps them O(1).
const REFERENCE_SIGMA_CM2: f64 = 1e-40;

/// Limit curve σ_lim(m_χ) of an experiment with its confidence level and
/// Poisson method, for the observed or the median expected count.
///
/// # Formula
/// σ_lim(m) = s_up / (N(m, σ_ref)/σ_ref), s_up from [`poisson_upper_limit`]
/// with n = observed (or the median of Poisson(b)), N from
/// [`Experiment::expected_counts`].
///
/// # Units
/// Masses in GeV (finite, > 0); σ in cm².
///
/// Masses are evaluated in parallel; each point is independent, so the
/// result is identical on any number of threads.
pub fn limit_curve_points(
    experiment: &Experiment,
    masses_gev: &[f64],
    interaction: Interaction,
    kind: LimitKind,
) -> Result<Vec<CurvePoint>, DirectError> {
    let s_up = signal_upper_limit(experiment, kind)?;
    let per_cm2 = events_per_cm2(experiment, masses_gev, interaction)?;
    Ok(points_from(masses_gev, &per_cm2, s_up))
}

/// The observed and the median expected curves together (the expected
/// counts are computed once); see [`limit_curve_points`].
pub fn limit_curve_points_both(
    experiment: &Experiment,
    masses_gev: &[f64],
    interaction: Interaction,
) -> Result<(Vec<CurvePoint>, Vec<CurvePoint>), DirectError> {
    let s_obs = signal_upper_limit(experiment, LimitKind::Observed)?;
    let s_exp = signal_upper_limit(experiment, LimitKind::MedianExpected)?;
    let per_cm2 = events_per_cm2(experiment, masses_gev, interaction)?;
    Ok((
        points_from(masses_gev, &per_cm2, s_obs),
        points_from(masses_gev, &per_cm2, s_exp),
    ))
}

/// Upper limit on the signal events of an experiment with its CL and
/// method, from the observed count or the median background-only count.
///
/// # Units
/// Events.
pub fn signal_upper_limit(experiment: &Experiment, kind: LimitKind) -> Result<f64, DirectError> {
    let n = match kind {
        LimitKind::Observed => experiment.observed_events(),
        LimitKind::MedianExpected => median_expected_count(experiment.background_events()),
    };
    poisson_upper_limit(
        n,
        experiment.background_events(),
        experiment.cl(),
        experiment.method(),
    )
}

/// Expected signal events per cm² at each mass, in parallel (each mass
/// independent, so identical on any number of threads).
fn events_per_cm2(
    experiment: &Experiment,
    masses_gev: &[f64],
    interaction: Interaction,
) -> Result<Vec<f64>, DirectError> {
    if let Some(bad) = masses_gev.iter().find(|m| !(m.is_finite() && **m > 0.0)) {
        return Err(DirectError::invalid(
            "limit curve",
            format!("masses must be finite and > 0, got {bad} GeV"),
        ));
    }
    masses_gev
        .par_iter()
        .map(|&m| {
            Ok(
                experiment.expected_counts(m, REFERENCE_SIGMA_CM2, interaction)?
                    / REFERENCE_SIGMA_CM2,
            )
        })
        .collect()
}

/// Curve points from the per-cm² counts and the signal limit.
fn points_from(masses_gev: &[f64], per_cm2: &[f64], s_up: f64) -> Vec<CurvePoint> {
    masses_gev
        .iter()
        .zip(per_cm2)
        .map(|(&m, &per_cm2)| {
            let (sigma, at_sigma) = if per_cm2 > 0.0 {
                (s_up / per_cm2, s_up)
            } else {
                (f64::INFINITY, 0.0)
            };
            CurvePoint {
                m_dm_gev: m,
                sigma_cm2: sigma,
                expected_counts_at_sigma: at_sigma,
                events_per_cm2: per_cm2,
            }
        })
        .collect()
}

/// Observed limit curve as (m_χ \[GeV\], σ_lim \[cm²\]) pairs, in the order of
/// `masses_gev` (see [`limit_curve_points`]).
pub fn limit_curve(
    experiment: &Experiment,
    masses_gev: &[f64],
    interaction: Interaction,
) -> Result<Vec<(f64, f64)>, DirectError> {
    Ok(
        limit_curve_points(experiment, masses_gev, interaction, LimitKind::Observed)?
            .into_iter()
            .map(|p| (p.m_dm_gev, p.sigma_cm2))
            .collect(),
    )
}

/// `n` masses evenly spaced in log m from `min_gev` to `max_gev` (both included).
///
/// # Units
/// GeV.
pub fn log_mass_grid(min_gev: f64, max_gev: f64, n: usize) -> Result<Vec<f64>, DirectError> {
    if !(min_gev.is_finite() && max_gev.is_finite() && min_gev > 0.0 && max_gev > min_gev) {
        return Err(DirectError::invalid(
            "mass grid",
            format!("need 0 < min < max (finite), got min {min_gev} GeV, max {max_gev} GeV"),
        ));
    }
    if n < 2 {
        return Err(DirectError::invalid(
            "mass grid",
            format!("need at least 2 points, got {n}"),
        ));
    }
    let ratio = max_gev / min_gev;
    let mut grid: Vec<f64> = (0..n)
        .map(|k| min_gev * ratio.powf(k as f64 / (n - 1) as f64))
        .collect();
    grid[n - 1] = max_gev; // invariant: n >= 2 checked above
    Ok(grid)
}

/// Reads a limit curve from CSV: a header containing `m_dm_gev` and
/// `sigma_cm2` (other columns ignored), at least one row, masses finite and
/// positive, cross-sections positive (+∞ allowed for no sensitivity).
/// Points keep their file order.
///
/// # Units
/// m_χ in GeV, σ in cm², as the column names state.
pub fn read_curve_csv(path: &Path) -> Result<Vec<(f64, f64)>, DirectError> {
    let rows = read_two_columns(path, "m_dm_gev", "sigma_cm2")?;
    let csv_err = |line: u64, message: String| DirectError::Csv {
        path: path.to_path_buf(),
        line,
        message,
    };
    if rows.is_empty() {
        return Err(csv_err(1, "no data rows after the header".into()));
    }
    rows.into_iter()
        .map(|(line, m, s)| {
            if !(m.is_finite() && m > 0.0) {
                return Err(csv_err(
                    line,
                    format!("m_dm_gev must be finite and > 0, got {m} GeV"),
                ));
            }
            if s.is_nan() || s <= 0.0 {
                return Err(csv_err(line, format!("sigma_cm2 must be > 0, got {s} cm²")));
            }
            Ok((m, s))
        })
        .collect()
}

/// Cross-section of a curve at mass `m_gev` by linear interpolation in
/// (log m, log σ); `None` outside the curve's mass range or where a
/// neighbouring point has σ = +∞. Points are sorted by mass first.
///
/// # Units
/// m in GeV, σ in cm².
pub fn interpolate_curve(curve: &[(f64, f64)], m_gev: f64) -> Option<f64> {
    let mut pts: Vec<(f64, f64)> = curve.to_vec();
    pts.sort_by(|a, b| a.0.total_cmp(&b.0));
    let i = pts.partition_point(|p| p.0 < m_gev);
    let hi = *pts.get(i)?;
    if hi.0 == m_gev {
        return hi.1.is_finite().then_some(hi.1);
    }
    let lo = *pts.get(i.checked_sub(1)?)?;
    if !(lo.1.is_finite() && hi.1.is_finite()) {
        return None;
    }
    let t = (m_gev / lo.0).ln() / (hi.0 / lo.0).ln();
    Some((lo.1.ln() + t * (hi.1 / lo.1).ln()).exp())
}
