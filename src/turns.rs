//! Turns and speed changes: the pieces of a track an analyst reads as one event each.
//!
//! A *turn* is a maximal run of moving samples whose signed curvature is significantly non-zero
//! with one sign. Hysteresis keeps noise from splitting it: a run starts where |κ| exceeds
//! `z_on` standard errors (and the absolute floor) and continues while κ keeps its sign and
//! exceeds `z_off` standard errors; stopped samples are transparent (a vehicle that halts in a
//! bend and drives on is still in one turn). Runs of one sign separated by at most
//! `merge_samples` moving samples merge (a short straight blip between two parts of one bend),
//! and the run then extends outwards while κ keeps its sign, so that the smoothed flanks of
//! the curvature count in the heading change. Turns turning less than `min_heading` are
//! dropped.
//!
//! The smallest radius of a turn is the radius of a least-squares circle through the measured
//! positions of its *core*: the samples whose curvature is at least `core` times the turn's
//! peak. One sample's 1/κ of a smoothed curve is biased: the peak of a short turn is flattened
//! by the smoothing and the largest of many noisy values is the noisiest; the circle uses every
//! core sample at once. The fit is the algebraic one of I. Kåsa (IEEE Trans. Instrum. Meas. 25
//! (1976) 8–14) refined by Gauss–Newton on the geometric distances, with the standard error of
//! the radius from the Gauss–Newton normal matrix and the residual variance.
//!
//! A *speed change* is, likewise, a run where the tangential acceleration keeps its sign and
//! exceeds `accel_on` (and `z_on` standard errors), continuing while it exceeds `accel_off`
//! (and `z_off` standard errors). Stops end it.

use crate::batch::{check_offsets, track_rows};
use crate::error::{try_collect, KernelError, Result};
use crate::frame::flag;
use rayon::prelude::*;
use std::ops::Range;

mod circle;
pub use circle::fit_circle;

/// Flags that keep a sample out of the peaks (not out of the runs).
const UNTRUSTED: u8 = flag::STOPPED | flag::EDGE | flag::GAP | flag::INVALID | flag::VAGUE;
/// Fewest core samples a turn's circle is fitted through.
pub const MIN_CORE: usize = 5;
/// Flags counted as "flagged" in a row (EDGE is not a fault).
const FLAGGED: u8 = flag::STOPPED | flag::STRAIGHT | flag::GAP | flag::INVALID | flag::VAGUE;

/// Per-sample inputs of a batch, kernel row order.
#[derive(Debug, Clone, Copy)]
pub struct Samples<'a> {
    pub t: &'a [f64],
    /// Cumulative arc length.
    pub s: &'a [f64],
    /// Signed curvature (left turns positive about `up`).
    pub curvature: &'a [f64],
    /// Its standard error (NaN where unknown).
    pub curvature_se: Option<&'a [f64]>,
    pub speed: &'a [f64],
    pub accel_normal: &'a [f64],
    pub accel_tangential: &'a [f64],
    pub accel_tangential_se: Option<&'a [f64]>,
    pub flags: &'a [u8],
    /// Measured positions in the plane of the turns, row-major (x, y).
    pub xy: &'a [f64],
    /// Velocities in that plane, row-major (for the heading at the ends of a turn).
    pub vxy: &'a [f64],
}

/// How turns are found (see the module notes).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TurnOptions {
    pub z_on: f64,
    pub z_off: f64,
    /// Curvatures below this never start a turn (1 / length units).
    pub min_curvature: f64,
    pub merge_samples: usize,
    /// Radians.
    pub min_heading: f64,
    /// Core samples: curvature at least this fraction of the peak.
    pub core: f64,
    /// Half-width (samples) of the stretches whose means make the peaks.
    pub half: usize,
}

impl Default for TurnOptions {
    fn default() -> Self {
        TurnOptions {
            z_on: 3.0,
            z_off: 1.0,
            min_curvature: 1e-6,
            merge_samples: 5,
            min_heading: 10f64.to_radians(),
            core: 0.75,
            half: 1,
        }
    }
}

