//! Stop intervals: where a track stands still, from its STOPPED samples and held positions.
//!
//! One track at a time (a stop never crosses tracks), tracks in parallel:
//!
//! 1. runs of samples flagged STOPPED and not INVALID; moving runs of at most
//!    [`MERGE_SAMPLES`] samples between two stopped runs are bridged;
//! 2. consecutive runs join when every sample between them, and the centre of the shorter run,
//!    lie within [`HOLD_NOISE`] noise levels of the centre of the longer run (after an abrupt
//!    halt a spline's speed can ring just above the significance threshold and split a stop);
//! 3. runs shorter than `min_stop` (default [`MIN_STOP_STEPS`] mean time steps of the track) go;
//! 4. the ends of each stop are trimmed inwards to samples within [`HOLD_NOISE`] noise levels of
//!    its centre, and consecutive stops that then touch (at most [`MERGE_SAMPLES`] samples apart)
//!    or lie at the same place (centres within that distance) merge.
//!
//! Unknown noise (NaN): no joining, no trimming, merging by place only where centres coincide.
//! Distances are Euclidean norms folded with `hypot` from 0 as NumPy's `np.hypot.reduce` does
//! (scale-safe near 1e300). A centre is the mean of the finite rows of its interval, taken as a
//! difference of running sums over the whole batch (as NumPy's `cumsum` forms them): the results
//! are the same bits as the NumPy implementation this kernel replaced. A sequential pass between
//! the two parallel ones takes the sums at the run ends: the same bits on any number of threads.

use crate::batch::{check_query_offsets, track_rows};
use crate::error::{try_collect, try_filled, KernelError, Result};
use crate::frame::flag;
use rayon::prelude::*;
use std::ops::Range;

/// Runs of moving samples at most this long between two stopped runs are bridged; stops at most
/// this many samples apart (after trimming) merge.
pub const MERGE_SAMPLES: usize = 2;
/// Minimum stop duration, in mean time steps of the track, when none is given.
pub const MIN_STOP_STEPS: f64 = 5.0;
/// A sample holds a stop's position when it lies within this many noise levels of its centre.
pub const HOLD_NOISE: f64 = 3.0;

/// Stop intervals of a batch, in kernel row order (tracks contiguous).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct StopRows {
    /// Global row of the first sample of each stop.
    pub first: Vec<usize>,
    /// Global row of the last sample of each stop.
    pub last: Vec<usize>,
    /// Track (position in the batch) of each stop.
    pub track: Vec<usize>,
}

impl StopRows {
    /// Number of stops.
    pub fn len(&self) -> usize {
        self.first.len()
    }

    /// Whether there are no stops.
    pub fn is_empty(&self) -> bool {
        self.first.is_empty()
    }
}

