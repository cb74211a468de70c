//! Integration tests of the detector response: shipped profiles, resolution
//! and efficiency reproduced statistically, truth-profile exactness,
//! momentum bookkeeping, determinism across threads and chunkings, and one
//! test per profile rule.

use rayon::prelude::*;
use recoil::detector::{Detector, DetectorProfile, Reco, Variation};
use recoil::events::{Event, InvisibleSet, truth_met_xy};
use recoil::kinematics::P4;

mod detector_support;
use detector_support::{TestStream, event, signal_like};

const GENERIC: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/recasts/detectors/generic-13tev.toml"
);
const TRUTH: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/recasts/detectors/truth.toml");

/// A single object of energy `e_gev` at pseudorapidity `eta` (massless).
fn at_energy(e_gev: f64, eta: f64, phi: f64) -> P4 {
    P4::from_pt_eta_phi_m(e_gev / eta.cosh(), eta, phi, 0.0)
}

fn load(text: &str) -> DetectorProfile {
    DetectorProfile::from_toml_str(text, "test.toml").expect("valid test profile")
}

fn generic() -> DetectorProfile {
    DetectorProfile::from_toml_file(std::path::Path::new(GENERIC)).expect("generic profile loads")
}

fn mean_std(xs: &[f64]) -> (f64, f64) {
    let n = xs.len() as f64;
    let mean = xs.iter().sum::<f64>() / n;
    let var = xs.iter().map(|x| (x - mean) * (x - mean)).sum::<f64>() / (n - 1.0);
    (mean, var.sqrt())
}

// ---------------------------------------------------------------------------
// Shipped profiles
// ---------------------------------------------------------------------------

#[test]
fn shipped_profiles_load() {
    let g = generic();
    assert_eq!(g.name, "generic-13tev");
    let t = DetectorProfile::from_toml_file(std::path::Path::new(TRUTH)).unwrap();
    assert_eq!(t, DetectorProfile::truth());
    assert_eq!(DetectorProfile::default(), DetectorProfile::truth());
}

#[test]
fn missing_file_names_the_file() {
    let e =
        DetectorProfile::from_toml_file(std::path::Path::new("/nonexistent/det.toml")).unwrap_err();
    assert!(e.to_string().contains("/nonexistent/det.toml"), "{e}");
}

// ---------------------------------------------------------------------------
// Resolutions, reproduced statistically
// ---------------------------------------------------------------------------

/// A profile with perfect acceptance and efficiency and three calorimeter
/// regions of distinct resolution for jets and electrons, and two tracker
/// regions for muons.
const RESOLUTION_PROFILE: &str = r#"
name = "resolution-test"
[jets]
min_pt_gev = 0.0
abs_eta_ranges = [[0.0, 5.0]]
efficiency = 1.0
[[jets.resolution]]
min_abs_eta = 0.0
max_abs_eta = 1.5
stochastic_sqrt_gev = 0.5
noise_gev = 2.0
constant = 0.03
[[jets.resolution]]
min_abs_eta = 1.5
max_abs_eta = 3.2
stochastic_sqrt_gev = 0.8
noise_gev = 4.0
constant = 0.05
[[jets.resolution]]
min_abs_eta = 3.2
max_abs_eta = 5.0
stochastic_sqrt_gev = 1.0
noise_gev = 0.0
constant = 0.1
[jet_merging]
radius = 0.4
[btag]
max_abs_eta = 2.5
efficiency_b = 0.7
mistag_c = 0.2
mistag_light = 0.01
[electrons]
min_pt_gev = 0.0
abs_eta_ranges = [[0.0, 2.5]]
efficiency = 1.0
[[electrons.resolution]]
min_abs_eta = 0.0
max_abs_eta = 1.5
stochastic_sqrt_gev = 0.1
noise_gev = 0.3
constant = 0.007
[[electrons.resolution]]
min_abs_eta = 1.5
max_abs_eta = 2.5
stochastic_sqrt_gev = 0.2
noise_gev = 0.5
constant = 0.01
[muons]
min_pt_gev = 0.0
abs_eta_ranges = [[0.0, 2.5]]
efficiency = 0.9
[[muons.resolution]]
min_abs_eta = 0.0
max_abs_eta = 1.05
a = 0.01
b_per_gev = 1.0e-4
[[muons.resolution]]
min_abs_eta = 1.05
max_abs_eta = 2.5
a = 0.02
b_per_gev = 3.0e-4
[taus]
min_pt_gev = 0.0
abs_eta_ranges = [[0.0, 2.5]]
efficiency = 1.0
[[taus.resolution]]
min_abs_eta = 0.0
max_abs_eta = 2.5
stochastic_sqrt_gev = 0.0
noise_gev = 0.0
constant = 0.0
[photons]
min_pt_gev = 0.0
abs_eta_ranges = [[0.0, 2.5]]
[photons.efficiency_table]
pt_edges_gev = [0.0, 50.0, 1000.0]
abs_eta_edges = [0.0, 1.5, 2.5]
values = [[0.6, 0.5], [0.9, 0.8]]
[[photons.resolution]]
min_abs_eta = 0.0
max_abs_eta = 2.5
stochastic_sqrt_gev = 0.0
noise_gev = 0.0
constant = 0.0
[met]
max_abs_eta = 4.9
soft_a_gev = 0.0
soft_b_sqrt_gev = 0.0
"#;

