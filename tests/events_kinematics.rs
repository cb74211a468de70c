//! Four-momentum tests: a table of reference values computed independently
//! with Python 3.11.7's `math` module (formulas: pT = hypot(px, py),
//! η = asinh(pz/pT), y = ½ ln((E+pz)/(E−pz)), φ = atan2(py, px),
//! m = √(E² − |p|²), Jackson's boost formula), and identities of special
//! relativity that must hold for any input.

use nalgebra::Vector3;
use recoil::kinematics::{
    ETA_BEAM_AXIS, P4, abs_eta_of, delta_phi, delta_phi_between, kallen, transverse_magnitude,
    two_body_momentum,
};

fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * b.abs().max(1.0)
}

/// (E, px, py, pz) → (pT, |p|, η, y, φ, m), computed with Python 3.11.7 math.
const TABLE: [([f64; 4], [f64; 6]); 4] = [
    (
        [100.0, 30.0, -40.0, 50.0],
        [
            50.0,
            70.71067811865476,
            0.881373587019543,
            0.5493061443340549,
            -0.9272952180016122,
            70.71067811865476,
        ],
    ),
    (
        [250.0, -120.5, 33.25, -200.0],
        [
            125.0032499577511,
            235.85125079168014,
            -1.2489612806027082,
            -1.0986122886681098,
            2.8723586802829835,
            82.9107200547673,
        ],
    ),
    (
        [13.0, 3.0, 4.0, 12.0],
        [
            5.0,
            13.0,
            1.6094379124341003,
            1.6094379124341003,
            0.9272952180016122,
            0.0,
        ],
    ),
    (
        [1000.0, 0.0, -700.0, 700.0],
        [
            700.0,
            989.9494936611666,
            0.881373587019543,
            0.8673005276940532,
            -std::f64::consts::FRAC_PI_2, // Python: -1.5707963267948966
            141.42135623730908,
        ],
    ),
];

#[test]
fn reference_table_python_math() {
    for (v, want) in TABLE {
        let p = P4::new(v[0], v[1], v[2], v[3]);
        let got = [p.pt(), p.p(), p.eta(), p.rapidity(), p.phi(), p.m()];
        let names = ["pT", "|p|", "eta", "y", "phi", "m"];
        for k in 0..6 {
            assert!(
                close(got[k], want[k], 1e-12),
                "{v:?} {}: {} vs {}",
                names[k],
                got[k],
                want[k]
            );
        }
    }
    // A fifth vector with E = 1.5 × 91.1876 GeV (Python 3.11.7 math).
    let p = P4::new(91.1876 * 1.5, 20.0, 10.0, -80.0);
    assert!(close(p.m(), 108.66991941636842, 1e-12));
    assert!(close(p.rapidity(), -0.6698403326085126, 1e-12));
    assert!(close(p.eta(), -1.9868524410071087, 1e-12));
}

// Δφ and ΔR between table rows 1–2 and 2–4 (Python 3.11.7 math, with Δφ
// wrapped into [0, π]).
#[test]
fn separations_python_math() {
    let r = |i: usize| {
        let v = TABLE[i].0;
        P4::new(v[0], v[1], v[2], v[3])
    };
    assert!(close(r(0).delta_phi(&r(1)), 2.4835314088949905, 1e-12));
    assert!(close(r(0).delta_r(&r(1)), 3.2720413975338167, 1e-12));
    assert!(close(r(1).delta_phi(&r(3)), 1.8400303001017058, 1e-12));
    assert!(close(r(1).delta_r(&r(3)), 2.8149668121488554, 1e-12));
    // Wrapping: 3 rad and −3 rad are 2π − 6 apart (by hand).
    assert!(close(
        delta_phi(3.0, -3.0),
        2.0 * std::f64::consts::PI - 6.0,
        1e-12
    ));
    assert!(delta_phi(0.3, 0.3) == 0.0);
}

// |η| by the closed form agrees with std's asinh(|pz|/pT) to a few units
// in the last place from |η| ≈ 1e-12 to ≈ 14, at several momentum scales;
// pT = 3, pz = 4 gives |p| = 5 and |η| = ln((5 + 4)/3) = ln 3 (by hand).
#[test]
fn abs_eta_of_agrees_with_asinh() {
    for pt in [1e-3, 1.0, 13_600.0] {
        for k in 0..=180 {
            let x = 10f64.powf(-12.0 + 0.1 * k as f64);
            for pz in [x * pt, -x * pt] {
                let want = (pz / pt).abs().asinh();
                let got = abs_eta_of(pt, pz);
                assert!(
                    (got - want).abs() <= 4.0 * f64::EPSILON * want,
                    "pt {pt}, pz {pz}: {got} vs {want}"
                );
            }
        }
    }
    assert!((abs_eta_of(3.0, 4.0) - 3f64.ln()).abs() <= f64::EPSILON);
    assert_eq!(abs_eta_of(2.0, 0.0), 0.0);
    assert_eq!(P4::new(5.0, 3.0, 0.0, -4.0).eta(), -abs_eta_of(3.0, 4.0));
}

