//! Exact CLs for one counting region with known background.
//!
//! For a single bin with known background the likelihood-ratio test
//! statistic is monotone in the observed count, so the CLs p-values are
//! Poisson cumulative probabilities.

use super::StatsError;
use super::asymptotic::norm_cdf;
use super::root::solve_decreasing_positive;

/// Poisson cumulative probability P(k ≤ n | λ).
///
/// # Formula
/// P(k ≤ n | λ) = Σ_{k=0}^{n} e^{−λ} λ^k / k! = Q(n+1, λ), with Q the
/// regularised upper incomplete gamma function; P(k ≤ n | 0) = 1.
///
/// # Units
/// λ and n in events; the result is a probability.
///
/// # References
/// M. Abramowitz, I. A. Stegun, "Handbook of Mathematical Functions" (1964),
/// Eq. 26.4.21 (Poisson sums and the incomplete gamma function).
pub fn poisson_cdf(n: u64, lambda: f64) -> f64 {
    if lambda <= 0.0 {
        return 1.0;
    }
    statrs::function::gamma::checked_gamma_ur(n as f64 + 1.0, lambda).unwrap_or(0.0)
}

/// Exact CLs for `n` observed events, signal `s` and known background `b`.
///
/// # Formula
/// CLs(s) = CL_{s+b} / CL_b = P(k ≤ n | s + b) / P(k ≤ n | b).
///
/// # Units
/// s, b in events; the result is a ratio of probabilities.
///
/// # References
/// A. L. Read, J. Phys. G 28 (2002) 2693, Eq. (6); T. Junk, NIM A434 (1999)
/// 435, hep-ex/9902006.
pub fn exact_cls(n: u64, s: f64, b: f64) -> f64 {
    let clb = poisson_cdf(n, b);
    if clb > 1e-250 {
        return (poisson_cdf(n, s + b) / clb).min(1.0);
    }
    // Far lower tail: the ratio of logarithms stays finite.
    (ln_poisson_cdf_lower_tail(n, s + b) - ln_poisson_cdf_lower_tail(n, b))
        .exp()
        .min(1.0)
}

/// ln P(k ≤ n | λ) for n well below λ, where P itself underflows.
///
/// # Formula
/// ln P = ln p(n) + ln Σ_{j≥0} p(n−j)/p(n), with ln p(k) = k ln λ − λ −
/// ln Γ(k+1) and p(k−1)/p(k) = k/λ < 1, summed until the terms fall below
/// 10⁻¹⁷ of the sum.
///
/// # Units
/// λ in events.
///
/// # References
/// Direct summation of the Poisson probabilities (common practice, no
/// single source).
fn ln_poisson_cdf_lower_tail(n: u64, lambda: f64) -> f64 {
    let nf = n as f64;
    let ln_pn = nf * lambda.ln() - lambda - statrs::function::gamma::ln_gamma(nf + 1.0);
    let mut sum = 1.0;
    let mut term = 1.0;
    let mut k = n;
    while k > 0 {
        term *= k as f64 / lambda;
        sum += term;
        if term < 1e-17 * sum {
            break;
        }
        k -= 1;
    }
    ln_pn + sum.ln()
}

/// Exact CLs upper limit on the signal count: the s with CLs(s) = α.
///
/// For n = 0 this is s_up = −ln α for every b (ln 20 = 2.9957 at 95 % CL).
///
/// # Formula
/// Solve P(k ≤ n | s + b) / P(k ≤ n | b) = α for s ≥ 0.
///
/// # Units
/// b and the result in events; α = 1 − CL.
///
/// # References
/// A. L. Read, J. Phys. G 28 (2002) 2693; for n = 0, G. Zech, NIM A277
/// (1989) 608 (the limit equals the flat-prior Bayesian one).
pub fn exact_signal_limit(n: u64, b: f64, alpha: f64) -> Result<f64, StatsError> {
    let guess = 3.0 + n as f64 + 2.0 * (n as f64).sqrt();
    solve_decreasing_positive(
        |s| Ok(exact_cls(n, s, b) - alpha),
        guess,
        1e-10,
        "exact CLs limit on the signal count",
    )
}

/// Quantile of the Poisson distribution: the smallest n with
/// P(k ≤ n | λ) ≥ p.
///
/// # Units
/// λ in events; p a probability in (0, 1).
pub fn poisson_quantile(lambda: f64, p: f64) -> u64 {
    // The quantile lies below λ + 40√λ + 40 for any p < 1 − 1e-300;
    // bisection on n keeps the cost logarithmic for large λ.
    let mut lo = 0u64;
    let mut hi = (lambda + 40.0 * lambda.sqrt() + 40.0) as u64;
    if poisson_cdf(lo, lambda) >= p {
        return 0;
    }
    // Invariant: cdf(lo) < p ≤ cdf(hi) (or hi is the cap).
    while hi - lo > 1 {
        let mid = lo + (hi - lo) / 2;
        if poisson_cdf(mid, lambda) >= p {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    hi
}

/// Expected exact upper limits on the signal count at −2σ … +2σ.
///
/// # Formula
/// Under the background-only hypothesis n ~ Poisson(b); the band of order
/// N ∈ {−2, −1, 0, 1, 2} takes n_N, the Poisson quantile at Φ(N), and
/// returns s_up(n_N). Positive N is an upward fluctuation (weaker limit).
///
/// # Units
/// b and the results in events.
///
/// # References
/// Common practice for discrete counts (the median and quantiles of the
/// limit distribution under the background-only hypothesis; no single source).
pub fn exact_expected_signal_limits(b: f64, alpha: f64) -> Result<[f64; 5], StatsError> {
    let mut out = [0.0; 5];
    for (slot, n_sigma) in out.iter_mut().zip(-2..=2) {
        let n = poisson_quantile(b, norm_cdf(f64::from(n_sigma)));
        *slot = exact_signal_limit(n, b, alpha)?;
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cdf_small_values() {
        // P(k ≤ 1 | 2) = 3 e^{−2} = 0.40600584970983811 (closed form).
        assert!((poisson_cdf(1, 2.0) - 3.0 * (-2.0f64).exp()).abs() < 1e-14);
        assert_eq!(poisson_cdf(3, 0.0), 1.0);
    }

    #[test]
    fn far_tail_ratio_is_exp_minus_s() {
        // n = 0: CLs = e^{−s} for any b (REFERENCES.md §1), even when
        // P(0 | b) = e^{−10⁶} underflows.
        assert!((exact_cls(0, 2.0, 1e6) - (-2.0f64).exp()).abs() < 1e-12);
        // n = 1, b = 10⁴: CLs = e^{−s}(1 + s + b)/(1 + b) (closed form).
        let want = (-3.0f64).exp() * (1.0 + 3.0 + 1e4) / (1.0 + 1e4);
        assert!((exact_cls(1, 3.0, 1e4) / want - 1.0).abs() < 1e-10);
    }

    #[test]
    fn quantile_of_poisson() {
        // Median of Poisson(1) is 1: P(0) = 0.368 < 0.5 ≤ P(≤1) = 0.736 (closed form).
        assert_eq!(poisson_quantile(1.0, 0.5), 1);
        assert_eq!(poisson_quantile(0.0, 0.9), 0);
        // Poisson(10): P(≤ 9) = 0.4579, P(≤ 10) = 0.5830 (scipy 1.17.1
        // poisson.cdf), so the median is 10.
        assert_eq!(poisson_quantile(10.0, 0.5), 10);
        // Large λ stays fast and near λ.
        let q = poisson_quantile(1e10, 0.5);
        assert!((q as f64 - 1e10).abs() < 2.0);
    }
}
