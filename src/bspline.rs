//! B-spline bases with knots at the samples, and conversion of B-spline coefficients to the
//! piecewise-polynomial form.
//!
//! Basis functions and their derivatives follow de Boor's recurrence as arranged in L. Piegl and
//! W. Tiller, *The NURBS Book*, 2nd ed., Springer 1997, algorithm A2.3.

use crate::error::Result;
use crate::piecewise::PiecewisePoly;

/// Highest degree supported.
pub const MAX_DEGREE: usize = 5;
const K1: usize = MAX_DEGREE + 1;

/// Clamped knot vector of degree `k` on the sample times `x`: the ends repeated k + 1 times, the
/// interior samples once. The space has `x.len() + k − 1` basis functions.
///
/// # Examples
///
/// ```
/// use osculate::bspline::clamped_knots;
/// let t = clamped_knots(&[0.0, 1.0, 3.0], 3).unwrap();
/// assert_eq!(t, vec![0.0, 0.0, 0.0, 0.0, 1.0, 3.0, 3.0, 3.0, 3.0]);
/// ```
pub fn clamped_knots(x: &[f64], k: usize) -> Result<Vec<f64>> {
    let n = x.len();
    let mut t = Vec::new();
    t.try_reserve_exact(n + 2 * k)
        .map_err(|_| crate::error::KernelError::OutOfMemory {
            bytes: (n + 2 * k) * 8,
        })?;
    t.extend(std::iter::repeat_n(x[0], k));
    t.extend_from_slice(x);
    t.extend(std::iter::repeat_n(x[n - 1], k));
    Ok(t)
}

/// Values and derivatives 0..=`nd` of the k + 1 basis functions that do not vanish on the knot span
/// `span` (knots[span] ≤ u ≤ knots[span + 1]): `ders[j][r]` is the j-th derivative of basis function
/// `span − k + r` at `u`.
pub fn basis_derivatives(
    knots: &[f64],
    span: usize,
    u: f64,
    k: usize,
    nd: usize,
) -> [[f64; K1]; K1] {
    let mut ndu = [[0.0; K1]; K1];
    let mut left = [0.0; K1];
    let mut right = [0.0; K1];
    ndu[0][0] = 1.0;
    for j in 1..=k {
        left[j] = u - knots[span + 1 - j];
        right[j] = knots[span + j] - u;
        let mut saved = 0.0;
        for r in 0..j {
            ndu[j][r] = right[r + 1] + left[j - r];
            let temp = ndu[r][j - 1] / ndu[j][r];
            ndu[r][j] = saved + right[r + 1] * temp;
            saved = left[j - r] * temp;
        }
        ndu[j][j] = saved;
    }
    let mut ders = [[0.0; K1]; K1];
    for j in 0..=k {
        ders[0][j] = ndu[j][k];
    }
    let nd = nd.min(k);
    let (ki, ndi) = (k as isize, nd as isize);
    let mut a = [[0.0; K1]; 2];
    for r in 0..=ki {
        let (mut s1, mut s2) = (0usize, 1usize);
        a[0][0] = 1.0;
        for kk in 1..=ndi {
            let mut d = 0.0;
            let rk = r - kk;
            let pk = ki - kk;
            if r >= kk {
                a[s2][0] = a[s1][0] / ndu[(pk + 1) as usize][rk as usize];
                d = a[s2][0] * ndu[rk as usize][pk as usize];
            }
            let j1 = if rk >= -1 { 1 } else { -rk };
            let j2 = if r - 1 <= pk { kk - 1 } else { ki - r };
            for j in j1..=j2 {
                let (ju, rkj) = (j as usize, (rk + j) as usize);
                a[s2][ju] = (a[s1][ju] - a[s1][ju - 1]) / ndu[(pk + 1) as usize][rkj];
                d += a[s2][ju] * ndu[rkj][pk as usize];
            }
            if r <= pk {
                let ku = kk as usize;
                a[s2][ku] = -a[s1][ku - 1] / ndu[(pk + 1) as usize][r as usize];
                d += a[s2][ku] * ndu[r as usize][pk as usize];
            }
            ders[kk as usize][r as usize] = d;
            std::mem::swap(&mut s1, &mut s2);
        }
    }
    let mut f = k as f64;
    for (kk, row) in ders.iter_mut().enumerate().take(nd + 1).skip(1) {
        for v in row.iter_mut().take(k + 1) {
            *v *= f;
        }
        f *= (k - kk) as f64;
    }
    ders
}

/// Knot span of sample interval `i` (between samples i and i + 1) for the clamped knots.
#[inline]
pub fn span_of_interval(i: usize, k: usize) -> usize {
    k + i
}

/// Convert coefficients `c` (`(n + k − 1) × dim`, row-major) of the clamped degree-`k` basis on the
/// samples `x` to piecewise-polynomial form.
pub fn to_piecewise(x: &[f64], k: usize, c: &[f64], dim: usize) -> Result<PiecewisePoly> {
    let knots = clamped_knots(x, k)?;
    let mut p = PiecewisePoly::zeros(crate::error::try_copy(x)?, k + 1, dim)?;
    let mut fact = [1.0; K1];
    for j in 1..K1 {
        fact[j] = fact[j - 1] * j as f64;
    }
    for i in 0..x.len() - 1 {
        let span = span_of_interval(i, k);
        let ders = basis_derivatives(&knots, span, x[i], k, k);
        let first = span - k;
        let out = &mut p.coef[i * (k + 1) * dim..(i + 1) * (k + 1) * dim];
        for (j, dj) in ders.iter().enumerate().take(k + 1) {
            for d in 0..dim {
                let v: f64 = (0..=k).map(|r| dj[r] * c[(first + r) * dim + d]).sum();
                out[j * dim + d] = v / fact[j];
            }
        }
    }
    Ok(p)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn partition_of_unity_and_derivatives_sum_to_zero() {
        let x = [0.0, 0.4, 1.0, 1.3, 2.2, 3.0, 3.1];
        for k in [1, 3, 5] {
            let knots = clamped_knots(&x, k).unwrap();
            for i in 0..x.len() - 1 {
                for u in [x[i], 0.5 * (x[i] + x[i + 1]), x[i + 1]] {
                    let d = basis_derivatives(&knots, span_of_interval(i, k), u, k, 3.min(k));
                    let s0: f64 = d[0][..=k].iter().sum();
                    assert_relative_eq!(s0, 1.0, epsilon = 1e-13);
                    for row in d.iter().take(3.min(k) + 1).skip(1) {
                        let s: f64 = row[..=k].iter().sum();
                        assert!(s.abs() < 1e-9, "k={k} i={i}: {s}");
                    }
                }
            }
        }
    }

    #[test]
    fn greville_coefficients_reproduce_a_line() {
        // Coefficients equal to the Greville abscissae reproduce f(t) = t (de Boor, ch. IX).
        let x = [0.0, 0.5, 1.5, 2.0, 3.5];
        let k = 5;
        let knots = clamped_knots(&x, k).unwrap();
        let nb = x.len() + k - 1;
        let c: Vec<f64> = (0..nb)
            .map(|j| knots[j + 1..j + 1 + k].iter().sum::<f64>() / k as f64)
            .collect();
        let p = to_piecewise(&x, k, &c, 1).unwrap();
        let mut out = [0.0; 4];
        for u in [0.1, 1.0, 2.7, 3.5] {
            p.eval(u, 2, &mut out);
            assert_relative_eq!(out[0], u, epsilon = 1e-12);
            assert_relative_eq!(out[1], 1.0, epsilon = 1e-11);
            assert!(out[2].abs() < 1e-9);
        }
    }
}
