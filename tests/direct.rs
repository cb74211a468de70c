//! Direct-detection stage: reference values, invariants and bad input.
//!
//! Every check value names its source beside it. "computed with scipy
//! 1.17.1" means an independent Python computation of the published
//! formula (numerical velocity integral instead of the closed form, scipy
//! spherical Bessel functions), not a value taken from this crate.

use std::io::Write;

use recoil::direct::form_factor::{J1_FIRST_ZERO, helm, helm_radius_fm};
use recoil::direct::{
    DirectError, Efficiency, Experiment, ExperimentParts, FormFactorChoice, Halo, Interaction,
    LimitKind, PoissonMethod, RecoilSpectrum, Resolution, Target, limit_curve, limit_curve_points,
    log_mass_grid, median_expected_count, poisson_upper_limit, read_curve_csv, reduced_mass_gev,
};
use recoil::units::{ATOMIC_MASS_UNIT_GEV, C_KM_S, GEV_PER_KG, NUCLEON_MASS_GEV};

fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

/// A germanium experiment used by several tests: 1000 kg·day, 5–100 keV,
/// ε = 0.5, no background (test configuration, not a check value).
fn parts(target: &str) -> ExperimentParts {
    ExperimentParts {
        name: "test".into(),
        description: "test configuration".into(),
        target: Target::by_name(target).unwrap(),
        exposure_kg_day: 1000.0,
        threshold_kev: 5.0,
        upper_kev: 100.0,
        efficiency: Efficiency::Constant(0.5),
        resolution: None,
        background_events: 0.0,
        observed_events: 0,
        cl: 0.9,
        method: PoissonMethod::Classical,
        halo: Halo::standard(),
    }
}

// ---------------------------------------------------------------------------
// Lewin–Smith closed form
// ---------------------------------------------------------------------------

#[test]
fn spectrum_equals_lewin_smith_exponential_without_escape_or_earth_motion() {
    // REFERENCES.md §5 (Lewin & Smith 1996, memory): with v_E = 0 and
    // v_esc = ∞, dR/dE = R_0/(E_0 r) exp(−E/(E_0 r)), E_0 = ½ m_χ v_0²,
    // r = 4 m_χ m_T/(m_χ+m_T)², R_0 = (2/√π)(N_T)(ρ/m_χ) σ_0 v_0 with N_T the
    // nuclei per kg; ρ = 0.4 GeV/cm³, v_0 = 230 km/s, σ_0 = 1 pb per nucleus.
    let halo = Halo::new(0.4, 230.0, f64::INFINITY, 0.0).unwrap();
    let (a, mass_u) = (73_u32, 72.923_459); // ⁷³Ge (AME, memory)
    let m_t = mass_u * ATOMIC_MASS_UNIT_GEV;
    let target = Target::single_isotope("Ge-73", 32, a, m_t, (0.0, 0.0, 0.0)).unwrap();
    for m_chi in [10.0, 60.0, 500.0] {
        let mu_n = reduced_mass_gev(m_chi, m_t);
        let mu_1 = reduced_mass_gev(m_chi, NUCLEON_MASS_GEV);
        let sigma0 = 1e-36; // 1 pb on the nucleus
        let sigma_n = sigma0 / (f64::from(a * a) * (mu_n / mu_1).powi(2));
        let s = RecoilSpectrum::new(
            &halo,
            &target,
            m_chi,
            sigma_n,
            Interaction::Si,
            FormFactorChoice::Unity,
        )
        .unwrap();
        let v0_c = 230.0 / C_KM_S;
        let e0_r_kev = 0.5 * m_chi * v0_c * v0_c * 4.0 * m_chi * m_t / (m_chi + m_t).powi(2) * 1e6;
        // R_0 in events/(kg day): 1e5 cm/km, 86400 s/day.
        let r0 = 2.0 / std::f64::consts::PI.sqrt()
            * (GEV_PER_KG / m_t)
            * (0.4 / m_chi)
            * sigma0
            * 230.0
            * 1e5
            * 86_400.0;
        // R_0 m_χ m_T = 503.14 for these values (REFERENCES.md §5, computed).
        assert!(
            (r0 * m_chi * m_t - 503.14).abs() < 0.01,
            "R0 m m = {}",
            r0 * m_chi * m_t
        );
        for e_over in [0.0, 0.3, 1.0, 2.5, 6.0] {
            let e = e_over * e0_r_kev;
            let expected = r0 / e0_r_kev * (-e / e0_r_kev).exp();
            let got = s.rate(e);
            assert!(
                rel(got, expected) < 1e-6,
                "m {m_chi} E {e}: {got} vs {expected}"
            );
        }
        // And the normalisation read off the numerical spectrum itself.
        let r0_spectrum = s.rate(0.0) * e0_r_kev;
        assert!((r0_spectrum * m_chi * m_t - 503.14).abs() < 0.01);
    }
}

