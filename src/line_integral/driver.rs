//! The generic parallel driver: rows cut into jobs, segments between consecutive usable rows
//! summed per job (main and companion rule), per-track stitching of cumulative sums, closing
//! segments of closed paths. The integrand is any [`Segments`] source.

use super::options::Options;
use crate::batch::{self, partition, plan_jobs, track_rows, Job};
use crate::error::{try_filled, KernelError, Result};
use rayon::prelude::*;
use std::ops::Range;

/// Per-track results.
#[derive(Debug, Clone, PartialEq)]
pub struct Integral {
    /// Integral over each track (NaN for a track without a usable row; 0 for a single one).
    pub total: Vec<f64>,
    /// |total − total by the companion rule| per track; NaN when not estimated.
    pub error: Vec<f64>,
    /// Running integral at every row from the first usable row of its track (NaN on skipped
    /// rows); empty unless asked for. The closing segment of a closed path is not in it.
    pub cumulative: Vec<f64>,
    /// Rows skipped per track (non-finite position or value).
    pub skipped: Vec<usize>,
}

/// One segment's integral by the main rule and by the companion rule (0 when not estimated).
pub(super) type Pair = (f64, f64);

/// A source of segment integrals.
pub(super) trait Segments: Sync {
    /// Whether [`Segments::segment`] needs the segment's index (costs a counting pass).
    const INDEXED: bool = false;
    /// Whether a row takes part.
    fn usable(&self, row: usize) -> bool;
    /// Integral from usable row `p` to usable row `r` of track `k` (rows `rows`); `seg` is the
    /// index of the segment in the node layout, `closing` marks the segment that closes a loop.
    fn segment(
        &self,
        k: usize,
        rows: &Range<usize>,
        p: usize,
        r: usize,
        seg: usize,
    ) -> Result<Pair>;
    /// Optional fast path: both rules' sums over the segments between consecutive rows of
    /// `first..end` (rows of the track `rows`), when every one of those rows is usable; the same
    /// as summing [`Segments::segment`] row by row (see the implementation for how exactly).
    /// None to take the slow path.
    fn run(&self, _rows: &Range<usize>, _first: usize, _end: usize) -> Option<Pair> {
        None
    }
}

/// How segments are laid out: jobs of rows, and the index of each job's first segment.
pub(super) struct Layout {
    pub(super) jobs: Vec<Job>,
    /// Last usable row of the job's track before the job's first row.
    pub(super) before: Vec<Option<usize>>,
    /// Index of the job's first segment (when counted).
    pub(super) first_seg: Vec<usize>,
    /// Per track: the closing segment's (index, last usable row, first usable row).
    pub(super) closing: Vec<Option<(usize, usize, usize)>>,
    /// All segments, closing ones included (when counted).
    pub(super) segments: usize,
}

pub(super) fn check_positions(x: &[f64], dim: usize) -> Result<usize> {
    if !(dim == 2 || dim == 3) || x.len() % dim != 0 {
        return Err(KernelError::Shape {
            argument: "positions",
            detail: format!("expected rows of 2 or 3 coordinates, got width {dim}"),
        });
    }
    Ok(x.len() / dim)
}

pub(super) fn finite_row(a: &[f64], width: usize, row: usize) -> bool {
    a[row * width..(row + 1) * width]
        .iter()
        .all(|v| v.is_finite())
}

/// Jobs, the row before each, and (when `count`) the index of every job's first segment; the
/// closing segments of closed tracks get indices after all the others.
pub(super) fn layout(
    offsets: &[usize],
    usable: &(impl Fn(usize) -> bool + Sync),
    closed: bool,
    count: bool,
) -> Layout {
    let jobs = plan_jobs(offsets, |_| false);
    let m = offsets.len() - 1;
    let per_job: Vec<(Option<usize>, usize)> = jobs
        .par_iter()
        .map(|j| {
            let start = offsets[j.track];
            let before = (start..j.rows.start).rev().find(|&i| usable(i));
            let mut segs = 0;
            if count {
                let mut has_prev = before.is_some();
                for r in j.rows.clone() {
                    if usable(r) {
                        segs += usize::from(has_prev);
                        has_prev = true;
                    }
                }
            }
            (before, segs)
        })
        .collect();
    let mut first_seg = Vec::with_capacity(jobs.len());
    let mut count = 0;
    for &(_, s) in &per_job {
        first_seg.push(count);
        count += s;
    }
    let closing: Vec<Option<(usize, usize, usize)>> = if closed {
        // A closing segment needs two distinct usable rows.
        let ends: Vec<Option<(usize, usize)>> = (0..m)
            .into_par_iter()
            .map(|k| {
                let rows = track_rows(offsets, k);
                let last = rows.clone().rev().find(|&i| usable(i))?;
                let first = rows.clone().find(|&i| usable(i))?;
                (first < last).then_some((last, first))
            })
            .collect();
        ends.into_iter()
            .map(|e| {
                e.map(|(last, first)| {
                    count += 1;
                    (count - 1, last, first)
                })
            })
            .collect()
    } else {
        vec![None; m]
    };
    Layout {
        jobs,
        before: per_job.into_iter().map(|(b, _)| b).collect(),
        first_seg,
        closing,
        segments: count,
    }
}

