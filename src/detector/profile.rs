//! Detector profiles: the TOML description of a parametrised detector and
//! its validation.
//!
//! A profile is read by [`DetectorProfile::from_toml_file`] or
//! [`DetectorProfile::from_toml_str`], validated once, and then drives
//! [`crate::detector::Detector`]. Every rule broken is reported with the
//! profile's file name, the key and the rule, for example
//! `detector profile jets.toml: jets.resolution[1]: |η| regions
//! overlap: starts at 1.2, previous region ends at 1.5`.
//!
//! # Format
//!
//! ```toml
//! name = "example"
//!
//! [jets]
//! min_pt_gev = 20.0                # acceptance: pT threshold [GeV]
//! abs_eta_ranges = [[0.0, 4.5]]    # acceptance: |η| ranges
//! efficiency = 1.0                 # or efficiency_table = {…}
//! [[jets.resolution]]              # calorimeter form, one per |η| region
//! min_abs_eta = 0.0
//! max_abs_eta = 4.5
//! stochastic_sqrt_gev = 0.8        # S [√GeV]
//! noise_gev = 3.0                  # N [GeV]
//! constant = 0.04                  # C
//!
//! [jet_merging]
//! radius = 0.4                     # ΔR below which partons merge
//!
//! [btag]
//! max_abs_eta = 2.5
//! efficiency_b = 0.77
//! mistag_c = 0.17
//! mistag_light = 0.0075
//!
//! [muons]                          # tracker form
//! min_pt_gev = 7.0
//! abs_eta_ranges = [[0.0, 2.5]]
//! efficiency = 0.95
//! [[muons.resolution]]
//! min_abs_eta = 0.0
//! max_abs_eta = 2.5
//! a = 0.01                         # a (fraction)
//! b_per_gev = 1.0e-4               # b [1/GeV]
//!
//! # [electrons], [taus], [photons]: like [jets].
//!
//! [met]
//! max_abs_eta = 4.9                # calorimeter acceptance
//! soft_a_gev = 8.0                 # A [GeV]
//! soft_b_sqrt_gev = 0.25           # B [√GeV]
//! ```

use std::path::Path;

use serde::{Deserialize, Serialize};

use super::{DetectorError, Variation};

/// Calorimeter resolution in one |η| region.
///
/// # Formula
/// σ_E/E = S/√E ⊕ N/E ⊕ C, where ⊕ is the sum in quadrature.
///
/// # Units
/// `stochastic_sqrt_gev` (S) in √GeV, `noise_gev` (N) in GeV, `constant`
/// (C) dimensionless; |η| bounds dimensionless.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CaloRegion {
    /// Lower |η| bound of the region (inclusive).
    pub min_abs_eta: f64,
    /// Upper |η| bound of the region (exclusive).
    pub max_abs_eta: f64,
    /// Stochastic term S [√GeV].
    pub stochastic_sqrt_gev: f64,
    /// Noise term N [GeV].
    pub noise_gev: f64,
    /// Constant term C (fraction).
    pub constant: f64,
}

/// Tracker momentum resolution in one |η| region.
///
/// # Formula
/// σ_pT/pT = a ⊕ b·pT.
///
/// # Units
/// `a` dimensionless, `b_per_gev` in GeV⁻¹.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TrackerRegion {
    /// Lower |η| bound of the region (inclusive).
    pub min_abs_eta: f64,
    /// Upper |η| bound of the region (exclusive).
    pub max_abs_eta: f64,
    /// Multiple-scattering term a (fraction).
    pub a: f64,
    /// Curvature term b [GeV⁻¹].
    pub b_per_gev: f64,
}

/// Something with an |η| extent, for the region checks.
pub trait EtaRegion {
    /// (lower, upper) |η| bounds.
    fn bounds(&self) -> (f64, f64);
}

impl EtaRegion for CaloRegion {
    fn bounds(&self) -> (f64, f64) {
        (self.min_abs_eta, self.max_abs_eta)
    }
}

impl EtaRegion for TrackerRegion {
    fn bounds(&self) -> (f64, f64) {
        (self.min_abs_eta, self.max_abs_eta)
    }
}

/// Identification efficiency in bins of pT × |η|.
///
/// Bin i in pT is [`pt_edges_gev[i]`, `pt_edges_gev[i+1]`); values outside
/// the first or last edge use the first or last bin (the table is
/// extended flat). `values[i][j]` is the efficiency in pT bin i and |η|
/// bin j, a fraction in [0, 1].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct EfficiencyTable {
    /// pT bin edges [GeV], strictly increasing, at least two.
    pub pt_edges_gev: Vec<f64>,
    /// |η| bin edges, strictly increasing, at least two.
    pub abs_eta_edges: Vec<f64>,
    /// One row per pT bin, one column per |η| bin.
    pub values: Vec<Vec<f64>>,
}

