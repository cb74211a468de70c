//! `recoil translate`: a simplified-model point or a collider exclusion
//! boundary → widths, Γ/M, BR(χχ̄), σ_SI / σ_SD.

use anyhow::Context;
use recoil::model::{
    self, BoundaryPoint, ColliderCurve, CouplingLimit, CouplingPath, Couplings, Mediator,
    MediatorKind, ModelError, Nucleon, NucleonCrossSection, NucleonParams, ScatteringType,
    WIDE_WIDTH_OVER_MASS,
};
use recoil::scan::{ContourCurve, ScanExclusion};
use std::path::{Path, PathBuf};

/// Translate a simplified s-channel mediator model.
///
/// Point mode (--mmed and --mdm): partial and total widths, Γ/M, BR(χχ̄)
/// and the DM–nucleon cross-section (σ_SI for vector and scalar, σ_SD for
/// axial mediators). Curve mode (--curve FILE|DIR): a collider exclusion
/// boundary (for each m_DM the largest excluded mediator mass), given as a
/// CSV table or as a scan output folder, becomes a limit curve σ(m_DM) in
/// the DM–nucleon plane.
#[derive(Debug, clap::Args)]
pub struct TranslateArgs {
    /// Mediator type: vector, axial, scalar or pseudoscalar. Required except
    /// with a scan folder, whose result.json names it (if given there, it
    /// must agree).
    #[arg(long)]
    pub mediator: Option<String>,
    /// Quark coupling g_q (universal; Yukawa-scaled for scalar and
    /// pseudoscalar) [default: 0.25; a scan folder's own otherwise].
    #[arg(long, allow_negative_numbers = true)]
    pub gq: Option<f64>,
    /// Dark-matter coupling g_DM [default: 1; a scan folder's own otherwise].
    #[arg(long, allow_negative_numbers = true)]
    pub gdm: Option<f64>,
    /// Lepton coupling g_l [default: 0; a scan folder's own otherwise].
    #[arg(long, allow_negative_numbers = true)]
    pub gl: Option<f64>,
    /// Mediator mass M [GeV] (point mode).
    #[arg(
        long,
        conflicts_with = "curve",
        requires = "mdm",
        allow_negative_numbers = true
    )]
    pub mmed: Option<f64>,
    /// Dark-matter mass m_DM [GeV] (point mode).
    #[arg(
        long,
        conflicts_with = "curve",
        requires = "mmed",
        allow_negative_numbers = true
    )]
    pub mdm: Option<f64>,
    /// Point mode: the upper limit on the signal strength μ obtained at these
    /// couplings; prints the excluded couplings on three paths (g_q at fixed
    /// g_DM, g_DM at fixed g_q, g_q = g_DM).
    #[arg(long, requires = "mmed", allow_negative_numbers = true)]
    pub mu_limit: Option<f64>,
    /// Curve mode: a CSV with columns m_dm_gev,m_med_limit_gev and optionally
    /// m_med_limit_exp_gev (masses in GeV) at the given couplings; or a scan
    /// output folder (or its result.json): mediator, couplings and CL from
    /// the scan, every contour of contours.csv translated.
    #[arg(long, required_unless_present = "mmed")]
    pub curve: Option<PathBuf>,
    /// Confidence level of the collider boundary (curve mode) [default: 0.95;
    /// a scan folder's own otherwise].
    #[arg(long, allow_negative_numbers = true)]
    pub cl: Option<f64>,
    /// Target nucleon: proton, neutron or both.
    #[arg(long, default_value = "both")]
    pub nucleon: String,
    /// Nucleon parameter set: dmwg2016 or lattice2015 [default: dmwg2016,
    /// or a scan folder's own].
    #[arg(long)]
    pub nucleon_set: Option<String>,
    /// Write the results to FILE: .csv (a table) or .json (with provenance).
    #[arg(long)]
    pub out: Option<PathBuf>,
}

/// Output file formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Format {
    Csv,
    Json,
}

/// What to compute.
#[derive(Debug)]
enum Mode {
    Point {
        mediator: Mediator,
        mu_limit: Option<f64>,
    },
    Curve {
        path: PathBuf,
        cl: f64,
    },
    /// Curve mode on a scan output folder.
    Scan(Box<ScanExclusion>),
}

