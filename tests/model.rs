//! Model stage: widths, coupling rescaling, DM–nucleon cross-sections and
//! the collider limit curve, checked against published statements,
//! independent computation and identities. The source is named beside
//! every check value.

use recoil::model::nucleon::{sigma_sd_axial_cm2, sigma_si_vector_cm2};
use recoil::model::{
    BoundaryPoint, Channel, CouplingPath, Couplings, FermionMasses, Mediator, MediatorKind,
    ModelError, Nucleon, NucleonParams, ProductionRegime, ScatteringType, collider_curve,
};

fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

fn med(kind: MediatorKind, m_med: f64, m_dm: f64, g_q: f64, g_dm: f64) -> Mediator {
    Mediator::new(kind, m_med, m_dm, Couplings::new(g_q, g_dm).unwrap()).unwrap()
}

/// Fermion masses with m_t = 172.5 GeV, the value of the REFERENCES §3 check.
fn masses_mt1725() -> FermionMasses {
    FermionMasses::pdg2024().with_top(172.5).unwrap()
}

// ---------------------------------------------------------------- widths

#[test]
fn vector_benchmark_width_over_mass() {
    // REFERENCES §3 (computed there with scipy 1.17): Γ/M = 0.0563 for a
    // vector, M = 1 TeV, m_χ = 1 GeV, m_t = 172.5 GeV, g_q = 0.25, g_DM = 1;
    // recomputed with Python 3.11 (math) to more digits: 0.05633983.
    let m = med(MediatorKind::Vector, 1000.0, 1.0, 0.25, 1.0).with_masses(masses_mt1725());
    assert!(
        (m.width_over_mass() - 0.0563).abs() < 5e-5,
        "{}",
        m.width_over_mass()
    );
    assert!(rel(m.width_over_mass(), 0.056_339_83) < 1e-6);
}

#[test]
fn published_width_statements() {
    // arXiv:1507.00966 (REFERENCES §3, published): g_q = 0.25, g_DM = 1 gives
    // Γ/M ≲ 0.06; g_q = g_DM = 1 gives Γ/M ~ 0.5. Checked for vector and
    // axial mediators over the demo mass range with light DM.
    for kind in [MediatorKind::Vector, MediatorKind::Axial] {
        for m_med in [500.0, 1000.0, 2000.0, 3000.0] {
            let bench = med(kind, m_med, 1.0, 0.25, 1.0);
            assert!(bench.width_over_mass() < 0.06, "{kind} {m_med}");
            assert!(!bench.is_wide());
            let strong = med(kind, m_med, 1.0, 1.0, 1.0);
            assert!(
                (0.45..0.55).contains(&strong.width_over_mass()),
                "{kind} {m_med}: {}",
                strong.width_over_mass()
            );
            assert!(
                strong.is_wide(),
                "Γ/M ~ 0.5 exceeds the 0.3 warning threshold"
            );
        }
    }
}

#[test]
fn widths_against_independent_computation() {
    // Computed with Python 3.11 (math, cmath; the loop function through
    // cmath.asin, an independent route to the analytic continuation) from
    // the formulas of REFERENCES §3 with m_t = 172.5 GeV and the PDG 2024
    // light-quark masses; regression values, not literature values.
    let cases = [
        (
            MediatorKind::Axial,
            1000.0,
            1.0,
            0.25,
            1.0,
            55.505_644_873_8,
        ),
        (
            MediatorKind::Axial,
            2000.0,
            100.0,
            0.25,
            1.0,
            111.500_017_090,
        ),
        (
            MediatorKind::Scalar,
            1000.0,
            1.0,
            1.0,
            1.0,
            88.348_034_140_5,
        ),
        (
            MediatorKind::Pseudoscalar,
            1000.0,
            1.0,
            1.0,
            1.0,
            94.915_011_494_6,
        ),
        (
            MediatorKind::Scalar,
            300.0,
            10.0,
            1.0,
            1.0,
            11.872_916_137_0,
        ),
    ];
    for (kind, m_med, m_dm, g_q, g_dm, want) in cases {
        let m = med(kind, m_med, m_dm, g_q, g_dm).with_masses(masses_mt1725());
        assert!(
            rel(m.total_width_gev(), want) < 1e-9,
            "{kind} {m_med}: {}",
            m.total_width_gev()
        );
    }
    // The gluon term alone at 1 TeV (same computation).
    let s = med(MediatorKind::Scalar, 1000.0, 1.0, 1.0, 1.0).with_masses(masses_mt1725());
    assert!(rel(s.partial_width_gev(Channel::Gluons), 0.075_837_376_923) < 1e-9);
    let p = med(MediatorKind::Pseudoscalar, 1000.0, 1.0, 1.0, 1.0).with_masses(masses_mt1725());
    assert!(rel(p.partial_width_gev(Channel::Gluons), 0.097_302_426_431) < 1e-9);
}

