//! Ragged batches: many tracks stored as concatenated rows plus `m + 1` row offsets.
//!
//! Tracks are independent, so work is cut into jobs of at most [`CHUNK`] rows (a long track gives
//! several jobs) and the jobs run on the rayon pool. Every job writes to its own disjoint slices of
//! the output, obtained safely with `split_at_mut` through [`SplitRows`].

use crate::error::{try_collect, KernelError, Result};
use rayon::prelude::*;
use std::ops::Range;

/// Largest number of rows in one parallel job.
pub const CHUNK: usize = 1 << 14;

/// Validate `offsets` against `n` rows: starts at 0, ends at `n`, every track non-empty.
///
/// # Examples
///
/// ```
/// use osculate::batch::check_offsets;
/// assert_eq!(check_offsets(&[0, 3, 5], 5).unwrap(), vec![0, 3, 5]);
/// assert!(check_offsets(&[0, 3, 3, 5], 5).is_err());
/// ```
pub fn check_offsets(offsets: &[i64], n: usize) -> Result<Vec<usize>> {
    let bad = |detail: String| Err(KernelError::Offsets { detail });
    if offsets.len() < 2 {
        return bad(format!(
            "need at least 2 entries (one track), got {}",
            offsets.len()
        ));
    }
    if offsets[0] != 0 {
        return bad(format!("must start at 0, starts at {}", offsets[0]));
    }
    let last = offsets[offsets.len() - 1];
    if last != n as i64 {
        return bad(format!(
            "must end at the number of rows {n}, ends at {last}"
        ));
    }
    for (k, w) in offsets.windows(2).enumerate() {
        if w[1] <= w[0] {
            return bad(format!(
                "track {k} is empty or reversed (offsets[{k}] = {}, offsets[{}] = {})",
                w[0],
                k + 1,
                w[1]
            ));
        }
    }
    Ok(offsets.iter().map(|&o| o as usize).collect())
}

/// Validate offsets of query rows: `m + 1` entries from 0 to `n`, non-decreasing (tracks may
/// have no queries).
///
/// # Examples
///
/// ```
/// use osculate::batch::check_query_offsets;
/// // 3 tracks, 4 query rows; track 1 has none.
/// assert_eq!(check_query_offsets(&[0, 2, 2, 4], 4, 3).unwrap(), vec![0, 2, 2, 4]);
/// assert!(check_query_offsets(&[0, 3, 2, 4], 4, 3).is_err()); // decreasing
/// assert!(check_query_offsets(&[0, 4], 4, 3).is_err()); // not one entry per track + 1
/// ```
pub fn check_query_offsets(offsets: &[i64], n: usize, m: usize) -> Result<Vec<usize>> {
    let bad = |detail: String| Err(KernelError::Offsets { detail });
    if offsets.len() != m + 1 {
        return bad(format!(
            "need {} entries (one per track + 1), got {}",
            m + 1,
            offsets.len()
        ));
    }
    if offsets[0] != 0 || offsets[m] != n as i64 {
        return bad(format!("must run from 0 to {n}"));
    }
    if let Some(k) = offsets.windows(2).position(|w| w[1] < w[0]) {
        return bad(format!("decrease at track {k}"));
    }
    Ok(offsets.iter().map(|&o| o as usize).collect())
}

/// Row range of track `k`.
///
/// # Examples
///
/// ```
/// use osculate::batch::track_rows;
/// assert_eq!(track_rows(&[0, 3, 5], 1), 3..5);
/// ```
#[inline]
pub fn track_rows(offsets: &[usize], k: usize) -> Range<usize> {
    offsets[k]..offsets[k + 1]
}

/// Smallest time step accepted: 1/h³ (in the jerk) must stay finite.
pub const MIN_STEP: f64 = 1e-100;

