//! `recoil inspect FILES…`: what is in event files.

use anyhow::Context;
use recoil::events::{FileCombination, Inspection, InvisibleSet, ReadOptions, inspect_sample};
use std::io::Write;
use std::path::PathBuf;

/// How several files are combined (see the weight convention in the README).
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Combine {
    /// Independent runs of one process: σ is the event-count-weighted mean.
    Runs,
    /// Different processes: the cross-sections add.
    Processes,
}

/// Arguments of `recoil inspect`.
#[derive(Debug, clap::Args)]
pub struct InspectArgs {
    /// Event files (LHEF 1.0/2.0/3.0, plain or gzip-compressed) read as one sample.
    #[arg(required = true)]
    pub files: Vec<PathBuf>,
    /// Replace the invisible set by these PDG ids (comma-separated, sign ignored).
    #[arg(
        long,
        value_delimiter = ',',
        allow_negative_numbers = true,
        value_name = "IDS"
    )]
    pub invisible: Option<Vec<i32>>,
    /// Add these PDG ids to the invisible set (comma-separated, sign ignored).
    #[arg(
        long,
        value_delimiter = ',',
        allow_negative_numbers = true,
        value_name = "IDS"
    )]
    pub also_invisible: Vec<i32>,
    /// How several files are combined.
    #[arg(long, value_enum, default_value = "runs")]
    pub combine: Combine,
    /// Also write the full report as JSON to this file.
    #[arg(long, value_name = "FILE.json")]
    pub out: Option<PathBuf>,
}

impl InspectArgs {
    /// The reader options these arguments ask for.
    fn read_options(&self) -> ReadOptions {
        let base = match &self.invisible {
            Some(ids) => ids.clone(),
            None => InvisibleSet::DEFAULT_IDS.to_vec(),
        };
        ReadOptions {
            invisible: InvisibleSet::from_ids(
                base.into_iter().chain(self.also_invisible.iter().copied()),
            ),
            combination: match self.combine {
                Combine::Runs => FileCombination::IndependentRuns,
                Combine::Processes => FileCombination::SeparateProcesses,
            },
        }
    }
}

/// Runs `recoil inspect`.
pub fn run(args: InspectArgs) -> anyhow::Result<()> {
    let opts = args.read_options();
    let bar = super::progress::bytes_bar(&args.files, "reading events");
    let progress = |n: u64| {
        if let Some(b) = &bar {
            b.set_position(n);
        }
    };
    let report =
        inspect_sample(&args.files, opts, Some(&progress)).context("reading the event files")?;
    if let Some(b) = &bar {
        b.finish_and_clear();
    }
    let mut out = std::io::stdout().lock();
    print_report(&mut out, &report)?;
    if let Some(path) = &args.out {
        let json = serde_json::to_vec_pretty(&report).context("encoding the report as JSON")?;
        super::output::write_atomically(path, &json)
            .with_context(|| format!("writing {}", path.display()))?;
    }
    Ok(())
}

fn fmt_opt(v: Option<f64>) -> String {
    v.map_or_else(|| "—".into(), |v| format!("{v:.1}"))
}

fn print_report(out: &mut impl Write, r: &Inspection) -> std::io::Result<()> {
    let s = &r.summary;
    writeln!(out, "Files")?;
    writeln!(
        out,
        "  {:<40} {:>7} {:>6} {:>12} {:>10} {:>10} {:>7} {:>11} {:>14}",
        "file",
        "LHEF",
        "IDWTUP",
        "beams",
        "√s [GeV]",
        "events",
        "PDF",
        "σ_init [pb]",
        "σ_weights [pb]"
    )?;
    for (f, fs) in r.info.files.iter().zip(&s.files) {
        let name = f.path.display().to_string();
        let name = if name.chars().count() > 40 {
            format!(
                "…{}",
                name.chars()
                    .rev()
                    .take(39)
                    .collect::<Vec<_>>()
                    .into_iter()
                    .rev()
                    .collect::<String>()
            )
        } else {
            name
        };
        writeln!(
            out,
            "  {:<40} {:>7} {:>6} {:>12} {:>10.1} {:>10} {:>7} {:>11.4e} {:>14.4e}",
            name,
            format!("{}{}", f.version, if f.gzip { " gz" } else { "" }),
            f.idwtup,
            format!("{} {}", f.beam_ids[0], f.beam_ids[1]),
            f.sqrt_s_gev,
            fs.n_events,
            f.pdf_sets[0],
            fs.xsec_init_pb,
            fs.xsec_pb,
        )?;
    }
    writeln!(out)?;
    writeln!(out, "Sample")?;
    writeln!(out, "  events                 {}", s.n_events)?;
    writeln!(
        out,
        "  σ from <init> [pb]     {:.6e} ± {:.2e}",
        s.xsec_init_pb, s.xsec_err_init_pb
    )?;
    writeln!(
        out,
        "  σ from weights [pb]    {:.6e} ± {:.2e}",
        s.xsec_pb, s.xsec_err_pb
    )?;
    writeln!(out, "  weight convention      {}", s.weight_convention)?;
    writeln!(
        out,
        "  Σw, Σw² (raw XWGTUP)   {:.6e}, {:.6e}",
        s.sum_w, s.sum_w2
    )?;
    writeln!(
        out,
        "  negative weights       {:.4} %",
        100.0 * s.negative_weight_fraction
    )?;
    if s.weight_names.is_empty() {
        writeln!(out, "  weight variations      none")?;
    } else {
        let shown: Vec<&str> = s.weight_names.iter().take(8).map(String::as_str).collect();
        writeln!(
            out,
            "  weight variations      {}: {}{}",
            s.weight_names.len(),
            shown.join(", "),
            if s.weight_names.len() > 8 {
                ", …"
            } else {
                ""
            }
        )?;
    }
    let inv: Vec<String> = r.info.invisible_ids.iter().map(i32::to_string).collect();
    writeln!(out, "  invisible ids          {}", inv.join(", "))?;
    writeln!(out)?;
    writeln!(out, "Final-state particles")?;
    writeln!(
        out,
        "  {:>10} {:>12} {:>12}",
        "PDG id", "count", "per event"
    )?;
    for &(id, n) in &r.census.final_state_ids {
        writeln!(
            out,
            "  {:>10} {:>12} {:>12.3}",
            id,
            n,
            n as f64 / s.n_events.max(1) as f64
        )?;
    }
    writeln!(out)?;
    writeln!(
        out,
        "Distributions (each event counts once; 1-GeV histogram resolution)"
    )?;
    let q = &r.census.truth_met_gev;
    let head: Vec<String> = q
        .values
        .iter()
        .map(|(f, _)| format!("{:>8}", format!("{:.0}%", 100.0 * f)))
        .collect();
    writeln!(
        out,
        "  {:<30} {} {:>9}",
        "quantity [GeV]",
        head.join(" "),
        "max"
    )?;
    for (name, q) in [
        ("truth missing pT", &r.census.truth_met_gev),
        ("leading visible parton pT", &r.census.lead_parton_pt_gev),
    ] {
        let vals: Vec<String> = q
            .values
            .iter()
            .map(|(_, v)| format!("{:>8}", fmt_opt(*v)))
            .collect();
        writeln!(out, "  {:<30} {} {:>9.1}", name, vals.join(" "), q.max)?;
    }
    Ok(())
}
