//! Speed of the direct-detection reach: a 200-mass limit curve (target
//! ≤ 100 ms) for the shipped invented experiments, with their classical
//! Poisson limit and with CLs (the statistics stage's exact method).

use std::path::Path;
use std::time::Duration;

use criterion::{Criterion, criterion_group, criterion_main};
use recoil::direct::{
    Experiment, Interaction, LimitKind, PoissonMethod, limit_curve_points, log_mass_grid,
    poisson_upper_limit,
};

fn reach_curve(c: &mut Criterion) {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("recasts/experiments");
    let masses = log_mass_grid(1.0, 1.0e4, 200).expect("valid grid");
    let mut group = c.benchmark_group("direct_reach_200_masses");
    group
        .sample_size(10)
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(3));
    for (name, cls) in [
        ("lxe-demo", false),
        ("cryo-ge-demo", false),
        ("lxe-demo", true),
    ] {
        let mut exp = Experiment::from_toml_file(&dir.join(format!("{name}.toml")))
            .expect("shipped experiment is valid");
        let mut id = name.to_string();
        if cls {
            let cl = exp.cl();
            exp = exp
                .with_limit_settings(cl, PoissonMethod::Cls)
                .expect("valid settings");
            id.push_str("-cls");
        }
        group.bench_function(id, |b| {
            b.iter(|| {
                limit_curve_points(&exp, &masses, Interaction::Si, LimitKind::MedianExpected)
                    .expect("curve")
            })
        });
    }
    group.finish();
}

/// One Poisson upper limit (n = 3, b = 3.4 events, 90 % CL), the step every
/// curve takes once per limit kind.
fn poisson_limit(c: &mut Criterion) {
    let mut group = c.benchmark_group("direct_poisson_upper_limit");
    group
        .sample_size(10)
        .warm_up_time(Duration::from_millis(300))
        .measurement_time(Duration::from_secs(1));
    for method in [PoissonMethod::Classical, PoissonMethod::Cls] {
        group.bench_function(method.label(), |b| {
            b.iter(|| poisson_upper_limit(3, 3.4, 0.9, method).expect("limit"))
        });
    }
    group.finish();
}

criterion_group!(benches, reach_curve, poisson_limit);
criterion_main!(benches);