// Δφ from two transverse vectors agrees with the difference of their
// azimuths on a grid of directions and lengths, is exactly π for opposite
// vectors and 0 for parallel ones (by hand), and treats a zero vector as
// pointing along +x, as P4::phi gives it φ = 0.
#[test]
fn delta_phi_between_vectors_agrees_with_azimuths() {
    for i in 0..72 {
        for j in 0..72 {
            let (pa, pb) = (-3.1 + 0.0861 * i as f64, -3.1 + 0.0861 * j as f64);
            let a = [12.5 * pa.cos(), 12.5 * pa.sin()];
            let b = [830.0 * pb.cos(), 830.0 * pb.sin()];
            let want = delta_phi(a[1].atan2(a[0]), b[1].atan2(b[0]));
            let got = delta_phi_between(a, b);
            assert!((got - want).abs() < 1e-13, "{pa} {pb}: {got} vs {want}");
            assert!((0.0..=std::f64::consts::PI).contains(&got));
        }
    }
    assert_eq!(
        delta_phi_between([3.0, 4.0], [-6.0, -8.0]),
        std::f64::consts::PI
    );
    assert_eq!(delta_phi_between([3.0, 4.0], [6.0, 8.0]), 0.0);
    assert_eq!(
        delta_phi_between([0.0, 0.0], [0.0, -2.0]),
        std::f64::consts::FRAC_PI_2
    );
    assert_eq!(
        delta_phi_between([-1.0, 0.0], [0.0, 0.0]),
        std::f64::consts::PI
    );
}

// Boost of (100, 30, −40, 50) by β = (0.1, −0.2, 0.3) (Jackson Eq. 11.19,
// evaluated with Python 3.11.7 math).
#[test]
fn boost_python_math() {
    let b = P4::new(100.0, 30.0, -40.0, 50.0).boost(Vector3::new(0.1, -0.2, 0.3));
    let want = [
        135.86929423633242,
        42.237935200982406,
        -64.47587040196481,
        86.71380560294722,
    ];
    for (g, w) in [b.e, b.px, b.py, b.pz].into_iter().zip(want) {
        assert!(close(g, w, 1e-12), "{g} vs {w}");
    }
}

fn samples() -> Vec<P4> {
    let mut out: Vec<P4> = TABLE
        .iter()
        .map(|(v, _)| P4::new(v[0], v[1], v[2], v[3]))
        .collect();
    out.push(P4::from_pt_eta_phi_m(37.5, 2.1, -2.9, 4.18));
    out.push(P4::from_pt_eta_phi_m(520.0, -0.4, 1.3, 172.5));
    out
}

fn betas() -> Vec<Vector3<f64>> {
    vec![
        Vector3::new(0.0, 0.0, 0.9),
        Vector3::new(0.5, -0.3, 0.2),
        Vector3::new(-0.01, 0.7, -0.6),
        Vector3::new(0.0, 0.0, -0.999),
    ]
}

// Identity: m² = p·p is Lorentz invariant, so m is unchanged by any boost.
#[test]
fn mass_invariant_under_boosts() {
    for p in samples() {
        for b in betas() {
            let q = p.boost(b);
            assert!(
                (q.m2() - p.m2()).abs() <= 1e-9 * p.e.powi(2) / (1.0 - b.norm_squared()),
                "{p:?} {b:?}"
            );
        }
    }
}

// Identity: a boost along z leaves pT unchanged and shifts every rapidity
// by the same amount atanh(β), so Δy between two particles is unchanged.
#[test]
fn pt_and_delta_y_invariant_under_longitudinal_boosts() {
    let s = samples();
    for bz in [0.3, -0.8, 0.95] {
        let b = Vector3::new(0.0, 0.0, bz);
        for w in s.windows(2) {
            let (a, c) = (w[0], w[1]);
            if a.m2() <= 0.0 || c.m2() <= 0.0 {
                continue;
            }
            let (a2, c2) = (a.boost(b), c.boost(b));
            assert!(close(a2.pt(), a.pt(), 1e-12));
            let dy = a.rapidity() - c.rapidity();
            assert!(close(a2.rapidity() - c2.rapidity(), dy, 1e-9), "{dy}");
            assert!(close(a2.rapidity() - a.rapidity(), bz.atanh(), 1e-9));
        }
    }
}

