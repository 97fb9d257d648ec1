//! Piecewise polynomials: the common form of every fitted path (interpolating and smoothing
//! splines). Fit once, evaluate anywhere with any derivative order, integrate |r′| for arc length.

use crate::error::{try_filled, Result};

/// Gauss–Legendre nodes and weights on [−1, 1] for 1–5 and 8 points (Abramowitz & Stegun, Table
/// 25.4; agree with `numpy.polynomial.legendre.leggauss` to 2e-16). Other counts give 8 points.
///
/// # Examples
///
/// ```
/// use osculate::piecewise::gauss_legendre;
/// // The 3-point rule integrates x⁴ over [−1, 1] exactly: 2/5 (closed form).
/// let (x, w) = gauss_legendre(3);
/// let q: f64 = x.iter().zip(w).map(|(x, w)| w * x.powi(4)).sum();
/// assert!((q - 0.4).abs() < 1e-15);
/// ```
pub fn gauss_legendre(q: usize) -> (&'static [f64], &'static [f64]) {
    const X1: [f64; 1] = [0.0];
    const W1: [f64; 1] = [2.0];
    const X2: [f64; 2] = [-0.577_350_269_189_625_8, 0.577_350_269_189_625_8];
    const W2: [f64; 2] = [1.0, 1.0];
    const X3: [f64; 3] = [-0.774_596_669_241_483_4, 0.0, 0.774_596_669_241_483_4];
    const W3: [f64; 3] = [5.0 / 9.0, 8.0 / 9.0, 5.0 / 9.0];
    const X4: [f64; 4] = [
        -0.861_136_311_594_052_6,
        -0.339_981_043_584_856_3,
        0.339_981_043_584_856_3,
        0.861_136_311_594_052_6,
    ];
    const W4: [f64; 4] = [
        0.347_854_845_137_453_9,
        0.652_145_154_862_546_1,
        0.652_145_154_862_546_1,
        0.347_854_845_137_453_9,
    ];
    const X5: [f64; 5] = [
        -0.906_179_845_938_664,
        -0.538_469_310_105_683,
        0.0,
        0.538_469_310_105_683,
        0.906_179_845_938_664,
    ];
    const W5: [f64; 5] = [
        0.236_926_885_056_189_1,
        0.478_628_670_499_366_5,
        0.568_888_888_888_888_9,
        0.478_628_670_499_366_5,
        0.236_926_885_056_189_1,
    ];
    const X8: [f64; 8] = [
        -0.960_289_856_497_536_3,
        -0.796_666_477_413_626_7,
        -0.525_532_409_916_329,
        -0.183_434_642_495_649_8,
        0.183_434_642_495_649_8,
        0.525_532_409_916_329,
        0.796_666_477_413_626_7,
        0.960_289_856_497_536_3,
    ];
    const W8: [f64; 8] = [
        0.101_228_536_290_376_3,
        0.222_381_034_453_374_5,
        0.313_706_645_877_887_3,
        0.362_683_783_378_362,
        0.362_683_783_378_362,
        0.313_706_645_877_887_3,
        0.222_381_034_453_374_5,
        0.101_228_536_290_376_3,
    ];
    match q {
        1 => (&X1, &W1),
        2 => (&X2, &W2),
        3 => (&X3, &W3),
        4 => (&X4, &W4),
        5 => (&X5, &W5),
        _ => (&X8, &W8),
    }
}

/// A piecewise polynomial in `dim` coordinates on the breaks `x[0] < … < x[n−1]`:
/// on interval i, coordinate d is Σ_p coef[(i·order + p)·dim + d] (t − x[i])^p.
#[derive(Debug, Clone, PartialEq)]
pub struct PiecewisePoly {
    /// Breakpoints.
    pub x: Vec<f64>,
    /// Polynomial order (degree + 1).
    pub order: usize,
    /// Number of coordinates.
    pub dim: usize,
    /// Coefficients, `(x.len() − 1) × order × dim`.
    pub coef: Vec<f64>,
}

impl PiecewisePoly {
    /// Zero polynomials of the given order on the breaks `x` (at least two).
    pub fn zeros(x: Vec<f64>, order: usize, dim: usize) -> Result<Self> {
        let m = x.len().saturating_sub(1);
        let coef = try_filled(m * order * dim, 0.0)?;
        Ok(PiecewisePoly {
            x,
            order,
            dim,
            coef,
        })
    }

