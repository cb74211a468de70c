//! Nuclear form factors: the Helm form factor for spin-independent
//! scattering and a thin-shell approximation for spin-dependent scattering.
//!
//! Fed by [`crate::direct::nuclei`] (mass numbers); used by
//! [`crate::direct::rate`].

use crate::units::{HBARC_GEV_FM, KEV_PER_GEV};

/// Helm skin thickness s = 0.9 fm.
///
/// # References
/// J. D. Lewin, P. F. Smith, Astropart. Phys. 6 (1996) 87, Sec. 4 (memory; REFERENCES.md §5).
pub const HELM_SKIN_FM: f64 = 0.9;

/// Helm parameter a = 0.52 fm.
///
/// # References
/// J. D. Lewin, P. F. Smith, Astropart. Phys. 6 (1996) 87, Sec. 4 (memory; REFERENCES.md §5).
pub const HELM_A_FM: f64 = 0.52;

/// First positive zero of the spherical Bessel function j₁, x = 4.493409457909064
/// (root of tan x = x; computed with scipy 1.17.1 `spherical_jn`).
pub const J1_FIRST_ZERO: f64 = 4.493_409_457_909_064;

/// Momentum transfer q = √(2 m_T E_R) of a nuclear recoil, in fm⁻¹.
///
/// # Formula
/// q = √(2 m_T E_R) / (ħc), m_T the nuclear mass, E_R the recoil energy.
///
/// # Units
/// E_R in keV, m_T in GeV, result in fm⁻¹.
///
/// # References
/// Non-relativistic elastic kinematics (common practice, no source).
pub fn momentum_transfer_fm(e_kev: f64, mass_gev: f64) -> f64 {
    (2.0 * mass_gev * e_kev.max(0.0) / KEV_PER_GEV).sqrt() / HBARC_GEV_FM
}

/// Effective nuclear radius of the Helm form factor.
///
/// # Formula
/// r_n² = c² + (7/3) π² a² − 5 s², c = 1.23 A^{1/3} − 0.60 fm, a = 0.52 fm, s = 0.9 fm.
///
/// # Units
/// A dimensionless; result in fm.
///
/// # References
/// J. D. Lewin, P. F. Smith, Astropart. Phys. 6 (1996) 87, Sec. 4, the
/// fit of r_n (memory, equation number not re-read: Eq. (4.11) as recalled;
/// REFERENCES.md §5).
pub fn helm_radius_fm(a: u32) -> f64 {
    let c = 1.23 * f64::from(a).cbrt() - 0.60;
    let pi2 = std::f64::consts::PI.powi(2);
    (c * c + 7.0 / 3.0 * pi2 * HELM_A_FM * HELM_A_FM - 5.0 * HELM_SKIN_FM * HELM_SKIN_FM).sqrt()
}

/// The Helm form factor F(q) (normalised to F(0) = 1; may be negative
/// beyond its first zero).
///
/// # Formula
/// F(q) = 3 j₁(q r_n)/(q r_n) · exp(−(q s)²/2), j₁(x) = sin x/x² − cos x/x,
/// r_n from [`helm_radius_fm`], s = 0.9 fm. For q r_n < 0.1 the series
/// 3 j₁(x)/x = 1 − x²/10 + x⁴/280 − x⁶/15120 avoids cancellation.
///
/// # Units
/// q in fm⁻¹; A dimensionless; F dimensionless.
///
/// # References
/// R. H. Helm, Phys. Rev. 104 (1956) 1466; J. D. Lewin, P. F. Smith,
/// Astropart. Phys. 6 (1996) 87, Sec. 4 (memory, equation number not
/// re-read: Eq. (4.7) as recalled; REFERENCES.md §5).
pub fn helm(q_fm: f64, a: u32) -> f64 {
    helm_with_radius(q_fm, helm_radius_fm(a))
}

/// [`helm`] with the radius r_n \[fm\] given (precomputed per isotope).
pub fn helm_with_radius(q_fm: f64, rn_fm: f64) -> f64 {
    let envelope = (-(q_fm * HELM_SKIN_FM).powi(2) / 2.0).exp();
    three_j1_over_x(q_fm * rn_fm) * envelope
}

/// 3 j₁(x)/x with a series near x = 0.
fn three_j1_over_x(x: f64) -> f64 {
    if x.abs() < 0.1 {
        let x2 = x * x;
        1.0 - x2 / 10.0 + x2 * x2 / 280.0 - x2 * x2 * x2 / 15_120.0
    } else {
        3.0 * (x.sin() - x * x.cos()) / (x * x * x)
    }
}

/// Squared spin-dependent form factor in the thin-shell approximation
/// (an approximation, stated as such: it ignores the separate proton and
/// neutron structure functions of shell-model calculations).
///
/// # Formula
/// With x = q r_n (r_n from [`helm_radius_fm`]):
/// F²(q) = j₀²(x) for x < 2.55 or x > 4.5, and F² = 0.047 for
/// 2.55 ≤ x ≤ 4.5, j₀(x) = sin x / x. (0.047 ≈ j₀²(2.55) ≈ j₀²(4.5), so F²
/// is continuous to 2 %.)
///
/// # Units
/// q in fm⁻¹; A dimensionless; F² dimensionless.
///
/// # References
/// J. D. Lewin, P. F. Smith, Astropart. Phys. 6 (1996) 87, Sec. 4.3, the
/// "thin shell" form factor for odd-group spin-dependent scattering
/// (memory). Lewin & Smith quote their own r_n for it; using the Helm r_n
/// here is this crate's choice.
pub fn spin_dependent_squared(q_fm: f64, a: u32) -> f64 {
    spin_dependent_squared_with_radius(q_fm, helm_radius_fm(a))
}

/// [`spin_dependent_squared`] with the radius r_n \[fm\] given.
pub fn spin_dependent_squared_with_radius(q_fm: f64, rn_fm: f64) -> f64 {
    let x = q_fm * rn_fm;
    if (2.55..=4.5).contains(&x) {
        0.047
    } else if x.abs() < 1e-4 {
        1.0 - x * x / 3.0
    } else {
        (x.sin() / x).powi(2)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn thin_shell_is_continuous_to_two_percent() {
        // Lewin & Smith 1996 Sec. 4.3 (memory): the constant joins j₀².
        let rn = helm_radius_fm(73);
        for x in [2.55_f64, 4.5] {
            let below = spin_dependent_squared((x - 1e-9) / rn, 73);
            let above = spin_dependent_squared((x + 1e-9) / rn, 73);
            assert!(
                (below - above).abs() / 0.047 < 0.02,
                "x = {x}: {below} vs {above}"
            );
        }
        assert_eq!(spin_dependent_squared(0.0, 73), 1.0);
    }

    #[test]
    fn series_joins_closed_form() {
        // Same function two ways (no source needed): series vs closed form at x = 0.1.
        let x: f64 = 0.1;
        let closed = 3.0 * (x.sin() - x * x.cos()) / (x * x * x);
        assert!((three_j1_over_x(0.099_999_999) - closed).abs() < 1e-9);
    }
}
