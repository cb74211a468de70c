//! The counting-experiment likelihood with constrained nuisance parameters,
//! its profiling, and the test statistic q̃_μ.
//!
//! Fed by [`super::RegionCounts`] (one or several exclusive regions) and an
//! optional background covariance matrix; used by the asymptotic and the
//! pseudo-experiment methods.
//!
//! # Model
//! Region i has expected count ν_i = μ s_i(ξ) + b_i(η) and observed n_i.
//! The background nuisances η are standard-normal variables mapped onto the
//! backgrounds by a matrix L (L = diag(σ_b) for independent regions, a square
//! root of the covariance C = L Lᵀ otherwise):
//! - Gaussian constraint: b_i(η) = b_i + (Lη)_i, truncated to b_i(η) ≥ 0;
//! - log-normal constraint: b_i(η) = b_i exp((L'η)_i) with L' a square root
//!   of C'_ij = ln(1 + C_ij/(b_i b_j)), so that b(η) has covariance C;
//! - Poisson (on/off) constraint, independent regions: b_i(η) = b_i + σ_i η_i
//!   as for the Gaussian, but the constraint term is that of an auxiliary
//!   count m_i ~ Poisson(τ_i b_i(η)), τ_i = b_i/σ_i², with m_i = τ_i(b_i +
//!   σ_i a_i) for global observable a_i (Li & Ma, ApJ 272 (1983) 317).
//!
//! A relative signal uncertainty f_i adds one nuisance ξ_i per region (not
//! correlated between regions, as for Monte Carlo statistics), always
//! log-normal: s_i(ξ) = s_i exp(w_i ξ_i), w_i = √ln(1 + f_i²). (A truncated
//! Gaussian would let the fit switch the signal off at a finite penalty
//! ½(1/f)², so CLs would not fall below a floor at large μ.)
//!
//! Each other nuisance θ_k has a unit Gaussian constraint around its global
//! observable a_k (nominal 0). The negative log-likelihood, up to a constant,
//! is
//!
//! −ln L(μ, θ) = Σ_i [ν_i − n_i + n_i ln(n_i/ν_i)] + ½ Σ_k (θ_k − a_k)²
//!
//! with, for the Poisson constraint, ½(θ_k − a_k)² replaced by
//! τb − m + m ln(m/(τb)).
//!
//! # References
//! G. Cowan, K. Cranmer, E. Gross, O. Vitells, EPJC 71 (2011) 1554,
//! arXiv:1007.1727, Eqs. (7), (16) (profile likelihood ratio and q̃_μ).

use nalgebra::{DMatrix, DVector};

use super::root::brent;
use super::{BackgroundConstraint, RegionCounts, StatsError};

/// Data seen by the likelihood: counts per region and global observables.
#[derive(Debug, Clone, PartialEq)]
pub struct Data {
    /// Counts per region \[events\]; non-integer for the Asimov data set.
    pub counts: Vec<f64>,
    /// Global observables, one per nuisance parameter (nominal 0).
    pub globals: Vec<f64>,
}

/// Result of a maximum-likelihood fit.
#[derive(Debug, Clone, PartialEq)]
pub struct Fit {
    /// Signal strength μ at the minimum.
    pub mu: f64,
    /// Nuisance parameters at the minimum (background ones first).
    pub theta: Vec<f64>,
    /// −ln L at the minimum (constant as in the module documentation).
    pub nll: f64,
}

/// Counting model over one or several exclusive regions.
#[derive(Debug, Clone)]
pub struct CountingModel {
    background: Vec<f64>,
    signal: Vec<f64>,
    observed: Vec<f64>,
    constraint: BackgroundConstraint,
    /// regions × background nuisances.
    bkg_map: DMatrix<f64>,
    /// Per region: index (in θ) of its signal nuisance, if any.
    sig_index: Vec<Option<usize>>,
    /// Per region: signal width f_i (Gaussian) or w_i (log-normal).
    sig_width: Vec<f64>,
    /// Poisson constraint: per background nuisance (b_i, σ_i, τ_i).
    aux: Vec<(f64, f64, f64)>,
    n_theta: usize,
}

