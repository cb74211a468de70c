//! Scan stage speed: contour tracing on a large grid, and a re-run of the
//! demo scan whose yields all come from the cache (the statistics of every
//! point, the contours and the DM–nucleon products, no event read).
//!
//! `cargo bench --bench scan`. The machine is shared: figures are noisy.

use std::hint::black_box;
use std::path::Path;
use std::time::Duration;

use criterion::{Criterion, criterion_group, criterion_main};
use recoil::scan::evaluate::PlanEvaluator;
use recoil::scan::products::PlanProducts;
use recoil::scan::{Grid, RunOptions, ScanPlan, Shard, run_scan, trace_level};

fn contour(c: &mut Criterion) {
    let n = 200;
    let axis: Vec<f64> = (0..n)
        .map(|k| -2.0 + 4.0 * k as f64 / (n - 1) as f64)
        .collect();
    let mut values = Vec::with_capacity(n * n);
    for &y in &axis {
        for &x in &axis {
            values.push((x * x + y * y).sqrt() - 1.0 + 0.1 * (5.0 * x).sin() * (3.0 * y).cos());
        }
    }
    let grid = Grid::new(axis.clone(), axis, values).unwrap();
    c.bench_function("trace_level 200x200", |b| {
        b.iter(|| black_box(trace_level(black_box(&grid), 0.0)))
    });
}

fn cached_demo(c: &mut Criterion) {
    let plan_path = Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-events/scan.toml");
    let plan = ScanPlan::from_toml_file(&plan_path).unwrap();
    let evaluator = PlanEvaluator::new(&plan).unwrap();
    let products = PlanProducts::new(&plan).unwrap();
    let dir = tempfile::tempdir().unwrap();
    let opts = RunOptions {
        out: dir.path().join("out"),
        shard: Shard::WHOLE,
        threads: None,
        use_cache: true,
    };
    // Fill the cache once.
    run_scan(&plan, &evaluator, &products, &opts, None).unwrap();
    let mut g = c.benchmark_group("demo scan");
    g.sample_size(10).measurement_time(Duration::from_secs(5));
    g.bench_function("re-run from the yield cache", |b| {
        b.iter(|| {
            std::fs::remove_dir_all(opts.out.join("points")).unwrap();
            black_box(run_scan(&plan, &evaluator, &products, &opts, None).unwrap())
        })
    });
    g.finish();
}

criterion_group!(benches, contour, cached_demo);
criterion_main!(benches);
