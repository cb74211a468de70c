//! Statistics stage: limits, bands, significance, combination, bad input.
//! Every check value names its source beside it.

use nalgebra::DMatrix;
use recoil::stats::asymptotic::Asymptotic;
use recoil::stats::likelihood::Data;
use recoil::stats::{
    BackgroundConstraint, CountingModel, LimitOptions, Method, RegionCounts, StatsError,
    best_expected_region, combined_limit, discovery_significance, discovery_significance_with_unc,
    event_limit, region_limit, visible_cross_section_fb,
};

fn opts(cl: f64, method: Method) -> LimitOptions {
    LimitOptions {
        cl,
        method,
        constraint: BackgroundConstraint::Gaussian,
    }
}

fn region(n: u64, b: f64, db: f64, s: f64) -> RegionCounts {
    RegionCounts {
        observed: n,
        background: b,
        background_unc: db,
        signal: s,
        signal_rel_unc: 0.0,
    }
}

// PDG Statistics review, table of Poisson upper limits for n observed events
// with b = 0 (REFERENCES.md §1; memory, confirmed by computation).
const PDG_90: [f64; 11] = [
    2.30, 3.89, 5.32, 6.68, 7.99, 9.27, 10.53, 11.77, 12.99, 14.21, 15.41,
];
const PDG_95: [f64; 11] = [
    3.00, 4.74, 6.30, 7.75, 9.15, 10.51, 11.84, 13.15, 14.43, 15.71, 16.96,
];

#[test]
fn pdg_table_exact() {
    for (cl, table) in [(0.90, PDG_90), (0.95, PDG_95)] {
        for (n, want) in table.iter().enumerate() {
            let l = event_limit(n as u64, 0.0, 0.0, &opts(cl, Method::Exact)).unwrap();
            // Printed precision: two decimals.
            assert!(
                (l.mu_up_observed - want).abs() <= 0.005 + 1e-9,
                "n = {n}, CL = {cl}: got {}, table {want}",
                l.mu_up_observed
            );
        }
    }
}

/// Derivative of P(k ≤ n | s) with respect to s: −e^{−s} s^n / n!
/// (closed form), used to turn the CLs Monte Carlo error into a limit error.
fn poisson_pmf(n: u64, s: f64) -> f64 {
    let mut p = (-s).exp();
    for k in 1..=n {
        p *= s / k as f64;
    }
    p
}

#[test]
fn pdg_table_toys_within_mc_uncertainty() {
    let n_toys = 3000;
    for (cl, table) in [(0.90, PDG_90), (0.95, PDG_95)] {
        let alpha = 1.0 - cl;
        for (n, want) in table.iter().enumerate() {
            let n = n as u64;
            let o = opts(
                cl,
                Method::Toys {
                    n_toys,
                    seed: 7 + n,
                },
            );
            let l = event_limit(n, 0.0, 0.0, &o).unwrap();
            // σ(CLs) = √(α(1−α)/N) at the limit; σ(s) = σ(CLs)/|dCLs/ds|
            // with dCLs/ds = −P(k = n | s) for b = 0 (closed form).
            let sigma_s = (alpha * (1.0 - alpha) / n_toys as f64).sqrt() / poisson_pmf(n, *want);
            let tol = 4.0 * sigma_s + 0.005;
            assert!(
                (l.mu_up_observed - want).abs() < tol,
                "n = {n}, CL = {cl}: toys {} vs table {want} (tolerance {tol})",
                l.mu_up_observed
            );
            assert!(l.cls_mu1_mc_unc.is_some());
        }
    }
}

#[test]
fn zero_observed_gives_ln20_for_every_background() {
    // s_up = ln 20 for n = 0 and any b (REFERENCES.md §1, Helene formula).
    for b in [0.0, 0.5, 1.0, 5.0, 20.0] {
        let l = event_limit(0, b, 0.0, &opts(0.95, Method::Exact)).unwrap();
        assert!((l.mu_up_observed - 20f64.ln()).abs() < 1e-6, "b = {b}");
    }
}

#[test]
fn exact_cls_limits_with_known_background() {
    // REFERENCES.md §1 (computed); re-computed with scipy 1.17.1 brentq on
    // poisson.cdf ratios: 4.1130033, 5.4100049, 8.0825294, 5.9834555.
    for (n, b, want) in [
        (1u64, 1.0, 4.1130),
        (2, 1.0, 5.4100),
        (10, 10.0, 8.0825),
        (3, 2.0, 5.983455509),
    ] {
        let l = event_limit(n, b, 0.0, &opts(0.95, Method::Exact)).unwrap();
        assert!(
            (l.mu_up_observed - want).abs() < 1e-4,
            "n = {n}, b = {b}: {}",
            l.mu_up_observed
        );
    }
}