// ---------------------------------------------------------------------------
// Halo
// ---------------------------------------------------------------------------

#[test]
fn eta_matches_tabulated_values() {
    // REFERENCES.md §5 (computed; confirmed here by a 1-D numerical
    // integration with scipy 1.17.1 quad): v_0 = 220, v_E = 232, v_esc = 544 km/s.
    let halo = Halo::new(0.3, 220.0, 544.0, 232.0).unwrap();
    for (v, eta) in [
        (100.0, 3.397_050e-3),
        (300.0, 1.423_537e-3),
        (500.0, 1.764_517e-4),
    ] {
        let got = halo.eta_s_km(v);
        assert!(rel(got, eta) < 2e-6, "eta({v}) = {got}, expected {eta}");
    }
    // Zero beyond v_esc + v_E (kinematics, common practice).
    assert_eq!(halo.eta_s_km(776.1), 0.0);
}

#[test]
fn eta_is_continuous_and_decreasing() {
    // Invariants (no source needed): η ≥ 0, non-increasing, continuous at
    // the branch point v_min = v_esc − v_E.
    let halo = Halo::standard();
    let mut prev = f64::INFINITY;
    for k in 0..=2000 {
        let v = k as f64 * 0.5;
        let eta = halo.eta_s_km(v);
        assert!(eta >= 0.0 && eta <= prev + 1e-18, "v = {v}");
        prev = eta;
    }
    let branch = halo.vesc_km_s() - halo.vearth_km_s();
    let (a, b) = (halo.eta_s_km(branch - 1e-10), halo.eta_s_km(branch + 1e-10));
    assert!(rel(a, b) < 1e-9, "{a} vs {b}");
}

#[test]
fn standard_halo_has_recommended_values() {
    // Baxter et al., EPJC 81 (2021) 907 (REFERENCES.md §5, memory).
    let h = Halo::standard();
    assert_eq!(h.rho_gev_cm3(), 0.3);
    assert_eq!(h.v0_km_s(), 238.0);
    assert_eq!(h.vesc_km_s(), 544.0);
    // |(11.1, 238 + 12.24, 7.25)| = 250.5910 km/s (computed with numpy 2.4.6).
    assert!((h.vearth_km_s() - 250.591).abs() < 1e-3);
}

// ---------------------------------------------------------------------------
// Form factors
// ---------------------------------------------------------------------------

#[test]
fn helm_form_factor_shape() {
    for a in [19_u32, 40, 73, 131] {
        // F(0) = 1 (normalisation, REFERENCES.md §5).
        assert_eq!(helm(0.0, a), 1.0);
        let rn = helm_radius_fm(a);
        let q0 = J1_FIRST_ZERO / rn;
        // First zero where j₁ has its first zero, x = 4.493409 (scipy 1.17.1).
        assert!(helm(q0 * (1.0 - 1e-6), a) > 0.0);
        assert!(helm(q0 * (1.0 + 1e-6), a) < 0.0);
        assert!(helm(q0, a).abs() < 1e-12);
        // Monotone fall before it.
        let mut prev = 1.0;
        for k in 1..1000 {
            let f = helm(q0 * k as f64 / 1000.0, a);
            assert!(f < prev, "A = {a}, k = {k}");
            prev = f;
        }
    }
}

#[test]
fn helm_form_factor_values() {
    // Computed with scipy 1.17.1 (spherical_jn) from the REFERENCES.md §5 formula.
    for (q, a, f) in [
        (0.25, 131, 7.826_016_554_4e-1),
        (0.5, 73, 4.831_625_077_7e-1),
        (1.0, 40, 7.278_337_433_9e-2),
    ] {
        assert!(rel(helm(q, a), f) < 1e-9, "q {q} A {a}: {}", helm(q, a));
    }
}

// ---------------------------------------------------------------------------
// Full spectra against an independent computation
// ---------------------------------------------------------------------------

#[test]
fn spectra_match_independent_computation() {
    // Computed with scipy 1.17.1: same isotope table, Helm via spherical_jn,
    // η by numerical quadrature of the truncated Maxwellian, standard halo.
    let halo = Halo::standard();
    let cases = [
        ("xenon", Interaction::Si, 100.0, 1e-45, 1.0, 4.254_800_68e-5),
        (
            "xenon",
            Interaction::Si,
            100.0,
            1e-45,
            10.0,
            2.376_076_74e-5,
        ),
        (
            "xenon",
            Interaction::Si,
            100.0,
            1e-45,
            30.0,
            5.746_007_85e-6,
        ),
        (
            "germanium",
            Interaction::Si,
            50.0,
            1e-45,
            10.0,
            1.711_203_93e-5,
        ),
        (
            "xenon",
            Interaction::SdNeutron,
            100.0,
            1e-40,
            10.0,
            1.558_887_34e-5,
        ),
        (
            "germanium",
            Interaction::SdProton,
            30.0,
            1e-40,
            5.0,
            6.759_259_61e-8,
        ),
    ];
    for (name, interaction, m, sigma, e, expected) in cases {
        let target = Target::by_name(name).unwrap();
        let s = RecoilSpectrum::new(
            &halo,
            &target,
            m,
            sigma,
            interaction,
            FormFactorChoice::Standard,
        )
        .unwrap();
        let got = s.rate(e);
        assert!(
            rel(got, expected) < 1e-6,
            "{name} {interaction} m {m} E {e}: {got} vs {expected}"
        );
    }
}

