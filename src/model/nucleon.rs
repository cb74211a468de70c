//! DM–nucleon scattering cross-sections at zero momentum transfer implied by
//! a simplified mediator model, for protons and neutrons, with the nucleon
//! matrix elements (Δq, f_Tq) as named parameter sets.
//!
//! Formulas: A. Boveia et al. (LHC Dark Matter Working Group),
//! arXiv:1603.04156 (see REFERENCES §4).

use super::{Mediator, MediatorKind, ModelError};
use crate::units;
use std::f64::consts::PI;
use std::fmt;
use std::str::FromStr;

/// A nucleon target.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Nucleon {
    /// The proton.
    Proton,
    /// The neutron.
    Neutron,
}

impl Nucleon {
    /// Both nucleons, proton first.
    pub const BOTH: [Nucleon; 2] = [Nucleon::Proton, Nucleon::Neutron];

    /// Mass [GeV] (PDG 2024, [`crate::units`]).
    pub fn mass_gev(self) -> f64 {
        match self {
            Nucleon::Proton => units::M_PROTON_GEV,
            Nucleon::Neutron => units::M_NEUTRON_GEV,
        }
    }

    /// "proton" or "neutron".
    pub fn name(self) -> &'static str {
        match self {
            Nucleon::Proton => "proton",
            Nucleon::Neutron => "neutron",
        }
    }
}

impl fmt::Display for Nucleon {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for Nucleon {
    type Err = ModelError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim().to_ascii_lowercase().as_str() {
            "proton" | "p" => Ok(Nucleon::Proton),
            "neutron" | "n" => Ok(Nucleon::Neutron),
            _ => Err(ModelError::UnknownNucleon(s.to_string())),
        }
    }
}

/// Spin-independent or spin-dependent scattering.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
pub enum ScatteringType {
    /// Spin-independent (σ_SI): vector and scalar mediators.
    #[serde(rename = "SI")]
    SpinIndependent,
    /// Spin-dependent (σ_SD): axial-vector mediators.
    #[serde(rename = "SD")]
    SpinDependent,
}

impl ScatteringType {
    /// "SI" or "SD".
    pub fn short(self) -> &'static str {
        match self {
            ScatteringType::SpinIndependent => "SI",
            ScatteringType::SpinDependent => "SD",
        }
    }

    /// The scattering type a mediator kind produces at leading order, or
    /// [`ModelError::MomentumSuppressed`] for the pseudoscalar.
    pub fn for_mediator(kind: MediatorKind) -> Result<Self, ModelError> {
        match kind {
            MediatorKind::Vector | MediatorKind::Scalar => Ok(ScatteringType::SpinIndependent),
            MediatorKind::Axial => Ok(ScatteringType::SpinDependent),
            MediatorKind::Pseudoscalar => Err(ModelError::MomentumSuppressed),
        }
    }
}

/// Nucleon matrix elements: the quark spin fractions Δq of the proton
/// (the neutron's follow by isospin, Δu ↔ Δd) and the scalar quark
/// fractions f_Tq of proton and neutron.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct NucleonParams {
    /// Name used to select the set.
    pub name: &'static str,
    /// Where the numbers come from.
    pub source: &'static str,
    /// Proton Δu, Δd, Δs.
    pub delta_q_proton: [f64; 3],
    /// Proton f_Tu, f_Td, f_Ts.
    pub f_tq_proton: [f64; 3],
    /// Neutron f_Tu, f_Td, f_Ts.
    pub f_tq_neutron: [f64; 3],
}

impl NucleonParams {
    /// The LHC Dark Matter Working Group choice: Δu = 0.84, Δd = −0.43,
    /// Δs = −0.09 (A. Boveia et al., arXiv:1603.04156; REFERENCES
    /// §4, memory) and f_Tq of J. Ellis, A. Ferstl, K. A. Olive, PLB 481
    /// (2000) 304: proton 0.020, 0.026, 0.118; neutron 0.014, 0.036, 0.118
    /// (memory).
    pub const DMWG2016: NucleonParams = NucleonParams {
        name: "dmwg2016",
        source: "Delta q: Boveia et al., arXiv:1603.04156 (LHC DM WG); \
                 f_Tq: Ellis, Ferstl, Olive, PLB 481 (2000) 304 (values from memory)",
        delta_q_proton: [0.84, -0.43, -0.09],
        f_tq_proton: [0.020, 0.026, 0.118],
        f_tq_neutron: [0.014, 0.036, 0.118],
    };