/// Relative tolerance for symmetry of a covariance matrix.
const SYMMETRY_RTOL: f64 = 1e-9;
/// Eigenvalues above −PSD_RTOL·max|λ| count as zero when testing PSD.
const PSD_RTOL: f64 = 1e-10;

/// A square root L with L Lᵀ = C of a symmetric positive semi-definite
/// matrix: the Cholesky factor when C is positive definite, else V √D from
/// the symmetric eigen-decomposition C = V D Vᵀ.
fn psd_sqrt(c: &DMatrix<f64>, what: &str) -> Result<DMatrix<f64>, StatsError> {
    if let Some(ch) = c.clone().cholesky() {
        return Ok(ch.l());
    }
    let eig = c.clone().symmetric_eigen();
    let max = eig.eigenvalues.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    let min = eig
        .eigenvalues
        .iter()
        .copied()
        .fold(f64::INFINITY, f64::min);
    if min < -PSD_RTOL * max.max(f64::MIN_POSITIVE) {
        return Err(StatsError::InvalidInput(format!(
            "{what}: matrix is not positive semi-definite (smallest eigenvalue {min:e} events², largest {max:e} events²)"
        )));
    }
    let mut l = eig.eigenvectors.clone();
    for (j, lambda) in eig.eigenvalues.iter().enumerate() {
        let r = lambda.max(0.0).sqrt();
        l.column_mut(j).scale_mut(r);
    }
    Ok(l)
}

/// Checks that a covariance matrix is n×n, finite, symmetric and PSD.
pub(crate) fn validate_covariance(c: &DMatrix<f64>, n: usize) -> Result<(), StatsError> {
    if c.nrows() != n || c.ncols() != n {
        return Err(StatsError::InvalidInput(format!(
            "background covariance: must be {n}×{n} (one row and column per region), got {}×{}",
            c.nrows(),
            c.ncols()
        )));
    }
    for i in 0..n {
        for j in 0..n {
            let v = c[(i, j)];
            if !v.is_finite() {
                return Err(StatsError::InvalidInput(format!(
                    "background covariance: entry ({}, {}) must be finite, got {v} events²",
                    i + 1,
                    j + 1
                )));
            }
            let w = c[(j, i)];
            if (v - w).abs() > SYMMETRY_RTOL * v.abs().max(w.abs()).max(f64::MIN_POSITIVE) {
                return Err(StatsError::InvalidInput(format!(
                    "background covariance: must be symmetric, entry ({}, {}) = {v} but ({}, {}) = {w} events²",
                    i + 1,
                    j + 1,
                    j + 1,
                    i + 1
                )));
            }
        }
        if c[(i, i)] < 0.0 {
            return Err(StatsError::InvalidInput(format!(
                "background covariance: diagonal entry ({0}, {0}) must be ≥ 0, got {1} events²",
                i + 1,
                c[(i, i)]
            )));
        }
    }
    psd_sqrt(c, "background covariance").map(|_| ())
}

