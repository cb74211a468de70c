//! Target nuclei: the built-in targets (elements and compounds) with the
//! natural isotopic composition of each element, isotope masses, and the
//! proton and neutron spin expectation values used for spin-dependent
//! scattering.
//!
//! Fed by nothing; [`crate::direct::rate`] sums the recoil spectrum over the
//! isotopes of a [`Target`].
//!
//! # Sources of the numbers (all from memory, not re-read)
//! - Abundances: IUPAC Commission on Isotopic Abundances and Atomic Weights,
//!   "Isotopic compositions of the elements 2013", Pure Appl. Chem. 88 (2016)
//!   293 (memory). Each element's abundances sum to 100 %.
//! - Atomic masses: Atomic Mass Evaluation AME2016/AME2020 (memory, to 10⁻⁶ u).
//!   The nuclear mass is taken as atomic mass × m_u; the electrons' mass and
//!   binding (≤ 3×10⁻⁴ relative) are neglected.
//! - Spins ⟨S_p⟩, ⟨S_n⟩ (memory): ¹²⁹Xe, ¹³¹Xe from shell-model calculations
//!   of J. Menéndez, D. Gazit, A. Schwenk, PRD 86 (2012) 103511; ⁷³Ge from
//!   V. I. Dimitrov, J. Engel, S. Pittel, PRD 51 (1995) R291; ²³Na, ¹²⁷I from
//!   M. T. Ressell, D. J. Dean, PRC 56 (1997) 535; ²⁹Si from M. T. Ressell
//!   et al., PRD 48 (1993) 5519; ¹⁹F from A. F. Pacheco, D. Strottman, PRD 40
//!   (1989) 2131. For ¹³C, ¹⁷O, ⁴³Ca and ¹⁸³W no calculation is recalled: the
//!   value is the single-particle (odd-group) estimate for the unpaired
//!   neutron, ⟨S⟩ = ½ for j = l + ½ and −j/(2(j+1)) for j = l − ½
//!   (J. Ellis, R. A. Flores, NPB 307 (1988) 883; memory), marked "single
//!   particle". These isotopes carry ≤ 0.2 % of the mass of their targets
//!   except ¹⁸³W (14 % of W).

use super::{DirectError, require_positive};
use crate::units::ATOMIC_MASS_UNIT_GEV;

/// One isotope of a target, with its share of the target mass.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Isotope {
    /// Label, e.g. `Xe-129`.
    pub label: String,
    /// Proton number Z.
    pub z: u32,
    /// Mass number A.
    pub a: u32,
    /// Nuclear mass m_T \[GeV\].
    pub mass_gev: f64,
    /// Number fraction of this isotope among the atoms of its element, in [0, 1].
    pub abundance: f64,
    /// Fraction of the target's mass carried by this isotope, in [0, 1];
    /// the fractions of a target sum to 1.
    pub mass_fraction: f64,
    /// Nuclear ground-state spin J (0 for even–even nuclei).
    pub spin_j: f64,
    /// Proton spin expectation value ⟨S_p⟩ (0 when J = 0).
    pub s_p: f64,
    /// Neutron spin expectation value ⟨S_n⟩ (0 when J = 0).
    pub s_n: f64,
}

/// A detector target: one element or a compound, as a list of isotopes.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Target {
    /// Canonical name, e.g. `xenon`, `cawo4`.
    pub name: String,
    /// Human-readable description, e.g. `CaWO₄ (calcium tungstate)`.
    pub description: String,
    /// Isotopes with their mass fractions.
    pub isotopes: Vec<Isotope>,
}

/// Row of an element table: mass number, atomic mass [u], abundance [%],
/// spin J, ⟨S_p⟩, ⟨S_n⟩.
type IsotopeRow = (u32, f64, f64, f64, f64, f64);

/// An element: symbol, Z and its natural isotopes (sources in the module doc).
struct Element {
    symbol: &'static str,
    z: u32,
    isotopes: &'static [IsotopeRow],
}

const XENON: Element = Element {
    symbol: "Xe",
    z: 54,
    isotopes: &[
        (124, 123.905_893, 0.095, 0.0, 0.0, 0.0),
        (126, 125.904_274, 0.089, 0.0, 0.0, 0.0),
        (128, 127.903_531, 1.910, 0.0, 0.0, 0.0),
        // ⟨S⟩: Menéndez, Gazit, Schwenk 2012 (memory).
        (129, 128.904_780, 26.401, 0.5, 0.010, 0.329),
        (130, 129.903_509, 4.071, 0.0, 0.0, 0.0),
        // ⟨S⟩: Menéndez, Gazit, Schwenk 2012 (memory).
        (131, 130.905_084, 21.232, 1.5, -0.009, -0.272),
        (132, 131.904_155, 26.909, 0.0, 0.0, 0.0),
        (134, 133.905_395, 10.436, 0.0, 0.0, 0.0),
        (136, 135.907_214, 8.857, 0.0, 0.0, 0.0),
    ],
};

