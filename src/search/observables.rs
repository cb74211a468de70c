//! The one registry of observables a cut may use: each has one name, one
//! unit and one definition, all in this file.
//!
//! Observables are evaluated on the objects the detector stage
//! ([`crate::detector::Reco`]) recorded, after the search's own object
//! definitions ([`ObjectDefinitions`]) have selected them.
//!
//! A quantity that does not exist in an event (the third jet of a two-jet
//! event, a minimum over no jets) evaluates to NaN, and every comparison with
//! NaN is false: a cut on a missing object fails.

use crate::detector::Reco;
use crate::kinematics::{P4, delta_phi_between};

/// Object collections a search counts with.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Collection {
    /// Jets passing the jet definition (b-tagged ones included).
    Jets,
    /// b-tagged jets passing the b-jet definition.
    BJets,
    /// Electrons passing the electron definition.
    Electrons,
    /// Muons passing the muon definition.
    Muons,
    /// Electrons and muons together, ordered by decreasing pT.
    Leptons,
    /// Hadronic taus passing the tau definition.
    Taus,
    /// Photons passing the photon definition.
    Photons,
}

impl Collection {
    /// All collections, in registry order.
    pub const ALL: [Collection; 7] = [
        Collection::Jets,
        Collection::BJets,
        Collection::Electrons,
        Collection::Muons,
        Collection::Leptons,
        Collection::Taus,
        Collection::Photons,
    ];

    /// Singular name used in `<name>N.<attribute>`.
    pub fn singular(self) -> &'static str {
        match self {
            Collection::Jets => "jet",
            Collection::BJets => "bjet",
            Collection::Electrons => "electron",
            Collection::Muons => "muon",
            Collection::Leptons => "lepton",
            Collection::Taus => "tau",
            Collection::Photons => "photon",
        }
    }

    /// Plural name used in `n_<name>`.
    pub fn plural(self) -> &'static str {
        match self {
            Collection::Jets => "jets",
            Collection::BJets => "bjets",
            Collection::Electrons => "electrons",
            Collection::Muons => "muons",
            Collection::Leptons => "leptons",
            Collection::Taus => "taus",
            Collection::Photons => "photons",
        }
    }
}

/// Per-object attributes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Attribute {
    /// Transverse momentum [GeV].
    Pt,
    /// Pseudorapidity.
    Eta,
    /// |pseudorapidity|.
    AbsEta,
    /// Azimuth [rad], in (−π, π].
    Phi,
}

impl Attribute {
    /// All attributes, in registry order.
    pub const ALL: [Attribute; 4] = [
        Attribute::Pt,
        Attribute::Eta,
        Attribute::AbsEta,
        Attribute::Phi,
    ];

    /// Name after the dot.
    pub fn name(self) -> &'static str {
        match self {
            Attribute::Pt => "pt",
            Attribute::Eta => "eta",
            Attribute::AbsEta => "abs_eta",
            Attribute::Phi => "phi",
        }
    }

    /// Unit of the attribute.
    pub fn unit(self) -> &'static str {
        match self {
            Attribute::Pt => "GeV",
            Attribute::Eta | Attribute::AbsEta => "1",
            Attribute::Phi => "rad",
        }
    }

    fn of(self, p: &P4) -> f64 {
        match self {
            Attribute::Pt => p.pt(),
            Attribute::Eta => p.eta(),
            Attribute::AbsEta => p.abs_eta(),
            Attribute::Phi => p.phi(),
        }
    }
}

