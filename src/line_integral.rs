//! Line integrals along sampled paths: the work ∫ F·dr of a force and the scalar integral ∫ f ds,
//! per track, total or cumulative, with an error estimate from two rules of different order.
//!
//! Three ways to give the integrand:
//!
//! * [`sampled`]: values at the path's samples. The trapezoid rule integrates the linear
//!   interpolants of the force and of the path on each segment, (F₀ + F₁)/2 · (r₁ − r₀); the
//!   cubic rule interpolates both by the cubic through four neighbouring samples (centred on the
//!   segment, one-sided at the ends: P. E. Gill and G. F. Miller, *An algorithm for the
//!   integration of unequally spaced data*, Comput. J. 15 (1972) 80–83) and integrates their
//!   product exactly by 3-point Gauss–Legendre quadrature.
//! * [`gridded`]: a [`GridField`] interpolated at Gauss–Legendre nodes on the straight segments.
//! * [`segment_nodes`] then [`from_values`]: the nodes are handed out (to a Python callable, say),
//!   the values at them come back and are integrated.
//!
//! Rows whose position (or sampled value) is not finite are skipped: the path runs straight from
//! the previous usable row of the track to the next one. Work is cut into jobs of at most
//! [`batch::CHUNK`] rows that run in parallel; cumulative sums are stitched per track afterwards.

use crate::batch::{self, partition, plan_jobs, track_rows, Job};
use crate::error::{try_filled, KernelError, Result};
use crate::field::GridField;
use crate::piecewise::gauss_legendre;
use rayon::prelude::*;
use std::ops::Range;

/// What is integrated.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// ∫ F·dr of a vector field with the path's dimension.
    Work,
    /// ∫ f ds of a scalar field.
    Scalar,
}

/// Quadrature of sampled values.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Rule {
    /// Linear interpolants of path and values (second order).
    Trapezoid,
    /// Four-point cubic interpolants (Gill–Miller), product integrated exactly (fourth order).
    Cubic,
}

impl Rule {
    /// Parse `"trapezoid"` or `"cubic"`.
    pub fn parse(name: &str) -> Result<Self> {
        match name {
            "trapezoid" => Ok(Rule::Trapezoid),
            "cubic" => Ok(Rule::Cubic),
            other => Err(KernelError::Option {
                argument: "rule",
                detail: format!("expected \"trapezoid\" or \"cubic\", got {other:?}"),
            }),
        }
    }
}

/// Options shared by the integrals.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Options {
    /// Work or scalar integral.
    pub kind: Kind,
    /// Add the straight segment from the last usable row of each track back to its first.
    pub closed: bool,
    /// Also return the running integral at every row.
    pub cumulative: bool,
    /// Also evaluate the companion rule and report |main − companion| per track.
    pub estimate: bool,
    /// Name of the integrand argument, for messages.
    pub argument: &'static str,
}

impl Default for Options {
    fn default() -> Self {
        Options {
            kind: Kind::Work,
            closed: false,
            cumulative: false,
            estimate: true,
            argument: "force",
        }
    }
}

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

/// Gauss–Legendre nodes on [−1, 1] for the main rule and its companion, merged: weights are 0
/// where a rule has no node. The companion has one node fewer (two for a 1-node main rule).
#[derive(Debug, Clone, PartialEq)]
pub struct NodeRule {
    /// Abscissas on [−1, 1].
    pub xi: Vec<f64>,
    /// Weights of the main rule.
    pub main: Vec<f64>,
    /// Weights of the companion rule (empty when no estimate is asked for).
    pub companion: Vec<f64>,
}

/// Largest number of Gauss–Legendre nodes per segment.
pub const MAX_NODES: usize = 5;

impl NodeRule {
    /// `q`-node Gauss–Legendre (1 ≤ q ≤ [`MAX_NODES`]), with its companion when `estimate`.
    pub fn new(q: usize, estimate: bool) -> Result<Self> {
        if !(1..=MAX_NODES).contains(&q) {
            return Err(KernelError::Option {
                argument: "nodes",
                detail: format!(
                    "must be 1 to {MAX_NODES} Gauss–Legendre nodes per segment, got {q}"
                ),
            });
        }
        let (x, w) = gauss_legendre(q);
        let mut rule = NodeRule {
            xi: x.to_vec(),
            main: w.to_vec(),
            companion: Vec::new(),
        };
        if estimate {
            let (xc, wc) = gauss_legendre(if q == 1 { 2 } else { q - 1 });
            rule.companion = vec![0.0; q];
            for (&a, &b) in xc.iter().zip(wc) {
                rule.xi.push(a);
                rule.main.push(0.0);
                rule.companion.push(b);
            }
        }
        Ok(rule)
    }

    /// Nodes per segment.
    pub fn len(&self) -> usize {
        self.xi.len()
    }

    /// Never empty.
    pub fn is_empty(&self) -> bool {
        self.xi.is_empty()
    }
}

/// One segment's integral by the main rule and by the companion rule (0 when not estimated).
type Pair = (f64, f64);

/// A source of segment integrals.
trait Segments: Sync {
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
    /// Optional fast path: the main rule's sum over the segments between consecutive rows of
    /// `first..end`, when every one of those rows is usable and no companion is asked for;
    /// bitwise the same as summing [`Segments::segment`] row by row. None to take the slow path.
    fn run(&self, _first: usize, _end: usize) -> Option<f64> {
        None
    }
}