const N_OBJECTS: u64 = 100_000;

/// Reconstructs `N_OBJECTS` copies of a one-particle event and returns the
/// ratio reco/true of `measure` for every object seen.
fn ratios(
    det: &Detector,
    id: i32,
    p4: P4,
    measure: fn(&Reco) -> Option<f64>,
    truth: f64,
) -> Vec<f64> {
    let ev = event(&[(id, p4)]);
    let mut out = Reco::default();
    (0..N_OBJECTS)
        .filter_map(|i| {
            det.reconstruct(&ev, 0, i, &mut out);
            measure(&out).map(|x| x / truth)
        })
        .collect()
}

fn check_std(label: &str, xs: &[f64], expected: f64) {
    let (mean, std) = mean_std(xs);
    assert!(xs.len() as u64 == N_OBJECTS, "{label}: lost objects");
    assert!(
        (std / expected - 1.0).abs() < 0.02,
        "{label}: std {std}, expected {expected}"
    );
    // The smearing is unbiased: mean within 4 standard errors of 1.
    assert!(
        (mean - 1.0).abs() < 4.0 * expected / (N_OBJECTS as f64).sqrt(),
        "{label}: mean {mean}"
    );
}

#[test]
fn calorimeter_resolution_per_region() {
    let det = Detector::new(load(RESOLUTION_PROFILE), InvisibleSet::standard(), 11);
    // Expected σ_E/E = √(S²/E + N²/E² + C²), hand arithmetic:
    let cases = [
        // jets, E = 100 GeV, barrel: √(0.25/100 + 4/10⁴ + 9e-4) = √0.0038
        (21, 100.0, 0.7, 0.0038_f64.sqrt()),
        // jets, E = 200 GeV, end-cap: √(0.64/200 + 16/4e4 + 25e-4) = √0.0061
        (21, 200.0, 2.0, 0.0061_f64.sqrt()),
        // jets, E = 1000 GeV, forward: √(1/1000 + 0 + 0.01) = √0.011
        (21, 1000.0, 4.0, 0.011_f64.sqrt()),
        // electrons, E = 50 GeV, barrel: √(0.01/50 + 0.09/2500 + 4.9e-5) = √2.85e-4
        (11, 50.0, 0.5, 2.85e-4_f64.sqrt()),
        // electrons, E = 100 GeV, end-cap: √(0.04/100 + 0.25/1e4 + 1e-4) = √5.25e-4
        (11, 100.0, -2.0, 5.25e-4_f64.sqrt()),
    ];
    for (id, e, eta, expected) in cases {
        let measure: fn(&Reco) -> Option<f64> = if id == 21 {
            |r| r.jets.first().map(|j| j.p4.e)
        } else {
            |r| r.electrons.first().map(|o| o.p4.e)
        };
        let xs = ratios(&det, id, at_energy(e, eta, 0.3), measure, e);
        check_std(&format!("id {id}, E {e}, eta {eta}"), &xs, expected);
    }
}

#[test]
fn tracker_resolution_per_region() {
    let mut profile = load(RESOLUTION_PROFILE);
    profile.muons.efficiency = Some(1.0);
    let det = Detector::new(profile, InvisibleSet::standard(), 12);
    // Expected σ_pT/pT = √(a² + (b·pT)²), hand arithmetic:
    let cases = [
        // barrel, pT = 100 GeV: √(1e-4 + 1e-4)
        (100.0, 0.5, 2.0e-4_f64.sqrt()),
        // end-cap, pT = 500 GeV: √(4e-4 + 0.0225)
        (500.0, 1.8, 0.0229_f64.sqrt()),
    ];
    for (pt, eta, expected) in cases {
        let p4 = P4::from_pt_eta_phi_m(pt, eta, 1.0, 0.105_658);
        let xs = ratios(&det, 13, p4, |r| r.muons.first().map(|m| m.p4.pt()), pt);
        check_std(&format!("muon pT {pt}, eta {eta}"), &xs, expected);
    }
}

