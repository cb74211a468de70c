//! Writes a generated LHEF 3.0 file for reader benchmarks (not physics):
//! `cargo run --release --example make-bench-events -- OUT.lhe [N_EVENTS]`.

#[path = "../tests/events_support/mod.rs"]
mod events_support;

fn main() -> anyhow::Result<()> {
    let mut args = std::env::args().skip(1);
    let out = args
        .next()
        .ok_or_else(|| anyhow::anyhow!("usage: make-bench-events OUT.lhe [N_EVENTS]"))?;
    let n_events: usize = match args.next() {
        Some(n) => n.parse()?,
        None => 1_000_000,
    };
    let spec = events_support::Spec {
        n_events,
        idwtup: -4,
        processes: vec![(1, 2.0, 0.1), (2, 1.0, 0.1)],
        negative_every: 9,
        weight_names: (0..9).map(|k| format!("{}", 1001 + k)).collect(),
        ..Default::default()
    };
    let mut w = std::io::BufWriter::new(std::fs::File::create(&out)?);
    events_support::write_lhef(&spec, &mut w)?;
    Ok(())
}
