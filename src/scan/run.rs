//! The scan driver: evaluates the points of a plan (or of one shard of it)
//! in parallel, writes each point's result as soon as it finishes, skips
//! points already finished by an earlier run with the same inputs (resume),
//! and writes the results table, the contours and the provenance file.
//!
//! The physics of a point is behind [`PointEvaluator`]; whole-scan products
//! that need more than the table (DM–nucleon curves, figures) are behind
//! [`ScanProducts`]. Results are bit-identical on any number of threads: a
//! point's evaluation depends only on its inputs and results are gathered in
//! table order.

use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, AtomicUsize, Ordering};

use rayon::prelude::*;

use super::ScanError;
use super::atomic::{ensure_dir, write_atomic};
use super::cache::{CacheKey, CacheKeyBuilder, YieldCache, sha256_file};
use super::contour::{Contour, contours_csv, exclusion_contours};
use super::output::{
    InputFile, PointResult, ScanManifest, ShardRecord, read_point, write_point, write_results_csv,
};
use super::plan::{ScanPlan, ScanPoint};
use super::shard::Shard;

/// What the evaluator of one point is given besides the point.
#[derive(Debug, Clone, Copy)]
pub struct PointContext<'a> {
    /// The plan.
    pub plan: &'a ScanPlan,
    /// SHA-256 of each of the point's event files, in the point's order.
    pub file_hashes: &'a [CacheKey],
    /// The yield cache, unless disabled.
    pub cache: Option<&'a YieldCache>,
}

/// What evaluating one point produced.
#[derive(Debug, Clone, PartialEq)]
pub struct PointOutcome {
    /// Total width over mass Γ/M of the mediator at the point's couplings.
    pub width_over_mass: f64,
    /// Region the limit comes from (`combined` for a combination).
    pub best_region: String,
    /// Expected signal events in that region at μ = 1.
    pub signal_events: f64,
    /// MC statistical uncertainty of the signal events [events].
    pub signal_mc_stat: f64,
    /// CLs at μ = 1.
    pub cls_mu1: f64,
    /// Observed upper limit on μ.
    pub mu_up_obs: f64,
    /// Expected upper limits on μ at −2σ, −1σ, median, +1σ, +2σ.
    pub mu_up_exp: [f64; 5],
    /// Warnings.
    pub warnings: Vec<String>,
    /// Events read (0 when the yields came from the cache).
    pub events_read: u64,
    /// Whether the yields came from the cache.
    pub yields_from_cache: bool,
}

/// The physics of one point: events → detector → yields → limits.
pub trait PointEvaluator: Sync {
    /// Evaluates `point`. Errors are messages; the driver adds the point.
    fn evaluate(&self, point: &ScanPoint, ctx: &PointContext<'_>) -> Result<PointOutcome, String>;
}

/// Products of a whole scan beyond the table and the contours.
pub trait ScanProducts: Sync {
    /// Writes extra files into `out` from the complete results; returns
    /// warnings to record in `result.json`.
    fn write(
        &self,
        plan: &ScanPlan,
        rows: &[PointResult],
        contours: &[Contour],
        out: &Path,
    ) -> Result<Vec<String>, ScanError>;
}

/// No extra products.
#[derive(Debug, Clone, Copy, Default)]
pub struct NoProducts;

impl ScanProducts for NoProducts {
    fn write(
        &self,
        _plan: &ScanPlan,
        _rows: &[PointResult],
        _contours: &[Contour],
        _out: &Path,
    ) -> Result<Vec<String>, ScanError> {
        Ok(Vec::new())
    }
}

/// Options of a run.
#[derive(Debug, Clone, PartialEq)]
pub struct RunOptions {
    /// Output folder.
    pub out: PathBuf,
    /// Which shard to run (the whole scan by default).
    pub shard: Shard,
    /// Number of worker threads (`None`: one per core).
    pub threads: Option<usize>,
    /// Use the yield cache.
    pub use_cache: bool,
}

/// Progress of a run, reported after every finished point.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Progress {
    /// Points finished (including those resumed from an earlier run).
    pub done: usize,
    /// Points of the shard.
    pub total: usize,
    /// Events read so far in this run.
    pub events_read: u64,
}

/// What a run did.
#[derive(Debug, Clone, PartialEq)]
pub struct ScanSummary {
    /// Results of the shard's points, in table order.
    pub rows: Vec<PointResult>,
    /// Points taken over from an earlier run.
    pub resumed: usize,
    /// Points evaluated in this run.
    pub evaluated: usize,
    /// Of those, points whose yields came from the cache.
    pub from_cache: usize,
    /// Events read in this run.
    pub events_read: u64,
    /// Contours (empty for a shard of several).
    pub contours: Vec<Contour>,
    /// Warnings recorded in `result.json`.
    pub warnings: Vec<String>,
}

