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

/// Time at which the fitted track reaches arc length `s` (`cum` its cumulative lengths).
pub fn time_at_length(fit: &TrackFit, cum: &[f64], s: f64) -> f64 {
    let ts = fit.times();
    let n = ts.len();
    let j = cum
        .partition_point(|&c| c <= s)
        .saturating_sub(1)
        .min(n - 2);
    let (mut a, mut b) = (ts[j], ts[j + 1]);
    let seg = cum[j + 1] - cum[j];
    if seg <= 0.0 {
        return a;
    }
    let tol = TOL * cum[n - 1].max(f64::MIN_POSITIVE);
    let mut t = a + (b - a) * ((s - cum[j]) / seg).clamp(0.0, 1.0);
    let mut buf = [0.0; 12];
    let d = fit.dim();
    // On splines the residual g(t) = S(t) − s is updated by the integral over each Newton step
    // (short steps need few nodes), on interval j without any search; other fits evaluate S(t).
    let poly = match fit {
        TrackFit::Poly { poly, .. } => Some(poly),
        _ => None,
    };
    let mut g = match poly {
        Some(p) => cum[j] + p.length_on(j, ts[j], t, LENGTH_NODES) - s,
        None => fit.length_to(cum, t) - s,
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
        match poly {
            Some(p) => p.eval_on(j, t, 1, &mut buf[..2 * d]),
            None => fit.at_time(t, &mut buf[..4 * d]),
        }
        let v = buf[d..2 * d].iter().map(|x| x * x).sum::<f64>().sqrt();
        let newton = t - g / v;
        let next = if v > 0.0 && newton > a && newton < b {
            newton
        } else {
            0.5 * (a + b)
        };
        g = match poly {
            Some(p) => {
                let nodes = if (next - t).abs() < 1e-3 * (ts[j + 1] - ts[j]) {
                    3
                } else {
                    LENGTH_NODES
                };
                g + p.length_on(j, t, next, nodes)
            }
            None => fit.length_to(cum, next) - s,
        };
        t = next;
        if b - a <= 4.0 * f64::EPSILON * b.abs().max(a.abs()) {
            return t;
        }
    }
    t
}

/// Linear interpolation in time of `cols` columns of `y` (rows at times `ts`) at `t`.
fn interp_rows(ts: &[f64], y: &[f64], cols: usize, t: f64, out: &mut [f64]) {
    let n = ts.len();
    let i = ts
        .partition_point(|&v| v <= t)
        .saturating_sub(1)
        .min(n.saturating_sub(2));
    if n < 2 {
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
            let cum = fit.cumulative_length()?;
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
            let mut buf = [0.0; 12];
            for (j, &sj) in s[range.clone()].iter().enumerate() {
                let tj = time_at_length(fit, cum, sj);
                so[j] = sj;
                to[j] = tj;
                fit.at_time(tj, &mut buf[..4 * d]);
                xo[j * d..(j + 1) * d].copy_from_slice(&buf[..d]);
                interp_rows(tk, ek, ncols, tj, &mut eo[j * ncols..(j + 1) * ncols]);
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