/// The validated configuration of one `recoil translate` run.
#[derive(Debug)]
struct Config {
    kind: MediatorKind,
    couplings: Couplings,
    nucleons: Vec<Nucleon>,
    params: NucleonParams,
    mode: Mode,
    out: Option<(PathBuf, Format)>,
}

/// Default couplings and confidence level when no scan supplies them.
const DEFAULT_GQ: f64 = 0.25;
const DEFAULT_GDM: f64 = 1.0;
const DEFAULT_GL: f64 = 0.0;
const DEFAULT_CL: f64 = 0.95;
/// Nucleon parameter set when neither the option nor a scan folder names
/// one (also the scan's default, for folders that do not record theirs).
const DEFAULT_NUCLEON_SET: &str = "dmwg2016";

/// A flag given next to a scan folder must agree with the scan's value:
/// taking either silently would hide a mistake.
fn agree<T: PartialEq + std::fmt::Display>(
    flag: &str,
    given: Option<T>,
    scan: T,
    field: &str,
    file: &Path,
) -> anyhow::Result<()> {
    match given {
        Some(g) if g != scan => anyhow::bail!(
            "{flag} {g} disagrees with the scan ({field} = {scan} in {}); leave {flag} out to \
             use the scan's value",
            file.display()
        ),
        _ => Ok(()),
    }
}

/// Kind, couplings and nucleon parameter set from a scan folder, with the
/// flags checked against it.
fn from_scan(
    a: &TranslateArgs,
    s: &ScanExclusion,
) -> anyhow::Result<(MediatorKind, Couplings, NucleonParams)> {
    let given_kind = a
        .mediator
        .as_deref()
        .map(str::parse::<MediatorKind>)
        .transpose()
        .context("--mediator")?;
    agree(
        "--mediator",
        given_kind,
        s.mediator,
        "mediator",
        &s.manifest,
    )?;
    let results = s.dir.join("results.csv");
    agree("--gq", a.gq, s.couplings.g_q, "g_q", &results)?;
    agree("--gdm", a.gdm, s.couplings.g_dm, "g_dm", &results)?;
    agree(
        "--gl",
        a.gl,
        s.couplings.g_l,
        "reference_couplings.g_l",
        &s.manifest,
    )?;
    agree("--cl", a.cl, s.cl, "limit.cl", &s.manifest)?;
    let set = s.nucleon_params.as_deref().unwrap_or(DEFAULT_NUCLEON_SET);
    agree(
        "--nucleon-set",
        a.nucleon_set
            .as_deref()
            .map(|g| g.trim().to_ascii_lowercase()),
        set.to_ascii_lowercase(),
        "nucleon_params",
        &s.manifest,
    )?;
    let params = NucleonParams::by_name(set).context("nucleon_params of the scan")?;
    if s.mediator == MediatorKind::Pseudoscalar {
        return Err(ModelError::MomentumSuppressed)
            .with_context(|| format!("{}: mediator pseudoscalar", s.manifest.display()));
    }
    let couplings = s
        .model_couplings()
        .with_context(|| format!("couplings of the scan in {}", s.dir.display()))?;
    Ok((s.mediator, couplings, params))
}

impl TryFrom<&TranslateArgs> for Config {
    type Error = anyhow::Error;

