//! Penalized smoothing splines of odd degree 2m − 1 with knots at the samples.
//!
//! Minimizes Σ wᵢ |yᵢ − f(tᵢ)|² + λ ∫ |f⁽ᵐ⁾(t)|² dt over all coordinates at once (one λ per track,
//! so the fit commutes with rotations of space). m = 2 is the cubic smoothing spline of C. Reinsch,
//! "Smoothing by spline functions", Numer. Math. 10 (1967) 177–183; m = 3 is the quintic spline,
//! whose third derivative (jerk, and torsion) is continuous. The minimizer is the natural spline of
//! degree 2m − 1, found here in the full B-spline space on the samples (which contains it), so the
//! normal equations are a band of half-width 2m − 1 solved in O(n).
//!
//! λ is chosen by generalized cross-validation (P. Craven and G. Wahba, Numer. Math. 31 (1979)
//! 377–403), or by the unbiased risk estimate when the noise σ is known; the trace of the influence
//! matrix comes from the band of the inverse (Hutchinson & de Hoog 1985), also O(n).
//!
//! With `derivative = ν > 0` the automatic choice is rescaled for the ν-th derivative
//! ([`derivative`], the derivative rule).
//!
//! λ is handled in a dimensionless form λ* = λ / (w̄ h̄^(2m−1)), with w̄ the mean weight and h̄ the
//! mean time step: it does not change with the units of time or space, and λ*^(1/2m) is roughly the
//! smoothing bandwidth in samples.

mod derivative;
mod problem;
mod search;

pub use derivative::MAX_DERIVATIVE_FACTOR;

use crate::bspline::to_piecewise;
use crate::error::{try_collect, try_filled, KernelError, Result};
use crate::piecewise::PiecewisePoly;
use crate::uncertainty::Gram;
use derivative::derivative_factor;
use problem::{Pool, Problem};
use search::LOG_LAMBDA_MAX;

/// How λ is set.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Smoothing {
    /// Generalized cross-validation.
    Gcv,
    /// Unbiased risk with a known noise standard deviation (position units, unit weight).
    Noise(f64),
    /// A given dimensionless λ*.
    Fixed(f64),
}

/// Which covariance the per-sample standard errors of a smoothing spline describe.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Covariance {
    /// The sampling covariance of the estimate, σ² ℓᵢᵀℓᵢ (the spread over repeated noise, bias
    /// not included): σ² B⁽ᵃ⁾ Σ H Σ B⁽ᵇ⁾ᵀ with Σ = (H + λP)⁻¹ and H the weighted data part,
    /// computed as −dΣ/dμ for M(μ) = μH + λP by [`SymBand::inverse_band_tangent`].
    Sampling,
    /// Wahba's Bayesian posterior covariance σ² B⁽ᵃ⁾ Σ B⁽ᵇ⁾ᵀ (G. Wahba, J. R. Stat. Soc. B 45
    /// (1983) 133–150), larger than the sampling one by an allowance for the smoothing bias; its
    /// intervals have near-nominal coverage averaged over the samples (D. Nychka, JASA 83 (1988)
    /// 1134–1143).
    Posterior,
}

/// A fitted smoothing spline.
#[derive(Debug, Clone, PartialEq)]
pub struct SmoothFit {
    /// The spline, in the caller's time and position units.
    pub path: PiecewisePoly,
    /// Dimensionless λ*.
    pub lambda: f64,
    /// Effective degrees of freedom tr(A) per coordinate.
    pub edf: f64,
    /// Value of the selection criterion at λ* (GCV score, or unbiased risk; NaN when fixed).
    pub criterion: f64,
    /// Noise standard deviation per coordinate (position units, unit weight): the given one for
    /// [`Smoothing::Noise`], else √(RSS / (dim (n − edf))) at the GCV choice (at λ* when fixed).
    pub noise: f64,
    /// Per sample, the Gram matrix of the derivative rows in the caller's time units (empty unless
    /// asked for).
    pub gram: Vec<Gram>,
    /// With automatic λ: the fit whose third derivative (jerk, torsion) is used, at a λ* tuned
    /// for ν = 3 (see the module notes); `None` when that is not larger than `lambda`.
    pub jerk: Option<JerkFit>,
}

/// The smoother fit from which r‴ is taken.
#[derive(Debug, Clone, PartialEq)]
pub struct JerkFit {
    /// The spline (only its third derivative is used).
    pub path: PiecewisePoly,
    /// Its dimensionless λ*.
    pub lambda: f64,
    /// Per sample, its Gram matrices (only the r‴ entry G₃₃ is used; empty unless asked for).
    pub gram: Vec<Gram>,
}

/// Fewest samples a smoothing spline of `degree` needs.
pub fn min_samples(degree: usize) -> usize {
    degree.div_ceil(2) + 2
}

