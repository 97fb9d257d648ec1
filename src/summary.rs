//! Per-track summaries that only trust what the noise allows: extremes of short stretches of
//! trusted samples with where they occur and their standard errors, robust percentiles, the
//! turning angle over moving samples. One parallel pass over tracks.
//!
//! The extreme of many noisy values is biased away from the truth: it picks the sample whose
//! noise happens to be largest, and next to a step of curvature a spline's curvature rings
//! (alternating over- and undershoots from knot to knot). So the extremes of the derived
//! quantities (|a_t|, a_n, curvature, |r‴|) are taken over the means of `2h + 1` consecutive
//! samples, all trusted and precise, with `h` chosen by the caller about the smoothing bandwidth
//! in samples. On an invented stop-and-go log with a 20 m quarter turn and 5 cm noise, the
//! smallest radius went from 17.6–19.2 m (one sample) to 18.9–19.5 m (nine samples: h = 1.5
//! bandwidths) and 19.4–19.8 m (15 samples: 3 bandwidths, the Python layer's choice) over nine
//! seeds. Speed, a first derivative, is taken at single samples.

use crate::batch::{check_offsets, track_rows};
use crate::error::{try_filled, KernelError, Result};
use crate::frame::flag;
use crate::uncertainty::median;
use rayon::prelude::*;
use std::ops::Range;

/// Only samples whose standard error is at most this multiple of the track's median standard
/// error of the same quantity take part in an extreme (on a noisy 25 m circle with stops, the
/// smallest radius moved from 18.1 ± 4.4 m, at a slow sample next to a stop, to 22.3 ± 1.6 m).
pub const PRECISE: f64 = 2.0;

/// Largest half-width of the stretches whose means compete for an extreme.
pub const MAX_HALF: usize = 8;

/// Flags that make a sample untrusted for every extreme.
const UNTRUSTED: u8 = flag::STOPPED | flag::EDGE | flag::GAP | flag::INVALID | flag::VAGUE;
/// Flags counted by `flagged` (EDGE is not a fault).
const FLAGGED: u8 = flag::STOPPED | flag::STRAIGHT | flag::GAP | flag::INVALID | flag::VAGUE;

/// The quantities with an extreme, in the order of [`Summary::extremes`].
pub const QUANTITIES: [&str; 5] = [
    "speed",
    "accel_tangential",
    "accel_normal",
    "curvature",
    "jerk",
];

/// Per-sample inputs of a batch, in kernel row order.
#[derive(Debug, Clone, Copy)]
pub struct Samples<'a> {
    /// Times.
    pub t: &'a [f64],
    /// Flag bits (see [`crate::frame::flag`]).
    pub flags: &'a [u8],
    /// Speed, tangential and normal acceleration, curvature (unsigned), angular speed,
    /// cumulative arc length.
    pub speed: &'a [f64],
    pub accel_tangential: &'a [f64],
    pub accel_normal: &'a [f64],
    pub curvature: &'a [f64],
    pub angular_speed: &'a [f64],
    pub arclength: &'a [f64],
    /// r‴, row-major with `dim` columns.
    pub jerk: &'a [f64],
    pub dim: usize,
    /// Standard errors of the [`QUANTITIES`] (for the jerk, of one component), where known.
    pub se: [Option<&'a [f64]>; 5],
}

/// One extreme of a track: value, time of the centre of its stretch, standard error.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Extreme {
    pub value: f64,
    pub at: f64,
    /// The mean of the standard errors over the stretch: an upper bound for the standard error
    /// of the stretch's mean, whatever the correlation between its samples.
    pub se: f64,
}

impl Extreme {
    const NONE: Extreme = Extreme {
        value: f64::NAN,
        at: f64::NAN,
        se: f64::NAN,
    };
}

/// The summary of one track (NaN where no sample qualifies).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Summary {
    /// Samples with no flag but STRAIGHT.
    pub trusted: usize,
    /// Samples with no flag at all.
    pub curved: usize,
    /// Samples with any flag but EDGE.
    pub flagged: usize,
    /// Largest arc length.
    pub length: f64,
    /// Last minus first time.
    pub duration: f64,
    /// Largest speed, |a_t|, a_n, curvature and |r‴| (see the module notes).
    pub extremes: [Extreme; 5],
    /// 95th percentile of a_n and 5th percentile of the radius 1/κ over curved samples (linear
    /// interpolation, as `numpy.quantile`).
    pub p95_accel_normal: f64,
    pub p5_radius: f64,
    /// ∫ω dt by trapezoids over the intervals whose ends both move and define ω.
    pub turning_angle: f64,
}