#[test]
fn gluon_width_heavy_top_limit_matches_higgs_formula() {
    // Heavy-top limit of the spin-0 → gg width with g_q = 1 equals the
    // Standard-Model LO widths (M. Spira, hep-ph/9705337; from memory):
    // Γ(H → gg) = G_F α_s² M³/(36√2 π³), Γ(A → gg) = G_F α_s² M³/(16√2 π³),
    // with G_F = 1/(√2 v²) and α_s = 0.1180.
    let v = recoil::units::HIGGS_VEV_GEV;
    let g_f = 1.0 / (std::f64::consts::SQRT_2 * v * v);
    let a = 0.1180f64;
    let m_med = 100.0;
    let pi3 = std::f64::consts::PI.powi(3);
    let heavy = FermionMasses::pdg2024().with_top(1.0e5).unwrap();
    let s = med(MediatorKind::Scalar, m_med, 1.0, 1.0, 1.0).with_masses(heavy);
    let want_s = g_f * a * a * m_med.powi(3) / (36.0 * std::f64::consts::SQRT_2 * pi3);
    assert!(rel(s.partial_width_gev(Channel::Gluons), want_s) < 1e-4);
    let p = med(MediatorKind::Pseudoscalar, m_med, 1.0, 1.0, 1.0).with_masses(heavy);
    let want_p = g_f * a * a * m_med.powi(3) / (16.0 * std::f64::consts::SQRT_2 * pi3);
    assert!(rel(p.partial_width_gev(Channel::Gluons), want_p) < 1e-4);
}

#[test]
fn thresholds_vanish_and_are_continuous() {
    // Identity: β_f = 0 at and below threshold, partial widths vanish there
    // and rise continuously from zero above it.
    for kind in MediatorKind::ALL {
        let m_dm = 500.0;
        for m_med in [999.0, 1000.0] {
            let m = med(kind, m_med, m_dm, 0.25, 1.0);
            assert_eq!(
                m.partial_width_gev(Channel::DarkMatter),
                0.0,
                "{kind} {m_med}"
            );
            assert_eq!(m.br_dm(), 0.0);
        }
        let just_above = med(kind, 1000.0 * (1.0 + 1e-10), m_dm, 0.25, 1.0);
        assert!(just_above.partial_width_gev(Channel::DarkMatter) < 1e-3);
        let mut last = 0.0;
        for m_med in [1000.5, 1001.0, 1010.0, 1100.0, 2000.0] {
            let w = med(kind, m_med, m_dm, 0.25, 1.0).partial_width_gev(Channel::DarkMatter);
            assert!(w > last, "{kind}: width not rising at {m_med}");
            last = w;
        }
        // The top channel: closed below 2 m_t, open above.
        let mt = recoil::units::M_TOP_GEV;
        let below = med(kind, 2.0 * mt, 1.0, 0.25, 1.0);
        assert_eq!(below.partial_width_gev(Channel::Quark(5)), 0.0);
        let above = med(kind, 2.0 * mt + 1.0, 1.0, 0.25, 1.0);
        assert!(above.partial_width_gev(Channel::Quark(5)) > 0.0);
    }
}

