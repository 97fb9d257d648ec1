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
//! GCV (and the unbiased risk) are tuned for the positions; the derivatives that kinematics needs
//! are best estimated with more smoothing. With `derivative = ν > 0` the automatic choice is a
//! pilot by GCV followed by a plug-in rescaling of the smoothing bandwidth: the spline acts
//! asymptotically as the filter 1/(1 + (hω)^{2m}) (B. W. Silverman, Ann. Statist. 12 (1984)
//! 898–916), whose mean squared error for the ν-th derivative of a signal of frequency ω is
//! h^{4m} A_ν + σ² h̄ R_ν / h^{2ν+1} with R_ν = (1/2π)∫ w^{2ν}/(1+w^{2m})² dw. Minimizing it
//! for ν and for 0 and eliminating σ² gives u_ν^{4m+2ν+1} = (2ν+1)(R_ν/R_0) u_0^{4m+1} with
//! u = hω; ω is estimated from the pilot fit as ω̂² = Σ|f″|²/Σ|f′|². The factor on λ is
//! (u_ν/u_0)^{2m}, kept within [1, 100] so that a nearly straight track is not over-smoothed.
//!
//! λ is handled in a dimensionless form λ* = λ / (w̄ h̄^(2m−1)), with w̄ the mean weight and h̄ the
//! mean time step: it does not change with the units of time or space, and λ*^(1/2m) is roughly the
//! smoothing bandwidth in samples.

use crate::banded::{BandQr, SymBand};
use crate::bspline::{basis_derivatives, clamped_knots, span_of_interval, to_piecewise};
use crate::error::{try_collect, try_copy, try_filled, KernelError, Result};
use crate::piecewise::{gauss_legendre, PiecewisePoly};
use crate::uncertainty::{at, Gram};
use rayon::prelude::*;

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

/// R_ν = (1/2π)∫ w^{2ν}/(1+w^{2m})² dw for ν = 0..=3: closed forms for m = 2 and m = 3
/// (checked against numerical quadrature with scipy.integrate.quad).
fn kernel_roughness(m: usize) -> [f64; 4] {
    if m == 2 {
        let r = 1.0 / (8.0 * std::f64::consts::SQRT_2);
        [3.0 * r, r, r, 3.0 * r]
    } else {
        [5.0 / 18.0, 1.0 / 12.0, 1.0 / 18.0, 1.0 / 18.0]
    }
}

/// Largest factor the derivative rule may apply to the pilot λ*.
pub const MAX_DERIVATIVE_FACTOR: f64 = 100.0;

/// Factor on the pilot λ* for estimating the `nu`-th derivative (see the module notes).
fn derivative_factor(m: usize, nu: usize, lambda0: f64, hbar: f64, omega: f64) -> f64 {
    if nu == 0 || omega.is_nan() || omega <= 0.0 || omega.is_infinite() {
        return 1.0;
    }
    let r = kernel_roughness(m);
    let (mf, nf) = (m as f64, nu.min(3) as f64);
    let u0 = hbar * lambda0.powf(0.5 / mf) * omega;
    let unu = ((2.0 * nf + 1.0) * r[nu.min(3)] / r[0] * u0.powf(4.0 * mf + 1.0))
        .powf(1.0 / (4.0 * mf + 2.0 * nf + 1.0));
    (unu / u0).powf(2.0 * mf).clamp(1.0, MAX_DERIVATIVE_FACTOR)
}

/// Bounds of the search over log10 λ*.
const LOG_LAMBDA_MIN: f64 = -4.0;
const LOG_LAMBDA_MAX: f64 = 24.0;
/// Spacing of the coarse scan and resolution of the refinement, in decades of λ*.
const COARSE_STEP: f64 = 2.0;
const FINE_STEP: f64 = 0.02;

struct Problem {
    n: usize,
    /// Clamped knots on the scaled times.
    knots: Vec<f64>,
    /// Scaled sample times.
    u: Vec<f64>,
    dim: usize,
    k: usize,
    w: Vec<f64>,
    y: Vec<f64>,
    /// Per sample: first basis index and the k + 1 basis values.
    rows: Vec<(usize, [f64; 6])>,
    /// Per interval, m rows of the penalty's square root: √(Gauss weight) · B⁽ᵐ⁾ at the nodes.
    penalty: Vec<[f64; 6]>,
}

