//! The dark-matter halo seen from the Earth: the standard halo model (a
//! Maxwellian truncated at the escape speed), its mean inverse speed
//! η(v_min) in closed form, and the Earth's speed on a given date.
//!
//! Fed by nothing; [`crate::direct::rate`] uses η(v_min).

use super::{DirectError, require_non_negative, require_positive};
use crate::units::DAYS_PER_YEAR;
use statrs::function::erf::{erf, erfc};

/// Velocity of the Sun relative to the local standard of rest,
/// (U, V, W) = (11.1, 12.24, 7.25) km/s (galactic centre, rotation, north pole).
///
/// # References
/// R. Schönrich, J. Binney, W. Dehnen, MNRAS 403 (2010) 1829; adopted by
/// D. Baxter et al., EPJC 81 (2021) 907, arXiv:2105.00599 (memory).
pub const SUN_PECULIAR_KM_S: [f64; 3] = [11.1, 12.24, 7.25];

/// Amplitude of the annual modulation of the Earth's speed through the
/// halo, v_orb cos γ = 29.8 km/s × 0.49 ≈ 14.6 km/s (Earth's orbital speed
/// times the cosine of the angle between the ecliptic and the galactic plane).
///
/// # References
/// J. D. Lewin, P. F. Smith, Astropart. Phys. 6 (1996) 87, Sec. 3 (memory:
/// "v_E ≈ 232 + 15 cos(2π(t − 152.5)/365.25) km/s").
pub const EARTH_MODULATION_KM_S: f64 = 29.8 * 0.49;

/// Day of the year (days after 1 January 0 h) at which the Earth's speed
/// through the halo is largest: 152.5 d, i.e. 2 June.
///
/// # References
/// J. D. Lewin, P. F. Smith, Astropart. Phys. 6 (1996) 87, Sec. 3 (memory).
pub const EARTH_PEAK_DAY: f64 = 152.5;

/// The standard halo model: a Maxwell–Boltzmann speed distribution in the
/// galactic rest frame, f(v) ∝ exp(−v²/v_0²) for |v| < v_esc, zero beyond,
/// seen from an Earth moving at speed v_E.
///
/// Build with [`Halo::standard`] (the recommended conventions) or
/// [`Halo::new`]; both validate.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Halo {
    /// Local dark-matter density ρ_0 [GeV/cm³].
    rho_gev_cm3: f64,
    /// Most probable speed v_0 (= circular speed of the local standard of rest) [km/s].
    v0_km_s: f64,
    /// Galactic escape speed v_esc [km/s]; may be +∞ (no truncation).
    vesc_km_s: f64,
    /// Earth speed relative to the galactic rest frame v_E [km/s]; may be 0.
    vearth_km_s: f64,
    /// Normalisation N = erf z − (2/√π) z e^{−z²} (1 for z = ∞), cached.
    #[serde(skip)]
    norm: f64,
    /// e^{−z²} (0 for z = ∞), cached.
    #[serde(skip)]
    exp_minus_z2: f64,
}

impl Halo {
    /// The standard halo model with the recommended reporting conventions:
    /// ρ_0 = 0.3 GeV/cm³, v_0 = 238 km/s, v_esc = 544 km/s, and v_E the
    /// annual-mean Earth speed |v_⊙| = |(0, v_0, 0) + v_pec| = 250.6 km/s.
    ///
    /// # References
    /// D. Baxter et al., "Recommended conventions for reporting results from
    /// direct dark matter searches", EPJC 81 (2021) 907, arXiv:2105.00599
    /// (memory; REFERENCES.md §5).
    pub fn standard() -> Self {
        let v0 = 238.0;
        Halo::from_valid(0.3, v0, 544.0, sun_speed_km_s(v0))
    }

    /// Builds from parameters already checked, caching the normalisation.
    fn from_valid(rho_gev_cm3: f64, v0_km_s: f64, vesc_km_s: f64, vearth_km_s: f64) -> Self {
        let z = vesc_km_s / v0_km_s;
        let (norm, exp_minus_z2) = if z.is_finite() {
            let ez2 = (-z * z).exp();
            (erf(z) - 2.0 / std::f64::consts::PI.sqrt() * z * ez2, ez2)
        } else {
            (1.0, 0.0)
        };
        Halo {
            rho_gev_cm3,
            v0_km_s,
            vesc_km_s,
            vearth_km_s,
            norm,
            exp_minus_z2,
        }
    }