#[test]
fn vector_and_axial_differ_by_beta_squared() {
    // arXiv:1507.00966 (REFERENCES §3): vector ∝ (1 + 2m²/M²)β, axial ∝ β³,
    // so Γ_A/Γ_V = β²/(1 + 2m²/M²) channel by channel.
    for (m_med, m_dm) in [(1000.0, 1.0), (1000.0, 300.0), (1000.0, 490.0)] {
        let v = med(MediatorKind::Vector, m_med, m_dm, 0.25, 1.0);
        let a = med(MediatorKind::Axial, m_med, m_dm, 0.25, 1.0);
        let x = (m_dm / m_med).powi(2);
        let want = (1.0 - 4.0 * x) / (1.0 + 2.0 * x);
        let got =
            a.partial_width_gev(Channel::DarkMatter) / v.partial_width_gev(Channel::DarkMatter);
        assert!(rel(got, want) < 1e-12, "{m_dm}: {got} vs {want}");
    }
}

#[test]
fn widths_scale_with_couplings() {
    // Identity: every partial width is ∝ g², so doubling all couplings
    // multiplies the total width by 4 and leaves BR unchanged.
    for kind in MediatorKind::ALL {
        let a = med(kind, 1500.0, 100.0, 0.25, 1.0);
        let b = med(kind, 1500.0, 100.0, 0.5, 2.0);
        assert!(rel(b.total_width_gev(), 4.0 * a.total_width_gev()) < 1e-12);
        assert!(rel(b.br_dm(), a.br_dm()) < 1e-12);
        let sum: f64 = a.partial_widths_gev().iter().map(|(_, w)| w).sum();
        assert!(rel(sum, a.total_width_gev()) < 1e-12);
    }
}

#[test]
fn lepton_coupling_adds_lepton_widths() {
    // Identity: with g_ℓ > 0 a vector mediator gains e, μ, τ and ν widths;
    // for M ≫ m_ℓ each charged lepton adds g_ℓ² M/(12π) and the three
    // neutrinos together 3 g_ℓ² M/(24π) (arXiv:1507.00966, from memory).
    let c = Couplings::with_leptons(0.25, 1.0, 0.1).unwrap();
    let m = Mediator::new(MediatorKind::Vector, 1000.0, 1.0, c).unwrap();
    let pi = std::f64::consts::PI;
    assert!(
        rel(
            m.partial_width_gev(Channel::Lepton(0)),
            0.01 * 1000.0 / (12.0 * pi)
        ) < 1e-9
    );
    assert!(
        rel(
            m.partial_width_gev(Channel::Neutrinos),
            3.0 * 0.01 * 1000.0 / (24.0 * pi)
        ) < 1e-12
    );
    let no_l = med(MediatorKind::Vector, 1000.0, 1.0, 0.25, 1.0);
    assert!(m.total_width_gev() > no_l.total_width_gev());
}

// ------------------------------------------------------------- rescaling

#[test]
fn rescaling_identities() {
    // Identities of the narrow-width factorisation (arXiv:1507.00966):
    // the reference couplings rescale to 1; off shell the rate is
    // ∝ g_q² g_DM²; on shell along g_q = g_DM it is ∝ g².
    let on = med(MediatorKind::Vector, 2000.0, 1.0, 0.25, 1.0);
    let off = med(MediatorKind::Vector, 500.0, 400.0, 0.25, 1.0);
    for m in [on, off] {
        let s = m.signal_scale(&m.couplings()).unwrap();
        assert!((s.factor - 1.0).abs() < 1e-14);
        assert_eq!(m.mu_limit_at(0.7, &m.couplings()).unwrap(), 0.7);
    }
    assert_eq!(on.regime(), ProductionRegime::OnShell);
    assert_eq!(off.regime(), ProductionRegime::OffShell);
    let s = off
        .signal_scale(&Couplings::new(0.5, 3.0).unwrap())
        .unwrap();
    assert!(rel(s.factor, (2.0f64 * 3.0).powi(2)) < 1e-12);
    // On shell: g_q = g_DM = g, BR is independent of g.
    let g1 = on
        .signal_scale(&Couplings::new(0.3, 0.3).unwrap())
        .unwrap()
        .factor;
    let g2 = on
        .signal_scale(&Couplings::new(0.6, 0.6).unwrap())
        .unwrap()
        .factor;
    assert!(rel(g2, 4.0 * g1) < 1e-12);
    // On shell at fixed g_DM: σ×BR = g_q² Γ_χ/(Γ_χ + g_q² K) grows slower than g_q².
    let r = on
        .signal_scale(&Couplings::new(0.5, 1.0).unwrap())
        .unwrap()
        .factor;
    assert!(r > 1.0 && r < 4.0, "{r}");
    let want = 4.0 * on.with_couplings(Couplings::new(0.5, 1.0).unwrap()).br_dm() / on.br_dm();
    assert!(rel(r, want) < 1e-12);
}

