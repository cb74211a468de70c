//! Rescaling a signal generated at reference couplings to other couplings
//! without regenerating events, and solving for the excluded coupling.
//!
//! The approximation: the kinematics of the signal does not depend on the
//! couplings (true while the mediator stays narrow), only its rate does.
//! On shell (M > 2m_χ) the narrow-width approximation factorises the rate
//! as σ(pp → Y + j) · BR(Y → χχ̄) with σ ∝ g_q², so σ×BR ∝ g_q² Γ_χ/Γ_tot;
//! off shell (M ≤ 2m_χ) the rate is ∝ g_q² g_DM² (the propagator is far
//! from its pole and the width is negligible in it).
//! D. Abercrombie et al., arXiv:1507.00966; A. Boveia et al.,
//! arXiv:1603.04156.

use super::{Couplings, Mediator, ModelError, require_positive};

/// Lower end of the coupling range searched by [`Mediator::excluded_coupling`].
pub const COUPLING_SEARCH_MIN: f64 = 1e-6;
/// Upper end of the coupling range: 4π, the usual perturbativity bound
/// (common practice, no single source).
pub const COUPLING_SEARCH_MAX: f64 = 4.0 * std::f64::consts::PI;

/// Which factorisation the rescaling uses.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum ProductionRegime {
    /// M > 2m_χ: narrow-width σ×BR ∝ g_q² Γ_χ/Γ_tot.
    OnShell,
    /// M ≤ 2m_χ: σ ∝ g_q² g_DM².
    OffShell,
}

impl ProductionRegime {
    /// A one-line statement of the approximation, for outputs.
    pub fn approximation(self) -> &'static str {
        match self {
            ProductionRegime::OnShell => {
                "on-shell mediator (M > 2 m_DM): narrow-width approximation, \
                 sigma x BR scales as g_q^2 * Gamma_DM / Gamma_total; \
                 kinematics assumed independent of the couplings"
            }
            ProductionRegime::OffShell => {
                "off-shell mediator (M <= 2 m_DM): sigma scales as g_q^2 * g_DM^2; \
                 kinematics assumed independent of the couplings"
            }
        }
    }
}

/// The ratio σ(new couplings)/σ(reference couplings) at fixed masses.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct SignalScale {
    /// σ_new / σ_ref (dimensionless, ≥ 0).
    pub factor: f64,
    /// The factorisation used.
    pub regime: ProductionRegime,
    /// Γ/M at the reference couplings.
    pub reference_width_over_mass: f64,
    /// Γ/M at the new couplings.
    pub new_width_over_mass: f64,
    /// True when either Γ/M exceeds
    /// [`super::WIDE_WIDTH_OVER_MASS`]: the rescaling is then unreliable.
    pub wide: bool,
}

/// A one-parameter family of couplings along which the excluded coupling is
/// solved for.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum CouplingPath {
    /// g_q varies, g_DM fixed at the given value.
    QuarkAtFixedDm(f64),
    /// g_DM varies, g_q fixed at the given value.
    DmAtFixedQuark(f64),
    /// g_q = g_DM = g varies.
    Equal,
}

impl CouplingPath {
    /// The couplings at parameter value g (g_ℓ kept from `base`).
    fn couplings(self, g: f64, base: &Couplings) -> Result<Couplings, ModelError> {
        match self {
            CouplingPath::QuarkAtFixedDm(g_dm) => Couplings::with_leptons(g, g_dm, base.g_l()),
            CouplingPath::DmAtFixedQuark(g_q) => Couplings::with_leptons(g_q, g, base.g_l()),
            CouplingPath::Equal => Couplings::with_leptons(g, g, base.g_l()),
        }
    }

    /// A short description, e.g. "g_q at g_DM = 1".
    pub fn describe(self) -> String {
        match self {
            CouplingPath::QuarkAtFixedDm(g_dm) => format!("g_q at g_DM = {g_dm}"),
            CouplingPath::DmAtFixedQuark(g_q) => format!("g_DM at g_q = {g_q}"),
            CouplingPath::Equal => "g_q = g_DM".to_string(),
        }
    }
}

/// The smallest excluded coupling on a path: couplings at or above
/// `g_limit` on the path are excluded, those below allowed.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct CouplingLimit {
    /// The path.
    pub path: CouplingPath,
    /// The coupling at the exclusion boundary.
    pub g_limit: f64,
    /// The full set of couplings at the boundary.
    pub couplings: Couplings,
    /// Γ/M at the boundary.
    pub width_over_mass: f64,
    /// True when Γ/M at the boundary exceeds
    /// [`super::WIDE_WIDTH_OVER_MASS`].
    pub wide: bool,
    /// The factorisation used.
    pub regime: ProductionRegime,
}

impl Mediator {
    /// The factorisation that applies at these masses.
    pub fn regime(&self) -> ProductionRegime {
        if self.is_on_shell() {
            ProductionRegime::OnShell
        } else {
            ProductionRegime::OffShell
        }
    }

