//! Tests of the search stage: definition loading and its errors (with line
//! and column), cut evaluation on hand-built reconstructed events, yields,
//! MC-statistical uncertainties, cut-flows, projections.
//!
//! Check values are computed by hand from the inputs written in each test
//! ("hand-computed"); the invariants (non-increasing cut-flows,
//! bit-identical merges) need no source.

use recoil::detector::{Jet, Reco, RecoObject};
use recoil::kinematics::P4;
use recoil::search::observables::SelectedObjects;
use recoil::search::{
    EventOrigin, Observable, PRESELECTION, Search, SearchError, TruthInfo, UncertaintyScaling,
    YieldAccumulator,
};

const DEMO: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/recasts/searches/demo-jet-met.toml"
);

/// A small definition; line numbers matter to the error tests below.
const SMALL: &str = r#"title = "test search"
sqrt_s_tev = 13.0
lumi_ifb = 100.0
preselection = ["met > 200", "n_leptons == 0"]

[reference]
paper = "hand-written test"

[objects.jets]
min_pt_gev = 30.0
max_abs_eta = 2.8

[[regions]]
name = "low"
exclusive = true
cuts = ["200 <= met < 300"]
observed = 10
background = 9.5
background_unc = 1.5

[[regions]]
name = "high"
exclusive = true
cuts = ["met >= 300", "jet1.pt > 250"]
observed = 3
background = 2.0
background_unc = 0.5
"#;

fn small() -> Search {
    Search::from_toml_str(SMALL, "small.toml").unwrap()
}

/// Replaces the first occurrence of `from` in SMALL and loads it.
fn load_with(from: &str, to: &str) -> Result<Search, SearchError> {
    assert!(SMALL.contains(from), "test text must contain {from}");
    Search::from_toml_str(&SMALL.replacen(from, to, 1), "bad.toml")
}

fn place(err: &SearchError) -> (usize, usize, String) {
    match err {
        SearchError::Definition {
            line,
            column,
            message,
            ..
        } => (*line, *column, message.clone()),
        other => panic!("expected a placed definition error, got {other}"),
    }
}

fn jet(pt: f64, eta: f64, phi: f64, b: bool) -> Jet {
    Jet {
        p4: P4::from_pt_eta_phi_m(pt, eta, phi, 0.0),
        b_tagged: b,
    }
}

fn lepton(pt: f64, eta: f64) -> RecoObject {
    RecoObject {
        p4: P4::from_pt_eta_phi_m(pt, eta, 0.5, 0.0),
        charge: -1,
    }
}

/// An event with p_T^miss `met` along −x and jets of the given pT at φ = 0.
fn event(met: f64, jet_pts: &[f64], weight: f64) -> Reco {
    Reco {
        jets: jet_pts.iter().map(|&pt| jet(pt, 0.3, 0.0, false)).collect(),
        met_xy_gev: [-met, 0.0],
        met_gev: met,
        weight,
        ..Reco::default()
    }
}

const NO_TRUTH: TruthInfo = TruthInfo {
    met_gev: 0.0,
    leading_parton_pt_gev: None,
};

fn origin(file_index: usize, event_index: u64) -> EventOrigin {
    EventOrigin {
        file_index,
        event_index,
        process_id: 1,
    }
}

#[test]
fn demo_definition_loads() {
    let s = Search::from_toml_file(std::path::Path::new(DEMO)).unwrap();
    assert_eq!(s.lumi_ifb(), 300.0);
    assert_eq!(s.sqrt_s_tev(), 13.6);
    assert_eq!(s.regions().len(), 16);
    assert_eq!(s.exclusive_indices().len(), 11);
    let cov = s.background_covariance().unwrap();
    assert_eq!(cov.shape(), (11, 11));
    // Diagonal = σ_b² of each exclusive region (correlation × σσ).
    let first = &s.regions()[0];
    assert_eq!(cov[(0, 0)], first.background_unc() * first.background_unc());
    // Edges as written in the file: 200 <= met < 250; met >= 1200.
    assert_eq!(s.met_edges_gev(0), (Some(200.0), Some(250.0)));
    assert_eq!(s.met_edges_gev(10), (Some(1200.0), None));
    assert!(
        s.detector_profile()
            .unwrap()
            .ends_with("../detectors/generic-13tev.toml")
    );
}