/// One observable (with its arguments resolved).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Observable {
    /// Magnitude of the missing transverse momentum p_T^miss [GeV].
    Met,
    /// Azimuth of the missing transverse momentum [rad].
    MetPhi,
    /// H_T: scalar sum of the pT of the selected jets [GeV].
    Ht,
    /// Effective mass m_eff = H_T + p_T^miss [GeV].
    Meff,
    /// Scalar sum of the transverse energy of all visible reconstructed
    /// objects, as the detector stage defines it [GeV].
    SumEt,
    /// Number of objects in a collection.
    Count(Collection),
    /// An attribute of the N-th object (0-based here, 1-based in the text)
    /// of a collection ordered by decreasing pT.
    Object {
        /// Collection.
        collection: Collection,
        /// 0-based index.
        index: usize,
        /// Attribute.
        attribute: Attribute,
    },
    /// Minimum |Δφ| [rad] between p_T^miss and the leading N selected jets
    /// (all selected jets when `None`).
    MinDphiJetsMet(Option<usize>),
}

/// One row of the registry, for documentation and error messages.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ObservableInfo {
    /// Name as written in a cut (`N` stands for a 1-based index).
    pub name: &'static str,
    /// Unit.
    pub unit: &'static str,
    /// Definition.
    pub definition: &'static str,
}

/// The registry: every observable a cut may use.
pub const REGISTRY: &[ObservableInfo] = &[
    ObservableInfo {
        name: "met",
        unit: "GeV",
        definition: "magnitude of the reconstructed missing transverse momentum p_T^miss",
    },
    ObservableInfo {
        name: "met_phi",
        unit: "rad",
        definition: "azimuth of p_T^miss, in (−π, π]",
    },
    ObservableInfo {
        name: "ht",
        unit: "GeV",
        definition: "H_T, scalar sum of the pT of the selected jets",
    },
    ObservableInfo {
        name: "meff",
        unit: "GeV",
        definition: "effective mass, H_T + p_T^miss",
    },
    ObservableInfo {
        name: "sum_et",
        unit: "GeV",
        definition: "scalar sum of the transverse energy of all visible reconstructed objects (detector stage)",
    },
    ObservableInfo {
        name: "n_jets, n_bjets, n_electrons, n_muons, n_leptons, n_taus, n_photons",
        unit: "1",
        definition: "number of selected objects of the collection (leptons = electrons + muons)",
    },
    ObservableInfo {
        name: "jetN.pt, bjetN.pt, electronN.pt, muonN.pt, leptonN.pt, tauN.pt, photonN.pt",
        unit: "GeV",
        definition: "pT of the N-th selected object (N = 1 leading), NaN when absent",
    },
    ObservableInfo {
        name: "<object>N.eta, <object>N.abs_eta",
        unit: "1",
        definition: "pseudorapidity η and |η| of the N-th selected object",
    },
    ObservableInfo {
        name: "<object>N.phi",
        unit: "rad",
        definition: "azimuth φ of the N-th selected object, in (−π, π]",
    },
    ObservableInfo {
        name: "min_dphi_jets_met(N), min_dphi_jets_met",
        unit: "rad",
        definition: "minimum |Δφ| in [0, π] between p_T^miss and the leading N selected jets (all selected jets without N); NaN without jets",
    },
];

/// Comma-separated list of the names in the registry, for error messages.
pub fn known_names() -> String {
    REGISTRY
        .iter()
        .map(|o| o.name)
        .collect::<Vec<_>>()
        .join("; ")
}