impl CountingModel {
    /// Builds the model. Inputs are assumed validated by the caller
    /// (`validate_regions` in the parent module); `covariance`, if given, replaces the
    /// per-region background uncertainties.
    pub fn new(
        regions: &[RegionCounts],
        covariance: Option<&DMatrix<f64>>,
        constraint: BackgroundConstraint,
    ) -> Result<Self, StatsError> {
        let n = regions.len();
        let background: Vec<f64> = regions.iter().map(|r| r.background).collect();
        let cov = match covariance {
            Some(c) => {
                validate_covariance(c, n)?;
                c.clone()
            }
            None => DMatrix::from_diagonal(&DVector::from_iterator(
                n,
                regions.iter().map(|r| r.background_unc * r.background_unc),
            )),
        };
        if constraint == BackgroundConstraint::Poisson {
            if covariance.is_some() {
                return Err(StatsError::InvalidInput(
                    "the Poisson (on/off) background constraint takes independent regions; a covariance matrix needs the Gaussian or log-normal constraint".into(),
                ));
            }
            for (i, r) in regions.iter().enumerate() {
                if r.background <= 0.0 && r.background_unc > 0.0 {
                    return Err(StatsError::InvalidInput(format!(
                        "region {}: a Poisson (on/off) background constraint needs background > 0 events when its uncertainty is > 0, got background {} events",
                        i + 1,
                        r.background
                    )));
                }
            }
        }
        if constraint == BackgroundConstraint::LogNormal {
            for (i, b) in background.iter().enumerate() {
                if *b <= 0.0 && cov[(i, i)] > 0.0 {
                    return Err(StatsError::InvalidInput(format!(
                        "region {}: a log-normal background constraint needs background > 0 events when its uncertainty is > 0, got background {b} events",
                        i + 1
                    )));
                }
            }
        }
        let target = match constraint {
            BackgroundConstraint::Gaussian | BackgroundConstraint::Poisson => cov,
            BackgroundConstraint::LogNormal => DMatrix::from_fn(n, n, |i, j| {
                if background[i] > 0.0 && background[j] > 0.0 {
                    (1.0 + cov[(i, j)] / (background[i] * background[j])).ln()
                } else {
                    0.0
                }
            }),
        };
        // Independent regions: the square root of a diagonal matrix is exact.
        let full = if covariance.is_none() {
            DMatrix::from_diagonal(&target.diagonal().map(|v| v.max(0.0).sqrt()))
        } else {
            psd_sqrt(&target, "background covariance")?
        };
        // Keep only columns that move some background.
        let cols: Vec<usize> = (0..n)
            .filter(|&j| full.column(j).iter().any(|v| *v != 0.0))
            .collect();
        let bkg_map = DMatrix::from_fn(n, cols.len(), |i, k| full[(i, cols[k])]);
        let mut n_theta = cols.len();
        let mut sig_index = vec![None; n];
        let mut sig_width = vec![0.0; n];
        for (i, r) in regions.iter().enumerate() {
            if r.signal_rel_unc > 0.0 && r.signal > 0.0 {
                sig_index[i] = Some(n_theta);
                n_theta += 1;
                sig_width[i] = (1.0 + r.signal_rel_unc * r.signal_rel_unc).ln().sqrt();
            }
        }
        // Independent regions: column k moves exactly one region.
        let aux = if constraint == BackgroundConstraint::Poisson {
            (0..bkg_map.ncols())
                .map(|k| {
                    let i = (0..n).find(|&i| bkg_map[(i, k)] != 0.0).unwrap_or(0);
                    let sd = bkg_map[(i, k)];
                    (background[i], sd, background[i] / (sd * sd))
                })
                .collect()
        } else {
            Vec::new()
        };
        Ok(Self {
            aux,
            background,
            signal: regions.iter().map(|r| r.signal).collect(),
            observed: regions.iter().map(|r| r.observed as f64).collect(),
            constraint,
            bkg_map,
            sig_index,
            sig_width,
            n_theta,
        })
    }

    /// Number of regions.
    pub fn n_regions(&self) -> usize {
        self.background.len()
    }

    /// Number of nuisance parameters.
    pub fn n_nuisances(&self) -> usize {
        self.n_theta
    }

    /// Number of background nuisance parameters (the first entries of θ).
    pub fn n_background_nuisances(&self) -> usize {
        self.bkg_map.ncols()
    }

    /// Total nominal signal Σ s_i \[events\].
    pub fn total_signal(&self) -> f64 {
        self.signal.iter().sum()
    }

    /// The observed data with nominal global observables.
    pub fn observed_data(&self) -> Data {
        Data {
            counts: self.observed.clone(),
            globals: vec![0.0; self.n_theta],
        }
    }

    /// The Asimov data set for signal strength `mu` at nominal nuisances:
    /// counts ν_i(μ, 0), global observables 0 (CCGV Eq. (24)).
    pub fn asimov_data(&self, mu: f64) -> Data {
        let zeros = vec![0.0; self.n_theta];
        Data {
            counts: (0..self.n_regions())
                .map(|i| self.expected(i, mu, &zeros).0)
                .collect(),
            globals: zeros,
        }
    }

    /// Background and signal of region `i` at nuisances θ, and their
    /// derivatives' scale factors: returns (ν, b, s).
    fn parts(&self, i: usize, mu: f64, theta: &[f64]) -> (f64, f64, f64) {
        let mut shift = 0.0;
        for (k, t) in theta.iter().take(self.bkg_map.ncols()).enumerate() {
            shift += self.bkg_map[(i, k)] * t;
        }
        let s = match self.sig_index[i] {
            Some(k) => self.signal[i] * (self.sig_width[i] * theta[k]).exp(),
            None => self.signal[i],
        };
        let b = match self.constraint {
            BackgroundConstraint::Gaussian | BackgroundConstraint::Poisson => {
                self.background[i] + shift
            }
            BackgroundConstraint::LogNormal => self.background[i] * shift.exp(),
        };
        (mu * s + b, b, s)
    }