/// Stop intervals of tracks stored contiguously.
///
/// `t` (n), `x` (n × `dim`, row-major), `flags` (n) hold every row, tracks contiguous;
/// `offsets` (m + 1 entries from 0 to n, non-decreasing: empty tracks allowed) split them;
/// `noise` (m) is the position noise of each track (NaN: unknown). `min_stop` is the shortest
/// stop in time units (`None`: [`MIN_STOP_STEPS`] mean time steps of the track; must be ≥ 0;
/// infinity: no stops, found without any work).
///
/// # Examples
///
/// ```
/// use osculate::stops::{find_stops, StopRows};
/// // 1 s clock, positions (t, 0) m, rows 20..=39 STOPPED (flag 1), row 30 INVALID (flag 16).
/// let n = 60;
/// let t: Vec<f64> = (0..n).map(|i| i as f64).collect();
/// let x: Vec<f64> = t.iter().flat_map(|&v| [v, 0.0]).collect();
/// let mut flags = vec![0u8; n];
/// flags[20..40].iter_mut().for_each(|f| *f = 1);
/// flags[30] = 17;
/// let found = find_stops(&t, &x, 2, &flags, &[0, n as i64], &[f64::NAN], None).unwrap();
/// // The INVALID row is a moving gap of one sample: bridged.
/// assert_eq!(found, StopRows { first: vec![20], last: vec![39], track: vec![0] });
/// // Shortest stop 30 s: none; infinity: none either.
/// let short = find_stops(&t, &x, 2, &flags, &[0, n as i64], &[f64::NAN], Some(30.0)).unwrap();
/// assert!(short.is_empty());
/// let none = find_stops(&t, &x, 2, &flags, &[0, n as i64], &[f64::NAN], Some(f64::INFINITY));
/// assert!(none.unwrap().is_empty());
/// // A negative shortest stop names the argument.
/// let err = find_stops(&t, &x, 2, &flags, &[0, n as i64], &[f64::NAN], Some(-1.0)).unwrap_err();
/// assert_eq!(err.to_string(), "min_stop: must be >= 0 (inf: none), got -1.0");
/// ```
pub fn find_stops(
    t: &[f64],
    x: &[f64],
    dim: usize,
    flags: &[u8],
    offsets: &[i64],
    noise: &[f64],
    min_stop: Option<f64>,
) -> Result<StopRows> {
    let n = t.len();
    check_positions(x, dim, n)?;
    check_len("flags", flags.len(), n, "rows (one per time)")?;
    if offsets.is_empty() {
        let detail = "need at least one entry".into();
        return Err(KernelError::Offsets { detail });
    }
    let m = offsets.len() - 1;
    check_len("noise", noise.len(), m, "values (one per track)")?;
    if let Some(v) = min_stop {
        if v.is_nan() || v < 0.0 {
            return Err(KernelError::Option {
                argument: "min_stop",
                detail: format!("must be >= 0 (inf: none), got {v:?}"),
            });
        }
        if v == f64::INFINITY {
            return Ok(StopRows::default()); // none asked for: no temporaries
        }
    }
    let offsets = check_query_offsets(offsets, n, m)?;
    let data = Data {
        t,
        x,
        dim,
        flags,
        noise,
        min_stop,
    };
    // Runs of every track (in parallel), the running sums at their ends (one sequential pass,
    // up to the last run of the batch), then the rest of every track (in parallel).
    let runs: Vec<Result<Runs>> = (0..m)
        .into_par_iter()
        .map(|k| data.runs(track_rows(&offsets, k)))
        .collect();
    let mut runs: Vec<Runs> = runs.into_iter().collect::<Result<_>>()?;
    if runs.iter().all(|r| r.pieces.is_empty()) {
        return Ok(StopRows::default());
    }
    let mut sums = Running::new(x, dim)?;
    for r in runs.iter_mut() {
        r.sum_ends(&mut sums);
    }
    let per: Vec<Result<Vec<(usize, usize)>>> = runs
        .into_par_iter()
        .enumerate()
        .map(|(k, r)| data.track(k, track_rows(&offsets, k), &r))
        .collect();
    let per: Vec<Vec<(usize, usize)>> = per.into_iter().collect::<Result<_>>()?;
    let total = per.iter().map(Vec::len).sum();
    let all = || (per.iter().enumerate()).flat_map(|(k, v)| v.iter().map(move |&(a, b)| (a, b, k)));
    Ok(StopRows {
        first: try_collect(total, all().map(|s| s.0))?,
        last: try_collect(total, all().map(|s| s.1))?,
        track: try_collect(total, all().map(|s| s.2))?,
    })
}

/// Mask of the rows inside the stops (`n` rows).
///
/// # Examples
///
/// ```
/// use osculate::stops::{held_mask, StopRows};
/// let stops = StopRows { first: vec![1, 4], last: vec![2, 4], track: vec![0, 0] };
/// assert_eq!(held_mask(&stops, 6).unwrap(), [false, true, true, false, true, false]);
/// ```
pub fn held_mask(stops: &StopRows, n: usize) -> Result<Vec<bool>> {
    check_stops(stops, n)?;
    let mut mask = try_filled(n, false)?;
    for (&a, &b) in stops.first.iter().zip(&stops.last) {
        mask[a..=b].fill(true);
    }
    Ok(mask)
}

