//! Mediator types, couplings and the partial and total widths of an
//! s-channel mediator decaying to quarks, leptons, gluons (spin 0, through a
//! top loop) and Dirac dark-matter pairs.

use super::{ModelError, require_non_negative, require_positive};
use crate::units;
use nalgebra::Complex;
use std::f64::consts::PI;
use std::fmt;
use std::str::FromStr;

/// Γ/M above which narrow-width reasoning (a Breit–Wigner peak, σ×BR
/// factorisation) is no longer trustworthy and a warning is due.
///
/// 0.3: common practice, no single source; arXiv:1507.00966 notes that
/// g_q = g_DM = 1 gives Γ/M ~ 0.5, where the narrow-width picture fails.
pub const WIDE_WIDTH_OVER_MASS: f64 = 0.3;

/// Number of quark colours N_c.
const N_COLOURS: f64 = 3.0;

/// Lorentz structure of the mediator's couplings.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum MediatorKind {
    /// Spin-1, vector couplings g χ̄γ^μχ, q̄γ_μq.
    Vector,
    /// Spin-1, axial-vector couplings g χ̄γ^μγ⁵χ, q̄γ_μγ⁵q.
    Axial,
    /// Spin-0, scalar couplings, Yukawa-scaled for quarks (g_q y_q q̄q).
    Scalar,
    /// Spin-0, pseudoscalar couplings, Yukawa-scaled for quarks (i g_q y_q q̄γ⁵q).
    Pseudoscalar,
}

impl MediatorKind {
    /// All kinds, in a fixed order.
    pub const ALL: [MediatorKind; 4] = [
        MediatorKind::Vector,
        MediatorKind::Axial,
        MediatorKind::Scalar,
        MediatorKind::Pseudoscalar,
    ];

    /// The canonical name ("vector", "axial", "scalar", "pseudoscalar").
    pub fn name(self) -> &'static str {
        match self {
            MediatorKind::Vector => "vector",
            MediatorKind::Axial => "axial",
            MediatorKind::Scalar => "scalar",
            MediatorKind::Pseudoscalar => "pseudoscalar",
        }
    }

    /// True for the spin-1 mediators.
    pub fn is_spin1(self) -> bool {
        matches!(self, MediatorKind::Vector | MediatorKind::Axial)
    }
}

impl fmt::Display for MediatorKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for MediatorKind {
    type Err = ModelError;

    /// Accepts the canonical names and "axial-vector", "v", "a", "s", "ps"
    /// (case-insensitive).
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim().to_ascii_lowercase().as_str() {
            "vector" | "v" => Ok(MediatorKind::Vector),
            "axial" | "axial-vector" | "axialvector" | "a" => Ok(MediatorKind::Axial),
            "scalar" | "s" => Ok(MediatorKind::Scalar),
            "pseudoscalar" | "pseudo-scalar" | "ps" => Ok(MediatorKind::Pseudoscalar),
            _ => Err(ModelError::UnknownMediator(s.to_string())),
        }
    }
}

/// Couplings of the mediator (dimensionless, ≥ 0).
///
/// For spin-1 mediators `g_q` is universal over the six quarks and `g_l`
/// over the three charged leptons and neutrinos; for spin-0 mediators the
/// coupling to a fermion f is g · y_f with the Yukawa coupling
/// y_f = √2 m_f / v (arXiv:1507.00966).
///
/// Deserialising (e.g. from a scan plan) validates like [`Couplings::with_leptons`];
/// `g_l` may be omitted (0).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(try_from = "CouplingsInput")]
pub struct Couplings {
    g_q: f64,
    g_dm: f64,
    g_l: f64,
}

/// Unvalidated couplings as written in a file.
#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
struct CouplingsInput {
    g_q: f64,
    g_dm: f64,
    #[serde(default)]
    g_l: f64,
}

impl TryFrom<CouplingsInput> for Couplings {
    type Error = ModelError;
    fn try_from(c: CouplingsInput) -> Result<Self, ModelError> {
        Couplings::with_leptons(c.g_q, c.g_dm, c.g_l)
    }
}

impl Couplings {
    /// Quark and DM couplings, no lepton coupling. Both must be finite and ≥ 0.
    pub fn new(g_q: f64, g_dm: f64) -> Result<Self, ModelError> {
        Self::with_leptons(g_q, g_dm, 0.0)
    }