/// The cache folder of a run: the plan's, else `<out>/cache`.
pub fn cache_dir(plan: &ScanPlan, out: &Path) -> PathBuf {
    plan.cache.clone().unwrap_or_else(|| out.join("cache"))
}

/// Fingerprint of every input of one point: settings, its row, its event
/// files' contents and the code version (in the settings).
pub fn point_fingerprint(plan: &ScanPlan, point: &ScanPoint, file_hashes: &[CacheKey]) -> String {
    let mut b = CacheKeyBuilder::new("recoil scan point")
        .text("settings", &plan.settings_fingerprint)
        .u64("index", point.index as u64)
        .text("label", &point.label)
        .f64("m_med_gev", point.m_med_gev)
        .f64("m_dm_gev", point.m_dm_gev)
        .f64("g_q", point.couplings.g_q)
        .f64("g_dm", point.couplings.g_dm)
        .f64("g_l", point.couplings.g_l)
        .f64("xsec_pb", point.xsec_pb.unwrap_or(f64::NAN));
    for h in file_hashes {
        b = b.bytes("file", &h.0);
    }
    b.finish().hex()
}

/// Runs the scan (or one shard of it) into `opts.out`.
///
/// Finished points are written to `out/points/` as they finish; a point
/// whose file already holds a result with the same inputs is not evaluated
/// again. When every point of the shard has finished, `results.csv`,
/// `result.json` and (for a whole scan) `contours.csv` and the
/// [`ScanProducts`] are written. When some point fails, the others still
/// run and are kept; the first failure in table order is returned.
pub fn run_scan(
    plan: &ScanPlan,
    evaluator: &dyn PointEvaluator,
    products: &dyn ScanProducts,
    opts: &RunOptions,
    progress: Option<&(dyn Fn(Progress) + Sync)>,
) -> Result<ScanSummary, ScanError> {
    let out = &opts.out;
    ensure_dir(out)?;
    // An interrupted run must never look complete.
    let manifest_path = out.join("result.json");
    if manifest_path.exists() {
        std::fs::remove_file(&manifest_path).map_err(|e| ScanError::io(&manifest_path, e))?;
    }
    let cache = if opts.use_cache {
        Some(YieldCache::open(&cache_dir(plan, out))?)
    } else {
        None
    };
    let points: Vec<&ScanPoint> = plan
        .points
        .iter()
        .filter(|p| opts.shard.contains(p.index))
        .collect();

    let mut builder = rayon::ThreadPoolBuilder::new();
    if let Some(n) = opts.threads {
        builder = builder.num_threads(n);
    }
    let pool = builder.build().map_err(|e| {
        ScanError::Plan(format!(
            "cannot start {:?} worker threads: {e}",
            opts.threads
        ))
    })?;

    pool.install(|| {
        let hashes: Vec<Vec<CacheKey>> = points
            .par_iter()
            .map(|p| p.files.iter().map(|f| sha256_file(f)).collect())
            .collect::<Result<_, _>>()?;

        let done = AtomicUsize::new(0);
        let events = AtomicU64::new(0);
        let total = points.len();
        let report = |n_events: u64| {
            let d = done.fetch_add(1, Ordering::Relaxed) + 1;
            let e = events.fetch_add(n_events, Ordering::Relaxed) + n_events;
            if let Some(f) = progress {
                f(Progress {
                    done: d,
                    total,
                    events_read: e,
                });
            }
        };

        // Points finished by an earlier run with the same inputs.
        let fingerprints: Vec<String> = points
            .iter()
            .zip(&hashes)
            .map(|(p, h)| point_fingerprint(plan, p, h))
            .collect();
        let mut results: Vec<Option<Result<(PointResult, bool), ScanError>>> = points
            .iter()
            .zip(&fingerprints)
            .map(|(p, fp)| match read_point(out, p.index) {
                Ok(Some(prev)) if &prev.fingerprint == fp => {
                    report(0);
                    Some(Ok((prev, true)))
                }
                _ => None,
            })
            .collect();
        let pending: Vec<usize> = (0..points.len())
            .filter(|&k| results[k].is_none())
            .collect();

        // The others, as many at a time as there are threads: each point
        // also runs in parallel inside (event chunks), and bounding the
        // points in flight bounds memory whatever the size of the scan.
        let evaluate = |k: usize| -> Result<(PointResult, bool), ScanError> {
            let point = points[k];
            let ctx = PointContext {
                plan,
                file_hashes: &hashes[k],
                cache: cache.as_ref(),
            };
            let outcome = evaluator
                .evaluate(point, &ctx)
                .map_err(|message| ScanError::Point {
                    index: point.index,
                    label: point.label.clone(),
                    message,
                })?;
            let result = PointResult {
                index: point.index,
                label: point.label.clone(),
                m_med_gev: point.m_med_gev,
                m_dm_gev: point.m_dm_gev,
                couplings: point.couplings,
                width_over_mass: outcome.width_over_mass,
                best_region: outcome.best_region,
                signal_events: outcome.signal_events,
                signal_mc_stat: outcome.signal_mc_stat,
                cls_mu1: outcome.cls_mu1,
                mu_up_obs: outcome.mu_up_obs,
                mu_up_exp: outcome.mu_up_exp,
                warnings: outcome.warnings,
                events_read: outcome.events_read,
                yields_from_cache: outcome.yields_from_cache,
                fingerprint: fingerprints[k].clone(),
            };
            write_point(out, &result)?;
            report(result.events_read);
            Ok((result, false))
        };
        for batch in pending.chunks(rayon::current_num_threads().max(1)) {
            let done: Vec<_> = batch.par_iter().map(|&k| evaluate(k)).collect();
            for (&k, r) in batch.iter().zip(done) {
                results[k] = Some(r);
            }
        }
        // invariant: every point was either resumed or evaluated above.
        let results: Vec<_> = results.into_iter().map(|r| r.unwrap()).collect();

        let mut rows = Vec::with_capacity(results.len());
        let (mut resumed, mut from_cache, mut events_read) = (0, 0, 0);
        for r in results {
            let (row, was_resumed) = r?;
            if was_resumed {
                resumed += 1;
            } else {
                events_read += row.events_read;
                from_cache += usize::from(row.yields_from_cache);
            }
            rows.push(row);
        }
        let evaluated = rows.len() - resumed;

        let input_files = points
            .iter()
            .zip(&hashes)
            .flat_map(|(p, hs)| {
                p.files.iter().zip(hs).map(|(f, h)| InputFile {
                    point: p.index,
                    path: f.clone(),
                    sha256: h.hex(),
                })
            })
            .collect();
        let manifest = ScanManifest::new(
            plan,
            ShardRecord {
                index: opts.shard.index(),
                count: opts.shard.count(),
            },
            rows.iter().map(|r| r.index).collect(),
            rows.iter().map(|r| r.fingerprint.clone()).collect(),
            opts.use_cache,
            input_files,
        );
        let (contours, warnings) = write_outputs(plan, manifest, &rows, products, out)?;
        Ok(ScanSummary {
            rows,
            resumed,
            evaluated,
            from_cache,
            events_read,
            contours,
            warnings,
        })
    })
}