/// Tracks longer than this run their scans ([`check_times`], [`median_step`], [`all_finite`],
/// the difference-based noise) in parallel over fixed chunks of [`CHUNK`] rows; the chunk
/// boundaries do not depend on the thread count and the results are put together in chunk order,
/// so they are the same bits on any number of threads.
pub const PAR_SCAN: usize = 4 * CHUNK;

/// Row ranges `[c·CHUNK, (c + 1)·CHUNK)` of `0..n`, the last one shorter.
///
/// # Examples
///
/// ```
/// use osculate::batch::{scan_chunks, CHUNK};
/// use rayon::prelude::*;
/// let chunks: Vec<_> = scan_chunks(2 * CHUNK + 1).collect();
/// assert_eq!(chunks, vec![0..CHUNK, CHUNK..2 * CHUNK, 2 * CHUNK..2 * CHUNK + 1]);
/// assert_eq!(scan_chunks(0).count(), 0);
/// ```
pub fn scan_chunks(n: usize) -> impl IndexedParallelIterator<Item = Range<usize>> {
    (0..n.div_ceil(CHUNK))
        .into_par_iter()
        .map(move |c| c * CHUNK..((c + 1) * CHUNK).min(n))
}

/// Check that times are finite and strictly increasing inside every track, with steps of at least
/// [`MIN_STEP`], and that every track holds at least `need` samples. Reports the first offending
/// track and row.
///
/// # Examples
///
/// ```
/// use osculate::batch::check_times;
/// assert!(check_times(&[0.0, 1.0, 2.0, 5.0, 6.0], &[0, 3, 5], 2, "fd").is_ok());
/// // Track 1 goes back in time at global row 4; a track of 2 rows is too short for 3.
/// let err = check_times(&[0.0, 1.0, 2.0, 5.0, 4.0], &[0, 3, 5], 2, "fd").unwrap_err();
/// assert_eq!((err.track(), err.row()), (Some(1), Some(4)));
/// assert!(check_times(&[0.0, 1.0, 2.0, 5.0, 6.0], &[0, 3, 5], 3, "fd").is_err());
/// ```
pub fn check_times(t: &[f64], offsets: &[usize], need: usize, method: &'static str) -> Result<()> {
    let m = offsets.len() - 1;
    // The first offending track in order is reported, whatever the thread schedule; inside a long
    // track, the first offending chunk, which holds the first offending row.
    let first_error = (0..m)
        .into_par_iter()
        .map(|k| -> Result<()> {
            let rows = track_rows(offsets, k);
            if rows.len() < need {
                return Err(KernelError::TooShort {
                    track: k,
                    have: rows.len(),
                    need,
                    method,
                });
            }
            if rows.len() <= PAR_SCAN {
                return check_rows(t, k, rows.start, rows);
            }
            let first = rows.start;
            scan_chunks(rows.len())
                .map(|c| check_rows(t, k, first, first + c.start..first + c.end))
                .find_map_first(|r| r.err())
                .map_or(Ok(()), Err)
        })
        .find_map_first(|r| r.err());
    first_error.map_or(Ok(()), Err)
}

/// [`check_times`] on global `rows` of track `track`, whose first row is `first`.
fn check_rows(t: &[f64], track: usize, first: usize, rows: Range<usize>) -> Result<()> {
    for row in rows {
        let v = t[row];
        if !v.is_finite() {
            return Err(KernelError::Row {
                argument: "t",
                track,
                row,
                detail: format!("time is not finite ({v})"),
            });
        }
        if row == first {
            continue;
        }
        let prev = t[row - 1];
        if v > prev && v - prev < MIN_STEP {
            return Err(KernelError::Row {
                argument: "t",
                track,
                row,
                detail: format!(
                    "the time step {:e} is too small to divide by (its cube, in the jerk, \
                     would overflow); express the times in a larger unit",
                    v - prev
                ),
            });
        }
        if v <= prev {
            return Err(KernelError::Row {
                argument: "t",
                track,
                row,
                detail: format!(
                    "times must be strictly increasing within a track, but t = {v} follows {prev}"
                ),
            });
        }
    }
    Ok(())
}

