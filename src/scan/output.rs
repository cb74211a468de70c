//! The files a scan writes: one JSON file per finished point (written as soon
//! as the point finishes, read back on resume and by merge), the results
//! table `results.csv` and the provenance file `result.json` (formats in the
//! project's shared format notes).

use std::path::{Path, PathBuf};

use serde::{Deserialize, Serialize};

use super::ScanError;
use super::atomic::{ensure_dir, write_atomic};
use super::plan::{PointCouplings, ScanPlan};

/// Serialises an `f64` as its shortest round-trip text (`inf`, `-inf`,
/// `NaN` included), so per-point files read back bit for bit.
mod f64_text {
    use serde::{Deserialize, Deserializer, Serializer};

    pub fn serialize<S: Serializer>(v: &f64, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(&format!("{v:?}"))
    }

    pub fn deserialize<'de, D: Deserializer<'de>>(d: D) -> Result<f64, D::Error> {
        let text = String::deserialize(d)?;
        text.parse()
            .map_err(|_| serde::de::Error::custom(format!("\"{text}\" is not a number")))
    }
}

/// [`f64_text`] for fixed-size arrays.
mod f64_text_array {
    use serde::{Deserialize, Deserializer, Serializer};

    pub fn serialize<S: Serializer, const N: usize>(v: &[f64; N], s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeSeq;
        let mut seq = s.serialize_seq(Some(N))?;
        for x in v {
            seq.serialize_element(&format!("{x:?}"))?;
        }
        seq.end()
    }

    pub fn deserialize<'de, D: Deserializer<'de>, const N: usize>(
        d: D,
    ) -> Result<[f64; N], D::Error> {
        let texts = Vec::<String>::deserialize(d)?;
        if texts.len() != N {
            return Err(serde::de::Error::custom(format!(
                "expected {N} numbers, got {}",
                texts.len()
            )));
        }
        let mut out = [0.0; N];
        for (o, t) in out.iter_mut().zip(&texts) {
            *o = t
                .parse()
                .map_err(|_| serde::de::Error::custom(format!("\"{t}\" is not a number")))?;
        }
        Ok(out)
    }
}

/// The result of one model point: one row of `results.csv` plus what the
/// driver needs to resume and merge.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PointResult {
    /// Index of the point in the plan's table.
    pub index: usize,
    /// Label of the point.
    pub label: String,
    /// Mediator mass M [GeV].
    #[serde(with = "f64_text")]
    pub m_med_gev: f64,
    /// Dark-matter mass m_χ [GeV].
    #[serde(with = "f64_text")]
    pub m_dm_gev: f64,
    /// Couplings at which the point was evaluated.
    pub couplings: PointCouplings,
    /// Total width over mass Γ/M of the mediator at these couplings.
    #[serde(with = "f64_text")]
    pub width_over_mass: f64,
    /// Name of the region the limit comes from (`combined` for a
    /// combination).
    pub best_region: String,
    /// Expected signal events in that region at μ = 1.
    #[serde(with = "f64_text")]
    pub signal_events: f64,
    /// Monte Carlo statistical uncertainty of the signal events [events].
    #[serde(with = "f64_text")]
    pub signal_mc_stat: f64,
    /// CLs at μ = 1.
    #[serde(with = "f64_text")]
    pub cls_mu1: f64,
    /// Observed upper limit on μ.
    #[serde(with = "f64_text")]
    pub mu_up_obs: f64,
    /// Expected upper limits on μ at −2σ, −1σ, median, +1σ, +2σ.
    #[serde(with = "f64_text_array")]
    pub mu_up_exp: [f64; 5],
    /// Warnings of the evaluation (statistics approximations, width, …).
    pub warnings: Vec<String>,
    /// Events read to evaluate the point (0 when the yields came from the
    /// cache).
    pub events_read: u64,
    /// Whether the yields came from the cache.
    pub yields_from_cache: bool,
    /// Fingerprint of every input of the point (settings, row, event file
    /// contents, code version); a resumed scan reuses the file only when it
    /// matches.
    pub fingerprint: String,
}

impl PointResult {
    /// Excluded at the plan's confidence level: μ_up(observed) < 1.
    pub fn excluded(&self) -> bool {
        self.mu_up_obs < 1.0
    }
}

/// Header of `results.csv`.
pub const RESULTS_HEADER: [&str; 17] = [
    "point",
    "m_med_gev",
    "m_dm_gev",
    "g_q",
    "g_dm",
    "width_over_mass",
    "best_region",
    "signal_events",
    "signal_mc_stat",
    "cls_mu1",
    "mu_up_obs",
    "mu_up_exp_m2",
    "mu_up_exp_m1",
    "mu_up_exp",
    "mu_up_exp_p1",
    "mu_up_exp_p2",
    "excluded",
];