#[test]
fn expected_counts_match_independent_integration() {
    // Computed with scipy 1.17.1 (quad over the spectrum above):
    // xenon, m = 100 GeV, σ = 1e-45 cm², 5–40 keV, ε = 0.5, 1000 kg·day.
    let mut p = parts("xenon");
    p.upper_kev = 40.0;
    let exp = Experiment::new(p).unwrap();
    let n = exp.expected_counts(100.0, 1e-45, Interaction::Si).unwrap();
    assert!(rel(n, 2.191_510_76e-1) < 1e-7, "{n}");
    // germanium, m = 10 GeV (endpoint inside the window), σ = 1e-42 cm²,
    // 2–100 keV, ε = 1, 1 kg·day.
    let mut p = parts("germanium");
    p.threshold_kev = 2.0;
    p.efficiency = Efficiency::Constant(1.0);
    p.exposure_kg_day = 1.0;
    let exp = Experiment::new(p).unwrap();
    let n = exp.expected_counts(10.0, 1e-42, Interaction::Si).unwrap();
    assert!(rel(n, 1.667_978_70e-1) < 1e-7, "{n}");
}

// ---------------------------------------------------------------------------
// Scaling
// ---------------------------------------------------------------------------

#[test]
fn si_rate_scales_as_a_squared_times_reduced_mass_ratio() {
    // σ_N = σ_n A² (μ_N/μ_n)² (REFERENCES.md §5). Per kg the rate at equal
    // v_min is ∝ σ_N/μ_N² = σ_n A²/μ_n², i.e. the ratio of two single
    // isotopes is (A₁/A₂)² whatever their masses and m_χ (F = 1).
    let halo = Halo::standard();
    let iso = |label: &str, z, a, m_u: f64| {
        Target::single_isotope(label, z, a, m_u * ATOMIC_MASS_UNIT_GEV, (0.0, 0.0, 0.0)).unwrap()
    };
    let xe = iso("Xe-132", 54, 132, 131.904_155);
    let ar = iso("Ar-40", 18, 40, 39.962_383);
    for m_chi in [20.0, 100.0, 1000.0] {
        let sx = RecoilSpectrum::new(
            &halo,
            &xe,
            m_chi,
            1e-45,
            Interaction::Si,
            FormFactorChoice::Unity,
        )
        .unwrap();
        let sa = RecoilSpectrum::new(
            &halo,
            &ar,
            m_chi,
            1e-45,
            Interaction::Si,
            FormFactorChoice::Unity,
        )
        .unwrap();
        let (mx, ma) = (
            131.904_155 * ATOMIC_MASS_UNIT_GEV,
            39.962_383 * ATOMIC_MASS_UNIT_GEV,
        );
        let (mux, mua) = (reduced_mass_gev(m_chi, mx), reduced_mass_gev(m_chi, ma));
        for v in [50.0_f64, 300.0, 600.0] {
            // E_R = 2 μ² v² / m_T (v_min inverted).
            let ex = 2.0 * mux * mux * (v / C_KM_S).powi(2) / mx * 1e6;
            let ea = 2.0 * mua * mua * (v / C_KM_S).powi(2) / ma * 1e6;
            let ratio = sx.rate(ex) / sa.rate(ea);
            assert!(
                rel(ratio, (132.0_f64 / 40.0).powi(2)) < 1e-9,
                "m {m_chi} v {v}: {ratio}"
            );
        }
    }
}

#[test]
fn zero_background_zero_observed_limit_is_2_303_over_counts() {
    // PDG Statistics review table (REFERENCES.md §1): n = 0, b = 0, 90 % CL
    // gives s_up = ln 10 = 2.302585.
    let exp = Experiment::new(parts("germanium")).unwrap();
    let masses = log_mass_grid(5.0, 1e4, 30).unwrap();
    let curve = limit_curve(&exp, &masses, Interaction::Si).unwrap();
    for (m, sigma) in curve {
        let counts_at_1 = exp.expected_counts(m, 1.0, Interaction::Si).unwrap();
        if counts_at_1 == 0.0 {
            assert!(sigma.is_infinite());
            continue;
        }
        assert!(
            rel(sigma * counts_at_1, 10f64.ln()) < 1e-9,
            "m {m}: {}",
            sigma * counts_at_1
        );
    }
}

