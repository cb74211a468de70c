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
// Simplified mediator models (src/model/): fermion masses, the Higgs vacuum
// expectation value, the strong coupling and nucleon masses used in the
// mediator widths and the DM–nucleon cross-sections.
// Source: PDG Review of Particle Physics, edition 2024 (S. Navas et al.,
// Phys. Rev. D 110 (2024) 030001), quark-mass, lepton and constants tables.
// ---------------------------------------------------------------------------

/// Up-quark mass, MS-bar at μ = 2 GeV: 2.16 MeV (PDG 2024), in GeV.
pub const M_UP_GEV: f64 = 2.16e-3;
/// Down-quark mass, MS-bar at μ = 2 GeV: 4.70 MeV (PDG 2024), in GeV.
pub const M_DOWN_GEV: f64 = 4.70e-3;
/// Strange-quark mass, MS-bar at μ = 2 GeV: 93.5 MeV (PDG 2024), in GeV.
pub const M_STRANGE_GEV: f64 = 93.5e-3;
/// Charm-quark mass m_c(m_c), MS-bar: 1.2730 GeV (PDG 2024).
pub const M_CHARM_GEV: f64 = 1.2730;
/// Bottom-quark mass m_b(m_b), MS-bar: 4.183 GeV (PDG 2024).
pub const M_BOTTOM_GEV: f64 = 4.183;
/// Top-quark mass from direct measurements: 172.57 GeV (PDG 2024).
pub const M_TOP_GEV: f64 = 172.57;
/// Electron mass 0.51099895 MeV (PDG 2024), in GeV.
pub const M_ELECTRON_GEV: f64 = 0.510_998_95e-3;
/// Muon mass 105.6583755 MeV (PDG 2024), in GeV.
pub const M_MUON_GEV: f64 = 0.105_658_375_5;
/// Tau mass 1776.93 MeV (PDG 2024), in GeV.
pub const M_TAU_GEV: f64 = 1.776_93;
/// Higgs vacuum expectation value v = (√2 G_F)^(−1/2) = 246.22 GeV
/// (from G_F = 1.1663788×10⁻⁵ GeV⁻², PDG 2024).
pub const HIGGS_VEV_GEV: f64 = 246.22;
/// Strong coupling α_s(m_Z) = 0.1180 (PDG 2024 world average).
pub const ALPHA_S_MZ: f64 = 0.1180;
/// Proton mass 0.93827208816 GeV (PDG 2024, CODATA 2018).
pub const M_PROTON_GEV: f64 = 0.938_272_088_16;
/// Neutron mass 0.93956542052 GeV (PDG 2024, CODATA 2018).
pub const M_NEUTRON_GEV: f64 = 0.939_565_420_52;

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