struct Eval {
    coef: Vec<f64>,
    rss: f64,
    trace: f64,
    /// L D Lᵀ factor of the normal matrix and the band of its inverse (with the trace).
    factor: Option<(SymBand, SymBand)>,
}

impl Problem {
    fn new(u: &[f64], y: Vec<f64>, dim: usize, w: Vec<f64>, k: usize) -> Result<Self> {
        let n = u.len();
        let m = k.div_ceil(2);
        let knots = clamped_knots(u, k)?;
        let oom = |rows: usize| KernelError::OutOfMemory { bytes: rows * 56 };
        let mut rows = Vec::new();
        rows.try_reserve_exact(n).map_err(|_| oom(n))?;
        for (i, &ui) in u.iter().enumerate() {
            let span = span_of_interval(i.min(n - 2), k);
            let d = basis_derivatives(&knots, span, ui, k, 0);
            let mut b = [0.0; 6];
            b[..=k].copy_from_slice(&d[0][..=k]);
            rows.push((span - k, b));
        }
        let mut penalty = Vec::new();
        penalty
            .try_reserve_exact(m * (n - 1))
            .map_err(|_| oom(m * n))?;
        let (gx, gw) = gauss_legendre(m);
        for iv in 0..n - 1 {
            let span = span_of_interval(iv, k);
            let (mid, half) = (0.5 * (u[iv] + u[iv + 1]), 0.5 * (u[iv + 1] - u[iv]));
            for (&xq, &wq) in gx.iter().zip(gw) {
                let d = basis_derivatives(&knots, span, mid + half * xq, k, m);
                let s = (wq * half).sqrt();
                let mut row = [0.0; 6];
                for r in 0..=k {
                    row[r] = s * d[m][r];
                }
                penalty.push(row);
            }
        }
        Ok(Problem {
            n,
            knots,
            u: try_copy(u)?,
            dim,
            k,
            w,
            y,
            rows,
            penalty,
        })
    }

    /// Fit at λ*; `None` when the system is numerically singular.
    fn eval(&self, lambda: f64, want_trace: bool) -> Result<Option<Eval>> {
        let (n, k, dim) = (self.n, self.k, self.dim);
        let m = k.div_ceil(2);
        let mut qr = BandQr::new(n + k - 1, k, dim)?;
        let sl = lambda.sqrt();
        let mut vals = [0.0; 6];
        let mut rhs = [0.0; 3];
        let mut add_sample = |qr: &mut BandQr, i: usize| {
            let (first, b) = &self.rows[i];
            let sw = self.w[i].sqrt();
            for r in 0..=k {
                vals[r] = sw * b[r];
            }
            for c in 0..dim {
                rhs[c] = sw * self.y[i * dim + c];
            }
            qr.add_row(*first, &vals[..=k], &mut rhs[..dim]);
        };
        for iv in 0..n - 1 {
            add_sample(&mut qr, iv);
            for row in &self.penalty[iv * m..(iv + 1) * m] {
                let mut v = [0.0; 6];
                for r in 0..=k {
                    v[r] = sl * row[r];
                }
                qr.add_row(iv, &v[..=k], &mut [0.0; 3][..dim]);
            }
        }
        add_sample(&mut qr, n - 1);
        let coef = match qr.solve() {
            Some(c) => c,
            None => return Ok(None),
        };
        let mut rss = 0.0;
        for (i, (first, b)) in self.rows.iter().enumerate() {
            for c in 0..dim {
                let f: f64 = (0..=k).map(|r| b[r] * coef[(first + r) * dim + c]).sum();
                let e = self.y[i * dim + c] - f;
                rss += self.w[i] * e * e;
            }
        }
        let mut trace = f64::NAN;
        let mut factor = None;
        if want_trace {
            let ldlt = qr.to_ldlt()?;
            let sig = ldlt.inverse_band()?;
            trace = 0.0;
            for (i, (first, b)) in self.rows.iter().enumerate() {
                let mut q = 0.0;
                for r in 0..=k {
                    for s in 0..=k {
                        q += b[r] * b[s] * sig.get(first + r, first + s);
                    }
                }
                trace += self.w[i] * q;
            }
            factor = Some((ldlt, sig));
        }
        Ok(Some(Eval {
            coef,
            rss,
            trace,
            factor,
        }))
    }