#[test]
fn limit_scales_inversely_with_exposure() {
    // Counts are linear in exposure (definition; common practice).
    let a = Experiment::new(parts("xenon")).unwrap();
    let mut p = parts("xenon");
    p.exposure_kg_day *= 7.0;
    let b = Experiment::new(p).unwrap();
    let masses = [10.0, 100.0, 1000.0];
    let ca = limit_curve(&a, &masses, Interaction::Si).unwrap();
    let cb = limit_curve(&b, &masses, Interaction::Si).unwrap();
    for (x, y) in ca.iter().zip(&cb) {
        assert!(rel(x.1 / y.1, 7.0) < 1e-12);
    }
}

#[test]
fn spin_zero_target_has_no_spin_dependent_sensitivity() {
    // Argon's natural isotopes are even–even, J = 0 (common practice).
    let exp = Experiment::new(parts("argon")).unwrap();
    assert_eq!(
        exp.expected_counts(100.0, 1e-40, Interaction::SdNeutron)
            .unwrap(),
        0.0
    );
    let curve = limit_curve(&exp, &[100.0], Interaction::SdProton).unwrap();
    assert!(curve[0].1.is_infinite());
    // And xenon is far more sensitive to neutrons than protons:
    // ⟨S_n⟩ ≫ ⟨S_p⟩ (Menéndez et al. 2012, memory).
    let xe = Experiment::new(parts("xenon")).unwrap();
    let n = xe
        .expected_counts(100.0, 1e-40, Interaction::SdNeutron)
        .unwrap();
    let p = xe
        .expected_counts(100.0, 1e-40, Interaction::SdProton)
        .unwrap();
    assert!(n > 100.0 * p);
}

// ---------------------------------------------------------------------------
// Poisson limits
// ---------------------------------------------------------------------------

#[test]
// The table quotes 2.3026 (= ln 10 to 4 digits) as published, not as a constant.
#[allow(clippy::approx_constant)]
fn poisson_limits_match_pdg_table() {
    // PDG Statistics review, upper limits for n observed with b = 0
    // (REFERENCES.md §1, memory confirmed by computation); 4-digit values
    // computed with scipy 1.17.1 (brentq on poisson.cdf).
    let cl90 = [
        2.3026, 3.8897, 5.3223, 6.6808, 7.9936, 9.2747, 10.5321, 11.7709, 12.9947, 14.2060, 15.4066,
    ];
    let cl95 = [
        2.9957, 4.7439, 6.2958, 7.7537, 9.1535, 10.5130, 11.8424, 13.1481, 14.4346, 15.7052,
        16.9622,
    ];
    let pdg90 = [
        2.30, 3.89, 5.32, 6.68, 7.99, 9.27, 10.53, 11.77, 12.99, 14.21, 15.41,
    ];
    let pdg95 = [
        3.00, 4.74, 6.30, 7.75, 9.15, 10.51, 11.84, 13.15, 14.43, 15.71, 16.96,
    ];
    for n in 0..=10_usize {
        for method in [PoissonMethod::Classical, PoissonMethod::Cls] {
            let s90 = poisson_upper_limit(n as u64, 0.0, 0.9, method).unwrap();
            let s95 = poisson_upper_limit(n as u64, 0.0, 0.95, method).unwrap();
            assert!(
                (s90 - cl90[n]).abs() < 6e-5 && (s90 - pdg90[n]).abs() < 0.006,
                "n {n}: {s90}"
            );
            assert!(
                (s95 - cl95[n]).abs() < 6e-5 && (s95 - pdg95[n]).abs() < 0.006,
                "n {n}: {s95}"
            );
        }
    }
}

