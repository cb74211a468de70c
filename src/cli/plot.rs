//! `recoil plot exclusion|dm-nucleon|distributions|cutflow …`: figures from
//! the files `recoil scan`, `recoil recast` and `recoil direct` write.

use std::path::{Path, PathBuf};

use anyhow::{Context, bail};
use recoil::plot::{self, Curve, CurveSource, FigureFiles, Interaction, Labels, data};

/// Arguments of `recoil plot`.
#[derive(Debug, clap::Args)]
pub struct PlotArgs {
    #[command(subcommand)]
    figure: Box<Figure>,
}

#[derive(Debug, clap::Subcommand)]
enum Figure {
    /// Exclusion in the (M, m_χ) plane from a scan folder (results.csv, contours.csv).
    Exclusion(ExclusionArgs),
    /// The DM–nucleon plane (log–log) from a scan folder and/or curve files.
    DmNucleon(DmNucleonArgs),
    /// p_T^miss and leading-jet p_T, truth and reco, from a recast folder
    /// (distributions.csv, yields.csv).
    Distributions(DistributionsArgs),
    /// Cumulative efficiency after each cut from a recast folder (cutflow.csv).
    Cutflow(CutflowArgs),
}

/// Labels shared by every figure.
#[derive(Debug, clap::Args)]
struct LabelArgs {
    /// Figure title (for example the search's name).
    #[arg(long)]
    title: Option<String>,
    /// Centre-of-mass energy √s in TeV, stated on the figure.
    #[arg(long, value_name = "TEV")]
    sqrt_s_tev: Option<f64>,
    /// Integrated luminosity in fb⁻¹, stated on the figure.
    #[arg(long, value_name = "IFB")]
    lumi_ifb: Option<f64>,
    /// A further line of text for the side panel (repeatable).
    #[arg(long = "note", value_name = "TEXT")]
    notes: Vec<String>,
    /// Output figure, FILE.svg; the figure's data goes to FILE.csv beside it.
    #[arg(long, value_name = "FILE.svg")]
    out: PathBuf,
}

/// Model labels of collider figures.
#[derive(Debug, clap::Args)]
struct ModelArgs {
    /// Mediator type stated on the figure, e.g. vector, axial-vector.
    #[arg(long)]
    mediator: Option<String>,
    /// Couplings stated on the figure, e.g. "g_q = 0.25, g_χ = 1"; by default
    /// taken from the scan's results.csv when all points share them.
    #[arg(long)]
    couplings: Option<String>,
    /// Confidence level of the collider limits, a fraction.
    #[arg(long, default_value_t = 0.95, value_name = "CL")]
    collider_cl: f64,
}

#[derive(Debug, clap::Args)]
struct ExclusionArgs {
    /// Scan output folder holding results.csv and contours.csv.
    scan_dir: PathBuf,
    #[command(flatten)]
    model: ModelArgs,
    #[command(flatten)]
    labels: LabelArgs,
}

#[derive(Debug, clap::Args)]
struct DmNucleonArgs {
    /// Scan output folder holding dm_nucleon.csv (and results.csv for the couplings).
    #[arg(long, value_name = "DIR")]
    scan: Option<PathBuf>,
    /// A direct-detection curve from `recoil direct curve`, as LABEL=FILE.csv
    /// (repeatable).
    #[arg(long = "direct", value_name = "LABEL=FILE")]
    direct: Vec<String>,
    /// An external curve (header with m_dm_gev and sigma_cm2), as
    /// LABEL=FILE.csv (repeatable).
    #[arg(long = "import", value_name = "LABEL=FILE")]
    imported: Vec<String>,
    /// Confidence level of the --direct and --import curves, a fraction.
    #[arg(long, default_value_t = 0.9, value_name = "CL")]
    curve_cl: f64,
    /// Which cross-section to show: SI, SD-p or SD-n; by default the only one
    /// in dm_nucleon.csv, or SI.
    #[arg(long)]
    interaction: Option<String>,
    #[command(flatten)]
    model: ModelArgs,
    #[command(flatten)]
    labels: LabelArgs,
}

#[derive(Debug, clap::Args)]
struct DistributionsArgs {
    /// Recast output folder holding distributions.csv and yields.csv.
    recast_dir: PathBuf,
    /// Leave out the per-region signal and background panel (yields.csv is
    /// still read for the region edges).
    #[arg(long)]
    no_regions: bool,
    #[command(flatten)]
    labels: LabelArgs,
}

#[derive(Debug, clap::Args)]
struct CutflowArgs {
    /// Recast output folder holding cutflow.csv.
    recast_dir: PathBuf,
    #[command(flatten)]
    labels: LabelArgs,
}

impl LabelArgs {
    fn labels(&self, model: Option<&ModelArgs>) -> Labels {
        Labels {
            title: self.title.clone(),
            mediator: model.and_then(|m| m.mediator.clone()),
            couplings: model.and_then(|m| m.couplings.clone()),
            sqrt_s_tev: self.sqrt_s_tev,
            lumi_ifb: self.lumi_ifb,
            collider_cl: model.map_or(0.95, |m| m.collider_cl),
            notes: self.notes.clone(),
        }
    }

    /// Checks the output path and the label numbers before any file is read.
    fn check_out(&self) -> anyhow::Result<()> {
        self.labels(None).check()?;
        let ok = self
            .out
            .extension()
            .and_then(|e| e.to_str())
            .is_some_and(|e| e.eq_ignore_ascii_case("svg"));
        if !ok {
            bail!(
                "--out {}: the figure must be an .svg file (PNG is not offered: it needs system fonts)",
                self.out.display()
            );
        }
        Ok(())
    }
}