// Identity: boosting a time-like P4 to its own rest frame gives (m, 0, 0, 0).
#[test]
fn own_rest_frame_is_at_rest() {
    for p in samples().into_iter().filter(|p| p.m2() > 1.0) {
        let r = p.to_rest_frame_of(&p);
        assert!(close(r.e, p.m(), 1e-9), "{r:?}");
        for x in [r.px, r.py, r.pz] {
            assert!(x.abs() <= 1e-9 * p.e, "{r:?}");
        }
    }
}

// Two-body decay momentum p* = √λ(M², m₁², m₂²)/(2M) (PDG Kinematics review,
// Eq. 49.17), values from Python 3.11.7 math; and the identity that the two
// daughters built back to back with p* sum to a state of mass M.
#[test]
fn two_body_momentum_kallen() {
    for (m, m1, m2, want) in [
        (1000.0, 172.5, 172.5, 469.3013424229681),
        (91.1876, 0.0, 0.0, 45.5938),
        (125.0, 80.4, 10.0, 35.668060223252965),
    ] {
        let p = two_body_momentum(m, m1, m2);
        assert!(close(p, want, 1e-12), "{p} vs {want}");
        let d = Vector3::new(0.3, -0.4, 0.866_025_403_784_438_6).normalize() * p;
        let sum = P4::from_p3_m(d, m1) + P4::from_p3_m(-d, m2);
        assert!(close(sum.m(), m, 1e-12));
    }
    assert_eq!(two_body_momentum(100.0, 60.0, 50.0), 0.0); // below threshold
    assert_eq!(kallen(1.0, 0.0, 0.0), 1.0);
}

// Identity: for a massless particle η = y.
#[test]
fn eta_equals_rapidity_when_massless() {
    for (pt, eta, phi) in [(10.0, 0.0, 0.1), (55.0, 1.7, -2.0), (300.0, -3.9, 3.1)] {
        let p = P4::from_pt_eta_phi_m(pt, eta, phi, 0.0);
        assert!(close(p.rapidity(), p.eta(), 1e-9));
        assert!(close(p.eta(), eta, 1e-12));
    }
}

// Defined behaviour along the beam axis and φ range (documented in
// kinematics.rs; common practice, no source).
#[test]
fn beam_axis_and_phi_range() {
    assert_eq!(P4::new(5.0, 0.0, 0.0, 5.0).eta(), ETA_BEAM_AXIS);
    assert_eq!(P4::new(5.0, 0.0, 0.0, -5.0).eta(), -ETA_BEAM_AXIS);
    assert_eq!(P4::new(5.0, 0.0, 0.0, 0.0).eta(), 0.0);
    assert_eq!(P4::new(1.0, -1.0, -0.0, 0.0).phi(), std::f64::consts::PI);
    assert!(P4::new(1.0, 0.0, 0.0, 0.0).m() == 1.0);
    // Space-like rounding keeps its sign: m = −√(−m²).
    assert!(close(
        P4::new(3.0, 0.0, 4.0, 0.0).m(),
        -(7.0f64).sqrt(),
        1e-12
    ));
}

// Sums: the sum of momenta is component-wise (definition).
#[test]
fn sums() {
    let s: P4 = samples().iter().sum();
    let e: f64 = samples().iter().map(|p| p.e).sum();
    assert_eq!(s.e, e);
    let mut a = P4::new(1.0, 2.0, 3.0, 4.0);
    a += P4::new(1.0, 1.0, 1.0, 1.0);
    a -= P4::new(0.5, 0.5, 0.5, 0.5);
    assert_eq!(a, P4::new(1.5, 2.5, 3.5, 4.5));
    assert_eq!(-a, P4::new(-1.5, -2.5, -3.5, -4.5));
}

// The plain-square-root magnitude of a transverse vector: exact on the
// 3-4-5 triangle (hand arithmetic), and within a few ulp of std's `hypot`
// (the reference) from 1 keV to 100 TeV scales, both signs, either
// component zero.
#[test]
fn transverse_magnitude_agrees_with_hypot() {
    assert_eq!(transverse_magnitude([3.0, -4.0]), 5.0);
    assert_eq!(transverse_magnitude([0.0, 0.0]), 0.0);
    for e in -6..=5 {
        let scale = 10f64.powi(e);
        for (x, y) in [
            (1.0, 0.0),
            (0.0, -1.0),
            (0.3, 0.7),
            (-1.9, 0.05),
            (2.5, -2.5),
        ] {
            let (x, y) = (x * scale, y * scale);
            let want = x.hypot(y);
            let got = transverse_magnitude([x, y]);
            assert!(
                (got - want).abs() <= 4.0 * f64::EPSILON * want,
                "{x} {y}: {got} vs {want}"
            );
            assert_eq!(P4::new(10.0 * scale, x, y, 0.0).pt(), got);
        }
    }
}