#[test]
fn asymptotic_band_edges_in_units_of_sigma() {
    // μ_up,N/σ = N + Φ⁻¹(1 − αΦ(N)) for α = 0.05 (REFERENCES.md §2, computed):
    // at the expected limit √q_A(μ_up,N) equals this number.
    let want = [1.0518, 1.4120, 1.9600, 2.7272, 3.6560];
    for (b, db) in [(100.0, 0.0), (50.0, 7.0)] {
        let r = region(b as u64, b, db, 1.0);
        let model = CountingModel::new(&[r], None, BackgroundConstraint::Gaussian).unwrap();
        let calc = Asymptotic::new(&model).unwrap();
        let limits = calc.expected_limits(0.05).unwrap();
        for (mu, w) in limits.iter().zip(want) {
            let z = calc.q_asimov(*mu).unwrap().sqrt();
            assert!((z - w).abs() < 2e-4, "b = {b}: √q_A = {z}, want {w}");
        }
    }
}

#[test]
fn discovery_significances() {
    // Z_A (s=5, b=1) = 3.3913, (s=50, b=100) = 4.6518 (REFERENCES.md §2, computed).
    assert!((discovery_significance(5.0, 1.0).unwrap() - 3.3913).abs() < 1e-4);
    assert!((discovery_significance(50.0, 100.0).unwrap() - 4.6518).abs() < 1e-4);
    // s = 50, b = 100, σ_b = 7: 3.72σ (REFERENCES.md §2, published example).
    let z = discovery_significance_with_unc(50.0, 100.0, 7.0).unwrap();
    assert!((z - 3.72).abs() < 0.005, "{z}");
    // σ_b → 0 recovers Z_A (invariant).
    let z0 = discovery_significance_with_unc(5.0, 1.0, 1e-6).unwrap();
    assert!((z0 - 3.3913).abs() < 1e-3);
    assert!(discovery_significance(1.0, 0.0).is_err());
    assert!(discovery_significance(f64::NAN, 1.0).is_err());
}

#[test]
fn expected_limit_b50_sigma7_gaussian() {
    // Gaussian-constrained profile likelihood, Asimov b-only, 95 % CLs:
    // computed with scipy 1.17.1 (minimize_scalar + brentq) as 10.6594,
    // 14.4049, 20.2023, 28.5344, 38.9840 events. (The published 19.7 events of
    // REFERENCES.md §2 belongs to the on/off, Poisson-constrained model;
    // scipy gives 19.709 for that model.)
    let want = [10.6594, 14.4049, 20.2023, 28.5344, 38.9840];
    let l = event_limit(50, 50.0, 7.0, &LimitOptions::default()).unwrap();
    for (got, w) in l.mu_up_expected.iter().zip(want) {
        assert!((got - w).abs() < 2e-3, "{got} vs {w}");
    }
    // n = b and nominal global observables: observed = median expected.
    assert!((l.mu_up_observed - want[2]).abs() < 2e-3);
    assert!(l.warnings.is_empty());
}

#[test]
fn expected_limit_b50_sigma7_on_off() {
    // Published: 19.7 events (REFERENCES.md §2, K. Cranmer's notes, on/off
    // model). Bands computed with scipy 1.17.1 for the on/off likelihood
    // (τ = b/σ_b², minimize_scalar + brentq): 10.5008, 14.1311, 19.7090,
    // 27.6677, 37.6025 events.
    let o = LimitOptions {
        constraint: BackgroundConstraint::Poisson,
        ..LimitOptions::default()
    };
    let l = event_limit(50, 50.0, 7.0, &o).unwrap();
    assert!((l.mu_up_expected[2] - 19.7).abs() < 0.05);
    let want = [10.5008, 14.1311, 19.7090, 27.6677, 37.6025];
    for (got, w) in l.mu_up_expected.iter().zip(want) {
        assert!((got - w).abs() < 2e-3, "{got} vs {w}");
    }
    // The on/off constraint takes independent regions only.
    let rs = [region(5, 5.0, 1.0, 1.0), region(5, 5.0, 1.0, 1.0)];
    let c = DMatrix::from_row_slice(2, 2, &[1.0, 0.0, 0.0, 1.0]);
    is_invalid(combined_limit(&rs, Some(&c), &o), "independent regions");
}

