//! Reparameterization by arc length: points at a uniform arc-length step, a given count, or given
//! arc lengths, on fitted paths.
//!
//! The time of each target arc length s solves S(t) = s, where S is the path's cumulative length
//! (Gauss–Legendre quadrature of |r′| on splines). A safeguarded Newton iteration (S′ = |r′|)
//! runs inside the bracket of the two samples around s and falls back to bisection whenever a
//! step would leave the bracket or fails to shrink it fast enough, so it always terminates.

use crate::batch::{partition, CHUNK};
use crate::error::{try_collect, try_filled, KernelError, Result};
use crate::fit::{Fits, TrackFit, LENGTH_NODES};
use rayon::prelude::*;

/// Where to put the new points along each track.
#[derive(Debug, Clone, PartialEq)]
pub enum Spacing {
    /// Every `step` from s = 0; with `endpoint`, the track's end is added when the last step
    /// falls short of it (so the last spacing may be shorter).
    Step {
        /// Arc-length step (> 0).
        step: f64,
        /// Keep the end point.
        endpoint: bool,
    },
    /// This many points (≥ 2) evenly spread from s = 0 to the track's length.
    Count(usize),
    /// The same arc lengths on every track: sorted, within [0, length].
    At(Vec<f64>),
}

/// Resampled tracks, concatenated.
#[derive(Debug, Clone, PartialEq)]
pub struct Resampled {
    /// Row offsets of the new points per track.
    pub offsets: Vec<usize>,
    /// Arc length of each point from the track's first fitted sample.
    pub s: Vec<f64>,
    /// Time of each point.
    pub t: Vec<f64>,
    /// Position of each point, row-major.
    pub x: Vec<f64>,
    /// Extra columns linearly interpolated in time at each point, row-major.
    pub extra: Vec<f64>,
    /// Length of each track.
    pub lengths: Vec<f64>,
}

/// Per track: target arc lengths, cumulative lengths at the fitted samples, total length.
type Plan = (Vec<f64>, Vec<f64>, f64);

/// Relative tolerance of S(t) = s.
const TOL: f64 = 1e-14;
const MAX_ITER: usize = 100;

fn check_spacing(sp: &Spacing) -> Result<()> {
    let bad = |argument, detail: String| Err(KernelError::Option { argument, detail });
    match sp {
        Spacing::Step { step, .. } if step.is_nan() || *step <= 0.0 || step.is_infinite() => {
            bad("step", format!("must be finite and > 0, got {step}"))
        }
        Spacing::Count(c) if *c < 2 => bad("count", format!("must be at least 2, got {c}")),
        Spacing::At(a) => match a.iter().position(|v| !v.is_finite()) {
            Some(i) => bad("at", format!("value {i} is not finite ({})", a[i])),
            None => match a.windows(2).position(|w| w[1] < w[0]) {
                Some(i) => bad("at", format!("must be sorted, but at[{}] < at[{i}]", i + 1)),
                None => Ok(()),
            },
        },
        _ => Ok(()),
    }
}

/// Target arc lengths of one track of length `len`.
fn targets(sp: &Spacing, len: f64, track: usize) -> Result<Vec<f64>> {
    // A request for more points than memory holds is the caller's argument, named as such.
    let too_many = |argument: &'static str, points: f64| KernelError::Track {
        argument,
        track,
        detail: format!(
            "asks for {points:.3e} points on a track of length {len:.6e} (at least {:.3e} bytes \
             of output); more than this machine can hold",
            points * 8.0
        ),
    };
    Ok(match sp {
        Spacing::Step { step, endpoint } => {
            let points = (len / step * (1.0 + 1e-12)).floor() + 2.0;
            if points.is_nan() || points >= (isize::MAX / 64) as f64 {
                return Err(too_many("step", points));
            }
            let count = points as usize - 2;
            let mut v = try_collect(count + 2, (0..=count).map(|j| (j as f64 * step).min(len)))
                .map_err(|_| too_many("step", points))?;
            let last = *v.last().unwrap_or(&0.0);
            if *endpoint && len - last > 1e-9 * step {
                v.push(len);
            }
            v
        }
        Spacing::Count(c) => try_collect(*c, (0..*c).map(|j| len * j as f64 / (*c - 1) as f64))
            .map_err(|_| too_many("count", *c as f64))?,
        Spacing::At(a) => {
            let tol = 1e-12 * len.max(1.0);
            if let Some(bad) = a.iter().find(|&&s| s < -tol || s > len + tol) {
                return Err(KernelError::Track {
                    argument: "at",
                    track,
                    detail: format!("arc length {bad} is outside the track's [0, {len}]"),
                });
            }
            try_collect(a.len(), a.iter().map(|s| s.clamp(0.0, len)))?
        }
    })
}