#[test]
fn excluded_coupling_off_shell_is_analytic() {
    // Off shell, r = (g_q/0.25)² at fixed g_DM = 1, so r = μ_up gives
    // g_q = 0.25 √μ_up (algebra, no source).
    let off = med(MediatorKind::Vector, 500.0, 400.0, 0.25, 1.0);
    for mu in [0.3, 1.0, 7.5, 120.0] {
        let lim = off
            .excluded_coupling(mu, CouplingPath::QuarkAtFixedDm(1.0))
            .unwrap();
        assert!(
            rel(lim.g_limit, 0.25 * f64::sqrt(mu)) < 1e-10,
            "{mu}: {}",
            lim.g_limit
        );
        assert_eq!(lim.regime, ProductionRegime::OffShell);
        // g_q = g_DM = g: r = (g²/0.25)², g = √(0.25 √μ).
        let eq = off.excluded_coupling(mu, CouplingPath::Equal).unwrap();
        assert!(rel(eq.g_limit, (0.25 * mu.sqrt()).sqrt()) < 1e-10);
    }
}

#[test]
fn excluded_coupling_on_shell_reaches_the_limit() {
    // The root satisfies r(g) = μ_up and the bracket is respected
    // (consistency of the root-finder; no external source).
    let on = med(MediatorKind::Axial, 2000.0, 100.0, 0.25, 1.0);
    for mu in [0.05, 0.5, 1.5] {
        let lim = on
            .excluded_coupling(mu, CouplingPath::QuarkAtFixedDm(1.0))
            .unwrap();
        let r = on.signal_scale(&lim.couplings).unwrap().factor;
        assert!(rel(r, mu) < 1e-9, "{mu}: r = {r}");
    }
    // At fixed g_DM, σ×BR = g_q² Γ_χ/(Γ_χ + g_q² K) saturates at Γ_χ/K;
    // at fixed g_q, BR → 1 caps the rate: a large μ_up cannot be reached.
    for path in [
        CouplingPath::QuarkAtFixedDm(1.0),
        CouplingPath::DmAtFixedQuark(0.25),
    ] {
        let err = on.excluded_coupling(10.0, path);
        assert!(matches!(err, Err(ModelError::NoSolution { .. })), "{err:?}");
    }
    // g_q = g_DM is unbounded (∝ g²) and always has a root below 4π here.
    assert!(on.excluded_coupling(10.0, CouplingPath::Equal).is_ok());
}

// ------------------------------------------------------ DM–nucleon plane