#[test]
fn bad_cut_points_at_line_and_character() {
    // Line 24 is `cuts = ["met >= 300", "jet1.pt > 250"]`; the second string
    // starts at column 23, its content at 24; "jet1.pt >> 250": the second
    // '>' is the 10th character → column 33 (hand-counted).
    let err = load_with("\"jet1.pt > 250\"", "\"jet1.pt >> 250\"").unwrap_err();
    let (line, column, message) = place(&err);
    assert_eq!((line, column), (24, 33), "{message}");
    assert!(message.contains("at character 10"), "{message}");
    assert!(err.to_string().starts_with("bad.toml:24:33: "), "{err}");
}

#[test]
fn unknown_observable_lists_the_known_ones() {
    let err = load_with("\"n_leptons == 0\"", "\"n_lepton == 0\"").unwrap_err();
    let (line, column, message) = place(&err);
    // Line 4: `preselection = ["met > 200", "n_leptons == 0"]`, second
    // string's content at column 31.
    assert_eq!((line, column), (4, 31), "{message}");
    assert!(
        message.contains("unknown observable \"n_lepton\""),
        "{message}"
    );
    assert!(message.contains("min_dphi_jets_met"), "{message}");
}

#[test]
fn schema_errors_name_the_line() {
    let cases: [(&str, &str, usize, &str); 7] = [
        (
            "observed = 3\n",
            "observed = -3\n",
            25,
            "observed must be ≥ 0",
        ),
        (
            "background_unc = 1.5",
            "background_unc = -1.5",
            19,
            "background_unc must be finite and ≥ 0",
        ),
        (
            "name = \"high\"",
            "name = \"low\"",
            22,
            "duplicate region name \"low\" (first defined on line 14)",
        ),
        (
            "min_pt_gev = 30.0",
            "min_pt = 30.0",
            10,
            "unknown field `min_pt`",
        ),
        (
            "lumi_ifb = 100.0",
            "lumi_ifb = 0.0",
            3,
            "lumi_ifb must be > 0",
        ),
        ("name = \"low\"", "name = \"preselection\"", 14, "reserved"),
        (
            "exclusive = true\ncuts = [\"met >= 300\"",
            "exclusive = \"yes\"\ncuts = [\"met >= 300\"",
            23,
            "invalid type",
        ),
    ];
    for (from, to, want_line, want_text) in cases {
        let err = load_with(from, to).unwrap_err();
        let (line, _, message) = place(&err);
        assert_eq!(line, want_line, "{to}: {message}");
        assert!(message.contains(want_text), "{to}: {message}");
    }
}

fn with_matrix(table: &str) -> Result<Search, SearchError> {
    Search::from_toml_str(&format!("{SMALL}\n{table}"), "m.toml")
}