#[test]
fn resolution_variation_scales_the_width() {
    let varied = load(RESOLUTION_PROFILE).varied(&Variation::new(0.2, 0.0).unwrap());
    let det = Detector::new(varied, InvisibleSet::standard(), 13);
    let xs = ratios(
        &det,
        21,
        at_energy(100.0, 0.7, 0.3),
        |r| r.jets.first().map(|j| j.p4.e),
        100.0,
    );
    // 1.2 × √0.0038 (the barrel jet case above, 20 % worse).
    check_std("varied jets", &xs, 1.2 * 0.0038_f64.sqrt());
}

// ---------------------------------------------------------------------------
// Efficiencies, reproduced within binomial uncertainty
// ---------------------------------------------------------------------------

/// Asserts that `k` passes out of `n` agree with probability `p` within 4
/// binomial standard deviations √(n p (1 − p)).
fn check_binomial(label: &str, k: usize, n: u64, p: f64) {
    let n = n as f64;
    let sd = (n * p * (1.0 - p)).sqrt();
    assert!(
        (k as f64 - n * p).abs() < 4.0 * sd.max(0.5),
        "{label}: {k} of {n}, expected p = {p}"
    );
}

fn count(det: &Detector, ev: &Event, pred: fn(&Reco) -> bool) -> usize {
    let mut out = Reco::default();
    (0..N_OBJECTS)
        .filter(|&i| {
            det.reconstruct(ev, 1, i, &mut out);
            pred(&out)
        })
        .count()
}

#[test]
fn constant_and_tabulated_efficiencies() {
    let det = Detector::new(load(RESOLUTION_PROFILE), InvisibleSet::standard(), 21);
    let mu = event(&[(13, P4::from_pt_eta_phi_m(40.0, 0.3, 0.0, 0.105_658))]);
    check_binomial(
        "muon 0.9",
        count(&det, &mu, |r| r.muons.len() == 1),
        N_OBJECTS,
        0.9,
    );
    // Photon table of the test profile: (pT < 50, barrel) 0.6, (≥ 50, end-cap) 0.8.
    let low = event(&[(22, P4::from_pt_eta_phi_m(20.0, 0.5, 0.0, 0.0))]);
    check_binomial(
        "photon table low",
        count(&det, &low, |r| r.photons.len() == 1),
        N_OBJECTS,
        0.6,
    );
    let high = event(&[(22, P4::from_pt_eta_phi_m(80.0, 2.0, 0.0, 0.0))]);
    check_binomial(
        "photon table high",
        count(&det, &high, |r| r.photons.len() == 1),
        N_OBJECTS,
        0.8,
    );

    let down = load(RESOLUTION_PROFILE).varied(&Variation::new(0.0, -0.1).unwrap());
    let det = Detector::new(down, InvisibleSet::standard(), 22);
    check_binomial(
        "muon 0.9 - 0.1",
        count(&det, &mu, |r| r.muons.len() == 1),
        N_OBJECTS,
        0.8,
    );
}

#[test]
fn btag_rates_by_parton_flavour() {
    let det = Detector::new(load(RESOLUTION_PROFILE), InvisibleSet::standard(), 31);
    let tagged: fn(&Reco) -> bool = |r| r.jets.first().is_some_and(|j| j.b_tagged);
    let jet = |id| event(&[(id, at_energy(150.0, 0.8, 1.0))]);
    // Test profile: b 0.7, c 0.2, light 0.01.
    check_binomial("b", count(&det, &jet(5), tagged), N_OBJECTS, 0.7);
    check_binomial("c", count(&det, &jet(-4), tagged), N_OBJECTS, 0.2);
    check_binomial("gluon", count(&det, &jet(21), tagged), N_OBJECTS, 0.01);
    check_binomial("u", count(&det, &jet(2), tagged), N_OBJECTS, 0.01);
    // Beyond the tagging acceptance |η| < 2.5 nothing is tagged.
    let forward = event(&[(5, at_energy(500.0, 3.0, 1.0))]);
    assert_eq!(count(&det, &forward, tagged), 0);
}

