//! Simplified s-channel mediator models for Dirac-fermion dark matter:
//! partial and total widths, narrow-width coupling rescaling of a collider
//! limit, and the translation of a collider limit into DM–nucleon
//! cross-sections.
//!
//! Independent of the event stages; fed by the user's model choice and by
//! the limits of [`crate::stats`] and [`crate::scan`]; feeds [`crate::scan`],
//! [`crate::direct`] comparisons and [`crate::plot`].
//!
//! The models follow D. Abercrombie et al., "Dark Matter Benchmark Models for
//! Early LHC Run-2 Searches", arXiv:1507.00966, and the LHC Dark Matter
//! Working Group recommendation A. Boveia et al., arXiv:1603.04156.
//!
//! - [`mediator`]: [`MediatorKind`], [`Couplings`], [`Mediator`] and widths.
//! - [`rescale`]: σ×BR rescaling in the couplings and the excluded coupling.
//! - [`nucleon`]: σ_SI / σ_SD for protons and neutrons, nucleon parameter sets.
//! - [`curve`]: a collider exclusion boundary (m_χ, M_limit) turned into a
//!   limit curve σ(m_χ) in the DM–nucleon plane.

pub mod curve;
pub mod mediator;
pub mod nucleon;
pub mod rescale;

pub use curve::{BoundaryPoint, ColliderCurve, CurvePoint, collider_curve, read_boundary_csv};
pub use mediator::{
    Channel, Couplings, FermionMasses, Mediator, MediatorKind, WIDE_WIDTH_OVER_MASS,
};
pub use nucleon::{Nucleon, NucleonCrossSection, NucleonParams, ScatteringType};
pub use rescale::{CouplingLimit, CouplingPath, ProductionRegime, SignalScale};

/// Errors of the model stage. Each message names the quantity, the rule,
/// the value and its unit.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum ModelError {
    /// A model parameter breaks a rule.
    #[error("mediator model: {quantity} must be {rule}, got {value} {unit}")]
    InvalidParameter {
        /// Name of the parameter, e.g. "m_med_gev".
        quantity: &'static str,
        /// The rule broken, e.g. "finite and > 0".
        rule: &'static str,
        /// The offending value.
        value: f64,
        /// Unit of the value ("GeV", "" for couplings).
        unit: &'static str,
    },
    /// A mediator type name that is not known.
    #[error("unknown mediator type '{0}': expected one of vector, axial, scalar, pseudoscalar")]
    UnknownMediator(String),
    /// A nucleon parameter-set name that is not known.
    #[error("unknown nucleon parameter set '{name}': expected one of {known}")]
    UnknownNucleonSet {
        /// The name given.
        name: String,
        /// The known names, comma-separated.
        known: String,
    },
    /// A nucleon name that is not known.
    #[error("unknown nucleon '{0}': expected proton or neutron")]
    UnknownNucleon(String),
    /// Pseudoscalar exchange: scattering off nucleons is momentum-suppressed.
    #[error(
        "pseudoscalar mediator: DM–nucleon scattering is suppressed by the fourth power of \
         the momentum transfer (q⁴/(4 m_N² m_χ²)); no σ_SI or σ_SD comparable with direct \
         detection limits is given"
    )]
    MomentumSuppressed,
    /// The coupling root-finder found no coupling in its range that gives the
    /// requested signal strength.
    #[error(
        "no excluded coupling on path {path} in [{g_low}, {g_high}]: the signal scale runs \
         from {scale_low:.4e} to {scale_high:.4e}, the limit needs {target:.4e}"
    )]
    NoSolution {
        /// The coupling path, described.
        path: String,
        /// Lower end of the coupling range.
        g_low: f64,
        /// Upper end of the coupling range.
        g_high: f64,
        /// Signal scale at the lower end.
        scale_low: f64,
        /// Signal scale at the upper end.
        scale_high: f64,
        /// The signal scale that reaches the limit (μ_up at the reference).
        target: f64,
    },
    /// A collider boundary table (CSV) cannot be read.
    #[error("{source_name}: line {line}: {message}")]
    BoundaryFile {
        /// File name (or other source description).
        source_name: String,
        /// 1-based line number (1 is the header).
        line: u64,
        /// What is wrong.
        message: String,
    },
    /// A point of a collider exclusion boundary breaks a rule.
    #[error("collider boundary point {index} (m_dm_gev = {m_dm_gev}): {message}")]
    InvalidBoundary {
        /// 0-based position in the boundary list.
        index: usize,
        /// DM mass of the point [GeV].
        m_dm_gev: f64,
        /// What is wrong.
        message: String,
    },
}

/// Checks that `value` is finite and > 0.
pub(crate) fn require_positive(
    quantity: &'static str,
    value: f64,
    unit: &'static str,
) -> Result<f64, ModelError> {
    if value.is_finite() && value > 0.0 {
        Ok(value)
    } else {
        Err(ModelError::InvalidParameter {
            quantity,
            rule: "finite and > 0",
            value,
            unit,
        })
    }
}

/// Checks that `value` is finite and ≥ 0.
pub(crate) fn require_non_negative(
    quantity: &'static str,
    value: f64,
    unit: &'static str,
) -> Result<f64, ModelError> {
    if value.is_finite() && value >= 0.0 {
        Ok(value)
    } else {
        Err(ModelError::InvalidParameter {
            quantity,
            rule: "finite and >= 0",
            value,
            unit,
        })
    }
}