/// Mean finite position of each stop (stops × `dim`, row-major); NaN for a stop without a
/// finite row, inf or NaN where the running sums overflow.
///
/// The means are differences of the running sums over all rows (the centres [`find_stops`]
/// uses, and the same bits as NumPy's `cumsum` differences).
///
/// # Examples
///
/// ```
/// use osculate::stops::{centres, StopRows};
/// // Rows (0, 0), (2, 4), (NaN, 1), (4, 8): the stop over rows 1..=3 skips the NaN row.
/// let x = [0.0, 0.0, 2.0, 4.0, f64::NAN, 1.0, 4.0, 8.0];
/// let stops = StopRows { first: vec![1], last: vec![3], track: vec![0] };
/// assert_eq!(centres(&x, 2, &stops).unwrap(), [3.0, 6.0]);
/// ```
pub fn centres(x: &[f64], dim: usize, stops: &StopRows) -> Result<Vec<f64>> {
    if dim == 0 || x.len() % dim != 0 {
        return Err(shape(
            "positions",
            format!("expected rows of {dim} coordinates, got {} values", x.len()),
        ));
    }
    let n = x.len() / dim;
    check_stops(stops, n)?;
    let s = stops.len();
    // Boundaries (row, slot): slot 2i is the start of stop i, 2i + 1 the row after its end.
    let mut at: Vec<(usize, usize)> = try_collect(
        2 * s,
        (0..s).flat_map(|i| [(stops.first[i], 2 * i), (stops.last[i] + 1, 2 * i + 1)]),
    )?;
    at.sort_unstable();
    let mut sums = try_filled(2 * s * dim, 0.0)?;
    let mut counts = try_filled(2 * s, 0usize)?;
    let mut run = Running::new(x, dim)?;
    for (row, slot) in at {
        run.advance(row);
        counts[slot] = run.at(&mut sums[slot * dim..(slot + 1) * dim]);
    }
    let mut out = try_filled(s * dim, 0.0)?;
    for i in 0..s {
        let cnt = (counts[2 * i + 1] - counts[2 * i]) as f64;
        for j in 0..dim {
            out[i * dim + j] = (sums[(2 * i + 1) * dim + j] - sums[2 * i * dim + j]) / cnt;
        }
    }
    Ok(out)
}

fn shape(argument: &'static str, detail: String) -> KernelError {
    KernelError::Shape { argument, detail }
}

fn check_len(argument: &'static str, have: usize, want: usize, what: &str) -> Result<()> {
    match have == want {
        true => Ok(()),
        false => Err(shape(
            argument,
            format!("expected {want} {what}, got {have}"),
        )),
    }
}

fn check_positions(x: &[f64], dim: usize, n: usize) -> Result<()> {
    if dim == 0 || n.checked_mul(dim) != Some(x.len()) {
        return Err(shape(
            "positions",
            format!(
                "expected {n} rows (one per time) of dim {dim} >= 1, got {} values",
                x.len()
            ),
        ));
    }
    Ok(())
}

fn check_stops(stops: &StopRows, n: usize) -> Result<()> {
    let s = stops.first.len();
    check_len(
        "stops",
        stops.last.len(),
        s,
        "last rows (one per first row)",
    )?;
    check_len("stops", stops.track.len(), s, "tracks (one per first row)")?;
    if let Some(i) = (0..s).find(|&i| !(stops.first[i] <= stops.last[i] && stops.last[i] < n)) {
        return Err(shape(
            "stops",
            format!(
                "stop {i} runs over rows {}..={}, not inside 0..{n}",
                stops.first[i], stops.last[i]
            ),
        ));
    }
    Ok(())
}

/// Euclidean norm of `a − b`, folded with `hypot` from 0 (NumPy's `np.hypot.reduce`; the first
/// step, hypot(0, v) = |v|, is exact and taken as such).
#[inline]
fn distance(a: &[f64], b: &[f64]) -> f64 {
    a[1..]
        .iter()
        .zip(&b[1..])
        .fold((a[0] - b[0]).abs(), |acc, (&p, &q)| acc.hypot(p - q))
}

/// Running sums of the finite rows of `x` (non-finite rows add 0), as NumPy's `cumsum` of the
/// rows forms them, with the count of finite rows.
struct Running<'a> {
    x: &'a [f64],
    dim: usize,
    /// Rows summed so far: `0..row`.
    row: usize,
    sum: Vec<f64>,
    count: usize,
}

impl<'a> Running<'a> {
    /// No rows summed yet (the sums start from −0, the additive identity).
    fn new(x: &'a [f64], dim: usize) -> Result<Self> {
        Ok(Running {
            x,
            dim,
            row: 0,
            sum: try_filled(dim, -0.0)?,
            count: 0,
        })
    }

