//! Model-stage speed: widths, rescaling and the excluded-coupling solver,
//! the pieces a scan calls once per grid point.

use criterion::{Criterion, criterion_group, criterion_main};
use recoil::model::{CouplingPath, Couplings, Mediator, MediatorKind, Nucleon, NucleonParams};
use std::hint::black_box;
use std::time::Duration;

fn bench(c: &mut Criterion) {
    let couplings = Couplings::benchmark();
    let vector = Mediator::new(MediatorKind::Vector, 2000.0, 100.0, couplings).unwrap();
    let scalar = Mediator::new(MediatorKind::Scalar, 2000.0, 100.0, couplings).unwrap();
    let mut g = c.benchmark_group("model");
    g.sample_size(10)
        .measurement_time(Duration::from_secs(2))
        .warm_up_time(Duration::from_millis(500));
    g.bench_function("total_width_vector", |b| {
        b.iter(|| black_box(&vector).total_width_gev())
    });
    g.bench_function("total_width_scalar", |b| {
        b.iter(|| black_box(&scalar).total_width_gev())
    });
    let other = Couplings::new(0.1, 0.5).unwrap();
    g.bench_function("signal_scale", |b| {
        b.iter(|| black_box(&vector).signal_scale(&other).unwrap())
    });
    g.bench_function("excluded_coupling", |b| {
        b.iter(|| {
            black_box(&vector)
                .excluded_coupling(0.5, CouplingPath::Equal)
                .unwrap()
        })
    });
    let p = NucleonParams::default();
    g.bench_function("sigma_nucleon", |b| {
        b.iter(|| {
            black_box(&vector)
                .sigma_nucleon_cm2(Nucleon::Proton, &p)
                .unwrap()
        })
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
