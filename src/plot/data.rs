//! Readers for the CSV files the other commands write (the formats are
//! described in the README): scan results and contours, DM–nucleon curves,
//! direct-detection and imported curves, yields, cut-flows and
//! distributions. Every error names the file, the line, the column and the
//! rule; nothing is skipped silently. Columns a figure does not use are
//! ignored.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use super::PlotError;
use super::cutflow::{CutflowData, CutflowRow};
use super::distributions::{Bin, DistributionsData, Histogram, Level, Observable, RegionYield};
use super::dm_nucleon::{Curve, CurveSource, Interaction};
use super::exclusion::{ContourLevel, ContourLine, ExclusionData, ScanPoint};

/// A CSV file read whole: header and records with their line numbers.
struct CsvFile {
    path: PathBuf,
    header: Vec<String>,
    rows: Vec<(u64, csv::StringRecord)>,
}

fn csv_error(path: &Path, e: &csv::Error) -> PlotError {
    let line = e.position().map(|p| p.line()).unwrap_or(0);
    let message = match e.kind() {
        csv::ErrorKind::UnequalLengths {
            expected_len, len, ..
        } => format!("row has {len} fields, the header has {expected_len}"),
        csv::ErrorKind::Utf8 { .. } => "not valid UTF-8".to_string(),
        _ => e.to_string(),
    };
    PlotError::Csv {
        path: path.to_path_buf(),
        line,
        message,
    }
}

impl CsvFile {
    fn open(path: &Path) -> Result<CsvFile, PlotError> {
        let file = std::fs::File::open(path).map_err(|cause| PlotError::Read {
            path: path.to_path_buf(),
            cause,
        })?;
        let mut rdr = csv::ReaderBuilder::new()
            .has_headers(true)
            .trim(csv::Trim::All)
            .from_reader(std::io::BufReader::new(file));
        let header: Vec<String> = rdr
            .headers()
            .map_err(|e| match e.kind() {
                csv::ErrorKind::Io(_) => PlotError::Read {
                    path: path.to_path_buf(),
                    cause: std::io::Error::other(e.to_string()),
                },
                _ => csv_error(path, &e),
            })?
            .iter()
            .map(str::to_string)
            .collect();
        if header.iter().all(|h| h.is_empty()) {
            return Err(PlotError::Empty {
                path: path.to_path_buf(),
                detail: "; the file is empty (no header row)".into(),
            });
        }
        let mut rows = Vec::new();
        for rec in rdr.records() {
            let rec = rec.map_err(|e| csv_error(path, &e))?;
            let line = rec.position().map(|p| p.line()).unwrap_or(0);
            rows.push((line, rec));
        }
        Ok(CsvFile {
            path: path.to_path_buf(),
            header,
            rows,
        })
    }

    fn col(&self, name: &str) -> Result<usize, PlotError> {
        self.header
            .iter()
            .position(|h| h == name)
            .ok_or_else(|| PlotError::MissingColumn {
                path: self.path.clone(),
                column: name.to_string(),
                header: self.header.join(","),
            })
    }

    fn require_rows(&self, what: &str) -> Result<(), PlotError> {
        if self.rows.is_empty() {
            return Err(PlotError::Empty {
                path: self.path.clone(),
                detail: format!("; {what}"),
            });
        }
        Ok(())
    }

    fn bad(&self, line: u64, col: usize, rule: &str, value: &str) -> PlotError {
        PlotError::BadValue {
            path: self.path.clone(),
            line,
            column: self.header.get(col).cloned().unwrap_or_default(),
            rule: rule.to_string(),
            value: value.to_string(),
        }
    }