/// One turn (rows are kernel rows).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Turn {
    pub track: usize,
    pub first: usize,
    pub last: usize,
    /// +1 left (about `up`), −1 right.
    pub direction: i8,
    /// Signed heading change ∫κ ds (radians).
    pub heading: f64,
    /// Radius of the least-squares circle through the core (NaN when it cannot be fitted) and
    /// its standard error.
    pub radius: f64,
    pub radius_se: f64,
    /// Core samples the circle went through.
    pub core: usize,
    /// 1 / the largest mean |κ| over a stretch, and the time of its middle sample.
    pub peak_radius: f64,
    pub peak_at: f64,
    /// Largest mean a_n over a stretch of trusted samples, and when.
    pub accel_normal: f64,
    pub accel_normal_at: f64,
    pub speed_in: f64,
    pub speed_out: f64,
    pub flagged: usize,
}

/// How speed changes are found (see the module notes).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SpeedOptions {
    /// Length units per time unit squared.
    pub accel_on: f64,
    pub accel_off: f64,
    pub z_on: f64,
    pub z_off: f64,
    /// Fewest samples of a speed change.
    pub min_samples: usize,
}

/// One speed change (rows are kernel rows).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SpeedChange {
    pub track: usize,
    pub first: usize,
    pub last: usize,
    /// +1 speeding up, −1 slowing down.
    pub direction: i8,
    pub speed_before: f64,
    pub speed_after: f64,
    /// Largest |a_t| and when.
    pub peak: f64,
    pub peak_at: f64,
}

impl Samples<'_> {
    fn check(&self) -> Result<()> {
        let n = self.t.len();
        let cols = [
            self.s,
            self.curvature,
            self.speed,
            self.accel_normal,
            self.accel_tangential,
        ];
        let ok = cols.iter().all(|c| c.len() == n)
            && self.flags.len() == n
            && self.xy.len() == 2 * n
            && self.vxy.len() == 2 * n
            && self.curvature_se.is_none_or(|c| c.len() == n)
            && self.accel_tangential_se.is_none_or(|c| c.len() == n);
        if ok {
            Ok(())
        } else {
            Err(KernelError::Shape {
                argument: "samples",
                detail: format!("every per-sample input must have {n} rows"),
            })
        }
    }

    fn moving(&self, i: usize) -> bool {
        self.flags[i] & (flag::STOPPED | flag::INVALID) == 0 && self.curvature[i].is_finite()
    }

    fn kappa_se(&self, i: usize) -> f64 {
        self.curvature_se
            .map_or(0.0, |c| if c[i].is_finite() { c[i] } else { 0.0 })
    }
}

/// Largest mean of `value(i)` over `2h + 1` consecutive rows of `rows` that all pass `ok`
/// (h shrinks to what the rows hold); `(mean, middle row)`, or `None`.
fn stretch_max(
    rows: Range<usize>,
    h: usize,
    ok: impl Fn(usize) -> bool,
    value: impl Fn(usize) -> f64,
) -> Option<(f64, usize)> {
    let h = h.min(rows.len().saturating_sub(1) / 2);
    let width = 2 * h + 1;
    let mut best: Option<(f64, usize)> = None;
    let mut run = 0;
    for j in rows.clone() {
        run = if ok(j) && value(j).is_finite() {
            run + 1
        } else {
            0
        };
        if run >= width {
            let mean = (j + 1 - width..=j).map(&value).sum::<f64>() / width as f64;
            if best.is_none_or(|(b, _)| mean > b) {
                best = Some((mean, j - h));
            }
        }
    }
    best
}