const GERMANIUM: Element = Element {
    symbol: "Ge",
    z: 32,
    isotopes: &[
        (70, 69.924_249, 20.52, 0.0, 0.0, 0.0),
        (72, 71.922_076, 27.45, 0.0, 0.0, 0.0),
        // ⟨S⟩: Dimitrov, Engel, Pittel 1995 (memory).
        (73, 72.923_459, 7.76, 4.5, 0.030, 0.378),
        (74, 73.921_178, 36.52, 0.0, 0.0, 0.0),
        (76, 75.921_403, 7.75, 0.0, 0.0, 0.0),
    ],
};

const ARGON: Element = Element {
    symbol: "Ar",
    z: 18,
    isotopes: &[
        (36, 35.967_545, 0.3336, 0.0, 0.0, 0.0),
        (38, 37.962_732, 0.0629, 0.0, 0.0, 0.0),
        (40, 39.962_383, 99.6035, 0.0, 0.0, 0.0),
    ],
};

const SILICON: Element = Element {
    symbol: "Si",
    z: 14,
    isotopes: &[
        (28, 27.976_927, 92.223, 0.0, 0.0, 0.0),
        // ⟨S⟩: Ressell et al. 1993 (memory).
        (29, 28.976_495, 4.685, 0.5, -0.002, 0.130),
        (30, 29.973_770, 3.092, 0.0, 0.0, 0.0),
    ],
};

const SODIUM: Element = Element {
    symbol: "Na",
    z: 11,
    // ⟨S⟩: Ressell & Dean 1997 (memory).
    isotopes: &[(23, 22.989_769, 100.0, 1.5, 0.248, 0.020)],
};

const IODINE: Element = Element {
    symbol: "I",
    z: 53,
    // ⟨S⟩: Ressell & Dean 1997 (memory).
    isotopes: &[(127, 126.904_473, 100.0, 2.5, 0.309, 0.075)],
};

const CALCIUM: Element = Element {
    symbol: "Ca",
    z: 20,
    isotopes: &[
        (40, 39.962_591, 96.941, 0.0, 0.0, 0.0),
        (42, 41.958_618, 0.647, 0.0, 0.0, 0.0),
        // ⟨S_n⟩: single particle, f7/2 neutron (j = l + ½).
        (43, 42.958_767, 0.135, 3.5, 0.0, 0.5),
        (44, 43.955_482, 2.086, 0.0, 0.0, 0.0),
        (46, 45.953_690, 0.004, 0.0, 0.0, 0.0),
        (48, 47.952_523, 0.187, 0.0, 0.0, 0.0),
    ],
};

const TUNGSTEN: Element = Element {
    symbol: "W",
    z: 74,
    isotopes: &[
        (180, 179.946_704, 0.12, 0.0, 0.0, 0.0),
        (182, 181.948_204, 26.50, 0.0, 0.0, 0.0),
        // ⟨S_n⟩: single particle, p1/2 neutron (j = l − ½): −1/6.
        (183, 182.950_223, 14.31, 0.5, 0.0, -1.0 / 6.0),
        (184, 183.950_931, 30.64, 0.0, 0.0, 0.0),
        (186, 185.954_364, 28.43, 0.0, 0.0, 0.0),
    ],
};

const OXYGEN: Element = Element {
    symbol: "O",
    z: 8,
    isotopes: &[
        (16, 15.994_915, 99.757, 0.0, 0.0, 0.0),
        // ⟨S_n⟩: single particle, d5/2 neutron (j = l + ½).
        (17, 16.999_132, 0.038, 2.5, 0.0, 0.5),
        (18, 17.999_160, 0.205, 0.0, 0.0, 0.0),
    ],
};

const CARBON: Element = Element {
    symbol: "C",
    z: 6,
    isotopes: &[
        (12, 12.000_000, 98.93, 0.0, 0.0, 0.0),
        // ⟨S_n⟩: single particle, p1/2 neutron (j = l − ½): −1/6.
        (13, 13.003_355, 1.07, 0.5, 0.0, -1.0 / 6.0),
    ],
};

