//! Per-track statistics behind the data checks (interleaved objects, implausible speeds,
//! accelerations swamped by noise): medians over each track, one parallel pass.
//!
//! The decisions themselves are the Python layer's (`osculate.diagnose`); this computes the
//! robust figures they compare, by selection (not sorting) over at most [`MAX_ROWS`] rows of a
//! track.

use crate::batch::{check_offsets, track_rows};
use crate::error::{try_filled, KernelError, Result};
use crate::frame::flag;
use crate::uncertainty::median;
use rayon::prelude::*;

/// Rows ahead searched for a return to the same place (the most interleaved objects recognised).
pub const MAX_LAG: usize = 6;

/// Longer tracks are described from this many evenly spread rows (a median of 4096 values is
/// within about 2 % of the track's).
pub const MAX_ROWS: usize = 4096;

/// Robust figures of one track each (NaN where a track has too few finite rows).
#[derive(Debug, Clone, PartialEq)]
pub struct TrackStats {
    /// Median distance between consecutive finite rows (of at most [`MAX_ROWS`] evenly spread).
    pub step: Vec<f64>,
    /// Median over rows of the distance to the nearest of the rows 2..=[`MAX_LAG`] ahead.
    pub back: Vec<f64>,
    /// Median of step distance / time step.
    pub speed: Vec<f64>,
    /// Median time step.
    pub dt: Vec<f64>,
    /// Share of the rows flagged VAGUE or GAP.
    pub flagged: Vec<f64>,
    /// Median |r″| by the 3-point second difference of the positions (what finite differences
    /// of order 2 estimate in the interior).
    pub accel: Vec<f64>,
}

/// Distance between rows `i` and `j` (scale-safe: scaled by the largest difference).
fn distance(x: &[f64], dim: usize, i: usize, j: usize) -> f64 {
    crate::arclength::distance(&x[i * dim..(i + 1) * dim], &x[j * dim..(j + 1) * dim])
}

fn one_track(t: &[f64], x: &[f64], dim: usize, flags: &[u8]) -> Result<[f64; 6]> {
    let n = t.len();
    let stride = n.div_ceil(MAX_ROWS).max(1);
    let finite = |i: usize| x[i * dim..(i + 1) * dim].iter().all(|v| v.is_finite());
    let mut buf = Vec::new();
    let cap = n.min(MAX_ROWS + 1);
    buf.try_reserve_exact(cap)
        .map_err(|_| KernelError::OutOfMemory { bytes: cap * 8 })?;
    let mut fill = |f: &mut dyn FnMut(&mut Vec<f64>)| {
        buf.clear();
        f(&mut buf);
        median(&mut buf)
    };
    let step = fill(&mut |b| {
        b.extend(
            (1..n)
                .step_by(stride)
                .filter(|&i| finite(i) && finite(i - 1))
                .map(|i| distance(x, dim, i, i - 1)),
        )
    });
    let back = fill(&mut |b| {
        b.extend((0..n).step_by(stride).filter(|&i| finite(i)).map(|i| {
            (2..=MAX_LAG)
                .filter(|&l| i + l < n && finite(i + l))
                .map(|l| distance(x, dim, i, i + l))
                .fold(f64::INFINITY, f64::min)
        }))
    });
    let speed = fill(&mut |b| {
        b.extend(
            (1..n)
                .step_by(stride)
                .filter(|&i| finite(i) && finite(i - 1))
                .map(|i| distance(x, dim, i, i - 1) / (t[i] - t[i - 1])),
        )
    });
    let dt = fill(&mut |b| b.extend((1..n).step_by(stride).map(|i| t[i] - t[i - 1])));
    let accel = fill(&mut |b| {
        b.extend(
            (1..n.saturating_sub(1))
                .step_by(stride)
                .filter(|&i| finite(i - 1) && finite(i) && finite(i + 1))
                .map(|i| {
                    let (h1, h2) = (t[i] - t[i - 1], t[i + 1] - t[i]);
                    let mut a = [0.0; 3];
                    for c in 0..dim {
                        let (p, q, r) =
                            (x[(i - 1) * dim + c], x[i * dim + c], x[(i + 1) * dim + c]);
                        a[c] = 2.0 * ((r - q) / h2 - (q - p) / h1) / (h1 + h2);
                    }
                    let a = &a[..dim];
                    let big = a.iter().fold(0.0f64, |m, v| m.max(v.abs()));
                    if big > 0.0 && big.is_finite() {
                        big * a.iter().map(|v| (v / big) * (v / big)).sum::<f64>().sqrt()
                    } else {
                        big
                    }
                }),
        )
    });
    let bad = flags
        .iter()
        .filter(|&&f| f & (flag::VAGUE | flag::GAP) != 0)
        .count();
    let flagged = bad as f64 / n.max(1) as f64;
    Ok([step, back, speed, dt, accel, flagged])
}