/// b-tagging: tag probabilities by the flavour of the jet's parton.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BTagging {
    /// Jets with reconstructed |η| at or above this are never tagged.
    pub max_abs_eta: f64,
    /// Probability to tag a b jet.
    pub efficiency_b: f64,
    /// Probability to tag a c jet (mistag rate).
    pub mistag_c: f64,
    /// Probability to tag a light-quark or gluon jet (mistag rate).
    pub mistag_light: f64,
}

/// Response to one type of physics object, with resolution regions of
/// type `R` ([`CaloRegion`] or [`TrackerRegion`]).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ObjectResponse<R> {
    /// Acceptance: minimum reconstructed pT [GeV].
    pub min_pt_gev: f64,
    /// Acceptance: reconstructed |η| ranges [lower, upper), sorted,
    /// non-overlapping.
    pub abs_eta_ranges: Vec<[f64; 2]>,
    /// Constant identification efficiency (exclusive with
    /// `efficiency_table`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub efficiency: Option<f64>,
    /// Identification efficiency in pT × |η| bins (exclusive with
    /// `efficiency`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub efficiency_table: Option<EfficiencyTable>,
    /// Resolution regions in true |η|: contiguous from 0, no overlaps, no
    /// gaps. An object whose true |η| lies beyond the last region is not
    /// seen by the detector.
    pub resolution: Vec<R>,
    /// Gaussian smearing of η (absolute), 0 for none.
    #[serde(default)]
    pub eta_resolution: f64,
    /// Gaussian smearing of φ [rad], 0 for none.
    #[serde(default)]
    pub phi_resolution_rad: f64,
}

/// How partons are merged into jets.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct JetMerging {
    /// Jet radius R: partons closer than ΔR < R are merged (0: never).
    pub radius: f64,
}

/// Missing transverse momentum.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MetResponse {
    /// Calorimeter acceptance: reconstructed objects with |η| below this
    /// enter p_T^miss.
    pub max_abs_eta: f64,
    /// Soft-term constant A [GeV].
    pub soft_a_gev: f64,
    /// Soft-term stochastic coefficient B [√GeV].
    pub soft_b_sqrt_gev: f64,
}

/// A validated detector profile.
///
/// Built only by [`Self::from_toml_str`], [`Self::from_toml_file`],
/// [`Self::truth`] (also [`Default`]) and [`Self::varied`], all of which
/// produce valid profiles. Deserializing with serde directly, or editing the
/// public fields, skips the checks: call [`Self::validate`] afterwards.
/// [`crate::detector::Detector`] never panics on an invalid profile, but its
/// results are then meaningless.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DetectorProfile {
    /// Profile name.
    pub name: String,
    /// Free-text description.
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub description: String,
    /// Jets from quarks and gluons.
    pub jets: ObjectResponse<CaloRegion>,
    /// Merging of partons into jets.
    pub jet_merging: JetMerging,
    /// b-tagging of jets.
    pub btag: BTagging,
    /// Electrons.
    pub electrons: ObjectResponse<CaloRegion>,
    /// Muons.
    pub muons: ObjectResponse<TrackerRegion>,
    /// Hadronic taus (from final-state tau leptons; the efficiency
    /// includes the hadronic branching fraction).
    pub taus: ObjectResponse<CaloRegion>,
    /// Photons.
    pub photons: ObjectResponse<CaloRegion>,
    /// Missing transverse momentum.
    pub met: MetResponse,
}

impl Default for DetectorProfile {
    /// The truth profile, [`DetectorProfile::truth`].
    fn default() -> Self {
        Self::truth()
    }
}

fn truth_calo() -> ObjectResponse<CaloRegion> {
    ObjectResponse {
        min_pt_gev: 0.0,
        abs_eta_ranges: vec![[0.0, f64::INFINITY]],
        efficiency: Some(1.0),
        efficiency_table: None,
        resolution: vec![CaloRegion {
            min_abs_eta: 0.0,
            max_abs_eta: f64::INFINITY,
            stochastic_sqrt_gev: 0.0,
            noise_gev: 0.0,
            constant: 0.0,
        }],
        eta_resolution: 0.0,
        phi_resolution_rad: 0.0,
    }
}