impl Observable {
    /// Resolves a name as written in a cut: `ident` is the part before an
    /// optional `.attribute`; `argument` the integer in parentheses, if any.
    /// The error message says what is wrong and lists the known names.
    pub fn resolve(
        ident: &str,
        attribute: Option<&str>,
        argument: Option<u64>,
    ) -> Result<Observable, String> {
        let unknown = || {
            let mut text = ident.to_string();
            if let Some(a) = attribute {
                text.push('.');
                text.push_str(a);
            }
            format!(
                "unknown observable \"{text}\"; known observables: {}",
                known_names()
            )
        };
        if ident == "min_dphi_jets_met" {
            if attribute.is_some() {
                return Err(unknown());
            }
            return match argument {
                None => Ok(Observable::MinDphiJetsMet(None)),
                Some(0) => Err("min_dphi_jets_met(N) needs N ≥ 1, got 0".into()),
                Some(n) => usize::try_from(n)
                    .map(|n| Observable::MinDphiJetsMet(Some(n)))
                    .map_err(|_| format!("min_dphi_jets_met(N): N = {n} is too large")),
            };
        }
        if let Some(n) = argument {
            return Err(format!(
                "observable \"{ident}\" takes no argument, got ({n}); only min_dphi_jets_met(N) does"
            ));
        }
        if attribute.is_none() {
            let simple = match ident {
                "met" => Some(Observable::Met),
                "met_phi" => Some(Observable::MetPhi),
                "ht" => Some(Observable::Ht),
                "meff" => Some(Observable::Meff),
                "sum_et" => Some(Observable::SumEt),
                _ => ident.strip_prefix("n_").and_then(|rest| {
                    Collection::ALL
                        .into_iter()
                        .find(|c| c.plural() == rest)
                        .map(Observable::Count)
                }),
            };
            return simple.ok_or_else(unknown);
        }
        let attribute_name = attribute.unwrap_or_default();
        for collection in Collection::ALL {
            let Some(digits) = ident.strip_prefix(collection.singular()) else {
                continue;
            };
            if digits.is_empty() || !digits.bytes().all(|b| b.is_ascii_digit()) {
                continue;
            }
            let Some(attr) = Attribute::ALL
                .into_iter()
                .find(|a| a.name() == attribute_name)
            else {
                return Err(format!(
                    "unknown attribute \"{attribute_name}\" of \"{ident}\"; known attributes: pt, eta, abs_eta, phi"
                ));
            };
            let n: usize = digits
                .parse()
                .map_err(|_| format!("object index {digits} in \"{ident}\" is too large"))?;
            if n == 0 {
                return Err(format!(
                    "object indices start at 1 (1 = leading), got \"{ident}\""
                ));
            }
            return Ok(Observable::Object {
                collection,
                index: n - 1,
                attribute: attr,
            });
        }
        Err(unknown())
    }

    /// Resolves a whole name as written in a cut, e.g. `jet1.pt` or
    /// `min_dphi_jets_met(4)` (no spaces).
    pub fn from_name(name: &str) -> Result<Observable, String> {
        let (head, argument) = match name.split_once('(') {
            Some((head, rest)) => {
                let digits = rest.strip_suffix(')').unwrap_or(rest);
                let n = digits.parse().map_err(|_| {
                    format!("argument \"{digits}\" of \"{head}\" is not an integer")
                })?;
                (head, Some(n))
            }
            None => (name, None),
        };
        match head.split_once('.') {
            Some((ident, attr)) => Observable::resolve(ident, Some(attr), argument),
            None => Observable::resolve(head, None, argument),
        }
    }

    /// The name as written in a cut.
    pub fn name(&self) -> String {
        match self {
            Observable::Met => "met".into(),
            Observable::MetPhi => "met_phi".into(),
            Observable::Ht => "ht".into(),
            Observable::Meff => "meff".into(),
            Observable::SumEt => "sum_et".into(),
            Observable::Count(c) => format!("n_{}", c.plural()),
            Observable::Object {
                collection,
                index,
                attribute,
            } => format!(
                "{}{}.{}",
                collection.singular(),
                index + 1,
                attribute.name()
            ),
            Observable::MinDphiJetsMet(None) => "min_dphi_jets_met".into(),
            Observable::MinDphiJetsMet(Some(n)) => format!("min_dphi_jets_met({n})"),
        }
    }

    /// The unit (`GeV`, `rad`, or `1` for a pure number).
    pub fn unit(&self) -> &'static str {
        match self {
            Observable::Met | Observable::Ht | Observable::Meff | Observable::SumEt => "GeV",
            Observable::MetPhi | Observable::MinDphiJetsMet(_) => "rad",
            Observable::Count(_) => "1",
            Observable::Object { attribute, .. } => attribute.unit(),
        }
    }

    /// Value in one event (NaN when the quantity does not exist).
    pub fn evaluate(&self, event: &SelectedObjects) -> f64 {
        match *self {
            Observable::Met => event.met_gev,
            Observable::MetPhi => event.met_xy_gev[1].atan2(event.met_xy_gev[0]),
            Observable::Ht => event.ht_gev(),
            Observable::Meff => event.ht_gev() + event.met_gev,
            Observable::SumEt => event.sum_et_gev,
            Observable::Count(c) => event.collection(c).len() as f64,
            Observable::Object {
                collection,
                index,
                attribute,
            } => event
                .collection(collection)
                .get(index)
                .map_or(f64::NAN, |p| attribute.of(p)),
            Observable::MinDphiJetsMet(n) => event.min_dphi_jets_met(n),
        }
    }
}