/// Whether every value of `x` is finite (in parallel chunks for long inputs).
///
/// # Examples
///
/// ```
/// use osculate::batch::all_finite;
/// assert!(all_finite(&[0.0, -1e300, 2.5]));
/// assert!(!all_finite(&[0.0, f64::NAN]) && !all_finite(&[f64::INFINITY]));
/// assert!(all_finite(&[]));
/// ```
pub fn all_finite(x: &[f64]) -> bool {
    if x.len() <= PAR_SCAN {
        return x.iter().all(|v| v.is_finite());
    }
    scan_chunks(x.len()).all(|c| x[c].iter().all(|v| v.is_finite()))
}

/// Median of the time steps of one track (0 for a single sample): the step of rank ⌊(n − 1)/2⌋
/// (from 0) among the n − 1 steps of n samples, in the order of [`f64::total_cmp`].
///
/// Long tracks select it without a copy of the steps, by a parallel radix selection on the bits
/// (exact: the same value as sorting).
///
/// # Examples
///
/// ```
/// use osculate::batch::median_step;
/// // Steps 1, 1, 8: the median is 1, whatever the long gap.
/// assert_eq!(median_step(&[0.0, 1.0, 2.0, 10.0]).unwrap(), 1.0);
/// // Steps 1, 2: the upper of the two middle ones (rank 1). One sample has no step.
/// assert_eq!(median_step(&[0.0, 1.0, 3.0]).unwrap(), 2.0);
/// assert_eq!(median_step(&[5.0]).unwrap(), 0.0);
/// ```
pub fn median_step(t: &[f64]) -> Result<f64> {
    if t.len() < 2 {
        return Ok(0.0);
    }
    if t.len() <= PAR_SCAN {
        return median_step_by_copy(t);
    }
    let rank = (t.len() - 1) / 2;
    match step_of_rank_by_sample(t, rank)? {
        Some(v) => Ok(v),
        None => Ok(step_of_rank(t, rank)),
    }
}

/// Steps sampled by [`step_of_rank_by_sample`] to place its bracket.
const SAMPLE: usize = 1 << 16;
/// Steps of one block below the bracket, at its low end, at its high end, and those inside.
type Tally = (usize, usize, usize, Vec<u64>);

/// Most steps of one block of [`HIST_BLOCK`] rows that [`step_of_rank_by_sample`] copies.
const INSIDE_CAP: usize = HIST_BLOCK / 4;

