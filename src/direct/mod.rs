//! Direct detection: the dark-matter halo and its mean inverse speed, target
//! nuclei with their isotopes, nuclear form factors, nuclear-recoil spectra,
//! experiments (exposure, energy window, efficiency, resolution, counts) and
//! the reach σ_lim(m_χ) of an experiment.
//!
//! Independent of the collider stages; [`crate::scan`] and [`crate::plot`]
//! read the curves it produces ([`limit_curve`], [`read_curve_csv`]).
//!
//! Energies are nuclear-recoil energies in keV (keVnr; no quenching),
//! speeds in km/s, masses in GeV, cross-sections in cm², rates in events
//! per kg of target per day per keV.
//!
//! | module | job |
//! |---|---|
//! | [`halo`] | standard halo model, η(v_min), Earth velocity for a date |
//! | [`nuclei`] | targets by name, isotopes, abundances, spin expectation values |
//! | [`form_factor`] | Helm (SI) and thin-shell (SD) form factors |
//! | [`rate`] | dR/dE_R summed over isotopes for SI and SD couplings |
//! | [`experiment`] | experiment description (TOML), efficiency, resolution, counts |
//! | [`reach`] | Poisson limits, limit curves, curve CSV import |

pub mod experiment;
pub mod form_factor;
pub mod halo;
pub mod nuclei;
pub mod rate;
pub mod reach;

pub use experiment::{
    Efficiency, Experiment, ExperimentConfig, ExperimentParts, HaloConfig, Resolution,
};
pub use halo::Halo;
pub use nuclei::{Isotope, Target};
pub use rate::{
    FormFactorChoice, Interaction, RecoilSpectrum, nucleus_cross_section_cm2, reduced_mass_gev,
};
pub use reach::{
    CurvePoint, LimitKind, PoissonMethod, interpolate_curve, limit_curve, limit_curve_points,
    limit_curve_points_both, log_mass_grid, median_expected_count, poisson_cdf,
    poisson_upper_limit, read_curve_csv, signal_upper_limit,
};

use std::path::PathBuf;

/// Errors of the direct-detection stage. Each message names where (file,
/// line, parameter), the rule that was broken, the value and its unit.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum DirectError {
    /// A parameter violates a rule.
    #[error("{context}: {message}")]
    Invalid {
        /// Where: the file and key, or the function argument.
        context: String,
        /// The rule, the value and its unit.
        message: String,
    },
    /// A target name that is not in the built-in list.
    #[error("{context}: unknown target {name:?}; known targets: {known}")]
    UnknownTarget {
        /// Where the name was given.
        context: String,
        /// The name given.
        name: String,
        /// Comma-separated list of known names.
        known: String,
    },
    /// A file could not be read.
    #[error("{}: cannot read: {reason}", path.display())]
    Io {
        /// The file.
        path: PathBuf,
        /// The operating-system error.
        reason: std::io::Error,
    },
    /// A TOML file is not valid or has unknown or missing keys.
    #[error("{}: {reason}", path.display())]
    Toml {
        /// The file.
        path: PathBuf,
        /// The parser's message (with line and column).
        reason: Box<toml::de::Error>,
    },
    /// The statistics stage rejected a limit computation.
    #[error("{context}: {source}")]
    Stats {
        /// What was computed, with its inputs and units.
        context: String,
        /// The statistics stage's error.
        #[source]
        source: crate::stats::StatsError,
    },
    /// A CSV file breaks a rule.
    #[error("{}: line {line}: {message}", path.display())]
    Csv {
        /// The file.
        path: PathBuf,
        /// 1-based line number (1 = header).
        line: u64,
        /// The rule, the value and its unit.
        message: String,
    },
}

impl DirectError {
    /// Shorthand for [`DirectError::Invalid`].
    pub(crate) fn invalid(context: impl Into<String>, message: impl Into<String>) -> Self {
        DirectError::Invalid {
            context: context.into(),
            message: message.into(),
        }
    }
}

/// Checks that `value` is finite and > 0.
pub(crate) fn require_positive(
    context: &str,
    name: &str,
    value: f64,
    unit: &str,
) -> Result<(), DirectError> {
    if value.is_finite() && value > 0.0 {
        Ok(())
    } else {
        Err(DirectError::invalid(
            context,
            format!("{name} must be finite and > 0, got {value} {unit}"),
        ))
    }
}

/// Checks that `value` is finite and ≥ 0.
pub(crate) fn require_non_negative(
    context: &str,
    name: &str,
    value: f64,
    unit: &str,
) -> Result<(), DirectError> {
    if value.is_finite() && value >= 0.0 {
        Ok(())
    } else {
        Err(DirectError::invalid(
            context,
            format!("{name} must be finite and >= 0, got {value} {unit}"),
        ))
    }
}
