//! Physical constants and unit conversions, each with its source and edition.
//!
//! Used by every stage; fed by nothing.

/// (ħc)² in GeV² mb: 1 GeV⁻² = 0.3893793721 mb.
///
/// # References
/// PDG Review of Particle Physics, "Physical constants" (edition 2024).
pub const HBARC2_GEV2_MB: f64 = 0.389_379_372_1;

/// (ħc)² in GeV² cm²: 1 GeV⁻² = 3.893793721×10⁻²⁸ cm² (1 mb = 10⁻²⁷ cm²).
///
/// # References
/// PDG Review of Particle Physics, "Physical constants" (edition 2024).
pub const HBARC2_GEV2_CM2: f64 = 3.893_793_721e-28;

/// 1 pb in fb.
pub const FB_PER_PB: f64 = 1000.0;

// ---------------------------------------------------------------------------
// Direct detection (`crate::direct`): speeds, masses and the kilogram in GeV.
// ---------------------------------------------------------------------------

/// Speed of light in vacuum, c = 299 792.458 km/s (exact by definition of the metre).
///
/// # References
/// PDG Review of Particle Physics, "Physical constants" (edition 2024).
pub const C_KM_S: f64 = 299_792.458;

/// Reduced Planck constant times c, ħc = 0.1973269804 GeV fm.
///
/// # References
/// PDG Review of Particle Physics, "Physical constants" (edition 2024).
pub const HBARC_GEV_FM: f64 = 0.197_326_980_4;

/// Unified atomic mass unit, m_u = 0.93149410242 GeV.
///
/// # References
/// CODATA 2018 recommended values (as listed in PDG 2024 "Physical constants").
pub const ATOMIC_MASS_UNIT_GEV: f64 = 0.931_494_102_42;

/// Proton mass, m_p = 0.93827208816 GeV.
///
/// # References
/// CODATA 2018 recommended values (as listed in PDG 2024 "Physical constants").
pub const PROTON_MASS_GEV: f64 = 0.938_272_088_16;

/// Neutron mass, m_n = 0.93956542052 GeV.
///
/// # References
/// CODATA 2018 recommended values (as listed in PDG 2024 "Physical constants").
pub const NEUTRON_MASS_GEV: f64 = 0.939_565_420_52;

/// Mean nucleon mass (m_p + m_n)/2 [GeV], used for the spin-independent
/// DM–nucleon reduced mass μ_n with isospin-conserving couplings.
///
/// # References
/// Derived from [`PROTON_MASS_GEV`] and [`NEUTRON_MASS_GEV`].
pub const NUCLEON_MASS_GEV: f64 = 0.5 * (PROTON_MASS_GEV + NEUTRON_MASS_GEV);

/// 1 kg expressed in GeV/c²: 1 kg = 5.609588603×10²⁶ GeV.
///
/// # References
/// PDG Review of Particle Physics, "Physical constants" (edition 2024),
/// from the exact SI values of h, c and e.
pub const GEV_PER_KG: f64 = 5.609_588_603e26;

/// Seconds per day.
pub const SECONDS_PER_DAY: f64 = 86_400.0;

/// Days per (Julian) year, 365.25 d.
pub const DAYS_PER_YEAR: f64 = 365.25;

/// Centimetres per kilometre.
pub const CM_PER_KM: f64 = 1.0e5;

/// keV per GeV.
pub const KEV_PER_GEV: f64 = 1.0e6;
