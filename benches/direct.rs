//! Speed of the direct-detection reach: a 200-mass limit curve (target
//! ≤ 100 ms) for the shipped invented experiments.

use std::path::Path;
use std::time::Duration;

use criterion::{Criterion, criterion_group, criterion_main};
use recoil::direct::{Experiment, Interaction, LimitKind, limit_curve_points, log_mass_grid};

fn reach_curve(c: &mut Criterion) {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("recasts/experiments");
    let masses = log_mass_grid(1.0, 1.0e4, 200).expect("valid grid");
    let mut group = c.benchmark_group("direct_reach_200_masses");
    group
        .sample_size(10)
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(3));
    for name in ["lxe-demo", "cryo-ge-demo"] {
        let exp = Experiment::from_toml_file(&dir.join(format!("{name}.toml")))
            .expect("shipped experiment is valid");
        group.bench_function(name, |b| {
            b.iter(|| {
                limit_curve_points(&exp, &masses, Interaction::Si, LimitKind::MedianExpected)
                    .expect("curve")
            })
        });
    }
    group.finish();
}

criterion_group!(benches, reach_curve);
criterion_main!(benches);