    /// Add the rows up to (not including) `row` (not before the rows already summed).
    #[inline]
    fn advance(&mut self, row: usize) {
        let d = self.dim;
        let rows = &self.x[self.row * d..row * d];
        match d {
            2 => add_rows::<2>(&mut self.sum, &mut self.count, rows),
            3 => add_rows::<3>(&mut self.sum, &mut self.count, rows),
            _ => {
                for p in rows.chunks_exact(d) {
                    let finite = p.iter().all(|v| v.is_finite());
                    self.count += usize::from(finite);
                    for (s, &v) in self.sum.iter_mut().zip(p) {
                        *s += if finite { v } else { 0.0 };
                    }
                }
            }
        }
        self.row = row;
    }

    /// Write the sums over rows `0..row` into `out` and return the count (a row-local count:
    /// only differences of counts are used).
    #[inline]
    fn at(&self, out: &mut [f64]) -> usize {
        if self.row == 0 {
            out.fill(0.0); // NumPy's sums start with a row of +0
        } else {
            out.copy_from_slice(&self.sum);
        }
        self.count
    }
}

/// [`Running::advance`] for `D` coordinates: the same additions in the same order, unrolled.
#[inline]
fn add_rows<const D: usize>(sum: &mut [f64], count: &mut usize, rows: &[f64]) {
    let mut s = [0.0; D];
    s.copy_from_slice(sum);
    let mut c = *count;
    for p in rows.chunks_exact(D) {
        let finite = p.iter().all(|v| v.is_finite());
        c += usize::from(finite);
        for j in 0..D {
            // A non-finite row adds +0, as NumPy adds the 0 that replaced it.
            s[j] += if finite { p[j] } else { 0.0 };
        }
    }
    sum.copy_from_slice(&s);
    *count = c;
}

/// A run of stopped samples: rows `first..=last`.
struct Piece {
    first: usize,
    last: usize,
}

/// The runs of one track with the running sums and finite counts at each run's first row (`lo`)
/// and after its last (`hi`), `dim` sums per run.
struct Runs {
    pieces: Vec<Piece>,
    lo: Vec<f64>,
    hi: Vec<f64>,
    lo_n: Vec<usize>,
    hi_n: Vec<usize>,
}

impl Runs {
    /// Record the sums at the ends of the runs (`sums` not past the first run yet).
    fn sum_ends(&mut self, sums: &mut Running) {
        let d = sums.dim;
        for (j, p) in self.pieces.iter().enumerate() {
            sums.advance(p.first);
            self.lo_n[j] = sums.at(&mut self.lo[j * d..(j + 1) * d]);
            sums.advance(p.last + 1);
            self.hi_n[j] = sums.at(&mut self.hi[j * d..(j + 1) * d]);
        }
    }

    /// Mean finite position of runs `a..=b` into `out`.
    fn centre(&self, a: usize, b: usize, out: &mut [f64]) {
        let d = out.len();
        let cnt = (self.hi_n[b] - self.lo_n[a]) as f64;
        for j in 0..d {
            out[j] = (self.hi[b * d + j] - self.lo[a * d + j]) / cnt;
        }
    }
}

/// Inputs of one batch.
struct Data<'a> {
    t: &'a [f64],
    x: &'a [f64],
    dim: usize,
    flags: &'a [u8],
    noise: &'a [f64],
    min_stop: Option<f64>,
}

/// Push fallibly (amortized growth).
fn push<T>(v: &mut Vec<T>, item: T) -> Result<()> {
    v.try_reserve(1).map_err(|_| KernelError::OutOfMemory {
        bytes: v.len().saturating_mul(2 * std::mem::size_of::<T>()),
    })?;
    v.push(item);
    Ok(())
}