/// How segments are laid out: jobs of rows, and the index of each job's first segment.
struct Layout {
    jobs: Vec<Job>,
    /// Last usable row of the job's track before the job's first row.
    before: Vec<Option<usize>>,
    /// Index of the job's first segment (when counted).
    first_seg: Vec<usize>,
    /// Per track: the closing segment's (index, last usable row, first usable row).
    closing: Vec<Option<(usize, usize, usize)>>,
    /// All segments, closing ones included (when counted).
    segments: usize,
}

fn check_positions(x: &[f64], dim: usize) -> Result<usize> {
    if !(dim == 2 || dim == 3) || x.len() % dim != 0 {
        return Err(KernelError::Shape {
            argument: "positions",
            detail: format!("expected rows of 2 or 3 coordinates, got width {dim}"),
        });
    }
    Ok(x.len() / dim)
}

fn finite_row(a: &[f64], width: usize, row: usize) -> bool {
    a[row * width..(row + 1) * width]
        .iter()
        .all(|v| v.is_finite())
}

/// Jobs, the row before each, and (when `count`) the index of every job's first segment; the
/// closing segments of closed tracks get indices after all the others.
fn layout(
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
fn integrate<S: Segments>(s: &S, n: usize, offsets: &[usize], opts: &Options) -> Result<Integral> {
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
                if let Some(sum) = first.and_then(|f| s.run(f, job.rows.end)) {
                    return Ok((sum, 0.0, job.rows.len()));
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

// ------------------------------------------------------------------------------ sampled values

struct Sampled<'a> {
    x: &'a [f64],
    f: &'a [f64],
    dim: usize,
    comps: usize,
    /// Parameter of the cubic rule: the times, or None for the cumulative chord length.
    t: Option<&'a [f64]>,
    rule: Rule,
    kind: Kind,
    closed: bool,
    estimate: bool,
}

/// 3-point Gauss–Legendre on [0, 1]: (node, weight).
const GL3: [(f64, f64); 3] = [
    (0.112_701_665_379_258_3, 5.0 / 18.0),
    (0.5, 8.0 / 18.0),
    (0.887_298_334_620_741_7, 5.0 / 18.0),
];

impl Sampled<'_> {
    #[inline]
    fn xr(&self, row: usize) -> &[f64] {
        &self.x[row * self.dim..(row + 1) * self.dim]
    }

    #[inline]
    fn fr(&self, row: usize) -> &[f64] {
        &self.f[row * self.comps..(row + 1) * self.comps]
    }

    fn trapezoid(&self, p: usize, r: usize) -> f64 {
        let (xp, xr, fp, fr) = (self.xr(p), self.xr(r), self.fr(p), self.fr(r));
        match self.kind {
            Kind::Work => (0..self.dim)
                .map(|c| 0.5 * (fp[c] + fr[c]) * (xr[c] - xp[c]))
                .sum(),
            Kind::Scalar => 0.5 * (fp[0] + fr[0]) * dist(xp, xr),
        }
    }

    /// Next usable row after `row` in the track (wrapping on closed paths); with the chord-length
    /// parameter, rows at the same point are passed over (their parameter would repeat).
    fn step(&self, rows: &Range<usize>, row: usize, forward: bool) -> Option<usize> {
        let mut i = row;
        for _ in 1..rows.len() {
            i = if forward {
                if i + 1 == rows.end {
                    if !self.closed {
                        return None;
                    }
                    rows.start
                } else {
                    i + 1
                }
            } else if i == rows.start {
                if !self.closed {
                    return None;
                }
                rows.end - 1
            } else {
                i - 1
            };
            if self.usable(i) && (self.t.is_some() || self.xr(i) != self.xr(row)) {
                return Some(i);
            }
        }
        None
    }

    /// Parameter step from row `a` to row `b` (consecutive stencil nodes).
    fn du(&self, a: usize, b: usize) -> f64 {
        match self.t {
            Some(t) => t[b] - t[a],
            None => dist(self.xr(a), self.xr(b)),
        }
    }

    fn cubic(&self, rows: &Range<usize>, p: usize, r: usize) -> f64 {
        if self.t.is_none() && self.xr(p) == self.xr(r) {
            return 0.0; // no length, and no chord-length parameter step
        }
        let l1 = self.step(rows, p, false);
        let r1 = self.step(rows, r, true);
        // Stencil rows in parameter order and the position of p among them.
        let mut nodes = [0usize; 4];
        let (k, at) = match (l1, r1) {
            (Some(a), Some(b)) => {
                nodes = [a, p, r, b];
                (4, 1)
            }
            (None, Some(b)) => match self.step(rows, b, true) {
                Some(c) => {
                    nodes = [p, r, b, c];
                    (4, 0)
                }
                None => {
                    nodes[..3].copy_from_slice(&[p, r, b]);
                    (3, 0)
                }
            },
            (Some(a), None) => match self.step(rows, a, false) {
                Some(z) => {
                    nodes = [z, a, p, r];
                    (4, 2)
                }
                None => {
                    nodes[..3].copy_from_slice(&[a, p, r]);
                    (3, 1)
                }
            },
            (None, None) => return self.trapezoid(p, r),
        };
        // Parameter values relative to p.
        let mut u = [0.0; 4];
        for j in (0..at).rev() {
            u[j] = u[j + 1] - self.du(nodes[j], nodes[j + 1]);
        }
        for j in at + 1..k {
            u[j] = u[j - 1] + self.du(nodes[j - 1], nodes[j]);
        }
        // Monomorphized on stencil size, coordinates and components so the loops unroll.
        match (k, self.dim, self.comps) {
            (4, 3, 3) => self.stencil::<4, 3, 3>(&nodes, &u, at),
            (4, 3, _) => self.stencil::<4, 3, 1>(&nodes, &u, at),
            (4, _, 2) => self.stencil::<4, 2, 2>(&nodes, &u, at),
            (4, _, _) => self.stencil::<4, 2, 1>(&nodes, &u, at),
            (_, 3, 3) => self.stencil::<3, 3, 3>(&nodes, &u, at),
            (_, 3, _) => self.stencil::<3, 3, 1>(&nodes, &u, at),
            (_, _, 2) => self.stencil::<3, 2, 2>(&nodes, &u, at),
            _ => self.stencil::<3, 2, 1>(&nodes, &u, at),
        }
    }

    /// The integral from stencil node `at` (row p, parameter 0) to the next of the product of the
    /// degree-(K − 1) Lagrange interpolants through the stencil, by 3-point Gauss–Legendre.
    #[inline(always)]
    fn stencil<const K: usize, const D: usize, const C: usize>(
        &self,
        nodes: &[usize; 4],
        u: &[f64; 4],
        at: usize,
    ) -> f64 {
        let p = nodes[at];
        let h = u[at + 1];
        if h.is_nan() || h <= 0.0 {
            return f64::NAN; // cannot happen with checked times and distinct points
        }
        // The stencil as differences from row p, which keeps the rounding relative to the local
        // variation (and makes constants exact).
        let (xp, fp) = (self.xr(p), self.fr(p));
        let (mut dx, mut df) = ([[0.0; D]; K], [[0.0; C]; K]);
        // Normalizations 1 / Π_{l≠j} (u_j − u_l) of the Lagrange basis.
        let mut norm = [1.0; K];
        for j in 0..K {
            let (xj, fj) = (self.xr(nodes[j]), self.fr(nodes[j]));
            for a in 0..D {
                dx[j][a] = xj[a] - xp[a];
            }
            for a in 0..C {
                df[j][a] = fj[a] - fp[a];
            }
            for l in 0..K {
                if l != j {
                    norm[j] *= u[j] - u[l];
                }
            }
            norm[j] = 1.0 / norm[j];
        }
        let mut sum = 0.0;
        for &(s01, w) in &GL3 {
            let s = u[at] + s01 * h;
            let mut e = [0.0; K];
            for l in 0..K {
                e[l] = s - u[l];
            }
            // L_j(s) = norm_j Π_{l≠j} e_l and its derivative, by the product rule factor by factor.
            let (mut lv, mut ld) = ([0.0; K], [0.0; K]);
            for j in 0..K {
                let (mut v, mut dv) = (norm[j], 0.0);
                for l in 0..K {
                    if l != j {
                        dv = dv * e[l] + v;
                        v *= e[l];
                    }
                }
                lv[j] = v;
                ld[j] = dv;
            }
            let (mut value, mut slope) = ([0.0; C], [0.0; D]);
            for a in 0..C {
                value[a] = fp[a] + (0..K).map(|j| lv[j] * df[j][a]).sum::<f64>();
            }
            for a in 0..D {
                slope[a] = (0..K).map(|j| ld[j] * dx[j][a]).sum::<f64>();
            }
            let g = if C == D {
                (0..D).map(|a| value[a] * slope[a]).sum::<f64>()
            } else {
                value[0] * (0..D).map(|a| slope[a] * slope[a]).sum::<f64>().sqrt()
            };
            sum += w * g;
        }
        sum * h
    }
}

#[inline]
fn dist(a: &[f64], b: &[f64]) -> f64 {
    a.iter()
        .zip(b)
        .map(|(p, q)| (q - p) * (q - p))
        .sum::<f64>()
        .sqrt()
}

impl Segments for Sampled<'_> {
    #[inline]
    fn usable(&self, row: usize) -> bool {
        finite_row(self.x, self.dim, row) && finite_row(self.f, self.comps, row)
    }

    fn segment(
        &self,
        _k: usize,
        rows: &Range<usize>,
        p: usize,
        r: usize,
        _seg: usize,
    ) -> Result<Pair> {
        let main = match self.rule {
            Rule::Trapezoid => self.trapezoid(p, r),
            Rule::Cubic => self.cubic(rows, p, r),
        };
        let other = if !self.estimate {
            0.0
        } else {
            match self.rule {
                Rule::Trapezoid => self.cubic(rows, p, r),
                Rule::Cubic => self.trapezoid(p, r),
            }
        };
        Ok((main, other))
    }

    fn run(&self, first: usize, end: usize) -> Option<f64> {
        if self.rule != Rule::Trapezoid || self.estimate || self.kind != Kind::Work {
            return None;
        }
        let d = self.dim;
        let (xs, fs) = (&self.x[first * d..end * d], &self.f[first * d..end * d]);
        let sum = match d {
            3 => trapezoid_run::<3>(xs, fs),
            _ => trapezoid_run::<2>(xs, fs),
        };
        // A non-finite value anywhere makes its term, hence the sum, non-finite (NaN or ±∞ in a
        // sum, difference or product with it). So a finite sum proves every row usable; else
        // the slow path skips the bad rows (or finds the same overflow).
        sum.is_finite().then_some(sum)
    }
}