fn track_turns(s: &Samples, rows: Range<usize>, k: usize, o: &TurnOptions) -> Result<Vec<Turn>> {
    let sign = |v: f64| if v > 0.0 { 1i8 } else { -1i8 };
    let on = |i: usize| s.curvature[i].abs() >= (o.z_on * s.kappa_se(i)).max(o.min_curvature);
    let stay = |i: usize| {
        let floor = o.min_curvature * o.z_off / o.z_on;
        s.curvature[i].abs() >= (o.z_off * s.kappa_se(i)).max(floor) && s.curvature[i] != 0.0
    };
    // 1. Hysteresis runs (first row, last row, sign); stopped samples are transparent.
    let mut runs: Vec<(usize, usize, i8)> = Vec::new();
    let mut open: Option<(usize, usize, i8)> = None;
    for i in rows.clone() {
        if !s.moving(i) {
            continue;
        }
        let sg = sign(s.curvature[i]);
        open = match open {
            Some((a, _, d)) if sg == d && stay(i) => Some((a, i, d)),
            Some(run) => {
                runs.push(run);
                on(i).then_some((i, i, sg))
            }
            None => on(i).then_some((i, i, sg)),
        };
    }
    runs.extend(open);
    // 2. Merge runs of one sign across short blips: gaps in which the path travels at most
    //    `merge_samples` typical steps at speed (at least half the runs' speed). A stop in a
    //    bend travels no distance, and the slow, noisy samples around it little; a straight
    //    between two bends of one hand travels its length.
    let mut steps = try_collect(
        rows.len(),
        rows.clone()
            .skip(1)
            .filter(|&i| s.moving(i) && s.moving(i - 1))
            .map(|i| s.s[i] - s.s[i - 1]),
    )?;
    let step = crate::uncertainty::median(&mut steps);
    let pace = |(a, b, _): (usize, usize, i8)| -> Result<f64> {
        let mut v = try_collect(
            b + 1 - a,
            (a..=b).filter(|&i| s.moving(i)).map(|i| s.speed[i]),
        )?;
        Ok(crate::uncertainty::median(&mut v))
    };
    let mut merged: Vec<(usize, usize, i8)> = Vec::new();
    for run in runs {
        if let Some(prev) = merged.last_mut() {
            let fast = 0.5 * pace(*prev)?.min(pace(run)?);
            let straight: f64 = (prev.1 + 1..=run.0)
                .filter(|&i| s.moving(i) && s.speed[i] >= fast)
                .map(|i| s.s[i] - s.s[i - 1])
                .filter(|v| v.is_finite())
                .sum();
            let short = straight <= o.merge_samples as f64 * step || straight.is_nan();
            if prev.2 == run.2 && short {
                prev.1 = run.1;
                continue;
            }
        }
        merged.push(run);
    }
    // Runs that turn by a negligible angle (the ringing of a fitted curvature about zero) are
    // dropped before they can bound their neighbours' flanks.
    let turned = |&(a, b, _): &(usize, usize, i8)| {
        let mut sum = 0.0;
        let mut prev: Option<usize> = None;
        for i in (a..=b).filter(|&i| s.moving(i)) {
            if let Some(p) = prev {
                sum += 0.5 * (s.curvature[i] + s.curvature[p]) * (s.s[i] - s.s[p]);
            }
            prev = Some(i);
        }
        sum.abs() >= 0.25 * o.min_heading
    };
    merged.retain(turned);
    // 3. Extend over the flanks where κ keeps its sign, up to the neighbouring turns.
    let mut out = Vec::new();
    // End of the previous run's extension: flanks never overlap.
    let mut taken = rows.start;
    for j in 0..merged.len() {
        let (mut a, mut b, d) = merged[j];
        let df = d as f64;
        let lo = if j > 0 {
            (merged[j - 1].1 + 1).max(taken)
        } else {
            rows.start
        };
        let hi = if j + 1 < merged.len() {
            merged[j + 1].0
        } else {
            rows.end
        };
        let same = |i: usize| s.moving(i) && sign(s.curvature[i]) == d && s.curvature[i] != 0.0;
        while a > lo && same(a - 1) {
            a -= 1;
        }
        while b + 1 < hi && same(b + 1) {
            b += 1;
        }
        taken = b + 1;
        // Heading change by trapezoids over consecutive moving samples.
        let mut heading = 0.0;
        let mut prev: Option<usize> = None;
        for i in a..=b {
            if !s.moving(i) {
                continue;
            }
            if let Some(p) = prev {
                let piece = 0.5 * (s.curvature[i] + s.curvature[p]) * (s.s[i] - s.s[p]);
                if piece.is_finite() {
                    heading += piece;
                }
            }
            prev = Some(i);
        }
        // The heading change between the tangents at the ends is exact for the fitted path;
        // the integral only decides how many whole turns lie between them. Past a flank the
        // curvature of a smoothed or interpolated path rings about zero, so each end is taken
        // where the heading stops moving the turn's way within a few samples beyond it.
        let theta = |i: usize| s.vxy[2 * i + 1].atan2(s.vxy[2 * i]);
        let reach = o.merge_samples.max(3);
        let wrap = |d: f64| d - std::f64::consts::TAU * (d / std::f64::consts::TAU).round();
        let (t_a, t_b) = (theta(a), theta(b));
        // The heading of the path just outside each end: the median over a few samples (the
        // end sample included), robust to the ringing and to the noise of single tangents.
        let side = |rows: Range<usize>, from: f64| {
            let mut d: Vec<f64> = rows
                .filter(|&i| s.moving(i))
                .map(|i| wrap(theta(i) - from))
                .filter(|v| v.is_finite())
                .collect();
            crate::uncertainty::median(&mut d)
        };
        // Next to a turn the smoothed heading overshoots and swings back over a few
        // bandwidths; the windows reach past that (to the neighbouring turns at most).
        let far = 3 * reach;
        let entry = side(
            a.saturating_sub(far).max(lo)..a.saturating_sub(reach).max(lo) + 1,
            t_a,
        );
        let exit = side(
            (b + reach).min(hi.saturating_sub(1)).max(b)..(b + 1 + far).min(hi),
            t_b,
        );
        let near = |v: f64| {
            if v.is_finite() {
                v.clamp(-1.0, 1.0)
            } else {
                0.0
            }
        };
        let chord = wrap(t_b - t_a) + near(exit) - near(entry);
        if chord.is_finite() && heading.is_finite() {
            let tau = std::f64::consts::TAU;
            heading = chord + tau * ((heading - chord) / tau).round();
        }
        if heading.abs() < o.min_heading {
            continue;
        }
        let trusted = |i: usize| s.flags[i] & UNTRUSTED == 0 && s.curvature[i].is_finite();
        let peak = stretch_max(a..b + 1, o.half, trusted, |i| df * s.curvature[i])
            .or_else(|| stretch_max(a..b + 1, 0, |i| s.moving(i), |i| df * s.curvature[i]));
        let (peak_k, peak_row) = peak.unwrap_or((f64::NAN, a));
        // A radius only where the turn's smoothed curvature is positive in its direction (on a
        // badly time-stamped log the stretch means can be 0 or of the other sign: no radius,
        // not ±inf).
        let radius_of = |k: f64| if k > 0.0 { 1.0 / k } else { f64::NAN };
        let core = try_collect(
            b + 1 - a,
            (a..=b)
                .filter(|&i| s.moving(i) && df * s.curvature[i] >= o.core * peak_k)
                .map(|i| [s.xy[2 * i], s.xy[2 * i + 1]])
                .filter(|p| p[0].is_finite() && p[1].is_finite()),
        )?;
        // Too few core samples, or a circle no better than 10 % (a short turn: a few noisy
        // points on a short arc), and the smoothed peak is the figure, without an error.
        let (radius, radius_se) = match fit_circle(&core) {
            Some((r, e)) if core.len() >= MIN_CORE && e <= 0.1 * r => (r, e),
            _ => (radius_of(peak_k), f64::NAN),
        };
        let an = stretch_max(a..b + 1, o.half, trusted, |i| s.accel_normal[i]);
        let (an, an_row) = an.map_or((f64::NAN, None), |(v, r)| (v, Some(r)));
        out.push(Turn {
            track: k,
            first: a,
            last: b,
            direction: d,
            heading,
            radius,
            radius_se,
            core: core.len(),
            peak_radius: radius_of(peak_k),
            peak_at: s.t[peak_row],
            accel_normal: an,
            accel_normal_at: an_row.map_or(f64::NAN, |r| s.t[r]),
            speed_in: s.speed[a],
            speed_out: s.speed[b],
            flagged: (a..=b).filter(|&i| s.flags[i] & FLAGGED != 0).count(),
        });
    }
    Ok(out)
}

