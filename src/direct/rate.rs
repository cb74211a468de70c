//! Nuclear-recoil spectra dR/dE_R for elastic WIMP–nucleus scattering,
//! spin-independent or spin-dependent, summed over the isotopes of a target.
//!
//! Fed by [`crate::direct::halo`] (η(v_min)), [`crate::direct::nuclei`] and
//! [`crate::direct::form_factor`]; used by [`crate::direct::experiment`].

use super::form_factor::{
    helm_radius_fm, helm_with_radius, momentum_transfer_fm, spin_dependent_squared_with_radius,
};
use super::{DirectError, Halo, Isotope, Target, require_non_negative, require_positive};
use crate::units::{
    C_KM_S, CM_PER_KM, GEV_PER_KG, KEV_PER_GEV, NEUTRON_MASS_GEV, NUCLEON_MASS_GEV,
    PROTON_MASS_GEV, SECONDS_PER_DAY,
};

/// Which DM–nucleon coupling the cross-section σ refers to.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
pub enum Interaction {
    /// Spin-independent, isospin-conserving (f_p = f_n); σ is the
    /// DM–nucleon cross-section σ_n. Label `SI`.
    #[serde(rename = "SI")]
    Si,
    /// Spin-dependent, proton only (a_n = 0); σ is σ_p. Label `SD-p`.
    #[serde(rename = "SD-p")]
    SdProton,
    /// Spin-dependent, neutron only (a_p = 0); σ is σ_n. Label `SD-n`.
    #[serde(rename = "SD-n")]
    SdNeutron,
}

impl Interaction {
    /// The label used in files: `SI`, `SD-p`, `SD-n`.
    pub fn label(self) -> &'static str {
        match self {
            Interaction::Si => "SI",
            Interaction::SdProton => "SD-p",
            Interaction::SdNeutron => "SD-n",
        }
    }
}

impl std::fmt::Display for Interaction {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.label())
    }
}

impl std::str::FromStr for Interaction {
    type Err = DirectError;
    /// Parses `SI`, `SD-p`, `SD-n` (case-insensitive; `sdp`, `sdn`, `sd_p`, `sd_n` also).
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim().to_ascii_lowercase().replace('_', "-").as_str() {
            "si" => Ok(Interaction::Si),
            "sd-p" | "sdp" => Ok(Interaction::SdProton),
            "sd-n" | "sdn" => Ok(Interaction::SdNeutron),
            _ => Err(DirectError::invalid(
                "interaction",
                format!("expected SI, SD-p or SD-n, got {s:?}"),
            )),
        }
    }
}

/// Which nuclear form factor the spectrum uses.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize)]
pub enum FormFactorChoice {
    /// Helm for SI, thin shell for SD ([`crate::direct::form_factor`]).
    #[default]
    Standard,
    /// F = 1 (point-like nucleus); for checks against closed forms.
    Unity,
}

/// Reduced mass μ = m₁ m₂ / (m₁ + m₂).
///
/// # Units
/// Masses and result in GeV.
pub fn reduced_mass_gev(m1_gev: f64, m2_gev: f64) -> f64 {
    m1_gev * m2_gev / (m1_gev + m2_gev)
}

/// Zero-momentum-transfer WIMP–nucleus cross-section σ_N(0) from the
/// DM–nucleon cross-section σ.
///
/// # Formula
/// - SI (f_p = f_n): σ_N = σ_n A² (μ_N/μ_n)², μ_n with the mean nucleon mass;
/// - SD-p: σ_N = σ_p (4/3) (J+1)/J ⟨S_p⟩² (μ_N/μ_p)²;
/// - SD-n: σ_N = σ_n (4/3) (J+1)/J ⟨S_n⟩² (μ_N/μ_n)², μ_n with m_n;
///
/// μ_N the WIMP–nucleus reduced mass; SD is 0 for J = 0.
///
/// # Units
/// Masses in GeV, cross-sections in cm².
///
/// # References
/// SI: J. D. Lewin, P. F. Smith, Astropart. Phys. 6 (1996) 87 (memory;
/// REFERENCES.md §5). SD: D. R. Tovey et al., PLB 488 (2000) 17, the
/// single-coupling ratio σ_N/σ_p (memory).
pub fn nucleus_cross_section_cm2(
    isotope: &Isotope,
    m_chi_gev: f64,
    sigma_cm2: f64,
    interaction: Interaction,
) -> f64 {
    let mu_n = reduced_mass_gev(m_chi_gev, isotope.mass_gev);
    let sd = |spin: f64, nucleon_gev: f64| {
        if isotope.spin_j == 0.0 {
            return 0.0;
        }
        let mu = reduced_mass_gev(m_chi_gev, nucleon_gev);
        let j = isotope.spin_j;
        sigma_cm2 * 4.0 / 3.0 * (j + 1.0) / j * spin * spin * (mu_n / mu).powi(2)
    };
    match interaction {
        Interaction::Si => {
            let mu = reduced_mass_gev(m_chi_gev, NUCLEON_MASS_GEV);
            let a = f64::from(isotope.a);
            sigma_cm2 * a * a * (mu_n / mu).powi(2)
        }
        Interaction::SdProton => sd(isotope.s_p, PROTON_MASS_GEV),
        Interaction::SdNeutron => sd(isotope.s_n, NEUTRON_MASS_GEV),
    }
}