    fn try_from(a: &TranslateArgs) -> anyhow::Result<Self> {
        let nucleons = match a.nucleon.trim().to_ascii_lowercase().as_str() {
            "both" => Nucleon::BOTH.to_vec(),
            other => vec![other.parse::<Nucleon>().context("--nucleon")?],
        };
        let scan = match &a.curve {
            Some(p) if ScanExclusion::is_scan_path(p) => Some(
                ScanExclusion::read(p)
                    .with_context(|| format!("reading the scan output {}", p.display()))?,
            ),
            _ => None,
        };
        let (kind, couplings, params) = match &scan {
            Some(s) => from_scan(a, s)?,
            None => {
                if let Some(p) = &a.curve
                    && !p.exists()
                {
                    anyhow::bail!(
                        "--curve {}: no such file or folder (a boundary table .csv or a scan \
                         output folder)",
                        p.display()
                    );
                }
                let Some(name) = &a.mediator else {
                    anyhow::bail!(
                        "--mediator is required (vector, axial, scalar or pseudoscalar), except \
                         with --curve on a scan output folder"
                    );
                };
                let kind: MediatorKind = name.parse().context("--mediator")?;
                let couplings = Couplings::with_leptons(
                    a.gq.unwrap_or(DEFAULT_GQ),
                    a.gdm.unwrap_or(DEFAULT_GDM),
                    a.gl.unwrap_or(DEFAULT_GL),
                )
                .context("--gq/--gdm/--gl")?;
                let set = a.nucleon_set.as_deref().unwrap_or(DEFAULT_NUCLEON_SET);
                let params = NucleonParams::by_name(set).context("--nucleon-set")?;
                (kind, couplings, params)
            }
        };
        let mode = match (scan, &a.curve, a.mmed, a.mdm) {
            (Some(s), _, _, _) => Mode::Scan(Box::new(s)),
            (None, Some(path), _, _) => {
                let cl = a.cl.unwrap_or(DEFAULT_CL);
                if !(cl > 0.0 && cl < 1.0) {
                    anyhow::bail!("--cl must be in (0, 1), got {cl}");
                }
                if kind == MediatorKind::Pseudoscalar {
                    return Err(ModelError::MomentumSuppressed).context("--curve");
                }
                Mode::Curve {
                    path: path.clone(),
                    cl,
                }
            }
            (None, None, Some(m_med), Some(m_dm)) => {
                let mediator =
                    Mediator::new(kind, m_med, m_dm, couplings).context("--mmed/--mdm")?;
                if let Some(mu) = a.mu_limit
                    && !(mu.is_finite() && mu > 0.0)
                {
                    anyhow::bail!("--mu-limit must be finite and > 0, got {mu}");
                }
                Mode::Point {
                    mediator,
                    mu_limit: a.mu_limit,
                }
            }
            _ => anyhow::bail!("give either --mmed and --mdm (point mode) or --curve FILE|DIR"),
        };
        let out = match &a.out {
            None => None,
            Some(p) => {
                let format = match p.extension().and_then(|e| e.to_str()) {
                    Some(e) if e.eq_ignore_ascii_case("csv") => Format::Csv,
                    Some(e) if e.eq_ignore_ascii_case("json") => Format::Json,
                    _ => anyhow::bail!(
                        "--out {}: unknown format, the name must end in .csv or .json",
                        p.display()
                    ),
                };
                Some((p.clone(), format))
            }
        };
        Ok(Config {
            kind,
            couplings,
            nucleons,
            params,
            mode,
            out,
        })
    }
}

/// Runs `recoil translate`.
pub fn run(args: TranslateArgs) -> anyhow::Result<()> {
    let cfg = Config::try_from(&args)?;
    match &cfg.mode {
        Mode::Point { mediator, mu_limit } => run_point(&cfg, mediator, *mu_limit),
        Mode::Curve { path, cl } => run_curve(&cfg, path, *cl),
        Mode::Scan(scan) => run_scan_curve(&cfg, scan),
    }
}

/// Results of point mode, also the JSON document.
#[derive(Debug, serde::Serialize)]
struct PointReport {
    program: String,
    caution: &'static str,
    mediator: MediatorKind,
    m_med_gev: f64,
    m_dm_gev: f64,
    couplings: Couplings,
    widths: Vec<ChannelWidth>,
    total_width_gev: f64,
    width_over_mass: f64,
    wide: bool,
    wide_threshold: f64,
    br_dm: f64,
    regime: model::ProductionRegime,
    approximation: &'static str,
    nucleon_params: &'static str,
    nucleon_params_source: &'static str,
    cross_sections: Vec<NucleonCrossSection>,
    cross_section_note: Option<String>,
    mu_limit: Option<f64>,
    coupling_limits: Vec<PathLimit>,
}

#[derive(Debug, serde::Serialize)]
struct ChannelWidth {
    channel: &'static str,
    width_gev: f64,
    br: f64,
}

#[derive(Debug, serde::Serialize)]
struct PathLimit {
    path: String,
    limit: Option<CouplingLimit>,
    note: Option<String>,
}