    /// Quark, DM and lepton couplings, each finite and ≥ 0.
    pub fn with_leptons(g_q: f64, g_dm: f64, g_l: f64) -> Result<Self, ModelError> {
        Ok(Self {
            g_q: require_non_negative("g_q", g_q, "")?,
            g_dm: require_non_negative("g_dm", g_dm, "")?,
            g_l: require_non_negative("g_l", g_l, "")?,
        })
    }

    /// The benchmark couplings g_q = 0.25, g_DM = 1, g_ℓ = 0 of the LHC
    /// Dark Matter Working Group (arXiv:1603.04156).
    pub fn benchmark() -> Self {
        Self {
            g_q: 0.25,
            g_dm: 1.0,
            g_l: 0.0,
        }
    }

    /// Quark coupling g_q.
    pub fn g_q(&self) -> f64 {
        self.g_q
    }

    /// DM coupling g_DM.
    pub fn g_dm(&self) -> f64 {
        self.g_dm
    }

    /// Lepton coupling g_ℓ.
    pub fn g_l(&self) -> f64 {
        self.g_l
    }
}

/// Fermion masses used for the decay thresholds, in GeV.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct FermionMasses {
    /// u, d, s, c, b, t [GeV].
    pub quarks_gev: [f64; 6],
    /// e, μ, τ [GeV].
    pub leptons_gev: [f64; 3],
}

impl FermionMasses {
    /// PDG 2024 values from [`crate::units`].
    pub fn pdg2024() -> Self {
        Self {
            quarks_gev: [
                units::M_UP_GEV,
                units::M_DOWN_GEV,
                units::M_STRANGE_GEV,
                units::M_CHARM_GEV,
                units::M_BOTTOM_GEV,
                units::M_TOP_GEV,
            ],
            leptons_gev: [units::M_ELECTRON_GEV, units::M_MUON_GEV, units::M_TAU_GEV],
        }
    }

    /// The same masses with another top-quark mass [GeV] (finite, > 0).
    pub fn with_top(mut self, m_top_gev: f64) -> Result<Self, ModelError> {
        self.quarks_gev[5] = require_positive("m_top_gev", m_top_gev, "GeV")?;
        Ok(self)
    }
}

impl Default for FermionMasses {
    fn default() -> Self {
        Self::pdg2024()
    }
}

/// A decay channel of the mediator.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Channel {
    /// A quark–antiquark pair; 0 = u, 1 = d, 2 = s, 3 = c, 4 = b, 5 = t.
    Quark(usize),
    /// A charged-lepton pair; 0 = e, 1 = μ, 2 = τ.
    Lepton(usize),
    /// Three neutrino flavours together (spin-1 only).
    Neutrinos,
    /// Two gluons through the top loop (spin-0 only).
    Gluons,
    /// A dark-matter pair χχ̄.
    DarkMatter,
}

impl Channel {
    /// A short name: "uu", "dd", …, "tt", "ee", "μμ", "ττ", "νν", "gg", "χχ".
    pub fn name(self) -> &'static str {
        const Q: [&str; 6] = ["uu", "dd", "ss", "cc", "bb", "tt"];
        const L: [&str; 3] = ["ee", "μμ", "ττ"];
        match self {
            Channel::Quark(i) => Q.get(i).copied().unwrap_or("qq"),
            Channel::Lepton(i) => L.get(i).copied().unwrap_or("ll"),
            Channel::Neutrinos => "νν",
            Channel::Gluons => "gg",
            Channel::DarkMatter => "χχ",
        }
    }
}

/// An s-channel mediator of mass M coupling Dirac dark matter χ of mass m_χ
/// to quarks (and optionally leptons). Built only through [`Mediator::new`],
/// so every instance has valid masses and couplings.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Mediator {
    kind: MediatorKind,
    m_med_gev: f64,
    m_dm_gev: f64,
    couplings: Couplings,
    masses: FermionMasses,
}

/// Velocity factor β_f = √(1 − 4 m_f²/M²) above threshold, 0 at and below.
///
/// # Units
/// `m_gev`, `m_f_gev` in GeV; result dimensionless.
fn beta(m_gev: f64, m_f_gev: f64) -> f64 {
    let x = 1.0 - 4.0 * m_f_gev * m_f_gev / (m_gev * m_gev);
    if x > 0.0 { x.sqrt() } else { 0.0 }
}