/// `results.csv` text for `rows` (in the order given).
pub fn results_csv(rows: &[PointResult]) -> Result<Vec<u8>, csv::Error> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(RESULTS_HEADER)?;
    for r in rows {
        let mut rec = vec![
            r.label.clone(),
            r.m_med_gev.to_string(),
            r.m_dm_gev.to_string(),
            r.couplings.g_q.to_string(),
            r.couplings.g_dm.to_string(),
            r.width_over_mass.to_string(),
            r.best_region.clone(),
            r.signal_events.to_string(),
            r.signal_mc_stat.to_string(),
            r.cls_mu1.to_string(),
            r.mu_up_obs.to_string(),
        ];
        rec.extend(r.mu_up_exp.iter().map(f64::to_string));
        rec.push(r.excluded().to_string());
        w.write_record(&rec)?;
    }
    w.into_inner().map_err(|e| e.into_error().into())
}

/// Writes `results.csv` into `dir` atomically.
pub fn write_results_csv(dir: &Path, rows: &[PointResult]) -> Result<(), ScanError> {
    let path = dir.join("results.csv");
    let bytes = results_csv(rows).map_err(|e| ScanError::Output {
        path: path.clone(),
        message: e.to_string(),
    })?;
    write_atomic(&path, &bytes)
}

/// Folder of the per-point result files inside an output folder.
pub fn points_dir(out: &Path) -> PathBuf {
    out.join("points")
}

/// The result file of point `index` inside an output folder.
pub fn point_path(out: &Path, index: usize) -> PathBuf {
    points_dir(out).join(format!("{index:05}.json"))
}

/// Writes one point's result file atomically.
pub fn write_point(out: &Path, result: &PointResult) -> Result<(), ScanError> {
    ensure_dir(&points_dir(out))?;
    let path = point_path(out, result.index);
    let text = serde_json::to_string_pretty(result).map_err(|e| ScanError::Output {
        path: path.clone(),
        message: e.to_string(),
    })?;
    write_atomic(&path, text.as_bytes())
}

/// Reads one point's result file; `Ok(None)` when it does not exist.
pub fn read_point(out: &Path, index: usize) -> Result<Option<PointResult>, ScanError> {
    let path = point_path(out, index);
    match std::fs::read_to_string(&path) {
        Ok(text) => serde_json::from_str(&text)
            .map(Some)
            .map_err(|e| ScanError::Output {
                path,
                message: format!("not a point result file: {e}"),
            }),
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => Ok(None),
        Err(e) => Err(ScanError::io(path, e)),
    }
}

/// One input event file and its content hash.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct InputFile {
    /// Index of the point using the file.
    pub point: usize,
    /// The file.
    pub path: PathBuf,
    /// SHA-256 of its contents (hex).
    pub sha256: String,
}

/// Which shard of the points an output holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub struct ShardRecord {
    /// Shard index (0-based).
    pub index: usize,
    /// Number of shards.
    pub count: usize,
}

/// `result.json`: provenance and options of a scan output folder.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ScanManifest {
    /// Tool and format version.
    pub version: String,
    /// What the numbers are.
    pub note: String,
    /// The plan file.
    pub plan: PathBuf,
    /// Plan title.
    pub title: String,
    /// Fingerprint of the plan and its table (equal for all shards of a scan).
    pub plan_fingerprint: String,
    /// Fingerprint of the settings (plan file, search, detector, code).
    pub settings_fingerprint: String,
    /// Shard held by this folder (0/1 for a whole scan).
    pub shard: ShardRecord,
    /// Shard folders merged into this one (empty unless written by merge).
    pub merged_from: Vec<PathBuf>,
    /// Number of points in the whole plan.
    pub n_points_total: usize,
    /// Indices of the points in this folder, ascending.
    pub points: Vec<usize>,
    /// Fingerprints of those points' results, in the same order.
    pub point_fingerprints: Vec<String>,
    /// Search definition file.
    pub search: PathBuf,
    /// Detector profile file.
    pub detector: PathBuf,
    /// Detector variation applied.
    pub detector_variation: crate::detector::Variation,
    /// Seed of the detector's random numbers.
    pub seed: u64,
    /// Extra invisible PDG ids.
    pub extra_invisible: Vec<i32>,
    /// Mediator type.
    pub mediator: super::plan::MediatorKind,
    /// Couplings the events were generated with.
    pub reference_couplings: PointCouplings,
    /// Limit options (confidence level, method, background constraint).
    pub limit: crate::stats::LimitOptions,
    /// Nucleon parameter set of the DM–nucleon translation (model stage
    /// name, e.g. `dmwg2016`).
    #[serde(default)]
    pub nucleon_params: String,
    /// How a point's limit is taken from the regions.
    pub regions: super::plan::RegionChoice,
    /// Whether the yield cache was used.
    pub cache_used: bool,
    /// Event files and their content hashes.
    pub input_files: Vec<InputFile>,
    /// Warnings of the points and of the whole-scan products.
    pub warnings: Vec<String>,
}

