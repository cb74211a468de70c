//! Reader throughput on a generated LHEF 3.0 file of 200 000 events with
//! nine named weights (written at benchmark time into a temporary folder):
//! full parse on one thread, on all threads, gzip input, and gzip
//! decompression alone with the same backend; then the same pass with
//! every event reconstructed by the generic 13 TeV detector profile
//! (`recasts/detectors/generic-13tev.toml`) against the read-only pass.
//!
//! `cargo bench --bench events` (or `-- pipeline` for the second group).
//! `parse_1_thread` has one parsing worker; the reader's own thread comes
//! on top, so for the figure of one core run
//! `taskset -c 0 cargo bench --bench events -- events/parse_1_thread`.

#[path = "../tests/events_support/mod.rs"]
mod events_support;

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use recoil::detector::{Detector, DetectorProfile, Reco};
use recoil::events::{EventSource, ReadOptions};
use std::io::Read;
use std::path::{Path, PathBuf};
use std::time::Duration;

const N_EVENTS: usize = 200_000;

fn sample(dir: &Path) -> (PathBuf, PathBuf, u64) {
    let spec = events_support::Spec {
        n_events: N_EVENTS,
        idwtup: -4,
        processes: vec![(1, 2.0, 0.1), (2, 1.0, 0.1)],
        negative_every: 9,
        weight_names: (0..9).map(|k| format!("{}", 1001 + k)).collect(),
        ..Default::default()
    };
    let plain = dir.join("bench.lhe");
    let mut w = std::io::BufWriter::new(std::fs::File::create(&plain).expect("create"));
    events_support::write_lhef(&spec, &mut w).expect("write");
    drop(w);
    let text = std::fs::read(&plain).expect("read back");
    let gz = dir.join("bench.lhe.gz");
    std::fs::write(&gz, events_support::gzip(&text)).expect("write gz");
    (plain, gz, text.len() as u64)
}

fn pass(path: &Path) -> u64 {
    let src = EventSource::open(&[path], ReadOptions::default()).expect("open");
    let mut n = 0u64;
    src.for_each_chunk(|_, evs| evs.len() as u64, |k| n += k, None)
        .expect("read");
    assert_eq!(n, N_EVENTS as u64);
    n
}

fn bench(c: &mut Criterion) {
    let dir = tempfile::tempdir().expect("temp dir");
    let (plain, gz, text_bytes) = sample(dir.path());
    let one = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .expect("pool");
    let mut g = c.benchmark_group("events");
    g.sample_size(10)
        .measurement_time(Duration::from_secs(4))
        .warm_up_time(Duration::from_secs(1))
        .throughput(Throughput::Bytes(text_bytes));
    g.bench_function("parse_1_thread", |b| {
        b.iter(|| one.install(|| pass(&plain)))
    });
    g.bench_function("parse_all_threads", |b| b.iter(|| pass(&plain)));
    g.bench_function("gzip_parse_all_threads", |b| b.iter(|| pass(&gz)));
    g.bench_function("gzip_decompress_only", |b| {
        b.iter(|| {
            let f =
                std::io::BufReader::with_capacity(1 << 16, std::fs::File::open(&gz).expect("open"));
            let mut d = flate2::read::MultiGzDecoder::new(f);
            let mut buf = vec![0u8; 1 << 20];
            let mut n = 0u64;
            loop {
                let k = d.read(&mut buf).expect("decompress");
                if k == 0 {
                    break;
                }
                n += k as u64;
            }
            assert_eq!(n, text_bytes);
        })
    });
    g.finish();

    let profile = DetectorProfile::from_toml_file(
        &Path::new(env!("CARGO_MANIFEST_DIR")).join("recasts/detectors/generic-13tev.toml"),
    )
    .expect("detector profile");
    let det = Detector::new(profile, ReadOptions::default().invisible, 7);
    let mut g = c.benchmark_group("pipeline");
    g.sample_size(10)
        .measurement_time(Duration::from_secs(4))
        .warm_up_time(Duration::from_secs(1))
        .throughput(Throughput::Bytes(text_bytes));
    g.bench_function("read_only", |b| b.iter(|| pass(&plain)));
    g.bench_function("read_reconstruct", |b| {
        b.iter(|| {
            let src = EventSource::open(&[&plain], ReadOptions::default()).expect("open");
            let mut n_jets = 0usize;
            src.for_each_chunk(
                |ctx, evs| {
                    let mut reco = Reco::default();
                    let mut jets = 0usize;
                    for (k, ev) in evs.iter().enumerate() {
                        det.reconstruct(
                            ev,
                            ctx.file_index,
                            ctx.first_event_index + k as u64,
                            &mut reco,
                        );
                        jets += reco.jets.len();
                    }
                    jets
                },
                |j| n_jets += j,
                None,
            )
            .expect("read");
            n_jets
        })
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