/// Partial width of a spin-1 mediator to a fermion pair.
///
/// # Formula
/// Vector: Γ = N_c g² M/(12π) (1 + 2m_f²/M²) β_f;
/// axial-vector: Γ = N_c g² M/(12π) β_f³; β_f = √(1 − 4m_f²/M²),
/// zero at and below threshold (M ≤ 2m_f).
///
/// # Units
/// `m_gev`, `m_f_gev` and the result in GeV.
///
/// # References
/// D. Abercrombie et al., arXiv:1507.00966 (REFERENCES §3; equation numbers not re-read).
pub fn spin1_fermion_width_gev(
    kind: MediatorKind,
    n_c: f64,
    g: f64,
    m_gev: f64,
    m_f_gev: f64,
) -> f64 {
    let b = beta(m_gev, m_f_gev);
    if b == 0.0 {
        return 0.0;
    }
    let pre = n_c * g * g * m_gev / (12.0 * PI);
    match kind {
        MediatorKind::Axial => pre * b * b * b,
        _ => pre * (1.0 + 2.0 * m_f_gev * m_f_gev / (m_gev * m_gev)) * b,
    }
}

/// Partial width of a spin-0 mediator to a fermion pair with coupling g.
///
/// # Formula
/// Γ = N_c g² M/(8π) · κ · β_f^x with x = 3 (scalar), 1 (pseudoscalar);
/// for quarks and leptons g = g_q y_f with y_f = √2 m_f/v and κ = ½
/// (i.e. N_c y_f² g_q² M/(16π) β_f^x); for Dirac DM κ = 1 (g_DM² M/(8π) β_χ^x).
///
/// # Units
/// `m_gev`, `m_f_gev` and the result in GeV.
///
/// # References
/// D. Abercrombie et al., arXiv:1507.00966 (REFERENCES §3; equation numbers not re-read).
fn spin0_fermion_width_gev(kind: MediatorKind, pre_gev: f64, m_gev: f64, m_f_gev: f64) -> f64 {
    let b = beta(m_gev, m_f_gev);
    match kind {
        MediatorKind::Pseudoscalar => pre_gev * b,
        _ => pre_gev * b * b * b,
    }
}

/// Loop function of the spin-0 → gg width.
///
/// # Formula
/// With τ = 4m_t²/M² and F(τ) = arcsin²(1/√τ) = arctan²(1/√(τ − 1)) for
/// τ ≥ 1, continued for τ < 1 as F(τ) = −¼[ln((1 + √(1−τ))/(1 − √(1−τ))) − iπ]²:
/// scalar f_φ(τ) = τ[1 + (1 − τ)F(τ)], pseudoscalar f_a(τ) = τF(τ).
/// Heavy-top limits: f_φ → 2/3, f_a → 1.
///
/// # References
/// D. Abercrombie et al., arXiv:1507.00966 (REFERENCES §3); continuation below
/// τ = 1 as in M. Spira, hep-ph/9705337, Eq. (47) (from memory).
pub fn gluon_loop_function(kind: MediatorKind, tau: f64) -> Complex<f64> {
    let f = if tau >= 1.0 {
        let a = (1.0 / tau.sqrt()).asin();
        Complex::new(a * a, 0.0)
    } else {
        let r = (1.0 - tau).sqrt();
        let l = Complex::new(((1.0 + r) / (1.0 - r)).ln(), -PI);
        -(l * l) * 0.25
    };
    match kind {
        MediatorKind::Pseudoscalar => f * tau,
        _ => (f * (1.0 - tau) + 1.0) * tau,
    }
}

impl Mediator {
    /// A mediator of the given kind, mass M [GeV] (> 0), DM mass m_χ [GeV]
    /// (> 0) and couplings, with PDG 2024 fermion masses.
    pub fn new(
        kind: MediatorKind,
        m_med_gev: f64,
        m_dm_gev: f64,
        couplings: Couplings,
    ) -> Result<Self, ModelError> {
        Ok(Self {
            kind,
            m_med_gev: require_positive("m_med_gev", m_med_gev, "GeV")?,
            m_dm_gev: require_positive("m_dm_gev", m_dm_gev, "GeV")?,
            couplings,
            masses: FermionMasses::pdg2024(),
        })
    }

    /// The same point with other fermion masses.
    pub fn with_masses(mut self, masses: FermionMasses) -> Self {
        self.masses = masses;
        self
    }

