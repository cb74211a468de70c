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