/// Kinematic acceptance of one object type in a search's object definitions.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Acceptance {
    /// Minimum transverse momentum [GeV] (objects with pT > this are kept).
    pub min_pt_gev: f64,
    /// Maximum |η| (objects with |η| < this are kept).
    pub max_abs_eta: f64,
}

impl Acceptance {
    /// Everything the detector delivers: pT > 0, |η| < ∞.
    pub const ALL: Acceptance = Acceptance {
        min_pt_gev: 0.0,
        max_abs_eta: f64::INFINITY,
    };
}

impl Default for Acceptance {
    fn default() -> Self {
        Self::ALL
    }
}

/// The object definitions a search counts with, applied on top of what the
/// detector stage reconstructed.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize, serde::Deserialize)]
pub struct ObjectDefinitions {
    /// Jets (all, b-tagged included).
    pub jets: Acceptance,
    /// b-tagged jets (taken from all reconstructed b-tagged jets).
    pub bjets: Acceptance,
    /// Electrons.
    pub electrons: Acceptance,
    /// Muons.
    pub muons: Acceptance,
    /// Hadronic taus.
    pub taus: Acceptance,
    /// Photons.
    pub photons: Acceptance,
}

/// The objects of one event selected by a search's object definitions,
/// each list ordered by decreasing pT. Reused from event to event.
#[derive(Debug, Clone, Default)]
pub struct SelectedObjects {
    /// The definitions the thresholds below were computed for.
    defs: Option<ObjectDefinitions>,
    /// (min pT², sinh(max |η|)) for jets, b jets, electrons, muons, taus,
    /// photons.
    thresholds: [(f64, f64); 6],
    jets: Vec<P4>,
    bjets: Vec<P4>,
    electrons: Vec<P4>,
    muons: Vec<P4>,
    leptons: Vec<P4>,
    taus: Vec<P4>,
    photons: Vec<P4>,
    met_xy_gev: [f64; 2],
    met_gev: f64,
    sum_et_gev: f64,
}

/// (min pT², sinh(max |η|)) of an acceptance: pT > min ⇔ pT² > min²
/// (min ≥ 0) and |η| < max ⇔ |pz| < pT·sinh(max), which avoids an inverse
/// hyperbolic function per object.
fn threshold(acc: &Acceptance) -> (f64, f64) {
    (acc.min_pt_gev * acc.min_pt_gev, acc.max_abs_eta.sinh())
}

fn select_into<'a>(out: &mut Vec<P4>, items: impl Iterator<Item = &'a P4>, t: (f64, f64)) {
    let (min_pt2, sinh_max) = t;
    out.clear();
    out.extend(
        items
            .filter(|p| {
                let pt2 = p.pt2();
                pt2 > min_pt2 && p.pz.abs() < pt2.sqrt() * sinh_max
            })
            .copied(),
    );
    // The detector orders by decreasing pT; restore the order if it did not.
    if !out.is_sorted_by(|a, b| a.pt2() >= b.pt2()) {
        out.sort_by(|a, b| b.pt2().total_cmp(&a.pt2()));
    }
}