#[test]
fn toys_agree_with_exact_for_known_background() {
    let n_toys = 4000;
    // n = 3, b = 2: exact 5.98346 (scipy 1.17.1, see above).
    let want = 5.983455509;
    let l = event_limit(3, 2.0, 0.0, &opts(0.95, Method::Toys { n_toys, seed: 11 })).unwrap();
    // dCLs/ds at the limit by finite differences of the closed form
    // P(k ≤ 3 | s + 2)/P(k ≤ 3 | 2).
    let cdf = |n: u64, x: f64| (0..=n).map(|k| poisson_pmf(k, x)).sum::<f64>();
    let slope = (cdf(3, want + 2.01) - cdf(3, want + 1.99)) / 0.02 / cdf(3, 2.0);
    let tol = 4.0 * (0.05f64 * 0.95 * 2.0 / n_toys as f64).sqrt() / slope.abs();
    assert!(
        (l.mu_up_observed - want).abs() < tol,
        "toys {} vs exact {want} (tolerance {tol})",
        l.mu_up_observed
    );
}

#[test]
fn asymptotic_agrees_with_toys_at_large_counts() {
    // Large counts: the asymptotic formulae hold (CCGV 2011, §3); 5 %
    // tolerance covers the Monte Carlo error of 2000 toys (common practice).
    let r = region(110, 100.0, 10.0, 10.0);
    let a = region_limit(&r, &LimitOptions::default()).unwrap();
    let t = region_limit(
        &r,
        &opts(
            0.95,
            Method::Toys {
                n_toys: 2000,
                seed: 3,
            },
        ),
    )
    .unwrap();
    let rel = (a.mu_up_observed / t.mu_up_observed - 1.0).abs();
    assert!(
        rel < 0.05,
        "asymptotic {} vs toys {}",
        a.mu_up_observed,
        t.mu_up_observed
    );
    let rel_med = (a.mu_up_expected[2] / t.mu_up_expected[2] - 1.0).abs();
    assert!(
        rel_med < 0.05,
        "{:?} vs {:?}",
        a.mu_up_expected,
        t.mu_up_expected
    );
}

#[test]
fn toys_bit_identical_on_one_and_two_threads() {
    let r = RegionCounts {
        observed: 7,
        background: 5.0,
        background_unc: 1.5,
        signal: 4.0,
        signal_rel_unc: 0.1,
    };
    for constraint in [
        BackgroundConstraint::Gaussian,
        BackgroundConstraint::Poisson,
    ] {
        let o = LimitOptions {
            constraint,
            ..opts(
                0.95,
                Method::Toys {
                    n_toys: 300,
                    seed: 42,
                },
            )
        };
        let run = |threads| {
            rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap()
                .install(|| region_limit(&r, &o).unwrap())
        };
        let one = run(1);
        let two = run(2);
        assert_eq!(one.mu_up_observed.to_bits(), two.mu_up_observed.to_bits());
        assert_eq!(one.cls_mu1.to_bits(), two.cls_mu1.to_bits());
        for (a, b) in one.mu_up_expected.iter().zip(&two.mu_up_expected) {
            assert_eq!(a.to_bits(), b.to_bits());
        }
    }
}

#[test]
fn limit_grows_with_background_uncertainty_and_observed_count() {
    let o = LimitOptions::default();
    let mut last = 0.0;
    for db in [0.0, 1.0, 3.0, 6.0, 10.0] {
        let l = region_limit(&region(20, 20.0, db, 5.0), &o).unwrap();
        assert!(l.mu_up_observed > last, "σ_b = {db}");
        last = l.mu_up_observed;
    }
    let mut last = 0.0;
    for n in [5u64, 10, 20, 30, 40] {
        let l = region_limit(&region(n, 20.0, 3.0, 5.0), &o).unwrap();
        assert!(l.mu_up_observed > last, "n = {n}");
        last = l.mu_up_observed;
    }
    // Log-normal constraint: the same ordering in σ_b.
    let ln = LimitOptions {
        constraint: BackgroundConstraint::LogNormal,
        ..o
    };
    let a = region_limit(&region(20, 20.0, 1.0, 5.0), &ln).unwrap();
    let b = region_limit(&region(20, 20.0, 5.0, 5.0), &ln).unwrap();
    assert!(b.mu_up_observed > a.mu_up_observed);
    // Poisson (on/off) constraint: likewise.
    let onoff = LimitOptions {
        constraint: BackgroundConstraint::Poisson,
        ..o
    };
    let a = region_limit(&region(20, 20.0, 1.0, 5.0), &onoff).unwrap();
    let b = region_limit(&region(20, 20.0, 5.0, 5.0), &onoff).unwrap();
    assert!(b.mu_up_observed > a.mu_up_observed);
}

