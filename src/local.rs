//! Local polynomial least squares on uneven sampling: the Savitzky–Golay filter (A. Savitzky and
//! M. J. E. Golay, Anal. Chem. 36 (1964) 1627–1639) generalized to arbitrary sample times.
//!
//! At each point a polynomial of `degree` in (t − t₀) is fitted by least squares to the samples of
//! a window; its Taylor coefficients give the position and the first three derivatives. On a
//! uniform grid with a centred window this is exactly the Savitzky–Golay filter. The window is a
//! number of samples (kept at full width near the ends by sliding inwards, like `mode="interp"`),
//! a time span (truncated at the ends), or chosen by generalized cross-validation.

use crate::error::{try_collect, try_copy, try_filled, KernelError, Result};
use crate::uncertainty::{at, Gram};

/// The window of the local fits.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Window {
    /// This many consecutive samples.
    Samples(usize),
    /// All samples within ± span / 2 of the point.
    Span(f64),
    /// A sample count chosen by generalized cross-validation.
    Auto,
}

/// Highest polynomial degree.
pub const MAX_DEGREE: usize = 5;

/// Local fits of one track, evaluated at its samples.
#[derive(Debug, Clone, PartialEq)]
pub struct LocalFit {
    /// Sample times.
    pub t: Vec<f64>,
    /// Positions, row-major.
    pub x: Vec<f64>,
    /// Coordinates.
    pub dim: usize,
    /// Polynomial degree.
    pub degree: usize,
    /// The window used (`Auto` resolved to a sample count).
    pub window: Window,
    /// Derivatives 0..=3 at the samples: `deriv[(i * 4 + nu) * dim + d]` (NaN above the degree).
    pub deriv: Vec<f64>,
    /// Samples whose window was not centred or was truncated.
    pub edge: Vec<bool>,
    /// GCV score of the window (NaN unless chosen automatically).
    pub criterion: f64,
    /// Noise standard deviation per coordinate from the residuals at the samples:
    /// √(RSS / (dim (n − Σ hᵢᵢ))), hᵢᵢ the weight of sample i in its own fit.
    pub noise: f64,
    /// Per sample, the Gram matrix of the derivative rows (empty unless asked for).
    pub gram: Vec<Gram>,
}

/// Rows `[lo, hi)` of the window around time `tc` (sample index `i` if it is a sample).
fn window_rows(t: &[f64], tc: f64, i: Option<usize>, window: Window) -> (usize, usize, bool) {
    let n = t.len();
    match window {
        Window::Samples(w) => {
            let c = i.unwrap_or_else(|| t.partition_point(|&v| v < tc).min(n - 1));
            let c = match i {
                Some(c) => c,
                // Nearest sample to tc.
                None if c > 0 && (tc - t[c - 1]) < (t[c] - tc) => c - 1,
                None => c,
            };
            let lo = c.saturating_sub(w / 2).min(n - w);
            (lo, lo + w, lo + w / 2 != c)
        }
        Window::Span(s) => {
            // Outside the track the end window is used (the fit then extrapolates).
            let tw = tc.clamp(t[0], t[n - 1]);
            let lo = t.partition_point(|&v| v < tw - 0.5 * s);
            let hi = t.partition_point(|&v| v <= tw + 0.5 * s);
            (lo, hi, tw - 0.5 * s < t[0] || tw + 0.5 * s > t[n - 1])
        }
        Window::Auto => unreachable!("resolved before use"),
    }
}