    /// Expected count of region `i`: (ν, b, s) \[events\].
    pub fn expected(&self, i: usize, mu: f64, theta: &[f64]) -> (f64, f64, f64) {
        self.parts(i, mu, theta)
    }

    /// Constraint term of nuisance k at θ_k for global observable a_k, with
    /// its first and second derivatives in θ_k.
    ///
    /// # Formula
    /// Unit Gaussian: ½(θ − a)², θ − a, 1. Poisson (on/off), b = b_i + σθ,
    /// m = τ(b_i + σa): τb − m + m ln(m/(τb)), σ(τ − m/b), mσ²/b².
    ///
    /// # References
    /// T.-P. Li, Y.-Q. Ma, ApJ 272 (1983) 317 (on/off likelihood);
    /// S. Baker, R. D. Cousins, NIM 221 (1984) 437 (deviance form).
    fn constraint_term(&self, k: usize, t: f64, a: f64) -> (f64, f64, f64) {
        match self.aux.get(k) {
            Some(&(b0, sd, tau)) => {
                let b = b0 + sd * t;
                let m = (tau * (b0 + sd * a)).max(0.0);
                let value = poisson_deviance_half(m, tau * b);
                if b <= 0.0 {
                    let d1 = if m > 0.0 { f64::NEG_INFINITY } else { sd * tau };
                    return (value, d1, f64::INFINITY);
                }
                (value, sd * (tau - m / b), m * sd * sd / (b * b))
            }
            None => (0.5 * (t - a) * (t - a), t - a, 1.0),
        }
    }

    /// Draws the global observable of nuisance k for a pseudo-experiment
    /// generated at θ_k: a ~ N(θ_k, 1), or for the Poisson constraint the
    /// auxiliary count m ~ Poisson(τ b(θ_k)) mapped back to a = (m/τ − b)/σ.
    pub fn sample_global<R: rand::Rng + ?Sized>(&self, k: usize, t: f64, rng: &mut R) -> f64 {
        use rand_distr::{Distribution, Poisson, StandardNormal};
        match self.aux.get(k) {
            Some(&(b0, sd, tau)) => {
                let lam = tau * (b0 + sd * t);
                let m = if lam > 0.0 {
                    Poisson::new(lam).map_or(lam, |p| p.sample(rng))
                } else {
                    0.0
                };
                (m / tau - b0) / sd
            }
            None => {
                let z: f64 = StandardNormal.sample(rng);
                t + z
            }
        }
    }

    /// −ln L(μ, θ) for `data`; +∞ outside the allowed region (a negative
    /// expected background or signal, or ν = 0 with n > 0).
    pub fn nll(&self, mu: f64, theta: &[f64], data: &Data) -> f64 {
        if mu < 0.0 {
            return f64::INFINITY;
        }
        let mut sum = 0.0;
        for (k, (t, a)) in theta.iter().zip(&data.globals).enumerate() {
            sum += self.constraint_term(k, *t, *a).0;
        }
        for (i, &n) in data.counts.iter().enumerate() {
            let (nu, b, s) = self.parts(i, mu, theta);
            if b < 0.0 || s < 0.0 || nu.is_nan() {
                return f64::INFINITY;
            }
            sum += poisson_deviance_half(n, nu);
        }
        sum
    }