fn track_speed_changes(
    s: &Samples,
    rows: Range<usize>,
    k: usize,
    o: &SpeedOptions,
) -> Vec<SpeedChange> {
    let at = |i: usize| s.accel_tangential[i];
    let se = |i: usize| {
        s.accel_tangential_se
            .map_or(0.0, |c| if c[i].is_finite() { c[i] } else { 0.0 })
    };
    let usable = |i: usize| s.flags[i] & (flag::STOPPED | flag::INVALID) == 0 && at(i).is_finite();
    let on = |i: usize| usable(i) && at(i).abs() >= o.accel_on.max(o.z_on * se(i));
    let stay = |i: usize, d: f64| usable(i) && d * at(i) >= o.accel_off.max(o.z_off * se(i));
    let mut out = Vec::new();
    let mut open: Option<(usize, usize, i8)> = None;
    let close = |run: (usize, usize, i8), out: &mut Vec<SpeedChange>| {
        let (a, b, d) = run;
        if b + 1 - a < o.min_samples {
            return;
        }
        let (mut peak, mut peak_row) = (0.0f64, a);
        for i in a..=b {
            if (d as f64) * at(i) > peak {
                peak = (d as f64) * at(i);
                peak_row = i;
            }
        }
        out.push(SpeedChange {
            track: k,
            first: a,
            last: b,
            direction: d,
            speed_before: s.speed[a],
            speed_after: s.speed[b],
            peak,
            peak_at: s.t[peak_row],
        });
    };
    for i in rows.clone() {
        let d = if at(i) > 0.0 { 1i8 } else { -1i8 };
        open = match open {
            Some((a, _, od)) if stay(i, od as f64) => Some((a, i, od)),
            Some(run) => {
                close(run, &mut out);
                on(i).then_some((i, i, d))
            }
            None => on(i).then_some((i, i, d)),
        };
    }
    if let Some(run) = open {
        close(run, &mut out);
    }
    out
}

