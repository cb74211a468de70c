//! One-dimensional root finding for the statistics stage: bracket expansion
//! followed by Brent's method (inverse quadratic interpolation, secant and
//! bisection steps), with a clear error when no bracket can be found.
//!
//! Used for upper limits (CLs(μ) = α) and for profiling a single nuisance
//! parameter (root of the score).

use super::StatsError;

/// Largest number of doublings tried when expanding a bracket.
const MAX_EXPANSIONS: usize = 200;
/// Largest number of Brent iterations.
const MAX_ITERATIONS: usize = 200;

/// Root of `f` in the bracket `[a, b]`, where `fa = f(a)` and `fb = f(b)`
/// have opposite signs (either may be ±∞).
///
/// # Formula
/// Brent's method: each step takes an inverse quadratic interpolation
/// through the last three points, or a secant step, and falls back to
/// bisection whenever the interpolated point leaves the bracket, shrinks
/// the bracket too slowly, or is not finite. Stops when the bracket is
/// narrower than `2 (4 ε |b| + xtol/2)` or `f(b) = 0`.
///
/// # Units
/// Those of `x` and `f`; `xtol` in units of `x`.
///
/// # References
/// R. P. Brent, "Algorithms for Minimization without Derivatives",
/// Prentice-Hall (1973), ch. 4 (the zero algorithm).
pub fn brent<F>(
    mut f: F,
    mut a: f64,
    mut b: f64,
    mut fa: f64,
    mut fb: f64,
    xtol: f64,
) -> Result<f64, StatsError>
where
    F: FnMut(f64) -> Result<f64, StatsError>,
{
    if fa == 0.0 {
        return Ok(a);
    }
    if fb == 0.0 {
        return Ok(b);
    }
    if fa.is_nan() || fb.is_nan() || fa.signum() == fb.signum() {
        return Err(StatsError::NoBracket(format!(
            "root finder: f({a}) = {fa} and f({b}) = {fb} do not have opposite signs"
        )));
    }
    let mut c = a;
    let mut fc = fa;
    let mut d = b - a;
    let mut e = d;
    for _ in 0..MAX_ITERATIONS {
        if fb.signum() == fc.signum() {
            c = a;
            fc = fa;
            d = b - a;
            e = d;
        }
        if fc.abs() < fb.abs() {
            a = b;
            b = c;
            c = a;
            fa = fb;
            fb = fc;
            fc = fa;
        }
        let tol = 2.0 * f64::EPSILON * b.abs() + 0.5 * xtol;
        let m = 0.5 * (c - b);
        if m.abs() <= tol || fb == 0.0 {
            return Ok(b);
        }
        let finite = fa.is_finite() && fb.is_finite() && fc.is_finite();
        if finite && e.abs() >= tol && fa.abs() > fb.abs() {
            let s = fb / fa;
            let (mut p, mut q);
            if a == c {
                p = 2.0 * m * s;
                q = 1.0 - s;
            } else {
                let qq = fa / fc;
                let r = fb / fc;
                p = s * (2.0 * m * qq * (qq - r) - (b - a) * (r - 1.0));
                q = (qq - 1.0) * (r - 1.0) * (s - 1.0);
            }
            if p > 0.0 {
                q = -q;
            } else {
                p = -p;
            }
            if p.is_finite()
                && q.is_finite()
                && 2.0 * p < (3.0 * m * q - (tol * q).abs()).min((e * q).abs())
            {
                e = d;
                d = p / q;
            } else {
                d = m;
                e = m;
            }
        } else {
            d = m;
            e = m;
        }
        a = b;
        fa = fb;
        b += if d.abs() > tol { d } else { tol.copysign(m) };
        fb = f(b)?;
        if fb.is_nan() {
            return Err(StatsError::NoBracket(format!(
                "root finder: function is not a number at x = {b}"
            )));
        }
    }
    Ok(b)
}