// ---------------------------------------------------------------------------
// Truth profile, bookkeeping, acceptance
// ---------------------------------------------------------------------------

#[test]
fn truth_profile_is_exact() {
    let det = Detector::new(DetectorProfile::truth(), InvisibleSet::standard(), 1);
    let mut s = TestStream(7);
    let mut out = Reco::default();
    for i in 0..2000 {
        let ev = signal_like(&mut s);
        det.reconstruct(&ev, 0, i, &mut out);
        let truth = truth_met_xy(&ev, &InvisibleSet::standard());
        let scale = out.sum_et_gev.max(1.0);
        assert!(
            (out.met_xy_gev[0] - truth[0]).abs() < 1e-12 * scale,
            "event {i}"
        );
        assert!(
            (out.met_xy_gev[1] - truth[1]).abs() < 1e-12 * scale,
            "event {i}"
        );
        // Jets equal partons (as a multiset; jets are pT-ordered).
        let mut partons: Vec<P4> = ev
            .particles
            .iter()
            .filter(|p| p.status == 1 && (p.id.abs() <= 5 || p.id == 21))
            .map(|p| p.p4)
            .collect();
        partons.sort_by(|a, b| b.pt().total_cmp(&a.pt()));
        let jets: Vec<P4> = out.jets.iter().map(|j| j.p4).collect();
        assert_eq!(jets, partons, "event {i}");
        let n_b = ev
            .particles
            .iter()
            .filter(|p| p.status == 1 && p.id.abs() == 5)
            .count();
        assert_eq!(out.jets.iter().filter(|j| j.b_tagged).count(), n_b);
        assert_eq!(out.weight, ev.weight);
        assert_eq!(out.weights, ev.weights);
    }
}

#[test]
fn lepton_charges_and_ordering() {
    let det = Detector::new(DetectorProfile::truth(), InvisibleSet::standard(), 1);
    let ev = event(&[
        (11, P4::from_pt_eta_phi_m(20.0, 0.1, 0.0, 0.0)),
        (-11, P4::from_pt_eta_phi_m(60.0, 0.1, 2.0, 0.0)),
        (13, P4::from_pt_eta_phi_m(30.0, 0.1, 1.0, 0.0)),
        (22, P4::from_pt_eta_phi_m(40.0, 0.1, -1.0, 0.0)),
        (-15, P4::from_pt_eta_phi_m(50.0, 0.1, -2.0, 1.777)),
    ]);
    let mut out = Reco::default();
    det.reconstruct(&ev, 0, 0, &mut out);
    // PDG numbering: 11 is e−, −11 is e+ (PDG review; common practice).
    let charges: Vec<i8> = out.electrons.iter().map(|e| e.charge).collect();
    assert_eq!(charges, vec![1, -1]); // e+ (60 GeV) first, pT-ordered
    assert_eq!(out.muons[0].charge, -1);
    assert_eq!(out.taus[0].charge, 1);
    assert_eq!(out.photons[0].charge, 0);
}

#[test]
fn momentum_bookkeeping_up_to_the_soft_term() {
    let nominal = generic();
    let mut no_soft = nominal.clone();
    no_soft.met.soft_a_gev = 0.0;
    no_soft.met.soft_b_sqrt_gev = 0.0;
    let (a, b) = (nominal.met.soft_a_gev, nominal.met.soft_b_sqrt_gev);
    let exact = Detector::new(no_soft, InvisibleSet::standard(), 5);
    let soft = Detector::new(nominal, InvisibleSet::standard(), 5);
    let mut s = TestStream(99);
    let mut out = Reco::default();
    let mut pulls = Vec::new();
    for i in 0..20_000 {
        let ev = signal_like(&mut s);
        for (det, with_soft) in [(&exact, false), (&soft, true)] {
            det.reconstruct(&ev, 0, i, &mut out);
            let mut sum = [out.met_xy_gev[0], out.met_xy_gev[1]];
            let mut sum_et = 0.0;
            let objects = out.jets.iter().map(|j| j.p4).chain(
                out.electrons
                    .iter()
                    .chain(&out.muons)
                    .chain(&out.taus)
                    .chain(&out.photons)
                    .map(|o| o.p4),
            );
            for p4 in objects.filter(|p| p.abs_eta() < 4.9) {
                sum[0] += p4.px;
                sum[1] += p4.py;
                sum_et += p4.et();
            }
            assert!((sum_et - out.sum_et_gev).abs() < 1e-9 * sum_et.max(1.0));
            if with_soft {
                // Soft term σ = A ⊕ B √ΣE_T per component (the issue's definition).
                let sigma = (a * a + b * b * sum_et).sqrt();
                pulls.push(sum[0] / sigma);
                pulls.push(sum[1] / sigma);
            } else {
                assert!(
                    sum[0].abs() < 1e-9 && sum[1].abs() < 1e-9,
                    "event {i}: {sum:?}"
                );
            }
        }
    }
    // Pulls are standard normal: std 1 within 2 % (stat. error ≈ 0.35 %).
    let (mean, std) = mean_std(&pulls);
    assert!(mean.abs() < 0.02, "mean {mean}");
    assert!((std - 1.0).abs() < 0.02, "std {std}");
}