    /// Derivative of −ln L with respect to the single nuisance θ_0 (models
    /// with exactly one nuisance), at fixed μ.
    fn score_one(&self, mu: f64, t: f64, data: &Data) -> f64 {
        let theta = [t];
        let mut g = self.constraint_term(0, t, data.globals[0]).1;
        for (i, &n) in data.counts.iter().enumerate() {
            let (nu, b, s) = self.parts(i, mu, &theta);
            let dnu = if self.bkg_map.ncols() == 1 {
                match self.constraint {
                    BackgroundConstraint::Gaussian | BackgroundConstraint::Poisson => {
                        self.bkg_map[(i, 0)]
                    }
                    BackgroundConstraint::LogNormal => b * self.bkg_map[(i, 0)],
                }
            } else if self.sig_index[i].is_some() {
                mu * s * self.sig_width[i]
            } else {
                0.0
            };
            if dnu == 0.0 {
                continue;
            }
            if n <= 0.0 {
                g += dnu;
                continue;
            }
            if nu <= 0.0 {
                return f64::NEG_INFINITY;
            }
            g += (1.0 - n / nu) * dnu;
        }
        g
    }

    /// Bounds of the single nuisance θ_0 from b(θ) ≥ 0 (a log-normal
    /// signal nuisance has none).
    fn bounds_one(&self) -> (f64, f64) {
        let mut lo = f64::NEG_INFINITY;
        let mut hi = f64::INFINITY;
        if self.constraint == BackgroundConstraint::LogNormal || self.bkg_map.ncols() != 1 {
            return (lo, hi);
        }
        for i in 0..self.n_regions() {
            let (offset, slope) = (self.background[i], self.bkg_map[(i, 0)]);
            if slope > 0.0 {
                lo = lo.max(-offset / slope);
            } else if slope < 0.0 {
                hi = hi.min(-offset / slope);
            }
        }
        (lo, hi)
    }

    /// Conditional fit with one nuisance: the root of the score by bracket
    /// expansion from the global observable, then Brent's method; the bound
    /// is the answer when the score is ≥ 0 there.
    fn fit_one(&self, mu: f64, data: &Data) -> Result<Fit, StatsError> {
        let (lb, ub) = self.bounds_one();
        let x0 = data.globals[0].clamp(lb, ub);
        let g0 = self.score_one(mu, x0, data);
        let finish = |t: f64| Fit {
            mu,
            theta: vec![t],
            nll: self.nll(mu, &[t], data),
        };
        if g0 == 0.0 {
            return Ok(finish(x0));
        }
        let dir = if g0 > 0.0 { -1.0 } else { 1.0 };
        let bound = if dir < 0.0 { lb } else { ub };
        let mut step = 1.0;
        let mut inner = x0;
        let mut g_inner = g0;
        for _ in 0..200 {
            let x = (inner + dir * step).clamp(lb, ub);
            let g = self.score_one(mu, x, data);
            if g.signum() != g0.signum() || g == 0.0 {
                let (a, b, fa, fb) = if dir < 0.0 {
                    (x, inner, g, g_inner)
                } else {
                    (inner, x, g_inner, g)
                };
                let t = brent(|t| Ok(self.score_one(mu, t, data)), a, b, fa, fb, 1e-12)?;
                return Ok(finish(t));
            }
            if x == bound {
                return Ok(finish(bound));
            }
            inner = x;
            g_inner = g;
            step *= 2.0;
        }
        Err(StatsError::NoBracket(format!(
            "profiling the nuisance parameter at μ = {mu}: no root of the score found near {x0}"
        )))
    }

    /// Gradient `g` and Hessian `h` (row-major, np × np) of −ln L in the
    /// parameters p = (μ if `free_mu`, θ); `d` is scratch of length np.
    #[allow(clippy::too_many_arguments)]
    fn derivatives(
        &self,
        mu: f64,
        theta: &[f64],
        data: &Data,
        free_mu: bool,
        g: &mut [f64],
        h: &mut [f64],
        d: &mut [f64],
    ) {
        let off = usize::from(free_mu);
        let np = off + self.n_theta;
        let nb = self.bkg_map.ncols();
        g.fill(0.0);
        h.fill(0.0);
        for k in 0..self.n_theta {
            let (_, d1, d2) = self.constraint_term(k, theta[k], data.globals[k]);
            g[off + k] = d1;
            h[(off + k) * np + off + k] = d2;
        }
        let log_normal = self.constraint == BackgroundConstraint::LogNormal;
        for (i, &n) in data.counts.iter().enumerate() {
            let (nu, b, s) = self.parts(i, mu, theta);
            let nu_safe = nu.max(f64::MIN_POSITIVE);
            let r = 1.0 - n / nu_safe;
            let c = n / (nu_safe * nu_safe);
            d.fill(0.0);
            if free_mu {
                d[0] = s;
            }
            for k in 0..nb {
                let l = self.bkg_map[(i, k)];
                d[off + k] = if log_normal { b * l } else { l };
            }
            let ds = self.sig_index[i].map(|k| {
                let dsdx = s * self.sig_width[i];
                d[off + k] = mu * dsdx;
                (k, dsdx)
            });
            for (j, dj) in d.iter().enumerate() {
                if *dj == 0.0 {
                    continue;
                }
                g[j] += r * dj;
                for (l, dl) in d.iter().enumerate() {
                    h[j * np + l] += c * dj * dl;
                }
            }
            // Second derivatives of ν.
            if log_normal {
                for k in 0..nb {
                    for l in 0..nb {
                        h[(off + k) * np + off + l] +=
                            r * b * self.bkg_map[(i, k)] * self.bkg_map[(i, l)];
                    }
                }
            }
            if let Some((k, dsdx)) = ds {
                if free_mu {
                    h[off + k] += r * dsdx;
                    h[(off + k) * np] += r * dsdx;
                }
                h[(off + k) * np + off + k] += r * mu * dsdx * self.sig_width[i];
            }
        }
    }

