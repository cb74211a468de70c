//! Parametrised detector response: turns parton-level events into the objects
//! a general-purpose LHC detector would record (jets, electrons, muons,
//! hadronic taus, photons, missing transverse momentum).
//!
//! Fed by [`crate::events`]; feeds [`crate::search`].
//!
//! The output types below are the contract with the later stages.
//!
//! # What happens to one event
//!
//! Final-state particles (ISTUP = +1) are classified by
//! [`InvisibleSet::classify`]. Invisible particles and particles of class
//! [`ParticleClass::Other`] (for example a stable hadron or an undecayed
//! heavy boson written by the generator) are not reconstructed. Quarks and
//! gluons are merged into jets ([`jets`]). Every electron, muon, tau lepton,
//! photon and jet then goes through, in this order:
//!
//! 1. resolution: the region of the profile containing its *true* |η| is
//!    chosen (an object beyond the last region is not seen); the energy
//!    (calorimeter form σ_E/E = S/√E ⊕ N/E ⊕ C) or, for muons, the
//!    transverse momentum (tracker form σ_pT/pT = a ⊕ b·pT) is smeared by a
//!    Gaussian at fixed direction; a non-positive result loses the object;
//! 2. optional Gaussian smearing of η and φ;
//! 3. acceptance on the *reconstructed* pT and |η|;
//! 4. identification efficiency (constant or pT × |η| table, reconstructed
//!    values), and for jets b-tagging by the flavour of the jet's partons.
//!
//! Object lists are ordered by decreasing pT.
//!
//! # Missing transverse momentum
//!
//! Let V be the set of reconstructed objects — the jets, electrons, muons,
//! taus and photons of the [`Reco`] event, i.e. after acceptance and
//! efficiency — whose reconstructed |η| is below `met.max_abs_eta` (the
//! calorimeter acceptance). Then
//!
//! ΣE_T = Σ_{i∈V} E_T,i,  p_T^miss = −Σ_{i∈V} p_T,i + (δ_x, δ_y),
//!
//! with δ_x, δ_y independent Gaussians of mean 0 and width
//! σ = A ⊕ B·√ΣE_T ([`met::soft_term_sigma`]). Visible particles that are
//! not reconstructed (outside acceptance, failing identification, lost by
//! smearing, or of class `Other`) therefore count as missing, like the
//! invisible ones. With the truth profile p_T^miss equals the vector sum
//! of the invisible particles' pT ([`crate::events::truth_met_xy`]) up to
//! rounding, provided the incoming partons carry no transverse momentum.
//!
//! # Limits of the approximation
//!
//! Jets are partons: there is no parton shower, hadronisation, underlying
//! event or pile-up, so no jet substructure, no out-of-cone losses beyond
//! the merging, and no extra soft jets. There is no overlap removal or
//! isolation between objects (at parton level leptons and partons are
//! distinct particles), no fake leptons or photons from jets, and a tau
//! lepton is reconstructed with its full momentum (the neutrinos of its
//! decay are not simulated; the profile's tau efficiency carries the
//! hadronic branching fraction).
//!
//! # Randomness
//!
//! Every event gets its own generator, seeded from (seed, file index,
//! event index) by [`seed::event_state`] (nested SplitMix64 mixing into a
//! 128-bit PCG-64 MCG state); random numbers are drawn in file order of
//! the particles, then jets, then the soft term. Results therefore do not
//! depend on the number of threads or on how events are chunked.

pub mod efficiency;
pub mod jets;
pub mod measured;
pub mod met;
pub mod profile;
pub mod resolution;
pub mod seed;

pub use profile::{
    BTagging, CaloRegion, DetectorProfile, EfficiencyTable, JetMerging, MetResponse,
    ObjectResponse, TrackerRegion,
};

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

use std::cell::RefCell;

use crate::events::{Event, InvisibleSet, ParticleClass};
use jets::{Candidate, Flavour};
use measured::Measured;
use resolution::Resolution;

/// Errors of the detector stage.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum DetectorError {
    /// The profile breaks a rule (message names file, key and rule).
    #[error("{0}")]
    Profile(String),
    /// A detector variation is malformed (message names the rule and value).
    #[error("{0}")]
    Variation(String),
    /// The profile file could not be read.
    #[error("detector profile {}: cannot read: {source}", path.display())]
    Io {
        /// Profile file.
        path: std::path::PathBuf,
        /// Underlying error.
        source: std::io::Error,
    },
}

/// Shifts of the response, to show how much a result depends on the
/// detector approximation. Applied by [`DetectorProfile::varied`].
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize, serde::Deserialize)]
pub struct Variation {
    /// Resolution scale minus one (e.g. +0.2: all resolutions 20 % worse).
    pub resolution_shift: f64,
    /// Absolute shift of every efficiency (clamped to [0, 1]).
    pub efficiency_shift: f64,
}