#[test]
fn acceptance_cuts_apply_to_reconstructed_values() {
    let det = Detector::new(generic(), InvisibleSet::standard(), 3);
    let mut out = Reco::default();
    // Electron in the barrel/end-cap crack 1.37 ≤ |η| < 1.52, muon beyond
    // |η| = 2.5, jet beyond |η| = 4.9 (no resolution region): none is seen,
    // and all count as missing momentum.
    let e_crack = P4::from_pt_eta_phi_m(50.0, 1.45, 0.0, 0.0);
    let mu_fwd = P4::from_pt_eta_phi_m(50.0, 2.8, 1.0, 0.0);
    let jet_fwd = P4::from_pt_eta_phi_m(50.0, 5.2, 2.0, 0.0);
    let ev = event(&[(11, e_crack), (13, mu_fwd), (21, jet_fwd)]);
    det.reconstruct(&ev, 0, 0, &mut out);
    assert!(out.electrons.is_empty() && out.muons.is_empty() && out.jets.is_empty());
    assert_eq!(out.sum_et_gev, 0.0);
    // Only the soft term A = 10 GeV remains: |p_T^miss| is a few × 10 GeV.
    assert!(out.met_gev < 60.0);
    // A 10 GeV jet is below the 20 GeV threshold.
    let ev = event(&[(21, P4::from_pt_eta_phi_m(10.0, 0.0, 0.0, 0.0))]);
    let mut n = 0;
    for i in 0..1000 {
        det.reconstruct(&ev, 0, i, &mut out);
        n += out.jets.len();
    }
    assert!(n < 10, "{n} jets of 10 GeV passed a 20 GeV threshold");
}

#[test]
fn other_particles_and_custom_invisibles() {
    let det = Detector::new(DetectorProfile::truth(), InvisibleSet::extended([55]), 0);
    let z = P4::from_pt_eta_phi_m(100.0, 0.0, 0.0, 91.19);
    let ev = event(&[(55, z), (23, -z)]);
    let mut out = Reco::default();
    det.reconstruct(&ev, 0, 0, &mut out);
    // 55 declared invisible, 23 (class Other) not reconstructed: both missing,
    // so p_T^miss = 0 up to rounding.
    assert!(out.met_gev < 1e-9);
    assert!(out.jets.is_empty() && out.photons.is_empty());
}

// ---------------------------------------------------------------------------
// Determinism
// ---------------------------------------------------------------------------

fn reconstruct_all(det: &Detector, files: &[Vec<Event>], chunk: usize) -> Vec<Reco> {
    files
        .iter()
        .enumerate()
        .flat_map(|(f, events)| {
            let indexed: Vec<(usize, u64, &Event)> = events
                .iter()
                .enumerate()
                .map(|(i, e)| (f, i as u64, e))
                .collect();
            indexed
                .par_chunks(chunk)
                .flat_map_iter(|c| {
                    let mut out = Reco::default();
                    c.iter()
                        .map(|&(f, i, e)| {
                            det.reconstruct(e, f, i, &mut out);
                            out.clone()
                        })
                        .collect::<Vec<_>>()
                })
                .collect::<Vec<_>>()
        })
        .collect()
}

