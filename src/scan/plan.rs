//! The scan plan: a TOML file naming the search, the detector profile, the
//! mediator type and the reference couplings the events were generated
//! with, the statistics options, and a CSV table with one row per model
//! point (event files, masses, couplings, optional cross-section override).
//!
//! Everything is validated here, before any event is read: missing files,
//! duplicate points, unknown columns or keys and bad values each fail with
//! one message naming the file, the line or key, the rule and the value.
//! Relative paths, in the plan and in its table, resolve against the plan's
//! folder.

use std::collections::HashMap;
use std::path::{Path, PathBuf};

use serde::Deserialize;

use super::ScanError;
use super::cache::CacheKeyBuilder;
use crate::detector::Variation;
use crate::stats::{BackgroundConstraint, LimitOptions, Method};

pub use crate::model::MediatorKind;

/// How the limit of one point is obtained from the search's regions.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum RegionChoice {
    /// The region with the best (smallest) median expected μ_up; its
    /// observed limit is quoted (the usual recasting choice).
    #[default]
    BestExpected,
    /// The combined likelihood of the search's exclusive regions.
    Combined,
}

/// Couplings of a model point (dimensionless).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, Deserialize)]
pub struct PointCouplings {
    /// Universal mediator–quark coupling g_q.
    pub g_q: f64,
    /// Mediator–DM coupling g_DM.
    pub g_dm: f64,
    /// Mediator–lepton coupling g_ℓ (0 when absent).
    pub g_l: f64,
}

/// A direct-detection experiment whose limit curve joins the DM–nucleon
/// comparison.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct DirectSpec {
    /// Experiment definition file (resolved).
    pub experiment: PathBuf,
    /// Curve label (defaults to the file stem).
    pub label: String,
}

/// An external limit curve (CSV with `m_dm_gev` and `sigma_cm2` columns)
/// shown beside the computed ones.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ImportedSpec {
    /// Curve file (resolved).
    pub file: PathBuf,
    /// Curve label.
    pub label: String,
    /// Confidence level of the published curve, e.g. 0.90.
    pub cl: f64,
    /// Interaction: `SI`, `SD-p` or `SD-n`.
    pub interaction: String,
}

/// Options of the DM–nucleon comparison and the figures.
#[derive(Debug, Clone, PartialEq, serde::Serialize, Deserialize)]
pub struct DmNucleonOptions {
    /// Name of the nucleon parameter set of the model stage (e.g. `dmwg2016`).
    pub nucleon_params: String,
    /// Smallest DM mass of the direct-detection curves [GeV].
    pub m_min_gev: f64,
    /// Largest DM mass of the direct-detection curves [GeV].
    pub m_max_gev: f64,
    /// Number of masses (log-spaced) of the direct-detection curves.
    pub n_masses: usize,
    /// Whether to draw the figures.
    pub figures: bool,
}

impl Default for DmNucleonOptions {
    fn default() -> Self {
        Self {
            nucleon_params: "dmwg2016".into(),
            m_min_gev: 1.0,
            m_max_gev: 5000.0,
            n_masses: 60,
            figures: true,
        }
    }
}

/// One model point of the scan (one data row of the table).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ScanPoint {
    /// Index among the data rows (0-based, table order).
    pub index: usize,
    /// Line of the row in the table (1-based, header is line 1).
    pub line: u64,
    /// Label (the `label` column, or built from the masses).
    pub label: String,
    /// Event files of the point (resolved), read as one sample.
    pub files: Vec<PathBuf>,
    /// Mediator mass M [GeV].
    pub m_med_gev: f64,
    /// Dark-matter mass m_χ [GeV].
    pub m_dm_gev: f64,
    /// Couplings at which the point is evaluated.
    pub couplings: PointCouplings,
    /// Cross-section override [pb]: replaces the sample's own cross-section.
    pub xsec_pb: Option<f64>,
}