    /// Number of intervals.
    pub fn intervals(&self) -> usize {
        self.x.len() - 1
    }

    /// Interval holding `t`: the one whose left break is the last break ≤ t, clamped to the ends
    /// (outside the breaks the end polynomials extrapolate).
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::piecewise::PiecewisePoly;
    /// let p = PiecewisePoly::zeros(vec![0.0, 1.0, 3.0], 2, 1).unwrap();
    /// assert_eq!(p.intervals(), 2);
    /// // A break starts the interval to its right; outside, the end intervals.
    /// let at = [0.5, 1.0, -1.0, 9.0].map(|t| p.interval(t));
    /// assert_eq!(at, [0, 1, 0, 1]);
    /// ```
    #[inline]
    pub fn interval(&self, t: f64) -> usize {
        let m = self.intervals();
        let i = self.x.partition_point(|&b| b <= t);
        i.saturating_sub(1).min(m - 1)
    }

    /// Derivatives 0..=`nu_max` (at most 3) of every coordinate at `t` on interval `i`:
    /// `out[nu * dim + d]`.
    #[inline]
    pub fn eval_on(&self, i: usize, t: f64, nu_max: usize, out: &mut [f64]) {
        let (k, dim) = (self.order, self.dim);
        let u = t - self.x[i];
        let c = &self.coef[i * k * dim..(i + 1) * k * dim];
        for d in 0..dim {
            // Horner's rule carrying the Taylor coefficients p[r] = f^(r)(u) / r! along.
            let mut p = [0.0; 4];
            for q in (0..k).rev() {
                for r in (1..=nu_max).rev() {
                    p[r] = p[r] * u + p[r - 1];
                }
                p[0] = p[0] * u + c[q * dim + d];
            }
            const FACT: [f64; 4] = [1.0, 1.0, 2.0, 6.0];
            for nu in 0..=nu_max {
                out[nu * dim + d] = p[nu] * FACT[nu];
            }
        }
    }

    /// Derivatives 0..=`nu_max` at `t` (interval found by binary search).
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::piecewise::PiecewisePoly;
    /// // p(t) = 1 + 2t + 3t² on [0, 2]: p(1) = 6, p′(1) = 8, p″ = 6, p‴ = 0 (closed form).
    /// let p = PiecewisePoly { x: vec![0.0, 2.0], order: 3, dim: 1, coef: vec![1.0, 2.0, 3.0] };
    /// let mut out = [0.0; 4];
    /// p.eval(1.0, 3, &mut out);
    /// assert_eq!(out, [6.0, 8.0, 6.0, 0.0]);
    /// ```
    pub fn eval(&self, t: f64, nu_max: usize, out: &mut [f64]) {
        self.eval_on(self.interval(t), t, nu_max, out);
    }

    /// Length of the curve on interval i between local times `a` and `b` (absolute times inside
    /// the interval) by `q`-point Gauss–Legendre quadrature of |r′|.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::piecewise::PiecewisePoly;
    /// // The parabola r(t) = (t, t²) on [0, 1]: length (2√5 + asinh 2) / 4 (closed form).
    /// let coef = vec![0.0, 0.0, 1.0, 0.0, 0.0, 1.0]; // (0, 0) + (1, 0) t + (0, 1) t²
    /// let p = PiecewisePoly { x: vec![0.0, 1.0], order: 3, dim: 2, coef };
    /// let exact = (2.0 * 5f64.sqrt() + 2f64.asinh()) / 4.0;
    /// assert!((p.length_on(0, 0.0, 1.0, 8) - exact).abs() < 1e-9);
    /// // A 2-point rule is far coarser (error ~ 1e-3).
    /// assert!((p.length_on(0, 0.0, 1.0, 2) - exact).abs() > 1e-5);
    /// ```
    pub fn length_on(&self, i: usize, a: f64, b: f64, q: usize) -> f64 {
        self.speed_on(i).length(a, b, q)
    }