impl SelectedObjects {
    /// Fills the selection from a reconstructed event.
    pub fn fill(&mut self, reco: &Reco, defs: &ObjectDefinitions) {
        if self.defs.as_ref() != Some(defs) {
            self.thresholds = [
                threshold(&defs.jets),
                threshold(&defs.bjets),
                threshold(&defs.electrons),
                threshold(&defs.muons),
                threshold(&defs.taus),
                threshold(&defs.photons),
            ];
            self.defs = Some(*defs);
        }
        let t = self.thresholds;
        select_into(&mut self.jets, reco.jets.iter().map(|j| &j.p4), t[0]);
        select_into(
            &mut self.bjets,
            reco.jets.iter().filter(|j| j.b_tagged).map(|j| &j.p4),
            t[1],
        );
        select_into(
            &mut self.electrons,
            reco.electrons.iter().map(|o| &o.p4),
            t[2],
        );
        select_into(&mut self.muons, reco.muons.iter().map(|o| &o.p4), t[3]);
        select_into(&mut self.taus, reco.taus.iter().map(|o| &o.p4), t[4]);
        select_into(&mut self.photons, reco.photons.iter().map(|o| &o.p4), t[5]);
        self.leptons.clear();
        self.leptons.extend_from_slice(&self.electrons);
        self.leptons.extend_from_slice(&self.muons);
        if !self.electrons.is_empty() && !self.muons.is_empty() {
            self.leptons.sort_by(|a, b| b.pt2().total_cmp(&a.pt2()));
        }
        self.met_xy_gev = reco.met_xy_gev;
        self.met_gev = reco.met_gev;
        self.sum_et_gev = reco.sum_et_gev;
    }

    /// The selected objects of a collection.
    pub fn collection(&self, c: Collection) -> &[P4] {
        match c {
            Collection::Jets => &self.jets,
            Collection::BJets => &self.bjets,
            Collection::Electrons => &self.electrons,
            Collection::Muons => &self.muons,
            Collection::Leptons => &self.leptons,
            Collection::Taus => &self.taus,
            Collection::Photons => &self.photons,
        }
    }

    fn ht_gev(&self) -> f64 {
        self.jets.iter().map(|j| j.pt2().sqrt()).sum()
    }

    fn min_dphi_jets_met(&self, n: Option<usize>) -> f64 {
        let n = n.unwrap_or(usize::MAX);
        self.jets
            .iter()
            .take(n)
            .map(|j| delta_phi_between([j.px, j.py], self.met_xy_gev))
            .fold(f64::NAN, f64::min)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_round_trip_through_resolve() {
        let names = [
            "met",
            "met_phi",
            "ht",
            "meff",
            "sum_et",
            "n_jets",
            "n_bjets",
            "n_leptons",
            "n_photons",
            "jet1.pt",
            "jet12.abs_eta",
            "bjet2.phi",
            "tau1.eta",
            "min_dphi_jets_met",
            "min_dphi_jets_met(4)",
        ];
        for name in names {
            assert_eq!(Observable::from_name(name).unwrap().name(), name);
        }
    }

    #[test]
    fn unknown_names_are_rejected_with_the_list() {
        let err = Observable::resolve("mett", None, None).unwrap_err();
        assert!(err.contains("unknown observable \"mett\""), "{err}");
        assert!(err.contains("min_dphi_jets_met"), "{err}");
        assert!(Observable::resolve("jet0", Some("pt"), None).is_err());
        assert!(Observable::resolve("jet1", Some("mass"), None).is_err());
        assert!(Observable::resolve("jet", Some("pt"), None).is_err());
        assert!(Observable::resolve("met", None, Some(2)).is_err());
        assert!(Observable::resolve("min_dphi_jets_met", None, Some(0)).is_err());
    }

    #[test]
    fn min_over_no_jets_is_nan() {
        let sel = SelectedObjects::default();
        assert!(Observable::MinDphiJetsMet(Some(4)).evaluate(&sel).is_nan());
        assert!(
            Observable::Object {
                collection: Collection::Jets,
                index: 0,
                attribute: Attribute::Pt
            }
            .evaluate(&sel)
            .is_nan()
        );
        assert_eq!(Observable::Count(Collection::Jets).evaluate(&sel), 0.0);
    }
}