impl Samples<'_> {
    fn check(&self) -> Result<()> {
        let n = self.t.len();
        let cols = [
            self.speed,
            self.accel_tangential,
            self.accel_normal,
            self.curvature,
            self.angular_speed,
            self.arclength,
        ];
        let ok = self.flags.len() == n
            && cols.iter().all(|c| c.len() == n)
            && self.jerk.len() == n * self.dim
            && self.se.iter().flatten().all(|c| c.len() == n);
        if ok {
            Ok(())
        } else {
            Err(KernelError::Shape {
                argument: "samples",
                detail: format!("every per-sample input must have {n} rows"),
            })
        }
    }

    /// Value of quantity `q` at row `i` (|a_t| and |r‴| as magnitudes).
    fn value(&self, q: usize, i: usize) -> f64 {
        match q {
            0 => self.speed[i],
            1 => self.accel_tangential[i].abs(),
            2 => self.accel_normal[i],
            3 => self.curvature[i],
            _ => crate::arclength::distance(
                &self.jerk[i * self.dim..(i + 1) * self.dim],
                &[0.0; 3][..self.dim],
            ),
        }
    }

    fn se_of(&self, q: usize, i: usize) -> f64 {
        self.se[q].map_or(f64::NAN, |s| s[i])
    }
}

/// Linear-interpolation quantile of `v` (reordered in place); NaN when empty.
fn quantile(v: &mut [f64], q: f64) -> f64 {
    if v.is_empty() {
        return f64::NAN;
    }
    let pos = q * (v.len() - 1) as f64;
    let lo = pos.floor() as usize;
    let (_, &mut a, above) = v.select_nth_unstable_by(lo, f64::total_cmp);
    let b = above.iter().copied().fold(f64::INFINITY, f64::min);
    let frac = pos - lo as f64;
    if frac == 0.0 || above.is_empty() {
        a
    } else {
        a * (1.0 - frac) + b * frac
    }
}

fn one_track(s: &Samples, r: Range<usize>, half: usize) -> Result<Summary> {
    let n = r.len();
    let f = &s.flags[r.clone()];
    let trusted = |i: usize| f[i - r.start] & UNTRUSTED == 0;
    let curved = |i: usize| trusted(i) && f[i - r.start] & flag::STRAIGHT == 0;
    let mut buf = Vec::new();
    buf.try_reserve_exact(n)
        .map_err(|_| KernelError::OutOfMemory { bytes: n * 8 })?;
    let mut good = try_filled(n, false)?;
    let mut extremes = [Extreme::NONE; 5];
    for (q, e) in extremes.iter_mut().enumerate() {
        let eligible = |i: usize| {
            if q == 2 || q == 3 {
                curved(i)
            } else {
                trusted(i)
            }
        };
        buf.clear();
        buf.extend(r.clone().filter(|&i| eligible(i)).map(|i| s.se_of(q, i)));
        buf.retain(|v| v.is_finite());
        let typical = median(&mut buf);
        for (g, i) in good.iter_mut().zip(r.clone()) {
            let (v, se) = (s.value(q, i), s.se_of(q, i));
            // A NaN standard error (unknown) does not exclude the sample.
            *g = eligible(i)
                && v.is_finite()
                && se.partial_cmp(&(PRECISE * typical)) != Some(std::cmp::Ordering::Greater);
        }
        let h = if q == 0 {
            0
        } else {
            half.min(n.saturating_sub(1) / 2)
        };
        let width = (2 * h + 1) as f64;
        let mut run = 0; // trusted samples in a row ending at the current one
        for j in 0..n {
            run = if good[j] { run + 1 } else { 0 };
            if run < 2 * h + 1 {
                continue;
            }
            let c = j - h;
            let rows = r.start + c - h..=r.start + j;
            let mean = rows.clone().map(|i| s.value(q, i)).sum::<f64>() / width;
            if e.value.is_nan() || mean > e.value {
                let se = rows.map(|i| s.se_of(q, i)).sum::<f64>() / width;
                *e = Extreme {
                    value: mean,
                    at: s.t[r.start + c],
                    se,
                };
            }
        }
    }
    buf.clear();
    buf.extend(r.clone().filter(|&i| curved(i)).map(|i| s.accel_normal[i]));
    buf.retain(|v| v.is_finite());
    let p95_accel_normal = quantile(&mut buf, 0.95);
    buf.clear();
    buf.extend(
        r.clone()
            .filter(|&i| curved(i))
            .map(|i| 1.0 / s.curvature[i]),
    );
    buf.retain(|v| v.is_finite());
    let p5_radius = quantile(&mut buf, 0.05);
    let moving = |i: usize| f[i - r.start] & (flag::STOPPED | flag::INVALID) == 0;
    let mut turning_angle = 0.0;
    for i in r.start + 1..r.end {
        let piece = 0.5 * (s.angular_speed[i] + s.angular_speed[i - 1]) * (s.t[i] - s.t[i - 1]);
        if moving(i) && moving(i - 1) && piece.is_finite() {
            turning_angle += piece;
        }
    }
    let count = |p: &dyn Fn(usize) -> bool| r.clone().filter(|&i| p(i)).count();
    Ok(Summary {
        trusted: count(&trusted),
        curved: count(&curved),
        flagged: count(&|i| f[i - r.start] & FLAGGED != 0),
        length: s.arclength[r.clone()]
            .iter()
            .copied()
            .fold(f64::NAN, f64::max),
        duration: if n > 0 {
            s.t[r.end - 1] - s.t[r.start]
        } else {
            f64::NAN
        },
        extremes,
        p95_accel_normal,
        p5_radius,
        turning_angle,
    })
}

