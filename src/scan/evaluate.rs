//! The physics of one scan point: events → detector → search yields
//! (cached) → cross-section override and coupling rescaling → limits.
//!
//! Fed by [`crate::events`], [`crate::detector`], [`crate::search`],
//! [`crate::model`] and [`crate::stats`]; driven by [`super::run`].

use super::ScanError;
use super::cache::{CacheKeyBuilder, CacheLookup};
use super::plan::{PointCouplings, RegionChoice, ScanPlan, ScanPoint};
use super::run::{PointContext, PointEvaluator, PointOutcome};
use crate::detector::{Detector, DetectorProfile};
use crate::events::{EventSource, FileCombination, InvisibleSet, ReadOptions};
use crate::model::{self, Mediator};
use crate::search::{SampleYields, Search, SearchLimits, run_sample, search_limits};

/// Evaluates the points of a plan with the search and detector it names.
#[derive(Debug)]
pub struct PlanEvaluator {
    search: Search,
    detector: Detector,
    invisible: InvisibleSet,
    /// Key material shared by every point's yields: everything but the
    /// event files.
    yields_key: CacheKeyBuilder,
    mediator: model::MediatorKind,
    reference: model::Couplings,
    plan_limit: crate::stats::LimitOptions,
    regions: RegionChoice,
}

fn model_couplings(c: &PointCouplings) -> Result<model::Couplings, String> {
    model::Couplings::with_leptons(c.g_q, c.g_dm, c.g_l).map_err(|e| e.to_string())
}

impl PlanEvaluator {
    /// Reads and validates the search definition and the detector profile
    /// of `plan` (no event is read).
    pub fn new(plan: &ScanPlan) -> Result<Self, ScanError> {
        let search = Search::from_toml_file(&plan.search)
            .map_err(|e| ScanError::Plan(format!("{}: search: {e}", plan.path.display())))?;
        let profile = DetectorProfile::from_toml_file(&plan.detector)
            .map_err(|e| ScanError::Plan(format!("{}: detector: {e}", plan.path.display())))?
            .varied(&plan.detector_variation);
        let invisible = InvisibleSet::extended(plan.extra_invisible.iter().copied());
        let detector = Detector::new(profile, invisible.clone(), plan.seed);
        let read = |p: &std::path::Path| std::fs::read(p).map_err(|e| ScanError::io(p, e));
        let mut yields_key = CacheKeyBuilder::new("recoil scan yields")
            .text("code", &super::code_version())
            .bytes("search", &read(&plan.search)?)
            .bytes("detector", &read(&plan.detector)?)
            .f64("resolution_shift", plan.detector_variation.resolution_shift)
            .f64("efficiency_shift", plan.detector_variation.efficiency_shift)
            .u64("seed", plan.seed);
        for id in invisible.ids() {
            yields_key = yields_key.u64("invisible", *id as u64);
        }
        let reference = model_couplings(&plan.reference)
            .map_err(|e| ScanError::Plan(format!("{}: [model]: {e}", plan.path.display())))?;
        Ok(Self {
            search,
            detector,
            invisible,
            yields_key,
            mediator: plan.mediator,
            reference,
            plan_limit: plan.limit,
            regions: plan.regions,
        })
    }

    /// The yields of a point at the reference couplings and the sample's
    /// own cross-section: from the cache, or from its events.
    fn yields(
        &self,
        point: &ScanPoint,
        ctx: &PointContext<'_>,
    ) -> Result<(SampleYields, u64, bool), String> {
        let mut key = self.yields_key.clone();
        for h in ctx.file_hashes {
            key = key.bytes("file", &h.0);
        }
        let key = key.finish();
        if let Some(cache) = ctx.cache
            && let CacheLookup::Hit(y) = cache.get::<SampleYields>(&key)
        {
            return Ok((y, 0, true));
        }
        let source = EventSource::open(
            &point.files,
            ReadOptions {
                invisible: self.invisible.clone(),
                combination: FileCombination::IndependentRuns,
            },
        )
        .map_err(|e| e.to_string())?;
        let y =
            run_sample(&self.search, source, &self.detector, None).map_err(|e| e.to_string())?;
        if let Some(cache) = ctx.cache {
            cache.put(&key, &y).map_err(|e| e.to_string())?;
        }
        let n = y.n_events;
        Ok((y, n, false))
    }
}