/// Smoothing spline of `degree` (3 or 5) through one track. `t` strictly increasing, `x` row-major
/// with `dim` columns, all finite; `w` optional positive weights.
///
/// # Examples
///
/// ```
/// use osculate::smooth::{smooth, Smoothing};
/// // A quadratic is in the null space of the quintic penalty: reproduced exactly at any λ.
/// let t: Vec<f64> = (0..20).map(|i| i as f64 * 0.5).collect();
/// let x: Vec<f64> = t.iter().map(|&u| 1.0 + u * u).collect();
/// let fit = smooth(&t, &x, 1, None, 5, Smoothing::Fixed(1e6), 0).unwrap();
/// let mut out = [0.0; 3];
/// fit.path.eval(3.3, 2, &mut out);
/// assert!((out[0] - (1.0 + 3.3 * 3.3)).abs() < 1e-8 && (out[2] - 2.0).abs() < 1e-8);
/// ```
pub fn smooth(
    t: &[f64],
    x: &[f64],
    dim: usize,
    w: Option<&[f64]>,
    degree: usize,
    how: Smoothing,
    derivative: usize,
) -> Result<SmoothFit> {
    smooth_with(t, x, dim, w, degree, how, derivative, None)
}

/// [`smooth`], with the per-sample Gram matrices of the kind `covariance` when it is given (for
/// [`crate::uncertainty`]).
#[allow(clippy::too_many_arguments)]
pub fn smooth_with(
    t: &[f64],
    x: &[f64],
    dim: usize,
    w: Option<&[f64]>,
    degree: usize,
    how: Smoothing,
    derivative: usize,
    covariance: Option<Covariance>,
) -> Result<SmoothFit> {
    let n = t.len();
    if degree != 3 && degree != 5 {
        return Err(KernelError::Option {
            argument: "degree",
            detail: format!("must be 3 or 5, got {degree}"),
        });
    }
    if n < min_samples(degree) {
        return Err(KernelError::Shape {
            argument: "t",
            detail: format!(
                "a degree-{degree} smoothing spline needs at least {} samples, got {n}",
                min_samples(degree)
            ),
        });
    }
    let hbar = (t[n - 1] - t[0]) / (n - 1) as f64;
    let u = try_collect(n, t.iter().map(|&v| (v - t[0]) / hbar))?;
    let wv = match w {
        Some(w) => {
            let mean = w.iter().sum::<f64>() / n as f64;
            try_collect(n, w.iter().map(|v| v / mean))?
        }
        None => try_filled(n, 1.0)?,
    };
    let mut centre = vec![0.0; dim];
    for row in x.chunks_exact(dim) {
        for (c, v) in centre.iter_mut().zip(row) {
            *c += v / n as f64;
        }
    }
    let y = try_collect(
        x.len(),
        x.chunks_exact(dim)
            .flat_map(|row| row.iter().zip(&centre).map(|(v, c)| v - c)),
    )?;
    let prob = Problem::new(&u, y, dim, wv, degree)?;
    // The noise is estimated at the GCV choice even when λ is then tuned for a derivative: the
    // larger λ leaves signal in the residuals and would overstate it.
    let mut noise = match how {
        Smoothing::Noise(s) => s,
        _ => f64::NAN,
    };
    // The fit at the final λ, when the search already made it, and λ* for r‴.
    let mut reuse = None;
    let mut jerk_lambda = f64::NAN;
    let (lambda, criterion) = match how {
        Smoothing::Fixed(l) => (l, f64::NAN),
        Smoothing::Gcv | Smoothing::Noise(_) => {
            let found = prob.search(how)?;
            let (l, c) = (found.log_lambda, found.criterion);
            let pilot = 10f64.powf(l);
            let mut factor = 1.0;
            // The search's own fit when QR made it; the normal equations' fits are redone by QR.
            let pilot_fit = match found.fit {
                Some(e) => Some(e),
                None => prob.eval(pilot, true, &Pool::default())?,
            };
            if let Some(e) = pilot_fit {
                if how == Smoothing::Gcv {
                    noise = prob.noise(&e);
                }
                let omega = frequency(&to_piecewise(&u, degree, &e.coef, dim)?);
                let m = degree.div_ceil(2);
                factor = derivative_factor(m, derivative, pilot, 1.0, omega);
                jerk_lambda = pilot * derivative_factor(m, 3, pilot, 1.0, omega);
                if factor == 1.0 {
                    reuse = Some(e);
                }
            }
            (pilot * factor, c)
        }
    };
    let singular = |lambda: f64| KernelError::Option {
        argument: "smoothing",
        detail: format!(
            "λ* = {lambda:e} makes the system numerically singular; use a larger value"
        ),
    };
    let fit = match reuse {
        Some(e) => e,
        None => prob
            .eval(lambda, true, &Pool::default())?
            .ok_or_else(|| singular(lambda))?,
    };
    // The fit reproduces the m polynomials of the penalty's null space, so tr A ≥ m; a smaller
    // trace at a given λ* means the factorization lost its accuracy (the fit is not the
    // smoothing spline any more: at λ* = 1e30 the velocity came out halved).
    let m = degree.div_ceil(2);
    if matches!(how, Smoothing::Fixed(_)) && fit.trace < m as f64 - 0.01 {
        let usable = LOG_LAMBDA_MAX.min(2.0 * m as f64 * (n as f64).log10() + 2.0);
        return Err(KernelError::Option {
            argument: "smoothing",
            detail: format!(
                "λ* = {lambda:e} is beyond the usable range for {n} samples: the fit's degrees \
                 of freedom fall to {:.3}, below the {m} of the polynomials it must keep; use \
                 at most about 1e{usable:.0} (a straight or polynomial fit is the limit anyway)",
                fit.trace
            ),
        });
    }
    if noise.is_nan() {
        noise = prob.noise(&fit);
    }
    let (path, gram) = prob.finish(&fit, t, hbar, &centre, covariance)?;
    let jerk = if jerk_lambda > lambda * (1.0 + 1e-9) {
        match prob.eval(jerk_lambda, covariance.is_some(), &Pool::default())? {
            Some(e) => {
                let (path, gram) = prob.finish(&e, t, hbar, &centre, covariance)?;
                Some(JerkFit {
                    path,
                    lambda: jerk_lambda,
                    gram,
                })
            }
            None => None,
        }
    } else {
        None
    };
    Ok(SmoothFit {
        path,
        lambda,
        edf: fit.trace,
        criterion,
        noise,
        gram,
        jerk,
    })
}

