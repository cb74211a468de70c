//! The weight convention: how event weights (XWGTUP) become a cross-section
//! in pb, for every weight strategy IDWTUP of the Les Houches accord and
//! for both ways of combining several files.
//!
//! Fed by the per-file, per-process weight sums of a full pass
//! ([`super::source`]); feeds every stage that turns events into yields.
//!
//! # The convention
//!
//! For file k with N_k events and process p (LPRUP) with Σ_{k,p} w the sum
//! of its event weights, the factor f_{k,p} [pb per unit of XWGTUP] is
//!
//! | IDWTUP | meaning (Les Houches accord) | f_{k,p} | σ_k |
//! |---|---|---|---|
//! | +1, −1 | weighted events, XWGTUP in pb, ⟨w⟩ = σ | 1/N_k | Σ_k w / N_k |
//! | +2, −2 | XSECUP(p) is σ_p; weights only relative within p | XSECUP(p) / Σ_{k,p} w | Σ_p XSECUP(p) |
//! | +3, −3 | unweighted events (|XWGTUP| constant); σ = Σ_p XSECUP(p) | Σ_p XSECUP(p) / Σ_k w | Σ_p XSECUP(p) |
//! | +4, −4 | weighted events passed on as they are, XWGTUP in pb, ⟨w⟩ = σ | 1/N_k | Σ_k w / N_k |
//!
//! (a negative IDWTUP allows negative weights; the factor is the same). So
//! Σ f·w over all events of file k is σ_k, and over any subset its share.
//! For ±2 the sum over processes runs over processes with events.
//!
//! Several files: with `IndependentRuns` (the default), each file's factor
//! is multiplied by c_k = N_k / N, so that σ = Σ_k N_k σ_k / N (the
//! event-count-weighted mean); with `SeparateProcesses`, c_k = 1 and
//! σ = Σ_k σ_k.
//!
//! Uncertainty: for ±1, ±4 the standard error of the mean weight,
//! √((Σw² − (Σw)²/N)/(N(N−1))); for ±2, ±3 √(Σ_p XERRUP(p)²) from `<init>`;
//! files combine as √(Σ_k (c_k δσ_k)²).
//!
//! # References
//! E. Boos et al., "Generic user process interface for event generators"
//! (the Les Houches accord), hep-ph/0109068, Sec. 2 (meaning of IDWTUP;
//! from memory); J. Alwall et al., hep-ph/0609017 (the same in LHEF).

use super::FileCombination;
use super::init::FileInfo;
use super::parse::ProcessSums;
use std::path::PathBuf;

/// Weight sums of one process in one file, with its normalisation.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct ProcessSummary {
    /// Process id (LPRUP).
    pub process_id: i32,
    /// XSECUP from `<init>` [pb].
    pub xsec_init_pb: f64,
    /// XERRUP from `<init>` [pb].
    pub xsec_err_init_pb: f64,
    /// XMAXUP from `<init>` (units of XWGTUP).
    pub xmax: f64,
    /// Events of this process in this file.
    pub n_events: u64,
    /// Σ XWGTUP.
    pub sum_w: f64,
    /// Σ XWGTUP².
    pub sum_w2: f64,
    /// Events with XWGTUP < 0.
    pub n_negative: u64,
    /// The factor f·c [pb per unit of XWGTUP], see the module docs.
    pub factor_pb: f64,
}

/// Weight sums of one file.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct FileSummary {
    /// The file.
    pub path: PathBuf,
    /// IDWTUP of the file.
    pub idwtup: i32,
    /// Events in the file.
    pub n_events: u64,
    /// Σ XWGTUP over the file.
    pub sum_w: f64,
    /// Σ XWGTUP² over the file.
    pub sum_w2: f64,
    /// Events with XWGTUP < 0.
    pub n_negative: u64,
    /// The file's cross-section σ_k under the convention [pb].
    pub xsec_pb: f64,
    /// Its uncertainty δσ_k [pb].
    pub xsec_err_pb: f64,
    /// Σ_p XSECUP(p) from `<init>` [pb].
    pub xsec_init_pb: f64,
    /// √(Σ_p XERRUP(p)²) from `<init>` [pb].
    pub xsec_err_init_pb: f64,
    /// The combination factor c_k (N_k/N or 1).
    pub combination_factor: f64,
    /// Per-process sums, in `<init>` order.
    pub processes: Vec<ProcessSummary>,
}