impl Variation {
    /// The nominal response (no shift).
    pub const NOMINAL: Self = Self {
        resolution_shift: 0.0,
        efficiency_shift: 0.0,
    };

    /// A validated variation: `resolution_shift` finite and > −1,
    /// `efficiency_shift` in [−1, 1].
    pub fn new(resolution_shift: f64, efficiency_shift: f64) -> Result<Self, DetectorError> {
        if !(resolution_shift.is_finite() && resolution_shift > -1.0) {
            return Err(DetectorError::Variation(format!(
                "detector variation: resolution shift must be finite and > -1, got {resolution_shift}"
            )));
        }
        if !(-1.0..=1.0).contains(&efficiency_shift) {
            return Err(DetectorError::Variation(format!(
                "detector variation: efficiency shift must be in [-1, 1], got {efficiency_shift}"
            )));
        }
        Ok(Self {
            resolution_shift,
            efficiency_shift,
        })
    }
}

impl std::str::FromStr for Variation {
    type Err = DetectorError;

    /// Parses `nominal`, or comma-separated `resolution=X` and
    /// `efficiency=Y` (either may be left out, meaning 0), e.g.
    /// `resolution=+0.2,efficiency=-0.05`. Validated as by [`Variation::new`].
    fn from_str(text: &str) -> Result<Self, Self::Err> {
        let text = text.trim();
        if text == "nominal" {
            return Ok(Self::NOMINAL);
        }
        let mut shifts = [None, None];
        for item in text.split(',') {
            let bad = |rule: &str| {
                DetectorError::Variation(format!(
                    "detector variation {text:?}: item {item:?}: {rule}"
                ))
            };
            let (key, value) = item
                .split_once('=')
                .ok_or_else(|| bad("expected `resolution=X` or `efficiency=Y`"))?;
            let slot = match key.trim() {
                "resolution" => 0,
                "efficiency" => 1,
                _ => return Err(bad("unknown key, expected `resolution` or `efficiency`")),
            };
            if shifts[slot].is_some() {
                return Err(bad("key given twice"));
            }
            let value: f64 = value
                .trim()
                .parse()
                .map_err(|_| bad("value is not a number"))?;
            shifts[slot] = Some(value);
        }
        Self::new(shifts[0].unwrap_or(0.0), shifts[1].unwrap_or(0.0))
    }
}

impl std::fmt::Display for Variation {
    /// The form read by [`str::parse`]: `resolution=+0.2,efficiency=-0.05`.
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "resolution={:+},efficiency={:+}",
            self.resolution_shift, self.efficiency_shift
        )
    }
}

/// The detector response for one profile, invisible set and seed.
#[derive(Debug, Clone)]
pub struct Detector {
    profile: DetectorProfile,
    invisible: InvisibleSet,
    seed: u64,
}

thread_local! {
    /// Jet candidates of the event being reconstructed on this thread,
    /// kept between events so that reconstruction does not allocate in
    /// steady state.
    static CANDIDATES: RefCell<Vec<Candidate>> = const { RefCell::new(Vec::new()) };
}

/// Resolution, direction smearing, acceptance and efficiency of one object
/// (steps 1–4 of the module docs); `None` when it is not reconstructed.
fn reconstruct_object<R: Resolution, G: rand::Rng + ?Sized>(
    response: &ObjectResponse<R>,
    true_p4: &P4,
    rng: &mut G,
) -> Option<Measured> {
    let object = resolution::smear_magnitude(&response.resolution, &Measured::new(*true_p4), rng)?;
    let object = resolution::smear_direction(
        &object,
        response.eta_resolution,
        response.phi_resolution_rad,
        rng,
    );
    let (pt, abs_eta) = (object.pt_gev, object.abs_eta);
    let in_eta = response
        .abs_eta_ranges
        .iter()
        .any(|r| abs_eta >= r[0] && abs_eta < r[1]);
    if !(pt >= response.min_pt_gev && in_eta) {
        return None;
    }
    let eff = match (&response.efficiency, &response.efficiency_table) {
        (Some(e), _) => *e,
        (None, Some(t)) => t.lookup(pt, abs_eta),
        (None, None) => 0.0,
    };
    efficiency::pass(eff, rng).then_some(object)
}

/// Running p_T^miss and ΣE_T over the objects in the calorimeter
/// acceptance.
struct MetSum {
    max_abs_eta: f64,
    met_xy_gev: [f64; 2],
    sum_et_gev: f64,
}

impl MetSum {
    fn add(&mut self, object: &Measured) {
        if object.abs_eta < self.max_abs_eta {
            self.met_xy_gev[0] -= object.p4.px;
            self.met_xy_gev[1] -= object.p4.py;
            self.sum_et_gev += object.et_gev();
        }
    }
}