/// ω̂ = sqrt(Σ|f″|² / Σ|f′|²) over the breaks of a fitted path (in its time units).
fn frequency(p: &PiecewisePoly) -> f64 {
    let (mut s1, mut s2) = (0.0, 0.0);
    let d = p.dim;
    let mut buf = [0.0; 9];
    for (i, &t) in p.x.iter().enumerate() {
        p.eval_on(i.min(p.intervals() - 1), t, 2, &mut buf[..3 * d]);
        s1 += buf[d..2 * d].iter().map(|v| v * v).sum::<f64>();
        s2 += buf[2 * d..3 * d].iter().map(|v| v * v).sum::<f64>();
    }
    (s2 / s1).sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn noisy_sine(n: usize) -> (Vec<f64>, Vec<f64>) {
        // Deterministic pseudo-noise (a fixed sequence), amplitude 0.05.
        let t: Vec<f64> = (0..n)
            .map(|i| i as f64 * 0.1 + 0.03 * ((i * 7) % 5) as f64)
            .collect();
        let x = t
            .iter()
            .enumerate()
            .map(|(i, &u)| u.sin() + 0.05 * (((i * 7919) % 101) as f64 / 50.0 - 1.0))
            .collect();
        (t, x)
    }

    #[test]
    fn large_lambda_tends_to_the_least_squares_polynomial() {
        // λ → ∞ leaves the null space of the penalty: the least-squares line for m = 2.
        let (t, x) = noisy_sine(30);
        let fit = smooth(&t, &x, 1, None, 3, Smoothing::Fixed(1e14), 0).unwrap();
        let n = t.len() as f64;
        let (mt, mx) = (t.iter().sum::<f64>() / n, x.iter().sum::<f64>() / n);
        let sxy: f64 = t.iter().zip(&x).map(|(a, b)| (a - mt) * (b - mx)).sum();
        let sxx: f64 = t.iter().map(|a| (a - mt) * (a - mt)).sum();
        let mut out = [0.0; 2];
        fit.path.eval(1.0, 1, &mut out);
        assert_relative_eq!(out[1], sxy / sxx, max_relative = 1e-6);
        assert_relative_eq!(fit.edf, 2.0, max_relative = 1e-5);
    }

    #[test]
    fn gcv_picks_an_interior_lambda_and_is_unit_free() {
        let (t, x) = noisy_sine(200);
        let a = smooth(&t, &x, 1, None, 5, Smoothing::Gcv, 0).unwrap();
        assert!(a.edf > 4.0 && a.edf < 100.0, "edf {}", a.edf);
        // Same data in other units of time and space: same λ* (dimensionless).
        let t2: Vec<f64> = t.iter().map(|v| v * 1000.0 + 5.0).collect();
        let x2: Vec<f64> = x.iter().map(|v| v * 0.01).collect();
        let b = smooth(&t2, &x2, 1, None, 5, Smoothing::Gcv, 0).unwrap();
        assert_relative_eq!(a.lambda, b.lambda, max_relative = 1e-6);
        // The derivative rule only ever adds smoothing, by at most its cap.
        let c = smooth(&t, &x, 1, None, 5, Smoothing::Gcv, 2).unwrap();
        assert!(
            c.lambda >= a.lambda && c.lambda <= a.lambda * MAX_DERIVATIVE_FACTOR * (1.0 + 1e-12)
        );
    }

    #[test]
    fn too_few_samples_and_bad_degree() {
        assert!(smooth(&[0.0, 1.0, 2.0], &[0.0; 3], 1, None, 5, Smoothing::Gcv, 0).is_err());
        assert!(smooth(
            &[0.0, 1.0, 2.0, 3.0, 4.0],
            &[0.0; 5],
            1,
            None,
            4,
            Smoothing::Gcv,
            0
        )
        .is_err());
    }
}
