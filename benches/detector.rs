//! Reconstruction throughput (events/s) on in-memory events shaped like
//! signal events: two incoming partons, 1–3 outgoing partons (sometimes a
//! lepton or photon), two invisible particles, with the generic 13 TeV
//! profile and the truth profile.
//!
//! Run: `cargo bench --bench detector` (short measurement; the figures are
//! noisy on a shared machine).

use std::hint::black_box;
use std::time::Duration;

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use recoil::detector::{Detector, DetectorProfile, Reco};
use recoil::events::InvisibleSet;

#[path = "../tests/detector_support/mod.rs"]
mod detector_support;
use detector_support::{TestStream, signal_like};

fn bench(c: &mut Criterion) {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/recasts/detectors/generic-13tev.toml"
    );
    // invariant: the shipped profile is valid (checked by tests/detector.rs).
    let generic = DetectorProfile::from_toml_file(std::path::Path::new(path)).unwrap();
    let mut stream = TestStream(12_345);
    let evs: Vec<_> = (0..10_000).map(|_| signal_like(&mut stream)).collect();
    let mut group = c.benchmark_group("reconstruct");
    group
        .sample_size(10)
        .measurement_time(Duration::from_secs(3))
        .warm_up_time(Duration::from_secs(1));
    group.throughput(Throughput::Elements(evs.len() as u64));
    for (name, profile) in [
        ("generic-13tev", generic),
        ("truth", DetectorProfile::truth()),
    ] {
        let det = Detector::new(profile, InvisibleSet::standard(), 7);
        group.bench_function(name, |b| {
            let mut out = Reco::default();
            b.iter(|| {
                for (i, ev) in evs.iter().enumerate() {
                    det.reconstruct(black_box(ev), 0, i as u64, &mut out);
                    black_box(&out);
                }
            })
        });
    }
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