/// Integrate every track: parallel jobs, then per-track stitching of the cumulative sums.
pub(super) fn integrate<S: Segments>(
    s: &S,
    n: usize,
    offsets: &[usize],
    opts: &Options,
) -> Result<Integral> {
    let m = offsets.len() - 1;
    let usable = |i: usize| s.usable(i);
    let lay = layout(offsets, &usable, opts.closed, S::INDEXED);
    let mut cum = if opts.cumulative {
        try_filled(n, f64::NAN)?
    } else {
        Vec::new()
    };
    let parts: Vec<&mut [f64]> = if opts.cumulative {
        partition(&mut cum[..], lay.jobs.iter().map(|j| j.rows.len()))
    } else {
        (0..lay.jobs.len()).map(|_| Default::default()).collect()
    };
    // (main, companion, usable rows) of every job; the first error in row order wins.
    let sums: Vec<Result<(f64, f64, usize)>> = parts
        .into_par_iter()
        .zip(lay.jobs.par_iter().enumerate())
        .map(|(out, (ji, job))| {
            let rows = track_rows(offsets, job.track);
            let mut prev = lay.before[ji];
            if out.is_empty() && !S::INDEXED {
                let first = match prev {
                    None => Some(job.rows.start),
                    Some(p) if p + 1 == job.rows.start => Some(p),
                    Some(_) => None,
                };
                if let Some((a, b)) = first.and_then(|f| s.run(&rows, f, job.rows.end)) {
                    return Ok((a, b, job.rows.len()));
                }
            }
            let mut seg = lay.first_seg[ji];
            let (mut main, mut comp, mut used) = (0.0, 0.0, 0);
            for r in job.rows.clone() {
                if !s.usable(r) {
                    continue;
                }
                used += 1;
                if let Some(p) = prev {
                    let (a, b) = s.segment(job.track, &rows, p, r, seg)?;
                    main += a;
                    comp += b;
                    seg += 1;
                }
                if !out.is_empty() {
                    out[r - job.rows.start] = main;
                }
                prev = Some(r);
            }
            Ok((main, comp, used))
        })
        .collect();
    let mut total = vec![0.0; m];
    let mut companion = vec![0.0; m];
    let mut used = vec![0usize; m];
    let mut shift = Vec::with_capacity(lay.jobs.len());
    for (job, r) in lay.jobs.iter().zip(sums) {
        let (a, b, u) = r?;
        let k = job.track;
        shift.push(total[k]);
        total[k] += a;
        companion[k] += b;
        used[k] += u;
    }
    if opts.cumulative {
        let parts = partition(&mut cum[..], lay.jobs.iter().map(|j| j.rows.len()));
        parts
            .into_par_iter()
            .zip(shift.par_iter())
            .for_each(|(out, &sh)| {
                if sh != 0.0 {
                    out.iter_mut().for_each(|v| *v += sh);
                }
            });
    }
    let closing: Vec<Result<Option<Pair>>> = (0..m)
        .into_par_iter()
        .map(|k| match lay.closing[k] {
            Some((seg, last, first)) => s
                .segment(k, &track_rows(offsets, k), last, first, seg)
                .map(Some),
            None => Ok(None),
        })
        .collect();
    for (k, c) in closing.into_iter().enumerate() {
        if let Some((a, b)) = c? {
            total[k] += a;
            companion[k] += b;
        }
    }
    let mut error = vec![f64::NAN; m];
    for k in 0..m {
        if used[k] == 0 {
            total[k] = f64::NAN;
        } else if opts.estimate {
            error[k] = (total[k] - companion[k]).abs();
        }
    }
    let skipped = (0..m)
        .map(|k| offsets[k + 1] - offsets[k] - used[k])
        .collect();
    Ok(Integral {
        total,
        error,
        cumulative: cum,
        skipped,
    })
}

pub(super) fn checked_offsets(offsets: &[i64], n: usize, t: Option<&[f64]>) -> Result<Vec<usize>> {
    let off = batch::check_offsets(offsets, n)?;
    if let Some(t) = t {
        if t.len() != n {
            return Err(KernelError::Shape {
                argument: "t",
                detail: format!("has {} values but positions has {n} rows", t.len()),
            });
        }
        batch::check_times(t, &off, 1, "a line integral")?;
    }
    Ok(off)
}