impl Data<'_> {
    fn row(&self, i: usize) -> &[f64] {
        &self.x[i * self.dim..(i + 1) * self.dim]
    }

    /// Runs of stopped samples of rows `rows`, moving gaps of at most [`MERGE_SAMPLES`] bridged.
    fn runs(&self, rows: Range<usize>) -> Result<Runs> {
        let f = &self.flags[rows.clone()];
        let stopped = |v: &u8| v & (flag::STOPPED | flag::INVALID) == flag::STOPPED;
        let mut runs: Vec<Piece> = Vec::new();
        let mut i = 0;
        while let Some(p) = f[i..].iter().position(stopped) {
            let first = i + p;
            i = f[first..]
                .iter()
                .position(|v| !stopped(v))
                .map_or(f.len(), |q| first + q);
            let (first, last) = (rows.start + first, rows.start + i - 1);
            match runs.last_mut() {
                Some(prev) if first - prev.last - 1 <= MERGE_SAMPLES => prev.last = last,
                _ => push(&mut runs, Piece { first, last })?,
            }
        }
        let (r, d) = (runs.len(), self.dim);
        Ok(Runs {
            pieces: runs,
            lo: try_filled(r * d, 0.0)?,
            hi: try_filled(r * d, 0.0)?,
            lo_n: try_filled(r, 0)?,
            hi_n: try_filled(r, 0)?,
        })
    }

    /// Stops of track `k` (rows `rows`) from its runs and their sums.
    #[allow(clippy::neg_cmp_op_on_partial_ord)] // !(d <= r): a NaN distance or radius is far
    fn track(&self, k: usize, rows: Range<usize>, sums: &Runs) -> Result<Vec<(usize, usize)>> {
        let runs = &sums.pieces;
        if runs.is_empty() {
            return Ok(Vec::new());
        }
        let (d, r) = (self.dim, runs.len());
        let centre = |a: usize, b: usize, out: &mut [f64]| sums.centre(a, b, out);
        let noise = HOLD_NOISE * self.noise[k];

        // Join consecutive runs that hold one position.
        let mut c = try_filled(r * d, 0.0)?;
        for j in 0..r {
            centre(j, j, &mut c[j * d..(j + 1) * d]);
        }
        let cen = |j: usize| &c[j * d..(j + 1) * d];
        // Stop candidates: runs g.start..g.end.
        let mut groups: Vec<Range<usize>> = Vec::new();
        let mut g0 = 0;
        for j in 1..r {
            let (a, b) = (&runs[j - 1], &runs[j]);
            // The longer run (the earlier one on a tie).
            let reference = j - usize::from(b.last - b.first <= a.last - a.first);
            let far =
                (a.last + 1..b.first).any(|i| !(distance(self.row(i), cen(reference)) <= noise));
            if far || !(distance(cen(j), cen(j - 1)) <= noise) {
                push(&mut groups, g0..j)?;
                g0 = j;
            }
        }
        push(&mut groups, g0..r)?;
        drop(c);

        // Long enough.
        let t = self.t;
        let shortest = match self.min_stop {
            Some(v) => v,
            None if rows.len() > 1 => {
                let step = (t[rows.end - 1] - t[rows.start]) / ((rows.len() - 1) as f64);
                MIN_STOP_STEPS * step
            }
            None => f64::NAN,
        };
        let ends = |g: &Range<usize>| (runs[g.start].first, runs[g.end - 1].last);
        groups.retain(|g| {
            let (a, b) = ends(g);
            t[b] - t[a] >= shortest
        });

        // Trim the ends to samples that hold the centre.
        let known = |otherwise: f64| if noise.is_finite() { noise } else { otherwise };
        let radius = known(f64::INFINITY);
        let mut kept: Vec<(usize, usize)> = Vec::new();
        let mut kc: Vec<f64> = Vec::new();
        let mut cg = try_filled(d, 0.0)?;
        for g in &groups {
            centre(g.start, g.end - 1, &mut cg);
            let holds = |i: &usize| distance(self.row(*i), &cg) <= radius;
            let (a, b) = ends(g);
            let Some(na) = (a..=b).find(holds) else {
                continue;
            };
            let nb = (a..=b).rev().find(holds).unwrap_or(na);
            push(&mut kept, (na, nb))?;
            for &v in &cg {
                push(&mut kc, v)?;
            }
        }

        // Merge stops that touch or lie at one place.
        let near = known(0.0);
        let mut out: Vec<(usize, usize)> = Vec::new();
        for (j, &(a, b)) in kept.iter().enumerate() {
            if let Some(prev) = out.last_mut() {
                let place = distance(&kc[j * d..(j + 1) * d], &kc[(j - 1) * d..j * d]);
                if a <= prev.1 + MERGE_SAMPLES + 1 || place <= near {
                    prev.1 = prev.1.max(b);
                    continue;
                }
            }
            push(&mut out, (a, b))?;
        }
        Ok(out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A 1 s clock over `n` rows at positions (t, 0), STOPPED at `stopped`.
    fn track(n: usize, stopped: impl IntoIterator<Item = usize>) -> (Vec<f64>, Vec<f64>, Vec<u8>) {
        let t: Vec<f64> = (0..n).map(|i| i as f64).collect();
        let x = t.iter().flat_map(|&v| [v, 0.0]).collect();
        let mut flags = vec![0u8; n];
        stopped.into_iter().for_each(|i| flags[i] = flag::STOPPED);
        (t, x, flags)
    }

    fn put(x: &mut [f64], rows: Range<usize>, p: [f64; 2]) {
        rows.for_each(|i| x[2 * i..2 * i + 2].copy_from_slice(&p));
    }

    fn found(t: &[f64], x: &[f64], flags: &[u8], noise: f64) -> Vec<(usize, usize)> {
        let s = find_stops(t, x, 2, flags, &[0, t.len() as i64], &[noise], None).unwrap();
        s.first.into_iter().zip(s.last).collect()
    }

    // Expected rows below follow from the rules in the module notes and the construction.

    #[test]
    fn one_stop_in_the_middle() {
        let (t, x, f) = track(100, 20..40);
        assert_eq!(found(&t, &x, &f, f64::NAN), [(20, 39)]);
    }

    #[test]
    fn moving_gaps_of_two_samples_are_bridged_three_are_not() {
        let (t, x, f) = track(100, (20..30).chain(32..46));
        assert_eq!(found(&t, &x, &f, f64::NAN), [(20, 45)]);
        let (t, x, f) = track(100, (20..30).chain(33..46));
        assert_eq!(found(&t, &x, &f, f64::NAN), [(20, 29), (33, 45)]);
    }

    #[test]
    fn too_short_runs_are_dropped() {
        // Mean step 1 s: 6 samples span 5 s = five steps and stay, 5 samples span 4 s and go.
        let (t, x, f) = track(100, (20..26).chain(50..55));
        assert_eq!(found(&t, &x, &f, f64::NAN), [(20, 25)]);
    }

    #[test]
    fn ends_are_trimmed_and_stops_at_one_place_merge() {
        // Noise 1 cm, radius 3 cm. Rows 20..=39 stand at (3, 4) except rows 20 and 21, 5 cm
        // short in x: centre 3 − 0.1/20 = 2.995, rows 20, 21 lie 4.5 cm from it (trimmed).
        // Rows 60..=79 stand at (50, 0); unknown noise: no trimming.
        let (t, mut x, f) = track(100, (20..40).chain(60..80));
        put(&mut x, 20..40, [3.0, 4.0]);
        put(&mut x, 20..22, [2.95, 4.0]);
        put(&mut x, 60..80, [50.0, 0.0]);
        assert_eq!(found(&t, &x, &f, 0.01), [(22, 39), (60, 79)]);
        assert_eq!(found(&t, &x, &f, f64::NAN), [(20, 39), (60, 79)]);
        // Rows 60..=79 back at (3, 4): the two stops lie at one place and merge.
        put(&mut x, 60..80, [3.0, 4.0]);
        assert_eq!(found(&t, &x, &f, 0.01), [(22, 79)]);
    }

    #[test]
    fn runs_that_hold_one_position_join() {
        // Runs 20..=23 and 27..=30 (3 s each, shorter than five steps) with rows 24..=26 moving
        // (not bridged), every row at (3, 4): with noise 1 cm they join into one stop of 10 s;
        // with unknown noise they do not join and both are too short.
        let (t, mut x, f) = track(100, (20..24).chain(27..31));
        put(&mut x, 20..31, [3.0, 4.0]);
        assert_eq!(found(&t, &x, &f, 0.01), [(20, 30)]);
        assert_eq!(found(&t, &x, &f, f64::NAN), []);
        put(&mut x, 25..26, [3.0, 4.1]); // 10 cm away: no join
        assert_eq!(found(&t, &x, &f, 0.01), []);
    }

    #[test]
    fn tracks_apart_invalid_rows_not_stopped_and_edge_cases() {
        let (mut t, x, mut f) = track(100, 40..60);
        t[50..].iter_mut().for_each(|v| *v -= 50.0);
        let s = find_stops(&t, &x, 2, &f, &[0, 50, 50, 100], &[f64::NAN; 3], None).unwrap();
        // Two tracks of 50 rows (and an empty one between): each holds its part of rows 40..60.
        assert_eq!((s.first, s.last), (vec![40, 50], vec![49, 59]));
        assert_eq!(s.track, [0, 2]);
        f[45..48].iter_mut().for_each(|v| *v |= flag::INVALID);
        let s = find_stops(&t, &x, 2, &f, &[0, 50, 50, 100], &[f64::NAN; 3], Some(0.0)).unwrap();
        // INVALID rows 45..=47 are a moving gap of 3: not bridged (any length stays: min_stop 0).
        assert_eq!((s.first, s.last), (vec![40, 48, 50], vec![44, 49, 59]));
        let none = find_stops(&[], &[], 3, &[], &[0], &[], None);
        assert!(none.unwrap().is_empty()); // no rows, no tracks
    }

    #[test]
    fn bad_arguments_are_named() {
        let (t, x, f) = track(10, 0..10);
        let arg = |o: &[i64], noise: &[f64], min: Option<f64>| {
            find_stops(&t, &x, 2, &f, o, noise, min)
                .unwrap_err()
                .argument()
        };
        assert_eq!(arg(&[0, 10], &[0.1], Some(f64::NAN)), "min_stop");
        assert_eq!(arg(&[0, 10], &[0.1], Some(-0.5)), "min_stop");
        assert_eq!(arg(&[0, 9], &[0.1], None), "offsets");
        assert_eq!(arg(&[0, 10], &[0.1, 0.2], None), "noise");
        assert!(find_stops(&t, &x, 3, &f, &[0, 10], &[0.1], None).is_err());
        let mut bad = StopRows::default();
        (bad.first, bad.last, bad.track) = (vec![3], vec![10], vec![0]);
        assert_eq!(held_mask(&bad, 10).unwrap_err().argument(), "stops");
    }

    #[test]
    fn distances_are_scale_safe() {
        // |(1e300, 1e300)| = √2 · 1e300 (closed form; a sum of squares would overflow).
        let d = distance(&[1e300, 1e300], &[0.0, 0.0]);
        assert!((d / 1e300 - 2f64.sqrt()).abs() < 1e-15);
        assert_eq!(distance(&[-3.0], &[0.0]), 3.0); // folded from 0, as np.hypot.reduce
    }

    #[test]
    fn the_same_on_any_number_of_threads() {
        // A deterministic batch of 300 tracks with random flags and positions (xorshift).
        let mut state = 0x9e37_79b9_7f4a_7c15_u64;
        let mut next = || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            (state >> 11) as f64 / (1u64 << 53) as f64
        };
        let mut offsets = vec![0i64];
        let (mut t, mut x, mut f) = (Vec::new(), Vec::new(), Vec::new());
        for _ in 0..300 {
            let len = (next() * 200.0) as usize;
            for i in 0..len {
                t.push(i as f64 + 0.5 * next());
                x.extend([(i / 10) as f64 + 0.01 * next(), 0.02 * next()]);
                f.push(u8::from(next() < 0.7) | (u8::from(next() < 0.02) * flag::INVALID));
            }
            offsets.push(t.len() as i64);
        }
        let noise: Vec<f64> = (0..300).map(|k| [0.01, f64::NAN, 0.0][k % 3]).collect();
        let run = |threads: usize| {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap();
            pool.install(|| find_stops(&t, &x, 2, &f, &offsets, &noise, None).unwrap())
        };
        let one = run(1);
        assert!(one.len() > 100);
        assert_eq!(one, run(3));
    }

    #[test]
    fn masks_and_centres() {
        let mut stops = StopRows::default();
        (stops.first, stops.last, stops.track) = (vec![0, 3], vec![1, 3], vec![0, 0]);
        assert_eq!(held_mask(&stops, 4).unwrap(), [true, true, false, true]);
        let x = [1.0, 2.0, 3.0, f64::INFINITY, 5.0, 6.0, 7.0, 8.0];
        assert_eq!(centres(&x, 2, &stops).unwrap(), [1.0, 2.0, 7.0, 8.0]);
    }
}