#[test]
fn sigma_prefactors() {
    // REFERENCES §4 (Boveia et al., arXiv:1603.04156; memory, prefactors
    // computed exactly): at g_q g_DM = 0.25, M = 1 TeV, μ = 1 GeV,
    // σ_SI = 6.9718×10⁻⁴¹ cm², σ_SD = 2.3797×10⁻⁴² cm² (Δ sum 0.32).
    let si = sigma_si_vector_cm2(0.25, 1.0, 1000.0, 1.0);
    assert!(rel(si, 6.9718e-41) < 1e-4, "{si}");
    assert!(rel(si, 6.9e-41) < 0.02);
    let sd = sigma_sd_axial_cm2(0.25, 1.0, 1000.0, 1.0, 0.84 - 0.43 - 0.09);
    assert!(rel(sd, 2.3797e-42) < 1e-4, "{sd}");
    assert!(rel(sd, 2.4e-42) < 0.02);
    // Scaling with (g_q g_DM)², M⁻⁴, μ² (REFERENCES §4).
    assert!(rel(sigma_si_vector_cm2(0.5, 1.0, 1000.0, 1.0), 4.0 * si) < 1e-12);
    assert!(rel(sigma_si_vector_cm2(0.25, 1.0, 2000.0, 1.0), si / 16.0) < 1e-12);
    assert!(rel(sigma_si_vector_cm2(0.25, 1.0, 1000.0, 0.5), si / 4.0) < 1e-12);
    assert!(
        rel(
            sigma_sd_axial_cm2(0.25, 2.0, 500.0, 1.0, 0.32),
            4.0 * 16.0 * sd
        ) < 1e-12
    );
}

#[test]
fn sigma_for_model_points() {
    // Computed with Python 3.11 from the REFERENCES §4 formulas with PDG 2024
    // nucleon masses and the dmwg2016 nucleon set (regression values).
    let p = NucleonParams::DMWG2016;
    let cases = [
        (
            MediatorKind::Vector,
            2000.0,
            100.0,
            0.25,
            Nucleon::Proton,
            3.765_056_294_1e-42,
        ),
        (
            MediatorKind::Vector,
            2000.0,
            100.0,
            0.25,
            Nucleon::Neutron,
            3.775_346_352_1e-42,
        ),
        (
            MediatorKind::Axial,
            2000.0,
            100.0,
            0.25,
            Nucleon::Proton,
            1.285_139_215_1e-43,
        ),
        (
            MediatorKind::Scalar,
            500.0,
            100.0,
            1.0,
            Nucleon::Proton,
            3.044_277_804_2e-45,
        ),
        (
            MediatorKind::Scalar,
            500.0,
            100.0,
            1.0,
            Nucleon::Neutron,
            3.115_714_123_1e-45,
        ),
    ];
    for (kind, m_med, m_dm, g_q, nucleon, want) in cases {
        let m = med(kind, m_med, m_dm, g_q, 1.0);
        let x = m.sigma_nucleon_cm2(nucleon, &p).unwrap();
        assert!(
            rel(x.sigma_cm2, want) < 1e-9,
            "{kind} {nucleon}: {}",
            x.sigma_cm2
        );
        let want_kind = if kind == MediatorKind::Axial {
            ScatteringType::SpinDependent
        } else {
            ScatteringType::SpinIndependent
        };
        assert_eq!(x.kind, want_kind);
    }
}

#[test]
fn nucleon_parameter_sets() {
    // The dmwg2016 set reproduces REFERENCES §4: Δ sum 0.32, f_N(proton)
    // = 2/9 + 7/9 · 0.164.
    let p = NucleonParams::by_name("DMWG2016").unwrap();
    let dq: f64 = p.delta_q(Nucleon::Proton).iter().sum();
    assert!((dq - 0.32).abs() < 1e-12);
    assert!((p.f_n(Nucleon::Proton) - (2.0 / 9.0 + 7.0 / 9.0 * 0.164)).abs() < 1e-12);
    // Isospin: the neutron swaps Δu and Δd (common practice, no source).
    assert_eq!(p.delta_q(Nucleon::Neutron), [-0.43, 0.84, -0.09]);
    assert!(NucleonParams::by_name("lattice2015").is_ok());
    let err = NucleonParams::by_name("nope").unwrap_err();
    assert!(err.to_string().contains("dmwg2016"), "{err}");
}