/// The step of rank `rank` (as [`step_of_rank`]) in one parallel pass, or `None` when the bracket
/// missed: two steps of a regular sample of the steps, 8 standard deviations of the sample's rank
/// on either side of `rank`, bracket the value (R. W. Floyd and R. L. Rivest, "Expected time bounds
/// for selection", CACM 18 (1975) 165–172); one pass counts the steps below and at each end and
/// copies those strictly inside; selection among the copies gives the exact value.
fn step_of_rank_by_sample(t: &[f64], rank: usize) -> Result<Option<f64>> {
    let n = t.len() - 1;
    let key = |j: usize| order_key(t[j + 1] - t[j]);
    let every = (n / SAMPLE).max(1);
    let mut sample: Vec<u64> = (0..n).step_by(every).map(key).collect();
    let s = sample.len();
    // The sample's count below the true value has standard deviation √s / 2 at the median.
    let margin = 4 * (s as f64).sqrt() as usize;
    let at = rank as u128 * s as u128 / n as u128;
    let lo_rank = (at as usize).saturating_sub(margin);
    let hi_rank = (at as usize + margin).min(s - 1);
    let lo = *sample.select_nth_unstable(lo_rank).1;
    let hi = *sample.select_nth_unstable(hi_rank).1;
    // (below lo, at lo, at hi, strictly inside), per block of rows; a block with more than
    // INSIDE_CAP steps inside (8 times the expected count: the sample misrepresents the steps)
    // gives up, and the radix selection, which needs no copy, takes over.
    let parts: Option<Vec<Tally>> = (0..n.div_ceil(HIST_BLOCK))
        .into_par_iter()
        .map(|b| {
            let (mut below, mut at_lo, mut at_hi, mut inside) = (0, 0, 0, Vec::new());
            for j in b * HIST_BLOCK..((b + 1) * HIST_BLOCK).min(n) {
                let k = key(j);
                if k < lo {
                    below += 1;
                } else if k == lo {
                    at_lo += 1;
                } else if k == hi {
                    at_hi += 1;
                } else if k < hi {
                    if inside.len() == INSIDE_CAP {
                        return None;
                    }
                    inside.push(k);
                }
            }
            Some((below, at_lo, at_hi, inside))
        })
        .collect();
    let Some(parts) = parts else {
        return Ok(None);
    };
    let below: usize = parts.iter().map(|p| p.0).sum();
    let at_lo: usize = parts.iter().map(|p| p.1).sum();
    let at_hi: usize = parts.iter().map(|p| p.2).sum();
    let count: usize = parts.iter().map(|p| p.3.len()).sum();
    if rank < below {
        return Ok(None);
    }
    let mut r = rank - below;
    if r < at_lo {
        return Ok(Some(from_order_key(lo)));
    }
    r -= at_lo;
    if r < count {
        let mut inside: Vec<u64> = Vec::new();
        inside
            .try_reserve_exact(count)
            .map_err(|_| KernelError::OutOfMemory { bytes: count * 8 })?;
        for p in &parts {
            inside.extend_from_slice(&p.3);
        }
        return Ok(Some(from_order_key(*inside.select_nth_unstable(r).1)));
    }
    r -= count;
    Ok((r < at_hi).then(|| from_order_key(hi)))
}

/// [`median_step`] by selection on a copy of the steps.
fn median_step_by_copy(t: &[f64]) -> Result<f64> {
    let mut dt = try_collect(t.len() - 1, t.windows(2).map(|w| w[1] - w[0]))?;
    let mid = dt.len() / 2;
    let (_, m, _) = dt.select_nth_unstable_by(mid, |a, b| a.total_cmp(b));
    Ok(*m)
}

/// An unsigned key whose order is that of [`f64::total_cmp`] (a bijection).
#[inline]
fn order_key(v: f64) -> u64 {
    let b = v.to_bits();
    if b >> 63 == 1 {
        !b
    } else {
        b | 1 << 63
    }
}

/// The value of an [`order_key`].
#[inline]
fn from_order_key(k: u64) -> f64 {
    f64::from_bits(if k >> 63 == 1 { k & !(1 << 63) } else { !k })
}

/// Rows per histogram in [`step_of_rank`] (counts are integers, so any split gives the same sum).
const HIST_BLOCK: usize = 1 << 18;

