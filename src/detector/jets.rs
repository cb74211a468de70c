//! Parton-level jets: final-state quarks and gluons become jets; partons
//! closer than the profile's jet radius are merged first; b-tagging by the
//! flavour of the merged partons.
//!
//! Used by [`crate::detector::Detector::reconstruct`].
//!
//! # Merging algorithm
//!
//! Start with one candidate per final-state quark or gluon, in file order.
//! Repeatedly find the pair (i, j), i < j, with the smallest ΔR (ΔR from
//! pseudorapidity and azimuth, [`P4::delta_r`]); ties go to the pair that
//! comes first in (i, j) order. If that ΔR is below the radius R, replace
//! candidate i by the sum of the two four-momenta (E-scheme), give it the
//! heavier flavour of the two (b over c over light) and remove j. Stop
//! when no pair is closer than R. With R = 0 nothing is merged.
//!
//! This is a pairwise angular merging, not a sequential-recombination jet
//! algorithm with a momentum weight: at parton level with a few partons
//! the difference is the order in which three or more nearby partons
//! merge.

use crate::kinematics::P4;

/// Flavour of a jet, from the PDG id of its parton(s).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum Flavour {
    /// Gluon or u, d, s quark (and a final-state top, which this detector
    /// does not decay).
    Light,
    /// Charm quark (|id| = 4).
    Charm,
    /// Bottom quark (|id| = 5).
    Bottom,
}

impl Flavour {
    /// Flavour of a parton with PDG id `pdg_id`.
    pub fn of_parton(pdg_id: i32) -> Self {
        match pdg_id.abs() {
            5 => Self::Bottom,
            4 => Self::Charm,
            _ => Self::Light,
        }
    }
}

/// A jet candidate during merging.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Candidate {
    /// Four-momentum [GeV].
    pub p4: P4,
    /// Heaviest flavour among the merged partons.
    pub flavour: Flavour,
    /// Pseudorapidity and azimuth [rad] of `p4`, filled by [`merge`].
    eta_phi: (f64, f64),
}

impl Candidate {
    /// A candidate from one parton.
    pub fn new(p4: P4, flavour: Flavour) -> Self {
        Self {
            p4,
            flavour,
            eta_phi: (0.0, 0.0),
        }
    }

    fn with_angles(mut self) -> Self {
        self.eta_phi = (self.p4.eta(), self.p4.phi());
        self
    }

    fn delta_r2(&self, other: &Self) -> f64 {
        let deta = self.eta_phi.0 - other.eta_phi.0;
        let dphi = crate::kinematics::delta_phi(self.eta_phi.1, other.eta_phi.1);
        deta * deta + dphi * dphi
    }
}

/// Merges candidates in place by the algorithm of the module docs.
/// Allocation-free: works within `candidates`.
pub fn merge(candidates: &mut Vec<Candidate>, radius: f64) {
    if radius <= 0.0 || candidates.len() < 2 {
        return;
    }
    for c in candidates.iter_mut() {
        *c = c.with_angles();
    }
    let r2 = radius * radius;
    loop {
        let mut best: Option<(usize, usize, f64)> = None;
        for i in 0..candidates.len() {
            for j in i + 1..candidates.len() {
                let d2 = candidates[i].delta_r2(&candidates[j]);
                if d2 < r2 && best.is_none_or(|(_, _, b)| d2 < b) {
                    best = Some((i, j, d2));
                }
            }
        }
        let Some((i, j, _)) = best else { return };
        let other = candidates.remove(j);
        let merged = candidates[i].p4 + other.p4;
        let flavour = candidates[i].flavour.max(other.flavour);
        candidates[i] = Candidate::new(merged, flavour).with_angles();
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parton(pt: f64, eta: f64, phi: f64, id: i32) -> Candidate {
        Candidate::new(
            P4::from_pt_eta_phi_m(pt, eta, phi, 0.0),
            Flavour::of_parton(id),
        )
    }

    #[test]
    fn close_partons_merge_and_keep_momentum() {
        let a = parton(100.0, 0.0, 0.0, 21);
        let b = parton(50.0, 0.2, 0.1, 5);
        let c = parton(80.0, 0.0, 3.0, 1);
        let total = a.p4 + b.p4 + c.p4;
        let mut v = vec![a, b, c];
        merge(&mut v, 0.4);
        assert_eq!(v.len(), 2);
        assert_eq!(v[0].flavour, Flavour::Bottom);
        let sum: P4 = v.iter().map(|c| c.p4).sum();
        assert!((sum - total).p() < 1e-9);
        // ΔR(a, b) = √(0.04 + 0.01) = 0.2236 > 0.2: no merging at R = 0.2.
        let mut v = vec![a, b, c];
        merge(&mut v, 0.2);
        assert_eq!(v.len(), 3);
    }

    #[test]
    fn closest_pair_merges_first() {
        // a–b at ΔR 0.3, b–c at ΔR 0.25, a–c at 0.55: with R = 0.35 b and c
        // merge first; the merged (b+c) axis is then ≈ 0.44 from a.
        let a = parton(100.0, 0.0, 0.0, 1);
        let b = parton(100.0, 0.3, 0.0, 1);
        let c = parton(100.0, 0.55, 0.0, 4);
        let mut v = vec![a, b, c];
        merge(&mut v, 0.35);
        assert_eq!(v.len(), 2);
        assert_eq!(v[0].p4, a.p4);
        assert_eq!(v[1].flavour, Flavour::Charm);
    }
}