    fn cell<'a>(&self, rec: &'a csv::StringRecord, col: usize) -> &'a str {
        rec.get(col).unwrap_or("")
    }

    /// A number: Rust's `f64` syntax, `inf` allowed, NaN and empty refused.
    fn f64(&self, line: u64, rec: &csv::StringRecord, col: usize) -> Result<f64, PlotError> {
        let s = self.cell(rec, col);
        match s.parse::<f64>() {
            Ok(v) if !v.is_nan() => Ok(v),
            _ => Err(self.bad(line, col, "must be a number", s)),
        }
    }

    /// A finite number.
    fn finite(&self, line: u64, rec: &csv::StringRecord, col: usize) -> Result<f64, PlotError> {
        let v = self.f64(line, rec, col)?;
        if !v.is_finite() {
            return Err(self.bad(line, col, "must be a finite number", self.cell(rec, col)));
        }
        Ok(v)
    }

    /// A mass: a finite number > 0 (the figures' axes are logarithmic).
    fn mass(&self, line: u64, rec: &csv::StringRecord, col: usize) -> Result<f64, PlotError> {
        let v = self.finite(line, rec, col)?;
        if v <= 0.0 {
            return Err(self.bad(line, col, "must be a mass > 0 (GeV)", self.cell(rec, col)));
        }
        Ok(v)
    }

    /// A number or an empty cell.
    fn opt_f64(
        &self,
        line: u64,
        rec: &csv::StringRecord,
        col: usize,
    ) -> Result<Option<f64>, PlotError> {
        if self.cell(rec, col).is_empty() {
            Ok(None)
        } else {
            self.f64(line, rec, col).map(Some)
        }
    }

    fn bool(&self, line: u64, rec: &csv::StringRecord, col: usize) -> Result<bool, PlotError> {
        match self.cell(rec, col) {
            "true" => Ok(true),
            "false" => Ok(false),
            s => Err(self.bad(line, col, "must be `true` or `false`", s)),
        }
    }

    fn uint(&self, line: u64, rec: &csv::StringRecord, col: usize) -> Result<u64, PlotError> {
        let s = self.cell(rec, col);
        s.parse::<u64>()
            .map_err(|_| self.bad(line, col, "must be a non-negative integer", s))
    }
}

/// One row of a scan's `results.csv` (the columns the figures use).
#[derive(Debug, Clone, PartialEq)]
pub struct ScanResultRow {
    /// The point's identifier.
    pub point: String,
    /// The point's masses and whether it is excluded.
    pub point_masses: ScanPoint,
    /// Quark coupling g_q.
    pub g_q: f64,
    /// Dark-matter coupling g_χ.
    pub g_dm: f64,
}

/// Reads a scan's `results.csv`.
pub fn read_scan_results(path: &Path) -> Result<Vec<ScanResultRow>, PlotError> {
    let f = CsvFile::open(path)?;
    let c_point = f.col("point")?;
    let c_m = f.col("m_med_gev")?;
    let c_dm = f.col("m_dm_gev")?;
    let c_gq = f.col("g_q")?;
    let c_gdm = f.col("g_dm")?;
    let c_ex = f.col("excluded")?;
    f.require_rows("a scan needs at least one point")?;
    f.rows
        .iter()
        .map(|(line, rec)| {
            Ok(ScanResultRow {
                point: f.cell(rec, c_point).to_string(),
                point_masses: ScanPoint {
                    m_med_gev: f.finite(*line, rec, c_m)?,
                    m_dm_gev: f.finite(*line, rec, c_dm)?,
                    excluded: f.bool(*line, rec, c_ex)?,
                },
                g_q: f.finite(*line, rec, c_gq)?,
                g_dm: f.finite(*line, rec, c_gdm)?,
            })
        })
        .collect()
}

/// The couplings of a scan as text, when every point has the same ones:
/// `g_q = 0.25, g_χ = 1`; `None` when they vary.
pub fn uniform_couplings(rows: &[ScanResultRow]) -> Option<String> {
    let first = rows.first()?;
    rows.iter()
        .all(|r| r.g_q == first.g_q && r.g_dm == first.g_dm)
        .then(|| format!("g_q = {}, g_χ = {}", first.g_q, first.g_dm))
}

/// Reads a scan's `contours.csv`: one [`ContourLine`] per (level, segment),
/// in the order they first appear. A header with no rows gives no lines
/// (nothing excluded). Masses must be finite and > 0.
pub fn read_contours(path: &Path) -> Result<Vec<ContourLine>, PlotError> {
    let f = CsvFile::open(path)?;
    let c_level = f.col("level")?;
    let c_seg = f.col("segment")?;
    let c_m = f.col("m_med_gev")?;
    let c_dm = f.col("m_dm_gev")?;
    let mut order: Vec<(ContourLevel, u64)> = Vec::new();
    let mut lines: BTreeMap<(ContourLevel, u64), Vec<(f64, f64)>> = BTreeMap::new();
    for (line, rec) in &f.rows {
        let s = f.cell(rec, c_level);
        let level = ContourLevel::parse(s).ok_or_else(|| {
            f.bad(
                *line,
                c_level,
                "must be one of observed, expected, expected_m1, expected_p1",
                s,
            )
        })?;
        let seg = f.uint(*line, rec, c_seg)?;
        let p = (f.mass(*line, rec, c_m)?, f.mass(*line, rec, c_dm)?);
        let key = (level, seg);
        if !lines.contains_key(&key) {
            order.push(key);
        }
        lines.entry(key).or_default().push(p);
    }
    Ok(order
        .into_iter()
        .map(|key| ContourLine {
            level: key.0,
            points: lines.remove(&key).unwrap_or_default(),
        })
        .collect())
}

