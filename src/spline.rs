//! Interpolating cubic splines with not-a-knot, natural or clamped ends.
//!
//! The slopes s_i at the samples solve the classical tridiagonal system (C. de Boor, *A Practical
//! Guide to Splines*, Springer 1978, ch. IV), for all coordinates at once:
//! h_i s_{i−1} + 2(h_{i−1} + h_i) s_i + h_{i−1} s_{i+1} = 3(h_i m_{i−1} + h_{i−1} m_i),
//! with h_i the steps and m_i the chord slopes; the end rows carry the end condition.

use crate::banded::tridiagonal_solve;
use crate::error::{try_collect, try_copy, try_filled, KernelError, Result};
use crate::piecewise::PiecewisePoly;

/// End condition of an interpolating cubic spline.
#[derive(Debug, Clone, PartialEq)]
pub enum EndCondition {
    /// The third derivative is continuous across the second and the second-to-last samples.
    NotAKnot,
    /// Zero second derivative at both ends.
    Natural,
    /// Given first derivatives (velocities) at the start and the end, `dim` values each.
    Clamped {
        /// r′ at the first sample.
        start: Vec<f64>,
        /// r′ at the last sample.
        end: Vec<f64>,
    },
}

/// Interpolating cubic spline through `(t[i], x[i·dim..])`; `t` strictly increasing, n ≥ 2.
///
/// With two samples (or three under not-a-knot) the spline is the interpolating line (parabola),
/// as not-a-knot leaves no free parameter there.
///
/// # Examples
///
/// ```
/// use osculate::spline::{interpolate, EndCondition};
/// // Not-a-knot reproduces cubics exactly.
/// let t = [0.0, 0.5, 1.5, 2.0, 3.0];
/// let x: Vec<f64> = t.iter().map(|&u: &f64| u.powi(3) - u).collect();
/// let p = interpolate(&t, &x, 1, &EndCondition::NotAKnot).unwrap();
/// let mut out = [0.0; 4];
/// p.eval(1.0, 3, &mut out);
/// assert!((out[0] - 0.0).abs() < 1e-12 && (out[1] - 2.0).abs() < 1e-12 && (out[3] - 6.0).abs() < 1e-10);
/// ```
pub fn interpolate(t: &[f64], x: &[f64], dim: usize, bc: &EndCondition) -> Result<PiecewisePoly> {
    let n = t.len();
    if n < 2 {
        return Err(KernelError::Shape {
            argument: "t",
            detail: format!("an interpolating spline needs at least 2 samples, got {n}"),
        });
    }
    if let EndCondition::Clamped { start, end } = bc {
        if start.len() != dim || end.len() != dim {
            return Err(KernelError::Shape {
                argument: "bc",
                detail: format!("clamped end velocities need {dim} values each"),
            });
        }
        if let Some(v) = start.iter().chain(end).find(|v| !v.is_finite()) {
            return Err(KernelError::Option {
                argument: "bc_velocity",
                detail: format!("end velocities must be finite, got {v}"),
            });
        }
    }
    let h = try_collect(n - 1, t.windows(2).map(|w| w[1] - w[0]))?;
    let mut m = try_filled((n - 1) * dim, 0.0)?; // chord slopes
    for i in 0..n - 1 {
        for d in 0..dim {
            m[i * dim + d] = (x[(i + 1) * dim + d] - x[i * dim + d]) / h[i];
        }
    }
    let mut s = try_filled(n * dim, 0.0)?; // slopes at the samples
    let simple = n == 2 || (n == 3 && *bc == EndCondition::NotAKnot);
    if simple && !matches!(bc, EndCondition::Clamped { .. }) {
        for i in 0..n {
            for d in 0..dim {
                s[i * dim + d] = if n == 2 {
                    m[d]
                } else {
                    // Derivative of the parabola through the three samples (Fornberg weights).
                    let w = crate::diff::fornberg(t[i], t, 1);
                    (0..3).map(|j| w[j][1] * x[j * dim + d]).sum()
                };
            }
        }
    } else {
        let mut sub = try_filled(n, 0.0)?;
        let mut diag = try_filled(n, 0.0)?;
        let mut sup = try_filled(n, 0.0)?;
        for i in 1..n - 1 {
            sub[i] = h[i];
            diag[i] = 2.0 * (h[i - 1] + h[i]);
            sup[i] = h[i - 1];
            for d in 0..dim {
                s[i * dim + d] = 3.0 * (h[i] * m[(i - 1) * dim + d] + h[i - 1] * m[i * dim + d]);
            }
        }
        match bc {
            EndCondition::NotAKnot => {
                let (d0, d1) = (t[2] - t[0], t[n - 1] - t[n - 3]);
                diag[0] = h[1];
                sup[0] = d0;
                sub[n - 1] = d1;
                diag[n - 1] = h[n - 3];
                let (hl, hp) = (h[n - 2], h[n - 3]);
                for d in 0..dim {
                    s[d] = ((h[0] + 2.0 * d0) * h[1] * m[d] + h[0] * h[0] * m[dim + d]) / d0;
                    s[(n - 1) * dim + d] = (hl * hl * m[(n - 3) * dim + d]
                        + (2.0 * d1 + hl) * hp * m[(n - 2) * dim + d])
                        / d1;
                }
            }
            EndCondition::Natural => {
                diag[0] = 2.0;
                sup[0] = 1.0;
                sub[n - 1] = 1.0;
                diag[n - 1] = 2.0;
                for d in 0..dim {
                    s[d] = 3.0 * m[d];
                    s[(n - 1) * dim + d] = 3.0 * m[(n - 2) * dim + d];
                }
            }
            EndCondition::Clamped { start, end } => {
                diag[0] = 1.0;
                sup[0] = 0.0;
                sub[n - 1] = 0.0;
                diag[n - 1] = 1.0;
                s[..dim].copy_from_slice(start);
                s[(n - 1) * dim..].copy_from_slice(end);
            }
        }
        tridiagonal_solve(&sub, &mut diag, &sup, &mut s, dim);
    }
    let mut p = PiecewisePoly::zeros(try_copy(t)?, 4, dim)?;
    for i in 0..n - 1 {
        let hi = h[i];
        for d in 0..dim {
            let (si, sj, mi) = (s[i * dim + d], s[(i + 1) * dim + d], m[i * dim + d]);
            let c = &mut p.coef[i * 4 * dim..(i + 1) * 4 * dim];
            c[d] = x[i * dim + d];
            c[dim + d] = si;
            c[2 * dim + d] = (3.0 * mi - 2.0 * si - sj) / hi;
            c[3 * dim + d] = (si + sj - 2.0 * mi) / (hi * hi);
        }
    }
    Ok(p)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn eval(p: &PiecewisePoly, t: f64, nu: usize) -> f64 {
        let mut out = [0.0; 4];
        p.eval(t, nu, &mut out);
        out[nu]
    }

    #[test]
    fn natural_has_zero_end_curvature_and_interpolates() {
        let t = [0.0, 1.0, 1.7, 3.0, 4.2];
        let x = [1.0, -1.0, 0.5, 2.0, 0.0];
        let p = interpolate(&t, &x, 1, &EndCondition::Natural).unwrap();
        assert_relative_eq!(eval(&p, 0.0, 2), 0.0, epsilon = 1e-12);
        assert_relative_eq!(eval(&p, 4.2, 2), 0.0, epsilon = 1e-12);
        for (ti, xi) in t.iter().zip(x) {
            assert_relative_eq!(eval(&p, *ti, 0), xi, epsilon = 1e-12);
        }
    }

    #[test]
    fn clamped_takes_the_given_end_slopes() {
        let t = [0.0, 1.0, 2.5];
        let x = [0.0, 1.0, 0.0, 2.0, 1.0, 1.0];
        let bc = EndCondition::Clamped {
            start: vec![1.0, -1.0],
            end: vec![0.5, 0.0],
        };
        let p = interpolate(&t, &x, 2, &bc).unwrap();
        let mut out = [0.0; 4];
        p.eval(0.0, 1, &mut out);
        assert_eq!(&out[2..4], &[1.0, -1.0]);
        p.eval(2.5, 1, &mut out);
        assert_relative_eq!(out[2], 0.5, epsilon = 1e-12);
    }

    #[test]
    fn few_samples() {
        let p = interpolate(&[0.0, 2.0], &[1.0, 5.0], 1, &EndCondition::NotAKnot).unwrap();
        assert_relative_eq!(eval(&p, 1.0, 1), 2.0);
        let p = interpolate(
            &[0.0, 1.0, 3.0],
            &[0.0, 1.0, 9.0],
            1,
            &EndCondition::NotAKnot,
        )
        .unwrap();
        assert_relative_eq!(eval(&p, 2.0, 0), 4.0, max_relative = 1e-12);
        assert!(interpolate(&[0.0], &[1.0], 1, &EndCondition::Natural).is_err());
    }
}