const CAUTION: &str = "estimates within a simplified model; no substitute for an \
                       experiment's official analysis";

fn run_point(cfg: &Config, m: &Mediator, mu_limit: Option<f64>) -> anyhow::Result<()> {
    let total = m.total_width_gev();
    let widths = m
        .partial_widths_gev()
        .into_iter()
        .map(|(ch, w)| ChannelWidth {
            channel: ch.name(),
            width_gev: w,
            br: if total > 0.0 { w / total } else { 0.0 },
        })
        .collect();
    let (cross_sections, cross_section_note) = match cfg
        .nucleons
        .iter()
        .map(|&n| m.sigma_nucleon_cm2(n, &cfg.params))
        .collect::<Result<Vec<_>, _>>()
    {
        Ok(v) => (v, None),
        Err(e @ ModelError::MomentumSuppressed) => (Vec::new(), Some(e.to_string())),
        Err(e) => return Err(e.into()),
    };
    let coupling_limits = match mu_limit {
        None => Vec::new(),
        Some(mu) => {
            let c = m.couplings();
            [
                CouplingPath::QuarkAtFixedDm(c.g_dm()),
                CouplingPath::DmAtFixedQuark(c.g_q()),
                CouplingPath::Equal,
            ]
            .into_iter()
            .map(|path| match m.excluded_coupling(mu, path) {
                Ok(l) => Ok(PathLimit {
                    path: path.describe(),
                    limit: Some(l),
                    note: None,
                }),
                Err(e @ ModelError::NoSolution { .. }) => Ok(PathLimit {
                    path: path.describe(),
                    limit: None,
                    note: Some(e.to_string()),
                }),
                Err(e) => Err(e),
            })
            .collect::<Result<Vec<_>, _>>()?
        }
    };
    let report = PointReport {
        program: format!("recoil {}", env!("CARGO_PKG_VERSION")),
        caution: CAUTION,
        mediator: cfg.kind,
        m_med_gev: m.m_med_gev(),
        m_dm_gev: m.m_dm_gev(),
        couplings: m.couplings(),
        widths,
        total_width_gev: total,
        width_over_mass: m.width_over_mass(),
        wide: m.is_wide(),
        wide_threshold: WIDE_WIDTH_OVER_MASS,
        br_dm: m.br_dm(),
        regime: m.regime(),
        approximation: m.regime().approximation(),
        nucleon_params: cfg.params.name,
        nucleon_params_source: cfg.params.source,
        cross_sections,
        cross_section_note,
        mu_limit,
        coupling_limits,
    };
    print_point(&report);
    if let Some((path, format)) = &cfg.out {
        let bytes = match format {
            Format::Json => serde_json::to_vec_pretty(&report)?,
            Format::Csv => point_csv(&report)?,
        };
        super::output::write_atomically(path, &bytes)?;
    }
    Ok(())
}

fn print_point(r: &PointReport) {
    let c = r.couplings;
    println!(
        "{} mediator: M = {} GeV, m_DM = {} GeV, g_q = {}, g_DM = {}, g_l = {}",
        r.mediator,
        r.m_med_gev,
        r.m_dm_gev,
        c.g_q(),
        c.g_dm(),
        c.g_l()
    );
    println!();
    println!("{:<8} {:>14} {:>12}", "channel", "Γ [GeV]", "BR");
    for w in &r.widths {
        println!("{:<8} {:>14.6e} {:>12.6e}", w.channel, w.width_gev, w.br);
    }
    println!("{:<8} {:>14.6e} {:>12}", "total", r.total_width_gev, "1");
    println!();
    println!("Γ/M       {:.6e}", r.width_over_mass);
    println!("BR(χχ̄)    {:.6e}", r.br_dm);
    if r.wide {
        println!(
            "warning: Γ/M = {:.3} exceeds {}: the narrow-width picture (Breit–Wigner peak, \
             σ×BR factorisation, coupling rescaling) is unreliable here",
            r.width_over_mass, r.wide_threshold
        );
    }
    println!("rescaling: {}", r.approximation);
    println!();
    match &r.cross_section_note {
        Some(note) => println!("{note}"),
        None => {
            println!("{:<8} {:>18} {:>12}", "nucleon", "σ [cm²]", "μ_nχ [GeV]");
            for x in &r.cross_sections {
                println!(
                    "{:<8} {:>18.3e} {:>12.6}",
                    format!("{}", x.nucleon),
                    x.sigma_cm2,
                    x.reduced_mass_gev
                );
            }
            if let Some(x) = r.cross_sections.first() {
                println!(
                    "(σ_{} at zero momentum transfer; nucleon set {}: {})",
                    x.kind.short(),
                    r.nucleon_params,
                    r.nucleon_params_source
                );
            }
        }
    }
    if let Some(mu) = r.mu_limit {
        println!();
        println!("excluded couplings for μ_up = {mu} at these couplings:");
        for l in &r.coupling_limits {
            match (&l.limit, &l.note) {
                (Some(x), _) => println!(
                    "  {:<18} excluded above g = {:.6}  (Γ/M there {:.4}{})",
                    l.path,
                    x.g_limit,
                    x.width_over_mass,
                    if x.wide { ", wide: unreliable" } else { "" }
                ),
                (None, Some(n)) => println!("  {:<18} {n}", l.path),
                (None, None) => {}
            }
        }
    }
    println!();
    println!("note: {CAUTION}");
}