    /// The same masses with other couplings.
    pub fn with_couplings(mut self, couplings: Couplings) -> Self {
        self.couplings = couplings;
        self
    }

    /// The same point at another mediator mass M [GeV] (> 0).
    pub fn with_m_med(mut self, m_med_gev: f64) -> Result<Self, ModelError> {
        self.m_med_gev = require_positive("m_med_gev", m_med_gev, "GeV")?;
        Ok(self)
    }

    /// Mediator kind.
    pub fn kind(&self) -> MediatorKind {
        self.kind
    }

    /// Mediator mass M [GeV].
    pub fn m_med_gev(&self) -> f64 {
        self.m_med_gev
    }

    /// DM mass m_χ [GeV].
    pub fn m_dm_gev(&self) -> f64 {
        self.m_dm_gev
    }

    /// Couplings.
    pub fn couplings(&self) -> Couplings {
        self.couplings
    }

    /// Fermion masses in use.
    pub fn masses(&self) -> FermionMasses {
        self.masses
    }

    /// Partial width [GeV] into one channel, at the mediator mass M.
    /// Channels the mediator kind has no coupling to give 0.
    pub fn partial_width_gev(&self, channel: Channel) -> f64 {
        self.partial_width_at_gev(channel, self.m_med_gev)
    }

    /// Partial width [GeV] into one channel evaluated at the invariant mass
    /// `m_gev` instead of M (for an off-shell mediator line shape); 0 when
    /// `m_gev` is not finite and > 0.
    ///
    /// # Formula
    /// The expressions of [`spin1_fermion_width_gev`],
    /// [`spin0_fermion_width_gev`] and the gluon term
    /// Γ_gg = α_s² g_q² M³/(32π³ v²) |f(4m_t²/M²)|² with
    /// [`gluon_loop_function`], with M replaced by `m_gev`; α_s is held at
    /// α_s(m_Z) (approximation: the running to the TeV scale lowers it by
    /// ~25 %, a ~45 % smaller gg width).
    ///
    /// # Units
    /// `m_gev` and the result in GeV.
    ///
    /// # References
    /// D. Abercrombie et al., arXiv:1507.00966 (REFERENCES §3).
    pub fn partial_width_at_gev(&self, channel: Channel, m_gev: f64) -> f64 {
        if !(m_gev.is_finite() && m_gev > 0.0) {
            return 0.0;
        }
        let c = self.couplings;
        let v = units::HIGGS_VEV_GEV;
        match (self.kind.is_spin1(), channel) {
            (true, Channel::Quark(i)) => match self.masses.quarks_gev.get(i) {
                Some(&mq) => spin1_fermion_width_gev(self.kind, N_COLOURS, c.g_q, m_gev, mq),
                None => 0.0,
            },
            (true, Channel::Lepton(i)) => match self.masses.leptons_gev.get(i) {
                Some(&ml) => spin1_fermion_width_gev(self.kind, 1.0, c.g_l, m_gev, ml),
                None => 0.0,
            },
            // Left-handed neutrinos only: half the massless Dirac width, per
            // flavour g² M/(24π), for vector and axial-vector alike.
            (true, Channel::Neutrinos) => 3.0 * c.g_l * c.g_l * m_gev / (24.0 * PI),
            (true, Channel::DarkMatter) => {
                spin1_fermion_width_gev(self.kind, 1.0, c.g_dm, m_gev, self.m_dm_gev)
            }
            (true, Channel::Gluons) => 0.0,
            (false, Channel::Quark(i)) => match self.masses.quarks_gev.get(i) {
                Some(&mq) => {
                    let y = std::f64::consts::SQRT_2 * mq / v;
                    let pre = N_COLOURS * y * y * c.g_q * c.g_q * m_gev / (16.0 * PI);
                    spin0_fermion_width_gev(self.kind, pre, m_gev, mq)
                }
                None => 0.0,
            },
            (false, Channel::Lepton(i)) => match self.masses.leptons_gev.get(i) {
                Some(&ml) => {
                    let y = std::f64::consts::SQRT_2 * ml / v;
                    let pre = y * y * c.g_l * c.g_l * m_gev / (16.0 * PI);
                    spin0_fermion_width_gev(self.kind, pre, m_gev, ml)
                }
                None => 0.0,
            },
            (false, Channel::Neutrinos) => 0.0,
            (false, Channel::DarkMatter) => {
                let pre = c.g_dm * c.g_dm * m_gev / (8.0 * PI);
                spin0_fermion_width_gev(self.kind, pre, m_gev, self.m_dm_gev)
            }
            (false, Channel::Gluons) => {
                let mt = self.masses.quarks_gev[5];
                let tau = 4.0 * mt * mt / (m_gev * m_gev);
                let f = gluon_loop_function(self.kind, tau).norm_sqr();
                let a = units::ALPHA_S_MZ;
                a * a * c.g_q * c.g_q * m_gev.powi(3) / (32.0 * PI.powi(3) * v * v) * f
            }
        }
    }