#[test]
fn poisson_limits_with_background() {
    // 95 % CLs with known b: REFERENCES.md §1 (computed).
    for (n, b, s) in [(1, 1.0, 4.1130), (2, 1.0, 5.4100), (10, 10.0, 8.0825)] {
        let got = poisson_upper_limit(n, b, 0.95, PoissonMethod::Cls).unwrap();
        assert!((got - s).abs() < 6e-5, "n {n} b {b}: {got}");
    }
    // CLs for n = 0 is e^{−s}, so s_up = ln 10 at 90 % for every b
    // (REFERENCES.md §1, Helene formula, memory), also where P(0 | b)
    // underflows (b = 10⁴).
    for b in [0.0, 0.5, 5.0, 50.0, 1e4] {
        let got = poisson_upper_limit(0, b, 0.9, PoissonMethod::Cls).unwrap();
        assert!((got - 10f64.ln()).abs() < 1e-9, "b {b}: {got}");
    }
    // Computed with scipy 1.17.1 (brentq on poisson.cdf):
    let cases = [
        (3, 1.5, 0.9, PoissonMethod::Classical, 5.180_783),
        (5, 2.0, 0.9, PoissonMethod::Classical, 7.274_674),
        (2, 1.0, 0.9, PoissonMethod::Cls, 4.442_913),
        // The shipped lxe-demo counts (n = 3, b = 3.4 events).
        (3, 3.4, 0.9, PoissonMethod::Cls, 4.187_364),
    ];
    for (n, b, cl, method, s) in cases {
        let got = poisson_upper_limit(n, b, cl, method).unwrap();
        assert!((got - s).abs() < 2e-6, "n {n} b {b} {method:?}: {got}");
    }
    // Classical limit vanishes when P(0 | b = 3) = 0.0498 < 0.1 (scipy 1.17.1).
    assert_eq!(
        poisson_upper_limit(0, 3.0, 0.9, PoissonMethod::Classical).unwrap(),
        0.0
    );
    // Medians of Poisson(b): scipy 1.17.1 poisson.median.
    assert_eq!(median_expected_count(0.5), 0);
    assert_eq!(median_expected_count(2.3), 2);
    assert_eq!(median_expected_count(10.0), 10);
}

#[test]
fn cls_limit_never_below_classical_and_grows_with_observed() {
    // Invariants (Read 2002): CLs ≥ CL_{s+b}, so its limit is weaker; limits
    // rise with n at fixed b.
    for b in [0.0, 0.7, 3.0, 12.0] {
        let mut prev = 0.0;
        for n in 0..15 {
            let c = poisson_upper_limit(n, b, 0.9, PoissonMethod::Classical).unwrap();
            let s = poisson_upper_limit(n, b, 0.9, PoissonMethod::Cls).unwrap();
            assert!(s >= c - 1e-9, "n {n} b {b}");
            assert!(s > prev);
            prev = s;
        }
    }
}

#[test]
fn median_expected_limit_uses_median_count() {
    // b = 2.3 has median count 2 (scipy 1.17.1), so the reach uses n = 2.
    let mut p = parts("germanium");
    p.background_events = 2.3;
    p.observed_events = 7;
    let exp = Experiment::new(p).unwrap();
    let exp_pts =
        limit_curve_points(&exp, &[50.0], Interaction::Si, LimitKind::MedianExpected).unwrap();
    let obs_pts = limit_curve_points(&exp, &[50.0], Interaction::Si, LimitKind::Observed).unwrap();
    let s2 = poisson_upper_limit(2, 2.3, 0.9, PoissonMethod::Classical).unwrap();
    let s7 = poisson_upper_limit(7, 2.3, 0.9, PoissonMethod::Classical).unwrap();
    assert!(rel(exp_pts[0].expected_counts_at_sigma, s2) < 1e-12);
    assert!(rel(obs_pts[0].sigma_cm2 / exp_pts[0].sigma_cm2, s7 / s2) < 1e-12);
}

// ---------------------------------------------------------------------------
// Resolution, efficiency, modulation, determinism
// ---------------------------------------------------------------------------

#[test]
fn resolution_paths_agree_and_vanish_when_small() {
    // Two independent numerical paths must agree (no external source): the
    // detection kernel in true energy, and the smeared spectrum in observed
    // energy integrated over the window with ε.
    let mut p = parts("germanium");
    p.resolution = Some(Resolution {
        sigma0_kev: 0.5,
        sigma_sqrt_kev: 0.1,
    });
    let exp = Experiment::new(p).unwrap();
    for m in [8.0, 50.0, 500.0] {
        let spectrum = exp.spectrum(m, 1e-44, Interaction::Si).unwrap();
        let kernel = exp.counts_of(&spectrum);
        let n = 2_000;
        let (lo, hi) = exp.window_kev();
        let h = (hi - lo) / n as f64;
        let simpson: f64 = (0..=n)
            .map(|k| {
                let e = lo + h * k as f64;
                let w = if k == 0 || k == n {
                    1.0
                } else if k % 2 == 1 {
                    4.0
                } else {
                    2.0
                };
                w * 0.5 * exp.observed_rate(&spectrum, e)
            })
            .sum::<f64>()
            * h
            / 3.0
            * exp.exposure_kg_day();
        assert!(
            rel(kernel, simpson) < 1e-6,
            "m {m}: kernel {kernel} vs smeared {simpson}"
        );
    }
    // A tiny resolution reproduces the unsmeared counts.
    let mut p = parts("germanium");
    p.resolution = Some(Resolution {
        sigma0_kev: 1e-3,
        sigma_sqrt_kev: 0.0,
    });
    let sharp = Experiment::new(p).unwrap();
    let plain = Experiment::new(parts("germanium")).unwrap();
    for m in [10.0, 100.0] {
        let a = sharp.expected_counts(m, 1e-44, Interaction::Si).unwrap();
        let b = plain.expected_counts(m, 1e-44, Interaction::Si).unwrap();
        assert!(rel(a, b) < 1e-3, "m {m}: {a} vs {b}");
    }
}