/// The statistics of every track of a batch (`x` row-major with `dim` columns, `flags` the
/// kernel's flags of every row).
///
/// # Examples
///
/// ```
/// use osculate::diagnose::track_stats;
/// // Two objects 30 m apart, their rows alternating, each moving at 10 m/s: a row's nearest
/// // neighbour two rows ahead is 2 m away, the next row 30 m.
/// let t: Vec<f64> = (0..40).map(|i| i as f64 * 0.1).collect();
/// let x: Vec<f64> = (0..40).flat_map(|i| [t[i] * 10.0, if i % 2 == 0 { 0.0 } else { 30.0 }]).collect();
/// let s = track_stats(&t, &x, 2, &[0, 40], &vec![0; t.len()]).unwrap();
/// assert!(s.back[0] < 0.2 * s.step[0]);
/// ```
pub fn track_stats(
    t: &[f64],
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    flags: &[u8],
) -> Result<TrackStats> {
    let n = t.len();
    if x.len() != n * dim || flags.len() != n {
        return Err(KernelError::Shape {
            argument: "positions",
            detail: format!("expected {n} rows of {dim} positions and flags"),
        });
    }
    let offsets = check_offsets(offsets, n)?;
    let m = offsets.len() - 1;
    let rows: Vec<Result<[f64; 6]>> = (0..m)
        .into_par_iter()
        .map(|k| {
            let r = track_rows(&offsets, k);
            one_track(
                &t[r.clone()],
                &x[r.start * dim..r.end * dim],
                dim,
                &flags[r.clone()],
            )
        })
        .collect();
    let mut cols: [Vec<f64>; 6] = Default::default();
    for c in cols.iter_mut() {
        *c = try_filled(m, f64::NAN)?;
    }
    for (k, r) in rows.into_iter().enumerate() {
        for (c, v) in cols.iter_mut().zip(r?) {
            c[k] = v;
        }
    }
    let [step, back, speed, dt, accel, flagged] = cols;
    Ok(TrackStats {
        step,
        back,
        speed,
        dt,
        accel,
        flagged,
    })
}

/// Finite differences are useless on a track when the standard error of their r″ exceeds this
/// fraction of the track's typical |r″| (a choice of ours: beyond it the headline
/// accelerations of a summary are mostly noise).
pub const FD_NOISE_RATIO: f64 = 0.3;

/// Per track, whether finite differences would give accelerations that are mostly noise: the
/// 3-point r″ of a uniform grid has the weights (1, −2, 1)/h², standard error √6 σ/h², compared
/// with [`FD_NOISE_RATIO`] × the median |r″| of [`TrackStats::accel`]. Noise at the level of
/// rounding — below 1e-9 of the median step, or within 16 ε of the track's largest coordinate
/// (positions far from the origin, ECEF metres) — does not count, nor do tracks of fewer than 10
/// rows.
///
/// # Examples
///
/// ```
/// use osculate::diagnose::{fd_swamped, track_stats};
/// // A straight line at 10 m/s, 10 Hz, with ±5 cm of alternating noise: |r″| is all noise.
/// let t: Vec<f64> = (0..50).map(|i| i as f64 * 0.1).collect();
/// let x: Vec<f64> = (0..50)
///     .flat_map(|i| [t[i] * 10.0, if i % 2 == 0 { 0.05 } else { -0.05 }])
///     .collect();
/// let s = track_stats(&t, &x, 2, &[0, 50], &vec![0; 50]).unwrap();
/// assert_eq!(fd_swamped(&s, &[0.05], &x, 2, &[0, 50]), vec![true]);
/// // Exact data (noise estimate 0) never is.
/// assert_eq!(fd_swamped(&s, &[0.0], &x, 2, &[0, 50]), vec![false]);
/// ```
pub fn fd_swamped(
    stats: &TrackStats,
    noise: &[f64],
    x: &[f64],
    dim: usize,
    offsets: &[usize],
) -> Vec<bool> {
    (0..offsets.len() - 1)
        .into_par_iter()
        .map(|k| {
            let (a, b) = (offsets[k], offsets[k + 1]);
            let (sigma, step, dt) = (noise[k], stats.step[k], stats.dt[k]);
            let real = sigma > 1e-9 * step && step > 0.0 && b - a >= 10;
            if !(real && 6f64.sqrt() * sigma / (dt * dt) > FD_NOISE_RATIO * stats.accel[k]) {
                return false;
            }
            let scale = x[a * dim..b * dim]
                .iter()
                .filter(|v| !v.is_nan())
                .fold(0.0f64, |m, v| m.max(v.abs()));
            sigma > 16.0 * f64::EPSILON * scale
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_object_moving_is_not_interleaved() {
        // A straight line at 10 m/s sampled at 10 Hz: step 1 m, nearest of 2..6 ahead 2 m, speed
        // 10 m/s, no noise (closed forms).
        let t: Vec<f64> = (0..50).map(|i| i as f64 * 0.1).collect();
        let x: Vec<f64> = t.iter().flat_map(|&s| [10.0 * s, 0.0]).collect();
        let s = track_stats(&t, &x, 2, &[0, 50], &vec![0; t.len()]).unwrap();
        assert!((s.step[0] - 1.0).abs() < 1e-12 && (s.back[0] - 2.0).abs() < 1e-12);
        assert!((s.speed[0] - 10.0).abs() < 1e-9 && (s.dt[0] - 0.1).abs() < 1e-12);
    }

    #[test]
    fn flagged_share_counts_vague_and_gap_rows() {
        // 50 rows: 10 VAGUE, 5 GAP, 5 STOPPED (not counted): share (10 + 5) / 50 = 0.3 exactly.
        let t: Vec<f64> = (0..50).map(|i| i as f64 * 0.1).collect();
        let x: Vec<f64> = t.iter().flat_map(|&s| [10.0 * s, 0.0]).collect();
        let mut f = vec![0u8; 50];
        f[..10].fill(flag::VAGUE);
        f[10..15].fill(flag::GAP);
        f[15..20].fill(flag::STOPPED);
        let s = track_stats(&t, &x, 2, &[0, 50], &f).unwrap();
        assert_eq!(s.flagged[0], 0.3);
    }
}