    /// All channels of this mediator kind, in a fixed order.
    pub fn channels(&self) -> Vec<Channel> {
        let mut out: Vec<Channel> = (0..6).map(Channel::Quark).collect();
        out.extend((0..3).map(Channel::Lepton));
        if self.kind.is_spin1() {
            out.push(Channel::Neutrinos);
        } else {
            out.push(Channel::Gluons);
        }
        out.push(Channel::DarkMatter);
        out
    }

    /// Every channel with its partial width [GeV], in [`Self::channels`] order.
    pub fn partial_widths_gev(&self) -> Vec<(Channel, f64)> {
        self.channels()
            .into_iter()
            .map(|ch| (ch, self.partial_width_gev(ch)))
            .collect()
    }

    /// Total width Γ [GeV]: the sum of all partial widths at M.
    pub fn total_width_gev(&self) -> f64 {
        self.total_width_at_gev(self.m_med_gev)
    }

    /// Total width [GeV] evaluated at the invariant mass `m_gev` [GeV].
    pub fn total_width_at_gev(&self, m_gev: f64) -> f64 {
        self.channels()
            .into_iter()
            .map(|ch| self.partial_width_at_gev(ch, m_gev))
            .sum()
    }

    /// Γ/M (dimensionless).
    pub fn width_over_mass(&self) -> f64 {
        self.total_width_gev() / self.m_med_gev
    }

    /// True when Γ/M exceeds [`WIDE_WIDTH_OVER_MASS`]: narrow-width
    /// statements (σ×BR factorisation, rescaling) are then unreliable.
    pub fn is_wide(&self) -> bool {
        self.width_over_mass() > WIDE_WIDTH_OVER_MASS
    }

    /// Branching ratio BR(→ χχ̄) = Γ_χ/Γ_tot (0 below the χχ̄ threshold or
    /// when the total width vanishes).
    pub fn br_dm(&self) -> f64 {
        let total = self.total_width_gev();
        if total > 0.0 {
            self.partial_width_gev(Channel::DarkMatter) / total
        } else {
            0.0
        }
    }

    /// True when the mediator can decay on shell to a DM pair, M > 2m_χ.
    pub fn is_on_shell(&self) -> bool {
        self.m_med_gev > 2.0 * self.m_dm_gev
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_kind_names() {
        assert_eq!(
            "Axial-Vector".parse::<MediatorKind>(),
            Ok(MediatorKind::Axial)
        );
        assert_eq!("ps".parse::<MediatorKind>(), Ok(MediatorKind::Pseudoscalar));
        assert!(matches!(
            "tensor".parse::<MediatorKind>(),
            Err(ModelError::UnknownMediator(_))
        ));
    }

    #[test]
    fn couplings_deserialise_with_validation() {
        let ok: Couplings = serde_json::from_str(r#"{"g_q": 0.25, "g_dm": 1.0}"#).unwrap();
        assert_eq!(ok, Couplings::benchmark());
        let bad = serde_json::from_str::<Couplings>(r#"{"g_q": -1.0, "g_dm": 1.0}"#);
        assert!(
            bad.unwrap_err()
                .to_string()
                .contains("g_q must be finite and >= 0")
        );
    }

    #[test]
    fn loop_function_is_continuous_at_threshold() {
        // Both branches give π²/4 · τ-structure at τ = 1 (identity, no source).
        for kind in [MediatorKind::Scalar, MediatorKind::Pseudoscalar] {
            let lo = gluon_loop_function(kind, 1.0 - 1e-9);
            let hi = gluon_loop_function(kind, 1.0 + 1e-9);
            assert!((lo - hi).norm() < 1e-3, "{kind}: {lo} vs {hi}");
        }
    }
}