#[test]
fn identical_on_one_and_two_threads_and_any_chunking() {
    let det = Detector::new(generic(), InvisibleSet::standard(), 2026);
    let mut s = TestStream(1);
    let files: Vec<Vec<Event>> = (0..2)
        .map(|_| (0..1500).map(|_| signal_like(&mut s)).collect())
        .collect();
    let run = |threads: usize, chunk: usize| {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap();
        pool.install(|| reconstruct_all(&det, &files, chunk))
    };
    let reference = run(1, 1500);
    assert_eq!(reference.len(), 3000);
    for (threads, chunk) in [(1, 1), (2, 1), (2, 7), (2, 64), (1, 333)] {
        let other = run(threads, chunk);
        // Bitwise comparison of every float, so −0.0 vs 0.0 or a NaN would count.
        let bits = |r: &[Reco]| -> Vec<u64> {
            r.iter()
                .flat_map(|x| {
                    let mut v = vec![
                        x.met_xy_gev[0].to_bits(),
                        x.met_xy_gev[1].to_bits(),
                        x.sum_et_gev.to_bits(),
                    ];
                    v.extend(x.jets.iter().flat_map(|j| {
                        [j.p4.e.to_bits(), j.p4.px.to_bits(), u64::from(j.b_tagged)]
                    }));
                    v.extend(
                        x.electrons
                            .iter()
                            .chain(&x.muons)
                            .map(|o| o.p4.pz.to_bits()),
                    );
                    v
                })
                .collect()
        };
        assert_eq!(
            bits(&reference),
            bits(&other),
            "threads {threads}, chunk {chunk}"
        );
        assert_eq!(reference, other);
    }
    // A different seed, file index or event index changes the smearing.
    let mut a = Reco::default();
    let mut b = Reco::default();
    let ev = &files[0][0];
    det.reconstruct(ev, 0, 0, &mut a);
    Detector::new(generic(), InvisibleSet::standard(), 2027).reconstruct(ev, 0, 0, &mut b);
    assert_ne!(a.met_xy_gev, b.met_xy_gev);
    det.reconstruct(ev, 1, 0, &mut b);
    assert_ne!(a.met_xy_gev, b.met_xy_gev);
    det.reconstruct(ev, 0, 1, &mut b);
    assert_ne!(a.met_xy_gev, b.met_xy_gev);
}

// ---------------------------------------------------------------------------
// Bad profiles: one test per rule
// ---------------------------------------------------------------------------

/// Replaces `from` (which must occur) in the resolution test profile and
/// returns the error message.
fn error_for(from: &str, to: &str) -> String {
    assert!(
        RESOLUTION_PROFILE.contains(from),
        "test bug: {from:?} not in profile"
    );
    let text = RESOLUTION_PROFILE.replacen(from, to, 1);
    match DetectorProfile::from_toml_str(&text, "bad.toml") {
        Ok(_) => panic!("profile with {to:?} accepted"),
        Err(e) => e.to_string(),
    }
}

fn assert_mentions(msg: &str, parts: &[&str]) {
    assert!(msg.starts_with("detector profile bad.toml"), "{msg}");
    for p in parts {
        assert!(msg.contains(p), "{msg:?} lacks {p:?}");
    }
}

#[test]
fn rejects_negative_resolution() {
    let m = error_for("stochastic_sqrt_gev = 0.8", "stochastic_sqrt_gev = -0.8");
    assert_mentions(
        &m,
        &["jets.resolution[1].stochastic_sqrt_gev", ">= 0", "-0.8"],
    );
    let m = error_for("b_per_gev = 3.0e-4", "b_per_gev = -3.0e-4");
    assert_mentions(&m, &["muons.resolution[1].b_per_gev", ">= 0"]);
}

#[test]
fn rejects_efficiency_outside_unit_interval() {
    let m = error_for("efficiency = 0.9", "efficiency = 1.2");
    assert_mentions(&m, &["muons.efficiency", "[0, 1]", "1.2"]);
    let m = error_for(
        "values = [[0.6, 0.5], [0.9, 0.8]]",
        "values = [[0.6, 0.5], [0.9, -0.1]]",
    );
    assert_mentions(&m, &["photons.efficiency_table.values[1][1]", "[0, 1]"]);
    let m = error_for("mistag_c = 0.2", "mistag_c = 2.0");
    assert_mentions(&m, &["btag.mistag_c", "[0, 1]"]);
}

#[test]
fn rejects_overlapping_eta_regions() {
    let m = error_for(
        "min_abs_eta = 1.5\nmax_abs_eta = 3.2",
        "min_abs_eta = 1.2\nmax_abs_eta = 3.2",
    );
    assert_mentions(&m, &["jets.resolution[1]", "overlap", "1.2", "1.5"]);
    let m = DetectorProfile::from_toml_str(
        &RESOLUTION_PROFILE.replacen(
            "abs_eta_ranges = [[0.0, 2.5]]",
            "abs_eta_ranges = [[0.0, 1.5], [1.4, 2.5]]",
            1,
        ),
        "bad.toml",
    )
    .unwrap_err()
    .to_string();
    assert_mentions(&m, &["electrons.abs_eta_ranges[1]", "overlap"]);
}

