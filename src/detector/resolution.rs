//! Energy and momentum resolutions: the calorimeter and tracker forms, the
//! choice of |η| region and the Gaussian smearing of a four-momentum.
//!
//! Used by [`crate::detector::Detector`] with the regions of a
//! [`crate::detector::DetectorProfile`].

use rand::Rng;
use rand_distr::{Distribution, StandardNormal};

use super::measured::Measured;
use super::profile::{CaloRegion, EtaRegion, TrackerRegion};
use crate::kinematics::P4;

/// Relative calorimeter energy resolution σ_E/E.
///
/// # Formula
/// σ_E/E = S/√E ⊕ N/E ⊕ C = √(S²/E + N²/E² + C²), with S the stochastic
/// term, N the noise term, C the constant term and E the true energy.
///
/// # Units
/// `e_gev` (E) and `noise_gev` (N) in GeV, `stochastic_sqrt_gev` (S) in
/// √GeV, `constant` (C) and the result dimensionless. Returns 0 for E ≤ 0.
///
/// # References
/// C. W. Fabjan, F. Gianotti, "Calorimetry for particle physics",
/// Rev. Mod. Phys. 75 (2003) 1243, Eq. (1) (the standard parametrisation;
/// from memory). Values of a general-purpose LHC detector are common
/// practice (see `recasts/detectors/generic-13tev.toml`).
pub fn calo_relative_sigma(
    e_gev: f64,
    stochastic_sqrt_gev: f64,
    noise_gev: f64,
    constant: f64,
) -> f64 {
    if e_gev <= 0.0 {
        return 0.0;
    }
    (stochastic_sqrt_gev * stochastic_sqrt_gev / e_gev
        + noise_gev * noise_gev / (e_gev * e_gev)
        + constant * constant)
        .sqrt()
}

/// Relative tracker transverse-momentum resolution σ_pT/pT.
///
/// # Formula
/// σ_pT/pT = a ⊕ b·pT = √(a² + (b·pT)²), with a the multiple-scattering
/// term and b the curvature (sagitta) term.
///
/// # Units
/// `pt_gev` in GeV, `a` dimensionless, `b_per_gev` in GeV⁻¹, result
/// dimensionless.
///
/// # References
/// PDG Review of Particle Physics, "Passage of particles through matter"
/// and "Particle detectors at accelerators" (momentum measurement in a
/// solenoid: curvature term ∝ pT, multiple scattering constant); the
/// quadrature form is common practice (from memory).
pub fn tracker_relative_sigma(pt_gev: f64, a: f64, b_per_gev: f64) -> f64 {
    let bp = b_per_gev * pt_gev;
    (a * a + bp * bp).sqrt()
}

/// A resolution region that can give σ/x for an object.
pub trait Resolution: EtaRegion {
    /// Relative resolution of the measured quantity (E or pT) for an
    /// object of energy `e_gev` and transverse momentum `pt_gev` [GeV].
    fn relative_sigma(&self, e_gev: f64, pt_gev: f64) -> f64;
}

impl Resolution for CaloRegion {
    fn relative_sigma(&self, e_gev: f64, _pt_gev: f64) -> f64 {
        calo_relative_sigma(
            e_gev,
            self.stochastic_sqrt_gev,
            self.noise_gev,
            self.constant,
        )
    }
}

impl Resolution for TrackerRegion {
    fn relative_sigma(&self, _e_gev: f64, pt_gev: f64) -> f64 {
        tracker_relative_sigma(pt_gev, self.a, self.b_per_gev)
    }
}

/// The region containing `abs_eta` (lower bound inclusive, upper
/// exclusive), if any.
pub fn region_for<R: EtaRegion>(regions: &[R], abs_eta: f64) -> Option<&R> {
    regions.iter().find(|r| {
        let (lo, hi) = r.bounds();
        abs_eta >= lo && abs_eta < hi
    })
}

/// Smears the magnitude of an object at fixed direction: all four
/// components are multiplied by 1 + (σ/x)·g with g standard normal, which
/// keeps η, φ and m/E. The region is chosen by the object's true |η|.
/// Returns `None` when the object is outside every region or the factor is
/// ≤ 0 (the object is lost). No random number is drawn when σ/x = 0, so a
/// perfect resolution returns the object unchanged.
pub fn smear_magnitude<R: Resolution, G: Rng + ?Sized>(
    regions: &[R],
    object: &Measured,
    rng: &mut G,
) -> Option<Measured> {
    let region = region_for(regions, object.abs_eta)?;
    let sigma = region.relative_sigma(object.p4.e, object.pt_gev);
    if sigma == 0.0 {
        return Some(*object);
    }
    let g: f64 = StandardNormal.sample(rng);
    let factor = 1.0 + sigma * g;
    (factor > 0.0).then(|| object.scaled(factor))
}

/// Gaussian smearing of the direction: η → η + σ_η g₁, φ → φ + σ_φ g₂, at
/// fixed pT and mass. Returns the object unchanged (and draws nothing)
/// when both widths are 0.
pub fn smear_direction<G: Rng + ?Sized>(
    object: &Measured,
    eta_sigma: f64,
    phi_sigma_rad: f64,
    rng: &mut G,
) -> Measured {
    if eta_sigma == 0.0 && phi_sigma_rad == 0.0 {
        return *object;
    }
    let p4 = &object.p4;
    let g1: f64 = StandardNormal.sample(rng);
    let g2: f64 = StandardNormal.sample(rng);
    Measured::new(P4::from_pt_eta_phi_m(
        object.pt_gev,
        p4.eta() + eta_sigma * g1,
        p4.phi() + phi_sigma_rad * g2,
        p4.m().max(0.0),
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn calorimeter_form_in_quadrature() {
        // S = 0.1, N = 0.3, C = 0.007 at E = 100 GeV:
        // √(0.01/100 + 0.09/10⁴ + 4.9e-5) = √(1.0e-4 + 9e-6 + 4.9e-5)
        // = √1.58e-4 = 0.012569805 (hand arithmetic).
        let s = calo_relative_sigma(100.0, 0.1, 0.3, 0.007);
        assert!((s - 0.012_569_805).abs() < 1e-8, "{s}");
        assert_eq!(calo_relative_sigma(0.0, 0.1, 0.3, 0.007), 0.0);
    }

    #[test]
    fn tracker_form_in_quadrature() {
        // a = 0.01, b = 1e-4 /GeV at pT = 100 GeV: √(1e-4 + 1e-4) = 0.0141421356
        // (hand arithmetic).
        let s = tracker_relative_sigma(100.0, 0.01, 1.0e-4);
        assert!((s - 0.014_142_135_6).abs() < 1e-9, "{s}");
    }

    #[test]
    fn region_lookup_is_half_open() {
        let r = |lo, hi| TrackerRegion {
            min_abs_eta: lo,
            max_abs_eta: hi,
            a: lo,
            b_per_gev: 0.0,
        };
        let regions = [r(0.0, 1.0), r(1.0, 2.5)];
        assert_eq!(region_for(&regions, 0.999).map(|x| x.a), Some(0.0));
        assert_eq!(region_for(&regions, 1.0).map(|x| x.a), Some(1.0));
        assert!(region_for(&regions, 2.5).is_none());
    }
}