#[test]
fn covariance_is_validated() {
    // Correct: diagonal = σ_b² = 1.5², 0.5²; off-diagonal 0.3·1.5·0.5 = 0.225.
    let ok = with_matrix(
        "[background_covariance]\nregions = [\"high\", \"low\"]\nmatrix = [[0.25, 0.225], [0.225, 2.25]]\n",
    )
    .unwrap();
    let cov = ok.background_covariance().unwrap();
    // Reordered into definition order (low, high).
    assert_eq!(cov[(0, 0)], 2.25);
    assert_eq!(cov[(1, 1)], 0.25);
    assert_eq!(cov[(0, 1)], 0.225);

    let wrong_size = with_matrix(
        "[background_covariance]\nregions = [\"low\", \"high\"]\nmatrix = [[2.25, 0.0, 0.0], [0.0, 0.25, 0.0]]\n",
    )
    .unwrap_err();
    let (line, _, message) = place(&wrong_size);
    assert_eq!(line, 31, "{message}");
    assert!(message.contains("must be 2×2"), "{message}");

    // |ρ| ≤ 1 but not positive semi-definite: ρ = 1 · 2.25·0.25 → ok;
    // use a covariance whose off-diagonal exceeds σ₁σ₂ = 0.75.
    let not_psd = with_matrix(
        "[background_covariance]\nregions = [\"low\", \"high\"]\nmatrix = [[2.25, 0.9], [0.9, 0.25]]\n",
    )
    .unwrap_err();
    assert!(
        place(&not_psd).2.contains("positive semi-definite"),
        "{not_psd}"
    );

    let diag = with_matrix(
        "[background_covariance]\nregions = [\"low\", \"high\"]\nmatrix = [[3.0, 0.0], [0.0, 0.25]]\n",
    )
    .unwrap_err();
    assert!(place(&diag).2.contains("background_unc²"), "{diag}");

    let unknown = with_matrix(
        "[background_correlation]\nregions = [\"low\", \"middle\"]\nmatrix = [[1.0, 0.0], [0.0, 1.0]]\n",
    )
    .unwrap_err();
    assert!(
        place(&unknown).2.contains("no region named \"middle\""),
        "{unknown}"
    );
}

#[test]
fn correlation_matrix_not_positive_semi_definite_is_rejected() {
    let three = SMALL.to_string()
        + "\n[[regions]]\nname = \"top\"\nexclusive = true\ncuts = [\"met > 900\"]\nobserved = 1\nbackground = 1.0\nbackground_unc = 0.2\n\n[background_correlation]\nregions = [\"low\", \"high\", \"top\"]\nmatrix = [[1.0, 0.9, 0.9], [0.9, 1.0, -0.9], [0.9, -0.9, 1.0]]\n";
    // Hand-computed determinant: 0.19 − 2·1.539 = −2.888 < 0.
    let err = Search::from_toml_str(&three, "c.toml").unwrap_err();
    assert!(place(&err).2.contains("positive semi-definite"), "{err}");
}

#[test]
fn observables_on_a_hand_built_event() {
    let text = SMALL.replacen(
        "max_abs_eta = 2.8",
        "max_abs_eta = 2.8\n\n[objects.electrons]\nmin_pt_gev = 10.0\n",
        1,
    );
    let search = Search::from_toml_str(&text, "t.toml").unwrap();
    let reco = Reco {
        jets: vec![
            jet(400.0, 0.5, 0.0, false),
            jet(120.0, -1.0, 2.0, true),
            jet(50.0, 2.0, 3.0, false),
            jet(40.0, 3.5, 1.0, false), // |η| > 2.8: not selected
            jet(20.0, 0.0, 1.0, false), // pT < 30: not selected
        ],
        electrons: vec![lepton(30.0, 0.1), lepton(5.0, 0.1)],
        muons: vec![lepton(50.0, 1.2)],
        met_xy_gev: [-300.0, 0.0],
        met_gev: 300.0,
        sum_et_gev: 999.0,
        weight: 1.0,
        ..Reco::default()
    };
    let mut sel = SelectedObjects::default();
    sel.fill(&reco, search.objects());
    let pi = std::f64::consts::PI;
    let ev = |name: &str| {
        let (head, arg) = match name.split_once('(') {
            Some((h, a)) => (h, Some(a.trim_end_matches(')').parse().unwrap())),
            None => (name, None),
        };
        let (ident, attr) = match head.split_once('.') {
            Some((i, a)) => (i, Some(a)),
            None => (head, None),
        };
        Observable::resolve(ident, attr, arg)
            .unwrap()
            .evaluate(&sel)
    };
    // Hand-computed from the objects above.
    let close = |a: f64, b: f64| (a - b).abs() < 1e-9 * b.abs().max(1.0);
    assert!(close(ev("met"), 300.0));
    assert!(close(ev("met_phi"), pi));
    assert_eq!(ev("n_jets"), 3.0);
    assert_eq!(ev("n_bjets"), 1.0);
    assert!(close(ev("ht"), 570.0));
    assert!(close(ev("meff"), 870.0));
    assert!(close(ev("sum_et"), 999.0));
    assert!(close(ev("jet2.pt"), 120.0));
    assert!(close(ev("jet2.eta"), -1.0));
    assert!(close(ev("jet2.abs_eta"), 1.0));
    assert!(close(ev("jet3.phi"), 3.0));
    assert!(ev("jet4.pt").is_nan());
    assert_eq!(ev("n_electrons"), 1.0);
    assert_eq!(ev("n_muons"), 1.0);
    assert_eq!(ev("n_leptons"), 2.0);
    assert!(close(ev("lepton1.pt"), 50.0));
    assert!(close(ev("lepton2.pt"), 30.0));
    // |Δφ| to p_T^miss at φ = π: jets at 0, 2, 3 → π, π − 2, π − 3.
    assert!(close(ev("min_dphi_jets_met(1)"), pi));
    assert!(close(ev("min_dphi_jets_met(2)"), pi - 2.0));
    assert!(close(ev("min_dphi_jets_met"), pi - 3.0));
}

