//! Streaming reader of Les Houches event files (LHEF 1.0, 2.0, 3.0), plain or
//! gzip-compressed, with the weight convention that turns event weights into
//! cross-sections and the classification of particles as visible or invisible.
//!
//! Fed by files on disk; feeds [`crate::detector`].
//!
//! The data types below are the contract with the later stages.

use crate::kinematics::P4;

/// One particle line of an LHEF event (all 13 columns of the standard).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Particle {
    /// PDG Monte Carlo particle id (IDUP).
    pub id: i32,
    /// Status code (ISTUP): −1 incoming, +1 outgoing final state, +2
    /// intermediate resonance, and the rarer codes of the standard.
    pub status: i32,
    /// Mother indices (MOTHUP), 1-based as in the file, 0 for none.
    pub mothers: [u32; 2],
    /// Colour and anticolour flow tags (ICOLUP).
    pub colour: [i32; 2],
    /// Four-momentum (PUP 1–4) [GeV].
    pub p4: P4,
    /// Generated mass (PUP 5) [GeV].
    pub mass_gev: f64,
    /// Proper lifetime c·τ (VTIMUP) [mm].
    pub lifetime_mm: f64,
    /// Cosine of the angle between the spin vector and the momentum in the
    /// lab frame (SPINUP); 9 means unknown.
    pub spin: f64,
}

impl Particle {
    /// True for a final-state particle (ISTUP = +1).
    pub fn is_final(&self) -> bool {
        self.status == 1
    }
}

/// One event of an LHEF file.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Event {
    /// Process id (IDPRUP).
    pub process_id: i32,
    /// Event weight (XWGTUP), in the units set by the sample's IDWTUP.
    pub weight: f64,
    /// Scale of the event (SCALUP) [GeV].
    pub scale_gev: f64,
    /// QED coupling (AQEDUP).
    pub alpha_qed: f64,
    /// QCD coupling (AQCDUP).
    pub alpha_qcd: f64,
    /// Particle lines, in file order (NUP of them).
    pub particles: Vec<Particle>,
    /// Named weight variations (LHEF 3.0 `<rwgt>`/`<weights>`), in the order
    /// of the sample's weight names; empty when the sample has none.
    pub weights: Vec<f64>,
}

/// What a final-state particle is, for the detector.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum ParticleClass {
    /// Quark (|id| 1–6) or gluon (21): becomes a jet.
    Parton,
    /// Electron or positron (|id| 11).
    Electron,
    /// Muon (|id| 13).
    Muon,
    /// Tau lepton (|id| 15).
    Tau,
    /// Photon (22).
    Photon,
    /// In the invisible set: contributes to missing momentum only.
    Invisible,
    /// Anything else (for example a stable hadron written by the generator).
    Other,
}

/// The set of PDG ids (matched on the absolute value) treated as invisible.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct InvisibleSet {
    ids: Vec<i32>,
}

impl InvisibleSet {
    /// Default invisible ids: neutrinos 12, 14, 16; dark-matter candidates of
    /// spin 0, ½, 1 (51, 52, 53); the lightest neutralino 1000022.
    /// (PDG Monte Carlo particle numbering scheme, PDG review; from memory.)
    pub const DEFAULT_IDS: [i32; 7] = [12, 14, 16, 51, 52, 53, 1_000_022];

    /// The default set, [`Self::DEFAULT_IDS`].
    pub fn standard() -> Self {
        Self::from_ids(Self::DEFAULT_IDS)
    }

    /// A set of the given ids (signs are dropped).
    pub fn from_ids<I: IntoIterator<Item = i32>>(ids: I) -> Self {
        let mut ids: Vec<i32> = ids.into_iter().map(i32::abs).collect();
        ids.sort_unstable();
        ids.dedup();
        Self { ids }
    }

    /// The default set extended by `extra` ids.
    pub fn extended<I: IntoIterator<Item = i32>>(extra: I) -> Self {
        Self::from_ids(Self::DEFAULT_IDS.into_iter().chain(extra))
    }

    /// The ids in the set, sorted.
    pub fn ids(&self) -> &[i32] {
        &self.ids
    }

    /// True when `pdg_id` (either sign) is invisible.
    pub fn contains(&self, pdg_id: i32) -> bool {
        self.ids.binary_search(&pdg_id.abs()).is_ok()
    }

    /// Classifies a particle by its PDG id. Invisibility takes precedence,
    /// so a user may declare any id invisible.
    pub fn classify(&self, pdg_id: i32) -> ParticleClass {
        if self.contains(pdg_id) {
            return ParticleClass::Invisible;
        }
        match pdg_id.abs() {
            1..=6 | 21 => ParticleClass::Parton,
            11 => ParticleClass::Electron,
            13 => ParticleClass::Muon,
            15 => ParticleClass::Tau,
            22 => ParticleClass::Photon,
            _ => ParticleClass::Other,
        }
    }
}

impl Default for InvisibleSet {
    fn default() -> Self {
        Self::standard()
    }
}

/// Truth missing transverse momentum of an event: minus the vector sum of
/// the transverse momenta of the visible final-state particles is NOT used;
/// this is the vector sum (px, py) [GeV] of the final-state particles in the
/// invisible set, which is what escapes the detector.
pub fn truth_met_xy(event: &Event, invisible: &InvisibleSet) -> [f64; 2] {
    let mut met = [0.0, 0.0];
    for p in event.particles.iter().filter(|p| p.is_final()) {
        if invisible.contains(p.id) {
            met[0] += p.p4.px;
            met[1] += p.p4.py;
        }
    }
    met
}

// ---------------------------------------------------------------------------
// The reader: header and `<init>` (init.rs), the event-body hot path
// (parse.rs, number.rs), gzip input (gzip.rs), the parallel pass
// (source.rs), the weight convention (weights.rs), the inspect summary
// (census.rs).
// ---------------------------------------------------------------------------

mod census;
mod error;
mod gzip;
mod init;
mod mapped;
mod number;
mod parse;
mod particle_line;
mod source;
mod weight_block;
mod weights;

pub use census::{Census, CensusChunk, Inspection, Quantiles, inspect_sample};
pub use error::EventError;
pub use init::{FileInfo, ProcessInfo, sqrt_s_gev};
pub use number::parse_f64;
pub use source::{BLOCK_BYTES, EventSource, MAX_HEADER_BYTES, SampleInfo, read_file_info};
pub use weights::{FileSummary, ProcessSummary, SampleSummary, idwtup_description};

/// How several files of one sample are combined.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
pub enum FileCombination {
    /// Independent runs of the same process (default): the sample's
    /// cross-section is the event-count-weighted mean of the files'.
    #[default]
    IndependentRuns,
    /// Different processes: the files' cross-sections add.
    SeparateProcesses,
}

/// Options of the reader.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct ReadOptions {
    /// Particles treated as invisible.
    pub invisible: InvisibleSet,
    /// How several files are combined.
    pub combination: FileCombination,
}

/// Where a chunk of events comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ChunkContext {
    /// Index of the file in the sample (order given to [`EventSource::open`]).
    pub file_index: usize,
    /// Index (0-based, within its file) of the chunk's first event.
    pub first_event_index: u64,
}