    /// A set with a smaller strange content: Δq from HERMES, A. Airapetian
    /// et al., PRD 75 (2007) 012007 (Δu = 0.842, Δd = −0.427, Δs = −0.085);
    /// f_Tu, f_Td from M. Hoferichter et al., PRL 115 (2015) 092301
    /// (proton 0.0208, 0.0411; neutron 0.0189, 0.0451) and f_Ts = 0.043 from
    /// lattice QCD (P. Junnarkar, A. Walker-Loud, PRD 87 (2013) 114510).
    /// All from memory.
    pub const LATTICE2015: NucleonParams = NucleonParams {
        name: "lattice2015",
        source: "Delta q: HERMES, PRD 75 (2007) 012007; f_Tu,d: Hoferichter et al., \
                 PRL 115 (2015) 092301; f_Ts: Junnarkar, Walker-Loud, PRD 87 (2013) 114510 \
                 (values from memory)",
        delta_q_proton: [0.842, -0.427, -0.085],
        f_tq_proton: [0.0208, 0.0411, 0.043],
        f_tq_neutron: [0.0189, 0.0451, 0.043],
    };

    /// All named sets; the first is the default.
    pub const ALL: [NucleonParams; 2] = [Self::DMWG2016, Self::LATTICE2015];

    /// The set of that name.
    pub fn by_name(name: &str) -> Result<NucleonParams, ModelError> {
        Self::ALL
            .iter()
            .find(|p| p.name.eq_ignore_ascii_case(name.trim()))
            .copied()
            .ok_or_else(|| ModelError::UnknownNucleonSet {
                name: name.to_string(),
                known: Self::ALL
                    .iter()
                    .map(|p| p.name)
                    .collect::<Vec<_>>()
                    .join(", "),
            })
    }

    /// Δu, Δd, Δs of the nucleon (isospin: the neutron swaps Δu and Δd).
    pub fn delta_q(&self, nucleon: Nucleon) -> [f64; 3] {
        let [u, d, s] = self.delta_q_proton;
        match nucleon {
            Nucleon::Proton => [u, d, s],
            Nucleon::Neutron => [d, u, s],
        }
    }

    /// f_Tu, f_Td, f_Ts of the nucleon.
    pub fn f_tq(&self, nucleon: Nucleon) -> [f64; 3] {
        match nucleon {
            Nucleon::Proton => self.f_tq_proton,
            Nucleon::Neutron => self.f_tq_neutron,
        }
    }

    /// Effective scalar coupling factor for Yukawa-scaled couplings.
    ///
    /// # Formula
    /// f_N = 2/9 + (7/9) Σ_{q=u,d,s} f_Tq (the heavy quarks enter through
    /// the gluon term f_TG = 1 − Σ f_Tq, each with weight 2/27).
    ///
    /// # References
    /// A. Boveia et al., arXiv:1603.04156; M. A. Shifman,
    /// A. I. Vainshtein, V. I. Zakharov, PLB 78 (1978) 443.
    pub fn f_n(&self, nucleon: Nucleon) -> f64 {
        2.0 / 9.0 + 7.0 / 9.0 * self.f_tq(nucleon).iter().sum::<f64>()
    }
}

impl Default for NucleonParams {
    fn default() -> Self {
        Self::DMWG2016
    }
}

/// Reduced mass μ = m₁m₂/(m₁ + m₂) [GeV] of two masses [GeV].
pub fn reduced_mass_gev(m1_gev: f64, m2_gev: f64) -> f64 {
    m1_gev * m2_gev / (m1_gev + m2_gev)
}

/// Spin-independent DM–nucleon cross-section of a vector mediator with
/// universal quark coupling.
///
/// # Formula
/// σ_SI = 9 g_q² g_DM² μ_nχ² / (π M⁴) · (ħc)² (f_p = f_n = 3 g_q: two
/// valence quarks of one flavour and one of the other).
///
/// # Units
/// `m_med_gev`, `mu_gev` in GeV; result in cm².
///
/// # References
/// A. Boveia et al., arXiv:1603.04156, DM–nucleon formulas (REFERENCES §4; from memory, prefactor confirmed
/// by computation; equation number not re-read).
pub fn sigma_si_vector_cm2(g_q: f64, g_dm: f64, m_med_gev: f64, mu_gev: f64) -> f64 {
    9.0 * (g_q * g_dm * mu_gev).powi(2) / (PI * m_med_gev.powi(4)) * units::HBARC2_GEV2_CM2
}