/// The summary of every track of a batch; `half[k]` is the half-width of the stretches of track
/// `k` (clamped to [`MAX_HALF`] and to the track).
///
/// # Examples
///
/// ```
/// use osculate::summary::{summarize, Samples};
/// // A circle of radius 2 at unit speed, 21 samples: curvature 0.5, a_n 0.5, a turning of 2 rad.
/// let t: Vec<f64> = (0..21).map(|i| i as f64 * 0.1).collect();
/// let one = vec![1.0; 21];
/// let half = vec![0.5; 21];
/// let zero = vec![0.0; 21];
/// let s: Vec<f64> = t.clone();
/// let samples = Samples {
///     t: &t, flags: &[0; 21], speed: &one, accel_tangential: &zero, accel_normal: &half,
///     curvature: &half, angular_speed: &half, arclength: &s, jerk: &vec![0.0; 42], dim: 2,
///     se: [None; 5],
/// };
/// let out = summarize(&samples, &[0, 21], &[2]).unwrap();
/// assert!((1.0 / out[0].extremes[3].value - 2.0).abs() < 1e-12);
/// assert!((out[0].turning_angle - 1.0).abs() < 1e-12);
/// ```
pub fn summarize(s: &Samples, offsets: &[i64], half: &[usize]) -> Result<Vec<Summary>> {
    s.check()?;
    let offsets = check_offsets(offsets, s.t.len())?;
    let m = offsets.len() - 1;
    if half.len() != m {
        return Err(KernelError::Shape {
            argument: "half",
            detail: format!("expected one half-width per track ({m})"),
        });
    }
    let rows: Vec<Result<Summary>> = (0..m)
        .into_par_iter()
        .map(|k| one_track(s, track_rows(&offsets, k), half[k].min(MAX_HALF)))
        .collect();
    let mut out = Vec::new();
    out.try_reserve_exact(m)
        .map_err(|_| KernelError::OutOfMemory { bytes: m * 200 })?;
    for r in rows {
        out.push(r?);
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn circle(n: usize, noise: &[f64]) -> (Vec<f64>, Vec<f64>) {
        let t = (0..n).map(|i| i as f64).collect();
        let k = (0..n).map(|i| 0.05 + noise[i % noise.len()]).collect();
        (t, k)
    }

    #[test]
    fn stretches_average_out_alternating_ringing() {
        // Curvature 0.05 with ±0.005 alternating from sample to sample (the pattern of a spline
        // ringing next to a curvature step): one sample says 1/0.055 = 18.2, a stretch of three
        // or more (odd) samples averages to within 0.005/3 of 0.05 (closed form).
        let (t, k) = circle(40, &[0.005, -0.005]);
        let z = vec![0.0; 40];
        let s = Samples {
            t: &t,
            flags: &[0; 40],
            speed: &z,
            accel_tangential: &z,
            accel_normal: &z,
            curvature: &k,
            angular_speed: &z,
            arclength: &t,
            jerk: &z,
            dim: 1,
            se: [None; 5],
        };
        let one = summarize(&s, &[0, 40], &[0]).unwrap()[0].extremes[3].value;
        let five = summarize(&s, &[0, 40], &[2]).unwrap()[0].extremes[3].value;
        assert!((one - 0.055).abs() < 1e-15);
        assert!((five - 0.05).abs() <= 0.005 / 5.0 + 1e-15);
    }

    #[test]
    fn untrusted_samples_break_the_stretches() {
        // Every third sample STOPPED: no run of five trusted samples, so no extreme (NaN).
        let (t, k) = circle(30, &[0.0]);
        let flags: Vec<u8> = (0..30)
            .map(|i| if i % 3 == 0 { flag::STOPPED } else { 0 })
            .collect();
        let z = vec![0.0; 30];
        let s = Samples {
            t: &t,
            flags: &flags,
            speed: &z,
            accel_tangential: &z,
            accel_normal: &z,
            curvature: &k,
            angular_speed: &z,
            arclength: &t,
            jerk: &z,
            dim: 1,
            se: [None; 5],
        };
        let out = summarize(&s, &[0, 30], &[2]).unwrap();
        assert!(out[0].extremes[3].value.is_nan());
        assert_eq!((out[0].trusted, out[0].flagged), (20, 10));
    }

    #[test]
    fn quantile_matches_numpy_linear() {
        // numpy.quantile([4, 1, 3, 2], 0.05) = 1.15 and 0.95 → 3.85 (linear interpolation).
        assert!((quantile(&mut [4.0, 1.0, 3.0, 2.0], 0.05) - 1.15).abs() < 1e-12);
        assert!((quantile(&mut [4.0, 1.0, 3.0, 2.0], 0.95) - 3.85).abs() < 1e-12);
        assert!(quantile(&mut [], 0.5).is_nan());
    }
}
