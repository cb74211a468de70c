//! Signal yields: expected events per region, Monte Carlo statistical
//! uncertainty, efficiency, weight-variation envelope, cut-flows and
//! distributions, accumulated in a fixed order so that results are
//! bit-identical on any number of threads.
//!
//! Fed by the detector stage ([`crate::detector::Detector::reconstruct`])
//! through the event reader ([`crate::events::EventSource::for_each_chunk`]);
//! feeds the limits ([`super::limits`]) and the scan stage, which caches
//! [`SampleYields`].

use crate::detector::{Detector, Reco};
use crate::events::{Event, EventSource, InvisibleSet, ParticleClass, SampleSummary};
use crate::units::FB_PER_PB;

use super::cutflow::{Cutflow, CutflowStep};
use super::definition::{PRESELECTION, Search};
use super::error::SearchError;
use super::observables::SelectedObjects;

/// Bin width of the p_T^miss and leading-jet pT distributions [GeV].
pub const DISTRIBUTION_BIN_GEV: f64 = 50.0;
/// Number of bins of width [`DISTRIBUTION_BIN_GEV`] from 0; one overflow
/// bin follows.
pub const DISTRIBUTION_BINS: usize = 40;

/// Truth quantities of an event, for the truth-level distributions.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TruthInfo {
    /// Magnitude of the vector sum of the transverse momenta of the
    /// final-state invisible particles [GeV].
    pub met_gev: f64,
    /// pT of the leading final-state parton (quark or gluon) [GeV]; `None`
    /// without one.
    pub leading_parton_pt_gev: Option<f64>,
}

impl TruthInfo {
    /// Truth quantities of `event` for the invisible set `invisible`.
    pub fn from_event(event: &Event, invisible: &InvisibleSet) -> TruthInfo {
        let met_xy = crate::events::truth_met_xy(event, invisible);
        let leading_parton_pt_gev = event
            .particles
            .iter()
            .filter(|p| p.is_final() && invisible.classify(p.id) == ParticleClass::Parton)
            .map(|p| p.p4.pt())
            .fold(None, |m: Option<f64>, pt| Some(m.map_or(pt, |m| m.max(pt))));
        TruthInfo {
            met_gev: crate::kinematics::transverse_magnitude(met_xy),
            leading_parton_pt_gev,
        }
    }
}

/// Where an event comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct EventOrigin {
    /// Index of its file in the sample.
    pub file_index: usize,
    /// Index (0-based) of the event in its file.
    pub event_index: u64,
    /// Process id (IDPRUP) of the event.
    pub process_id: i32,
}

/// The four distributions, in this order.
const DISTRIBUTIONS: [(&str, &str); 4] = [
    ("met", "truth"),
    ("met", "reco"),
    ("jet1_pt", "truth"),
    ("jet1_pt", "reco"),
];
const N_HIST_BINS: usize = DISTRIBUTION_BINS + 1;

/// Sums of raw weights for the events of one (file, process), which share
/// one weight-to-pb factor.
#[derive(Debug, Clone, PartialEq)]
struct Group {
    file_index: usize,
    process_id: i32,
    sum_w: Vec<f64>,
    sum_w2: Vec<f64>,
    raw: Vec<u64>,
    /// Σ w_v of the events in each region's final step, region-major.
    var: Vec<f64>,
    hist_w: Vec<f64>,
    hist_w2: Vec<f64>,
}

impl Group {
    fn new(file_index: usize, process_id: i32, n_counters: usize, n_var_cells: usize) -> Self {
        Group {
            file_index,
            process_id,
            sum_w: vec![0.0; n_counters],
            sum_w2: vec![0.0; n_counters],
            raw: vec![0; n_counters],
            var: vec![0.0; n_var_cells],
            hist_w: vec![0.0; DISTRIBUTIONS.len() * N_HIST_BINS],
            hist_w2: vec![0.0; DISTRIBUTIONS.len() * N_HIST_BINS],
        }
    }

    fn bump(&mut self, counter: usize, w: f64) {
        self.sum_w[counter] += w;
        self.sum_w2[counter] += w * w;
        self.raw[counter] += 1;
    }

    fn fill(&mut self, hist: usize, value_gev: Option<f64>, w: f64) {
        let Some(v) = value_gev.filter(|v| v.is_finite() && *v >= 0.0) else {
            return;
        };
        // invariant: v is finite and ≥ 0; the cast saturates for huge v.
        let bin = ((v / DISTRIBUTION_BIN_GEV) as usize).min(DISTRIBUTION_BINS);
        self.hist_w[hist * N_HIST_BINS + bin] += w;
        self.hist_w2[hist * N_HIST_BINS + bin] += w * w;
    }