/// Σ over consecutive rows of (F₀ + F₁)/2 · (r₁ − r₀), in the order and with the arithmetic of
/// [`Sampled::trapezoid`].
fn trapezoid_run<const D: usize>(x: &[f64], f: &[f64]) -> f64 {
    let mut rows = x.chunks_exact(D).zip(f.chunks_exact(D));
    let Some((mut xp, mut fp)) = rows.next() else {
        return 0.0;
    };
    let mut sum = 0.0;
    for (xr, fr) in rows {
        sum += (0..D)
            .map(|c| 0.5 * (fp[c] + fr[c]) * (xr[c] - xp[c]))
            .sum::<f64>();
        (xp, fp) = (xr, fr);
    }
    sum
}

fn comps_of(kind: Kind, dim: usize) -> usize {
    match kind {
        Kind::Work => dim,
        Kind::Scalar => 1,
    }
}

fn checked_offsets(offsets: &[i64], n: usize, t: Option<&[f64]>) -> Result<Vec<usize>> {
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

/// Line integral of values sampled at the path's rows (`f`: `dim` values per row for
/// [`Kind::Work`], one for [`Kind::Scalar`]).
///
/// The cubic rule's interpolation parameter is `t` when given (and the path is open), otherwise
/// the cumulative chord length (fourth-order as well: M. S. Floater, *Chordal cubic spline
/// interpolation is fourth-order accurate*, IMA J. Numer. Anal. 26 (2006) 25–33). On closed
/// paths the stencils wrap around the loop.
///
/// # Examples
///
/// Constant gravity does work −m g Δz on any path (conservative force):
///
/// ```
/// use osculate::line_integral::{sampled, Options, Rule};
/// let x = [0.0, 0.0, 10.0, 3.0, 1.0, 7.0, -2.0, 5.0, 4.0, 1.0, 1.0, 2.5];
/// let g = [0.0, 0.0, -9.80665].repeat(4);
/// let w = sampled(&x, 3, &g, &[0, 4], None, Rule::Cubic, &Options::default()).unwrap();
/// assert!((w.total[0] - (-9.80665 * (2.5 - 10.0))).abs() < 1e-12);
/// assert!(w.error[0] < 1e-12); // both rules are exact here
/// ```
pub fn sampled(
    x: &[f64],
    dim: usize,
    f: &[f64],
    offsets: &[i64],
    t: Option<&[f64]>,
    rule: Rule,
    opts: &Options,
) -> Result<Integral> {
    let n = check_positions(x, dim)?;
    let comps = comps_of(opts.kind, dim);
    if f.len() != n * comps {
        return Err(KernelError::Shape {
            argument: opts.argument,
            detail: format!(
                "expected {n} rows of {comps} value(s), got {} values",
                f.len()
            ),
        });
    }
    let off = checked_offsets(offsets, n, t)?;
    let s = Sampled {
        x,
        f,
        dim,
        comps,
        t: if opts.closed { None } else { t },
        rule,
        kind: opts.kind,
        closed: opts.closed,
        estimate: opts.estimate,
    };
    integrate(&s, n, &off, opts)
}

// ------------------------------------------------------------------------------ nodes on segments

/// Straight segments between usable (finite) rows, with Gauss–Legendre nodes.
struct Straight<'a> {
    x: &'a [f64],
    dim: usize,
    rule: &'a NodeRule,
    kind: Kind,
}