/// Least-squares polynomial on rows [lo, hi) about `tc`: derivatives 0..=3 into `out`
/// (`out[nu * dim + d]`), returns the hat value [(XᵀX)⁻¹]₀₀, or None if the fit is singular.
/// With `gram`, also the Gram matrix of the derivative rows: the derivative a is a! c_a / scaleᵃ,
/// so G_ab = a! b! [(XᵀX)⁻¹]_ab / scale^(a+b) (NaN above the degree).
#[allow(clippy::too_many_arguments)]
fn fit_at(
    t: &[f64],
    x: &[f64],
    dim: usize,
    tc: f64,
    lo: usize,
    hi: usize,
    p: usize,
    out: &mut [f64],
    gram: Option<&mut Gram>,
) -> Option<f64> {
    let q = p + 1;
    // An empty or too small window (a time span away from every sample) has no fit.
    if hi <= lo || hi - lo < q {
        return None;
    }
    let scale = (t[lo] - tc).abs().max((t[hi - 1] - tc).abs());
    if scale.is_nan() || scale <= 0.0 {
        return None;
    }
    let mut a = [[0.0; MAX_DEGREE + 1]; MAX_DEGREE + 1];
    let mut b = [[0.0; 3]; MAX_DEGREE + 1];
    for j in lo..hi {
        let u = (t[j] - tc) / scale;
        let mut pw = [1.0; MAX_DEGREE + 1];
        for r in 1..q {
            pw[r] = pw[r - 1] * u;
        }
        for r in 0..q {
            for s in 0..=r {
                a[r][s] += pw[r] * pw[s];
            }
            for d in 0..dim {
                b[r][d] += pw[r] * x[j * dim + d];
            }
        }
    }
    // Cholesky a = L Lᵀ (lower), in place.
    for r in 0..q {
        for s in 0..=r {
            let mut v = a[r][s];
            for k in 0..s {
                v -= a[r][k] * a[s][k];
            }
            if r == s {
                if v.is_nan() || v <= 1e-13 * a[0][0] {
                    return None;
                }
                a[r][r] = v.sqrt();
            } else {
                a[r][s] = v / a[s][s];
            }
        }
    }
    let solve = |rhs: &mut [f64; MAX_DEGREE + 1]| {
        for r in 0..q {
            let mut v = rhs[r];
            for k in 0..r {
                v -= a[r][k] * rhs[k];
            }
            rhs[r] = v / a[r][r];
        }
        for r in (0..q).rev() {
            let mut v = rhs[r];
            for k in r + 1..q {
                v -= a[k][r] * rhs[k];
            }
            rhs[r] = v / a[r][r];
        }
    };
    for d in 0..dim {
        let mut c = [0.0; MAX_DEGREE + 1];
        for r in 0..q {
            c[r] = b[r][d];
        }
        solve(&mut c);
        let (mut fact, mut scale_pow) = (1.0, 1.0);
        for nu in 0..4 {
            out[nu * dim + d] = if nu < q {
                c[nu] * fact / scale_pow
            } else {
                f64::NAN
            };
            fact *= (nu + 1) as f64;
            scale_pow *= scale;
        }
    }
    let mut e0 = [0.0; MAX_DEGREE + 1];
    e0[0] = 1.0;
    solve(&mut e0);
    if let Some(g) = gram {
        const FACT: [f64; 4] = [1.0, 1.0, 2.0, 6.0];
        for a in 0..4 {
            let mut col = [0.0; MAX_DEGREE + 1];
            if a < q {
                col[a] = 1.0;
                solve(&mut col);
            }
            for b in a..4 {
                g[at(a, b)] = if b < q {
                    FACT[a] * FACT[b] * col[b] / scale.powi((a + b) as i32)
                } else {
                    f64::NAN
                };
            }
        }
    }
    Some(e0[0])
}

fn check(n: usize, degree: usize, window: Window) -> Result<()> {
    if !(1..=MAX_DEGREE).contains(&degree) {
        return Err(KernelError::Option {
            argument: "degree",
            detail: format!("must be between 1 and {MAX_DEGREE}, got {degree}"),
        });
    }
    match window {
        Window::Samples(w) if w < degree + 1 || w > n => Err(KernelError::Option {
            argument: "window",
            detail: format!(
                "{w} samples: must be at least degree + 1 = {} and at most the track length {n}",
                degree + 1
            ),
        }),
        Window::Span(s) if s.is_nan() || s <= 0.0 || s.is_infinite() => Err(KernelError::Option {
            argument: "window",
            detail: format!("a time span must be finite and > 0, got {s}"),
        }),
        _ => Ok(()),
    }
}

/// What [`run`] computes at the samples.
struct Run {
    deriv: Vec<f64>,
    edge: Vec<bool>,
    hat: Vec<f64>,
    /// Empty unless asked for.
    gram: Vec<Gram>,
}

/// Evaluate at every sample of `rows` with a fixed window.
fn run(
    t: &[f64],
    x: &[f64],
    dim: usize,
    degree: usize,
    window: Window,
    rows: &[usize],
    want_gram: bool,
) -> Result<Run> {
    let m = rows.len();
    let mut deriv = try_filled(m * 4 * dim, f64::NAN)?;
    let mut edge = try_filled(m, false)?;
    let mut hat = try_filled(m, f64::NAN)?;
    let mut gram = if want_gram {
        try_filled(m, [f64::NAN; 10])?
    } else {
        Vec::new()
    };
    for (j, &i) in rows.iter().enumerate() {
        let (lo, hi, e) = window_rows(t, t[i], Some(i), window);
        edge[j] = e;
        if hi - lo < degree + 1 {
            return Err(KernelError::Option {
                argument: "window",
                detail: format!(
                    "holds {} samples around t = {} but degree {degree} needs {}",
                    hi - lo,
                    t[i],
                    degree + 1
                ),
            });
        }
        if let Some(h) = fit_at(
            t,
            x,
            dim,
            t[i],
            lo,
            hi,
            degree,
            &mut deriv[j * 4 * dim..(j + 1) * 4 * dim],
            gram.get_mut(j),
        ) {
            hat[j] = h;
        }
    }
    Ok(Run {
        deriv,
        edge,
        hat,
        gram,
    })
}