#[test]
fn yields_equal_the_hand_computed_sums() {
    let search = small();
    let mut acc = YieldAccumulator::new(&search, 2);
    // (file, met, jets, weight, variations)
    type Row<'a> = (usize, f64, &'a [f64], f64, [f64; 2]);
    let events: [Row<'_>; 6] = [
        (0, 250.0, &[300.0], 2.0, [1.0, 3.0]), // low
        (0, 350.0, &[300.0], 1.0, [0.5, 2.0]), // high
        (1, 350.0, &[200.0], 4.0, [4.0, 4.0]), // fails jet1.pt > 250
        (1, 500.0, &[260.0], 3.0, [2.0, 5.0]), // high
        (1, 150.0, &[300.0], 5.0, [5.0, 5.0]), // fails met > 200
        (0, 220.0, &[100.0], 0.5, [0.2, 1.0]), // low
    ];
    for (i, (file, met, jets, w, var)) in events.iter().enumerate() {
        let mut reco = event(*met, jets, *w);
        reco.weights = var.to_vec();
        acc.add(&reco, &NO_TRUTH, origin(*file, i as u64)).unwrap();
    }
    // Weight-to-pb factors by hand: file 0 → 0.1 pb, file 1 → 0.01 pb.
    let f = |file: usize, _p: i32| if file == 0 { 0.1 } else { 0.01 };
    let y = acc.finish_with(f, 6, 100.0).unwrap();
    let l = 100.0 * 1000.0; // 100 fb⁻¹ in pb⁻¹
    let close = |a: f64, b: f64| (a - b).abs() <= 1e-12 * b.abs().max(1e-300);
    // Hand-computed: low = 0.1·(2 + 0.5), high = 0.1·1 + 0.01·3.
    assert!(
        close(y.regions[0].events, l * 0.25),
        "{}",
        y.regions[0].events
    );
    assert!(
        close(y.regions[1].events, l * 0.13),
        "{}",
        y.regions[1].events
    );
    // MC stat = L √Σ(f w)²: low √(0.2² + 0.05²), high √(0.1² + 0.03²).
    assert!(close(y.regions[0].mc_stat, l * (0.04f64 + 0.0025).sqrt()));
    assert!(close(y.regions[1].mc_stat, l * (0.01f64 + 0.0009).sqrt()));
    // Cross-section Σ f w = 0.1·3.5 + 0.01·12 = 0.47 pb.
    assert!(close(y.cross_section_pb, 0.47));
    assert!(close(y.regions[0].efficiency, 0.25 / 0.47));
    // Variation envelope: low {0.1·1.2, 0.1·4} = {0.12, 0.4};
    // high {0.1·0.5 + 0.01·2, 0.1·2 + 0.01·5} = {0.07, 0.25}.
    assert!(close(y.regions[0].variation_low.unwrap(), l * 0.12));
    assert!(close(y.regions[0].variation_high.unwrap(), l * 0.4));
    assert!(close(y.regions[1].variation_low.unwrap(), l * 0.07));
    assert!(close(y.regions[1].variation_high.unwrap(), l * 0.25));
    assert_eq!(y.regions[0].raw_events, 2);
    assert_eq!(y.regions[1].raw_events, 2);

    // Cut-flow of "high": all, preselection, met >= 300, jet1.pt > 250.
    let flow = &y.cutflows[2];
    assert_eq!(flow.name, "high");
    let raw: Vec<u64> = flow.steps.iter().map(|s| s.raw_events).collect();
    assert_eq!(raw, [6, 5, 3, 2]);
    assert_eq!(flow.steps[1].cut, PRESELECTION);
    assert_eq!(flow.steps[3].cut, "jet1.pt > 250");
    assert_eq!(y.cutflows[0].steps.len(), 3);

    // Region counts for the statistics stage.
    let counts = search.region_counts(&y).unwrap();
    assert_eq!(counts[1].observed, 3);
    assert_eq!(counts[1].background, 2.0);
    assert!(close(counts[1].signal, l * 0.13));
    assert!(close(
        counts[1].signal_rel_unc,
        (0.01f64 + 0.0009).sqrt() / 0.13
    ));

    // Cross-section override keeps efficiencies: s ∝ σ.
    let y2 = y.clone().with_cross_section_pb(0.94).unwrap();
    assert!(close(y2.regions[0].events, 2.0 * y.regions[0].events));
    assert_eq!(y2.regions[0].efficiency, y.regions[0].efficiency);
    let y3 = y.with_lumi_ifb(300.0).unwrap();
    assert!(close(y3.regions[1].events, 3.0 * l * 0.13));
}