/// Reads a scan's `dm_nucleon.csv` (long format): one [`Curve`] per curve
/// label, in the order they first appear.
pub fn read_dm_nucleon(path: &Path) -> Result<Vec<Curve>, PlotError> {
    let f = CsvFile::open(path)?;
    let c_curve = f.col("curve")?;
    let c_src = f.col("source")?;
    let c_cl = f.col("cl")?;
    let c_int = f.col("interaction")?;
    let c_m = f.col("m_dm_gev")?;
    let c_s = f.col("sigma_cm2")?;
    f.require_rows("no curve point")?;
    let mut curves: Vec<Curve> = Vec::new();
    for (line, rec) in &f.rows {
        let label = f.cell(rec, c_curve);
        let s = f.cell(rec, c_src);
        let source = CurveSource::parse(s)
            .ok_or_else(|| f.bad(*line, c_src, "must be one of collider, direct, imported", s))?;
        let s = f.cell(rec, c_int);
        let interaction = Interaction::parse(s)
            .ok_or_else(|| f.bad(*line, c_int, "must be one of SI, SD-p, SD-n", s))?;
        let cl = f.finite(*line, rec, c_cl)?;
        if !(cl > 0.0 && cl < 1.0) {
            return Err(f.bad(*line, c_cl, "must lie in (0, 1)", f.cell(rec, c_cl)));
        }
        let p = (f.finite(*line, rec, c_m)?, f.f64(*line, rec, c_s)?);
        match curves.iter_mut().find(|c| c.label == label) {
            Some(c) => {
                if c.source != source || c.interaction != interaction || c.cl != cl {
                    return Err(f.bad(
                        *line,
                        c_curve,
                        "a curve must keep one source, interaction and cl on all its rows",
                        label,
                    ));
                }
                c.points.push(p);
            }
            None => curves.push(Curve {
                label: label.to_string(),
                source,
                cl,
                interaction,
                points: vec![p],
            }),
        }
    }
    Ok(curves)
}

/// Reads a single curve from a CSV whose header holds `m_dm_gev` and
/// `sigma_cm2` (a `recoil direct curve` output or an imported curve).
pub fn read_curve_csv(
    path: &Path,
    label: &str,
    source: CurveSource,
    cl: f64,
    interaction: Interaction,
) -> Result<Curve, PlotError> {
    let f = CsvFile::open(path)?;
    let c_m = f.col("m_dm_gev")?;
    let c_s = f.col("sigma_cm2")?;
    f.require_rows("a curve needs at least one point")?;
    let points = f
        .rows
        .iter()
        .map(|(line, rec)| Ok((f.finite(*line, rec, c_m)?, f.f64(*line, rec, c_s)?)))
        .collect::<Result<Vec<_>, PlotError>>()?;
    Ok(Curve {
        label: label.to_string(),
        source,
        cl,
        interaction,
        points,
    })
}

/// Reads a recast's `yields.csv` into per-region signal and background.
pub fn read_yields(path: &Path) -> Result<Vec<RegionYield>, PlotError> {
    let f = CsvFile::open(path)?;
    let c_region = f.col("region")?;
    let c_lo = f.col("met_low_gev")?;
    let c_hi = f.col("met_high_gev")?;
    let c_s = f.col("signal_events")?;
    let c_b = f.col("background")?;
    let c_db = f.col("background_unc")?;
    f.require_rows("a search has at least one region")?;
    f.rows
        .iter()
        .map(|(line, rec)| {
            Ok(RegionYield {
                name: f.cell(rec, c_region).to_string(),
                met_low_gev: f.opt_f64(*line, rec, c_lo)?,
                met_high_gev: f.opt_f64(*line, rec, c_hi)?,
                signal_events: f.finite(*line, rec, c_s)?,
                background: f.finite(*line, rec, c_b)?,
                background_unc: f.finite(*line, rec, c_db)?,
            })
        })
        .collect()
}

/// Reads a recast's `cutflow.csv`.
pub fn read_cutflow(path: &Path) -> Result<CutflowData, PlotError> {
    let f = CsvFile::open(path)?;
    let cols = [
        "region",
        "step",
        "cut",
        "raw_events",
        "weighted_events",
        "efficiency_cumulative",
        "efficiency_step",
    ]
    .map(|c| f.col(c));
    let [c_region, c_step, c_cut, c_raw, c_w, c_cum, c_eff] = cols;
    let (c_region, c_step, c_cut, c_raw, c_w, c_cum, c_eff) =
        (c_region?, c_step?, c_cut?, c_raw?, c_w?, c_cum?, c_eff?);
    f.require_rows("a cut-flow needs at least one step")?;
    let rows = f
        .rows
        .iter()
        .map(|(line, rec)| {
            let step = f.uint(*line, rec, c_step)?;
            Ok(CutflowRow {
                region: f.cell(rec, c_region).to_string(),
                step: u32::try_from(step)
                    .map_err(|_| f.bad(*line, c_step, "must be below 2³²", f.cell(rec, c_step)))?,
                cut: f.cell(rec, c_cut).to_string(),
                raw_events: f.uint(*line, rec, c_raw)?,
                weighted_events: f.finite(*line, rec, c_w)?,
                efficiency_cumulative: f.finite(*line, rec, c_cum)?,
                efficiency_step: f.finite(*line, rec, c_eff)?,
            })
        })
        .collect::<Result<Vec<_>, PlotError>>()?;
    Ok(CutflowData { rows })
}