/// What a full pass over a sample found; turns weights into pb.
#[derive(Debug, Clone, PartialEq, Default, serde::Serialize, serde::Deserialize)]
pub struct SampleSummary {
    /// Number of events read, all files.
    pub n_events: u64,
    /// How the files were combined.
    pub combination: FileCombination,
    /// One-line description of the weight convention applied.
    pub weight_convention: String,
    /// Names of the per-event weight variations.
    pub weight_names: Vec<String>,
    /// Fraction of events with XWGTUP < 0, in [0, 1].
    pub negative_weight_fraction: f64,
    /// Σ XWGTUP over all events (raw, in the files' units).
    pub sum_w: f64,
    /// Σ XWGTUP² over all events.
    pub sum_w2: f64,
    /// The sample's cross-section under the convention [pb].
    pub xsec_pb: f64,
    /// Its uncertainty [pb].
    pub xsec_err_pb: f64,
    /// The cross-section the `<init>` blocks state, combined like the
    /// files [pb].
    pub xsec_init_pb: f64,
    /// Its uncertainty [pb].
    pub xsec_err_init_pb: f64,
    /// Per-file sums.
    pub files: Vec<FileSummary>,
}

impl SampleSummary {
    /// Factor f [pb per unit of XWGTUP] for events of file `file_index` and
    /// process `process_id`, such that Σ f·XWGTUP over any subset of events
    /// is that subset's cross-section in pb under the sample's convention.
    ///
    /// Returns 0 for a file or process the sample does not have (the reader
    /// rejects events whose IDPRUP is not declared in `<init>`, so no read
    /// event has such a pair).
    pub fn weight_to_pb(&self, file_index: usize, process_id: i32) -> f64 {
        self.files
            .get(file_index)
            .and_then(|f| f.processes.iter().find(|p| p.process_id == process_id))
            .map_or(0.0, |p| p.factor_pb)
    }

    /// The sample's cross-section and its uncertainty [pb].
    pub fn cross_section_pb(&self) -> (f64, f64) {
        (self.xsec_pb, self.xsec_err_pb)
    }
}

/// Short description of a weight strategy.
pub fn idwtup_description(idwtup: i32) -> &'static str {
    match idwtup {
        1 => "IDWTUP=+1: weighted events in pb, σ = mean weight",
        -1 => "IDWTUP=-1: weighted events in pb (negative allowed), σ = mean weight",
        2 => "IDWTUP=+2: σ per process from XSECUP, weights relative within a process",
        -2 => "IDWTUP=-2: σ per process from XSECUP, signed weights relative within a process",
        3 => "IDWTUP=+3: unweighted events, σ = Σ XSECUP shared equally",
        -3 => "IDWTUP=-3: unweighted events with signs, σ = Σ XSECUP shared by weight",
        4 => "IDWTUP=+4: weighted events in pb, σ = mean weight",
        -4 => "IDWTUP=-4: weighted events in pb (negative allowed), σ = mean weight",
        _ => "unknown IDWTUP",
    }
}

/// Why a sample cannot be normalised.
#[derive(Debug)]
pub(crate) struct NormFault {
    pub file_index: usize,
    pub rule: String,
}