    /// The speed |r′| on interval `i`, ready to evaluate many times (arc length, Newton steps).
    #[inline]
    pub fn speed_on(&self, i: usize) -> IntervalSpeed {
        let (k, dim) = (self.order, self.dim);
        let c = &self.coef[i * k * dim..(i + 1) * k * dim];
        let mut dc = [[0.0; MAX_ORDER]; 3];
        for (d, row) in dc.iter_mut().enumerate().take(dim) {
            for p in 1..k {
                row[p - 1] = p as f64 * c[p * dim + d];
            }
        }
        IntervalSpeed {
            x0: self.x[i],
            terms: k.saturating_sub(1).max(1),
            dc,
        }
    }
}

/// Highest polynomial order [`IntervalSpeed`] holds (quintic pieces have order 6).
const MAX_ORDER: usize = 8;

/// |r′| on one interval of a [`PiecewisePoly`]: the coefficients of r′ in powers of t − x[i],
/// evaluated by Horner's rule (cheaper than [`PiecewisePoly::eval_on`], which carries the
/// position along).
#[derive(Debug, Clone, Copy)]
pub struct IntervalSpeed {
    x0: f64,
    terms: usize,
    dc: [[f64; MAX_ORDER]; 3],
}

impl IntervalSpeed {
    /// |r′(t)|, scale-safe ([`crate::arclength::distance`]).
    #[inline]
    pub fn at(&self, t: f64) -> f64 {
        let u = t - self.x0;
        // Three coordinates always (a missing one has zero coefficients), unrolled for the
        // cubic and quintic pieces.
        let horner = |c: &[f64; MAX_ORDER]| match self.terms {
            3 => (c[2] * u + c[1]) * u + c[0],
            5 => (((c[4] * u + c[3]) * u + c[2]) * u + c[1]) * u + c[0],
            n => {
                let mut acc = c[n - 1];
                for p in (0..n - 1).rev() {
                    acc = acc * u + c[p];
                }
                acc
            }
        };
        let v = [
            horner(&self.dc[0]),
            horner(&self.dc[1]),
            horner(&self.dc[2]),
        ];
        crate::arclength::distance(&v, &[0.0; 3])
    }

    /// ∫ₐᵇ |r′| dt by `q`-point Gauss–Legendre quadrature.
    #[inline]
    pub fn length(&self, a: f64, b: f64, q: usize) -> f64 {
        let (xs, ws) = gauss_legendre(q);
        let (mid, half) = (0.5 * (a + b), 0.5 * (b - a));
        let mut s = 0.0;
        for (&xq, &wq) in xs.iter().zip(ws) {
            s += wq * self.at(mid + half * xq);
        }
        s * half
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn evaluates_polynomial_and_derivatives() {
        // One interval [1, 3] of 2 + (t−1) − (t−1)³ in one coordinate.
        let mut p = PiecewisePoly::zeros(vec![1.0, 3.0], 4, 1).unwrap();
        p.coef.copy_from_slice(&[2.0, 1.0, 0.0, -1.0]);
        let mut out = [0.0; 4];
        p.eval(2.0, 3, &mut out);
        assert_eq!(out, [2.0, -2.0, -6.0, -6.0]);
        // Extrapolation keeps the end polynomial.
        p.eval(0.0, 0, &mut out[..1]);
        assert_eq!(out[0], 2.0);
    }

    #[test]
    fn gauss_legendre_integrates_polynomials_exactly() {
        // q points integrate degree 2q − 1 exactly (Abramowitz & Stegun 25.4.29).
        for q in [1, 2, 3, 4, 5, 8] {
            let (x, w) = gauss_legendre(q);
            let deg = 2 * q - 1;
            let s: f64 = x
                .iter()
                .zip(w)
                .map(|(x, w)| w * x.powi(deg as i32 - 1))
                .sum();
            let exact = if (deg - 1) % 2 == 0 {
                2.0 / deg as f64
            } else {
                0.0
            };
            assert_relative_eq!(s, exact, epsilon = 1e-15);
        }
    }

    #[test]
    fn length_of_a_line() {
        let mut p = PiecewisePoly::zeros(vec![0.0, 2.0], 2, 2).unwrap();
        p.coef.copy_from_slice(&[0.0, 0.0, 3.0, 4.0]);
        assert_relative_eq!(p.length_on(0, 0.0, 2.0, 3), 10.0, max_relative = 1e-15);
    }
}
