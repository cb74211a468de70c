//! Limits of a search for one sample: per-region CLs and upper limits on
//! the signal strength, model-independent limits on signal events and
//! visible cross-section, the most sensitive region, and the combination of
//! the exclusive regions. Shared by `recoil recast` and the scan stage.
//!
//! Fed by [`super::yields`]; computed with [`crate::stats`].

use rayon::prelude::*;
use serde::{Deserialize, Serialize};

use crate::stats::{Limit, LimitOptions, RegionCounts, combined_limit, region_limit};

use super::definition::Search;
use super::error::SearchError;
use super::yields::SampleYields;

impl Search {
    /// Counting inputs of every region (definition order) for the
    /// statistics stage: observed, background, background uncertainty from
    /// the definition; signal events s and its relative MC-statistical
    /// uncertainty δs/s (0 when s = 0) from `yields`.
    pub fn region_counts(&self, yields: &SampleYields) -> Result<Vec<RegionCounts>, SearchError> {
        if yields.regions.len() != self.regions().len() {
            return Err(SearchError::Mismatch {
                search: self.title().to_string(),
                message: format!(
                    "the search has {} regions, the yields {}",
                    self.regions().len(),
                    yields.regions.len()
                ),
            });
        }
        self.regions()
            .iter()
            .zip(&yields.regions)
            .map(|(r, y)| {
                if r.name() != y.name {
                    return Err(SearchError::Mismatch {
                        search: self.title().to_string(),
                        message: format!("region \"{}\" but yields for \"{}\"", r.name(), y.name),
                    });
                }
                Ok(RegionCounts {
                    observed: r.observed(),
                    background: r.background(),
                    background_unc: r.background_unc(),
                    signal: y.events,
                    signal_rel_unc: if y.events > 0.0 {
                        y.mc_stat / y.events
                    } else {
                        0.0
                    },
                })
            })
            .collect()
    }
}

/// Limits of one region for one sample.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RegionLimit {
    /// Region name.
    pub region: String,
    /// The counts the limit was computed from.
    pub counts: RegionCounts,
    /// CLs at μ = 1 and the upper limits on μ.
    pub limit: Limit,
}

/// Limits of a search for one sample.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SearchLimits {
    /// Options used.
    pub options: LimitOptions,
    /// Per region, in definition order.
    pub regions: Vec<RegionLimit>,
    /// Index of the region with the smallest finite median expected upper
    /// limit on μ (the most sensitive one); `None` when no region has
    /// signal. Ties go to the first region.
    pub best_region: Option<usize>,
    /// Combined limit of the exclusive regions (with the background
    /// covariance when the search gives one); `None` without exclusive
    /// regions.
    pub combined: Option<Limit>,
}

impl SearchLimits {
    /// The limit of the most sensitive region.
    pub fn best(&self) -> Option<&RegionLimit> {
        self.best_region.and_then(|i| self.regions.get(i))
    }
}

/// Index of the smallest finite value (first on ties).
fn argmin_finite(values: impl Iterator<Item = f64>) -> Option<usize> {
    let mut best: Option<(usize, f64)> = None;
    for (i, v) in values.enumerate() {
        if v.is_finite() && best.is_none_or(|(_, b)| v < b) {
            best = Some((i, v));
        }
    }
    best.map(|(i, _)| i)
}

/// Per-region limits, the most sensitive region (by expected limit, so
/// the choice does not depend on the data) and the combination of the
/// exclusive regions.
pub fn search_limits(
    search: &Search,
    yields: &SampleYields,
    opts: &LimitOptions,
) -> Result<SearchLimits, SearchError> {
    let counts = search.region_counts(yields)?;
    // The regions and the combination are independent: computed in
    // parallel, each by itself, so the results do not depend on the number
    // of threads; the first failing region in definition order is reported.
    let (regions, combined) = rayon::join(
        || {
            search
                .regions()
                .par_iter()
                .zip(&counts)
                .map(|(r, c)| {
                    region_limit(c, opts)
                        .map(|limit| RegionLimit {
                            region: r.name().to_string(),
                            counts: *c,
                            limit,
                        })
                        .map_err(|source| SearchError::Stats {
                            region: r.name().to_string(),
                            source,
                        })
                })
                .collect::<Vec<_>>()
        },
        || {
            let exclusive = search.exclusive_indices();
            if exclusive.is_empty() {
                return Ok(None);
            }
            let sub: Vec<RegionCounts> = exclusive.iter().map(|&i| counts[i]).collect();
            combined_limit(&sub, search.background_covariance(), opts)
                .map(Some)
                .map_err(|source| SearchError::Stats {
                    region: "combined exclusive regions".into(),
                    source,
                })
        },
    );
    let regions = regions.into_iter().collect::<Result<Vec<_>, _>>()?;
    let combined = combined?;
    let best_region = argmin_finite(regions.iter().map(|r| r.limit.mu_up_expected[2]));
    Ok(SearchLimits {
        options: *opts,
        regions,
        best_region,
        combined,
    })
}

/// Model-independent upper limits of one region: on signal events (s95)
/// and on the visible cross-section σ_vis = s95 / L.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ModelIndependentLimit {
    /// Observed upper limit on signal events.
    pub s95_obs: f64,
    /// Median expected upper limit on signal events.
    pub s95_exp: f64,
    /// Observed upper limit on σ_vis = σ × acceptance × efficiency [fb].
    pub sigma_vis_obs_fb: f64,
    /// Median expected upper limit on σ_vis [fb].
    pub sigma_vis_exp_fb: f64,
}

/// Model-independent limits of every region (definition order): the upper
/// limit on μ for a unit signal without uncertainty is the upper limit on
/// signal events.
///
/// # Formula
/// s_up = μ_up(s = 1, δs = 0); σ_vis,up = s_up / L.
///
/// # Units
/// L in fb⁻¹ (the search's), σ_vis in fb.
///
/// # References
/// Visible cross-section as the model-independent quantity: common
/// practice in LHC searches (no single source).
pub fn model_independent_limits(
    search: &Search,
    opts: &LimitOptions,
) -> Result<Vec<ModelIndependentLimit>, SearchError> {
    let lumi = search.lumi_ifb();
    // Independent per region: in parallel; the first failure in definition
    // order is reported.
    let limits: Vec<Result<ModelIndependentLimit, SearchError>> = search
        .regions()
        .par_iter()
        .map(|r| {
            let unit = RegionCounts {
                observed: r.observed(),
                background: r.background(),
                background_unc: r.background_unc(),
                signal: 1.0,
                signal_rel_unc: 0.0,
            };
            let l = region_limit(&unit, opts).map_err(|source| SearchError::Stats {
                region: r.name().to_string(),
                source,
            })?;
            Ok(ModelIndependentLimit {
                s95_obs: l.mu_up_observed,
                s95_exp: l.mu_up_expected[2],
                sigma_vis_obs_fb: l.mu_up_observed / lumi,
                sigma_vis_exp_fb: l.mu_up_expected[2] / lumi,
            })
        })
        .collect();
    limits.into_iter().collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn best_region_is_the_smallest_finite_value() {
        let v = [f64::INFINITY, 3.0, 2.0, 2.0, f64::NAN];
        assert_eq!(argmin_finite(v.into_iter()), Some(2));
        assert_eq!(argmin_finite([f64::INFINITY].into_iter()), None);
    }
}
