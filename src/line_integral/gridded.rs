//! Gridded fields: a [`GridField`] interpolated at Gauss–Legendre nodes on the straight segments
//! between the samples, and the straight-segment quadrature that the callable protocol shares.

use super::driver::{
    check_positions, checked_offsets, finite_row, integrate, Integral, Pair, Segments,
};
use super::options::{Kind, NodeRule, Options, MAX_NODES};
use crate::error::{KernelError, Result};
use crate::field::GridField;
use std::ops::Range;

/// Straight segments between usable (finite) rows, with Gauss–Legendre nodes.
pub(super) struct Straight<'a> {
    pub(super) x: &'a [f64],
    pub(super) dim: usize,
    pub(super) rule: &'a NodeRule,
    pub(super) kind: Kind,
}

impl Straight<'_> {
    /// Node `q` of the segment p → r into `out`, and the segment's vector.
    #[inline]
    pub(super) fn node(&self, p: usize, r: usize, q: usize, out: &mut [f64]) {
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
    pub(super) fn sum(
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

impl Gridded<'_> {
    /// The sums of [`Segments::segment`] over the segments between consecutive rows of
    /// `first..end`, monomorphized on `N` coordinates and `C` values per node (1: a scalar
    /// integral), with the same arithmetic in the same order. None at the first node that cannot
    /// be evaluated (a non-finite row, or a point outside under "error"): the row-by-row loop
    /// then skips or reports it. So a result proves every row usable.
    fn sweep<const N: usize, const C: usize>(&self, first: usize, end: usize) -> Option<Pair> {
        let rule = self.line.rule;
        let q = rule.len();
        let has_comp = !rule.companion.is_empty();
        let (mut a, mut wm, mut wc) = (
            [0.0; 2 * MAX_NODES],
            [0.0; 2 * MAX_NODES],
            [0.0; 2 * MAX_NODES],
        );
        for j in 0..q {
            a[j] = 0.5 * (1.0 + rule.xi[j]);
            wm[j] = 0.5 * rule.main[j];
            if has_comp {
                wc[j] = 0.5 * rule.companion[j];
            }
        }
        let x = self.line.x;
        let (mut main, mut comp) = (0.0, 0.0);
        let (mut pt, mut v) = ([0.0; N], [0.0; C]);
        for i in first..end - 1 {
            let (xp, xr) = (&x[i * N..(i + 1) * N], &x[(i + 1) * N..(i + 2) * N]);
            let mut dx = [0.0; N];
            for c in 0..N {
                dx[c] = xr[c] - xp[c];
            }
            let len = if C == 1 {
                dx.iter().map(|v| v * v).sum::<f64>().sqrt()
            } else {
                0.0
            };
            let (mut sm, mut sc) = (0.0, 0.0);
            for j in 0..q {
                for c in 0..N {
                    pt[c] = xp[c] + a[j] * (xr[c] - xp[c]);
                }
                if !self.field.eval_in::<N, C>(&pt, &mut v) {
                    return None;
                }
                let g = if C == 1 {
                    v[0] * len
                } else {
                    (0..N).map(|c| v[c] * dx[c]).sum::<f64>()
                };
                sm += wm[j] * g;
                if has_comp {
                    sc += wc[j] * g;
                }
            }
            main += sm;
            comp += sc;
        }
        Some((main, comp))
    }
}

impl Segments for Gridded<'_> {
    #[inline]
    fn usable(&self, row: usize) -> bool {
        finite_row(self.line.x, self.line.dim, row)
    }

    fn run(&self, _rows: &Range<usize>, first: usize, end: usize) -> Option<Pair> {
        if end - first < 2 {
            return None; // no segment shows whether the row is usable
        }
        match (self.line.dim, self.line.kind) {
            (3, Kind::Work) => self.sweep::<3, 3>(first, end),
            (3, Kind::Scalar) => self.sweep::<3, 1>(first, end),
            (_, Kind::Work) => self.sweep::<2, 2>(first, end),
            (_, Kind::Scalar) => self.sweep::<2, 1>(first, end),
        }
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
/// `opts.nodes`-point Gauss–Legendre quadrature on each segment (bi/trilinear interpolation at the
/// nodes). The companion rule has one node fewer (two for `nodes = 1`). Times, when given, are
/// only checked (the field does not depend on time).
pub fn gridded(
    x: &[f64],
    dim: usize,
    offsets: &[i64],
    t: Option<&[f64]>,
    field: &GridField,
    opts: &Options,
) -> Result<Integral> {
    let n = check_positions(x, dim)?;
    let comps = opts.kind.comps(dim);
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
    let rule = NodeRule::new(opts.nodes, opts.estimate)?;
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