/// Root of a function that decreases through zero on (0, ∞), e.g.
/// CLs(μ) − α, starting from a positive `guess`.
///
/// The bracket is expanded by doubling upwards until `f < 0` and halving
/// downwards until `f > 0`, then refined with [`brent`] to a relative
/// tolerance `rtol`. `what` names the quantity in error messages.
///
/// # Units
/// Those of `x` (e.g. the signal strength μ, dimensionless).
///
/// # References
/// Bracketing by expansion: W. H. Press et al., "Numerical Recipes", 3rd ed.
/// (2007), §9.1; refinement: Brent (1973), see [`brent`].
pub fn solve_decreasing_positive<F>(
    f: F,
    guess: f64,
    rtol: f64,
    what: &str,
) -> Result<f64, StatsError>
where
    F: FnMut(f64) -> Result<f64, StatsError>,
{
    solve_decreasing_positive_from(f, guess, 2.0, rtol, what)
}

/// As [`solve_decreasing_positive`], expanding the bracket by `factor` > 1
/// per step (a factor near 1 suits a good guess).
pub fn solve_decreasing_positive_from<F>(
    mut f: F,
    guess: f64,
    factor: f64,
    rtol: f64,
    what: &str,
) -> Result<f64, StatsError>
where
    F: FnMut(f64) -> Result<f64, StatsError>,
{
    let factor = if factor > 1.0 { factor } else { 2.0 };
    if !(guess.is_finite() && guess > 0.0) {
        return Err(StatsError::NoBracket(format!(
            "{what}: starting point must be finite and > 0, got {guess}"
        )));
    }
    let mut hi = guess;
    let mut fhi = f(hi)?;
    let mut lo = guess;
    let mut flo = fhi;
    let nan = |x: f64| StatsError::NoBracket(format!("{what}: function is not a number at {x}"));
    let mut n = 0;
    while fhi.is_nan() || fhi >= 0.0 {
        if fhi.is_nan() {
            return Err(nan(hi));
        }
        lo = hi;
        flo = fhi;
        hi *= factor;
        fhi = f(hi)?;
        n += 1;
        if n > MAX_EXPANSIONS || !hi.is_finite() {
            return Err(StatsError::NoBracket(format!(
                "{what}: no upper bracket found up to {hi:e} (function still {fhi} ≥ 0)"
            )));
        }
    }
    n = 0;
    while flo.is_nan() || flo <= 0.0 {
        if flo.is_nan() {
            return Err(nan(lo));
        }
        hi = lo;
        fhi = flo;
        lo /= factor;
        flo = f(lo)?;
        n += 1;
        if n > MAX_EXPANSIONS || lo == 0.0 {
            return Err(StatsError::NoBracket(format!(
                "{what}: no lower bracket found down to {lo:e} (function still {flo} ≤ 0)"
            )));
        }
    }
    brent(f, lo, hi, flo, fhi, rtol * lo)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn brent_finds_sqrt2() {
        // √2 = 1.41421356237… (common knowledge).
        let r = brent(|x| Ok(x * x - 2.0), 0.0, 2.0, -2.0, 2.0, 1e-14).unwrap();
        assert!((r - std::f64::consts::SQRT_2).abs() < 1e-12);
    }

    #[test]
    fn brent_tolerates_infinite_end() {
        // ln x − 1 = 0 at x = e; f(0) = −∞.
        let r = brent(
            |x| Ok(x.ln() - 1.0),
            0.0,
            10.0,
            f64::NEG_INFINITY,
            10f64.ln() - 1.0,
            1e-13,
        )
        .unwrap();
        assert!((r - std::f64::consts::E).abs() < 1e-10);
    }

    #[test]
    fn expansion_brackets_far_root() {
        // 1e6/x − 1 decreases through zero at x = 1e6.
        let r = solve_decreasing_positive(|x| Ok(1e6 / x - 1.0), 1e-3, 1e-10, "test").unwrap();
        assert!((r / 1e6 - 1.0).abs() < 1e-8);
    }

    #[test]
    fn no_bracket_is_an_error() {
        let e = solve_decreasing_positive(|_| Ok(1.0), 1.0, 1e-6, "constant").unwrap_err();
        assert!(matches!(e, StatsError::NoBracket(_)));
    }
}