#[test]
fn limit_grows_with_signal_uncertainty() {
    // A less certain signal cannot give a stronger limit (common practice,
    // no source); the log-normal signal term keeps CLs → 0 at large μ.
    let o = LimitOptions::default();
    let mut last = 0.0;
    for f in [0.0, 0.1, 0.3, 0.6] {
        let r = RegionCounts {
            signal_rel_unc: f,
            ..region(12, 10.0, 2.0, 4.0)
        };
        let l = region_limit(&r, &o).unwrap();
        assert!(l.mu_up_observed > last, "f = {f}");
        last = l.mu_up_observed;
    }
    let r = RegionCounts {
        signal_rel_unc: 0.3,
        ..region(4, 1.0, 2.0, 3.0)
    };
    let model = CountingModel::new(&[r], None, BackgroundConstraint::Gaussian).unwrap();
    assert!(Asymptotic::new(&model).unwrap().cls(100.0).unwrap().cls < 1e-6);
}

#[test]
fn cls_decreases_in_mu() {
    let r = RegionCounts {
        observed: 12,
        background: 10.0,
        background_unc: 2.0,
        signal: 3.0,
        signal_rel_unc: 0.2,
    };
    let model = CountingModel::new(&[r], None, BackgroundConstraint::Gaussian).unwrap();
    let calc = Asymptotic::new(&model).unwrap();
    let mut last = 1.0 + 1e-12;
    for k in 1..40 {
        let cls = calc.cls(0.25 * k as f64).unwrap().cls;
        assert!(cls <= last, "μ = {}", 0.25 * k as f64);
        last = cls;
    }
    assert!(last < 0.05);
}

#[test]
fn combination_of_one_region_equals_region() {
    let r = region(8, 6.0, 2.0, 3.0);
    let o = LimitOptions::default();
    let a = region_limit(&r, &o).unwrap();
    let b = combined_limit(&[r], None, &o).unwrap();
    assert_eq!(a, b);
    // A 1×1 covariance σ_b² gives the same limit.
    let c = DMatrix::from_element(1, 1, 4.0);
    let d = combined_limit(&[r], Some(&c), &o).unwrap();
    assert!((d.mu_up_observed / a.mu_up_observed - 1.0).abs() < 1e-6);
}

#[test]
fn diagonal_covariance_equals_independent_regions() {
    let rs = [
        region(12, 10.0, 2.0, 3.0),
        region(3, 4.0, 1.0, 2.0),
        region(30, 25.0, 4.0, 1.0),
    ];
    let o = LimitOptions::default();
    let a = combined_limit(&rs, None, &o).unwrap();
    let c = DMatrix::from_diagonal(&nalgebra::DVector::from_vec(vec![4.0, 1.0, 16.0]));
    let b = combined_limit(&rs, Some(&c), &o).unwrap();
    assert!((a.mu_up_observed / b.mu_up_observed - 1.0).abs() < 1e-6);
    // Combining improves on the best single region's expected limit
    // (more information; common practice, no source).
    let (_, best) = best_expected_region(&rs, &o).unwrap();
    assert!(a.mu_up_expected[2] < best.mu_up_expected[2]);
}

#[test]
fn correlated_backgrounds_weaken_combination() {
    // Two identical regions: a fully correlated background uncertainty
    // cannot be averaged down, so the limit is weaker than for independent
    // uncertainties (common practice, no source). The rank-1 covariance is
    // positive semi-definite but singular.
    let rs = [region(20, 20.0, 4.0, 5.0), region(20, 20.0, 4.0, 5.0)];
    let o = LimitOptions::default();
    let indep = combined_limit(&rs, None, &o).unwrap();
    let c = DMatrix::from_row_slice(2, 2, &[16.0, 16.0, 16.0, 16.0]);
    let corr = combined_limit(&rs, Some(&c), &o).unwrap();
    assert!(corr.mu_up_expected[2] > indep.mu_up_expected[2]);
}

