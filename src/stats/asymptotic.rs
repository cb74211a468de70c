//! Asymptotic CLs with the Asimov data set: observed CLs, the expected
//! median and ±1σ, ±2σ bands, and the upper limits on μ.
//!
//! Fed by a [`CountingModel`]; the Asimov data set is the background-only
//! one at nominal nuisance parameters, so expected limits do not depend on
//! the observation.

use statrs::function::erf::erfc;

use super::StatsError;
use super::likelihood::{CountingModel, Data, Fit};
use super::root::solve_decreasing_positive_from;

/// Standard normal cumulative distribution Φ(x) = ½ erfc(−x/√2).
///
/// # References
/// M. Abramowitz, I. A. Stegun (1964), Eq. 26.2.29.
pub fn norm_cdf(x: f64) -> f64 {
    0.5 * erfc(-x / std::f64::consts::SQRT_2)
}

/// Standard normal survival function 1 − Φ(x) = ½ erfc(x/√2), accurate in
/// the upper tail.
///
/// # References
/// M. Abramowitz, I. A. Stegun (1964), Eq. 26.2.29.
pub fn norm_sf(x: f64) -> f64 {
    0.5 * erfc(x / std::f64::consts::SQRT_2)
}

/// Inverse of the survival function: x with 1 − Φ(x) = p, p in (0, 1).
///
/// # References
/// Φ⁻¹ via the inverse complementary error function, x = √2 erfc⁻¹(2p)
/// (Abramowitz & Stegun (1964), Eq. 26.2.29 inverted).
pub fn inverse_norm_sf(p: f64) -> f64 {
    std::f64::consts::SQRT_2 * statrs::function::erf::erfc_inv(2.0 * p)
}

/// CL_{s+b}, CL_b and their ratio CLs.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ClsValues {
    /// CLs = CL_{s+b} / CL_b.
    pub cls: f64,
    /// CL_{s+b}: p-value of the signal-plus-background hypothesis.
    pub clsb: f64,
    /// CL_b: one minus the p-value of the background-only hypothesis.
    pub clb: f64,
}

/// Asymptotic CLs from the observed q̃_μ and its Asimov value q_A.
///
/// # Formula
/// If q̃ ≤ q_A: CL_{s+b} = 1 − Φ(√q̃), CL_b = Φ(√q_A − √q̃);
/// else CL_{s+b} = 1 − Φ((q̃ + q_A)/(2√q_A)), CL_b = 1 − Φ((q̃ − q_A)/(2√q_A)).
/// With q_A = 0 (no sensitivity) CLs = 1.
///
/// # Units
/// Dimensionless.
///
/// # References
/// G. Cowan, K. Cranmer, E. Gross, O. Vitells, EPJC 71 (2011) 1554,
/// arXiv:1007.1727, Eqs. (57), (59) (p-values of q̃_μ).
pub fn asymptotic_cls(q: f64, q_a: f64) -> ClsValues {
    if q_a.is_nan() || q_a <= 0.0 {
        return ClsValues {
            cls: 1.0,
            clsb: 1.0,
            clb: 1.0,
        };
    }
    let sq = q.max(0.0).sqrt();
    let sqa = q_a.sqrt();
    let (clsb, clb) = if q <= q_a {
        (norm_sf(sq), norm_cdf(sqa - sq))
    } else {
        (
            norm_sf((q + q_a) / (2.0 * sqa)),
            norm_sf((q - q_a) / (2.0 * sqa)),
        )
    };
    let cls = if clb > 0.0 {
        (clsb / clb).min(1.0)
    } else {
        0.0
    };
    ClsValues { cls, clsb, clb }
}

/// Expected CLs of band order N from the Asimov q_A.
///
/// # Formula
/// CLs_exp(N) = [1 − Φ(√q_A − N)] / Φ(N); the limit solves CLs_exp = α, i.e.
/// μ_up,N / σ = N + Φ⁻¹(1 − α Φ(N)) with σ² = μ²/q_A.
///
/// # Units
/// Dimensionless.
///
/// # References
/// G. Cowan, K. Cranmer, E. Gross, O. Vitells, EPJC 71 (2011) 1554,
/// arXiv:1007.1727, Eqs. (88)–(89).
pub fn expected_cls(q_a: f64, n_sigma: f64) -> f64 {
    if q_a.is_nan() || q_a <= 0.0 {
        return 1.0;
    }
    (norm_sf(q_a.sqrt() - n_sigma) / norm_cdf(n_sigma)).min(1.0)
}