fn check_options(o: &TurnOptions) -> Result<()> {
    let bad = |argument: &'static str, detail: String| KernelError::Option { argument, detail };
    if !(o.z_on.is_finite() && o.z_on > 0.0 && o.z_off >= 0.0 && o.z_off <= o.z_on) {
        return Err(bad(
            "significance",
            format!("need 0 <= z_off <= z_on, got {} and {}", o.z_off, o.z_on),
        ));
    }
    if !(o.min_curvature >= 0.0 && o.min_curvature.is_finite()) {
        return Err(bad(
            "min_curvature",
            format!("must be finite and >= 0, got {}", o.min_curvature),
        ));
    }
    if !(o.min_heading >= 0.0 && o.min_heading.is_finite()) {
        return Err(bad(
            "min_heading",
            format!("must be finite and >= 0, got {}", o.min_heading),
        ));
    }
    if !(o.core > 0.0 && o.core <= 1.0) {
        return Err(bad("core", format!("must be in (0, 1], got {}", o.core)));
    }
    Ok(())
}

/// The turns of every track of a batch (in track order, then along each track).
///
/// # Examples
///
/// ```
/// use osculate::turns::{turns, Samples, TurnOptions};
/// // A quarter circle of radius 10 at unit speed between two straights, 1 sample per metre.
/// let n = 60;
/// let mut xy = Vec::new();
/// let mut kappa = Vec::new();
/// for i in 0..n {
///     let s = i as f64;
///     let (p, k) = if s < 20.0 {
///         ([s, 0.0], 0.0)
///     } else if s < 20.0 + 5.0 * std::f64::consts::PI {
///         let a = (s - 20.0) / 10.0;
///         ([20.0 + 10.0 * a.sin(), 10.0 - 10.0 * a.cos()], 0.1)
///     } else {
///         ([30.0, 10.0 + s - 20.0 - 5.0 * std::f64::consts::PI], 0.0)
///     };
///     xy.extend(p);
///     kappa.push(k);
/// }
/// let t: Vec<f64> = (0..n).map(|i| i as f64).collect();
/// let one = vec![1.0; n];
/// let zero = vec![0.0; n];
/// let samples = Samples {
///     t: &t, s: &t, curvature: &kappa, curvature_se: None, speed: &one,
///     accel_normal: &kappa, accel_tangential: &zero, accel_tangential_se: None,
///     flags: &vec![0; n], xy: &xy, vxy: &xy,
/// };
/// let found = turns(&samples, &[0, n as i64], &TurnOptions::default()).unwrap();
/// assert_eq!(found.len(), 1);
/// assert!((found[0].radius - 10.0).abs() < 1e-9);
/// ```
pub fn turns(s: &Samples, offsets: &[i64], o: &TurnOptions) -> Result<Vec<Turn>> {
    s.check()?;
    check_options(o)?;
    let offsets = check_offsets(offsets, s.t.len())?;
    let m = offsets.len() - 1;
    let per: Vec<Result<Vec<Turn>>> = (0..m)
        .into_par_iter()
        .map(|k| track_turns(s, track_rows(&offsets, k), k, o))
        .collect();
    let mut out = Vec::new();
    for turns in per {
        out.extend(turns?);
    }
    Ok(out)
}