/// Charge of a charged lepton from its PDG id (11, 13, 15 are the negative
/// leptons in the PDG numbering scheme).
fn lepton_charge(pdg_id: i32) -> i8 {
    if pdg_id > 0 { -1 } else { 1 }
}

fn sort_by_pt<T>(v: &mut [T], p4: impl Fn(&T) -> &P4) {
    v.sort_unstable_by(|a, b| p4(b).pt2().total_cmp(&p4(a).pt2()));
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

    /// The invisible set in use.
    pub fn invisible(&self) -> &InvisibleSet {
        &self.invisible
    }

    /// The global seed.
    pub fn seed(&self) -> u64 {
        self.seed
    }

    /// Reconstructs one event into `out` (cleared first). The random numbers
    /// come from a generator seeded from (seed, `file_index`, `event_index`).
    ///
    /// Reuses the vectors of `out` and a per-thread scratch buffer, so it
    /// does not allocate once the buffers have grown to the largest event.
    /// The procedure and the p_T^miss definition are in the module docs.
    pub fn reconstruct(&self, event: &Event, file_index: usize, event_index: u64, out: &mut Reco) {
        let profile = &self.profile;
        let mut rng = seed::event_rng(self.seed, file_index, event_index);
        out.jets.clear();
        out.electrons.clear();
        out.muons.clear();
        out.taus.clear();
        out.photons.clear();
        out.weights.clear();
        out.weights.extend_from_slice(&event.weights);
        out.weight = event.weight;

        let mut sum = MetSum {
            max_abs_eta: profile.met.max_abs_eta,
            met_xy_gev: [0.0, 0.0],
            sum_et_gev: 0.0,
        };
        CANDIDATES.with_borrow_mut(|candidates| {
            candidates.clear();
            for p in event.particles.iter().filter(|p| p.is_final()) {
                let (list, object) = match self.invisible.classify(p.id) {
                    ParticleClass::Parton => {
                        candidates.push(Candidate::new(p.p4, Flavour::of_parton(p.id)));
                        continue;
                    }
                    ParticleClass::Electron => (
                        &mut out.electrons,
                        reconstruct_object(&profile.electrons, &p.p4, &mut rng),
                    ),
                    ParticleClass::Muon => (
                        &mut out.muons,
                        reconstruct_object(&profile.muons, &p.p4, &mut rng),
                    ),
                    ParticleClass::Tau => (
                        &mut out.taus,
                        reconstruct_object(&profile.taus, &p.p4, &mut rng),
                    ),
                    ParticleClass::Photon => (
                        &mut out.photons,
                        reconstruct_object(&profile.photons, &p.p4, &mut rng),
                    ),
                    ParticleClass::Invisible | ParticleClass::Other => continue,
                };
                if let Some(object) = object {
                    sum.add(&object);
                    let charge = if p.id.abs() == 22 {
                        0
                    } else {
                        lepton_charge(p.id)
                    };
                    list.push(RecoObject {
                        p4: object.p4,
                        charge,
                    });
                }
            }
            jets::merge(candidates, profile.jet_merging.radius);
            let b = &profile.btag;
            for c in candidates.iter() {
                if let Some(jet) = reconstruct_object(&profile.jets, &c.p4, &mut rng) {
                    sum.add(&jet);
                    let tag_probability = if jet.abs_eta < b.max_abs_eta {
                        match c.flavour {
                            Flavour::Bottom => b.efficiency_b,
                            Flavour::Charm => b.mistag_c,
                            Flavour::Light => b.mistag_light,
                        }
                    } else {
                        0.0
                    };
                    let b_tagged = efficiency::pass(tag_probability, &mut rng);
                    out.jets.push(Jet {
                        p4: jet.p4,
                        b_tagged,
                    });
                }
            }
        });

        sort_by_pt(&mut out.jets, |j| &j.p4);
        for list in [
            &mut out.electrons,
            &mut out.muons,
            &mut out.taus,
            &mut out.photons,
        ] {
            sort_by_pt(list, |o| &o.p4);
        }

        let MetSum {
            met_xy_gev: mut met,
            sum_et_gev: sum_et,
            ..
        } = sum;
        let sigma =
            met::soft_term_sigma(sum_et, profile.met.soft_a_gev, profile.met.soft_b_sqrt_gev);
        if sigma > 0.0 {
            use rand_distr::Distribution;
            let gx: f64 = rand_distr::StandardNormal.sample(&mut rng);
            let gy: f64 = rand_distr::StandardNormal.sample(&mut rng);
            met[0] += sigma * gx;
            met[1] += sigma * gy;
        }
        out.met_xy_gev = met;
        out.met_gev = crate::kinematics::transverse_magnitude(met);
        out.sum_et_gev = sum_et;
    }
}
