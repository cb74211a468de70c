//! CLs from pseudo-experiments: sample the counts and the global
//! observables, evaluate q̃_μ on each, and count.
//!
//! Fed by a [`CountingModel`] and its observation. Toy k of stream h (0 for
//! signal-plus-background, 1 for background-only) draws its numbers from a
//! PCG generator seeded from (seed, h, k) alone, and the results are counted
//! after an ordered collection, so results are bit-identical on any number
//! of threads. The same toy indices are reused at every μ (common random
//! numbers), which smooths CLs(μ) for the root-finder.
//!
//! Both hypotheses are generated with the nuisances fitted to the
//! observation (θ̂̂(μ) and θ̂̂(0)), the LHC frequentist convention. The
//! expected bands are therefore post-fit: they follow the observation's
//! nuisance pulls, unlike the asymptotic bands, which use the nominal
//! (pre-fit) Asimov data set. With a strongly pulled background (e.g. n = 0
//! far below b with a large σ_b) the two differ markedly.

use rand_distr::{Distribution, Poisson};
use rand_pcg::Pcg64;
use rayon::prelude::*;

use super::StatsError;
use super::asymptotic::norm_cdf;
use super::likelihood::{CountingModel, Data, Fit};
use super::root::solve_decreasing_positive_from;

/// Stream of the signal-plus-background pseudo-experiments.
const STREAM_SB: u64 = 0;
/// Stream of the background-only pseudo-experiments.
const STREAM_B: u64 = 1;

/// SplitMix64 finaliser (a bijective 64-bit mixer).
///
/// # References
/// G. L. Steele, D. Lea, C. H. Flood, "Fast splittable pseudorandom number
/// generators", OOPSLA 2014, doi:10.1145/2660193.2660195.
fn splitmix64(mut z: u64) -> u64 {
    z = z.wrapping_add(0x9E37_79B9_7F4A_7C15);
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

/// The generator of toy `index` in `stream` for the global `seed`.
pub fn toy_rng(seed: u64, stream: u64, index: u64) -> Pcg64 {
    let hi = splitmix64(seed ^ splitmix64(index));
    let lo = splitmix64(splitmix64(seed).wrapping_add(index));
    Pcg64::new((u128::from(hi) << 64) | u128::from(lo), u128::from(stream))
}

/// CLs estimated from pseudo-experiments at one μ.
#[derive(Debug, Clone, PartialEq)]
pub struct ToyCls {
    /// Observed q̃_μ.
    pub q_observed: f64,
    /// CL_{s+b} = P(q̃_μ ≥ q̃_obs | μ).
    pub clsb: f64,
    /// CL_b = P(q̃_μ ≥ q̃_obs | 0).
    pub clb: f64,
    /// CLs = CL_{s+b}/CL_b.
    pub cls: f64,
    /// Binomial Monte Carlo uncertainty of CLs.
    pub cls_unc: f64,
    /// q̃_μ of the signal-plus-background toys, sorted ascending.
    pub q_sb: Vec<f64>,
    /// q̃_μ of the background-only toys, sorted ascending.
    pub q_b: Vec<f64>,
}

/// Fraction of sorted values ≥ x − tolerance (ties count, as the
/// observed-or-more-extreme rule requires for discrete counts).
fn tail_fraction(sorted: &[f64], x: f64) -> f64 {
    let cut = x - 1e-9 * x.abs().max(1.0);
    let below = sorted.partition_point(|q| *q < cut);
    (sorted.len() - below) as f64 / sorted.len() as f64
}

/// CLs and its binomial Monte Carlo uncertainty from the two tails.
///
/// # Formula
/// CLs = p₁/p₂ with p₁ = CL_{s+b}, p₂ = CL_b estimated from N toys each;
/// δCLs = CLs √[(1 − p₁)/(N p₁) + (1 − p₂)/(N p₂)] (independent samples;
/// for p₁ = 0 the uncertainty is taken as 1/(N p₂)).
///
/// # References
/// First-order error propagation of binomial proportions (common practice,
/// no single source).
fn cls_from_tails(p1: f64, p2: f64, n: f64) -> (f64, f64) {
    if p2 <= 0.0 {
        return (if p1 > 0.0 { 1.0 } else { 0.0 }, 1.0 / n);
    }
    let cls = (p1 / p2).min(1.0);
    let unc = if p1 > 0.0 {
        cls * ((1.0 - p1) / (n * p1) + (1.0 - p2) / (n * p2)).sqrt()
    } else {
        1.0 / (n * p2)
    };
    (cls, unc)
}

/// The pseudo-experiment calculator.
#[derive(Debug)]
pub struct Toys<'a> {
    model: &'a CountingModel,
    observed: Data,
    free: Fit,
    n_toys: usize,
    seed: u64,
}

impl<'a> Toys<'a> {
    /// Fits the observation once; `n_toys` per hypothesis (≥ 1).
    pub fn new(model: &'a CountingModel, n_toys: usize, seed: u64) -> Result<Self, StatsError> {
        if n_toys == 0 {
            return Err(StatsError::InvalidInput(
                "pseudo-experiments: the number of toys must be ≥ 1, got 0".into(),
            ));
        }
        let observed = model.observed_data();
        let free = model.fit_free(&observed)?;
        Ok(Self {
            model,
            observed,
            free,
            n_toys,
            seed,
        })
    }