/// The speed changes of every track of a batch.
///
/// # Examples
///
/// ```
/// use osculate::turns::{speed_changes, Samples, SpeedOptions};
/// // Cruise at 10, brake at −0.5 over rows 10..=19 (10 → 5), cruise again: one speed change
/// // (direction −1) over exactly the braking rows, peak |a_t| 0.5.
/// let n = 30;
/// let t: Vec<f64> = (0..n).map(|i| i as f64).collect();
/// let a_t: Vec<f64> = (0..n).map(|i| if (10..20).contains(&i) { -0.5 } else { 0.0 }).collect();
/// let speed: Vec<f64> = (0..n).map(|i| 10.0 - 0.5 * (i.clamp(10, 20) - 10) as f64).collect();
/// let zero = vec![0.0; n];
/// let xy: Vec<f64> = t.iter().flat_map(|&v| [v, 0.0]).collect();
/// let samples = Samples {
///     t: &t, s: &t, curvature: &zero, curvature_se: None, speed: &speed,
///     accel_normal: &zero, accel_tangential: &a_t, accel_tangential_se: None,
///     flags: &vec![0; n], xy: &xy, vxy: &xy,
/// };
/// let o = SpeedOptions { accel_on: 0.3, accel_off: 0.1, z_on: 2.0, z_off: 1.0, min_samples: 3 };
/// let found = speed_changes(&samples, &[0, n as i64], &o).unwrap();
/// assert_eq!(found.len(), 1);
/// assert_eq!((found[0].first, found[0].last, found[0].direction), (10, 19, -1));
/// assert_eq!((found[0].speed_before, found[0].peak), (10.0, 0.5));
/// // An option out of range names itself.
/// let bad = SpeedOptions { accel_off: 1.0, ..o };
/// assert_eq!(speed_changes(&samples, &[0, n as i64], &bad).unwrap_err().argument(), "accel_off");
/// ```
pub fn speed_changes(s: &Samples, offsets: &[i64], o: &SpeedOptions) -> Result<Vec<SpeedChange>> {
    s.check()?;
    let bad = |argument: &'static str, detail: String| KernelError::Option { argument, detail };
    if !(o.accel_on.is_finite() && o.accel_on > 0.0) {
        return Err(bad(
            "accel_on",
            format!("must be finite and > 0, got {}", o.accel_on),
        ));
    }
    if !(o.accel_off >= 0.0 && o.accel_off <= o.accel_on) {
        return Err(bad(
            "accel_off",
            format!(
                "must be in [0, accel_on = {}], got {}",
                o.accel_on, o.accel_off
            ),
        ));
    }
    if !(o.z_on.is_finite() && o.z_on >= 0.0 && o.z_off >= 0.0 && o.z_off <= o.z_on) {
        return Err(bad(
            "significance",
            format!("need 0 <= z_off <= z_on, got {} and {}", o.z_off, o.z_on),
        ));
    }
    let offsets = check_offsets(offsets, s.t.len())?;
    let m = offsets.len() - 1;
    let per: Vec<Vec<SpeedChange>> = (0..m)
        .into_par_iter()
        .map(|k| track_speed_changes(s, track_rows(&offsets, k), k, o))
        .collect();
    Ok(per.into_iter().flatten().collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn stretch_max_means_consecutive_good_rows() {
        let v = [1.0, 5.0, 1.0, 2.0, 2.0, 2.0, 9.0];
        let ok = |i: usize| i != 6;
        // Width 3 over rows 0..6 (row 6 excluded): means 7/3, 8/3, 5/3, 2 → 8/3 at row 2.
        let (m, row) = stretch_max(0..7, 1, ok, |i| v[i]).unwrap();
        assert!((m - 8.0 / 3.0).abs() < 1e-15 && row == 2);
    }
}