/// Spin-dependent DM–nucleon cross-section of an axial-vector mediator
/// with universal quark coupling.
///
/// # Formula
/// σ_SD = 3 g_q² g_DM² (Δu + Δd + Δs)² μ_nχ² / (π M⁴) · (ħc)².
///
/// # Units
/// `m_med_gev`, `mu_gev` in GeV; `delta_sum` dimensionless; result in cm².
///
/// # References
/// A. Boveia et al., arXiv:1603.04156, DM–nucleon formulas (REFERENCES §4; from memory, prefactor confirmed
/// by computation; equation number not re-read).
pub fn sigma_sd_axial_cm2(g_q: f64, g_dm: f64, m_med_gev: f64, mu_gev: f64, delta_sum: f64) -> f64 {
    3.0 * (g_q * g_dm * delta_sum * mu_gev).powi(2) / (PI * m_med_gev.powi(4))
        * units::HBARC2_GEV2_CM2
}

/// Spin-independent DM–nucleon cross-section of a scalar mediator with
/// Yukawa-scaled quark couplings.
///
/// # Formula
/// σ_SI = (μ_nχ²/π) [g_q g_DM m_N f_N / (v M²)]² · (ħc)², v the Higgs
/// vacuum expectation value, f_N from [`NucleonParams::f_n`].
///
/// # Units
/// Masses and v in GeV; result in cm².
///
/// # References
/// A. Boveia et al., arXiv:1603.04156, DM–nucleon formulas (REFERENCES §4; from memory, prefactor confirmed
/// by computation; equation number not re-read).
pub fn sigma_si_scalar_cm2(
    g_q: f64,
    g_dm: f64,
    m_med_gev: f64,
    mu_gev: f64,
    m_nucleon_gev: f64,
    f_n: f64,
) -> f64 {
    let a = g_q * g_dm * m_nucleon_gev * f_n / (units::HIGGS_VEV_GEV * m_med_gev * m_med_gev);
    mu_gev * mu_gev / PI * a * a * units::HBARC2_GEV2_CM2
}

/// A DM–nucleon cross-section with what it is.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct NucleonCrossSection {
    /// SI or SD.
    pub kind: ScatteringType,
    /// The nucleon.
    pub nucleon: Nucleon,
    /// The cross-section [cm²].
    pub sigma_cm2: f64,
    /// DM–nucleon reduced mass [GeV].
    pub reduced_mass_gev: f64,
    /// Name of the nucleon parameter set used.
    pub params: &'static str,
}

impl Mediator {
    /// The DM–nucleon cross-section this model point implies: σ_SI for
    /// vector and scalar, σ_SD for axial-vector mediators, with
    /// μ_nχ = m_N m_χ/(m_N + m_χ).
    ///
    /// # Formula
    /// [`sigma_si_vector_cm2`], [`sigma_sd_axial_cm2`] with
    /// Δu + Δd + Δs of the nucleon, [`sigma_si_scalar_cm2`].
    ///
    /// # Units
    /// Result in cm².
    ///
    /// # References
    /// A. Boveia et al., arXiv:1603.04156.
    ///
    /// # Errors
    /// [`ModelError::MomentumSuppressed`] for a pseudoscalar mediator.
    pub fn sigma_nucleon_cm2(
        &self,
        nucleon: Nucleon,
        params: &NucleonParams,
    ) -> Result<NucleonCrossSection, ModelError> {
        let kind = ScatteringType::for_mediator(self.kind())?;
        let c = self.couplings();
        let m_n = nucleon.mass_gev();
        let mu = reduced_mass_gev(m_n, self.m_dm_gev());
        let m = self.m_med_gev();
        let sigma_cm2 = match self.kind() {
            MediatorKind::Vector => sigma_si_vector_cm2(c.g_q(), c.g_dm(), m, mu),
            MediatorKind::Axial => {
                let dq: f64 = params.delta_q(nucleon).iter().sum();
                sigma_sd_axial_cm2(c.g_q(), c.g_dm(), m, mu, dq)
            }
            _ => sigma_si_scalar_cm2(c.g_q(), c.g_dm(), m, mu, m_n, params.f_n(nucleon)),
        };
        Ok(NucleonCrossSection {
            kind,
            nucleon,
            sigma_cm2,
            reduced_mass_gev: mu,
            params: params.name,
        })
    }
}