#[test]
fn pseudoscalar_gives_no_cross_section() {
    // REFERENCES §4: pseudoscalar scattering is momentum-suppressed.
    let m = med(MediatorKind::Pseudoscalar, 1000.0, 10.0, 1.0, 1.0);
    let err = m.sigma_nucleon_cm2(Nucleon::Proton, &NucleonParams::default());
    assert_eq!(err.unwrap_err(), ModelError::MomentumSuppressed);
    let c = Couplings::benchmark();
    let b = [BoundaryPoint {
        m_dm_gev: 10.0,
        m_med_limit_obs_gev: 1000.0,
        m_med_limit_exp_gev: None,
    }];
    let err = collider_curve(
        MediatorKind::Pseudoscalar,
        c,
        Nucleon::Proton,
        &NucleonParams::default(),
        0.95,
        &b,
    );
    assert_eq!(err.unwrap_err(), ModelError::MomentumSuppressed);
}

#[test]
fn collider_curve_carries_cl_and_expected() {
    let c = Couplings::benchmark();
    let p = NucleonParams::default();
    let b = [
        BoundaryPoint {
            m_dm_gev: 100.0,
            m_med_limit_obs_gev: 2000.0,
            m_med_limit_exp_gev: Some(1800.0),
        },
        BoundaryPoint {
            m_dm_gev: 300.0,
            m_med_limit_obs_gev: 1500.0,
            m_med_limit_exp_gev: None,
        },
    ];
    let curve = collider_curve(MediatorKind::Vector, c, Nucleon::Proton, &p, 0.95, &b).unwrap();
    assert_eq!(curve.cl, 0.95);
    assert!(curve.note.contains("95% CL") && curve.note.contains("90% CL"));
    assert_eq!(curve.kind, ScatteringType::SpinIndependent);
    // Same Python value as in sigma_for_model_points.
    assert!(rel(curve.points[0].sigma_obs_cm2, 3.765_056_294_1e-42) < 1e-9);
    // A weaker expected mass limit means a larger σ (M⁻⁴ scaling).
    let exp = curve.points[0].sigma_exp_cm2.unwrap();
    assert!(
        rel(
            exp,
            curve.points[0].sigma_obs_cm2 * (2000.0f64 / 1800.0).powi(4)
        ) < 1e-12
    );
    assert_eq!(curve.points[1].sigma_exp_cm2, None);
    let bad = [BoundaryPoint {
        m_dm_gev: 100.0,
        m_med_limit_obs_gev: -5.0,
        m_med_limit_exp_gev: None,
    }];
    let err = collider_curve(MediatorKind::Vector, c, Nucleon::Proton, &p, 0.95, &bad).unwrap_err();
    assert!(
        err.to_string().contains("point 0") && err.to_string().contains("-5"),
        "{err}"
    );
    assert!(collider_curve(MediatorKind::Vector, c, Nucleon::Proton, &p, 1.5, &b).is_err());
}

// ------------------------------------------------------------- bad input

#[test]
fn bad_input_is_rejected_with_a_clear_message() {
    let c = Couplings::benchmark();
    for (m_med, m_dm) in [
        (-1.0, 10.0),
        (0.0, 10.0),
        (1000.0, 0.0),
        (1000.0, -3.0),
        (f64::NAN, 1.0),
    ] {
        let err = Mediator::new(MediatorKind::Vector, m_med, m_dm, c).unwrap_err();
        let msg = err.to_string();
        assert!(msg.contains("GeV") && msg.contains("> 0"), "{msg}");
    }
    let err = Couplings::new(-0.25, 1.0).unwrap_err().to_string();
    assert!(err.contains("g_q") && err.contains("-0.25"), "{err}");
    assert!(Couplings::new(0.25, f64::INFINITY).is_err());
    let err = "tensor".parse::<MediatorKind>().unwrap_err().to_string();
    assert!(err.contains("tensor") && err.contains("axial"), "{err}");
    // A reference without signal cannot be rescaled.
    let zero = Mediator::new(
        MediatorKind::Vector,
        1000.0,
        1.0,
        Couplings::new(0.0, 1.0).unwrap(),
    )
    .unwrap();
    assert!(zero.signal_scale(&c).is_err());
    let m = med(MediatorKind::Vector, 1000.0, 1.0, 0.25, 1.0);
    assert!(m.excluded_coupling(-1.0, CouplingPath::Equal).is_err());
}
