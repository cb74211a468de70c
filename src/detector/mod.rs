//! Parametrised detector response: turns parton-level events into the objects
//! a general-purpose LHC detector would record (jets, electrons, muons,
//! hadronic taus, photons, missing transverse momentum).
//!
//! Fed by [`crate::events`]; feeds [`crate::search`].
//!
//! The output types below are the contract with the later stages.

use crate::kinematics::P4;

/// A reconstructed jet.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Jet {
    /// Reconstructed four-momentum [GeV].
    pub p4: P4,
    /// Whether the jet passed b-tagging.
    pub b_tagged: bool,
}

/// A reconstructed charged lepton, hadronic tau or photon.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RecoObject {
    /// Reconstructed four-momentum [GeV].
    pub p4: P4,
    /// Electric charge in units of e (0 for photons).
    pub charge: i8,
}

/// What the detector recorded for one event.
///
/// Every object list is ordered by decreasing pT.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Reco {
    /// Jets (including b-tagged ones).
    pub jets: Vec<Jet>,
    /// Electrons.
    pub electrons: Vec<RecoObject>,
    /// Muons.
    pub muons: Vec<RecoObject>,
    /// Hadronically decaying taus.
    pub taus: Vec<RecoObject>,
    /// Photons.
    pub photons: Vec<RecoObject>,
    /// Missing transverse momentum vector (px, py) [GeV].
    pub met_xy_gev: [f64; 2],
    /// Magnitude of the missing transverse momentum [GeV].
    pub met_gev: f64,
    /// Scalar sum of transverse energy of all visible reconstructed
    /// objects [GeV].
    pub sum_et_gev: f64,
    /// Event weight (XWGTUP of the source event, unnormalised).
    pub weight: f64,
    /// Named weight variations of the source event.
    pub weights: Vec<f64>,
}