    fn add(&mut self, other: &Group) {
        let add = |a: &mut [f64], b: &[f64]| a.iter_mut().zip(b).for_each(|(x, y)| *x += y);
        add(&mut self.sum_w, &other.sum_w);
        add(&mut self.sum_w2, &other.sum_w2);
        add(&mut self.var, &other.var);
        add(&mut self.hist_w, &other.hist_w);
        add(&mut self.hist_w2, &other.hist_w2);
        self.raw
            .iter_mut()
            .zip(&other.raw)
            .for_each(|(x, y)| *x += y);
    }
}

/// Accumulates weighted counts of one search over events.
///
/// Counter layout: 0 = all events, 1…P = after each preselection cut, then
/// for each region one counter per region cut.
#[derive(Debug, Clone)]
pub struct YieldAccumulator<'s> {
    search: &'s Search,
    n_var: usize,
    n_counters: usize,
    region_first: Vec<usize>,
    groups: Vec<Group>,
    last: usize,
    selected: SelectedObjects,
    values: Vec<f64>,
}

impl<'s> YieldAccumulator<'s> {
    /// An empty accumulator for `search`, expecting `n_weight_variations`
    /// named weights per event.
    pub fn new(search: &'s Search, n_weight_variations: usize) -> Self {
        let mut next = 1 + search.preselection().len();
        let region_first = search
            .regions()
            .iter()
            .map(|r| {
                let first = next;
                next += r.cuts().len();
                first
            })
            .collect();
        YieldAccumulator {
            search,
            n_var: n_weight_variations,
            n_counters: next,
            region_first,
            groups: Vec::new(),
            last: 0,
            selected: SelectedObjects::default(),
            values: vec![0.0; search.observables().len()],
        }
    }

    /// Index of the group of (file, process), created when new.
    fn group_index(&mut self, file_index: usize, process_id: i32) -> usize {
        let hit = |g: &Group| g.file_index == file_index && g.process_id == process_id;
        if !self.groups.get(self.last).is_some_and(hit) {
            self.last = match self.groups.iter().position(hit) {
                Some(i) => i,
                None => {
                    let cells = self.search.regions().len() * self.n_var;
                    self.groups
                        .push(Group::new(file_index, process_id, self.n_counters, cells));
                    self.groups.len() - 1
                }
            };
        }
        self.last
    }

    /// Counts one reconstructed event (weights from `reco.weight` and
    /// `reco.weights`, in the units of the file's XWGTUP).
    pub fn add(
        &mut self,
        reco: &Reco,
        truth: &TruthInfo,
        origin: EventOrigin,
    ) -> Result<(), SearchError> {
        let bad = |message: String| SearchError::Event {
            file_index: origin.file_index,
            event_index: origin.event_index,
            message,
        };
        let w = reco.weight;
        if !w.is_finite() {
            return Err(bad(format!("event weight must be finite, got {w}")));
        }
        if reco.weights.len() != self.n_var {
            return Err(bad(format!(
                "event has {} weight variations, the sample declares {}",
                reco.weights.len(),
                self.n_var
            )));
        }
        if let Some(v) = reco.weights.iter().find(|v| !v.is_finite()) {
            return Err(bad(format!("weight variation must be finite, got {v}")));
        }
        let gi = self.group_index(origin.file_index, origin.process_id);
        let search = self.search;
        let n_var = self.n_var;
        let selected = &mut self.selected;
        let values = &mut self.values;
        let g = &mut self.groups[gi];
        selected.fill(reco, search.objects());
        // Observables of the preselection first; the rest only for events
        // that pass it.
        let n_pre_obs = search.n_preselection_observables();
        let observables = search.observables();
        for (value, obs) in values.iter_mut().zip(observables).take(n_pre_obs) {
            *value = obs.evaluate(selected);
        }
        g.bump(0, w);
        let mut pass = true;
        for (k, cut) in search.preselection().iter().enumerate() {
            if !cut.passes(values) {
                pass = false;
                break;
            }
            g.bump(1 + k, w);
        }
        if pass {
            for (value, obs) in values.iter_mut().zip(observables).skip(n_pre_obs) {
                *value = obs.evaluate(selected);
            }
            for (r, region) in search.regions().iter().enumerate() {
                let mut in_region = true;
                for (k, cut) in region.cuts().iter().enumerate() {
                    if !cut.passes(values) {
                        in_region = false;
                        break;
                    }
                    g.bump(self.region_first[r] + k, w);
                }
                if in_region {
                    for (cell, wv) in g.var[r * n_var..(r + 1) * n_var]
                        .iter_mut()
                        .zip(&reco.weights)
                    {
                        *cell += wv;
                    }
                }
            }
        }
        let reco_jet1 = reco
            .jets
            .iter()
            .map(|j| j.p4.pt2())
            .fold(None, |m: Option<f64>, pt2| {
                Some(m.map_or(pt2, |m| m.max(pt2)))
            })
            .map(f64::sqrt);
        g.fill(0, Some(truth.met_gev), w);
        g.fill(1, Some(reco.met_gev), w);
        g.fill(2, truth.leading_parton_pt_gev, w);
        g.fill(3, reco_jet1, w);
        Ok(())
    }