/// A validated scan plan with its table of points.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ScanPlan {
    /// The plan file.
    pub path: PathBuf,
    /// Title (defaults to the plan's file stem).
    pub title: String,
    /// Search definition file (resolved).
    pub search: PathBuf,
    /// Detector profile file (resolved).
    pub detector: PathBuf,
    /// Variation applied to the detector profile.
    pub detector_variation: Variation,
    /// Points table (resolved).
    pub points_file: PathBuf,
    /// Global seed of the detector's random numbers.
    pub seed: u64,
    /// Extra PDG ids treated as invisible (beyond the standard set).
    pub extra_invisible: Vec<i32>,
    /// Mediator type.
    pub mediator: MediatorKind,
    /// Couplings the event files were generated with.
    pub reference: PointCouplings,
    /// Options of the limits.
    pub limit: LimitOptions,
    /// How a point's limit is taken from the regions.
    pub regions: RegionChoice,
    /// Output folder named in the plan (resolved), if any.
    pub output: Option<PathBuf>,
    /// Cache folder named in the plan (resolved), if any.
    pub cache: Option<PathBuf>,
    /// Options of the DM–nucleon comparison and the figures.
    pub dm_nucleon: DmNucleonOptions,
    /// Direct-detection experiments to compare with.
    pub direct: Vec<DirectSpec>,
    /// Imported external curves.
    pub imported: Vec<ImportedSpec>,
    /// The points, in table order.
    pub points: Vec<ScanPoint>,
    /// SHA-256 (hex) over everything that fixes a point's result except
    /// the point's own row and event files: the plan file, the search and
    /// detector files and the code version.
    pub settings_fingerprint: String,
    /// SHA-256 (hex) over the settings and the whole table of points:
    /// shards of one scan share it, so merges can refuse mixed plans.
    pub plan_fingerprint: String,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct PlanFile {
    title: Option<String>,
    search: PathBuf,
    points: PathBuf,
    seed: Option<u64>,
    output: Option<PathBuf>,
    cache: Option<PathBuf>,
    extra_invisible: Option<Vec<i32>>,
    detector: DetectorSection,
    model: ModelSection,
    stats: Option<StatsSection>,
    dm_nucleon: Option<DmNucleonSection>,
    #[serde(default)]
    direct: Vec<DirectSection>,
    #[serde(default)]
    imported: Vec<ImportedSection>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct DmNucleonSection {
    nucleon_params: Option<String>,
    m_min_gev: Option<f64>,
    m_max_gev: Option<f64>,
    n_masses: Option<usize>,
    figures: Option<bool>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct DetectorSection {
    profile: PathBuf,
    resolution_shift: Option<f64>,
    efficiency_shift: Option<f64>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct ModelSection {
    mediator: MediatorKind,
    g_q: f64,
    g_dm: f64,
    g_l: Option<f64>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct StatsSection {
    cl: Option<f64>,
    method: Option<MethodName>,
    n_toys: Option<usize>,
    toy_seed: Option<u64>,
    constraint: Option<ConstraintName>,
    regions: Option<RegionChoice>,
}

#[derive(Debug, Clone, Copy, Deserialize)]
#[serde(rename_all = "kebab-case")]
enum MethodName {
    Exact,
    Asymptotic,
    Toys,
}

#[derive(Debug, Clone, Copy, Deserialize)]
#[serde(rename_all = "kebab-case")]
enum ConstraintName {
    Gaussian,
    LogNormal,
    Poisson,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct DirectSection {
    experiment: PathBuf,
    label: Option<String>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct ImportedSection {
    file: PathBuf,
    label: String,
    cl: f64,
    interaction: String,
}

/// Default seed of the detector's random numbers when the plan gives none.
pub const DEFAULT_SEED: u64 = 1;

/// Default confidence level of the collider limits (95 %, CLs; common
/// practice, REFERENCES.md §6).
pub const DEFAULT_CL: f64 = 0.95;

/// Default number of pseudo-experiments when `method = "toys"`.
pub const DEFAULT_N_TOYS: usize = 10_000;

impl ScanPlan {
    /// Reads and validates a plan and its table of points. Checks that every
    /// named file exists; reads no event.
    pub fn from_toml_file(path: &Path) -> Result<Self, ScanError> {
        let text = std::fs::read_to_string(path).map_err(|e| ScanError::io(path, e))?;
        let folder = path.parent().unwrap_or(Path::new("")).to_path_buf();
        let name = path.display().to_string();
        let file: PlanFile = toml::from_str(&text).map_err(|e| {
            let place = e
                .span()
                .map(|s| {
                    let (line, col) = line_col(&text, s.start);
                    format!("line {line}, column {col}: ")
                })
                .unwrap_or_default();
            ScanError::Plan(format!("{name}: {place}{}", e.message().trim_end()))
        })?;

        let resolve = |p: &Path| -> PathBuf {
            if p.is_absolute() {
                p.to_path_buf()
            } else {
                folder.join(p)
            }
        };
        let existing = |key: &str, p: &Path| -> Result<PathBuf, ScanError> {
            let r = resolve(p);
            if r.is_file() {
                Ok(r)
            } else {
                Err(ScanError::Plan(format!(
                    "{name}: {key} = \"{}\": no such file ({})",
                    p.display(),
                    r.display()
                )))
            }
        };

        let search = existing("search", &file.search)?;
        let detector = existing("[detector] profile", &file.detector.profile)?;
        let points_file = existing("points", &file.points)?;

        let variation = Variation {
            resolution_shift: file.detector.resolution_shift.unwrap_or(0.0),
            efficiency_shift: file.detector.efficiency_shift.unwrap_or(0.0),
        };
        if !(variation.resolution_shift.is_finite() && variation.resolution_shift > -1.0) {
            return Err(ScanError::Plan(format!(
                "{name}: [detector] resolution_shift must be finite and > -1 (a fraction), got {}",
                variation.resolution_shift
            )));
        }
        if !(variation.efficiency_shift.is_finite() && variation.efficiency_shift.abs() <= 1.0) {
            return Err(ScanError::Plan(format!(
                "{name}: [detector] efficiency_shift must be in [-1, 1] (absolute fraction), got {}",
                variation.efficiency_shift
            )));
        }

        let m = &file.model;
        let reference = PointCouplings {
            g_q: m.g_q,
            g_dm: m.g_dm,
            g_l: m.g_l.unwrap_or(0.0),
        };
        for (key, v) in [
            ("g_q", reference.g_q),
            ("g_dm", reference.g_dm),
            ("g_l", reference.g_l),
        ] {
            if !(v.is_finite() && v >= 0.0) {
                return Err(ScanError::Plan(format!(
                    "{name}: [model] {key} must be a finite coupling >= 0, got {v}"
                )));
            }
        }
        if reference.g_q == 0.0 || reference.g_dm == 0.0 {
            return Err(ScanError::Plan(format!(
                "{name}: [model] reference couplings g_q and g_dm must be > 0 (the events \
                 were generated with them), got g_q = {}, g_dm = {}",
                reference.g_q, reference.g_dm
            )));
        }

        let (limit, regions) = stats_options(&name, file.stats.as_ref())?;

        let dm_nucleon = dm_nucleon_options(&name, file.dm_nucleon.as_ref())?;
        let mut direct = Vec::new();
        for (i, d) in file.direct.iter().enumerate() {
            let experiment = existing(&format!("[[direct]] #{} experiment", i + 1), &d.experiment)?;
            let label = d.label.clone().unwrap_or_else(|| file_stem(&experiment));
            direct.push(DirectSpec { experiment, label });
        }
        let mut imported = Vec::new();
        for (i, c) in file.imported.iter().enumerate() {
            let place = format!("[[imported]] #{}", i + 1);
            let f = existing(&format!("{place} file"), &c.file)?;
            if !(c.cl > 0.0 && c.cl < 1.0) {
                return Err(ScanError::Plan(format!(
                    "{name}: {place} cl must be in (0, 1), got {}",
                    c.cl
                )));
            }
            if !matches!(c.interaction.as_str(), "SI" | "SD-p" | "SD-n") {
                return Err(ScanError::Plan(format!(
                    "{name}: {place} interaction must be SI, SD-p or SD-n, got \"{}\"",
                    c.interaction
                )));
            }
            imported.push(ImportedSpec {
                file: f,
                label: c.label.clone(),
                cl: c.cl,
                interaction: c.interaction.clone(),
            });
        }
        let mut labels: Vec<&str> = direct.iter().map(|d| d.label.as_str()).collect();
        labels.extend(imported.iter().map(|c| c.label.as_str()));
        if let Some(dup) = first_duplicate(&labels) {
            return Err(ScanError::Plan(format!(
                "{name}: curve label \"{dup}\" is used twice among [[direct]] and [[imported]]"
            )));
        }

        let points = read_points(&points_file, &resolve)?;

        let mut settings = CacheKeyBuilder::new("recoil scan settings")
            .text("code", &super::code_version())
            .bytes("plan", text.as_bytes());
        for (key, p) in [("search", &search), ("detector", &detector)] {
            let bytes = std::fs::read(p).map_err(|e| ScanError::io(p, e))?;
            settings = settings.bytes(key, &bytes);
        }
        let settings_fingerprint = settings.finish().hex();
        let table = std::fs::read(&points_file).map_err(|e| ScanError::io(&points_file, e))?;
        let plan_fingerprint = CacheKeyBuilder::new("recoil scan plan")
            .text("settings", &settings_fingerprint)
            .bytes("points", &table)
            .finish()
            .hex();

        Ok(Self {
            path: path.to_path_buf(),
            title: file.title.unwrap_or_else(|| file_stem(path)),
            search,
            detector,
            detector_variation: variation,
            points_file,
            seed: file.seed.unwrap_or(DEFAULT_SEED),
            extra_invisible: file.extra_invisible.unwrap_or_default(),
            mediator: m.mediator,
            reference,
            limit,
            regions,
            output: file.output.as_deref().map(resolve),
            cache: file.cache.as_deref().map(resolve),
            dm_nucleon,
            direct,
            imported,
            points,
            settings_fingerprint,
            plan_fingerprint,
        })
    }
}

fn stats_options(
    name: &str,
    s: Option<&StatsSection>,
) -> Result<(LimitOptions, RegionChoice), ScanError> {
    let cl = s.and_then(|s| s.cl).unwrap_or(DEFAULT_CL);
    if !(cl > 0.0 && cl < 1.0) {
        return Err(ScanError::Plan(format!(
            "{name}: [stats] cl must be in (0, 1), got {cl}"
        )));
    }
    let method_name = s.and_then(|s| s.method).unwrap_or(MethodName::Asymptotic);
    let toys_given = s.is_some_and(|s| s.n_toys.is_some() || s.toy_seed.is_some());
    let method = match method_name {
        MethodName::Exact => Method::Exact,
        MethodName::Asymptotic => Method::Asymptotic,
        MethodName::Toys => {
            let n_toys = s.and_then(|s| s.n_toys).unwrap_or(DEFAULT_N_TOYS);
            if n_toys == 0 {
                return Err(ScanError::Plan(format!(
                    "{name}: [stats] n_toys must be >= 1, got 0"
                )));
            }
            Method::Toys {
                n_toys,
                seed: s.and_then(|s| s.toy_seed).unwrap_or(DEFAULT_SEED),
            }
        }
    };
    if toys_given && !matches!(method, Method::Toys { .. }) {
        return Err(ScanError::Plan(format!(
            "{name}: [stats] n_toys and toy_seed need method = \"toys\""
        )));
    }
    let constraint = match s.and_then(|s| s.constraint) {
        None | Some(ConstraintName::Gaussian) => BackgroundConstraint::Gaussian,
        Some(ConstraintName::LogNormal) => BackgroundConstraint::LogNormal,
        Some(ConstraintName::Poisson) => BackgroundConstraint::Poisson,
    };
    Ok((
        LimitOptions {
            cl,
            method,
            constraint,
        },
        s.and_then(|s| s.regions).unwrap_or_default(),
    ))
}

fn dm_nucleon_options(
    name: &str,
    s: Option<&DmNucleonSection>,
) -> Result<DmNucleonOptions, ScanError> {
    let d = DmNucleonOptions::default();
    let Some(s) = s else { return Ok(d) };
    let o = DmNucleonOptions {
        nucleon_params: s.nucleon_params.clone().unwrap_or(d.nucleon_params),
        m_min_gev: s.m_min_gev.unwrap_or(d.m_min_gev),
        m_max_gev: s.m_max_gev.unwrap_or(d.m_max_gev),
        n_masses: s.n_masses.unwrap_or(d.n_masses),
        figures: s.figures.unwrap_or(d.figures),
    };
    if !(o.m_min_gev.is_finite()
        && o.m_min_gev > 0.0
        && o.m_max_gev.is_finite()
        && o.m_max_gev > o.m_min_gev)
    {
        return Err(ScanError::Plan(format!(
            "{name}: [dm_nucleon] needs 0 < m_min_gev < m_max_gev (GeV), got {} and {}",
            o.m_min_gev, o.m_max_gev
        )));
    }
    if o.n_masses < 2 {
        return Err(ScanError::Plan(format!(
            "{name}: [dm_nucleon] n_masses must be >= 2, got {}",
            o.n_masses
        )));
    }
    Ok(o)
}

/// Columns of the points table.
const COLUMNS: [&str; 9] = [
    "files",
    "file",
    "m_med_gev",
    "m_dm_gev",
    "g_q",
    "g_dm",
    "g_l",
    "xsec_pb",
    "label",
];

/// Reads and validates the points table.
fn read_points(
    path: &Path,
    resolve: &dyn Fn(&Path) -> PathBuf,
) -> Result<Vec<ScanPoint>, ScanError> {
    let name = path.display().to_string();
    let mut reader = csv::ReaderBuilder::new()
        .trim(csv::Trim::All)
        .comment(Some(b'#'))
        .from_path(path)
        .map_err(|e| ScanError::Plan(format!("{name}: {e}")))?;
    let headers = reader
        .headers()
        .map_err(|e| ScanError::Plan(format!("{name}: line 1 (header): {e}")))?
        .clone();
    let mut col: HashMap<&str, usize> = HashMap::new();
    for (i, h) in headers.iter().enumerate() {
        let Some(known) = COLUMNS.iter().find(|c| **c == h) else {
            return Err(ScanError::Plan(format!(
                "{name}: line 1 (header): unknown column \"{h}\"; the columns are files \
                 (or file), m_med_gev, m_dm_gev, g_q, g_dm and optionally g_l, xsec_pb, label"
            )));
        };
        if col.insert(known, i).is_some() {
            return Err(ScanError::Plan(format!(
                "{name}: line 1 (header): column \"{h}\" appears twice"
            )));
        }
    }
    let files_col = match (col.get("files"), col.get("file")) {
        (Some(_), Some(_)) => {
            return Err(ScanError::Plan(format!(
                "{name}: line 1 (header): give either \"files\" or \"file\", not both"
            )));
        }
        (Some(&i), None) | (None, Some(&i)) => i,
        (None, None) => {
            return Err(ScanError::Plan(format!(
                "{name}: line 1 (header): missing column \"files\""
            )));
        }
    };
    for required in ["m_med_gev", "m_dm_gev", "g_q", "g_dm"] {
        if !col.contains_key(required) {
            return Err(ScanError::Plan(format!(
                "{name}: line 1 (header): missing column \"{required}\""
            )));
        }
    }

    let mut points: Vec<ScanPoint> = Vec::new();
    let mut seen: HashMap<[u64; 5], u64> = HashMap::new();
    for (index, record) in reader.records().enumerate() {
        let record = record.map_err(|e| {
            let line = e.position().map(|p| p.line()).unwrap_or(0);
            ScanError::Plan(format!("{name}: line {line}: {e}"))
        })?;
        let line = record.position().map(|p| p.line()).unwrap_or(0);
        let at = |c: &str| -> &str { col.get(c).and_then(|&i| record.get(i)).unwrap_or("") };
        let number = |c: &str, rule: &str, ok: &dyn Fn(f64) -> bool| -> Result<f64, ScanError> {
            let raw = at(c);
            match raw.parse::<f64>() {
                Ok(v) if ok(v) => Ok(v),
                _ => Err(ScanError::Plan(format!(
                    "{name}: line {line}: column {c} must be {rule}, got \"{raw}\""
                ))),
            }
        };
        let positive = |v: f64| v.is_finite() && v > 0.0;
        let coupling = |v: f64| v.is_finite() && v >= 0.0;
        let m_med_gev = number("m_med_gev", "a mass > 0 in GeV", &positive)?;
        let m_dm_gev = number("m_dm_gev", "a mass > 0 in GeV", &positive)?;
        let g_q = number("g_q", "a finite coupling >= 0", &coupling)?;
        let g_dm = number("g_dm", "a finite coupling >= 0", &coupling)?;
        let g_l = if at("g_l").is_empty() {
            0.0
        } else {
            number("g_l", "a finite coupling >= 0", &coupling)?
        };
        let xsec_pb = if at("xsec_pb").is_empty() {
            None
        } else {
            Some(number("xsec_pb", "a cross-section > 0 in pb", &positive)?)
        };

        let raw_files = record.get(files_col).unwrap_or("");
        let mut files = Vec::new();
        for part in raw_files.split(';') {
            let part = part.trim();
            if part.is_empty() {
                return Err(ScanError::Plan(format!(
                    "{name}: line {line}: column {}: empty file name in \"{raw_files}\" \
                     (files are separated by ';')",
                    headers.get(files_col).unwrap_or("files")
                )));
            }
            let resolved = resolve(Path::new(part));
            if !resolved.is_file() {
                return Err(ScanError::Plan(format!(
                    "{name}: line {line}: event file \"{part}\": no such file ({})",
                    resolved.display()
                )));
            }
            files.push(resolved);
        }

        let key = [
            m_med_gev.to_bits(),
            m_dm_gev.to_bits(),
            g_q.to_bits(),
            g_dm.to_bits(),
            g_l.to_bits(),
        ];
        if let Some(first) = seen.insert(key, line) {
            return Err(ScanError::Plan(format!(
                "{name}: line {line}: repeats the point of line {first} (m_med_gev = \
                 {m_med_gev}, m_dm_gev = {m_dm_gev}, g_q = {g_q}, g_dm = {g_dm}, g_l = {g_l})"
            )));
        }
        let label = at("label").to_string();
        points.push(ScanPoint {
            index,
            line,
            label,
            files,
            m_med_gev,
            m_dm_gev,
            couplings: PointCouplings { g_q, g_dm, g_l },
            xsec_pb,
        });
    }
    if points.is_empty() {
        return Err(ScanError::Plan(format!("{name}: the table has no points")));
    }
    assign_labels(&name, &mut points)?;
    Ok(points)
}

/// Fills empty labels from the masses (adding the couplings when two points
/// share masses) and checks that labels are unique.
fn assign_labels(name: &str, points: &mut [ScanPoint]) -> Result<(), ScanError> {
    let short = |p: &ScanPoint| format!("M{}_m{}", p.m_med_gev, p.m_dm_gev);
    let mut count: HashMap<String, usize> = HashMap::new();
    for p in points.iter() {
        *count.entry(short(p)).or_default() += 1;
    }
    for p in points.iter_mut() {
        if p.label.is_empty() {
            let s = short(p);
            p.label = if count[&s] > 1 {
                format!(
                    "{s}_gq{}_gdm{}_gl{}",
                    p.couplings.g_q, p.couplings.g_dm, p.couplings.g_l
                )
            } else {
                s
            };
        }
    }
    let mut first: HashMap<&str, u64> = HashMap::new();
    for p in points.iter() {
        if let Some(line) = first.insert(p.label.as_str(), p.line) {
            return Err(ScanError::Plan(format!(
                "{name}: line {}: label \"{}\" is already used on line {line}",
                p.line, p.label
            )));
        }
    }
    Ok(())
}

fn first_duplicate<'a>(items: &[&'a str]) -> Option<&'a str> {
    let mut seen = std::collections::HashSet::new();
    items.iter().copied().find(|s| !seen.insert(*s))
}

fn file_stem(path: &Path) -> String {
    path.file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default()
}

/// 1-based line and column of byte `offset` in `text`.
fn line_col(text: &str, offset: usize) -> (usize, usize) {
    let before = text.get(..offset).unwrap_or(text);
    let line = before.matches('\n').count() + 1;
    let col = before
        .rfind('\n')
        .map_or(before.len(), |i| before.len() - i - 1)
        + 1;
    (line, col)
}