fn point_csv(r: &PointReport) -> anyhow::Result<Vec<u8>> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(["quantity", "value", "unit"])?;
    let c = r.couplings;
    let mut row = |q: &str, v: String, u: &str| w.write_record([q, &v, u]);
    row("mediator", r.mediator.to_string(), "")?;
    row("m_med", r.m_med_gev.to_string(), "GeV")?;
    row("m_dm", r.m_dm_gev.to_string(), "GeV")?;
    row("g_q", c.g_q().to_string(), "")?;
    row("g_dm", c.g_dm().to_string(), "")?;
    row("g_l", c.g_l().to_string(), "")?;
    for ch in &r.widths {
        row(
            &format!("width_{}", ch.channel),
            ch.width_gev.to_string(),
            "GeV",
        )?;
    }
    row("total_width", r.total_width_gev.to_string(), "GeV")?;
    row("width_over_mass", r.width_over_mass.to_string(), "")?;
    row("br_dm", r.br_dm.to_string(), "")?;
    for x in &r.cross_sections {
        row(
            &format!("sigma_{}_{}", x.kind.short(), x.nucleon),
            format!("{:e}", x.sigma_cm2),
            "cm2",
        )?;
    }
    for l in &r.coupling_limits {
        if let Some(x) = &l.limit {
            row(&format!("g_limit ({})", l.path), x.g_limit.to_string(), "")?;
        }
    }
    Ok(w.into_inner()?)
}

/// JSON document of curve mode.
#[derive(Debug, serde::Serialize)]
struct CurveReport<'a> {
    program: String,
    caution: &'static str,
    input: String,
    nucleon_params_source: &'static str,
    curves: &'a [ColliderCurve],
}

fn run_curve(cfg: &Config, path: &Path, cl: f64) -> anyhow::Result<()> {
    let file = std::fs::File::open(path)
        .with_context(|| format!("opening collider boundary {}", path.display()))?;
    let boundary: Vec<BoundaryPoint> =
        model::read_boundary_csv(std::io::BufReader::new(file), &path.display().to_string())?;
    let curves = cfg
        .nucleons
        .iter()
        .map(|&n| model::collider_curve(cfg.kind, cfg.couplings, n, &cfg.params, cl, &boundary))
        .collect::<Result<Vec<_>, _>>()
        .with_context(|| format!("collider boundary {}", path.display()))?;
    print_curves(&curves);
    if let Some((out, format)) = &cfg.out {
        let bytes = match format {
            Format::Csv => curve_csv(&curves)?,
            Format::Json => serde_json::to_vec_pretty(&CurveReport {
                program: format!("recoil {}", env!("CARGO_PKG_VERSION")),
                caution: CAUTION,
                input: path.display().to_string(),
                nucleon_params_source: cfg.params.source,
                curves: &curves,
            })?,
        };
        super::output::write_atomically(out, &bytes)?;
    }
    Ok(())
}