    /// Adds the counts of `other` (for the same search). Merging chunk
    /// results in a fixed order gives bit-identical sums on any number of
    /// threads.
    pub fn merge(&mut self, other: YieldAccumulator<'_>) {
        for g in &other.groups {
            let i = self.group_index(g.file_index, g.process_id);
            self.groups[i].add(g);
        }
    }

    /// Turns the sums into expected events at `lumi_ifb` [fb⁻¹] with the
    /// sample's weight convention.
    ///
    /// # Formula
    /// s = L · Σ_g f_g Σ_{i∈g} w_i, δs_MC = L · √(Σ_g f_g² Σ_{i∈g} w_i²),
    /// ε = s / (L σ), σ = Σ_g f_g Σ_{all i∈g} w_i,
    /// where g runs over (file, process) groups, f_g is the weight-to-pb
    /// factor of [`SampleSummary::weight_to_pb`] and w_i the event weights.
    ///
    /// # Units
    /// L in fb⁻¹, σ in pb (converted with 1 pb = 1000 fb); events are counts.
    ///
    /// # References
    /// Common practice (no single source); the LHEF weight conventions are
    /// J. Alwall et al., Comput. Phys. Commun. 176 (2007) 300,
    /// hep-ph/0609017.
    pub fn finish(
        self,
        summary: &SampleSummary,
        lumi_ifb: f64,
    ) -> Result<SampleYields, SearchError> {
        self.finish_with(
            |f, p| summary.weight_to_pb(f, p),
            summary.n_events,
            lumi_ifb,
        )
    }