/// The step `t[j + 1] − t[j]` of rank `rank` in the order of [`f64::total_cmp`]: the keys are
/// refined 16 bits at a time, each level a parallel histogram of the steps whose higher bits
/// match the prefix found so far; after four levels the prefix is the whole key.
fn step_of_rank(t: &[f64], mut rank: usize) -> f64 {
    const BINS: usize = 1 << 16;
    let n = t.len() - 1;
    let key = |j: usize| order_key(t[j + 1] - t[j]);
    let mut prefix = 0u64;
    for level in 0..4 {
        let shift = 48 - 16 * level;
        let matches = |k: u64| level == 0 || k >> (shift + 16) == prefix >> (shift + 16);
        let counts = (0..n.div_ceil(HIST_BLOCK))
            .into_par_iter()
            .map(|b| {
                let mut h = vec![0usize; BINS];
                for j in b * HIST_BLOCK..((b + 1) * HIST_BLOCK).min(n) {
                    let k = key(j);
                    if matches(k) {
                        h[((k >> shift) & 0xffff) as usize] += 1;
                    }
                }
                h
            })
            .reduce(
                || vec![0usize; BINS],
                |mut a, b| {
                    a.iter_mut().zip(&b).for_each(|(x, y)| *x += y);
                    a
                },
            );
        let mut digit = 0;
        while rank >= counts[digit] {
            rank -= counts[digit];
            digit += 1;
        }
        prefix |= (digit as u64) << shift;
        if level < 3 && counts[digit] <= FEW {
            // Few steps left in the bucket: select among a copy of them (their order does not
            // matter to the value of a given rank).
            let top = |k: u64| k >> shift == prefix >> shift;
            let parts: Vec<Vec<f64>> = (0..n.div_ceil(HIST_BLOCK))
                .into_par_iter()
                .map(|b| {
                    (b * HIST_BLOCK..((b + 1) * HIST_BLOCK).min(n))
                        .map(|j| t[j + 1] - t[j])
                        .filter(|&v| top(order_key(v)))
                        .collect()
                })
                .collect();
            let mut few: Vec<f64> = parts.concat();
            let (_, v, _) = few.select_nth_unstable_by(rank, f64::total_cmp);
            return *v;
        }
    }
    from_order_key(prefix)
}

/// Bucket size below which [`step_of_rank`] stops refining and selects on a copy.
const FEW: usize = 1 << 15;

/// A bundle of output slices over the same rows that can be cut in two at a row.
pub trait SplitRows: Sized {
    /// Split into rows `[0, k)` and `[k, ..)`.
    fn split_rows(self, k: usize) -> (Self, Self);
}

impl<T> SplitRows for &mut [T] {
    fn split_rows(self, k: usize) -> (Self, Self) {
        self.split_at_mut(k)
    }
}

/// Cut `rows` into consecutive pieces of the given lengths.
///
/// # Examples
///
/// ```
/// use osculate::batch::partition;
/// let mut v = [0, 1, 2, 3, 4, 5];
/// let parts = partition(&mut v[..], [1, 3, 2]);
/// assert_eq!(parts, vec![&mut [0][..], &mut [1, 2, 3][..], &mut [4, 5][..]]);
/// ```
pub fn partition<R: SplitRows>(mut rows: R, lengths: impl IntoIterator<Item = usize>) -> Vec<R> {
    let lengths = lengths.into_iter();
    let mut out = Vec::with_capacity(lengths.size_hint().0);
    for len in lengths {
        let (head, tail) = rows.split_rows(len);
        out.push(head);
        rows = tail;
    }
    out
}

/// One unit of parallel work: rows `rows` (global) of track `track`.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Job {
    /// Track position.
    pub track: usize,
    /// Global rows written by the job.
    pub rows: Range<usize>,
}