impl Straight<'_> {
    /// Node `q` of the segment p → r into `out`, and the segment's vector.
    #[inline]
    fn node(&self, p: usize, r: usize, q: usize, out: &mut [f64]) {
        let a = 0.5 * (1.0 + self.rule.xi[q]);
        let (xp, xr) = (
            &self.x[p * self.dim..(p + 1) * self.dim],
            &self.x[r * self.dim..(r + 1) * self.dim],
        );
        for c in 0..self.dim {
            out[c] = xp[c] + a * (xr[c] - xp[c]);
        }
    }

    /// Sum over the nodes of `value(q)` paired with the segment by the two rules.
    #[inline]
    fn sum(
        &self,
        p: usize,
        r: usize,
        mut value: impl FnMut(usize, &mut [f64]) -> Result<()>,
    ) -> Result<Pair> {
        let d = self.dim;
        let mut dx = [0.0; 3];
        for c in 0..d {
            dx[c] = self.x[r * d + c] - self.x[p * d + c];
        }
        let len = dx[..d].iter().map(|v| v * v).sum::<f64>().sqrt();
        let (mut main, mut comp) = (0.0, 0.0);
        let mut v = [0.0; 3];
        for q in 0..self.rule.len() {
            value(q, &mut v)?;
            let g = match self.kind {
                Kind::Work => (0..d).map(|c| v[c] * dx[c]).sum::<f64>(),
                Kind::Scalar => v[0] * len,
            };
            main += 0.5 * self.rule.main[q] * g;
            if !self.rule.companion.is_empty() {
                comp += 0.5 * self.rule.companion[q] * g;
            }
        }
        Ok((main, comp))
    }
}

struct Gridded<'a> {
    line: Straight<'a>,
    field: &'a GridField<'a>,
    argument: &'static str,
}

impl Segments for Gridded<'_> {
    #[inline]
    fn usable(&self, row: usize) -> bool {
        finite_row(self.line.x, self.line.dim, row)
    }

    fn segment(
        &self,
        k: usize,
        _rows: &Range<usize>,
        p: usize,
        r: usize,
        _seg: usize,
    ) -> Result<Pair> {
        let mut pt = [0.0; 3];
        self.line.sum(p, r, |q, v| {
            self.line.node(p, r, q, &mut pt);
            if self.field.eval(&pt, v) {
                return Ok(());
            }
            // Name the first sample outside (the box is convex, so p or r is).
            let d = self.line.dim;
            let xp = &self.line.x[p * d..(p + 1) * d];
            let row = if self.field.contains(xp) { r } else { p };
            Err(self.field.outside_error(
                self.argument,
                k,
                row,
                &self.line.x[row * d..(row + 1) * d],
            ))
        })
    }
}