    /// √(RSS / (dim (n − edf))), Wahba's residual estimate of the noise.
    fn noise(&self, e: &Eval) -> f64 {
        let dof = self.dim as f64 * (self.n as f64 - e.trace);
        if dof > 0.0 {
            (e.rss / dof).sqrt()
        } else {
            f64::NAN
        }
    }

    /// Per sample, the Gram matrix of the rows of derivatives 0..=3 (scaled time units) for the
    /// fit `e`.
    fn grams(&self, e: &Eval, cov: Covariance) -> Result<Vec<Gram>> {
        let (n, k) = (self.n, self.k);
        let (ldlt, sig) = e.factor.as_ref().expect("evaluated with the trace");
        let c = match cov {
            Covariance::Posterior => sig.clone(),
            Covariance::Sampling => {
                // Σ H Σ = −dΣ/dμ for M(μ) = μH + λP at μ = 1, H = Σᵢ wᵢ bᵢ bᵢᵀ the data part.
                // (Σ + λ dΣ/dλ is the same matrix, but at large λ it is the small difference
                // of two large ones near the ends of the track.)
                let mut h = SymBand::zeros(sig.n, k)?;
                for ((first, b), w) in self.rows.iter().zip(&self.w) {
                    for a in 0..=k {
                        for c in 0..=a {
                            h.add_lower(first + a, first + c, w * b[a] * b[c]);
                        }
                    }
                }
                let mut d = ldlt.inverse_band_tangent(sig, &h)?;
                d.a.iter_mut().for_each(|v| *v = -*v);
                d
            }
        };
        let mut out = Vec::new();
        out.try_reserve_exact(n)
            .map_err(|_| KernelError::OutOfMemory { bytes: n * 80 })?;
        for (i, &ui) in self.u.iter().enumerate() {
            let span = span_of_interval(i.min(n - 2), k);
            let first = span - k;
            let d = basis_derivatives(&self.knots, span, ui, k, 3.min(k));
            let mut g = [0.0; 10];
            for a in 0..4 {
                for b in a..4 {
                    if a > k || b > k {
                        continue;
                    }
                    let mut v = 0.0;
                    for r in 0..=k {
                        for s in 0..=k {
                            v += d[a][r] * d[b][s] * c.get(first + r, first + s);
                        }
                    }
                    g[at(a, b)] = v;
                }
            }
            out.push(g);
        }
        Ok(out)
    }

    /// The spline of an evaluation in the caller's units (t = t₀ + h̄u, positions re-centred)
    /// and, with `covariance`, its Gram matrices in the caller's time units.
    fn finish(
        &self,
        e: &Eval,
        t: &[f64],
        hbar: f64,
        centre: &[f64],
        covariance: Option<Covariance>,
    ) -> Result<(PiecewisePoly, Vec<Gram>)> {
        let (n, dim, degree) = (self.n, self.dim, self.k);
        let mut gram = match covariance {
            Some(cov) => self.grams(e, cov)?,
            None => Vec::new(),
        };
        // Derivative a in scaled time is h̄^a times the derivative in the caller's time.
        for g in gram.iter_mut() {
            for a in 0..4 {
                for b in a..4 {
                    g[at(a, b)] /= hbar.powi((a + b) as i32);
                }
            }
        }
        let mut path = to_piecewise(&self.u, degree, &e.coef, dim)?;
        // The coefficient of u^p scales by h̄^−p.
        path.x = try_copy(t)?;
        let order = degree + 1;
        for iv in 0..n - 1 {
            let mut scale = 1.0;
            for p in 0..order {
                for d in 0..dim {
                    let c = &mut path.coef[(iv * order + p) * dim + d];
                    *c *= scale;
                    if p == 0 {
                        *c += centre[d];
                    }
                }
                scale /= hbar;
            }
        }
        Ok((path, gram))
    }