    /// A halo with the given parameters, validated: ρ_0 > 0, v_0 > 0,
    /// v_esc > v_E ≥ 0 (v_esc may be +∞).
    ///
    /// # Units
    /// ρ_0 in GeV/cm³; speeds in km/s.
    pub fn new(
        rho_gev_cm3: f64,
        v0_km_s: f64,
        vesc_km_s: f64,
        vearth_km_s: f64,
    ) -> Result<Self, DirectError> {
        let ctx = "halo";
        require_positive(ctx, "rho_gev_cm3", rho_gev_cm3, "GeV/cm³")?;
        require_positive(ctx, "v0_km_s", v0_km_s, "km/s")?;
        require_non_negative(ctx, "vearth_km_s", vearth_km_s, "km/s")?;
        if vesc_km_s.is_nan() || vesc_km_s <= vearth_km_s || vesc_km_s <= 0.0 {
            return Err(DirectError::invalid(
                ctx,
                format!(
                    "vesc_km_s must be > 0 and > vearth_km_s = {vearth_km_s} km/s, got {vesc_km_s} km/s"
                ),
            ));
        }
        Ok(Halo::from_valid(
            rho_gev_cm3,
            v0_km_s,
            vesc_km_s,
            vearth_km_s,
        ))
    }

    /// Local density ρ_0 [GeV/cm³].
    pub fn rho_gev_cm3(&self) -> f64 {
        self.rho_gev_cm3
    }
    /// Most probable speed v_0 [km/s].
    pub fn v0_km_s(&self) -> f64 {
        self.v0_km_s
    }
    /// Escape speed v_esc [km/s] (+∞ when untruncated).
    pub fn vesc_km_s(&self) -> f64 {
        self.vesc_km_s
    }
    /// Earth speed v_E [km/s].
    pub fn vearth_km_s(&self) -> f64 {
        self.vearth_km_s
    }

    /// Largest speed of a bound particle in the Earth frame, v_esc + v_E [km/s].
    pub fn max_speed_km_s(&self) -> f64 {
        self.vesc_km_s + self.vearth_km_s
    }

    /// Mean inverse speed η(v_min) = ∫_{v > v_min} f_E(v)/v d³v of the
    /// truncated Maxwellian in the Earth frame, in closed form.
    ///
    /// # Formula
    /// With x = v_min/v_0, y = v_E/v_0, z = v_esc/v_0 and
    /// N = erf z − (2/√π) z e^{−z²}:
    /// - x < z − y: η = [erf(x+y) − erf(x−y) − (4/√π) y e^{−z²}] / (2 N v_0 y);
    /// - z − y ≤ x < z + y: η = [erf z − erf(x−y) − (2/√π)(y+z−x) e^{−z²}] / (2 N v_0 y);
    /// - x ≥ z + y: η = 0.
    ///
    /// For y → 0 the first line tends to η = (2/√π)(e^{−x²} − e^{−z²}) / (N v_0),
    /// used for y < 10⁻⁶; for z = ∞, N = 1 and the e^{−z²} terms vanish.
    ///
    /// # Units
    /// v_min in km/s (negative values are treated as 0); result in s/km.
    ///
    /// # References
    /// J. D. Lewin, P. F. Smith, Astropart. Phys. 6 (1996) 87; C. Savage,
    /// K. Freese, P. Gondolo, PRD 74 (2006) 043531 (memory, standard form;
    /// REFERENCES.md §5, checked there against direct numerical integration).
    pub fn eta_s_km(&self, vmin_km_s: f64) -> f64 {
        let v0 = self.v0_km_s;
        let x = vmin_km_s.max(0.0) / v0;
        let y = self.vearth_km_s / v0;
        let z = self.vesc_km_s / v0;
        let two_over_sqrt_pi = 2.0 / std::f64::consts::PI.sqrt();
        let (norm, ez2) = (self.norm, self.exp_minus_z2);
        if x >= z + y {
            return 0.0;
        }
        if y < 1e-6 {
            let v = two_over_sqrt_pi * ((-x * x).exp() - ez2) / (norm * v0);
            return v.max(0.0);
        }
        let value = if x < z - y {
            // erf(x+y) − erf(x−y) written with erfc when both are near 1.
            let diff = if x - y > 0.0 {
                erfc(x - y) - erfc(x + y)
            } else {
                erf(x + y) - erf(x - y)
            };
            (diff - 2.0 * two_over_sqrt_pi * y * ez2) / (2.0 * norm * v0 * y)
        } else {
            let diff = if x - y > 0.0 {
                erfc(x - y) - erfc(z)
            } else {
                erf(z) - erf(x - y)
            };
            (diff - two_over_sqrt_pi * (y + z - x) * ez2) / (2.0 * norm * v0 * y)
        };
        value.max(0.0)
    }