#[test]
fn profiled_background_matches_quadratic_root() {
    // Poisson × Gaussian, one region: the score equation at fixed μ gives
    // ν̂̂² + (σ² − μs − b) ν̂̂ − σ² n = 0 (derived from ∂lnL/∂θ = 0;
    // common practice, no source), ν̂̂ = μs + b + σθ̂̂.
    for (n, b, db, s, mu) in [
        (10u64, 8.0, 2.0, 3.0, 1.5),
        (0, 3.0, 1.0, 1.0, 0.5),
        (50, 60.0, 7.0, 5.0, 2.0),
    ] {
        let model =
            CountingModel::new(&[region(n, b, db, s)], None, BackgroundConstraint::Gaussian)
                .unwrap();
        let fit = model.fit_conditional(mu, &model.observed_data()).unwrap();
        let nu_fit = mu * s + b + db * fit.theta[0];
        let p = db * db - mu * s - b;
        let nu = 0.5 * (-p + (p * p + 4.0 * db * db * n as f64).sqrt());
        assert!(
            (nu_fit - nu).abs() < 1e-8 * nu.max(1.0),
            "n = {n}: {nu_fit} vs {nu}"
        );
    }
    // Two regions, each with its own background nuisance (damped Newton in
    // two parameters): the likelihood factorises, so each background still
    // solves its own quadratic.
    let rs = [region(10, 8.0, 2.0, 3.0), region(40, 35.0, 5.0, 2.0)];
    let model = CountingModel::new(&rs, None, BackgroundConstraint::Gaussian).unwrap();
    let fit = model.fit_conditional(1.2, &model.observed_data()).unwrap();
    for (i, r) in rs.iter().enumerate() {
        let nu_fit = 1.2 * r.signal + r.background + r.background_unc * fit.theta[i];
        let p = r.background_unc.powi(2) - 1.2 * r.signal - r.background;
        let nu = 0.5 * (-p + (p * p + 4.0 * r.background_unc.powi(2) * r.observed as f64).sqrt());
        assert!(
            (nu_fit - nu).abs() < 1e-7 * nu,
            "region {i}: {nu_fit} vs {nu}"
        );
    }
}

#[test]
fn profiling_with_truncation_and_log_normal_matches_scan() {
    // Independent check: the minimum of −ln L over a dense grid of θ
    // (independent computation in this test).
    let scan = |model: &CountingModel, mu: f64, data: &Data, lo: f64, hi: f64| {
        let mut best = f64::INFINITY;
        for k in 0..=200_000 {
            let t = lo + (hi - lo) * k as f64 / 200_000.0;
            best = best.min(model.nll(mu, &[t], data));
        }
        best
    };
    // n = 0 with σ_b² > b: the Gaussian is truncated at b(θ) = 0.
    let m = CountingModel::new(
        &[region(0, 1.0, 2.0, 1.0)],
        None,
        BackgroundConstraint::Gaussian,
    )
    .unwrap();
    let d = m.observed_data();
    let fit = m.fit_conditional(1.0, &d).unwrap();
    assert!((fit.theta[0] + 0.5).abs() < 1e-9, "{:?}", fit.theta);
    assert!((fit.nll - scan(&m, 1.0, &d, -0.5, 3.0)).abs() < 1e-8);
    let m = CountingModel::new(
        &[region(4, 9.0, 3.0, 2.0)],
        None,
        BackgroundConstraint::LogNormal,
    )
    .unwrap();
    let d = m.observed_data();
    let fit = m.fit_conditional(1.0, &d).unwrap();
    assert!((fit.nll - scan(&m, 1.0, &d, -6.0, 6.0)).abs() < 1e-8);
}

#[test]
fn zero_signal_has_no_sensitivity() {
    let l = region_limit(&region(3, 2.0, 1.0, 0.0), &LimitOptions::default()).unwrap();
    assert_eq!(l.mu_up_observed, f64::INFINITY);
    assert_eq!(l.cls_mu1, 1.0);
}