#[test]
fn efficiency_curve_from_csv() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("eff.csv");
    std::fs::write(&path, "e_kev,efficiency\n0,0\n10,0.5\n200,0.5\n").unwrap();
    let eff = Efficiency::from_csv_file(&path).unwrap();
    // Linear interpolation between nodes (definition).
    assert!((eff.at(5.0) - 0.25).abs() < 1e-15);
    assert_eq!(eff.at(50.0), 0.5);
    // Constant 0.5 over the window ⇒ same counts as the constant form.
    let mut p = parts("germanium");
    p.threshold_kev = 10.0;
    let constant = Experiment::new(p.clone()).unwrap();
    p.efficiency = eff;
    let curve = Experiment::new(p).unwrap();
    let a = constant
        .expected_counts(60.0, 1e-45, Interaction::Si)
        .unwrap();
    let b = curve.expected_counts(60.0, 1e-45, Interaction::Si).unwrap();
    assert!(rel(a, b) < 1e-12);
}

#[test]
fn annual_modulation_and_phase_reversal() {
    // K. Freese, M. Lisanti, C. Savage, RMP 85 (2013) 1561 (memory): at high
    // v_min the rate peaks in June (Earth fastest), at low v_min the
    // modulation reverses phase and December is higher.
    let h = Halo::standard();
    let june = h.with_date("2026-06-02").unwrap();
    let dec = h.with_date("2026-12-02").unwrap();
    for v in [400.0, 600.0] {
        assert!(june.eta_s_km(v) > dec.eta_s_km(v), "v_min {v}");
    }
    assert!(june.eta_s_km(50.0) < dec.eta_s_km(50.0));
    // Heavy WIMP on xenon at 60–200 keV (v_min ≳ 240 km/s): more events in
    // June, by a few per cent (typical size, common practice).
    let mut p = parts("xenon");
    p.threshold_kev = 60.0;
    p.upper_kev = 200.0;
    let exp = Experiment::new(p).unwrap();
    let nj = exp
        .clone()
        .with_halo(june)
        .expected_counts(200.0, 1e-45, Interaction::Si)
        .unwrap();
    let nd = exp
        .with_halo(dec)
        .expected_counts(200.0, 1e-45, Interaction::Si)
        .unwrap();
    assert!(
        nj > nd && (nj - nd) / (nj + nd) < 0.1,
        "june {nj}, december {nd}"
    );
}

#[test]
fn limit_curve_identical_on_one_and_two_threads() {
    let exp = Experiment::new(parts("xenon")).unwrap();
    let masses = log_mass_grid(3.0, 1e4, 60).unwrap();
    let run = |threads| {
        rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap()
            .install(|| limit_curve(&exp, &masses, Interaction::Si).unwrap())
    };
    let (one, two) = (run(1), run(2));
    assert!(
        one.iter()
            .zip(&two)
            .all(|(a, b)| a.0.to_bits() == b.0.to_bits() && a.1.to_bits() == b.1.to_bits())
    );
}

#[test]
fn log_mass_grid_endpoints() {
    let g = log_mass_grid(1.0, 1000.0, 4).unwrap();
    // 1, 10, 100, 1000 (arithmetic).
    for (a, b) in g.iter().zip([1.0, 10.0, 100.0, 1000.0]) {
        assert!(rel(*a, b) < 1e-14);
    }
    assert!(log_mass_grid(10.0, 1.0, 5).is_err());
    assert!(log_mass_grid(1.0, 10.0, 1).is_err());
}

// ---------------------------------------------------------------------------
// Bad input
// ---------------------------------------------------------------------------

fn message(e: DirectError) -> String {
    e.to_string()
}