    /// The same halo with the Earth speed of a calendar date (annual
    /// modulation), keeping ρ_0, v_0 and v_esc.
    ///
    /// # Formula
    /// v_E(t) = |v_⊙| + v_orb cos γ · cos(2π (t − t_0)/T), with |v_⊙| the
    /// annual-mean speed |(0, v_0, 0) + v_pec|, v_orb cos γ = 14.6 km/s
    /// ([`EARTH_MODULATION_KM_S`]), t the days since 1 January 0 h of the
    /// date's year (the date taken at noon), t_0 = 152.5 d (2 June) and
    /// T = 365.25 d. First-order in v_orb/v_⊙; the Earth's orbital
    /// eccentricity is neglected.
    ///
    /// # Units
    /// Speeds in km/s; the date as `YYYY-MM-DD` (proleptic Gregorian).
    ///
    /// # References
    /// J. D. Lewin, P. F. Smith, Astropart. Phys. 6 (1996) 87, Sec. 3
    /// (memory); |v_⊙| as in D. Baxter et al., EPJC 81 (2021) 907 (memory).
    pub fn with_date(&self, date: &str) -> Result<Self, DirectError> {
        let t = day_of_year(date)? + 0.5;
        let phase = 2.0 * std::f64::consts::PI * (t - EARTH_PEAK_DAY) / DAYS_PER_YEAR;
        let vearth = sun_speed_km_s(self.v0_km_s) + EARTH_MODULATION_KM_S * phase.cos();
        Halo::new(self.rho_gev_cm3, self.v0_km_s, self.vesc_km_s, vearth)
    }
}

/// Speed of the Sun in the galactic rest frame, |(0, v_0, 0) + v_pec| [km/s].
///
/// # Formula
/// |v_⊙| = √(U² + (v_0 + V)² + W²) with (U, V, W) = [`SUN_PECULIAR_KM_S`].
///
/// # Units
/// v_0 and the result in km/s.
///
/// # References
/// D. Baxter et al., EPJC 81 (2021) 907, arXiv:2105.00599 (memory).
pub fn sun_speed_km_s(v0_km_s: f64) -> f64 {
    let [u, v, w] = SUN_PECULIAR_KM_S;
    (u * u + (v0_km_s + v).powi(2) + w * w).sqrt()
}

/// Days after 1 January 0 h of the year of `date` (`YYYY-MM-DD`) at 0 h of
/// that date: 0 for 1 January.
pub fn day_of_year(date: &str) -> Result<f64, DirectError> {
    let bad = |why: &str| {
        DirectError::invalid(
            "date",
            format!("{why}: expected YYYY-MM-DD (e.g. 2026-06-02), got {date:?}"),
        )
    };
    let parts: Vec<&str> = date.trim().split('-').collect();
    let [y, m, d] = parts.as_slice() else {
        return Err(bad("not three fields separated by '-'"));
    };
    let year: i64 = y.parse().map_err(|_| bad("year is not an integer"))?;
    let month: usize = m.parse().map_err(|_| bad("month is not an integer"))?;
    let day: u32 = d.parse().map_err(|_| bad("day is not an integer"))?;
    let leap = (year % 4 == 0 && year % 100 != 0) || year % 400 == 0;
    let lengths = [
        31,
        if leap { 29 } else { 28 },
        31,
        30,
        31,
        30,
        31,
        31,
        30,
        31,
        30,
        31,
    ];
    if !(1..=12).contains(&month) {
        return Err(bad("month must be 1..=12"));
    }
    if day < 1 || day > lengths[month - 1] {
        return Err(bad("day out of range for the month"));
    }
    let before: u32 = lengths[..month - 1].iter().sum();
    Ok(f64::from(before + day - 1))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn day_of_year_counts_leap_days() {
        // Calendar arithmetic (common practice, no source).
        assert_eq!(day_of_year("2026-01-01").unwrap(), 0.0);
        assert_eq!(day_of_year("2026-06-02").unwrap(), 152.0);
        assert_eq!(day_of_year("2024-12-31").unwrap(), 365.0);
        assert!(day_of_year("2026-02-29").is_err());
        assert!(day_of_year("2026-13-01").is_err());
        assert!(day_of_year("June 2").is_err());
    }

    #[test]
    fn modulation_peaks_in_june_and_is_least_in_december() {
        // Lewin & Smith 1996 Sec. 3 (memory): maximum about 2 June, minimum
        // half a year later, amplitude about 15 km/s.
        let h = Halo::standard();
        let june = h.with_date("2026-06-02").unwrap().vearth_km_s();
        let dec = h.with_date("2026-12-02").unwrap().vearth_km_s();
        let mean = sun_speed_km_s(238.0);
        assert!((june - mean - 14.6).abs() < 0.01, "june {june}");
        assert!((dec - mean + 14.6).abs() < 0.1, "december {dec}");
    }
}