#[test]
fn zero_background_zero_uncertainty() {
    // b = 0, σ_b = 0, n = 0: exact gives ln 20 (REFERENCES.md §1); the
    // asymptotic value follows from q̃ = q_A = 2μs: CLs = 2(1 − Φ(√(2μs))),
    // so s_up = 1.959964²/2 = 1.920729 (closed form) with a warning.
    let e = event_limit(0, 0.0, 0.0, &opts(0.95, Method::Exact)).unwrap();
    assert!((e.mu_up_observed - 20f64.ln()).abs() < 1e-6);
    let a = event_limit(0, 0.0, 0.0, &LimitOptions::default()).unwrap();
    assert!(
        (a.mu_up_observed - 1.959_963_985f64.powi(2) / 2.0).abs() < 1e-5,
        "{}",
        a.mu_up_observed
    );
    assert!(!a.warnings.is_empty());
    // n > 0 with b = 0 is allowed too.
    let a = event_limit(2, 0.0, 0.0, &LimitOptions::default()).unwrap();
    assert!(a.mu_up_observed.is_finite() && a.mu_up_observed > 2.0);
}

#[test]
fn visible_cross_section_and_best_region() {
    // σ_vis = S95/L: ln 20 events over 139 fb⁻¹ = 0.021552 fb (arithmetic).
    let l = event_limit(0, 0.0, 0.0, &opts(0.95, Method::Exact)).unwrap();
    let x = visible_cross_section_fb(l.mu_up_observed, 139.0).unwrap();
    assert!((x - 20f64.ln() / 139.0).abs() < 1e-9);
    assert!(visible_cross_section_fb(1.0, 0.0).is_err());
    // Region 1 has the best s/√b, so the best expected limit.
    let rs = [
        region(100, 100.0, 5.0, 5.0),
        region(10, 10.0, 1.0, 5.0),
        region(1, 1.0, 0.5, 0.5),
    ];
    let (i, best) = best_expected_region(&rs, &LimitOptions::default()).unwrap();
    assert_eq!(i, 1);
    assert_eq!(
        best,
        region_limit(&rs[1], &LimitOptions::default()).unwrap()
    );
}

fn is_invalid(r: Result<recoil::stats::Limit, StatsError>, needle: &str) {
    match r {
        Err(StatsError::InvalidInput(m)) => assert!(m.contains(needle), "message: {m}"),
        other => panic!("expected InvalidInput containing {needle:?}, got {other:?}"),
    }
}

#[test]
fn bad_input_is_a_clear_error() {
    let o = LimitOptions::default();
    is_invalid(
        region_limit(&region(1, -1.0, 0.0, 1.0), &o),
        "background [events]",
    );
    is_invalid(
        region_limit(&region(1, f64::NAN, 0.0, 1.0), &o),
        "background [events]",
    );
    is_invalid(
        region_limit(&region(1, 1.0, f64::INFINITY, 1.0), &o),
        "uncertainty",
    );
    is_invalid(region_limit(&region(1, 1.0, -0.1, 1.0), &o), "uncertainty");
    is_invalid(region_limit(&region(1, 1.0, 0.0, -2.0), &o), "signal");
    is_invalid(
        region_limit(&region(1, 1.0, 0.0, 1.0), &opts(1.0, Method::Asymptotic)),
        "confidence level",
    );
    is_invalid(
        region_limit(&region(1, 1.0, 0.0, 1.0), &opts(0.0, Method::Asymptotic)),
        "confidence level",
    );
    is_invalid(
        region_limit(&region(1, 1.0, 0.5, 1.0), &opts(0.95, Method::Exact)),
        "exact method",
    );
    is_invalid(
        region_limit(
            &region(1, 1.0, 0.5, 1.0),
            &opts(0.95, Method::Toys { n_toys: 0, seed: 1 }),
        ),
        "toys",
    );
    is_invalid(combined_limit(&[], None, &o), "region");
    let rs = [region(5, 5.0, 1.0, 1.0), region(5, 5.0, 1.0, 1.0)];
    let not_psd = DMatrix::from_row_slice(2, 2, &[1.0, 2.0, 2.0, 1.0]);
    is_invalid(
        combined_limit(&rs, Some(&not_psd), &o),
        "positive semi-definite",
    );
    let wrong = DMatrix::from_element(3, 3, 1.0);
    is_invalid(combined_limit(&rs, Some(&wrong), &o), "2×2");
    let asym = DMatrix::from_row_slice(2, 2, &[1.0, 0.5, 0.2, 1.0]);
    is_invalid(combined_limit(&rs, Some(&asym), &o), "symmetric");
    let nan = DMatrix::from_row_slice(2, 2, &[1.0, f64::NAN, f64::NAN, 1.0]);
    is_invalid(combined_limit(&rs, Some(&nan), &o), "finite");
}