/// GCV score of a window from fits at `rows`: mean squared residual / (1 − mean hat)².
fn gcv(x: &[f64], dim: usize, rows: &[usize], deriv: &[f64], hat: &[f64]) -> f64 {
    let (mut rss, mut tr, mut cnt) = (0.0, 0.0, 0.0);
    for (j, &i) in rows.iter().enumerate() {
        if hat[j].is_nan() {
            continue;
        }
        for d in 0..dim {
            let e = x[i * dim + d] - deriv[j * 4 * dim + d];
            rss += e * e;
        }
        tr += hat[j];
        cnt += 1.0;
    }
    let r = 1.0 - tr / cnt;
    if cnt == 0.0 || r <= 0.0 {
        f64::INFINITY
    } else {
        rss / (cnt * dim as f64) / (r * r)
    }
}

/// Candidate window sizes for the automatic choice: from degree + 2 growing by ~25 % to at most
/// min(n, 401) samples, odd sizes only (centred windows).
fn candidates(n: usize, degree: usize) -> Vec<usize> {
    let mut out = Vec::new();
    let mut w = (degree + 2) | 1;
    let top = n.min(401);
    while w <= top {
        out.push(w);
        w = (((w as f64) * 1.25).ceil() as usize + 1) | 1;
    }
    if out.is_empty() && n > degree {
        out.push(n.min(degree + 2));
    }
    out
}

/// Fit one track (all rows finite, `t` strictly increasing).
///
/// With `Window::Auto` the window size minimizes the GCV score computed on at most 4000 evenly
/// spread samples, among [`candidates`]; the choice is then applied to every sample.
///
/// # Examples
///
/// ```
/// use osculate::local::{local, Window};
/// // A cubic is reproduced exactly by cubic local fits, derivatives included.
/// let t: Vec<f64> = (0..30).map(|i| (i as f64 * 0.2).powf(1.1)).collect();
/// let x: Vec<f64> = t.iter().map(|&u| u * u * u).collect();
/// let f = local(&t, &x, 1, 3, Window::Samples(7)).unwrap();
/// assert!((f.deriv[(10 * 4 + 3)] - 6.0).abs() < 1e-8);
/// ```
pub fn local(t: &[f64], x: &[f64], dim: usize, degree: usize, window: Window) -> Result<LocalFit> {
    local_with(t, x, dim, degree, window, false)
}

/// [`local`], with the per-sample Gram matrices of [`crate::uncertainty`] when `uncertainty`.
pub fn local_with(
    t: &[f64],
    x: &[f64],
    dim: usize,
    degree: usize,
    window: Window,
    uncertainty: bool,
) -> Result<LocalFit> {
    let n = t.len();
    check(n, degree, window)?;
    let all = try_collect(n, 0..n)?;
    let (window, criterion) = match window {
        Window::Auto => {
            let step = n.div_ceil(4000).max(1);
            let probe = try_collect(n.div_ceil(step), (0..n).step_by(step))?;
            let mut best = (f64::INFINITY, Window::Samples(n.min(degree + 2)));
            for w in candidates(n, degree) {
                let r = run(t, x, dim, degree, Window::Samples(w), &probe, false)?;
                let score = gcv(x, dim, &probe, &r.deriv, &r.hat);
                if score < best.0 {
                    best = (score, Window::Samples(w));
                }
            }
            (best.1, best.0)
        }
        w => (w, f64::NAN),
    };
    let r = run(t, x, dim, degree, window, &all, uncertainty)?;
    // E RSS = σ² tr((I − S)ᵀ(I − S)) = σ² (n − 2 tr S + tr SᵀS), and for local least squares
    // ‖ℓᵢ‖² = hᵢᵢ, so tr SᵀS = tr S.
    let (mut rss, mut tr) = (0.0, 0.0);
    for i in 0..n {
        if r.hat[i].is_nan() {
            continue;
        }
        for d in 0..dim {
            let e = x[i * dim + d] - r.deriv[i * 4 * dim + d];
            rss += e * e;
        }
        tr += r.hat[i];
    }
    let dof = dim as f64 * (n as f64 - tr);
    Ok(LocalFit {
        t: try_copy(t)?,
        x: try_copy(x)?,
        dim,
        degree,
        window,
        deriv: r.deriv,
        edge: r.edge,
        criterion,
        noise: if dof > 0.0 {
            (rss / dof).sqrt()
        } else {
            f64::NAN
        },
        gram: r.gram,
    })
}