const FLUORINE: Element = Element {
    symbol: "F",
    z: 9,
    // ⟨S⟩: Pacheco & Strottman 1989 (memory).
    isotopes: &[(19, 18.998_403, 100.0, 0.5, 0.441, -0.109)],
};

/// A built-in target: canonical name, other accepted names, description
/// and composition (element, atoms per formula unit).
struct TargetDef {
    name: &'static str,
    aliases: &'static [&'static str],
    description: &'static str,
    composition: &'static [(&'static Element, u32)],
}

const TARGETS: &[TargetDef] = &[
    TargetDef {
        name: "xenon",
        aliases: &["xe"],
        description: "natural xenon",
        composition: &[(&XENON, 1)],
    },
    TargetDef {
        name: "germanium",
        aliases: &["ge"],
        description: "natural germanium",
        composition: &[(&GERMANIUM, 1)],
    },
    TargetDef {
        name: "argon",
        aliases: &["ar"],
        description: "natural argon (atmospheric composition)",
        composition: &[(&ARGON, 1)],
    },
    TargetDef {
        name: "silicon",
        aliases: &["si"],
        description: "natural silicon",
        composition: &[(&SILICON, 1)],
    },
    TargetDef {
        name: "nai",
        aliases: &["sodium-iodide"],
        description: "NaI (sodium iodide)",
        composition: &[(&SODIUM, 1), (&IODINE, 1)],
    },
    TargetDef {
        name: "cawo4",
        aliases: &["calcium-tungstate"],
        description: "CaWO4 (calcium tungstate)",
        composition: &[(&CALCIUM, 1), (&TUNGSTEN, 1), (&OXYGEN, 4)],
    },
    TargetDef {
        name: "c3f8",
        aliases: &["octafluoropropane"],
        description: "C3F8 (octafluoropropane; fluorine carries most SD-p sensitivity)",
        composition: &[(&CARBON, 3), (&FLUORINE, 8)],
    },
    TargetDef {
        name: "fluorine",
        aliases: &["f"],
        description: "fluorine alone",
        composition: &[(&FLUORINE, 1)],
    },
];

impl Target {
    /// The canonical names of the built-in targets.
    pub fn known_names() -> Vec<&'static str> {
        TARGETS.iter().map(|t| t.name).collect()
    }

    /// A built-in target by name (case-insensitive; canonical names from
    /// [`Target::known_names`] or aliases such as `xe`, `ge`).
    pub fn by_name(name: &str) -> Result<Target, DirectError> {
        let key = name.trim().to_ascii_lowercase();
        let def = TARGETS
            .iter()
            .find(|t| t.name == key || t.aliases.contains(&key.as_str()))
            .ok_or_else(|| DirectError::UnknownTarget {
                context: "target".into(),
                name: name.to_string(),
                known: Target::known_names().join(", "),
            })?;
        let formula_mass_u: f64 = def
            .composition
            .iter()
            .map(|(el, n)| f64::from(*n) * element_mass_u(el))
            .sum();
        let isotopes = def
            .composition
            .iter()
            .flat_map(|(el, n)| {
                el.isotopes.iter().map(move |&(a, mass_u, pct, j, sp, sn)| {
                    let abundance = pct / 100.0;
                    Isotope {
                        label: format!("{}-{a}", el.symbol),
                        z: el.z,
                        a,
                        mass_gev: mass_u * ATOMIC_MASS_UNIT_GEV,
                        abundance,
                        mass_fraction: f64::from(*n) * abundance * mass_u / formula_mass_u,
                        spin_j: j,
                        s_p: sp,
                        s_n: sn,
                    }
                })
            })
            .collect();
        Ok(Target {
            name: def.name.to_string(),
            description: def.description.to_string(),
            isotopes,
        })
    }

    /// Checks a target built by hand: at least one isotope; masses finite
    /// and > 0; abundances and mass fractions in [0, 1], mass fractions
    /// summing to 1 (to 10⁻⁶); J ≥ 0 and spin values finite.
    pub fn validate(&self) -> Result<(), DirectError> {
        let ctx = format!("target {}", self.name);
        if self.isotopes.is_empty() {
            return Err(DirectError::invalid(ctx, "has no isotopes"));
        }
        for i in &self.isotopes {
            require_positive(&ctx, &format!("{} mass_gev", i.label), i.mass_gev, "GeV")?;
            let fractions_ok =
                (0.0..=1.0).contains(&i.abundance) && (0.0..=1.0).contains(&i.mass_fraction);
            let spins_ok =
                i.spin_j.is_finite() && i.spin_j >= 0.0 && i.s_p.is_finite() && i.s_n.is_finite();
            if !fractions_ok || !spins_ok || i.a == 0 {
                return Err(DirectError::invalid(
                    &ctx,
                    format!(
                        "isotope {}: need A > 0, abundance and mass fraction in [0, 1], J >= 0 and finite spins; got A = {}, abundance {}, mass fraction {}, J = {}, S_p = {}, S_n = {}",
                        i.label, i.a, i.abundance, i.mass_fraction, i.spin_j, i.s_p, i.s_n
                    ),
                ));
            }
        }
        let total: f64 = self.isotopes.iter().map(|i| i.mass_fraction).sum();
        if (total - 1.0).abs() > 1e-6 {
            return Err(DirectError::invalid(
                ctx,
                format!("mass fractions must sum to 1, got {total}"),
            ));
        }
        Ok(())
    }

    /// A target made of one isotope (mass fraction 1), e.g. for studies of
    /// a single nucleus. Spin-dependent values are given explicitly.
    ///
    /// # Units
    /// `mass_gev` in GeV.
    pub fn single_isotope(
        label: &str,
        z: u32,
        a: u32,
        mass_gev: f64,
        spin: (f64, f64, f64),
    ) -> Result<Target, DirectError> {
        let ctx = format!("isotope {label}");
        require_positive(&ctx, "mass_gev", mass_gev, "GeV")?;
        if a == 0 || z == 0 || z > a {
            return Err(DirectError::invalid(
                ctx,
                format!("need 0 < Z <= A, got Z = {z}, A = {a}"),
            ));
        }
        let (spin_j, s_p, s_n) = spin;
        if !(spin_j.is_finite() && spin_j >= 0.0 && s_p.is_finite() && s_n.is_finite()) {
            return Err(DirectError::invalid(
                ctx,
                format!(
                    "spin J must be >= 0 and spins finite, got J = {spin_j}, S_p = {s_p}, S_n = {s_n}"
                ),
            ));
        }
        Ok(Target {
            name: label.to_string(),
            description: format!("single isotope {label}"),
            isotopes: vec![Isotope {
                label: label.to_string(),
                z,
                a,
                mass_gev,
                abundance: 1.0,
                mass_fraction: 1.0,
                spin_j,
                s_p,
                s_n,
            }],
        })
    }
}