#[test]
fn bad_weights_are_errors_naming_the_event() {
    let search = small();
    let mut acc = YieldAccumulator::new(&search, 1);
    let reco = event(300.0, &[300.0], 1.0);
    let err = acc.add(&reco, &NO_TRUTH, origin(2, 17)).unwrap_err();
    let text = err.to_string();
    assert!(text.contains("event file #2"), "{text}");
    assert!(text.contains("event 17"), "{text}");
    assert!(
        text.contains("0 weight variations, the sample declares 1"),
        "{text}"
    );
    let mut acc = YieldAccumulator::new(&search, 0);
    let reco = event(300.0, &[300.0], f64::NAN);
    assert!(acc.add(&reco, &NO_TRUTH, origin(0, 0)).is_err());
}

/// Deterministic pseudo-random numbers for the invariant tests (a linear
/// congruential generator; invented inputs, no check values).
struct Lcg(u64);
impl Lcg {
    fn next(&mut self) -> f64 {
        self.0 = self
            .0
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
}

fn random_events(n: usize) -> Vec<Reco> {
    let mut r = Lcg(42);
    (0..n)
        .map(|_| {
            let jets: Vec<f64> = (0..(r.next() * 5.0) as usize)
                .map(|_| 20.0 + 600.0 * r.next())
                .collect();
            let mut jets = jets;
            jets.sort_by(|a, b| b.total_cmp(a));
            let mut e = event(100.0 + 800.0 * r.next(), &jets, 0.5 + r.next());
            if r.next() < 0.2 {
                e.muons.push(lepton(30.0, 0.0));
            }
            e
        })
        .collect()
}

/// Yields of the demo search on `n` generated events, all in file 0 with
/// a weight-to-pb factor `f`.
fn demo_yields(search: &Search, n: usize, f: f64) -> recoil::search::SampleYields {
    let mut acc = YieldAccumulator::new(search, 0);
    for (i, reco) in random_events(n).iter().enumerate() {
        acc.add(reco, &NO_TRUTH, origin(0, i as u64)).unwrap();
    }
    acc.finish_with(|_, _| f, n as u64, 300.0).unwrap()
}

#[test]
fn cutflows_do_not_increase() {
    let search = Search::from_toml_file(std::path::Path::new(DEMO)).unwrap();
    let y = demo_yields(&search, 3000, 1e-3);
    for flow in &y.cutflows {
        assert_eq!(flow.steps[0].raw_events, 3000);
        for pair in flow.steps.windows(2) {
            assert!(pair[1].raw_events <= pair[0].raw_events, "{}", flow.name);
            // Positive weights: weighted counts cannot grow either.
            assert!(pair[1].events <= pair[0].events, "{}", flow.name);
        }
        for i in 0..flow.steps.len() {
            let e = flow.efficiency_cumulative(i);
            assert!((0.0..=1.0).contains(&e), "{} {e}", flow.name);
        }
    }
    // The exclusive bins partition the preselected events.
    let pre = y.cutflows[0].steps.last().unwrap().raw_events;
    let sum: u64 = search
        .exclusive_indices()
        .iter()
        .map(|&i| y.regions[i].raw_events)
        .sum();
    assert_eq!(sum, pre);
    assert!(pre > 0, "the test sample must populate the regions");
}

#[test]
fn merging_chunks_in_order_is_independent_of_threads() {
    use rayon::prelude::*;
    let search = Search::from_toml_file(std::path::Path::new(DEMO)).unwrap();
    let events = random_events(4000);
    let run = |threads: usize| {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap();
        pool.install(|| {
            let chunks: Vec<YieldAccumulator<'_>> = events
                .par_chunks(256)
                .enumerate()
                .map(|(c, chunk)| {
                    let mut acc = YieldAccumulator::new(&search, 0);
                    for (i, reco) in chunk.iter().enumerate() {
                        let file = c % 3;
                        acc.add(reco, &NO_TRUTH, origin(file, (c * 256 + i) as u64))
                            .unwrap();
                    }
                    acc
                })
                .collect();
            let mut total = YieldAccumulator::new(&search, 0);
            for acc in chunks {
                total.merge(acc);
            }
            total
                .finish_with(|f, _| 1e-3 * (f + 1) as f64, 4000, 300.0)
                .unwrap()
        })
    };
    let one = run(1);
    let four = run(4);
    assert_eq!(one, four);
    // Bit for bit, not only approximately.
    for (a, b) in one.regions.iter().zip(&four.regions) {
        assert_eq!(a.events.to_bits(), b.events.to_bits());
        assert_eq!(a.mc_stat.to_bits(), b.mc_stat.to_bits());
    }
}

#[test]
fn distributions_take_all_events() {
    let search = small();
    let mut acc = YieldAccumulator::new(&search, 0);
    let truth = TruthInfo {
        met_gev: 260.0,
        leading_parton_pt_gev: Some(5000.0),
    };
    // One event failing the preselection (met 150): still in the histograms.
    acc.add(&event(150.0, &[75.0], 2.0), &truth, origin(0, 0))
        .unwrap();
    let y = acc.finish_with(|_, _| 1.0, 1, 1.0).unwrap();
    let find = |obs: &str, level: &str| {
        y.distributions
            .iter()
            .find(|d| d.observable == obs && d.level == level)
            .unwrap()
    };
    // Bins of 50 GeV: 260 → [250, 300); 150 → [150, 200); 75 → [50, 100);
    // 5000 → overflow [2000, ∞). 2 × 1 pb × 1 fb⁻¹ = 2000 events.
    let bin_of =
        |d: &recoil::search::Distribution| d.bins.iter().position(|b| b.events != 0.0).unwrap();
    let t = find("met", "truth");
    assert_eq!(t.bins[bin_of(t)].low_gev, 250.0);
    assert_eq!(t.bins[bin_of(t)].events, 2000.0);
    assert_eq!(
        find("met", "reco").bins[bin_of(find("met", "reco"))].low_gev,
        150.0
    );
    assert_eq!(
        find("jet1_pt", "reco").bins[bin_of(find("jet1_pt", "reco"))].low_gev,
        50.0
    );
    let jt = find("jet1_pt", "truth");
    assert_eq!(jt.bins[bin_of(jt)].high_gev, None);
    assert_eq!(jt.bins[bin_of(jt)].low_gev, 2000.0);
}

#[test]
fn projection_scales_background_and_states_how() {
    let s = small();
    let p = s.projected(300.0, UncertaintyScaling::Linear).unwrap();
    // k = 3: b = 9.5 → 28.5, σ_b 1.5 → 4.5, observed = round(28.5) = 29
    // (Rust rounds half away from zero).
    let r = &p.regions()[0];
    assert_eq!(r.background(), 28.5);
    assert_eq!(r.background_unc(), 4.5);
    assert_eq!(r.observed(), 29);
    assert_eq!(p.lumi_ifb(), 300.0);
    let q = s.projected(400.0, UncertaintyScaling::Sqrt).unwrap();
    // k = 4: σ_b 1.5 → 3.0; b 2.0 → 8.0.
    assert_eq!(q.regions()[0].background_unc(), 3.0);
    assert_eq!(q.regions()[1].background(), 8.0);
    assert!(q.projection().unwrap().describe().contains("σ_b ∝ √L"));
    assert!(s.projected(-1.0, UncertaintyScaling::Linear).is_err());
}

#[test]
fn region_counts_refuse_foreign_yields() {
    let s = small();
    let acc = YieldAccumulator::new(&s, 0);
    let mut y = acc.finish_with(|_, _| 1.0, 0, 1.0).unwrap();
    y.regions[0].name = "other".into();
    assert!(matches!(
        s.region_counts(&y),
        Err(SearchError::Mismatch { .. })
    ));
}

#[test]
fn yields_survive_a_json_round_trip() {
    let search = Search::from_toml_file(std::path::Path::new(DEMO)).unwrap();
    let y = demo_yields(&search, 500, 3.7e-4);
    let text = serde_json::to_string(&y).unwrap();
    let back: recoil::search::SampleYields = serde_json::from_str(&text).unwrap();
    assert_eq!(back, y);
}

/// A parton-level event: g g → g + χ χ̄ with the gluon at φ = 0 carrying
/// `pt` and the χ pair balancing it (plus an optional final-state muon).
fn parton_event(pt: f64, with_muon: bool, weight: f64) -> recoil::events::Event {
    use recoil::events::{Event, Particle};
    let p = |id: i32, status: i32, p4: P4| Particle {
        id,
        status,
        mothers: [0, 0],
        colour: [0, 0],
        p4,
        mass_gev: p4.m(),
        lifetime_mm: 0.0,
        spin: 9.0,
    };
    let mut particles = vec![
        p(21, -1, P4::new(1000.0, 0.0, 0.0, 1000.0)),
        p(21, -1, P4::new(1000.0, 0.0, 0.0, -1000.0)),
        p(21, 1, P4::from_pt_eta_phi_m(pt, 0.2, 0.0, 0.0)),
        p(
            52,
            1,
            P4::from_pt_eta_phi_m(pt / 2.0, 0.5, std::f64::consts::PI, 10.0),
        ),
        p(
            -52,
            1,
            P4::from_pt_eta_phi_m(pt / 2.0, -0.5, std::f64::consts::PI, 10.0),
        ),
    ];
    if with_muon {
        particles.push(p(13, 1, P4::from_pt_eta_phi_m(40.0, 0.1, 1.5, 0.105)));
    }
    Event {
        process_id: 1,
        weight,
        particles,
        ..Event::default()
    }
}

#[test]
fn truth_detector_feeds_the_regions() {
    use recoil::detector::{Detector, DetectorProfile};
    use recoil::events::InvisibleSet;
    let search = Search::from_toml_file(std::path::Path::new(DEMO)).unwrap();
    let detector = Detector::new(DetectorProfile::truth(), InvisibleSet::standard(), 1);
    let invisible = InvisibleSet::standard();
    let mut acc = YieldAccumulator::new(&search, 0);
    let mut reco = Reco::default();
    // (jet pT = p_T^miss [GeV], muon, weight)
    let sample = [
        (260.0, false, 1.0),
        (1300.0, false, 2.0),
        (1300.0, true, 4.0),
        (180.0, false, 8.0),
    ];
    for (i, (pt, muon, w)) in sample.iter().enumerate() {
        let ev = parton_event(*pt, *muon, *w);
        detector.reconstruct(&ev, 0, i as u64, &mut reco);
        let truth = TruthInfo::from_event(&ev, &invisible);
        acc.add(&reco, &truth, origin(0, i as u64)).unwrap();
    }
    let y = acc.finish_with(|_, _| 1.0, 4, 1.0).unwrap();
    let raw = |name: &str| {
        y.regions
            .iter()
            .find(|r| r.name == name)
            .map(|r| r.raw_events)
            .unwrap()
    };
    // Hand-classified: 260 → E250_300 only; 1300 without muon → E1200_inf
    // and every inclusive region; the muon event and the 180 GeV event fail
    // the preselection (lepton veto; p_T^miss > 200).
    assert_eq!(raw("E250_300"), 1);
    assert_eq!(raw("E1200_inf"), 1);
    assert_eq!(raw("I300"), 1);
    assert_eq!(raw("I1200"), 1);
    assert_eq!(raw("E200_250"), 0);
    assert_eq!(y.cutflows[0].steps.last().unwrap().raw_events, 2);
    // Expected events: weight × 1 pb × 1 fb⁻¹ = 1000 w.
    assert_eq!(y.regions[1].events, 1000.0);
    // Truth p_T^miss of the 260 GeV event falls in the [250, 300) bin.
    let truth_met = &y.distributions[0];
    assert_eq!(truth_met.bins[5].low_gev, 250.0);
    assert!(truth_met.bins[5].events > 0.0);
}

#[test]
fn limits_come_from_the_region_counts() {
    use recoil::search::{model_independent_limits, search_limits};
    use recoil::stats::{BackgroundConstraint, LimitOptions, Method};
    // Known backgrounds (σ_b = 0) so that the exact Poisson CLs applies.
    let text = r#"title = "known backgrounds"
sqrt_s_tev = 13.0
lumi_ifb = 10.0
[reference]
paper = "hand-written test"
[[regions]]
name = "none_seen"
exclusive = false
cuts = ["met > 300"]
observed = 0
background = 1.0
background_unc = 0.0
[[regions]]
name = "one_seen"
exclusive = false
cuts = ["met > 500"]
observed = 1
background = 1.0
background_unc = 0.0
"#;
    let search = Search::from_toml_str(text, "k.toml").unwrap();
    let mut y = YieldAccumulator::new(&search, 0)
        .finish_with(|_, _| 1.0, 0, 10.0)
        .unwrap();
    // Hand-set signal without MC uncertainty: 2 and 1 events.
    y.regions[0].events = 2.0;
    y.regions[1].events = 1.0;
    let opts = LimitOptions {
        cl: 0.95,
        method: Method::Exact,
        constraint: BackgroundConstraint::Gaussian,
    };
    let limits = search_limits(&search, &y, &opts).unwrap();
    // n = 0: s_up = ln 20 = 2.9957 for any b (REFERENCES.md §1, Helene
    // formula, from memory); μ_up = s_up / s = 2.9957 / 2.
    let close = |a: f64, b: f64, tol: f64| (a - b).abs() <= tol;
    assert!(close(
        limits.regions[0].limit.mu_up_observed,
        20f64.ln() / 2.0,
        1e-3
    ));
    // n = 1, b = 1: s_up = 4.1130 (REFERENCES.md §1, computed with scipy).
    assert!(close(limits.regions[1].limit.mu_up_observed, 4.1130, 1e-3));
    assert!(limits.combined.is_none(), "no exclusive regions");
    // Same background, twice the signal: the first region is more sensitive.
    assert_eq!(limits.best_region, Some(0));

    let mi = model_independent_limits(&search, &opts).unwrap();
    assert!(close(mi[0].s95_obs, 2.9957, 1e-3));
    assert!(close(mi[1].s95_obs, 4.1130, 1e-3));
    // σ_vis = s95 / L with L = 10 fb⁻¹.
    assert!(close(mi[1].sigma_vis_obs_fb, 0.41130, 1e-4));
}