impl DetectorProfile {
    /// The truth profile: no smearing, full efficiency, unlimited
    /// acceptance, no parton merging, perfect b-tagging. Same content as
    /// `recasts/detectors/truth.toml`.
    pub fn truth() -> Self {
        Self {
            name: "truth".into(),
            description: "no smearing, full efficiency, full acceptance".into(),
            jets: truth_calo(),
            jet_merging: JetMerging { radius: 0.0 },
            btag: BTagging {
                max_abs_eta: f64::INFINITY,
                efficiency_b: 1.0,
                mistag_c: 0.0,
                mistag_light: 0.0,
            },
            electrons: truth_calo(),
            muons: ObjectResponse {
                min_pt_gev: 0.0,
                abs_eta_ranges: vec![[0.0, f64::INFINITY]],
                efficiency: Some(1.0),
                efficiency_table: None,
                resolution: vec![TrackerRegion {
                    min_abs_eta: 0.0,
                    max_abs_eta: f64::INFINITY,
                    a: 0.0,
                    b_per_gev: 0.0,
                }],
                eta_resolution: 0.0,
                phi_resolution_rad: 0.0,
            },
            taus: truth_calo(),
            photons: truth_calo(),
            met: MetResponse {
                max_abs_eta: f64::INFINITY,
                soft_a_gev: 0.0,
                soft_b_sqrt_gev: 0.0,
            },
        }
    }

    /// Reads and validates a profile file. Errors name the file.
    pub fn from_toml_file(path: &Path) -> Result<Self, DetectorError> {
        let text = std::fs::read_to_string(path).map_err(|source| DetectorError::Io {
            path: path.to_path_buf(),
            source,
        })?;
        Self::from_toml_str(&text, &path.display().to_string())
    }

    /// Parses and validates a profile from TOML text; `source_name` (a file
    /// name) prefixes every error message.
    pub fn from_toml_str(text: &str, source_name: &str) -> Result<Self, DetectorError> {
        let profile: Self = toml::from_str(text).map_err(|e| {
            DetectorError::Profile(format!(
                "detector profile {source_name}: {}",
                e.to_string().trim_end()
            ))
        })?;
        profile.validate(source_name)?;
        Ok(profile)
    }

    /// Checks every rule; the error names `source_name`, the key and the
    /// rule.
    pub fn validate(&self, source_name: &str) -> Result<(), DetectorError> {
        let v = Validator { source_name };
        if self.name.trim().is_empty() {
            return Err(v.err("name", "must not be empty"));
        }
        v.object("jets", &self.jets, calo_terms)?;
        v.non_negative("jet_merging.radius", self.jet_merging.radius)?;
        let b = &self.btag;
        v.positive_bound("btag.max_abs_eta", b.max_abs_eta)?;
        v.fraction("btag.efficiency_b", b.efficiency_b)?;
        v.fraction("btag.mistag_c", b.mistag_c)?;
        v.fraction("btag.mistag_light", b.mistag_light)?;
        v.object("electrons", &self.electrons, calo_terms)?;
        v.object("muons", &self.muons, tracker_terms)?;
        v.object("taus", &self.taus, calo_terms)?;
        v.object("photons", &self.photons, calo_terms)?;
        v.positive_bound("met.max_abs_eta", self.met.max_abs_eta)?;
        v.non_negative("met.soft_a_gev", self.met.soft_a_gev)?;
        v.non_negative("met.soft_b_sqrt_gev", self.met.soft_b_sqrt_gev)?;
        Ok(())
    }

    /// The profile with a variation applied: every resolution parameter
    /// (S, N, C, a, b, angular smearing, soft-term A and B) multiplied by
    /// max(0, 1 + `resolution_shift`), and `efficiency_shift` added to every
    /// identification efficiency and to the b-tagging efficiency, clamped to
    /// [0, 1]. Mistag rates are left alone (an absolute shift sized for
    /// efficiencies near 1 would swamp rates of order 10⁻²). A non-finite
    /// shift is treated as 0. The name gains a suffix naming the shifts.
    pub fn varied(&self, variation: &Variation) -> Self {
        let finite_or_zero = |x: f64| if x.is_finite() { x } else { 0.0 };
        let scale = (1.0 + finite_or_zero(variation.resolution_shift)).max(0.0);
        let shift = finite_or_zero(variation.efficiency_shift);
        let mut p = self.clone();
        vary_calo(&mut p.jets, scale, shift);
        vary_calo(&mut p.electrons, scale, shift);
        vary_calo(&mut p.taus, scale, shift);
        vary_calo(&mut p.photons, scale, shift);
        for r in &mut p.muons.resolution {
            r.a *= scale;
            r.b_per_gev *= scale;
        }
        vary_common(&mut p.muons, scale, shift);
        p.btag.efficiency_b = (p.btag.efficiency_b + shift).clamp(0.0, 1.0);
        p.met.soft_a_gev *= scale;
        p.met.soft_b_sqrt_gev *= scale;
        if *variation != Variation::default() {
            p.name = format!(
                "{} (resolution {:+}, efficiency {:+})",
                p.name, variation.resolution_shift, variation.efficiency_shift
            );
        }
        p
    }
}