    /// −ln L at parameters p = (μ if `free_mu`, θ).
    fn nll_p(&self, p: &[f64], data: &Data, free_mu: bool, mu_fixed: f64) -> f64 {
        if free_mu {
            self.nll(p[0], &p[1..], data)
        } else {
            self.nll(mu_fixed, p, data)
        }
    }

    /// Damped Newton minimisation of −ln L over θ (and μ ≥ 0 if `free_mu`)
    /// from a feasible start.
    ///
    /// # Formula
    /// Step Δ = −(H + λ I)⁻¹ g with λ ≥ 0 raised until H + λ I has a
    /// Cholesky factor and Δ is a descent direction; step length halved
    /// until the point is allowed and satisfies the Armijo condition
    /// f(p + tΔ) ≤ f(p) + 10⁻⁴ t gᵀΔ. Stops when the decrease or the Newton
    /// decrement −gᵀΔ/2 is below 10⁻¹³ (1 + |f|), or the gradient norm below
    /// 10⁻¹⁰.
    ///
    /// # References
    /// J. Nocedal, S. J. Wright, "Numerical Optimization", 2nd ed. (2006),
    /// §3.1 (Armijo backtracking) and §3.4 (Newton with Hessian modification).
    fn newton(&self, start: Vec<f64>, data: &Data, free_mu: bool, mu_fixed: f64) -> Fit {
        let np = start.len();
        let mut p = start;
        // One work buffer: q, g, d, Δ (np each), H and its factor (np² each).
        let mut work = vec![0.0; 4 * np + 2 * np * np];
        let (q, rest) = work.split_at_mut(np);
        let (g, rest) = rest.split_at_mut(np);
        let (d, rest) = rest.split_at_mut(np);
        let (dx, rest) = rest.split_at_mut(np);
        let (h, m) = rest.split_at_mut(np * np);
        let mut f = self.nll_p(&p, data, free_mu, mu_fixed);
        for _ in 0..500 {
            {
                let (mu, th) = if free_mu {
                    (p[0], &p[1..])
                } else {
                    (mu_fixed, &p[..])
                };
                self.derivatives(mu, th, data, free_mu, g, h, d);
            }
            let gnorm = g.iter().map(|v| v * v).sum::<f64>().sqrt();
            if gnorm.is_nan() || gnorm.is_infinite() || gnorm < 1e-10 {
                break;
            }
            let scale = (0..np).map(|j| h[j * np + j].abs()).fold(1.0, f64::max);
            let mut lambda = 0.0;
            let mut found = false;
            for _ in 0..60 {
                m.copy_from_slice(h);
                for j in 0..np {
                    m[j * np + j] += lambda;
                }
                if cholesky_solve(m, np, g, dx) {
                    let slope: f64 = g.iter().zip(dx.iter()).map(|(a, b)| a * b).sum();
                    if slope < 0.0 && dx.iter().all(|v| v.is_finite()) {
                        found = true;
                        break;
                    }
                }
                lambda = if lambda == 0.0 {
                    1e-8 * scale
                } else {
                    lambda * 10.0
                };
            }
            if !found {
                break;
            }
            let slope: f64 = g.iter().zip(dx.iter()).map(|(a, b)| a * b).sum();
            // Newton decrement: −gᵀΔ/2 estimates f − min f; stop below 10⁻¹³.
            if -0.5 * slope < 1e-13 * (1.0 + f.abs()) {
                break;
            }
            let mut t = 1.0;
            let mut fq = f64::INFINITY;
            let mut accepted = false;
            for _ in 0..80 {
                for ((qj, pj), dj) in q.iter_mut().zip(&p).zip(dx.iter()) {
                    *qj = pj + t * dj;
                }
                fq = self.nll_p(q, data, free_mu, mu_fixed);
                if fq.is_finite() && fq <= f + 1e-4 * t * slope {
                    accepted = true;
                    break;
                }
                t *= 0.5;
            }
            if !accepted {
                break;
            }
            let decrease = f - fq;
            p.copy_from_slice(q);
            f = fq;
            if decrease < 1e-13 * (1.0 + f.abs()) {
                break;
            }
        }
        if free_mu {
            let theta = p[1..].to_vec();
            Fit {
                mu: p[0],
                theta,
                nll: f,
            }
        } else {
            Fit {
                mu: mu_fixed,
                theta: p,
                nll: f,
            }
        }
    }