    /// Ratio of the signal rate at `new` couplings to the rate at this
    /// mediator's (reference) couplings, at the same masses.
    ///
    /// # Formula
    /// On shell (M > 2m_χ): r = (g_q'/g_q)² · BR'(χχ̄)/BR(χχ̄);
    /// off shell: r = (g_q' g_DM' / (g_q g_DM))².
    ///
    /// # Units
    /// Dimensionless.
    ///
    /// # References
    /// D. Abercrombie et al., arXiv:1507.00966 (narrow-width
    /// factorisation); the off-shell scaling follows from the propagator
    /// 1/(q² − M²) far from the pole.
    ///
    /// # Errors
    /// The reference must have signal: g_q > 0 and g_DM > 0.
    pub fn signal_scale(&self, new: &Couplings) -> Result<SignalScale, ModelError> {
        let r = self.couplings();
        require_positive("reference g_q", r.g_q(), "")?;
        require_positive("reference g_dm", r.g_dm(), "")?;
        let other = self.with_couplings(*new);
        let regime = self.regime();
        let factor = match regime {
            ProductionRegime::OnShell => {
                let br_ref = self.br_dm();
                if br_ref > 0.0 {
                    (new.g_q() / r.g_q()).powi(2) * other.br_dm() / br_ref
                } else {
                    // invariant: on shell with g_DM > 0 the χχ̄ width is > 0.
                    0.0
                }
            }
            ProductionRegime::OffShell => (new.g_q() * new.g_dm() / (r.g_q() * r.g_dm())).powi(2),
        };
        let (w_ref, w_new) = (self.width_over_mass(), other.width_over_mass());
        Ok(SignalScale {
            factor,
            regime,
            reference_width_over_mass: w_ref,
            new_width_over_mass: w_new,
            wide: self.is_wide() || other.is_wide(),
        })
    }

    /// Upper limit on the signal strength at `new` couplings, from the limit
    /// `mu_limit_ref` (> 0) at this mediator's couplings: μ_new = μ_ref / r
    /// with r from [`Self::signal_scale`] (+∞ when r = 0).
    pub fn mu_limit_at(&self, mu_limit_ref: f64, new: &Couplings) -> Result<f64, ModelError> {
        require_positive("mu_limit_ref", mu_limit_ref, "")?;
        let r = self.signal_scale(new)?.factor;
        Ok(if r > 0.0 {
            mu_limit_ref / r
        } else {
            f64::INFINITY
        })
    }

    /// Solves for the coupling on `path` at which the rescaled signal
    /// reaches the limit: r(g) = μ_ref, with r from [`Self::signal_scale`].
    ///
    /// r(g) rises monotonically along every path, so bisection in ln g on
    /// [[`COUPLING_SEARCH_MIN`], [`COUPLING_SEARCH_MAX`]] is robust; it stops
    /// when the bracket is narrower than 10⁻¹² relative.
    ///
    /// # Errors
    /// [`ModelError::NoSolution`] when r(g) stays below μ_ref in the whole
    /// range (not excluded up to 4π) or is above it already at 10⁻⁶.
    pub fn excluded_coupling(
        &self,
        mu_limit_ref: f64,
        path: CouplingPath,
    ) -> Result<CouplingLimit, ModelError> {
        require_positive("mu_limit_ref", mu_limit_ref, "")?;
        if let CouplingPath::QuarkAtFixedDm(g) | CouplingPath::DmAtFixedQuark(g) = path {
            require_positive("fixed coupling of the path", g, "")?;
        }
        let base = self.couplings();
        let scale = |g: f64| -> Result<f64, ModelError> {
            Ok(self.signal_scale(&path.couplings(g, &base)?)?.factor)
        };
        let (mut lo, mut hi) = (COUPLING_SEARCH_MIN, COUPLING_SEARCH_MAX);
        let (s_lo, s_hi) = (scale(lo)?, scale(hi)?);
        if !(s_lo < mu_limit_ref && mu_limit_ref <= s_hi) {
            return Err(ModelError::NoSolution {
                path: path.describe(),
                g_low: lo,
                g_high: hi,
                scale_low: s_lo,
                scale_high: s_hi,
                target: mu_limit_ref,
            });
        }
        for _ in 0..200 {
            if hi / lo - 1.0 < 1e-12 {
                break;
            }
            let mid = (lo * hi).sqrt();
            if scale(mid)? < mu_limit_ref {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        let g_limit = (lo * hi).sqrt();
        let couplings = path.couplings(g_limit, &base)?;
        let at = self.with_couplings(couplings);
        Ok(CouplingLimit {
            path,
            g_limit,
            couplings,
            width_over_mass: at.width_over_mass(),
            wide: at.is_wide(),
            regime: self.regime(),
        })
    }
}