impl PointEvaluator for PlanEvaluator {
    fn evaluate(&self, point: &ScanPoint, ctx: &PointContext<'_>) -> Result<PointOutcome, String> {
        let (mut yields, events_read, from_cache) = self.yields(point, ctx)?;
        let mut warnings = Vec::new();
        if let Some(xsec) = point.xsec_pb {
            yields = yields
                .with_cross_section_pb(xsec)
                .map_err(|e| e.to_string())?;
        }
        let couplings = model_couplings(&point.couplings)?;
        let mediator = Mediator::new(self.mediator, point.m_med_gev, point.m_dm_gev, couplings)
            .map_err(|e| e.to_string())?;
        let width_over_mass = mediator.width_over_mass();
        if couplings != self.reference {
            // The events were generated at the reference couplings: rescale
            // the rate (kinematics assumed unchanged; model stage).
            let reference = mediator.with_couplings(self.reference);
            let scale = reference
                .signal_scale(&couplings)
                .map_err(|e| e.to_string())?;
            let xsec = yields.cross_section_pb * scale.factor;
            yields = yields
                .with_cross_section_pb(xsec)
                .map_err(|e| e.to_string())?;
            warnings.push(format!(
                "signal rescaled from the reference couplings by {}: {}",
                scale.factor,
                scale.regime.approximation()
            ));
        }
        if mediator.is_wide() {
            warnings.push(format!(
                "Γ/M = {width_over_mass:.3} exceeds {}: the narrow-width rescaling is unreliable",
                model::WIDE_WIDTH_OVER_MASS
            ));
        }
        let limits =
            search_limits(&self.search, &yields, &self.plan_limit).map_err(|e| e.to_string())?;
        Ok(outcome(
            &limits,
            self.regions,
            &self.search.exclusive_indices(),
            width_over_mass,
            warnings,
            events_read,
            from_cache,
        ))
    }
}

/// The point's result from the search's limits: the most sensitive region
/// (or the combination), with its signal and limits.
fn outcome(
    limits: &SearchLimits,
    regions: RegionChoice,
    exclusive: &[usize],
    width_over_mass: f64,
    mut warnings: Vec<String>,
    events_read: u64,
    yields_from_cache: bool,
) -> PointOutcome {
    let pick = match regions {
        RegionChoice::BestExpected => limits.best().map(|r| {
            (
                r.region.clone(),
                r.counts.signal,
                r.counts.signal * r.counts.signal_rel_unc,
                r.limit.clone(),
            )
        }),
        RegionChoice::Combined => limits.combined.as_ref().map(|l| {
            let excl: Vec<_> = exclusive
                .iter()
                .filter_map(|&i| limits.regions.get(i))
                .collect();
            let s: f64 = excl.iter().map(|r| r.counts.signal).sum();
            let v: f64 = excl
                .iter()
                .map(|r| (r.counts.signal * r.counts.signal_rel_unc).powi(2))
                .sum();
            ("combined".to_string(), s, v.sqrt(), l.clone())
        }),
    };
    match pick {
        Some((region, signal, mc, limit)) => {
            warnings.extend(limit.warnings.iter().cloned());
            PointOutcome {
                width_over_mass,
                best_region: region,
                signal_events: signal,
                signal_mc_stat: mc,
                cls_mu1: limit.cls_mu1,
                mu_up_obs: limit.mu_up_observed,
                mu_up_exp: limit.mu_up_expected,
                warnings,
                events_read,
                yields_from_cache,
            }
        }
        None => {
            warnings.push("no region has signal: no sensitivity".into());
            PointOutcome {
                width_over_mass,
                best_region: "none".into(),
                signal_events: 0.0,
                signal_mc_stat: 0.0,
                cls_mu1: 1.0,
                mu_up_obs: f64::INFINITY,
                mu_up_exp: [f64::INFINITY; 5],
                warnings,
                events_read,
                yields_from_cache,
            }
        }
    }
}