    /// As [`Self::finish`], with the weight-to-pb factor f(file index,
    /// process id) [pb per unit of XWGTUP] given directly and `n_events` the
    /// number of events read (for hand-set normalisations).
    pub fn finish_with(
        self,
        weight_to_pb: impl Fn(usize, i32) -> f64,
        n_events: u64,
        lumi_ifb: f64,
    ) -> Result<SampleYields, SearchError> {
        if !(lumi_ifb.is_finite() && lumi_ifb > 0.0) {
            return Err(SearchError::Normalisation(format!(
                "luminosity must be finite and > 0, got {lumi_ifb} fb⁻¹"
            )));
        }
        let to_events = lumi_ifb * FB_PER_PB;
        let n_var = self.n_var;
        let mut w = vec![0.0; self.n_counters];
        let mut w2 = vec![0.0; self.n_counters];
        let mut raw = vec![0u64; self.n_counters];
        let mut var = vec![0.0; self.search.regions().len() * n_var];
        let mut hist_w = vec![0.0; DISTRIBUTIONS.len() * N_HIST_BINS];
        let mut hist_w2 = vec![0.0; DISTRIBUTIONS.len() * N_HIST_BINS];
        for g in &self.groups {
            let f = weight_to_pb(g.file_index, g.process_id);
            if !f.is_finite() {
                return Err(SearchError::Normalisation(format!(
                    "weight-to-pb factor of file #{} process {} is {f}",
                    g.file_index, g.process_id
                )));
            }
            let acc = |out: &mut [f64], x: &[f64], k: f64| {
                out.iter_mut().zip(x).for_each(|(o, v)| *o += k * v);
            };
            acc(&mut w, &g.sum_w, f);
            acc(&mut w2, &g.sum_w2, f * f);
            acc(&mut var, &g.var, f);
            acc(&mut hist_w, &g.hist_w, f);
            acc(&mut hist_w2, &g.hist_w2, f * f);
            raw.iter_mut().zip(&g.raw).for_each(|(o, v)| *o += v);
        }
        let cross_section_pb = w[0];
        let step = |c: usize, cut: &str| CutflowStep {
            cut: cut.to_string(),
            raw_events: raw[c],
            events: w[c] * to_events,
            mc_stat: w2[c].sqrt() * to_events,
        };
        let n_pre = self.search.preselection().len();
        let mut pre_steps = vec![step(0, "all events")];
        for (k, cut) in self.search.preselection().iter().enumerate() {
            pre_steps.push(step(1 + k, cut.text()));
        }
        let mut cutflows = vec![Cutflow {
            name: PRESELECTION.to_string(),
            steps: pre_steps,
        }];
        let mut regions = Vec::with_capacity(self.search.regions().len());
        for (r, region) in self.search.regions().iter().enumerate() {
            let mut steps = vec![step(0, "all events"), step(n_pre, PRESELECTION)];
            for (k, cut) in region.cuts().iter().enumerate() {
                steps.push(step(self.region_first[r] + k, cut.text()));
            }
            let last = steps
                .last()
                .cloned()
                .unwrap_or_else(|| step(n_pre, PRESELECTION));
            let envelope = (n_var > 0).then(|| {
                var[r * n_var..(r + 1) * n_var]
                    .iter()
                    .map(|v| v * to_events)
                    .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
                        (lo.min(v), hi.max(v))
                    })
            });
            regions.push(RegionYield {
                name: region.name().to_string(),
                raw_events: last.raw_events,
                events: last.events,
                mc_stat: last.mc_stat,
                efficiency: if cross_section_pb != 0.0 {
                    last.events / (cross_section_pb * to_events)
                } else {
                    0.0
                },
                variation_low: envelope.map(|e| e.0),
                variation_high: envelope.map(|e| e.1),
            });
            cutflows.push(Cutflow {
                name: region.name().to_string(),
                steps,
            });
        }
        let distributions = DISTRIBUTIONS
            .iter()
            .enumerate()
            .map(|(h, (observable, level))| Distribution {
                observable: observable.to_string(),
                level: level.to_string(),
                bins: (0..N_HIST_BINS)
                    .map(|b| Bin {
                        low_gev: b as f64 * DISTRIBUTION_BIN_GEV,
                        high_gev: (b < DISTRIBUTION_BINS)
                            .then(|| (b + 1) as f64 * DISTRIBUTION_BIN_GEV),
                        events: hist_w[h * N_HIST_BINS + b] * to_events,
                        mc_stat: hist_w2[h * N_HIST_BINS + b].sqrt() * to_events,
                    })
                    .collect(),
            })
            .collect();
        Ok(SampleYields {
            search_title: self.search.title().to_string(),
            lumi_ifb,
            cross_section_pb,
            n_events,
            n_weight_variations: n_var,
            regions,
            cutflows,
            distributions,
        })
    }
}

/// Yield of one region.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct RegionYield {
    /// Region name.
    pub name: String,
    /// Monte Carlo events selected (unweighted).
    pub raw_events: u64,
    /// Expected signal events s at the luminosity of the yields.
    pub events: f64,
    /// Monte Carlo statistical uncertainty √Σw² of `events`.
    pub mc_stat: f64,
    /// Selection efficiency (acceptance × efficiency), a fraction.
    pub efficiency: f64,
    /// Smallest s over the named weight variations (`None` without any).
    pub variation_low: Option<f64>,
    /// Largest s over the named weight variations (`None` without any).
    pub variation_high: Option<f64>,
}

/// One bin of a distribution.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Bin {
    /// Lower edge [GeV].
    pub low_gev: f64,
    /// Upper edge [GeV]; `None` for the overflow bin.
    pub high_gev: Option<f64>,
    /// Expected events in the bin (all events, no selection).
    pub events: f64,
    /// Monte Carlo statistical uncertainty √Σw².
    pub mc_stat: f64,
}

/// A distribution of all events (no selection applied).
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Distribution {
    /// `met` or `jet1_pt`.
    pub observable: String,
    /// `truth` or `reco`.
    pub level: String,
    /// Bins in increasing order; the last is the overflow.
    pub bins: Vec<Bin>,
}