/// Writes the table, and for a whole scan the contours and the products,
/// then `result.json` (last, so its presence means the folder is complete).
pub(crate) fn write_outputs(
    plan: &ScanPlan,
    mut manifest: ScanManifest,
    rows: &[PointResult],
    products: &dyn ScanProducts,
    out: &Path,
) -> Result<(Vec<Contour>, Vec<String>), ScanError> {
    write_results_csv(out, rows)?;
    let mut contours = Vec::new();
    if manifest.points.len() == manifest.n_points_total {
        match exclusion_contours(rows) {
            Ok(c) => contours = c,
            Err(e) => manifest.warnings.push(format!("no contours: {e}")),
        }
        for c in contours.iter().filter(|c| c.segments.is_empty()) {
            let n = rows.iter().filter(|r| c.level.mu(r) < 1.0).count();
            manifest.warnings.push(format!(
                "no {} contour: μ_up does not cross 1 on the grid (below 1 at {n} of {} points)",
                c.level.name(),
                rows.len()
            ));
        }
        let path = out.join("contours.csv");
        let bytes = contours_csv(&contours).map_err(|e| ScanError::Output {
            path: path.clone(),
            message: e.to_string(),
        })?;
        write_atomic(&path, &bytes)?;
        let w = products.write(plan, rows, &contours, out)?;
        manifest.warnings.extend(w);
    }
    for r in rows {
        manifest
            .warnings
            .extend(r.warnings.iter().map(|w| format!("point {}: {w}", r.label)));
    }
    manifest.write(out)?;
    Ok((contours, manifest.warnings))
}