    /// q̃_μ of toy `index` generated at μ_gen with nuisances θ_gen.
    fn toy_q(&self, mu: f64, generator: &Fit, stream: u64, index: u64) -> Result<f64, StatsError> {
        let mut rng = toy_rng(self.seed, stream, index);
        let globals: Vec<f64> = generator
            .theta
            .iter()
            .enumerate()
            .map(|(k, t)| self.model.sample_global(k, *t, &mut rng))
            .collect();
        let mut counts = Vec::with_capacity(self.model.n_regions());
        for i in 0..self.model.n_regions() {
            let (nu, _, _) = self.model.expected(i, generator.mu, &generator.theta);
            let n = if nu > 0.0 {
                let p = Poisson::new(nu).map_err(|e| {
                    StatsError::InvalidInput(format!(
                        "pseudo-experiments: region {}: cannot sample a Poisson count with mean {nu} events: {e}",
                        i + 1
                    ))
                })?;
                p.sample(&mut rng)
            } else {
                0.0
            };
            counts.push(n);
        }
        let data = Data { counts, globals };
        let free = self.model.fit_free(&data)?;
        self.model.q_tilde_with(mu, &data, &free)
    }

    /// Sorted q̃_μ of `n_toys` toys generated at μ_gen.
    fn q_distribution(&self, mu: f64, mu_gen: f64, stream: u64) -> Result<Vec<f64>, StatsError> {
        let generator = self.model.fit_conditional(mu_gen, &self.observed)?;
        let mut qs = (0..self.n_toys as u64)
            .into_par_iter()
            .map(|k| self.toy_q(mu, &generator, stream, k))
            .collect::<Result<Vec<f64>, StatsError>>()?;
        qs.sort_by(f64::total_cmp);
        Ok(qs)
    }

    /// CLs at μ from the observed q̃_μ and both toy distributions.
    ///
    /// # Formula
    /// CL_{s+b} = P(q̃_μ ≥ q̃_μ,obs | μ, θ̂̂(μ)), CL_b = P(q̃_μ ≥ q̃_μ,obs | 0,
    /// θ̂̂(0)), with θ̂̂ fitted to the observation and the global
    /// observables sampled around it.
    ///
    /// # References
    /// A. L. Read, J. Phys. G 28 (2002) 2693; ATLAS and CMS collaborations,
    /// LHC Higgs Combination Group, ATL-PHYS-PUB-2011-011 / CMS NOTE-2011/005,
    /// §2 (frequentist construction with profiled nuisances).
    pub fn cls(&self, mu: f64) -> Result<ToyCls, StatsError> {
        let q_obs = self.model.q_tilde_with(mu, &self.observed, &self.free)?;
        let q_sb = self.q_distribution(mu, mu, STREAM_SB)?;
        let q_b = self.q_distribution(mu, 0.0, STREAM_B)?;
        let clsb = tail_fraction(&q_sb, q_obs);
        let clb = tail_fraction(&q_b, q_obs);
        let (cls, cls_unc) = cls_from_tails(clsb, clb, self.n_toys as f64);
        Ok(ToyCls {
            q_observed: q_obs,
            clsb,
            clb,
            cls,
            cls_unc,
            q_sb,
            q_b,
        })
    }

    /// Expected CLs of band order N at μ: the background-only quantile of
    /// q̃_μ at Φ(−N) taken as the observation.
    fn expected_cls(&self, mu: f64, n_sigma: f64) -> Result<f64, StatsError> {
        let q_sb = self.q_distribution(mu, mu, STREAM_SB)?;
        let q_b = self.q_distribution(mu, 0.0, STREAM_B)?;
        let p = norm_cdf(-n_sigma);
        let idx = ((p * q_b.len() as f64).floor() as usize).min(q_b.len() - 1);
        let q = q_b[idx];
        Ok(cls_from_tails(
            tail_fraction(&q_sb, q),
            tail_fraction(&q_b, q),
            self.n_toys as f64,
        )
        .0)
    }

    /// Observed upper limit on μ from CLs(μ) = α, searched from `guess`.
    pub fn observed_limit(&self, alpha: f64, guess: f64) -> Result<f64, StatsError> {
        solve_decreasing_positive_from(
            |mu| Ok(self.cls(mu)?.cls - alpha),
            guess,
            1.3,
            1e-4,
            "pseudo-experiment observed limit on μ",
        )
    }

    /// Expected upper limits on μ at N = −2 … +2 from background-only toys.
    pub fn expected_limits(&self, alpha: f64, guess: f64) -> Result<[f64; 5], StatsError> {
        let mut out = [0.0; 5];
        for (slot, n_sigma) in out.iter_mut().zip(-2..=2) {
            *slot = solve_decreasing_positive_from(
                |mu| Ok(self.expected_cls(mu, f64::from(n_sigma))? - alpha),
                guess,
                1.3,
                1e-4,
                "pseudo-experiment expected limit on μ",
            )?;
        }
        Ok(out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn seeds_differ_by_index_and_stream() {
        use rand::Rng;
        let a = toy_rng(1, 0, 0).next_u64();
        assert_ne!(a, toy_rng(1, 0, 1).next_u64());
        assert_ne!(a, toy_rng(1, 1, 0).next_u64());
        assert_ne!(a, toy_rng(2, 0, 0).next_u64());
        assert_eq!(a, toy_rng(1, 0, 0).next_u64());
    }

    #[test]
    fn tail_counts_ties() {
        let q = [0.0, 1.0, 1.0, 2.0];
        assert_eq!(tail_fraction(&q, 1.0), 0.75);
        assert_eq!(tail_fraction(&q, 2.5), 0.0);
    }
}