/// Line integral of a gridded field along the straight segments between the samples, by
/// `nodes`-point Gauss–Legendre quadrature on each segment (bi/trilinear interpolation at the
/// nodes). The companion rule has one node fewer (two for `nodes = 1`). Times, when given, are
/// only checked (the field does not depend on time).
pub fn gridded(
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    t: Option<&[f64]>,
    field: &GridField,
    nodes: usize,
    opts: &Options,
) -> Result<Integral> {
    let n = check_positions(x, dim)?;
    let comps = comps_of(opts.kind, dim);
    if field.ndim() != dim {
        return Err(KernelError::Shape {
            argument: opts.argument,
            detail: format!(
                "the grid has {} axes but the path has {dim} coordinates",
                field.ndim()
            ),
        });
    }
    if field.comps() != comps {
        return Err(KernelError::Shape {
            argument: opts.argument,
            detail: match opts.kind {
                Kind::Work => format!(
                    "work needs {dim} components per grid node, the grid has {}",
                    field.comps()
                ),
                Kind::Scalar => format!(
                    "a scalar integral needs 1 value per grid node, the grid has {}",
                    field.comps()
                ),
            },
        });
    }
    let off = checked_offsets(offsets, n, t)?;
    let rule = NodeRule::new(nodes, opts.estimate)?;
    let g = Gridded {
        line: Straight {
            x,
            dim,
            rule: &rule,
            kind: opts.kind,
        },
        field,
        argument: opts.argument,
    };
    integrate(&g, n, &off, opts)
}

/// Quadrature nodes of every segment, to be evaluated elsewhere (e.g. by a Python callable).
#[derive(Debug, Clone, PartialEq)]
pub struct Nodes {
    /// Node positions, `dim` per node; segment `s` holds nodes `s·per_segment ..`.
    pub points: Vec<f64>,
    /// Node times (linear in time along each segment), when times were given.
    pub times: Option<Vec<f64>>,
    /// Nodes per segment.
    pub per_segment: usize,
}

/// The nodes at which [`from_values`] expects values: segments in row order, track by track,
/// then the closing segments of closed paths, one per track with at least two usable rows.
/// Node times (when `t` is given) are linear along each segment, NaN on closing segments.
pub fn segment_nodes(
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    t: Option<&[f64]>,
    nodes: usize,
    opts: &Options,
) -> Result<Nodes> {
    let n = check_positions(x, dim)?;
    let off = checked_offsets(offsets, n, t)?;
    let rule = NodeRule::new(nodes, opts.estimate)?;
    let q = rule.len();
    let usable = |i: usize| finite_row(x, dim, i);
    let lay = layout(&off, &usable, opts.closed, true);
    let mut points = try_filled(lay.segments * q * dim, 0.0)?;
    let mut times = match t {
        Some(_) => Some(try_filled(lay.segments * q, 0.0)?),
        None => None,
    };
    let line = Straight {
        x,
        dim,
        rule: &rule,
        kind: opts.kind,
    };
    let n_regular = lay.first_seg.last().map_or(0, |_| {
        lay.segments - lay.closing.iter().filter(|c| c.is_some()).count()
    });
    let job_segs = |ji: usize| {
        let next = lay.first_seg.get(ji + 1).copied().unwrap_or(n_regular);
        next - lay.first_seg[ji]
    };
    let fill = |pts: &mut [f64], tms: &mut [f64], p: usize, r: usize| {
        for j in 0..q {
            line.node(p, r, j, &mut pts[j * dim..(j + 1) * dim]);
            if let Some(t) = t {
                tms[j] = t[p] + 0.5 * (1.0 + rule.xi[j]) * (t[r] - t[p]);
            }
        }
    };
    let pts_parts = partition(
        &mut points[..],
        (0..lay.jobs.len()).map(|j| job_segs(j) * q * dim),
    );
    let tm_parts: Vec<&mut [f64]> = match times.as_mut() {
        Some(tm) => partition(&mut tm[..], (0..lay.jobs.len()).map(|j| job_segs(j) * q)),
        None => (0..lay.jobs.len()).map(|_| Default::default()).collect(),
    };
    pts_parts
        .into_par_iter()
        .zip(tm_parts)
        .zip(lay.jobs.par_iter().enumerate())
        .for_each(|((pts, tms), (ji, job))| {
            let mut prev = lay.before[ji];
            let mut s = 0;
            for r in job.rows.clone() {
                if !usable(r) {
                    continue;
                }
                if let Some(p) = prev {
                    let tm = if tms.is_empty() {
                        &mut [][..]
                    } else {
                        &mut tms[s * q..(s + 1) * q]
                    };
                    fill(&mut pts[s * q * dim..(s + 1) * q * dim], tm, p, r);
                    s += 1;
                }
                prev = Some(r);
            }
        });
    for &(seg, last, first) in lay.closing.iter().flatten() {
        let mut tm = [0.0; 2 * MAX_NODES];
        fill(
            &mut points[seg * q * dim..(seg + 1) * q * dim],
            &mut tm[..q],
            last,
            first,
        );
        if let Some(times) = times.as_mut() {
            // The closing segment is not travelled in time.
            times[seg * q..(seg + 1) * q].fill(f64::NAN);
        }
    }
    Ok(Nodes {
        points,
        times,
        per_segment: q,
    })
}

struct Valued<'a> {
    line: Straight<'a>,
    values: &'a [f64],
    comps: usize,
    argument: &'static str,
}