fn print_curves(curves: &[ColliderCurve]) {
    for c in curves {
        let k = c.kind.short();
        println!("{} ({}, nucleon set {})", c.note, c.nucleon, c.params);
        println!(
            "{:>12} {:>16} {:>18} {:>16} {:>18}",
            "m_DM [GeV]",
            "M_obs [GeV]",
            format!("σ_{k},obs [cm²]"),
            "M_exp [GeV]",
            format!("σ_{k},exp [cm²]")
        );
        for p in &c.points {
            let exp_m = p.m_med_limit_exp_gev.map_or("-".into(), |v| format!("{v}"));
            let exp_s = p.sigma_exp_cm2.map_or("-".into(), |v| format!("{v:.3e}"));
            println!(
                "{:>12} {:>16} {:>18.3e} {:>16} {:>18}",
                p.m_dm_gev, p.m_med_limit_obs_gev, p.sigma_obs_cm2, exp_m, exp_s
            );
        }
        println!();
    }
    println!("note: {CAUTION}");
}

fn curve_csv(curves: &[ColliderCurve]) -> anyhow::Result<Vec<u8>> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record([
        "m_dm_gev",
        "m_med_limit_obs_gev",
        "m_med_limit_exp_gev",
        "nucleon",
        "scattering",
        "sigma_obs_cm2",
        "sigma_exp_cm2",
        "cl",
    ])?;
    for c in curves {
        for p in &c.points {
            let opt = |v: Option<f64>| v.map_or(String::new(), |x| format!("{x:e}"));
            w.write_record([
                p.m_dm_gev.to_string(),
                p.m_med_limit_obs_gev.to_string(),
                p.m_med_limit_exp_gev
                    .map_or(String::new(), |x| x.to_string()),
                c.nucleon.to_string(),
                c.kind.short().to_string(),
                format!("{:e}", p.sigma_obs_cm2),
                opt(p.sigma_exp_cm2),
                c.cl.to_string(),
            ])?;
        }
    }
    Ok(w.into_inner()?)
}

/// One translated contour polyline in the JSON document of a scan folder.
#[derive(Debug, serde::Serialize)]
struct ScanCurveOut<'a> {
    level: &'static str,
    segment: usize,
    nucleon: Nucleon,
    scattering: ScatteringType,
    params: &'static str,
    cl: f64,
    note: &'a str,
    points: Vec<ScanCurvePoint>,
}

#[derive(Debug, serde::Serialize)]
struct ScanCurvePoint {
    m_dm_gev: f64,
    m_med_limit_gev: f64,
    sigma_cm2: f64,
}

/// JSON document of curve mode on a scan folder.
#[derive(Debug, serde::Serialize)]
struct ScanCurveReport<'a> {
    program: String,
    caution: &'static str,
    input: String,
    mediator: MediatorKind,
    couplings: Couplings,
    reference_couplings: recoil::scan::plan::PointCouplings,
    cl: f64,
    nucleon_params_source: &'static str,
    notes: &'a [String],
    curves: Vec<ScanCurveOut<'a>>,
}