/// The statement every scan output carries.
pub const ESTIMATE_NOTE: &str = "Estimates from parton-level events and a parametrised detector; \
     not an experiment's official result. mu_up is the upper limit on the signal strength at \
     the stated confidence level (CLs); a point is excluded when mu_up_obs < 1.";

impl ScanManifest {
    /// The manifest of a plan's output holding `points` of `shard`.
    pub fn new(
        plan: &ScanPlan,
        shard: ShardRecord,
        points: Vec<usize>,
        point_fingerprints: Vec<String>,
        cache_used: bool,
        input_files: Vec<InputFile>,
    ) -> Self {
        Self {
            version: super::code_version(),
            note: ESTIMATE_NOTE.into(),
            plan: std::path::absolute(&plan.path).unwrap_or_else(|_| plan.path.clone()),
            title: plan.title.clone(),
            plan_fingerprint: plan.plan_fingerprint.clone(),
            settings_fingerprint: plan.settings_fingerprint.clone(),
            shard,
            merged_from: Vec::new(),
            n_points_total: plan.points.len(),
            points,
            point_fingerprints,
            search: plan.search.clone(),
            detector: plan.detector.clone(),
            detector_variation: plan.detector_variation,
            seed: plan.seed,
            extra_invisible: plan.extra_invisible.clone(),
            mediator: plan.mediator,
            reference_couplings: plan.reference,
            limit: plan.limit,
            nucleon_params: plan.dm_nucleon.nucleon_params.clone(),
            regions: plan.regions,
            cache_used,
            input_files,
            warnings: Vec::new(),
        }
    }

    /// Writes `result.json` into `dir` atomically.
    pub fn write(&self, dir: &Path) -> Result<(), ScanError> {
        let path = dir.join("result.json");
        let text = serde_json::to_string_pretty(self).map_err(|e| ScanError::Output {
            path: path.clone(),
            message: e.to_string(),
        })?;
        write_atomic(&path, text.as_bytes())
    }

    /// Reads `result.json` from `dir`.
    pub fn read(dir: &Path) -> Result<Self, ScanError> {
        let path = dir.join("result.json");
        let text = std::fs::read_to_string(&path).map_err(|e| ScanError::io(&path, e))?;
        serde_json::from_str(&text).map_err(|e| ScanError::Output {
            path,
            message: format!("not a scan result file: {e}"),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn row(mu: f64) -> PointResult {
        PointResult {
            index: 3,
            label: "M1000_m1".into(),
            m_med_gev: 1000.0,
            m_dm_gev: 1.0,
            couplings: PointCouplings {
                g_q: 0.25,
                g_dm: 1.0,
                g_l: 0.0,
            },
            width_over_mass: 0.1 + 0.2,
            best_region: "met_500_600".into(),
            signal_events: 12.5,
            signal_mc_stat: 0.5,
            cls_mu1: 0.01,
            mu_up_obs: mu,
            mu_up_exp: [0.3, 0.4, 0.5, f64::INFINITY, 1.0 / 3.0],
            warnings: vec![],
            events_read: 5000,
            yields_from_cache: false,
            fingerprint: "ab".into(),
        }
    }

    #[test]
    fn point_file_round_trips_bit_for_bit_with_infinity() {
        let dir = tempfile::tempdir().unwrap();
        let r = row(f64::INFINITY);
        write_point(dir.path(), &r).unwrap();
        let back = read_point(dir.path(), 3).unwrap().unwrap();
        assert_eq!(back, r);
        assert_eq!(back.width_over_mass.to_bits(), (0.1f64 + 0.2).to_bits());
        assert!(read_point(dir.path(), 4).unwrap().is_none());
    }

    #[test]
    fn results_table_follows_the_format() {
        let text =
            String::from_utf8(results_csv(&[row(0.5), row(f64::INFINITY)]).unwrap()).unwrap();
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(lines[0], RESULTS_HEADER.join(","));
        assert!(lines[1].ends_with(",true"), "{}", lines[1]);
        // formats.md: infinity is written `inf`; excluded means mu_up_obs < 1.
        assert!(lines[2].contains(",inf,"), "{}", lines[2]);
        assert!(lines[2].ends_with(",false"), "{}", lines[2]);
    }
}
