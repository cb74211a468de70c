//! A four-momentum with its transverse momentum and |η| computed once, so
//! that the detector's region lookups, acceptance cuts and sums do not
//! recompute them.
//!
//! Used throughout [`crate::detector`].

use crate::kinematics::{ETA_BEAM_AXIS, P4, abs_eta_of};

/// A four-momentum with cached pT [GeV] and |η|.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Measured {
    /// Four-momentum [GeV].
    pub p4: P4,
    /// Transverse momentum [GeV].
    pub pt_gev: f64,
    /// |η|, the absolute pseudorapidity.
    pub abs_eta: f64,
}

impl Measured {
    /// Caches pT and |η| of `p4`.
    ///
    /// # Formula
    /// pT = √(px² + py²); |η| = asinh(|pz|/pT) by [`abs_eta_of`], as
    /// [`P4::abs_eta`]; along the beam axis (pT = 0, pz ≠ 0) |η| =
    /// [`ETA_BEAM_AXIS`], at rest 0.
    pub fn new(p4: P4) -> Self {
        let pt_gev = p4.pt2().sqrt();
        let apz = p4.pz.abs();
        let abs_eta = if pt_gev > 0.0 {
            abs_eta_of(pt_gev, apz)
        } else if apz > 0.0 {
            ETA_BEAM_AXIS
        } else {
            0.0
        };
        Self {
            p4,
            pt_gev,
            abs_eta,
        }
    }

    /// The same object with all four components scaled by `factor` > 0
    /// (direction unchanged, so |η| is kept).
    pub fn scaled(&self, factor: f64) -> Self {
        Self {
            p4: self.p4.scaled(factor),
            pt_gev: self.pt_gev * factor,
            abs_eta: self.abs_eta,
        }
    }

    /// Transverse energy E_T = E·pT/|p| [GeV] (0 at rest).
    pub fn et_gev(&self) -> f64 {
        let p = (self.pt_gev * self.pt_gev + self.p4.pz * self.p4.pz).sqrt();
        if p > 0.0 {
            self.p4.e * self.pt_gev / p
        } else {
            0.0
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn agrees_with_the_four_momentum_methods() {
        for (pt, eta, m) in [
            (50.0, 0.0, 0.0),
            (30.0, -2.7, 0.1),
            (400.0, 4.8, 91.0),
            (1e-3, 1e-9, 0.0),
        ] {
            let p4 = P4::from_pt_eta_phi_m(pt, eta, 0.7, m);
            let x = Measured::new(p4);
            assert!((x.pt_gev - p4.pt()).abs() <= 1e-12 * pt);
            assert!(
                (x.abs_eta - p4.abs_eta()).abs() <= 1e-12,
                "{eta}: {}",
                x.abs_eta
            );
            assert!((x.et_gev() - p4.et()).abs() <= 1e-12 * p4.e);
        }
        assert_eq!(
            Measured::new(P4::new(5.0, 0.0, 0.0, -5.0)).abs_eta,
            ETA_BEAM_AXIS
        );
        assert_eq!(Measured::new(P4::new(1.0, 0.0, 0.0, 0.0)).abs_eta, 0.0);
    }
}