fn run_scan_curve(cfg: &Config, scan: &ScanExclusion) -> anyhow::Result<()> {
    let contours_path = scan.dir.join("contours.csv");
    if scan.is_empty() {
        let why = if scan.n_excluded == 0 {
            format!(
                "0 of the {} points in results.csv are excluded at {}% CL",
                scan.n_points,
                scan.cl * 100.0
            )
        } else {
            format!(
                "{} of the {} points in results.csv are excluded, but μ_up does not cross 1 \
                 between grid points (see the warnings in {})",
                scan.n_excluded,
                scan.n_points,
                scan.manifest.display()
            )
        };
        anyhow::bail!(
            "{}: no exclusion contour at any level ({why}), so there is no limit curve to \
             translate into the DM–nucleon plane",
            contours_path.display()
        );
    }
    let mut notes = Vec::new();
    let (c, r) = (&scan.couplings, &scan.reference);
    if (c.g_q, c.g_dm) != (r.g_q, r.g_dm) {
        notes.push(format!(
            "the points were evaluated at g_q = {}, g_DM = {} (signal rescaled from the \
             reference couplings g_q = {}, g_DM = {} the events were generated with); the \
             curves are at the points' couplings",
            c.g_q, c.g_dm, r.g_q, r.g_dm
        ));
    }
    for contour in scan.contours.iter().filter(|c| c.segments.is_empty()) {
        notes.push(format!(
            "no {} contour in {}",
            contour.level.name(),
            contours_path.display()
        ));
    }
    let curves = recoil::scan::translate_contours(
        cfg.kind,
        cfg.couplings,
        &cfg.nucleons,
        &cfg.params,
        scan.cl,
        &scan.contours,
    )
    .with_context(|| format!("translating the contours of {}", contours_path.display()))?;
    print_scan_curves(scan, &curves, &notes);
    if let Some((out, format)) = &cfg.out {
        let bytes = match format {
            Format::Csv => scan_curve_csv(&curves)?,
            Format::Json => serde_json::to_vec_pretty(&ScanCurveReport {
                program: format!("recoil {}", env!("CARGO_PKG_VERSION")),
                caution: CAUTION,
                input: scan.dir.display().to_string(),
                mediator: cfg.kind,
                couplings: cfg.couplings,
                reference_couplings: scan.reference,
                cl: scan.cl,
                nucleon_params_source: cfg.params.source,
                notes: &notes,
                curves: curves
                    .iter()
                    .map(|t| ScanCurveOut {
                        level: t.level.name(),
                        segment: t.segment,
                        nucleon: t.curve.nucleon,
                        scattering: t.curve.kind,
                        params: t.curve.params,
                        cl: t.curve.cl,
                        note: &t.curve.note,
                        points: t
                            .curve
                            .points
                            .iter()
                            .map(|p| ScanCurvePoint {
                                m_dm_gev: p.m_dm_gev,
                                m_med_limit_gev: p.m_med_limit_obs_gev,
                                sigma_cm2: p.sigma_obs_cm2,
                            })
                            .collect(),
                    })
                    .collect(),
            })?,
        };
        super::output::write_atomically(out, &bytes)?;
    }
    Ok(())
}

fn print_scan_curves(scan: &ScanExclusion, curves: &[ContourCurve], notes: &[String]) {
    println!(
        "scan {}: {} mediator, limits at {}% CL (CLs); contours from contours.csv",
        scan.dir.display(),
        scan.mediator,
        scan.cl * 100.0
    );
    for n in notes {
        println!("note: {n}");
    }
    println!();
    let mut nucleon = None;
    for t in curves {
        let c = &t.curve;
        if nucleon != Some(c.nucleon) {
            nucleon = Some(c.nucleon);
            println!("{} ({}, nucleon set {})", c.note, c.nucleon, c.params);
            println!();
        }
        if t.n_segments > 1 {
            println!(
                "{} contour, segment {} (segments 0 to {}, kept apart)",
                t.level.name(),
                t.segment,
                t.n_segments - 1
            );
        } else {
            println!("{} contour", t.level.name());
        }
        println!(
            "{:>12} {:>16} {:>18}",
            "m_DM [GeV]",
            "M [GeV]",
            format!("σ_{} [cm²]", c.kind.short())
        );
        for p in &c.points {
            // Full precision in the output files.
            println!(
                "{:>12.2} {:>16.1} {:>18.3e}",
                p.m_dm_gev, p.m_med_limit_obs_gev, p.sigma_obs_cm2
            );
        }
        println!();
    }
    println!("note: {CAUTION}");
}

/// Columns of the CSV of curve mode on a scan folder.
const SCAN_CURVE_COLUMNS: [&str; 8] = [
    "level",
    "segment",
    "m_dm_gev",
    "m_med_limit_gev",
    "nucleon",
    "scattering",
    "sigma_cm2",
    "cl",
];

fn scan_curve_csv(curves: &[ContourCurve]) -> anyhow::Result<Vec<u8>> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(SCAN_CURVE_COLUMNS)?;
    for t in curves {
        let c = &t.curve;
        for p in &c.points {
            w.write_record([
                t.level.name().to_string(),
                t.segment.to_string(),
                p.m_dm_gev.to_string(),
                p.m_med_limit_obs_gev.to_string(),
                c.nucleon.to_string(),
                c.kind.short().to_string(),
                format!("{:e}", p.sigma_obs_cm2),
                c.cl.to_string(),
            ])?;
        }
    }
    Ok(w.into_inner()?)
}
