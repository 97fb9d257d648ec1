//! The callable protocol: [`segment_nodes`] hands out the quadrature nodes of every segment (to
//! a Python callable, say), [`from_values`] integrates the values that come back.

use super::driver::{
    check_positions, checked_offsets, finite_row, integrate, layout, Integral, Pair, Segments,
};
use super::gridded::Straight;
use super::options::{NodeRule, Options, MAX_NODES};
use crate::batch::{self, partition};
use crate::error::{try_filled, KernelError, Result};
use rayon::prelude::*;
use std::ops::Range;

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
    opts: &Options,
) -> Result<Nodes> {
    let n = check_positions(x, dim)?;
    let off = checked_offsets(offsets, n, t)?;
    let rule = NodeRule::new(opts.nodes, opts.estimate)?;
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
    opts: &Options,
) -> Result<Integral> {
    let n = check_positions(x, dim)?;
    let off = batch::check_offsets(offsets, n)?;
    let rule = NodeRule::new(opts.nodes, opts.estimate)?;
    let comps = opts.kind.comps(dim);
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