/// One isotope's share of a spectrum, with the mass-dependent constants
/// computed once.
#[derive(Debug, Clone, PartialEq)]
struct IsotopeTerm {
    /// Form-factor radius r_n \[fm\].
    rn_fm: f64,
    /// q = q_per_sqrt_kev · √E_R [fm⁻¹ per √keV].
    q_per_sqrt_kev: f64,
    /// v_min = vmin_per_sqrt_kev · √E_R [km/s per √keV].
    vmin_per_sqrt_kev: f64,
    /// dR/dE_R = coeff · F²(q) · η(v_min) [events/(kg day keV) per (s/km)].
    coeff: f64,
    /// Largest recoil energy (v_min = v_esc + v_E) \[keV\].
    max_recoil_kev: f64,
}

/// The differential recoil rate of one WIMP mass and cross-section on one
/// target, summed over isotopes.
#[derive(Debug, Clone, PartialEq)]
pub struct RecoilSpectrum {
    halo: Halo,
    interaction: Interaction,
    form_factor: FormFactorChoice,
    terms: Vec<IsotopeTerm>,
}

impl RecoilSpectrum {
    /// Prepares the spectrum for WIMP mass `m_chi_gev` and DM–nucleon
    /// cross-section `sigma_cm2` (σ_n for SI, σ_p for SD-p, σ_n for SD-n).
    ///
    /// # Units
    /// m_χ in GeV (> 0), σ in cm² (≥ 0).
    pub fn new(
        halo: &Halo,
        target: &Target,
        m_chi_gev: f64,
        sigma_cm2: f64,
        interaction: Interaction,
        form_factor: FormFactorChoice,
    ) -> Result<Self, DirectError> {
        require_positive("recoil spectrum", "m_chi_gev", m_chi_gev, "GeV")?;
        require_non_negative("recoil spectrum", "sigma_cm2", sigma_cm2, "cm²")?;
        target.validate()?;
        let vmax = halo.max_speed_km_s();
        let units = CM_PER_KM * SECONDS_PER_DAY / KEV_PER_GEV;
        let terms = target
            .isotopes
            .iter()
            .map(|iso| {
                let mu = reduced_mass_gev(m_chi_gev, iso.mass_gev);
                let sigma_n = nucleus_cross_section_cm2(iso, m_chi_gev, sigma_cm2, interaction);
                let vmin_per_sqrt_kev =
                    C_KM_S * (iso.mass_gev / (2.0 * mu * mu * KEV_PER_GEV)).sqrt();
                IsotopeTerm {
                    rn_fm: helm_radius_fm(iso.a),
                    q_per_sqrt_kev: momentum_transfer_fm(1.0, iso.mass_gev),
                    vmin_per_sqrt_kev,
                    coeff: iso.mass_fraction
                        * GEV_PER_KG
                        * halo.rho_gev_cm3()
                        * sigma_n
                        * C_KM_S
                        * C_KM_S
                        / (2.0 * m_chi_gev * mu * mu)
                        * units,
                    max_recoil_kev: (vmax / vmin_per_sqrt_kev).powi(2),
                }
            })
            .collect();
        Ok(RecoilSpectrum {
            halo: *halo,
            interaction,
            form_factor,
            terms,
        })
    }

    /// Differential rate dR/dE_R at recoil energy E_R, summed over isotopes.
    ///
    /// # Formula
    /// dR/dE_R = Σ_i f_i · ρ_0 σ_{N,i} / (2 m_χ μ_{N,i}²) · F_i²(q) · η(v_min,i) per
    /// unit target mass, f_i the isotope's mass fraction, σ_{N,i} from
    /// [`nucleus_cross_section_cm2`], q = √(2 m_T E_R),
    /// v_min = √(m_T E_R / (2 μ_N²)), η from [`Halo::eta_s_km`].
    ///
    /// # Units
    /// E_R in keV; result in events kg⁻¹ day⁻¹ keV⁻¹ (0 for E_R < 0).
    ///
    /// # References
    /// J. D. Lewin, P. F. Smith, Astropart. Phys. 6 (1996) 87, Sec. 3, the
    /// rate with the velocity integral written as η(v_min) (memory, equation
    /// numbers not re-read; REFERENCES.md §5).
    pub fn rate(&self, e_kev: f64) -> f64 {
        (0..self.terms.len())
            .map(|i| self.isotope_rate(i, e_kev))
            .sum()
    }

    /// One isotope's term of [`RecoilSpectrum::rate`] (index as in the
    /// target's isotope list); 0 for an index out of range.
    ///
    /// # Units
    /// E_R in keV; result in events kg⁻¹ day⁻¹ keV⁻¹.
    pub fn isotope_rate(&self, index: usize, e_kev: f64) -> f64 {
        let Some(t) = self.terms.get(index) else {
            return 0.0;
        };
        if e_kev.is_nan() || e_kev < 0.0 || e_kev >= t.max_recoil_kev || t.coeff == 0.0 {
            return 0.0;
        }
        let sqrt_e = e_kev.sqrt();
        let eta = self.halo.eta_s_km(t.vmin_per_sqrt_kev * sqrt_e);
        let q = t.q_per_sqrt_kev * sqrt_e;
        let f2 = match (self.form_factor, self.interaction) {
            (FormFactorChoice::Unity, _) => 1.0,
            (FormFactorChoice::Standard, Interaction::Si) => helm_with_radius(q, t.rn_fm).powi(2),
            (FormFactorChoice::Standard, _) => spin_dependent_squared_with_radius(q, t.rn_fm),
        };
        t.coeff * f2 * eta
    }

    /// Number of isotope terms.
    pub fn isotope_count(&self) -> usize {
        self.terms.len()
    }

    /// Largest recoil energy of isotope `index` (where v_min reaches
    /// v_esc + v_E) \[keV\]; +∞ for an untruncated halo, 0 out of range.
    pub fn max_recoil_kev(&self, index: usize) -> f64 {
        self.terms.get(index).map_or(0.0, |t| t.max_recoil_kev)
    }
}