#[test]
fn bad_experiment_parameters_are_rejected_with_clear_messages() {
    let mut p = parts("germanium");
    p.exposure_kg_day = -5.0;
    let m = message(Experiment::new(p).unwrap_err());
    assert!(
        m.contains("exposure") && m.contains("-5") && m.contains("kg·day"),
        "{m}"
    );

    let mut p = parts("germanium");
    p.threshold_kev = 120.0;
    let m = message(Experiment::new(p).unwrap_err());
    assert!(
        m.contains("threshold") && m.contains("120") && m.contains("100"),
        "{m}"
    );

    let mut p = parts("germanium");
    p.efficiency = Efficiency::Constant(1.2);
    let m = message(Experiment::new(p).unwrap_err());
    assert!(
        m.contains("efficiency") && m.contains("[0, 1]") && m.contains("1.2"),
        "{m}"
    );

    let m = message(Target::by_name("unobtainium").unwrap_err());
    assert!(m.contains("unobtainium") && m.contains("xenon"), "{m}");

    let mut broken = Target::by_name("germanium").unwrap();
    broken.isotopes[0].mass_fraction = 0.9;
    let m = message(
        RecoilSpectrum::new(
            &Halo::standard(),
            &broken,
            50.0,
            1e-45,
            Interaction::Si,
            FormFactorChoice::Standard,
        )
        .unwrap_err(),
    );
    assert!(m.contains("sum to 1"), "{m}");

    assert!(Halo::new(0.3, 238.0, 200.0, 250.0).is_err());
    assert!(Halo::new(-0.3, 238.0, 544.0, 250.0).is_err());
    let halo = Halo::standard();
    let xe = Target::by_name("xe").unwrap();
    assert!(
        RecoilSpectrum::new(
            &halo,
            &xe,
            0.0,
            1e-45,
            Interaction::Si,
            FormFactorChoice::Standard
        )
        .is_err()
    );
    assert!(
        RecoilSpectrum::new(
            &halo,
            &xe,
            10.0,
            f64::NAN,
            Interaction::Si,
            FormFactorChoice::Standard
        )
        .is_err()
    );
    assert!(poisson_upper_limit(0, -1.0, 0.9, PoissonMethod::Cls).is_err());
    assert!(poisson_upper_limit(0, 1.0, 1.0, PoissonMethod::Cls).is_err());
    assert!("SD-x".parse::<Interaction>().is_err());
}

fn write(dir: &std::path::Path, name: &str, text: &str) -> std::path::PathBuf {
    let path = dir.join(name);
    let mut f = std::fs::File::create(&path).unwrap();
    f.write_all(text.as_bytes()).unwrap();
    path
}

#[test]
fn bad_efficiency_csv_is_rejected() {
    let dir = tempfile::tempdir().unwrap();
    let cases = [
        ("e_kev,efficiency\n1,0.5\n2,1.5\n", "line 3", "[0, 1]"),
        ("e_kev,efficiency\n1,0.5\n1,0.6\n", "line 3", "increase"),
        ("energy,eff\n1,0.5\n2,0.6\n", "line 1", "e_kev"),
        ("e_kev,efficiency\n1,0.5\n2,abc\n", "line 3", "not a number"),
        ("e_kev,efficiency\n1,0.5\n", "line 1", "at least 2"),
    ];
    for (k, (text, line, rule)) in cases.iter().enumerate() {
        let path = write(dir.path(), &format!("e{k}.csv"), text);
        let m = message(Efficiency::from_csv_file(&path).unwrap_err());
        assert!(
            m.contains(&format!("e{k}.csv")) && m.contains(line) && m.contains(rule),
            "{m}"
        );
    }
    // A curve that does not cover the window.
    let path = write(
        dir.path(),
        "short.csv",
        "e_kev,efficiency\n10,0.5\n50,0.5\n",
    );
    let mut p = parts("germanium");
    p.efficiency = Efficiency::from_csv_file(&path).unwrap();
    let m = message(Experiment::new(p).unwrap_err());
    assert!(m.contains("cover"), "{m}");
}

#[test]
fn malformed_curve_csv_is_rejected() {
    let dir = tempfile::tempdir().unwrap();
    let good = write(
        dir.path(),
        "good.csv",
        "# an imported curve\nm_dm_gev,sigma_cm2\n10,1e-44\n100,2e-46\n",
    );
    assert_eq!(
        read_curve_csv(&good).unwrap(),
        vec![(10.0, 1e-44), (100.0, 2e-46)]
    );
    let cases = [
        ("mass,sigma\n10,1e-44\n", "m_dm_gev"),
        ("m_dm_gev,sigma_cm2\n10,abc\n", "not a number"),
        ("m_dm_gev,sigma_cm2\n10,-1e-44\n", "sigma_cm2 must be > 0"),
        (
            "m_dm_gev,sigma_cm2\n-10,1e-44\n",
            "m_dm_gev must be finite and > 0",
        ),
        ("m_dm_gev,sigma_cm2\n", "no data rows"),
        ("m_dm_gev,sigma_cm2\n10,1e-44,7\n", "malformed row"),
    ];
    for (k, (text, rule)) in cases.iter().enumerate() {
        let path = write(dir.path(), &format!("c{k}.csv"), text);
        let m = message(read_curve_csv(&path).unwrap_err());
        assert!(m.contains(&format!("c{k}.csv")) && m.contains(rule), "{m}");
    }
    let m = message(read_curve_csv(&dir.path().join("missing.csv")).unwrap_err());
    assert!(
        m.contains("missing.csv") && m.contains("cannot read"),
        "{m}"
    );
}