#[test]
fn rejects_gap_between_resolution_regions() {
    let m = error_for(
        "min_abs_eta = 3.2\nmax_abs_eta = 5.0",
        "min_abs_eta = 3.5\nmax_abs_eta = 5.0",
    );
    assert_mentions(&m, &["jets.resolution[2]", "gap", "3.5", "3.2"]);
    let m = error_for(
        "[[jets.resolution]]\nmin_abs_eta = 0.0",
        "[[jets.resolution]]\nmin_abs_eta = 0.1",
    );
    assert_mentions(&m, &["jets.resolution[0]", "start at 0"]);
}

#[test]
fn rejects_resolution_not_covering_acceptance() {
    let m = error_for(
        "abs_eta_ranges = [[0.0, 5.0]]",
        "abs_eta_ranges = [[0.0, 5.5]]",
    );
    assert_mentions(&m, &["jets.resolution", "cover", "5.5"]);
}

#[test]
fn rejects_inverted_range() {
    let m = error_for(
        "abs_eta_ranges = [[0.0, 5.0]]",
        "abs_eta_ranges = [[2.0, 1.0]]",
    );
    assert_mentions(&m, &["jets.abs_eta_ranges[0]", "upper |η| must be > lower"]);
}

#[test]
fn rejects_unknown_key() {
    let m = error_for("radius = 0.4", "radius = 0.4\nradious = 0.5");
    assert_mentions(&m, &["radious", "unknown field"]);
    let m = error_for("[met]", "[met]\nsoft_c_gev = 1.0");
    assert_mentions(&m, &["soft_c_gev", "unknown field"]);
}

#[test]
fn rejects_missing_key() {
    let m = error_for(
        "min_pt_gev = 0.0\nabs_eta_ranges = [[0.0, 5.0]]",
        "abs_eta_ranges = [[0.0, 5.0]]",
    );
    assert_mentions(&m, &["min_pt_gev", "missing field"]);
}

#[test]
fn rejects_both_or_neither_efficiency() {
    let m = error_for(
        "efficiency = 0.9",
        "efficiency = 0.9\nefficiency_table = { pt_edges_gev = [0.0, 1.0], abs_eta_edges = [0.0, 1.0], values = [[1.0]] }",
    );
    assert_mentions(
        &m,
        &[
            "muons",
            "exactly one of `efficiency` and `efficiency_table`",
        ],
    );
    let m = error_for("efficiency = 0.9\n", "");
    assert_mentions(&m, &["muons", "exactly one"]);
}

#[test]
fn rejects_malformed_efficiency_table() {
    let m = error_for("values = [[0.6, 0.5], [0.9, 0.8]]", "values = [[0.6, 0.5]]");
    assert_mentions(
        &m,
        &[
            "photons.efficiency_table.values",
            "one row per pT bin (2)",
            "got 1",
        ],
    );
    let m = error_for(
        "values = [[0.6, 0.5], [0.9, 0.8]]",
        "values = [[0.6, 0.5], [0.9]]",
    );
    assert_mentions(
        &m,
        &[
            "photons.efficiency_table.values[1]",
            "one value per |η| bin (2)",
        ],
    );
    let m = error_for(
        "pt_edges_gev = [0.0, 50.0, 1000.0]",
        "pt_edges_gev = [0.0, 50.0, 40.0]",
    );
    assert_mentions(
        &m,
        &[
            "photons.efficiency_table.pt_edges_gev[2]",
            "strictly increasing",
        ],
    );
}

#[test]
fn rejects_negative_radius_and_bad_met() {
    let m = error_for("radius = 0.4", "radius = -0.4");
    assert_mentions(&m, &["jet_merging.radius", ">= 0", "-0.4"]);
    let m = error_for("max_abs_eta = 4.9", "max_abs_eta = -1.0");
    assert_mentions(&m, &["met.max_abs_eta", "> 0"]);
    let m = error_for("soft_a_gev = 0.0", "soft_a_gev = nan");
    assert_mentions(&m, &["met.soft_a_gev", "finite"]);
}

#[test]
fn rejects_empty_name_and_negative_threshold() {
    let m = error_for("name = \"resolution-test\"", "name = \" \"");
    assert_mentions(&m, &["name", "empty"]);
    let m = error_for("min_pt_gev = 0.0", "min_pt_gev = -5.0");
    assert_mentions(&m, &["jets.min_pt_gev", ">= 0", "-5"]);
}