/// A place on sorted breaks that steps to the interval holding each new value: the same interval
/// as `breaks.partition_point(|b| b <= v) − 1` clamped to `[0, last]`, found by walking from the
/// previous one. Values that arrive in order (sorted arc lengths and their times) cost O(1) each
/// amortized instead of a binary search over the whole track.
#[derive(Debug, Clone, Copy)]
struct Cursor(usize);

impl Cursor {
    /// Start at the interval of `v` (one binary search).
    fn at(breaks: &[f64], v: f64, last: usize) -> Self {
        Cursor(
            breaks
                .partition_point(|&b| b <= v)
                .saturating_sub(1)
                .min(last),
        )
    }

    /// Move to the interval of `v` and return it.
    #[inline]
    fn seek(&mut self, breaks: &[f64], v: f64, last: usize) -> usize {
        while self.0 < last && breaks[self.0 + 1] <= v {
            self.0 += 1;
        }
        // Backwards only when a value comes out of order (a NaN, or two Newton solutions within
        // the tolerance of one another on either side of a break).
        use std::cmp::Ordering::{Equal, Less};
        while self.0 > 0 && !matches!(breaks[self.0].partial_cmp(&v), Some(Less | Equal)) {
            self.0 -= 1;
        }
        self.0
    }
}

/// The arc length S(t) of one track on the interval in hand, and its derivative |r′|, without
/// any search: in place for splines and polylines, through [`TrackFit::length_to`] otherwise.
enum Piece<'a> {
    Poly(&'a crate::piecewise::PiecewisePoly),
    Linear { x: &'a [f64], dim: usize },
    Other(&'a TrackFit),
}

impl<'a> Piece<'a> {
    fn of(fit: &'a TrackFit) -> Self {
        match fit {
            TrackFit::Poly { poly, .. } => Piece::Poly(poly),
            TrackFit::Linear { x, dim, .. } => Piece::Linear { x, dim: *dim },
            other => Piece::Other(other),
        }
    }

    /// Velocity of segment `j` of a polyline (its constant r′), scale-safe norm.
    #[inline]
    fn chord_speed(x: &[f64], dim: usize, ts: &[f64], j: usize) -> f64 {
        let h = ts[j + 1] - ts[j];
        let mut v = [0.0; 3];
        for k in 0..dim {
            v[k] = (x[(j + 1) * dim + k] - x[j * dim + k]) / h;
        }
        crate::arclength::distance(&v[..dim], &[0.0; 3][..dim])
    }
}

/// [`TrackFit::cumulative_length`] with the segments of a long track integrated in parallel (the
/// running sum stays serial, so the values are the same to the last bit).
fn cumulative_length(fit: &TrackFit) -> Result<Vec<f64>> {
    let n = fit.times().len();
    let mut cum = try_filled(n, 0.0)?;
    if n < 2 {
        return Ok(cum);
    }
    cum[1..]
        .par_chunks_mut(CHUNK)
        .enumerate()
        .for_each(|(c, out)| {
            for (q, o) in out.iter_mut().enumerate() {
                *o = fit.segment(c * CHUNK + q + 1);
            }
        });
    let mut acc = 0.0;
    for v in cum.iter_mut() {
        acc += *v;
        *v = acc;
    }
    Ok(cum)
}

/// Time at which the fitted track reaches arc length `s` (`cum` its cumulative lengths).
///
/// # Examples
///
/// ```
/// use osculate::fit::{fit_track, Method};
/// use osculate::resample::time_at_length;
/// // Chords of length 5 (3-4-5 steps) in 1 s, then in 4 s: s = 2.5 at t = 0.5, s = 7.5 at t = 3.
/// let t = [0.0, 1.0, 5.0];
/// let x = [0.0, 0.0, 3.0, 4.0, 6.0, 8.0];
/// let f = fit_track(&t, &x, 2, None, &Method::Linear).unwrap();
/// let cum = f.cumulative_length().unwrap();
/// assert!((time_at_length(&f, &cum, 2.5) - 0.5).abs() < 1e-12);
/// assert!((time_at_length(&f, &cum, 7.5) - 3.0).abs() < 1e-12);
/// ```
pub fn time_at_length(fit: &TrackFit, cum: &[f64], s: f64) -> f64 {
    let n = fit.times().len();
    let j = Cursor::at(cum, s, n - 2).0;
    time_on(fit, &Piece::of(fit), cum, s, j)
}

/// [`time_at_length`] on interval `j`, the one whose cumulative lengths bracket `s`.
fn time_on(fit: &TrackFit, piece: &Piece, cum: &[f64], s: f64, j: usize) -> f64 {
    let ts = fit.times();
    let n = ts.len();
    let (mut a, mut b) = (ts[j], ts[j + 1]);
    let seg = cum[j + 1] - cum[j];
    if seg <= 0.0 {
        return a;
    }
    let tol = TOL * cum[n - 1].max(f64::MIN_POSITIVE);
    let mut t = a + (b - a) * ((s - cum[j]) / seg).clamp(0.0, 1.0);
    let mut buf = [0.0; 12];
    let d = fit.dim();
    // The residual g(t) = S(t) − s: on splines it is updated by the integral over each Newton
    // step (short steps need few nodes), on polylines it is linear in t; other fits evaluate
    // S(t). All on interval j, without any search.
    let linear_speed = match piece {
        Piece::Linear { x, dim } => Piece::chord_speed(x, *dim, ts, j),
        _ => f64::NAN,
    };
    let speed = match piece {
        Piece::Poly(p) => Some(p.speed_on(j)),
        _ => None,
    };
    let mut g = match (piece, &speed) {
        (_, Some(sp)) => cum[j] + sp.length(ts[j], t, LENGTH_NODES) - s,
        (Piece::Linear { .. }, _) => cum[j] + linear_speed * (t - ts[j]) - s,
        (_, None) => fit.length_to(cum, t) - s,
    };
    for _ in 0..MAX_ITER {
        if g.abs() <= tol {
            return t;
        }
        if g > 0.0 {
            b = t;
        } else {
            a = t;
        }
        let v = match (piece, &speed) {
            (_, Some(sp)) => sp.at(t),
            (Piece::Linear { .. }, _) => linear_speed,
            (_, None) => {
                fit.at_time(t, &mut buf[..4 * d]);
                buf[d..2 * d].iter().map(|x| x * x).sum::<f64>().sqrt()
            }
        };
        let newton = t - g / v;
        let next = if v > 0.0 && newton > a && newton < b {
            newton
        } else {
            0.5 * (a + b)
        };
        g = match (piece, &speed) {
            (_, Some(sp)) => {
                let nodes = if (next - t).abs() < 1e-3 * (ts[j + 1] - ts[j]) {
                    3
                } else {
                    LENGTH_NODES
                };
                g + sp.length(t, next, nodes)
            }
            (Piece::Linear { .. }, _) => cum[j] + linear_speed * (next - ts[j]) - s,
            (_, None) => fit.length_to(cum, next) - s,
        };
        t = next;
        if b - a <= 4.0 * f64::EPSILON * b.abs().max(a.abs()) {
            return t;
        }
    }
    t
}

/// Position at time `t` on interval `i` (the interval [`TrackFit::at_time`] would find), written
/// to `out` (`dim` values).
#[inline]
fn position_on(fit: &TrackFit, piece: &Piece, i: usize, t: f64, out: &mut [f64]) {
    match piece {
        Piece::Poly(p) => p.eval_on(i, t, 0, out),
        Piece::Linear { x, dim } => {
            // The formula of TrackFit::at_time for polylines.
            let ts = fit.times();
            let h = ts[i + 1] - ts[i];
            for k in 0..*dim {
                let (a, b) = (x[i * dim + k], x[(i + 1) * dim + k]);
                out[k] = a + (b - a) / h * (t - ts[i]);
            }
        }
        Piece::Other(f) => {
            let mut buf = [0.0; 12];
            let d = out.len();
            f.at_time(t, &mut buf[..4 * d]);
            out.copy_from_slice(&buf[..d]);
        }
    }
}

/// Linear interpolation in time of `cols` columns of `y` (rows at times `ts`) at `t` on interval
/// `i` (the last row ≤ t, clamped); a single row is copied.
#[inline]
fn interp_on(ts: &[f64], y: &[f64], cols: usize, i: usize, t: f64, out: &mut [f64]) {
    if ts.len() < 2 {
        out.copy_from_slice(&y[..cols]);
        return;
    }
    let w = ((t - ts[i]) / (ts[i + 1] - ts[i])).clamp(0.0, 1.0);
    for c in 0..cols {
        out[c] = (1.0 - w) * y[i * cols + c] + w * y[(i + 1) * cols + c];
    }
}

/// Resample every fitted track; `t` and `extra` (`ncols` columns) are the original rows, with the
/// row offsets of `fits`.
///
/// # Examples
///
/// ```
/// use osculate::fit::{fit_batch, Method};
/// use osculate::resample::{resample, Spacing};
/// // The unit square as a polyline: length 4, corners at s = 0, 1, 2, 3, 4 (closed form).
/// let t = [0.0, 1.0, 2.0, 3.0, 4.0];
/// let x = [0.0, 0.0, 1.0, 0.0, 1.0, 1.0, 0.0, 1.0, 0.0, 0.0];
/// let fits = fit_batch(&t, &x, 2, &[0, 5], None, &Method::Linear).unwrap();
/// let r = resample(&fits, &t, &[], 0, &Spacing::Step { step: 0.5, endpoint: true }).unwrap();
/// assert_eq!(r.lengths, vec![4.0]);
/// assert_eq!(r.s.len(), 9);
/// assert!((r.x[4] - 1.0).abs() < 1e-12 && (r.x[5] - 0.0).abs() < 1e-12); // s = 1: corner (1, 0)
/// assert!((r.t[3] - 1.5).abs() < 1e-12); // s = 1.5 is reached at t = 1.5
/// ```
pub fn resample(
    fits: &Fits,
    t: &[f64],
    extra: &[f64],
    ncols: usize,
    spacing: &Spacing,
) -> Result<Resampled> {
    check_spacing(spacing)?;
    let n = t.len();
    if extra.len() != n * ncols {
        return Err(KernelError::Shape {
            argument: "extra",
            detail: format!("has {} values, expected {n} rows of {ncols}", extra.len()),
        });
    }
    let m = fits.tracks.len();
    let d = fits.dim;
    let plans: Vec<Result<Plan>> = fits
        .tracks
        .par_iter()
        .enumerate()
        .map(|(k, fit)| {
            if matches!(fit, TrackFit::Invalid) {
                return Ok((Vec::new(), Vec::new(), f64::NAN));
            }
            let cum = cumulative_length(fit)?;
            let len = *cum.last().unwrap_or(&0.0);
            let s = targets(spacing, len, k)?;
            Ok((s, cum, len))
        })
        .collect();
    let mut plan = Vec::with_capacity(m);
    for p in plans {
        plan.push(p?);
    }
    let mut offsets = Vec::with_capacity(m + 1);
    offsets.push(0usize);
    for (s, _, _) in &plan {
        offsets.push(offsets.last().unwrap() + s.len());
    }
    let total = offsets[m];
    let oom = || KernelError::OutOfMemory { bytes: usize::MAX };
    let mut out = Resampled {
        offsets: offsets.clone(),
        s: try_filled(total, f64::NAN)?,
        t: try_filled(total, f64::NAN)?,
        x: try_filled(total.checked_mul(d).ok_or_else(oom)?, f64::NAN)?,
        extra: try_filled(total.checked_mul(ncols).ok_or_else(oom)?, f64::NAN)?,
        lengths: plan.iter().map(|p| p.2).collect(),
    };
    // Jobs of at most CHUNK points, so that one long track also runs in parallel.
    let mut jobs: Vec<(usize, std::ops::Range<usize>)> = Vec::new();
    for k in 0..m {
        let mut a = 0;
        let len = offsets[k + 1] - offsets[k];
        while a < len {
            let b = (a + CHUNK).min(len);
            jobs.push((k, a..b));
            a = b;
        }
    }
    let sizes = || jobs.iter().map(|(_, r)| r.len());
    let ts_parts = partition(&mut out.t[..], sizes());
    let x_parts = partition(&mut out.x[..], sizes().map(|c| c * d));
    let e_parts = partition(&mut out.extra[..], sizes().map(|c| c * ncols));
    let s_parts = partition(&mut out.s[..], sizes());
    ts_parts
        .into_par_iter()
        .zip(x_parts)
        .zip(e_parts)
        .zip(s_parts)
        .zip(jobs.par_iter())
        .for_each(|((((to, xo), eo), so), (k, range))| {
            let (s, cum, _) = &plan[*k];
            let fit = &fits.tracks[*k];
            let rows = fits.offsets[*k]..fits.offsets[*k + 1];
            let (tk, ek) = (
                &t[rows.clone()],
                &extra[rows.start * ncols..rows.end * ncols],
            );
            let targets = &s[range.clone()];
            if targets.is_empty() {
                return;
            }
            // Walk forward through the sorted targets: one binary search per job for each cursor,
            // then every interval is found by stepping from the previous one.
            let piece = Piece::of(fit);
            let times = fit.times();
            let last = times.len() - 2;
            let elast = tk.len().saturating_sub(2);
            let mut on_cum = Cursor::at(cum, targets[0], last);
            let mut on_time = Cursor(0);
            let mut on_rows = Cursor(0);
            let mut first = true;
            for (j, &sj) in targets.iter().enumerate() {
                let seg = on_cum.seek(cum, sj, last);
                let tj = time_on(fit, &piece, cum, sj, seg);
                if first {
                    on_time = Cursor::at(times, tj, last);
                    on_rows = Cursor::at(tk, tj, elast);
                    first = false;
                }
                so[j] = sj;
                to[j] = tj;
                let i = on_time.seek(times, tj, last);
                position_on(fit, &piece, i, tj, &mut xo[j * d..(j + 1) * d]);
                let r = on_rows.seek(tk, tj, elast);
                interp_on(tk, ek, ncols, r, tj, &mut eo[j * ncols..(j + 1) * ncols]);
            }
        });
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::fit::{fit_batch, Method};
    use crate::spline::EndCondition;
    use approx::assert_relative_eq;

    #[test]
    fn uniform_spacing_on_a_circle() {
        // Unit circle sampled unevenly: arc length equals the angle (closed form).
        let t: Vec<f64> = (0..60).map(|i| (i as f64 / 59.0).powf(1.3) * 6.0).collect();
        let x: Vec<f64> = t.iter().flat_map(|&a| [a.cos(), a.sin()]).collect();
        let fits = fit_batch(
            &t,
            &x,
            2,
            &[0, 60],
            None,
            &Method::Spline(EndCondition::NotAKnot),
        )
        .unwrap();
        let r = resample(
            &fits,
            &t,
            &t,
            1,
            &Spacing::Step {
                step: 0.25,
                endpoint: true,
            },
        )
        .unwrap();
        assert_eq!(r.offsets, vec![0, 25]);
        for j in 0..24 {
            // Spline-on-circle accuracy (h ≈ 0.1): the angle of the point equals s to 1e-5.
            let ang = r.x[2 * j + 1]
                .atan2(r.x[2 * j])
                .rem_euclid(2.0 * std::f64::consts::PI);
            assert_relative_eq!(ang, r.s[j], epsilon = 1e-5);
            // The extra column is t itself: interpolating it gives back the point's time.
            assert_relative_eq!(r.extra[j], r.t[j], epsilon = 1e-12);
        }
        assert_relative_eq!(r.s[24], r.lengths[0]);
    }

    #[test]
    fn straight_segment_points_are_exact() {
        let t = [0.0, 1.0, 3.0];
        let x = [0.0, 0.0, 3.0, 4.0, 9.0, 12.0];
        let fits = fit_batch(&t, &x, 2, &[0, 3], None, &Method::Linear).unwrap();
        let r = resample(&fits, &t, &[], 0, &Spacing::Count(4)).unwrap();
        assert_eq!(r.s, vec![0.0, 5.0, 10.0, 15.0]);
        // s = 5 ends the first segment; s = 10 is halfway along the second (t from 1 to 3).
        assert_relative_eq!(r.x[2], 3.0, epsilon = 1e-12);
        assert_relative_eq!(r.t[2], 2.0, epsilon = 1e-12);
        assert_relative_eq!(r.x[4], 6.0, epsilon = 1e-12);
    }

    #[test]
    fn bad_spacings() {
        let t = [0.0, 1.0];
        let x = [0.0, 0.0, 1.0, 0.0];
        let fits = fit_batch(&t, &x, 2, &[0, 2], None, &Method::Linear).unwrap();
        let go = |sp| resample(&fits, &t, &[], 0, &sp);
        assert!(go(Spacing::Step {
            step: 0.0,
            endpoint: true
        })
        .is_err());
        assert!(go(Spacing::Count(1)).is_err());
        assert!(go(Spacing::At(vec![0.5, 0.2])).is_err());
        assert!(matches!(
            go(Spacing::At(vec![2.0])),
            Err(KernelError::Track { track: 0, .. })
        ));
    }
}
