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
#[inline]
pub fn track_rows(offsets: &[usize], k: usize) -> Range<usize> {
    offsets[k]..offsets[k + 1]
}

/// Smallest time step accepted: 1/h³ (in the jerk) must stay finite.
pub const MIN_STEP: f64 = 1e-100;

/// Check that times are finite and strictly increasing inside every track, with steps of at least
/// [`MIN_STEP`], and that every track holds at least `need` samples. Reports the first offending
/// track and row.
pub fn check_times(t: &[f64], offsets: &[usize], need: usize, method: &'static str) -> Result<()> {
    let m = offsets.len() - 1;
    // The first offending track in order is reported, whatever the thread schedule.
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
            let tk = &t[rows.clone()];
            for (j, &v) in tk.iter().enumerate() {
                let row = rows.start + j;
                if !v.is_finite() {
                    return Err(KernelError::Row {
                        argument: "t",
                        track: k,
                        row,
                        detail: format!("time is not finite ({v})"),
                    });
                }
                if j > 0 && v > tk[j - 1] && v - tk[j - 1] < MIN_STEP {
                    return Err(KernelError::Row {
                        argument: "t",
                        track: k,
                        row,
                        detail: format!(
                            "the time step {:e} is too small to divide by (its cube, in the jerk, \
                             would overflow); express the times in a larger unit",
                            v - tk[j - 1]
                        ),
                    });
                }
                if j > 0 && v <= tk[j - 1] {
                    return Err(KernelError::Row {
                        argument: "t",
                        track: k,
                        row,
                        detail: format!(
                        "times must be strictly increasing within a track, but t = {v} follows {}",
                        tk[j - 1]
                    ),
                    });
                }
            }
            Ok(())
        })
        .find_map_first(|r| r.err());
    first_error.map_or(Ok(()), Err)
}

/// Median of the time steps of one track (0 for a single sample).
pub fn median_step(t: &[f64]) -> Result<f64> {
    if t.len() < 2 {
        return Ok(0.0);
    }
    let mut dt = try_collect(t.len() - 1, t.windows(2).map(|w| w[1] - w[0]))?;
    let mid = dt.len() / 2;
    let (_, m, _) = dt.select_nth_unstable_by(mid, |a, b| a.total_cmp(b));
    Ok(*m)
}

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
