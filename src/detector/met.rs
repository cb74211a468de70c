//! Missing transverse momentum: minus the vector sum of the reconstructed
//! visible objects in the calorimeter acceptance, plus a Gaussian soft
//! term.
//!
//! Used by [`crate::detector::Detector::reconstruct`]; the definition is
//! stated in full in the [`crate::detector`] module docs.

/// Width of the soft-term smearing of each p_T^miss component.
///
/// # Formula
/// σ = A ⊕ B·√ΣE_T = √(A² + B²·ΣE_T), applied independently to the x and
/// y components; ΣE_T is the scalar sum of the transverse energies of the
/// objects entering p_T^miss.
///
/// # Units
/// `sum_et_gev` (ΣE_T) in GeV, `a_gev` (A) in GeV, `b_sqrt_gev` (B) in
/// √GeV, result in GeV. A negative ΣE_T is treated as 0.
///
/// # References
/// The √ΣE_T scaling of the missing-momentum resolution is the usual
/// parametrisation of the LHC experiments' performance papers, e.g. ATLAS
/// Collaboration, "Performance of missing transverse momentum
/// reconstruction in proton-proton collisions at 7 TeV with ATLAS",
/// EPJC 72 (2012) 1844, arXiv:1108.5602 (σ = k·√ΣE_T; from memory).
pub fn soft_term_sigma(sum_et_gev: f64, a_gev: f64, b_sqrt_gev: f64) -> f64 {
    (a_gev * a_gev + b_sqrt_gev * b_sqrt_gev * sum_et_gev.max(0.0)).sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn soft_term_in_quadrature() {
        // A = 8 GeV, B = 0.5 √GeV, ΣE_T = 400 GeV: √(64 + 0.25·400) =
        // √164 = 12.806248 GeV (hand arithmetic).
        let s = soft_term_sigma(400.0, 8.0, 0.5);
        assert!((s - 12.806_248).abs() < 1e-6, "{s}");
        assert_eq!(soft_term_sigma(-5.0, 3.0, 1.0), 3.0);
    }
}