/// Everything the search computed for one sample. Serialisable, so a scan
/// can cache it.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct SampleYields {
    /// Title of the search.
    pub search_title: String,
    /// Luminosity the events are expected at [fb⁻¹].
    pub lumi_ifb: f64,
    /// Sample cross-section Σ f·w [pb] (after any override).
    pub cross_section_pb: f64,
    /// Events read.
    pub n_events: u64,
    /// Number of named weight variations.
    pub n_weight_variations: usize,
    /// Per region, in definition order.
    pub regions: Vec<RegionYield>,
    /// Preselection first, then one per region.
    pub cutflows: Vec<Cutflow>,
    /// met truth, met reco, jet1_pt truth, jet1_pt reco.
    pub distributions: Vec<Distribution>,
}

impl SampleYields {
    /// All expected-event numbers multiplied by `factor` (cross-section or
    /// luminosity rescaling); efficiencies unchanged.
    fn scaled(mut self, factor: f64) -> SampleYields {
        let k = factor;
        for r in &mut self.regions {
            r.events *= k;
            r.mc_stat *= k.abs();
            r.variation_low = r.variation_low.map(|v| v * k);
            r.variation_high = r.variation_high.map(|v| v * k);
        }
        for s in self.cutflows.iter_mut().flat_map(|c| c.steps.iter_mut()) {
            s.events *= k;
            s.mc_stat *= k.abs();
        }
        for b in self
            .distributions
            .iter_mut()
            .flat_map(|d| d.bins.iter_mut())
        {
            b.events *= k;
            b.mc_stat *= k.abs();
        }
        self
    }

    /// The yields for a sample cross-section of `xsec_pb` instead of the
    /// one from the event weights (efficiencies unchanged).
    pub fn with_cross_section_pb(self, xsec_pb: f64) -> Result<SampleYields, SearchError> {
        if !(xsec_pb.is_finite() && xsec_pb >= 0.0) {
            return Err(SearchError::InvalidOption(format!(
                "cross-section override must be finite and ≥ 0, got {xsec_pb} pb"
            )));
        }
        let own = self.cross_section_pb;
        if !(own.is_finite() && own > 0.0) {
            return Err(SearchError::Normalisation(format!(
                "cannot override the cross-section: the sample's own is {own} pb"
            )));
        }
        let mut out = self.scaled(xsec_pb / own);
        out.cross_section_pb = xsec_pb;
        Ok(out)
    }

    /// The yields at luminosity `lumi_ifb` [fb⁻¹] (s ∝ L).
    pub fn with_lumi_ifb(self, lumi_ifb: f64) -> Result<SampleYields, SearchError> {
        if !(lumi_ifb.is_finite() && lumi_ifb > 0.0) {
            return Err(SearchError::InvalidOption(format!(
                "luminosity must be finite and > 0, got {lumi_ifb} fb⁻¹"
            )));
        }
        let k = lumi_ifb / self.lumi_ifb;
        let mut out = self.scaled(k);
        out.lumi_ifb = lumi_ifb;
        Ok(out)
    }
}

/// Streams a sample once (on all cores of the current rayon pool): each
/// chunk of events is reconstructed into one reused [`Reco`] buffer and
/// counted in its own accumulator; the chunk accumulators are merged in
/// file and chunk order, so the result is bit-identical on any number of
/// threads. The detector's invisible set defines the truth missing momentum
/// of the truth distributions. Expected events are at the search's
/// luminosity; `progress` receives the bytes read so far.
pub fn run_sample(
    search: &Search,
    source: EventSource,
    detector: &Detector,
    progress: Option<&(dyn Fn(u64) + Sync)>,
) -> Result<SampleYields, SearchError> {
    let invisible = detector.invisible();
    let n_var = source.info().weight_names.len();
    let mut total = YieldAccumulator::new(search, n_var);
    let mut first_error: Option<SearchError> = None;
    let summary = source.for_each_chunk(
        |ctx, events| {
            let mut acc = YieldAccumulator::new(search, n_var);
            let mut reco = Reco::default();
            for (i, event) in events.iter().enumerate() {
                let event_index = ctx.first_event_index + i as u64;
                detector.reconstruct(event, ctx.file_index, event_index, &mut reco);
                let truth = TruthInfo::from_event(event, invisible);
                acc.add(
                    &reco,
                    &truth,
                    EventOrigin {
                        file_index: ctx.file_index,
                        event_index,
                        process_id: event.process_id,
                    },
                )?;
            }
            Ok::<_, SearchError>(acc)
        },
        |chunk| match chunk {
            Ok(acc) if first_error.is_none() => total.merge(acc),
            Ok(_) => {}
            Err(e) => {
                first_error.get_or_insert(e);
            }
        },
        progress,
    )?;
    if let Some(e) = first_error {
        return Err(e);
    }
    total.finish(&summary, search.lumi_ifb())
}