impl Segments for Valued<'_> {
    const INDEXED: bool = true;

    #[inline]
    fn usable(&self, row: usize) -> bool {
        finite_row(self.line.x, self.line.dim, row)
    }

    fn segment(
        &self,
        k: usize,
        _rows: &Range<usize>,
        p: usize,
        r: usize,
        seg: usize,
    ) -> Result<Pair> {
        let q = self.line.rule.len();
        let c = self.comps;
        self.line.sum(p, r, |j, v| {
            let node = seg * q + j;
            let val = &self.values[node * c..(node + 1) * c];
            if val.iter().all(|a| a.is_finite()) {
                v[..c].copy_from_slice(val);
                return Ok(());
            }
            Err(KernelError::Row {
                argument: self.argument,
                track: k,
                row: p,
                detail: format!(
                    "returned a non-finite value {val:?} at node {node} (on the segment from this \
                     row to row {r})"
                ),
            })
        })
    }
}

/// Line integral from values at the nodes of [`segment_nodes`] (called with the same arguments).
pub fn from_values(
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    values: &[f64],
    nodes: usize,
    opts: &Options,
) -> Result<Integral> {
    let n = check_positions(x, dim)?;
    let off = batch::check_offsets(offsets, n)?;
    let rule = NodeRule::new(nodes, opts.estimate)?;
    let comps = comps_of(opts.kind, dim);
    let v = Valued {
        line: Straight {
            x,
            dim,
            rule: &rule,
            kind: opts.kind,
        },
        values,
        comps,
        argument: opts.argument,
    };
    // The layout must be the one the nodes were made with.
    let lay = layout(&off, &|i| v.usable(i), opts.closed, true);
    let expected = lay.segments * rule.len() * comps;
    if values.len() != expected {
        return Err(KernelError::Shape {
            argument: opts.argument,
            detail: format!(
                "expected {} nodes × {comps} value(s) = {expected} values, got {}",
                lay.segments * rule.len(),
                values.len()
            ),
        });
    }
    integrate(&v, n, &off, opts)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::field::Outside;
    use approx::assert_relative_eq;
    use std::f64::consts::PI;

    const G: f64 = 9.80665;

    /// A deterministic wandering 3-D path (xorshift steps).
    fn wander(n: usize, seed: u64) -> Vec<f64> {
        let mut s = seed;
        let mut next = || {
            s ^= s << 13;
            s ^= s >> 7;
            s ^= s << 17;
            (s >> 11) as f64 / (1u64 << 53) as f64 - 0.5
        };
        let mut x = vec![0.0; 3 * n];
        for i in 1..n {
            for c in 0..3 {
                x[3 * i + c] = x[3 * (i - 1) + c] + next();
            }
        }
        x
    }

    fn circle(n: usize, r: f64) -> Vec<f64> {
        (0..n)
            .flat_map(|i| {
                let a = 2.0 * PI * i as f64 / n as f64;
                [r * a.cos(), r * a.sin()]
            })
            .collect()
    }

    fn opts(kind: Kind, closed: bool, cumulative: bool) -> Options {
        Options {
            kind,
            closed,
            cumulative,
            ..Options::default()
        }
    }

    #[test]
    fn gravity_work_is_path_independent() {
        // W = −m g Δz for a constant force, exactly (conservative field); 1e-12 relative.
        let n = 3 * batch::CHUNK + 17; // several parallel jobs
        let x = wander(n, 7);
        let f = [0.0, 0.0, -G].repeat(n);
        let dz = x[3 * n - 1] - x[2];
        let exact = -G * dz;
        for rule in [Rule::Trapezoid, Rule::Cubic] {
            let w = sampled(
                &x,
                3,
                &f,
                &[0, n as i64],
                None,
                rule,
                &opts(Kind::Work, false, true),
            )
            .unwrap();
            assert_relative_eq!(w.total[0], exact, max_relative = 1e-12);
            assert_eq!(w.cumulative[n - 1], w.total[0]);
            assert_relative_eq!(
                w.cumulative[1000],
                -G * (x[3 * 1000 + 2] - x[2]),
                epsilon = 1e-9
            );
        }
        let v = [0.0, 0.0, -G].repeat(8);
        let grid =
            GridField::new(&v, &[2, 2, 2], 3, &[-1e3; 3], &[2e3; 3], Outside::Error).unwrap();
        let w = gridded(
            &x,
            3,
            &[0, n as i64],
            None,
            &grid,
            2,
            &opts(Kind::Work, false, false),
        )
        .unwrap();
        assert_relative_eq!(w.total[0], exact, max_relative = 1e-12);
    }

    #[test]
    fn circulation_of_rotation_field_converges_at_each_rules_order() {
        // F = (−y, x): ∮ F·dr = 2 π r² (Stokes' theorem, curl F = 2). Trapezoid on the inscribed
        // polygon: n r² sin(2π/n) exactly (twice the polygon's area), an O(h²) error; the cubic
        // rule converges as h⁴ (observed order within 0.3 of 4).
        let r = 1.5;
        let exact = 2.0 * PI * r * r;
        let mut errs = Vec::new();
        for n in [16usize, 32, 64] {
            let x = circle(n, r);
            let f: Vec<f64> = x.chunks(2).flat_map(|p| [-p[1], p[0]]).collect();
            let o = opts(Kind::Work, true, false);
            let trap = sampled(&x, 2, &f, &[0, n as i64], None, Rule::Trapezoid, &o).unwrap();
            let polygon = n as f64 * r * r * (2.0 * PI / n as f64).sin();
            assert_relative_eq!(trap.total[0], polygon, max_relative = 1e-13);
            let cub = sampled(&x, 2, &f, &[0, n as i64], None, Rule::Cubic, &o).unwrap();
            errs.push((cub.total[0] - exact).abs());
            // The estimate is the difference of the two rules.
            assert_relative_eq!(
                cub.error[0],
                (cub.total[0] - polygon).abs(),
                max_relative = 1e-9
            );
        }
        for w in errs.windows(2) {
            let order = (w[0] / w[1]).log2();
            assert!((order - 4.0).abs() < 0.3, "observed order {order}");
        }
    }

    #[test]
    fn cubic_is_exact_for_cubic_paths_and_forces_in_time() {
        // r(t) = (t, t², t³), F(t) = (1 + t, t², 2 − t³) on uneven times. With the time as
        // parameter the four-point interpolants are exact, and F·r′ has degree 5, so the rule is
        // exact (to rounding, 1e-13): the closed form below.
        let t: Vec<f64> = [0.0, 0.1, 0.35, 0.5, 0.9, 1.0, 1.45, 1.7, 2.0].to_vec();
        let x: Vec<f64> = t.iter().flat_map(|&s| [s, s * s, s * s * s]).collect();
        let f: Vec<f64> = t
            .iter()
            .flat_map(|&s| [1.0 + s, s * s, 2.0 - s * s * s])
            .collect();
        // F·r′ = (1 + t) + 2t³ + (2 − t³)·3t² = 1 + t + 2t³ + 6t² − 3t⁵.
        let b: f64 = 2.0;
        let exact = b + b * b / 2.0 + b.powi(4) / 2.0 + 2.0 * b.powi(3) - b.powi(6) / 2.0;
        let n = t.len() as i64;
        let w = sampled(
            &x,
            3,
            &f,
            &[0, n],
            Some(&t),
            Rule::Cubic,
            &opts(Kind::Work, false, false),
        )
        .unwrap();
        assert_relative_eq!(w.total[0], exact, max_relative = 1e-13);
    }

    #[test]
    fn scalar_integral_of_one_is_length() {
        // ∫ 1 ds on straight segments is the polyline length (arclength::polyline, 1e-14).
        let n = 500;
        let x = wander(n, 3);
        let one = vec![1.0; n];
        let w = sampled(
            &x,
            3,
            &one,
            &[0, 200, n as i64],
            None,
            Rule::Trapezoid,
            &opts(Kind::Scalar, false, true),
        )
        .unwrap();
        let s = crate::arclength::polyline(&x, 3, &[0, 200, n as i64]).unwrap();
        assert_relative_eq!(w.total[0], s[199], max_relative = 1e-14);
        assert_relative_eq!(w.total[1], s[n - 1], max_relative = 1e-14);
        for i in [0, 50, 199, 200, 201, 499] {
            assert_relative_eq!(w.cumulative[i], s[i], max_relative = 1e-13);
        }
    }

    #[test]
    fn nan_rows_are_skipped_and_bridged() {
        // Skipping row 2 equals integrating the path without it.
        let x = [0.0, 0.0, 1.0, 0.5, f64::NAN, 9.0, 3.0, 1.0, 4.0, 3.0];
        let f = [1.0, 2.0, 0.5, 1.0, 7.0, 7.0, -1.0, 0.0, 2.0, 2.0];
        let keep = [0.0, 0.0, 1.0, 0.5, 3.0, 1.0, 4.0, 3.0];
        let fk = [1.0, 2.0, 0.5, 1.0, -1.0, 0.0, 2.0, 2.0];
        for rule in [Rule::Trapezoid, Rule::Cubic] {
            let a = sampled(
                &x,
                2,
                &f,
                &[0, 5],
                None,
                rule,
                &opts(Kind::Work, false, true),
            )
            .unwrap();
            let b = sampled(
                &keep,
                2,
                &fk,
                &[0, 4],
                None,
                rule,
                &opts(Kind::Work, false, true),
            )
            .unwrap();
            assert_eq!(a.total, b.total);
            assert_eq!(a.skipped, vec![1]);
            assert!(a.cumulative[2].is_nan());
            assert_eq!(a.cumulative[4], b.cumulative[3]);
        }
        // A NaN force skips the row too; a track without a usable row has a NaN total.
        let mut f2 = f;
        f2[1] = f64::NAN;
        let a = sampled(
            &x,
            2,
            &f2,
            &[0, 1, 5],
            None,
            Rule::Cubic,
            &opts(Kind::Work, false, false),
        )
        .unwrap();
        assert!(a.total[0].is_nan());
        assert_eq!(a.skipped, vec![1, 1]);
    }

    #[test]
    fn reversal_negates_and_splitting_adds() {
        let n = 300;
        let x = wander(n, 11);
        let f: Vec<f64> = x
            .chunks(3)
            .flat_map(|p| [p[1].sin(), p[2] * p[0], 1.0 + p[0]])
            .collect();
        let o = opts(Kind::Work, false, false);
        let rev = |a: &[f64]| -> Vec<f64> { a.chunks(3).rev().flatten().copied().collect() };
        let whole = sampled(&x, 3, &f, &[0, n as i64], None, Rule::Trapezoid, &o).unwrap();
        let back = sampled(
            &rev(&x),
            3,
            &rev(&f),
            &[0, n as i64],
            None,
            Rule::Trapezoid,
            &o,
        )
        .unwrap();
        assert_relative_eq!(back.total[0], -whole.total[0], max_relative = 1e-12);
        // Splitting at row 120 (the sample shared by both pieces).
        let a = sampled(
            &x[..3 * 121],
            3,
            &f[..3 * 121],
            &[0, 121],
            None,
            Rule::Trapezoid,
            &o,
        )
        .unwrap();
        let b = sampled(
            &x[3 * 120..],
            3,
            &f[3 * 120..],
            &[0, (n - 120) as i64],
            None,
            Rule::Trapezoid,
            &o,
        )
        .unwrap();
        assert_relative_eq!(
            a.total[0] + b.total[0],
            whole.total[0],
            max_relative = 1e-12
        );
    }

    #[test]
    fn node_values_give_the_grid_result() {
        // Evaluating the grid at the handed-out nodes and integrating the values is the grid
        // integral (same nodes, same sums): equal to 1e-14.
        let shape = [5usize, 6];
        let v: Vec<f64> = (0..30 * 2).map(|i| (0.3 * i as f64).cos()).collect();
        let grid = GridField::new(&v, &shape, 2, &[0.0, 0.0], &[1.0, 1.0], Outside::Error).unwrap();
        let x = [
            0.5,
            0.5,
            1.2,
            3.3,
            3.9,
            4.1,
            3.0,
            0.2,
            f64::NAN,
            1.0,
            1.0,
            1.0,
        ];
        let off = [0, 4, 6];
        for closed in [false, true] {
            let o = opts(Kind::Work, closed, true);
            let direct = gridded(&x, 2, &off, None, &grid, 3, &o).unwrap();
            let nodes = segment_nodes(&x, 2, &off, None, 3, &o).unwrap();
            let vals = grid.eval_points(&nodes.points, 2).unwrap();
            let via = from_values(&x, 2, &off, &vals, 3, &o).unwrap();
            for k in 0..2 {
                assert_relative_eq!(via.total[k], direct.total[k], max_relative = 1e-14);
                assert_relative_eq!(
                    via.error[k],
                    direct.error[k],
                    max_relative = 1e-12,
                    epsilon = 1e-15
                );
            }
            assert_eq!(direct.skipped, vec![0, 1]);
            // Track 1 holds one usable row: no segment, total 0.
            assert_eq!(direct.total[1], 0.0);
        }
        let bad = from_values(&x, 2, &off, &[1.0; 4], 3, &opts(Kind::Work, false, false));
        assert!(bad.unwrap_err().to_string().contains("expected 15 nodes"));
    }

    #[test]
    fn leaving_the_grid_names_the_sample() {
        let v = [1.0; 8];
        let grid =
            GridField::new(&v, &[2, 2], 2, &[0.0, 0.0], &[1.0, 1.0], Outside::Error).unwrap();
        let x = [0.1, 0.1, 0.5, 0.5, 1.5, 0.5, 0.2, 0.2];
        let err = gridded(&x, 2, &[0, 1, 4], None, &grid, 2, &Options::default()).unwrap_err();
        assert_eq!((err.track(), err.row()), (Some(1), Some(2)));
        let nan = GridField::new(&v, &[2, 2], 2, &[0.0, 0.0], &[1.0, 1.0], Outside::Nan).unwrap();
        let w = gridded(&x, 2, &[0, 1, 4], None, &nan, 2, &Options::default()).unwrap();
        assert!(w.total[1].is_nan() && w.total[0] == 0.0);
    }

    #[test]
    fn non_finite_node_value_is_reported() {
        let x = [0.0, 0.0, 1.0, 0.0, 2.0, 0.0];
        let o = Options::default();
        let nodes = segment_nodes(&x, 2, &[0, 3], None, 2, &o).unwrap();
        let mut vals = vec![1.0; nodes.points.len()];
        vals[2 * 3 + 1] = f64::NAN; // node 3 = second segment
        let err = from_values(&x, 2, &[0, 3], &vals, 2, &o).unwrap_err();
        assert_eq!(err.row(), Some(1));
        assert!(err.to_string().contains("node 3"));
    }

    #[test]
    fn fast_path_is_bitwise_the_generic_sum() {
        // Totals without cumulative output take the trapezoid fast path; with it, the generic
        // row-by-row loop: identical bits, also across job boundaries and a NaN row.
        let n = 2 * batch::CHUNK + 101;
        let mut x = wander(n, 5);
        let f: Vec<f64> = x.iter().map(|v| (0.3 * v).sin()).collect();
        let o = |cumulative| Options {
            estimate: false,
            ..opts(Kind::Work, false, cumulative)
        };
        for _ in 0..2 {
            let off = [0, 777, n as i64];
            let fast = sampled(&x, 3, &f, &off, None, Rule::Trapezoid, &o(false)).unwrap();
            let slow = sampled(&x, 3, &f, &off, None, Rule::Trapezoid, &o(true)).unwrap();
            assert_eq!(fast.total, slow.total);
            x[3 * (batch::CHUNK + 5)] = f64::NAN; // second round: a job with a skipped row
        }
    }

    #[test]
    fn node_rule_pairs() {
        let r = NodeRule::new(2, true).unwrap();
        assert_eq!(r.len(), 3);
        assert_relative_eq!(r.main.iter().sum::<f64>(), 2.0, epsilon = 1e-15);
        assert_relative_eq!(r.companion.iter().sum::<f64>(), 2.0, epsilon = 1e-15);
        assert_eq!(NodeRule::new(1, true).unwrap().len(), 3);
        assert_eq!(NodeRule::new(4, false).unwrap().len(), 4);
        assert!(NodeRule::new(0, true).is_err() && NodeRule::new(6, true).is_err());
    }
}