impl LocalFit {
    /// Derivatives 0..=3 at an arbitrary time (the window around it, as at the samples).
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::local::{local, Window};
    /// // Local quadratics reproduce x = t² exactly, between samples too (closed form):
    /// // x(2.3) = 5.29, x′ = 4.6, x″ = 2; x‴ is above the degree, so NaN.
    /// let t: Vec<f64> = (0..20).map(|i| 0.25 * i as f64).collect();
    /// let x: Vec<f64> = t.iter().map(|&u| u * u).collect();
    /// let f = local(&t, &x, 1, 2, Window::Samples(5)).unwrap();
    /// let mut out = [0.0; 4];
    /// f.eval(2.3, &mut out);
    /// assert!((out[0] - 5.29).abs() < 1e-10 && (out[1] - 4.6).abs() < 1e-10);
    /// assert!((out[2] - 2.0).abs() < 1e-9 && out[3].is_nan());
    /// ```
    pub fn eval(&self, tc: f64, out: &mut [f64]) {
        let (lo, hi, _) = window_rows(&self.t, tc, None, self.window);
        if fit_at(
            &self.t,
            &self.x,
            self.dim,
            tc,
            lo,
            hi,
            self.degree,
            out,
            None,
        )
        .is_none()
        {
            out.iter_mut().for_each(|v| *v = f64::NAN);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn uniform_grid_matches_savitzky_golay_coefficients() {
        // 5-point quadratic smoothing weights (−3, 12, 17, 12, −3)/35 (Savitzky & Golay 1964, Table I).
        let t: Vec<f64> = (0..9).map(|i| i as f64).collect();
        let x = [0.0, 0.0, 0.0, 0.0, 35.0, 0.0, 0.0, 0.0, 0.0];
        let f = local(&t, &x, 1, 2, Window::Samples(5)).unwrap();
        let got: Vec<f64> = (2..7).map(|i| f.deriv[i * 4]).collect();
        for (g, w) in got.iter().zip([-3.0, 12.0, 17.0, 12.0, -3.0]) {
            assert_relative_eq!(*g, w, epsilon = 1e-12);
        }
    }

    #[test]
    fn span_windows_truncate_at_the_ends() {
        let t: Vec<f64> = (0..20).map(|i| i as f64 * 0.5).collect();
        let x: Vec<f64> = t.iter().map(|&u| 2.0 * u + 1.0).collect();
        let f = local(&t, &x, 1, 1, Window::Span(2.0)).unwrap();
        assert!(f.edge[0] && !f.edge[10]);
        assert_relative_eq!(f.deriv[4 + 1], 2.0, epsilon = 1e-12);
        let mut out = [0.0; 4];
        f.eval(3.3, &mut out);
        assert_relative_eq!(out[0], 7.6, epsilon = 1e-12);
    }

    #[test]
    fn auto_window_smooths_noise() {
        let t: Vec<f64> = (0..400).map(|i| i as f64 * 0.05).collect();
        let x: Vec<f64> = t
            .iter()
            .enumerate()
            .map(|(i, &u)| u.sin() + 0.02 * (((i * 7919) % 101) as f64 / 50.0 - 1.0))
            .collect();
        let f = local(&t, &x, 1, 3, Window::Auto).unwrap();
        match f.window {
            Window::Samples(w) => assert!(w > 7, "window {w}"),
            _ => panic!(),
        }
    }

    #[test]
    fn span_window_far_outside_uses_the_end_window() {
        // Found by cargo fuzz: a time span around a query far outside the track held no sample.
        // A line is reproduced exactly, so the extrapolation is exact too.
        let t: Vec<f64> = (0..10).map(|i| i as f64).collect();
        let x: Vec<f64> = t.iter().map(|v| 3.0 * v - 1.0).collect();
        let f = local(&t, &x, 1, 1, Window::Span(2.0)).unwrap();
        let mut out = [0.0; 4];
        f.eval(20.0, &mut out);
        assert_relative_eq!(out[0], 59.0, max_relative = 1e-12);
        f.eval(-20.0, &mut out);
        assert_relative_eq!(out[0], -61.0, max_relative = 1e-12);
    }

    #[test]
    fn bad_windows() {
        let t = [0.0, 1.0, 2.0, 3.0];
        assert!(local(&t, &[0.0; 4], 1, 3, Window::Samples(3)).is_err());
        assert!(local(&t, &[0.0; 4], 1, 3, Window::Samples(9)).is_err());
        assert!(local(&t, &[0.0; 4], 1, 1, Window::Span(-1.0)).is_err());
        assert!(local(&t, &[0.0; 4], 1, 3, Window::Span(0.5)).is_err());
    }
}