/// Mean atomic mass of an element [u] from its isotopes and abundances.
fn element_mass_u(el: &Element) -> f64 {
    el.isotopes
        .iter()
        .map(|&(_, mass_u, pct, ..)| mass_u * pct / 100.0)
        .sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn abundances_and_mass_fractions_sum_to_one() {
        for name in Target::known_names() {
            let t = Target::by_name(name).unwrap();
            let total: f64 = t.isotopes.iter().map(|i| i.mass_fraction).sum();
            assert!((total - 1.0).abs() < 1e-12, "{name}: {total}");
        }
        for el in [
            &XENON, &GERMANIUM, &ARGON, &SILICON, &SODIUM, &IODINE, &CALCIUM, &TUNGSTEN, &OXYGEN,
            &CARBON, &FLUORINE,
        ] {
            let pct: f64 = el.isotopes.iter().map(|r| r.2).sum();
            assert!((pct - 100.0).abs() < 1e-3, "{}: {pct}", el.symbol);
        }
    }

    #[test]
    fn standard_atomic_weights() {
        // Standard atomic weights (IUPAC, memory): Xe 131.293, Ge 72.630,
        // Ar 39.948, Si 28.085, Ca 40.078, W 183.84.
        for (el, w) in [
            (&XENON, 131.293),
            (&GERMANIUM, 72.630),
            (&ARGON, 39.948),
            (&SILICON, 28.085),
            (&CALCIUM, 40.078),
            (&TUNGSTEN, 183.84),
        ] {
            assert!((element_mass_u(el) - w).abs() < 0.01, "{}", el.symbol);
        }
    }

    #[test]
    fn spin_zero_nuclei_have_no_spin_expectation() {
        for name in Target::known_names() {
            for i in Target::by_name(name).unwrap().isotopes {
                if i.spin_j == 0.0 {
                    assert_eq!((i.s_p, i.s_n), (0.0, 0.0), "{}", i.label);
                }
                // Even–even nuclei have J = 0 (common practice, no source).
                if i.z % 2 == 0 && i.a % 2 == 0 {
                    assert_eq!(i.spin_j, 0.0, "{}", i.label);
                }
            }
        }
    }
}