/// Reads a recast's `distributions.csv`: one histogram per (observable,
/// level), bins sorted by their lower edge. Overlapping bins are an error.
pub fn read_distributions(path: &Path) -> Result<Vec<Histogram>, PlotError> {
    let f = CsvFile::open(path)?;
    let c_obs = f.col("observable")?;
    let c_level = f.col("level")?;
    let c_lo = f.col("bin_low_gev")?;
    let c_hi = f.col("bin_high_gev")?;
    let c_ev = f.col("events")?;
    let c_mc = f.col("mc_stat")?;
    f.require_rows("no histogram bin")?;
    let mut hists: Vec<(Histogram, Vec<u64>)> = Vec::new();
    for (line, rec) in &f.rows {
        let s = f.cell(rec, c_obs);
        let observable =
            Observable::parse(s).ok_or_else(|| f.bad(*line, c_obs, "must be met or jet1_pt", s))?;
        let s = f.cell(rec, c_level);
        let level =
            Level::parse(s).ok_or_else(|| f.bad(*line, c_level, "must be truth or reco", s))?;
        let bin = Bin {
            low_gev: f.finite(*line, rec, c_lo)?,
            high_gev: f.finite(*line, rec, c_hi)?,
            events: f.finite(*line, rec, c_ev)?,
            mc_stat: f.finite(*line, rec, c_mc)?,
        };
        if bin.high_gev <= bin.low_gev {
            return Err(f.bad(*line, c_hi, "must be above bin_low_gev", f.cell(rec, c_hi)));
        }
        match hists
            .iter_mut()
            .find(|(h, _)| h.observable == observable && h.level == level)
        {
            Some((h, lines)) => {
                h.bins.push(bin);
                lines.push(*line);
            }
            None => hists.push((
                Histogram {
                    observable,
                    level,
                    bins: vec![bin],
                },
                vec![*line],
            )),
        }
    }
    let mut out = Vec::with_capacity(hists.len());
    for (mut h, lines) in hists {
        let mut idx: Vec<usize> = (0..h.bins.len()).collect();
        idx.sort_by(|&a, &b| h.bins[a].low_gev.total_cmp(&h.bins[b].low_gev));
        for w in idx.windows(2) {
            if h.bins[w[1]].low_gev < h.bins[w[0]].high_gev {
                return Err(f.bad(
                    lines[w[1]],
                    c_lo,
                    &format!(
                        "bins of {} {} overlap (the bin from line {} ends at {} GeV)",
                        h.observable.as_str(),
                        h.level.as_str(),
                        lines[w[0]],
                        h.bins[w[0]].high_gev
                    ),
                    &h.bins[w[1]].low_gev.to_string(),
                ));
            }
        }
        h.bins = idx.iter().map(|&i| h.bins[i]).collect();
        out.push(h);
    }
    Ok(out)
}

/// The exclusion figure's data from a scan folder (`results.csv`,
/// `contours.csv`), with the scan's couplings as text when every point
/// shares them.
pub fn read_scan_exclusion(dir: &Path) -> Result<(ExclusionData, Option<String>), PlotError> {
    let rows = read_scan_results(&dir.join("results.csv"))?;
    let contours = read_contours(&dir.join("contours.csv"))?;
    let couplings = uniform_couplings(&rows);
    let data = ExclusionData {
        points: rows.iter().map(|r| r.point_masses).collect(),
        contours,
    };
    Ok((data, couplings))
}

/// The distributions figure's data from a recast folder
/// (`distributions.csv`, `yields.csv`): histograms, the regions' p_T^miss
/// edges and, when `with_regions`, the per-region signal and background.
pub fn read_recast_distributions(
    dir: &Path,
    with_regions: bool,
) -> Result<DistributionsData, PlotError> {
    let histograms = read_distributions(&dir.join("distributions.csv"))?;
    let regions = read_yields(&dir.join("yields.csv"))?;
    Ok(DistributionsData {
        histograms,
        region_edges_gev: DistributionsData::edges_from_regions(&regions),
        regions: if with_regions { regions } else { Vec::new() },
    })
}