/// Builds the summary from the `<init>` information and the per-file,
/// per-process sums of a full pass (sums in file order, each file's in the
/// order its processes first appeared).
pub(crate) fn summarize(
    files: &[FileInfo],
    sums: &[Vec<ProcessSums>],
    combination: FileCombination,
    weight_names: &[String],
) -> Result<SampleSummary, NormFault> {
    let n_total: u64 = sums.iter().flatten().map(|s| s.n).sum();
    let mut out = SampleSummary {
        n_events: n_total,
        combination,
        weight_names: weight_names.to_vec(),
        ..Default::default()
    };
    let mut var = 0.0;
    let mut var_init = 0.0;
    let mut n_negative = 0u64;
    for (k, (info, file_sums)) in files.iter().zip(sums).enumerate() {
        let mut procs: Vec<ProcessSummary> = info
            .processes
            .iter()
            .map(|p| {
                let s = file_sums.iter().find(|s| s.process_id == p.id);
                ProcessSummary {
                    process_id: p.id,
                    xsec_init_pb: p.xsec_pb,
                    xsec_err_init_pb: p.xsec_err_pb,
                    xmax: p.xmax,
                    n_events: s.map_or(0, |s| s.n),
                    sum_w: s.map_or(0.0, |s| s.sum_w),
                    sum_w2: s.map_or(0.0, |s| s.sum_w2),
                    n_negative: s.map_or(0, |s| s.n_negative),
                    factor_pb: 0.0,
                }
            })
            .collect();
        let n_k: u64 = procs.iter().map(|p| p.n_events).sum();
        let sum_w: f64 = file_sums.iter().map(|s| s.sum_w).sum();
        let sum_w2: f64 = file_sums.iter().map(|s| s.sum_w2).sum();
        let neg: u64 = procs.iter().map(|p| p.n_negative).sum();
        let fault = |rule: String| NormFault {
            file_index: k,
            rule,
        };
        if n_k == 0 {
            return Err(fault("the file holds no events".into()));
        }
        let c = match combination {
            FileCombination::IndependentRuns => n_k as f64 / n_total as f64,
            FileCombination::SeparateProcesses => 1.0,
        };
        let xsec_init: f64 = info.processes.iter().map(|p| p.xsec_pb).sum();
        let err_init = info
            .processes
            .iter()
            .map(|p| p.xsec_err_pb * p.xsec_err_pb)
            .sum::<f64>()
            .sqrt();
        let (xsec, err) = match info.idwtup.abs() {
            1 | 4 => {
                let n = n_k as f64;
                for p in &mut procs {
                    p.factor_pb = c / n;
                }
                let err = if n_k > 1 {
                    ((sum_w2 - sum_w * sum_w / n).max(0.0) / (n * (n - 1.0))).sqrt()
                } else {
                    0.0
                };
                (sum_w / n, err)
            }
            2 => {
                let mut xsec = 0.0;
                let mut e2 = 0.0;
                for p in procs.iter_mut().filter(|p| p.n_events > 0) {
                    if p.sum_w == 0.0 {
                        return Err(fault(format!(
                            "IDWTUP={}: the weights of process {} sum to 0, so XSECUP = {} pb cannot be shared among its events",
                            info.idwtup, p.process_id, p.xsec_init_pb
                        )));
                    }
                    p.factor_pb = c * p.xsec_init_pb / p.sum_w;
                    xsec += p.xsec_init_pb;
                    e2 += p.xsec_err_init_pb * p.xsec_err_init_pb;
                }
                (xsec, e2.sqrt())
            }
            _ => {
                // ±3 (the header reader admits only ±1 … ±4).
                if sum_w == 0.0 {
                    return Err(fault(format!(
                        "IDWTUP={}: the event weights sum to 0, so Σ XSECUP = {xsec_init} pb cannot be shared among the events",
                        info.idwtup
                    )));
                }
                for p in &mut procs {
                    p.factor_pb = c * xsec_init / sum_w;
                }
                (xsec_init, err_init)
            }
        };
        out.xsec_pb += c * xsec;
        var += (c * err) * (c * err);
        out.xsec_init_pb += c * xsec_init;
        var_init += (c * err_init) * (c * err_init);
        out.sum_w += sum_w;
        out.sum_w2 += sum_w2;
        n_negative += neg;
        out.files.push(FileSummary {
            path: info.path.clone(),
            idwtup: info.idwtup,
            n_events: n_k,
            sum_w,
            sum_w2,
            n_negative: neg,
            xsec_pb: xsec,
            xsec_err_pb: err,
            xsec_init_pb: xsec_init,
            xsec_err_init_pb: err_init,
            combination_factor: c,
            processes: procs,
        });
    }
    out.xsec_err_pb = var.sqrt();
    out.xsec_err_init_pb = var_init.sqrt();
    out.negative_weight_fraction = if n_total > 0 {
        n_negative as f64 / n_total as f64
    } else {
        0.0
    };
    let mut strategies: Vec<i32> = files.iter().map(|f| f.idwtup).collect();
    strategies.sort_unstable();
    strategies.dedup();
    let strat: Vec<&str> = strategies.iter().map(|&s| idwtup_description(s)).collect();
    let comb = match combination {
        FileCombination::IndependentRuns => {
            "files combined as independent runs (σ = event-count-weighted mean)"
        }
        FileCombination::SeparateProcesses => "files combined as separate processes (σ = sum)",
    };
    out.weight_convention = if files.len() > 1 {
        format!("{}; {comb}", strat.join("; "))
    } else {
        strat.join("; ")
    };
    Ok(out)
}
