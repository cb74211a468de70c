//! Median discovery significance of a counting experiment, with and
//! without background uncertainty.

use super::StatsError;

fn check(name: &str, v: f64, strictly_positive: bool) -> Result<(), StatsError> {
    if !v.is_finite() || v < 0.0 || (strictly_positive && v == 0.0) {
        let rule = if strictly_positive { "> 0" } else { "≥ 0" };
        return Err(StatsError::InvalidInput(format!(
            "discovery significance: {name} must be finite and {rule} events, got {v}"
        )));
    }
    Ok(())
}

/// Median discovery significance Z_A for known background.
///
/// # Formula
/// Z_A = √(2[(s + b) ln(1 + s/b) − s]), s signal and b background counts.
///
/// # Units
/// s, b in events; Z in standard deviations.
///
/// # References
/// G. Cowan, K. Cranmer, E. Gross, O. Vitells, EPJC 71 (2011) 1554,
/// arXiv:1007.1727, Eq. (97).
pub fn discovery_significance(s: f64, b: f64) -> Result<f64, StatsError> {
    check("signal", s, false)?;
    check("background", b, true)?;
    Ok((2.0 * ((s + b) * (s / b).ln_1p() - s)).max(0.0).sqrt())
}

/// Median discovery significance with an absolute background uncertainty.
///
/// # Formula
/// Z = √(2[(s+b) ln((s+b)(b+σ_b²)/(b²+(s+b)σ_b²)) − (b²/σ_b²) ln(1 + σ_b² s/(b(b+σ_b²)))]);
/// Z → Z_A as σ_b → 0.
///
/// # Units
/// s, b, σ_b in events; Z in standard deviations.
///
/// # References
/// T.-P. Li, Y.-Q. Ma, ApJ 272 (1983) 317, Eq. (17) (on/off form);
/// G. Cowan, K. Cranmer, E. Gross, O. Vitells, EPJC 71 (2011) 1554 (Asimov
/// evaluation); K. Cranmer, public notes on fast Asimov estimates
/// (s = 50, b = 100, σ_b = 7 gives 3.72σ).
pub fn discovery_significance_with_unc(s: f64, b: f64, sigma_b: f64) -> Result<f64, StatsError> {
    check("signal", s, false)?;
    check("background", b, true)?;
    check("background uncertainty", sigma_b, false)?;
    if sigma_b == 0.0 {
        return discovery_significance(s, b);
    }
    let v = sigma_b * sigma_b;
    let t1 = (s + b) * ((s + b) * (b + v) / (b * b + (s + b) * v)).ln();
    let t2 = (b * b / v) * (v * s / (b * (b + v))).ln_1p();
    Ok((2.0 * (t1 - t2)).max(0.0).sqrt())
}