/// `LABEL=FILE` into its parts; a bare FILE takes its stem as label.
fn label_file(arg: &str, flag: &str) -> anyhow::Result<(String, PathBuf)> {
    let (label, file) = match arg.split_once('=') {
        Some((l, f)) => (l.trim().to_string(), PathBuf::from(f)),
        None => {
            let p = PathBuf::from(arg);
            let stem = p
                .file_stem()
                .map(|s| s.to_string_lossy().into_owned())
                .unwrap_or_default();
            (stem, p)
        }
    };
    if label.is_empty() || file.as_os_str().is_empty() {
        bail!("{flag} `{arg}`: expected LABEL=FILE.csv");
    }
    Ok((label, file))
}

fn parse_interaction(s: &str) -> anyhow::Result<Interaction> {
    Interaction::parse(s)
        .with_context(|| format!("--interaction `{s}`: must be one of SI, SD-p, SD-n"))
}

fn report(files: &FigureFiles) {
    println!("{:<8} {}", "figure", files.svg.display());
    println!("{:<8} {}", "data", files.csv.display());
}

fn couplings_from(results: &Path) -> anyhow::Result<Option<String>> {
    let rows = data::read_scan_results(results).context("reading the scan results")?;
    Ok(data::uniform_couplings(&rows))
}

/// Runs `recoil plot`.
pub fn run(args: PlotArgs) -> anyhow::Result<()> {
    match *args.figure {
        Figure::Exclusion(a) => exclusion(a),
        Figure::DmNucleon(a) => dm_nucleon(a),
        Figure::Distributions(a) => distributions(a),
        Figure::Cutflow(a) => cutflow(a),
    }
}

fn exclusion(a: ExclusionArgs) -> anyhow::Result<()> {
    a.labels.check_out()?;
    let mut labels = a.labels.labels(Some(&a.model));
    labels.check()?;
    let (d, couplings) =
        data::read_scan_exclusion(&a.scan_dir).context("reading the scan folder")?;
    if labels.couplings.is_none() {
        labels.couplings = couplings;
        if labels.couplings.is_none() {
            bail!(
                "{}: the points have different couplings; state them with --couplings",
                a.scan_dir.join("results.csv").display()
            );
        }
    }
    let files = plot::exclusion_figure(&d, &labels, &a.labels.out).context("writing the figure")?;
    report(&files);
    Ok(())
}

fn dm_nucleon(a: DmNucleonArgs) -> anyhow::Result<()> {
    a.labels.check_out()?;
    let mut labels = a.labels.labels(Some(&a.model));
    labels.check()?;
    if !(a.curve_cl > 0.0 && a.curve_cl < 1.0) {
        bail!("--curve-cl must lie in (0, 1), got {}", a.curve_cl);
    }
    let chosen = a
        .interaction
        .as_deref()
        .map(parse_interaction)
        .transpose()?;
    let direct = a
        .direct
        .iter()
        .map(|s| label_file(s, "--direct"))
        .collect::<anyhow::Result<Vec<_>>>()?;
    let imported = a
        .imported
        .iter()
        .map(|s| label_file(s, "--import"))
        .collect::<anyhow::Result<Vec<_>>>()?;
    if a.scan.is_none() && direct.is_empty() && imported.is_empty() {
        bail!("nothing to plot: give --scan DIR, --direct LABEL=FILE or --import LABEL=FILE");
    }

    let mut curves: Vec<Curve> = Vec::new();
    if let Some(dir) = &a.scan {
        let p = dir.join("dm_nucleon.csv");
        curves = data::read_dm_nucleon(&p).context("reading the DM–nucleon curves")?;
        if labels.couplings.is_none() {
            let r = dir.join("results.csv");
            if r.exists() {
                labels.couplings = couplings_from(&r)?;
            }
        }
    }
    let mut kinds: Vec<Interaction> = Vec::new();
    for c in &curves {
        if !kinds.contains(&c.interaction) {
            kinds.push(c.interaction);
        }
    }
    let interaction = match (chosen, kinds.as_slice()) {
        (Some(i), _) => i,
        (None, []) => Interaction::SpinIndependent,
        (None, [one]) => *one,
        (None, _) => {
            let names: Vec<&str> = kinds.iter().map(|k| k.as_str()).collect();
            bail!(
                "the scan's dm_nucleon.csv holds curves for {}; choose one with --interaction",
                names.join(", ")
            );
        }
    };
    curves.retain(|c| c.interaction == interaction);
    for (list, source) in [
        (&direct, CurveSource::Direct),
        (&imported, CurveSource::Imported),
    ] {
        for (label, file) in list {
            let c = data::read_curve_csv(file, label, source, a.curve_cl, interaction)
                .context("reading the curve")?;
            curves.push(c);
        }
    }
    if curves.is_empty() {
        bail!("no curve for {} to plot", interaction.as_str());
    }
    let files =
        plot::dm_nucleon_figure(&curves, &labels, &a.labels.out).context("writing the figure")?;
    report(&files);
    Ok(())
}

fn distributions(a: DistributionsArgs) -> anyhow::Result<()> {
    a.labels.check_out()?;
    let labels = a.labels.labels(None);
    let d = data::read_recast_distributions(&a.recast_dir, !a.no_regions)
        .context("reading the recast folder")?;
    let files =
        plot::distributions_figure(&d, &labels, &a.labels.out).context("writing the figure")?;
    report(&files);
    Ok(())
}

fn cutflow(a: CutflowArgs) -> anyhow::Result<()> {
    a.labels.check_out()?;
    let labels = a.labels.labels(None);
    let p = a.recast_dir.join("cutflow.csv");
    let d = data::read_cutflow(&p).context("reading the cut-flow")?;
    let files = plot::cutflow_figure(&d, &labels, &a.labels.out).context("writing the figure")?;
    report(&files);
    Ok(())
}