#[test]
fn variation_constructor_validates() {
    assert!(Variation::new(-1.0, 0.0).is_err());
    assert!(Variation::new(f64::NAN, 0.0).is_err());
    assert!(Variation::new(0.0, 1.5).is_err());
    assert_eq!(Variation::new(0.0, 0.0).unwrap(), Variation::NOMINAL);
}

#[test]
fn variation_parses_and_round_trips() {
    let v: Variation = "resolution=+0.2,efficiency=-0.05".parse().unwrap();
    assert_eq!(
        v,
        Variation {
            resolution_shift: 0.2,
            efficiency_shift: -0.05
        }
    );
    assert_eq!(v.to_string().parse::<Variation>().unwrap(), v);
    assert_eq!(
        "efficiency=0.1"
            .parse::<Variation>()
            .unwrap()
            .resolution_shift,
        0.0
    );
    assert_eq!("nominal".parse::<Variation>().unwrap(), Variation::NOMINAL);
    for (bad, rule) in [
        ("resolution=x", "not a number"),
        ("scale=0.1", "unknown key"),
        ("resolution=0.1,resolution=0.2", "twice"),
        ("resolution", "expected"),
        ("resolution=-1.5", "> -1"),
    ] {
        let e = bad.parse::<Variation>().unwrap_err().to_string();
        assert!(e.contains(rule), "{bad}: {e}");
    }
}

/// Opens every acceptance and efficiency of a profile, so that every object
/// within the resolution regions is seen.
fn fully_efficient(mut p: DetectorProfile) -> DetectorProfile {
    fn open<R>(o: &mut recoil::detector::ObjectResponse<R>, upper: f64) {
        o.min_pt_gev = 0.0;
        o.abs_eta_ranges = vec![[0.0, upper]];
        o.efficiency = Some(1.0);
        o.efficiency_table = None;
    }
    for o in [&mut p.jets, &mut p.electrons, &mut p.taus, &mut p.photons] {
        let upper = o.resolution.last().map_or(1.0, |r| r.max_abs_eta);
        open(o, upper);
    }
    let upper = p.muons.resolution.last().map_or(1.0, |r| r.max_abs_eta);
    open(&mut p.muons, upper);
    p
}

#[test]
fn shipped_generic_profile_resolutions() {
    let profile = fully_efficient(generic());
    let det = Detector::new(profile.clone(), InvisibleSet::standard(), 14);
    let e = 200.0;
    type Pick = fn(&Reco) -> Option<f64>;
    let calo: [(i32, &[recoil::detector::CaloRegion], Pick); 4] = [
        (21, &profile.jets.resolution, |r| {
            r.jets.first().map(|j| j.p4.e)
        }),
        (11, &profile.electrons.resolution, |r| {
            r.electrons.first().map(|o| o.p4.e)
        }),
        (-15, &profile.taus.resolution, |r| {
            r.taus.first().map(|o| o.p4.e)
        }),
        (22, &profile.photons.resolution, |r| {
            r.photons.first().map(|o| o.p4.e)
        }),
    ];
    for (id, regions, pick) in calo {
        for r in regions {
            let eta = 0.5 * (r.min_abs_eta + r.max_abs_eta);
            // Calorimeter form written out here, independently of the library:
            // σ_E/E = √(S²/E + N²/E² + C²) (common practice).
            let expected = (r.stochastic_sqrt_gev.powi(2) / e
                + (r.noise_gev / e).powi(2)
                + r.constant.powi(2))
            .sqrt();
            let xs = ratios(&det, id, at_energy(e, eta, -0.4), pick, e);
            check_std(&format!("generic id {id}, eta {eta}"), &xs, expected);
        }
    }
    for r in &profile.muons.resolution {
        let eta = 0.5 * (r.min_abs_eta + r.max_abs_eta);
        let pt = 300.0;
        // Tracker form σ_pT/pT = √(a² + (b·pT)²), written out here.
        let expected = (r.a.powi(2) + (r.b_per_gev * pt).powi(2)).sqrt();
        let p4 = P4::from_pt_eta_phi_m(pt, -eta, 2.0, 0.105_658);
        let xs = ratios(&det, 13, p4, |r| r.muons.first().map(|m| m.p4.pt()), pt);
        check_std(&format!("generic muon, eta {eta}"), &xs, expected);
    }
}
