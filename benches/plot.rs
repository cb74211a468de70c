//! Figure rendering speed: an exclusion plane of a 30 × 30 scan with four
//! contours, and a DM–nucleon plane with four 300-point curves. The inputs
//! are synthetic shapes sized like a large scan; only the timing matters.

use std::hint::black_box;
use std::time::Duration;

use criterion::{Criterion, criterion_group, criterion_main};
use recoil::plot::{
    self, ContourLevel, ContourLine, Curve, CurveSource, ExclusionData, Interaction, Labels,
    ScanPoint,
};

fn labels() -> Labels {
    Labels {
        mediator: Some("vector".into()),
        couplings: Some("g_q = 0.25, g_χ = 1".into()),
        sqrt_s_tev: Some(13.0),
        lumi_ifb: Some(139.0),
        ..Labels::default()
    }
}

fn exclusion_data() -> ExclusionData {
    let mut points = Vec::new();
    for i in 0..30 {
        for j in 0..30 {
            let m = 100.0 + 70.0 * f64::from(i);
            let d = 1.0 + 35.0 * f64::from(j);
            points.push(ScanPoint {
                m_med_gev: m,
                m_dm_gev: d,
                excluded: m + 2.0 * d < 1800.0,
            });
        }
    }
    let contours = [
        (ContourLevel::Observed, 1800.0),
        (ContourLevel::Expected, 1750.0),
        (ContourLevel::ExpectedMinus1, 1950.0),
        (ContourLevel::ExpectedPlus1, 1550.0),
    ]
    .into_iter()
    .map(|(level, c)| ContourLine {
        level,
        points: (0..200)
            .map(|k| {
                let d = 1.0 + f64::from(k) * 2.0;
                (c - 2.0 * d, d)
            })
            .collect(),
    })
    .collect();
    ExclusionData { points, contours }
}

fn curves() -> Vec<Curve> {
    (0..4)
        .map(|i| Curve {
            label: format!("curve {i}"),
            source: if i < 2 {
                CurveSource::Collider
            } else {
                CurveSource::Direct
            },
            cl: if i < 2 { 0.95 } else { 0.9 },
            interaction: Interaction::SpinIndependent,
            points: (0..300)
                .map(|k| {
                    let m = 10f64.powf(f64::from(k) / 100.0);
                    (m, 1e-46 * (m + 30.0 / m) * f64::from(i + 1))
                })
                .collect(),
        })
        .collect()
}

fn bench(c: &mut Criterion) {
    let mut g = c.benchmark_group("plot");
    g.sample_size(10).measurement_time(Duration::from_secs(3));
    let (d, l) = (exclusion_data(), labels());
    g.bench_function("exclusion_30x30", |b| {
        b.iter(|| plot::render_exclusion(black_box(&d), &l).map(|s| s.len()))
    });
    let cs = curves();
    g.bench_function("dm_nucleon_4x300", |b| {
        b.iter(|| plot::render_dm_nucleon(black_box(&cs), &l).map(|s| s.len()))
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