    /// A feasible starting point for θ: the global observables if allowed,
    /// else the nominal point, else one unit up in every background
    /// nuisance.
    fn start_theta(&self, mu: f64, data: &Data) -> Vec<f64> {
        if self.nll(mu, &data.globals, data).is_finite() {
            return data.globals.clone();
        }
        let zeros = vec![0.0; self.n_theta];
        if self.nll(mu, &zeros, data).is_finite() {
            return zeros;
        }
        let mut up = zeros;
        for v in up.iter_mut().take(self.bkg_map.ncols()) {
            *v = 1.0;
        }
        if self.nll(mu, &up, data).is_finite() {
            return up;
        }
        vec![0.0; self.n_theta]
    }

    /// Conditional fit: θ̂̂(μ) minimising −ln L at fixed μ ≥ 0.
    pub fn fit_conditional(&self, mu: f64, data: &Data) -> Result<Fit, StatsError> {
        match self.n_theta {
            0 => Ok(Fit {
                mu,
                theta: Vec::new(),
                nll: self.nll(mu, &[], data),
            }),
            1 => self.fit_one(mu, data),
            _ => {
                let start = self.start_theta(mu, data);
                Ok(self.newton(start, data, false, mu))
            }
        }
    }

    /// Unconditional fit with μ ≥ 0: (μ̂, θ̂).
    ///
    /// One region: μ̂ = (n − b(a))/s(a) with θ̂ = a when that is ≥ 0 (each
    /// term of −ln L is then at its own minimum). Otherwise the conditional
    /// fit at μ = 0 is the answer when the profiled −ln L rises from μ = 0
    /// (its derivative there, by the envelope theorem, is
    /// Σ_i s_i (1 − n_i/ν_i) at θ̂̂(0)); else a damped Newton fit in (μ, θ).
    pub fn fit_free(&self, data: &Data) -> Result<Fit, StatsError> {
        let s_tot = self.total_signal();
        if s_tot <= 0.0 {
            return self.fit_conditional(0.0, data);
        }
        // One region: ν = n with θ = a minimises every term separately.
        if self.n_regions() == 1 {
            let (_, b, s) = self.parts(0, 0.0, &data.globals);
            if b >= 0.0 && s > 0.0 {
                let mu_hat = (data.counts[0] - b) / s;
                if mu_hat >= 0.0 {
                    let nll = self.nll(mu_hat, &data.globals, data);
                    return Ok(Fit {
                        mu: mu_hat,
                        theta: data.globals.clone(),
                        nll,
                    });
                }
            }
        }
        let at_zero = &self.fit_conditional(0.0, data)?;
        if at_zero.nll.is_finite() {
            let mut slope = 0.0;
            for (i, &n) in data.counts.iter().enumerate() {
                let (nu, _, s) = self.parts(i, 0.0, &at_zero.theta);
                slope += s * (1.0 - n / nu.max(f64::MIN_POSITIVE));
            }
            if slope >= 0.0 {
                return Ok(at_zero.clone());
            }
        }
        let excess: f64 = data
            .counts
            .iter()
            .zip(&self.background)
            .map(|(n, b)| n - b)
            .sum();
        let mu0 = (excess / s_tot).max(1e-3);
        let mut start = vec![mu0];
        let th = if at_zero.nll.is_finite() {
            at_zero.theta.clone()
        } else {
            self.start_theta(mu0, data)
        };
        start.extend(th);
        let fit = self.newton(start, data, true, 0.0);
        if at_zero.nll < fit.nll {
            return Ok(at_zero.clone());
        }
        Ok(fit)
    }