    fn criterion(&self, how: Smoothing, log_lambda: f64) -> Result<f64> {
        let e = match self.eval(10f64.powf(log_lambda), true)? {
            Some(e) => e,
            None => return Ok(f64::INFINITY),
        };
        let n = self.n as f64;
        let d = self.dim as f64;
        // The influence matrix reproduces the m polynomials of the penalty's null space and
        // shrinks everything else: m ≤ tr A ≤ n. A trace outside that range means the band of
        // the inverse lost its accuracy (very large λ*): the evaluation is rejected.
        let m = self.k.div_ceil(2) as f64;
        if !(e.trace >= m - 0.01 && e.trace <= n + 0.01) {
            return Ok(f64::INFINITY);
        }
        Ok(match how {
            Smoothing::Noise(sigma) => e.rss / n + 2.0 * d * sigma * sigma * e.trace / n,
            _ => {
                let r = 1.0 - e.trace / n;
                if r <= 0.0 {
                    f64::INFINITY
                } else {
                    e.rss / (n * d) / (r * r)
                }
            }
        })
    }

    /// Minimize the criterion over log10 λ*: a coarse scan every 2 decades (evaluated in
    /// parallel), then golden-section search within ±2 decades of the best point down to 0.02
    /// decade. Always terminates: a fixed number of evaluations.
    fn search(&self, how: Smoothing) -> Result<(f64, f64)> {
        let hi =
            LOG_LAMBDA_MAX.min(2.0 * self.k.div_ceil(2) as f64 * (self.n as f64).log10() + 2.0);
        let steps = ((hi - LOG_LAMBDA_MIN) / COARSE_STEP).ceil() as usize;
        let scores: Vec<Result<(f64, f64)>> = (0..=steps)
            .into_par_iter()
            .map(|j| {
                let l = LOG_LAMBDA_MIN + COARSE_STEP * j as f64;
                Ok((self.criterion(how, l)?, l))
            })
            .collect();
        let mut best = (f64::INFINITY, LOG_LAMBDA_MIN);
        for s in scores {
            let (c, l) = s?;
            if c < best.0 {
                best = (c, l);
            }
        }
        let (mut a, mut b) = (best.1 - COARSE_STEP, best.1 + COARSE_STEP);
        let g = 0.5 * (5f64.sqrt() - 1.0);
        let (mut x1, mut x2) = (b - g * (b - a), a + g * (b - a));
        let (mut f1, mut f2) = (self.criterion(how, x1)?, self.criterion(how, x2)?);
        while b - a > FINE_STEP {
            if f1 <= f2 {
                b = x2;
                x2 = x1;
                f2 = f1;
                x1 = b - g * (b - a);
                f1 = self.criterion(how, x1)?;
            } else {
                a = x1;
                x1 = x2;
                f1 = f2;
                x2 = a + g * (b - a);
                f2 = self.criterion(how, x2)?;
            }
        }
        let (fm, xm) = if f1 <= f2 { (f1, x1) } else { (f2, x2) };
        Ok(if fm <= best.0 {
            (xm, fm)
        } else {
            (best.1, best.0)
        })
    }
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
            let (l, c) = prob.search(how)?;
            let pilot = 10f64.powf(l);
            let mut factor = 1.0;
            if let Some(e) = prob.eval(pilot, true)? {
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
        None => prob.eval(lambda, true)?.ok_or_else(|| singular(lambda))?,
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
        match prob.eval(jerk_lambda, covariance.is_some())? {
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
    fn derivative_factor_limits() {
        // No frequency information: no change; u₀ → 0 drives the factor to its cap; u₀ large
        // (heavily resolved signal) leaves it near 1.
        assert_eq!(derivative_factor(3, 2, 1e6, 1.0, 0.0), 1.0);
        assert_eq!(
            derivative_factor(3, 3, 1e6, 1.0, 1e-9),
            MAX_DERIVATIVE_FACTOR
        );
        assert!(derivative_factor(3, 2, 1.0, 1.0, 10.0) < 1.5);
        // Helix-like case of the module notes: u₀ ≈ 0.153 gives ≈ 14 for ν = 2 and ≈ 39 for ν = 3.
        let l0 = (0.153f64).powi(6);
        assert!((derivative_factor(3, 2, l0, 1.0, 1.0) - 14.2).abs() < 0.2);
        assert!((derivative_factor(3, 3, l0, 1.0, 1.0) - 39.0).abs() < 0.5);
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
