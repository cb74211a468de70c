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

// ---------------------------------------------------------------------------
// CONTRACT of the response (signatures used by later stages; bodies under
// construction).
// ---------------------------------------------------------------------------

use crate::events::{Event, InvisibleSet};

/// Errors of the detector stage.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum DetectorError {
    /// The profile breaks a rule (message names file, key and rule).
    #[error("{0}")]
    Profile(String),
}

/// Shifts of the response, to show how much a result depends on the
/// detector approximation.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize, serde::Deserialize)]
pub struct Variation {
    /// Resolution scale minus one (e.g. +0.2: all resolutions 20 % worse).
    pub resolution_shift: f64,
    /// Absolute shift of every efficiency (clamped to [0, 1]).
    pub efficiency_shift: f64,
}

/// A validated detector profile.
#[derive(Debug, Clone, PartialEq, Default, serde::Serialize)]
pub struct DetectorProfile {
    /// Profile name.
    pub name: String,
}

impl DetectorProfile {
    /// Reads and validates a profile file.
    pub fn from_toml_file(path: &std::path::Path) -> Result<Self, DetectorError> {
        Err(DetectorError::Profile(format!(
            "{}: detector stage under construction",
            path.display()
        )))
    }

    /// The profile with a variation applied.
    pub fn varied(&self, _variation: &Variation) -> Self {
        self.clone()
    }
}

/// The detector response for one profile, invisible set and seed.
#[derive(Debug, Clone)]
pub struct Detector {
    profile: DetectorProfile,
    invisible: InvisibleSet,
    seed: u64,
}

impl Detector {
    /// Builds the response.
    pub fn new(profile: DetectorProfile, invisible: InvisibleSet, seed: u64) -> Self {
        Self {
            profile,
            invisible,
            seed,
        }
    }

    /// The profile in use.
    pub fn profile(&self) -> &DetectorProfile {
        &self.profile
    }

    /// Reconstructs one event into `out` (cleared first). The random numbers
    /// come from a generator seeded from (seed, `file_index`, `event_index`).
    pub fn reconstruct(&self, event: &Event, file_index: usize, event_index: u64, out: &mut Reco) {
        let _ = (event, file_index, event_index, &self.invisible, self.seed);
        *out = Reco::default();
    }
}