/// The asymptotic calculator for one model and its observation.
#[derive(Debug)]
pub struct Asymptotic<'a> {
    model: &'a CountingModel,
    observed: Data,
    free: Fit,
    asimov: Data,
}

impl<'a> Asymptotic<'a> {
    /// Fits the observed data once (μ̂, θ̂) and builds the background-only
    /// Asimov data set.
    pub fn new(model: &'a CountingModel) -> Result<Self, StatsError> {
        let observed = model.observed_data();
        let free = model.fit_free(&observed)?;
        Ok(Self {
            model,
            observed,
            free,
            asimov: model.asimov_data(0.0),
        })
    }

    /// Observed q̃_μ.
    pub fn q_observed(&self, mu: f64) -> Result<f64, StatsError> {
        self.model.q_tilde_with(mu, &self.observed, &self.free)
    }

    /// q̃_μ on the background-only Asimov data set, q_A(μ); the free fit of
    /// that data set is μ̂ = 0 at nominal nuisances with −ln L = 0.
    pub fn q_asimov(&self, mu: f64) -> Result<f64, StatsError> {
        let cond = self.model.fit_conditional(mu, &self.asimov)?;
        Ok((2.0 * cond.nll).max(0.0))
    }

    /// Observed CLs at μ.
    pub fn cls(&self, mu: f64) -> Result<ClsValues, StatsError> {
        Ok(asymptotic_cls(self.q_observed(mu)?, self.q_asimov(mu)?))
    }

    /// A starting point for the limit search: 2σ of the total expected
    /// count over the signal.
    fn guess(&self) -> f64 {
        let b: f64 = self.asimov.counts.iter().sum();
        let n: f64 = self.observed.counts.iter().sum();
        (2.0 + 2.0 * b.max(n).sqrt()) / self.model.total_signal()
    }

    /// Observed upper limit on μ: CLs(μ) = α, searched from `guess`
    /// (e.g. the median expected limit) or from a rough scale if `None`.
    pub fn observed_limit_from(&self, alpha: f64, guess: Option<f64>) -> Result<f64, StatsError> {
        let (start, factor) = match guess {
            Some(g) if g.is_finite() && g > 0.0 => (g, 1.3),
            _ => (self.guess(), 2.0),
        };
        solve_decreasing_positive_from(
            |mu| Ok(self.cls(mu)?.cls - alpha),
            start,
            factor,
            1e-7,
            "asymptotic observed limit on μ",
        )
    }

    /// Observed upper limit on μ: CLs(μ) = α.
    pub fn observed_limit(&self, alpha: f64) -> Result<f64, StatsError> {
        self.observed_limit_from(alpha, None)
    }

    /// Expected upper limits on μ at N = −2, −1, 0, +1, +2.
    ///
    /// The median is found first; each band then starts from the median
    /// scaled by the Gaussian ratio (N + Φ⁻¹(1 − αΦ(N)))/Φ⁻¹(1 − α/2)
    /// (CCGV Eq. (89)), which only speeds up the search.
    pub fn expected_limits(&self, alpha: f64) -> Result<[f64; 5], StatsError> {
        let solve = |n_sigma: f64, start: f64, factor: f64| {
            solve_decreasing_positive_from(
                |mu| Ok(expected_cls(self.q_asimov(mu)?, n_sigma) - alpha),
                start,
                factor,
                1e-7,
                "asymptotic expected limit on μ",
            )
        };
        let median = solve(0.0, self.guess(), 2.0)?;
        let z = |n: f64| n + inverse_norm_sf(alpha * norm_cdf(n));
        let mut out = [median; 5];
        for (slot, n_sigma) in out.iter_mut().zip(-2..=2) {
            let n_sigma = f64::from(n_sigma);
            if n_sigma != 0.0 {
                *slot = solve(n_sigma, median * z(n_sigma) / z(0.0), 1.1)?;
            }
        }
        Ok(out)
    }
}
