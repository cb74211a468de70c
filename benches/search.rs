//! Cost of the selection alone: the demo search's preselection, 16 regions,
//! cut-flows and distributions on generated reconstructed events (no
//! reading, no detector). Run: `cargo bench --bench search`.

use std::hint::black_box;
use std::time::Duration;

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use recoil::detector::{Jet, Reco};
use recoil::kinematics::P4;
use recoil::search::{EventOrigin, Search, TruthInfo, YieldAccumulator};

/// Generated events (a linear congruential generator; invented inputs).
fn events(n: usize) -> Vec<Reco> {
    let mut state = 7u64;
    let mut next = move || {
        state = state
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    (0..n)
        .map(|_| {
            let n_jets = (next() * 6.0) as usize;
            let mut jets: Vec<Jet> = (0..n_jets)
                .map(|_| Jet {
                    p4: P4::from_pt_eta_phi_m(
                        30.0 + 500.0 * next(),
                        5.0 * next() - 2.5,
                        std::f64::consts::TAU * next() - std::f64::consts::PI,
                        5.0,
                    ),
                    b_tagged: next() < 0.05,
                })
                .collect();
            jets.sort_by(|a, b| b.p4.pt().total_cmp(&a.p4.pt()));
            let met = 150.0 + 900.0 * next();
            let phi = std::f64::consts::TAU * next() - std::f64::consts::PI;
            Reco {
                jets,
                met_xy_gev: [met * phi.cos(), met * phi.sin()],
                met_gev: met,
                weight: 1.0,
                ..Reco::default()
            }
        })
        .collect()
}

fn bench(c: &mut Criterion) {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/recasts/searches/demo-jet-met.toml"
    );
    let search = Search::from_toml_file(std::path::Path::new(path)).expect("demo search");
    let sample = events(10_000);
    let truth = TruthInfo {
        met_gev: 300.0,
        leading_parton_pt_gev: Some(300.0),
    };
    let mut group = c.benchmark_group("search");
    group.sample_size(10);
    group.measurement_time(Duration::from_secs(3));
    group.throughput(Throughput::Elements(sample.len() as u64));
    group.bench_function("demo_selection_10k_events", |b| {
        b.iter(|| {
            let mut acc = YieldAccumulator::new(&search, 0);
            for (i, reco) in sample.iter().enumerate() {
                let origin = EventOrigin {
                    file_index: 0,
                    event_index: i as u64,
                    process_id: 1,
                };
                acc.add(reco, &truth, origin).expect("valid weights");
            }
            black_box(acc.finish_with(|_, _| 1e-3, 10_000, 300.0).expect("finite"))
        })
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