    /// Test statistic q̃_μ for an upper limit, with the conditional fits at
    /// μ and 0 and the free fit supplied by the caller when known.
    ///
    /// # Formula
    /// q̃_μ = −2 ln[L(μ, θ̂̂(μ)) / L(0, θ̂̂(0))]   if μ̂ < 0,
    /// q̃_μ = −2 ln[L(μ, θ̂̂(μ)) / L(μ̂, θ̂)]       if 0 ≤ μ̂ ≤ μ,
    /// q̃_μ = 0                                    if μ̂ > μ;
    /// μ̂ is restricted to μ̂ ≥ 0 here, which gives the first line for μ̂ < 0.
    ///
    /// # Units
    /// μ dimensionless; q̃_μ dimensionless.
    ///
    /// # References
    /// G. Cowan, K. Cranmer, E. Gross, O. Vitells, EPJC 71 (2011) 1554,
    /// arXiv:1007.1727, Eq. (16).
    pub fn q_tilde_with(&self, mu: f64, data: &Data, free: &Fit) -> Result<f64, StatsError> {
        if free.mu > mu {
            return Ok(0.0);
        }
        let cond = self.fit_conditional(mu, data)?;
        Ok((2.0 * (cond.nll - free.nll)).max(0.0))
    }

    /// Test statistic q̃_μ for `data` (see [`Self::q_tilde_with`]).
    pub fn q_tilde(&self, mu: f64, data: &Data) -> Result<f64, StatsError> {
        let free = self.fit_free(data)?;
        self.q_tilde_with(mu, data, &free)
    }
}

/// Solves A x = −g for a symmetric positive definite A (row-major n × n in
/// `m`, overwritten by its Cholesky factor L with A = L Lᵀ); returns false
/// when A is not positive definite.
///
/// # References
/// G. H. Golub, C. F. Van Loan, "Matrix Computations", 4th ed. (2013),
/// Algorithm 4.2.1 (Cholesky), then forward and back substitution.
fn cholesky_solve(m: &mut [f64], n: usize, g: &[f64], x: &mut [f64]) -> bool {
    for j in 0..n {
        let mut s = m[j * n + j];
        for k in 0..j {
            s -= m[j * n + k] * m[j * n + k];
        }
        if s.is_nan() || s <= 0.0 {
            return false;
        }
        let l = s.sqrt();
        m[j * n + j] = l;
        for i in j + 1..n {
            let mut t = m[i * n + j];
            for k in 0..j {
                t -= m[i * n + k] * m[j * n + k];
            }
            m[i * n + j] = t / l;
        }
    }
    for i in 0..n {
        let mut t = -g[i];
        for k in 0..i {
            t -= m[i * n + k] * x[k];
        }
        x[i] = t / m[i * n + i];
    }
    for i in (0..n).rev() {
        let mut t = x[i];
        for k in i + 1..n {
            t -= m[k * n + i] * x[k];
        }
        x[i] = t / m[i * n + i];
    }
    true
}

/// Half the Poisson deviance: ν − n + n ln(n/ν), the −ln of the Poisson
/// probability relative to its maximum (ν = n); 0 for ν = n, ν for n = 0,
/// +∞ for ν ≤ 0 < n.
///
/// # References
/// S. Baker, R. D. Cousins, NIM 221 (1984) 437, Eq. (5).
pub fn poisson_deviance_half(n: f64, nu: f64) -> f64 {
    if n <= 0.0 {
        return nu;
    }
    if nu <= 0.0 {
        return f64::INFINITY;
    }
    nu - n + n * (n / nu).ln()
}