/// Cut every track into jobs of at most [`CHUNK`] rows; `whole(k)` keeps track `k` in one job.
///
/// # Examples
///
/// ```
/// use osculate::batch::{plan_jobs, Job, CHUNK};
/// // Track 0 is cut at CHUNK rows; track 1, as long, is kept whole.
/// let offsets = [0, CHUNK + 2, 2 * CHUNK + 4];
/// let jobs = plan_jobs(&offsets, |k| k == 1);
/// assert_eq!(jobs, vec![
///     Job { track: 0, rows: 0..CHUNK },
///     Job { track: 0, rows: CHUNK..CHUNK + 2 },
///     Job { track: 1, rows: CHUNK + 2..2 * CHUNK + 4 },
/// ]);
/// ```
pub fn plan_jobs(offsets: &[usize], whole: impl Fn(usize) -> bool) -> Vec<Job> {
    let mut jobs = Vec::new();
    for k in 0..offsets.len() - 1 {
        let rows = track_rows(offsets, k);
        if whole(k) {
            jobs.push(Job { track: k, rows });
            continue;
        }
        let mut a = rows.start;
        while a < rows.end {
            let b = (a + CHUNK).min(rows.end);
            jobs.push(Job {
                track: k,
                rows: a..b,
            });
            a = b;
        }
    }
    jobs
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn times_are_checked_per_track() {
        let t = [0.0, 1.0, 2.0, 0.0, 0.5, 0.5];
        let err = check_times(&t, &[0, 3, 6], 2, "fd").unwrap_err();
        assert_eq!(err.track(), Some(1));
        assert_eq!(err.row(), Some(5));
        let err = check_times(&t, &[0, 3, 6], 4, "fd").unwrap_err();
        assert!(matches!(err, KernelError::TooShort { track: 0, .. }));
        let t = [0.0, f64::NAN, 2.0];
        assert_eq!(
            check_times(&t, &[0, 3], 2, "fd").unwrap_err().row(),
            Some(1)
        );
    }

    /// A deterministic generator in [0, 1) (xorshift64*).
    fn uniform(state: &mut u64) -> f64 {
        *state ^= *state >> 12;
        *state ^= *state << 25;
        *state ^= *state >> 27;
        (state.wrapping_mul(0x2545_f491_4f6c_dd1d) >> 11) as f64 / (1u64 << 53) as f64
    }

    /// `f` on a pool of `threads` threads.
    fn on_threads<R: Send>(threads: usize, f: impl FnOnce() -> R + Send) -> R {
        rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap()
            .install(f)
    }

    #[test]
    fn long_tracks_report_the_same_first_bad_row_on_any_thread_count() {
        // Reference: the serial row check over the whole track (`check_rows`).
        let n = 3 * PAR_SCAN + 17;
        let good: Vec<f64> = (0..n).map(|i| i as f64 * 0.1).collect();
        for bad_rows in [vec![], vec![5], vec![CHUNK + 3, 2 * PAR_SCAN], vec![n - 1]] {
            let mut t = good.clone();
            for &r in &bad_rows {
                t[r] = if r % 2 == 0 { f64::NAN } else { t[r - 1] };
            }
            let serial = check_rows(&t, 0, 0, 0..n).err().map(|e| e.row());
            for threads in [1, 2, 3] {
                let got = on_threads(threads, || check_times(&t, &[0, n], 2, "fd"));
                assert_eq!(got.err().map(|e| e.row()), serial);
            }
            assert_eq!(serial, bad_rows.first().map(|&r| Some(r)));
        }
    }

    #[test]
    fn median_step_by_bits_equals_selection_on_a_copy() {
        // Reference: `select_nth_unstable_by(total_cmp)` on the copied steps (exact; equality
        // is bitwise). Cases: random uneven steps, many ties, equal steps, a reversed and a
        // NaN time (total_cmp puts NaN last and negative steps first).
        let n = PAR_SCAN + 1001;
        let mut state = 7u64;
        let mut cases = Vec::new();
        let mut acc = 0.0;
        cases.push(
            (0..n)
                .map(|_| {
                    acc += uniform(&mut state);
                    acc
                })
                .collect::<Vec<_>>(),
        );
        cases.push(
            (0..n)
                .map(|i| (i / 3) as f64 + (i % 3) as f64 * 0.25)
                .collect(),
        );
        cases.push((0..n).map(|i| i as f64 * 0.01).collect());
        let mut odd: Vec<f64> = (0..n).map(|_| uniform(&mut state) * 1e3).collect();
        odd[10] = f64::NAN;
        cases.push(odd);
        for t in &cases {
            let expected = median_step_by_copy(t).unwrap();
            for threads in [1, 2, 3] {
                let got = on_threads(threads, || median_step(t).unwrap());
                assert_eq!(got.to_bits(), expected.to_bits());
            }
            for rank in [0, 1, n / 3, n / 2, n - 2] {
                let sorted_at = |dt: &mut Vec<f64>| {
                    dt.sort_by(f64::total_cmp);
                    dt[rank]
                };
                let mut dt: Vec<f64> = t.windows(2).map(|w| w[1] - w[0]).collect();
                let expected = sorted_at(&mut dt);
                if let Some(v) = step_of_rank_by_sample(t, rank).unwrap() {
                    assert_eq!(v.to_bits(), expected.to_bits());
                }
            }
            // The bracket holds the median on these inputs (the one-pass path is the one tested).
            assert!(step_of_rank_by_sample(t, (t.len() - 1) / 2)
                .unwrap()
                .is_some());
            for rank in [0, 1, n / 3, n - 2] {
                let mut dt: Vec<f64> = t.windows(2).map(|w| w[1] - w[0]).collect();
                dt.sort_by(f64::total_cmp);
                assert_eq!(step_of_rank(t, rank).to_bits(), dt[rank].to_bits());
            }
        }
        for v in [
            0.0,
            -0.0,
            1.5,
            -2.5,
            f64::INFINITY,
            f64::NEG_INFINITY,
            f64::MIN_POSITIVE,
        ] {
            assert_eq!(from_order_key(order_key(v)).to_bits(), v.to_bits());
        }
        assert!(order_key(-0.0) < order_key(0.0) && order_key(-1.0) < order_key(-0.5));
    }

    #[test]
    fn a_sample_that_misrepresents_the_steps_falls_back_to_the_radix_selection() {
        // Every third step is sampled (n / SAMPLE = 3). Case 1: the sampled steps are all 1 and
        // the others random, so the bracket [1, 1] misses the median. Case 2: the sampled steps
        // spread over [0, 1000) and the others crowd near 500, inside the bracket, beyond
        // INSIDE_CAP per block. Reference: selection on a copy (bitwise).
        let n = 3 * SAMPLE + 1;
        let mut state = 11u64;
        for case in 0..2 {
            let mut t = vec![0.0; n];
            for j in 1..n {
                let step = match (case, (j - 1) % 3 == 0) {
                    (0, true) => 1.0,
                    (0, false) => 2.0 + uniform(&mut state),
                    (_, true) => 1000.0 * uniform(&mut state),
                    (_, false) => 500.0 + 1e-3 * uniform(&mut state),
                };
                t[j] = t[j - 1] + step;
            }
            assert_eq!(step_of_rank_by_sample(&t, (n - 1) / 2).unwrap(), None);
            let expected = median_step_by_copy(&t).unwrap();
            assert_eq!(median_step(&t).unwrap().to_bits(), expected.to_bits());
        }
    }

    #[test]
    fn all_finite_in_chunks() {
        let mut x = vec![1.0; 2 * PAR_SCAN + 3];
        assert!(all_finite(&x));
        x[PAR_SCAN + 7] = f64::NEG_INFINITY;
        assert!(!all_finite(&x));
    }

    #[test]
    fn offsets_are_validated() {
        assert!(check_offsets(&[0], 0).is_err());
        assert!(check_offsets(&[1, 3], 3).is_err());
        assert!(check_offsets(&[0, 2], 3).is_err());
        assert!(check_offsets(&[0, 2, 1, 3], 3).is_err());
    }

    #[test]
    fn median_of_steps() {
        assert_eq!(median_step(&[0.0, 1.0, 2.0, 10.0]).unwrap(), 1.0);
        assert_eq!(median_step(&[5.0]).unwrap(), 0.0);
    }

    #[test]
    fn jobs_cover_every_row_once() {
        let offsets = [0, 3, 3 + CHUNK + 5, 3 + CHUNK + 6];
        let jobs = plan_jobs(&offsets, |k| k == 2);
        let lens: Vec<usize> = jobs.iter().map(|j| j.rows.len()).collect();
        assert_eq!(lens, vec![3, CHUNK, 5, 1]);
        let mut v = vec![0u8; offsets[3]];
        let parts = partition(&mut v[..], lens);
        assert_eq!(parts.len(), 4);
    }
}
