//! What is in a sample, for `recoil inspect`: the header information, the
//! weight summary, a census of final-state particle ids and the quantiles
//! of the truth missing transverse momentum and of the leading visible
//! parton pT — all from one streaming pass in constant memory.
//!
//! Fed by [`super::EventSource`]; feeds the `inspect` command.

use super::{
    ChunkContext, Event, EventError, EventSource, InvisibleSet, ParticleClass, ReadOptions,
    SampleInfo, SampleSummary, truth_met_xy,
};
use std::path::Path;

/// Width of the histogram bins used for quantiles [GeV].
pub const QUANTILE_BIN_GEV: f64 = 1.0;
/// Number of histogram bins (so the histogram covers 0 – 20 TeV; larger
/// values go to an overflow bin and still count).
const N_BINS: usize = 20_000;

/// A fixed-binning histogram of a non-negative quantity [GeV], each event
/// counting once (weights are not applied).
#[derive(Debug, Clone, PartialEq)]
pub struct GevHistogram {
    counts: Vec<u64>,
    overflow: u64,
    n: u64,
    max: f64,
}

impl Default for GevHistogram {
    fn default() -> Self {
        Self {
            counts: vec![0; N_BINS],
            overflow: 0,
            n: 0,
            max: 0.0,
        }
    }
}

impl GevHistogram {
    /// Adds one value [GeV].
    pub fn fill(&mut self, v: f64) {
        self.n += 1;
        if v > self.max {
            self.max = v;
        }
        let b = (v / QUANTILE_BIN_GEV).floor();
        if b >= 0.0 && (b as usize) < N_BINS {
            self.counts[b as usize] += 1;
        } else {
            self.overflow += 1;
        }
    }

    /// Adds the counts of `other`.
    pub fn merge(&mut self, other: &Self) {
        for (a, b) in self.counts.iter_mut().zip(&other.counts) {
            *a += b;
        }
        self.overflow += other.overflow;
        self.n += other.n;
        self.max = self.max.max(other.max);
    }

    /// The value below which a fraction `q` ∈ [0, 1] of the entries lie,
    /// interpolated linearly inside its bin (resolution
    /// [`QUANTILE_BIN_GEV`]); `None` when empty or in the overflow bin.
    pub fn quantile(&self, q: f64) -> Option<f64> {
        if self.n == 0 {
            return None;
        }
        let target = q.clamp(0.0, 1.0) * self.n as f64;
        let mut cum = 0.0;
        for (i, &c) in self.counts.iter().enumerate() {
            let next = cum + c as f64;
            if c > 0 && next >= target {
                let frac = ((target - cum) / c as f64).clamp(0.0, 1.0);
                return Some(((i as f64 + frac) * QUANTILE_BIN_GEV).min(self.max));
            }
            cum = next;
        }
        None
    }
}

/// Quantiles of a distribution [GeV].
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Quantiles {
    /// Number of entries.
    pub n: u64,
    /// (fraction, value [GeV]) pairs for 10, 25, 50, 75, 90, 99 %.
    pub values: Vec<(f64, Option<f64>)>,
    /// Largest value [GeV].
    pub max: f64,
}

impl From<&GevHistogram> for Quantiles {
    fn from(h: &GevHistogram) -> Self {
        Self {
            n: h.n,
            values: [0.10, 0.25, 0.50, 0.75, 0.90, 0.99]
                .into_iter()
                .map(|q| (q, h.quantile(q)))
                .collect(),
            max: h.max,
        }
    }
}

/// Per-chunk counts of the census (merged in chunk order).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct CensusChunk {
    /// (PDG id, count) of final-state particles.
    pub ids: Vec<(i32, u64)>,
    /// Truth missing transverse momentum.
    pub met: GevHistogram,
    /// Leading visible parton pT (events without a parton are not filled).
    pub lead_parton_pt: GevHistogram,
}

impl CensusChunk {
    /// Counts the events of one chunk.
    pub fn of_events(events: &[Event], invisible: &InvisibleSet) -> Self {
        let mut c = Self::default();
        for ev in events {
            let mut lead: Option<f64> = None;
            for p in ev.particles.iter().filter(|p| p.is_final()) {
                match c.ids.iter_mut().find(|(id, _)| *id == p.id) {
                    Some((_, n)) => *n += 1,
                    None => c.ids.push((p.id, 1)),
                }
                if invisible.classify(p.id) == ParticleClass::Parton {
                    let pt = p.p4.pt();
                    lead = Some(lead.map_or(pt, |l| l.max(pt)));
                }
            }
            c.met
                .fill(crate::kinematics::transverse_magnitude(truth_met_xy(
                    ev, invisible,
                )));
            if let Some(pt) = lead {
                c.lead_parton_pt.fill(pt);
            }
        }
        c
    }

    /// Adds another chunk's counts.
    pub fn merge(&mut self, other: &Self) {
        for &(id, n) in &other.ids {
            match self.ids.iter_mut().find(|(i, _)| *i == id) {
                Some((_, m)) => *m += n,
                None => self.ids.push((id, n)),
            }
        }
        self.met.merge(&other.met);
        self.lead_parton_pt.merge(&other.lead_parton_pt);
    }
}

/// The census of a whole sample.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Census {
    /// (PDG id, count) of final-state particles, most frequent first (ties
    /// by id).
    pub final_state_ids: Vec<(i32, u64)>,
    /// Quantiles of the truth missing transverse momentum |Σ pT(invisible)|
    /// [GeV], each event counting once.
    pub truth_met_gev: Quantiles,
    /// Quantiles of the leading visible parton pT [GeV], each event with a
    /// parton counting once.
    pub lead_parton_pt_gev: Quantiles,
}

/// Everything `recoil inspect` reports.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Inspection {
    /// Header information.
    pub info: SampleInfo,
    /// Weight summary.
    pub summary: SampleSummary,
    /// Particle census and distributions.
    pub census: Census,
}

/// Reads a whole sample once and reports what is in it.
pub fn inspect_sample<P: AsRef<Path>>(
    paths: &[P],
    opts: ReadOptions,
    progress: Option<&(dyn Fn(u64) + Sync)>,
) -> Result<Inspection, EventError> {
    let invisible = opts.invisible.clone();
    let source = EventSource::open(paths, opts)?;
    let info = source.info().clone();
    let mut total = CensusChunk::default();
    let summary = source.for_each_chunk(
        |_: &ChunkContext, events: &[Event]| CensusChunk::of_events(events, &invisible),
        |c| total.merge(&c),
        progress,
    )?;
    let mut ids = total.ids;
    ids.sort_by(|a, b| b.1.cmp(&a.1).then(a.0.cmp(&b.0)));
    Ok(Inspection {
        info,
        summary,
        census: Census {
            final_state_ids: ids,
            truth_met_gev: Quantiles::from(&total.met),
            lead_parton_pt_gev: Quantiles::from(&total.lead_parton_pt),
        },
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    // Quantiles of 0.5, 1.5, …, 99.5 GeV (one per 1-GeV bin): the median
    // interpolates to 50 GeV (definition of the empirical quantile with
    // linear interpolation; common practice, no source).
    #[test]
    fn histogram_quantiles() {
        let mut h = GevHistogram::default();
        for i in 0..100 {
            h.fill(i as f64 + 0.5);
        }
        assert!((h.quantile(0.5).unwrap() - 50.0).abs() < 1e-9);
        assert!((h.quantile(0.9).unwrap() - 90.0).abs() < 1e-9);
        assert_eq!(GevHistogram::default().quantile(0.5), None);
    }
}
