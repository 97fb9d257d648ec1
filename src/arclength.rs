//! Cumulative arc length of polylines, per track.

use crate::batch::{self, partition, track_rows};
use crate::error::{try_filled, KernelError, Result};
use rayon::prelude::*;

/// Euclidean length of the difference of two points without spurious over- or underflow: the
/// plain sum of squares unless it leaves the comfortable range, then rescaled by the largest
/// component.
///
/// # Examples
///
/// ```
/// use osculate::arclength::distance;
/// assert_eq!(distance(&[0.0, 0.0], &[3.0, 4.0]), 5.0);
/// // Squares of 3e200 would overflow; the scaled sum does not (closed form 5e200).
/// assert!((distance(&[0.0, 0.0], &[3e200, 4e200]) / 5e200 - 1.0).abs() < 1e-15);
/// ```
#[inline]
pub fn distance(p: &[f64], q: &[f64]) -> f64 {
    let s2: f64 = p.iter().zip(q).map(|(a, b)| (a - b) * (a - b)).sum();
    if s2 > 1e-280 && s2 < 1e280 {
        return s2.sqrt();
    }
    let m = p
        .iter()
        .zip(q)
        .fold(0.0f64, |m, (a, b)| m.max((a - b).abs()));
    if m == 0.0 || !m.is_finite() {
        return m;
    }
    m * p
        .iter()
        .zip(q)
        .map(|(a, b)| ((a - b) / m) * ((a - b) / m))
        .sum::<f64>()
        .sqrt()
}

/// Cumulative polyline length of every row from the first finite row of its track.
///
/// Rows with a non-finite coordinate get NaN and are stepped over: the next finite row continues
/// from the last finite one (the chord across the hole is counted).
///
/// # Examples
///
/// ```
/// use osculate::arclength::polyline;
/// let x = [0.0, 0.0, 3.0, 4.0, f64::NAN, 0.0, 3.0, 8.0];
/// let s = polyline(&x, 2, &[0, 4]).unwrap();
/// assert_eq!(s[1], 5.0);
/// assert!(s[2].is_nan());
/// assert_eq!(s[3], 9.0);
/// ```
pub fn polyline(x: &[f64], dim: usize, offsets: &[i64]) -> Result<Vec<f64>> {
    if dim == 0 || x.len() % dim != 0 {
        return Err(KernelError::Shape {
            argument: "positions",
            detail: format!("{} values do not form rows of {dim}", x.len()),
        });
    }
    let n = x.len() / dim;
    let offsets = batch::check_offsets(offsets, n)?;
    let mut s = try_filled(n, f64::NAN)?;
    let m = offsets.len() - 1;
    let parts = partition(&mut s[..], (0..m).map(|k| offsets[k + 1] - offsets[k]));
    parts.into_par_iter().enumerate().for_each(|(k, out)| {
        let rows = track_rows(&offsets, k);
        let xk = &x[rows.start * dim..rows.end * dim];
        let mut prev: Option<&[f64]> = None;
        let mut acc = 0.0;
        for (j, p) in xk.chunks_exact(dim).enumerate() {
            if !p.iter().all(|v| v.is_finite()) {
                continue;
            }
            if let Some(q) = prev {
                acc += distance(p, q);
            }
            out[j] = acc;
            prev = Some(p);
        }
    });
    Ok(s)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn circle_polygon_converges_to_circumference() {
        // Inscribed regular polygon with n sides: perimeter 2n·sin(π/n) (closed form).
        let n = 1000;
        let x: Vec<f64> = (0..=n)
            .flat_map(|i| {
                let a = 2.0 * std::f64::consts::PI * i as f64 / n as f64;
                [a.cos(), a.sin()]
            })
            .collect();
        let s = polyline(&x, 2, &[0, n as i64 + 1]).unwrap();
        let exact = 2.0 * n as f64 * (std::f64::consts::PI / n as f64).sin();
        assert_relative_eq!(s[n], exact, max_relative = 1e-12);
    }

    #[test]
    fn distance_does_not_overflow() {
        // 3-4-5 triangle scaled by 2^±700: exact scaling of the closed form.
        for s in [2f64.powi(700), 2f64.powi(-700)] {
            assert_eq!(distance(&[0.0, 0.0], &[3.0 * s, 4.0 * s]), 5.0 * s);
        }
    }

    #[test]
    fn tracks_restart_at_zero() {
        let x = [0.0, 1.0, 2.0, 5.0, 6.0, 8.0];
        let s = polyline(&x, 1, &[0, 3, 6]).unwrap();
        assert_eq!(s, vec![0.0, 1.0, 2.0, 0.0, 1.0, 3.0]);
    }
}