fn vary_calo(o: &mut ObjectResponse<CaloRegion>, scale: f64, shift: f64) {
    for r in &mut o.resolution {
        r.stochastic_sqrt_gev *= scale;
        r.noise_gev *= scale;
        r.constant *= scale;
    }
    vary_common(o, scale, shift);
}

fn vary_common<R>(o: &mut ObjectResponse<R>, scale: f64, shift: f64) {
    o.eta_resolution *= scale;
    o.phi_resolution_rad *= scale;
    if let Some(e) = &mut o.efficiency {
        *e = (*e + shift).clamp(0.0, 1.0);
    }
    if let Some(t) = &mut o.efficiency_table {
        for e in t.values.iter_mut().flatten() {
            *e = (*e + shift).clamp(0.0, 1.0);
        }
    }
}

fn calo_terms(r: &CaloRegion) -> [(&'static str, f64); 3] {
    [
        ("stochastic_sqrt_gev", r.stochastic_sqrt_gev),
        ("noise_gev", r.noise_gev),
        ("constant", r.constant),
    ]
}

fn tracker_terms(r: &TrackerRegion) -> [(&'static str, f64); 2] {
    [("a", r.a), ("b_per_gev", r.b_per_gev)]
}

/// Builds error messages that name the profile, the key and the rule.
struct Validator<'a> {
    source_name: &'a str,
}

impl Validator<'_> {
    fn err(&self, key: &str, rule: &str) -> DetectorError {
        DetectorError::Profile(format!(
            "detector profile {}: {key}: {rule}",
            self.source_name
        ))
    }

    fn non_negative(&self, key: &str, x: f64) -> Result<(), DetectorError> {
        if x.is_finite() && x >= 0.0 {
            Ok(())
        } else {
            Err(self.err(key, &format!("must be finite and >= 0, got {x}")))
        }
    }

    fn fraction(&self, key: &str, x: f64) -> Result<(), DetectorError> {
        if (0.0..=1.0).contains(&x) {
            Ok(())
        } else {
            Err(self.err(key, &format!("efficiency must be in [0, 1], got {x}")))
        }
    }

    /// An upper |η| bound: > 0, may be infinite.
    fn positive_bound(&self, key: &str, x: f64) -> Result<(), DetectorError> {
        if x > 0.0 {
            Ok(())
        } else {
            Err(self.err(key, &format!("must be > 0, got {x}")))
        }
    }

    /// Sorted, non-overlapping [lower, upper) |η| ranges with
    /// 0 <= lower < upper; `contiguous` also forbids gaps and requires the
    /// first to start at 0. Returns the last upper bound.
    fn ranges(
        &self,
        key: &str,
        ranges: impl Iterator<Item = (f64, f64)>,
        contiguous: bool,
    ) -> Result<f64, DetectorError> {
        let mut previous_upper: Option<f64> = None;
        for (i, (lo, hi)) in ranges.enumerate() {
            let here = format!("{key}[{i}]");
            if !(lo.is_finite() && lo >= 0.0) {
                return Err(self.err(
                    &here,
                    &format!("lower |η| must be finite and >= 0, got {lo}"),
                ));
            }
            if hi.is_nan() || hi <= lo {
                return Err(self.err(
                    &here,
                    &format!("upper |η| must be > lower |η|, got [{lo}, {hi}]"),
                ));
            }
            match previous_upper {
                None if contiguous && lo != 0.0 => {
                    return Err(self.err(
                        &here,
                        &format!("first |η| region must start at 0, got {lo}"),
                    ));
                }
                Some(prev) if lo < prev => {
                    return Err(self.err(
                        &here,
                        &format!(
                            "|η| regions overlap: starts at {lo}, previous region ends at {prev}"
                        ),
                    ));
                }
                Some(prev) if contiguous && lo > prev => {
                    return Err(self.err(
                        &here,
                        &format!("gap between |η| regions: starts at {lo}, previous region ends at {prev}"),
                    ));
                }
                _ => {}
            }
            previous_upper = Some(hi);
        }
        previous_upper.ok_or_else(|| self.err(key, "must list at least one |η| range"))
    }

    fn object<R: EtaRegion, const K: usize>(
        &self,
        key: &str,
        o: &ObjectResponse<R>,
        terms: fn(&R) -> [(&'static str, f64); K],
    ) -> Result<(), DetectorError> {
        self.non_negative(&format!("{key}.min_pt_gev"), o.min_pt_gev)?;
        let acceptance_upper = self.ranges(
            &format!("{key}.abs_eta_ranges"),
            o.abs_eta_ranges.iter().map(|r| (r[0], r[1])),
            false,
        )?;
        let resolution_key = format!("{key}.resolution");
        let resolution_upper =
            self.ranges(&resolution_key, o.resolution.iter().map(R::bounds), true)?;
        if resolution_upper < acceptance_upper {
            return Err(self.err(
                &resolution_key,
                &format!(
                    "resolution regions end at |η| = {resolution_upper} but the acceptance \
                     reaches {acceptance_upper}; they must cover it"
                ),
            ));
        }
        for (i, r) in o.resolution.iter().enumerate() {
            for (name, value) in terms(r) {
                self.non_negative(&format!("{resolution_key}[{i}].{name}"), value)?;
            }
        }
        self.non_negative(&format!("{key}.eta_resolution"), o.eta_resolution)?;
        self.non_negative(&format!("{key}.phi_resolution_rad"), o.phi_resolution_rad)?;
        match (&o.efficiency, &o.efficiency_table) {
            (Some(e), None) => self.fraction(&format!("{key}.efficiency"), *e),
            (None, Some(t)) => self.table(&format!("{key}.efficiency_table"), t),
            _ => Err(self.err(
                key,
                "must give exactly one of `efficiency` and `efficiency_table`",
            )),
        }
    }

    fn edges(&self, key: &str, edges: &[f64]) -> Result<(), DetectorError> {
        if edges.len() < 2 {
            return Err(self.err(key, &format!("needs at least 2 edges, got {}", edges.len())));
        }
        for (i, w) in edges.windows(2).enumerate() {
            if !(w[0].is_finite() && w[1].is_finite() && w[0] >= 0.0 && w[1] > w[0]) {
                return Err(self.err(
                    &format!("{key}[{}]", i + 1),
                    &format!(
                        "edges must be finite, >= 0 and strictly increasing, got {} after {}",
                        w[1], w[0]
                    ),
                ));
            }
        }
        Ok(())
    }

    fn table(&self, key: &str, t: &EfficiencyTable) -> Result<(), DetectorError> {
        self.edges(&format!("{key}.pt_edges_gev"), &t.pt_edges_gev)?;
        self.edges(&format!("{key}.abs_eta_edges"), &t.abs_eta_edges)?;
        let (n_pt, n_eta) = (t.pt_edges_gev.len() - 1, t.abs_eta_edges.len() - 1);
        if t.values.len() != n_pt {
            return Err(self.err(
                &format!("{key}.values"),
                &format!(
                    "needs one row per pT bin ({n_pt}), got {} rows",
                    t.values.len()
                ),
            ));
        }
        for (i, row) in t.values.iter().enumerate() {
            if row.len() != n_eta {
                return Err(self.err(
                    &format!("{key}.values[{i}]"),
                    &format!("needs one value per |η| bin ({n_eta}), got {}", row.len()),
                ));
            }
            for (j, e) in row.iter().enumerate() {
                self.fraction(&format!("{key}.values[{i}][{j}]"), *e)?;
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn truth_profile_is_valid() {
        DetectorProfile::truth().validate("truth").unwrap();
    }

    #[test]
    fn zero_variation_keeps_the_profile() {
        let p = DetectorProfile::truth();
        assert_eq!(p.varied(&Variation::default()), p);
    }

    #[test]
    fn variation_clamps_efficiencies() {
        let p = DetectorProfile::truth().varied(&Variation {
            resolution_shift: 0.5,
            efficiency_shift: 0.1,
        });
        assert_eq!(p.electrons.efficiency, Some(1.0));
        let p = p.varied(&Variation {
            resolution_shift: 0.0,
            efficiency_shift: -1.5,
        });
        assert_eq!(p.muons.efficiency, Some(0.0));
        p.validate("varied").unwrap();
    }
}
