//! Speed targets of the statistics stage: asymptotic limits for one region,
//! 10⁶ pseudo-experiments, and a 13-region combination with covariance.

use std::hint::black_box;
use std::time::Duration;

use criterion::{Criterion, criterion_group, criterion_main};
use nalgebra::DMatrix;
use recoil::stats::toys::Toys;
use recoil::stats::{
    BackgroundConstraint, CountingModel, LimitOptions, RegionCounts, combined_limit, region_limit,
};

fn one_region() -> RegionCounts {
    RegionCounts {
        observed: 120,
        background: 110.0,
        background_unc: 10.0,
        signal: 15.0,
        signal_rel_unc: 0.1,
    }
}

fn asymptotic_one_region(c: &mut Criterion) {
    let r = one_region();
    let o = LimitOptions::default();
    c.bench_function("asymptotic observed + expected limits, one region", |b| {
        b.iter(|| region_limit(black_box(&r), &o).unwrap())
    });
}

fn million_toys(c: &mut Criterion) {
    let r = one_region();
    let model = CountingModel::new(&[r], None, BackgroundConstraint::Gaussian).unwrap();
    // 5·10⁵ per hypothesis: 10⁶ pseudo-experiments for CLs at one μ.
    let toys = Toys::new(&model, 500_000, 1).unwrap();
    let mut g = c.benchmark_group("pseudo-experiments");
    g.sample_size(10).measurement_time(Duration::from_secs(10));
    g.bench_function("CLs at one μ from 10^6 pseudo-experiments", |b| {
        b.iter(|| toys.cls(black_box(1.0)).unwrap().cls)
    });
    g.finish();
}

fn thirteen_regions(c: &mut Criterion) {
    let n = 13;
    let regions: Vec<RegionCounts> = (0..n)
        .map(|i| {
            let b = 2000.0 * (-0.45 * i as f64).exp() + 1.0;
            RegionCounts {
                observed: (b * 1.02).round() as u64,
                background: b,
                background_unc: 0.05 * b + 1.0,
                signal: 30.0 * (-0.2 * i as f64).exp(),
                signal_rel_unc: 0.05,
            }
        })
        .collect();
    // Correlation 0.5^|i−j| between the background uncertainties.
    let cov = DMatrix::from_fn(n, n, |i, j| {
        let (a, b) = (&regions[i], &regions[j]);
        0.5f64.powi((i as i32 - j as i32).abs()) * a.background_unc * b.background_unc
    });
    let o = LimitOptions::default();
    let mut g = c.benchmark_group("combination");
    g.sample_size(10).measurement_time(Duration::from_secs(5));
    g.bench_function("13 regions with covariance, observed + expected", |b| {
        b.iter(|| combined_limit(black_box(&regions), Some(&cov), &o).unwrap())
    });
    g.finish();
}

criterion_group!(
    benches,
    asymptotic_one_region,
    million_toys,
    thirteen_regions
);
criterion_main!(benches);