#[test]
fn experiment_toml_errors_name_the_file() {
    let dir = tempfile::tempdir().unwrap();
    let base = "name = \"t\"\ntarget = \"xenon\"\nthreshold_kev = 5.0\nupper_kev = 40.0\nefficiency = 0.5\nbackground_events = 0.0\nobserved_events = 0\n";
    let ok = write(
        dir.path(),
        "ok.toml",
        &format!("{base}exposure_tonne_year = 1.0\n"),
    );
    let exp = Experiment::from_toml_file(&ok).unwrap();
    // 1 t·yr = 1000 kg × 365.25 d (definition of the Julian year).
    assert_eq!(exp.exposure_kg_day(), 365_250.0);
    let cases = [
        (
            "neg.toml",
            format!("{base}exposure_kg_day = -5.0\n"),
            "exposure must be finite and > 0, got -5 kg·day",
        ),
        (
            "both.toml",
            format!("{base}exposure_kg_day = 5.0\nexposure_tonne_year = 1.0\n"),
            "exactly one",
        ),
        (
            "typo.toml",
            format!("{base}exposure_kg_day = 5.0\nthreshhold = 3\n"),
            "threshhold",
        ),
        (
            "target.toml",
            format!(
                "{}exposure_kg_day = 5.0\n",
                base.replace("xenon", "kryptonite")
            ),
            "kryptonite",
        ),
    ];
    for (name, text, rule) in cases {
        let path = write(dir.path(), name, &text);
        let m = message(Experiment::from_toml_file(&path).unwrap_err());
        assert!(m.contains(name) && m.contains(rule), "{m}");
    }
}

// ---------------------------------------------------------------------------
// Smaller pieces
// ---------------------------------------------------------------------------

#[test]
fn poisson_cdf_for_large_counts() {
    // scipy 1.17.1 stats.poisson.cdf at n = 10⁴ and n = 2×10⁴.
    assert!(
        rel(
            recoil::direct::poisson_cdf(10_000, 10_050.0),
            3.111_796_449_774e-1
        ) < 1e-9
    );
    assert!(
        rel(
            recoil::direct::poisson_cdf(20_000, 20_100.0),
            2.415_820_664_406e-1
        ) < 1e-9
    );
    // Medians: scipy 1.17.1 stats.poisson.median.
    assert_eq!(median_expected_count(7.7), 8);
    assert_eq!(median_expected_count(1e6 + 0.3), 1_000_000);
}

#[test]
fn spin_dependent_cross_section_of_fluorine() {
    // σ_N = σ_p (4/3)(J+1)/J ⟨S_p⟩² (μ_N/μ_p)² (Tovey et al. 2000, memory)
    // with J = ½, ⟨S_p⟩ = 0.441 (Pacheco & Strottman 1989, memory), m_χ = 50 GeV,
    // σ_p = 1e-40 cm²: 1.5668406729e-38 cm² (computed with Python 3.11).
    let f = Target::by_name("fluorine").unwrap();
    let s = recoil::direct::nucleus_cross_section_cm2(
        &f.isotopes[0],
        50.0,
        1e-40,
        Interaction::SdProton,
    );
    assert!(rel(s, 1.566_840_672_9e-38) < 1e-9, "{s}");
}

#[test]
fn curve_interpolation_is_exact_for_power_laws() {
    // A power law σ = k m^p is a straight line in log–log (arithmetic).
    let curve: Vec<(f64, f64)> = [100.0, 1.0, 10.0]
        .iter()
        .map(|&m: &f64| (m, 1e-45 * m.powf(1.3)))
        .collect();
    let got = recoil::direct::interpolate_curve(&curve, 3.0).unwrap();
    assert!(rel(got, 1e-45 * 3f64.powf(1.3)) < 1e-12);
    assert_eq!(
        recoil::direct::interpolate_curve(&curve, 10.0),
        Some(1e-45 * 10f64.powf(1.3))
    );
    assert_eq!(recoil::direct::interpolate_curve(&curve, 0.5), None);
    assert_eq!(recoil::direct::interpolate_curve(&curve, 200.0), None);
}

#[test]
fn halo_overrides() {
    let base = Halo::standard();
    let cfg = recoil::direct::HaloConfig {
        v0_km_s: Some(220.0),
        ..Default::default()
    };
    let h = cfg.apply_to(&base).unwrap();
    // v_E follows v_0: |(11.1, 220 + 12.24, 7.25)| = 232.6180 km/s (computed with Python 3.11).
    assert!(
        (h.vearth_km_s() - 232.618).abs() < 1e-3,
        "{}",
        h.vearth_km_s()
    );
    assert_eq!(h.vesc_km_s(), 544.0);
    let both = recoil::direct::HaloConfig {
        vearth_km_s: Some(230.0),
        date: Some("2026-01-01".into()),
        ..Default::default()
    };
    assert!(
        both.apply_to(&base)
            .unwrap_err()
            .to_string()
            .contains("not both")
    );
}
